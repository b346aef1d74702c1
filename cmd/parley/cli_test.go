package main

import (
	"bufio"
	"bytes"
	"encoding/json"
	"errors"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
)

// runCLI calls dispatch in-process and returns the exit status and outputs.
func runCLI(t *testing.T, stdin string, args ...string) (int, string, string) {
	t.Helper()
	var out, errOut bytes.Buffer
	code := dispatch(args, strings.NewReader(stdin), &out, &errOut)
	return code, out.String(), errOut.String()
}

func decodeJSON(t *testing.T, s string, v any) {
	t.Helper()
	if err := json.Unmarshal([]byte(s), v); err != nil {
		t.Fatalf("output is not JSON: %v\n%s", err, s)
	}
}

// scipyValue reads one value from testdata/scipy/update_pool_reference.csv
// (made by testdata/scipy/update_pool_reference.py with python3-scipy).
func scipyValue(t *testing.T, kind, alpha, beta, n, x string) float64 {
	t.Helper()
	f, err := os.Open("../../testdata/scipy/update_pool_reference.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	prefix := strings.Join([]string{kind, alpha, beta, n, x}, ",") + ","
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		if rest, ok := strings.CutPrefix(sc.Text(), prefix); ok {
			v, err := strconv.ParseFloat(strings.Split(rest, ",")[0], 64)
			if err != nil {
				t.Fatal(err)
			}
			return v
		}
	}
	t.Fatalf("no reference row %s", prefix)
	return 0
}

func nearRel(got, want, tol float64) bool {
	return math.Abs(got-want) <= tol*math.Max(math.Abs(want), 1e-300)
}

func TestUpdateJSON(t *testing.T) {
	// Invented case: prior Beta(2, 38), 3 successes in 50 trials.
	code, out, errOut := runCLI(t, "", "update", "--alpha", "2", "--beta", "38", "--successes", "3", "--trials", "50", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	var got struct {
		Alpha, Beta, Mean float64
		Interval, HDI     []float64
		Conflict          struct {
			Lower    float64 `json:"p_lower"`
			Upper    float64 `json:"p_upper"`
			TwoSided float64 `json:"p_two_sided"`
		} `json:"prior_data_conflict"`
	}
	decodeJSON(t, out, &got)
	// Conjugate update (Gelman et al., BDA3 §2.4): Beta(2+3, 38+47).
	if got.Alpha != 5 || got.Beta != 85 || math.Abs(got.Mean-5.0/90) > 1e-15 {
		t.Errorf("posterior Beta(%v, %v) mean %v, want Beta(5, 85) mean 5/90", got.Alpha, got.Beta, got.Mean)
	}
	// Against elicit itself: the command only wires.
	post := elicit.Beta{Alpha: 5, Beta: 85}
	lo, hi, _ := elicit.EqualTailed(post, 0.95)
	hlo, hhi, _ := elicit.HDI(post, 0.95)
	if got.Interval[0] != lo || got.Interval[1] != hi || got.HDI[0] != hlo || got.HDI[1] != hhi {
		t.Errorf("intervals %v %v, elicit [%v %v] [%v %v]", got.Interval, got.HDI, lo, hi, hlo, hhi)
	}
	// Against SciPy (testdata/scipy): beta.ppf and the width-minimising
	// interval by scipy.optimize; betabinom cdf and upper tail.
	refs := []struct {
		name      string
		got, want float64
		tol       float64
	}{
		{"interval low", got.Interval[0], scipyValue(t, "eqt_lo", "5.0", "85.0", "0", "0.95"), 1e-9},
		{"interval high", got.Interval[1], scipyValue(t, "eqt_hi", "5.0", "85.0", "0", "0.95"), 1e-9},
		{"hdi low", got.HDI[0], scipyValue(t, "hdi_lo", "5.0", "85.0", "0", "0.95"), 1e-7},
		{"hdi high", got.HDI[1], scipyValue(t, "hdi_hi", "5.0", "85.0", "0", "0.95"), 1e-7},
		{"P(Y ≤ 3)", got.Conflict.Lower, scipyValue(t, "betabinom_cdf", "2.0", "38.0", "50", "3"), 1e-9},
		{"P(Y ≥ 3)", got.Conflict.Upper, scipyValue(t, "betabinom_upper", "2.0", "38.0", "50", "3"), 1e-9},
	}
	for _, r := range refs {
		if !nearRel(r.got, r.want, r.tol) {
			t.Errorf("%s: %.17g, scipy %.17g", r.name, r.got, r.want)
		}
	}
	if want := 2 * math.Min(got.Conflict.Lower, got.Conflict.Upper); got.Conflict.TwoSided != math.Min(1, want) {
		t.Errorf("two-sided %v, want %v", got.Conflict.TwoSided, want)
	}
}

func TestFitJSON(t *testing.T) {
	code, out, errOut := runCLI(t, "", "fit", "--probs", "0.05,0.5,0.95", "--values", "0.01,0.04,0.12", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	var keys map[string]json.RawMessage
	decodeJSON(t, out, &keys)
	for _, k := range []string{"alpha", "beta", "sse", "fitted", "max_prob_error", "warnings", "lower", "upper", "percentiles", "mean", "sd"} {
		if _, ok := keys[k]; !ok {
			t.Errorf("key %q missing from %s", k, out)
		}
	}
	var got fitOutput
	decodeJSON(t, out, &got)
	want, err := elicit.FitQuantiles(elicit.Judgement{Probs: []float64{0.05, 0.5, 0.95}, Values: []float64{0.01, 0.04, 0.12}, Lower: 0, Upper: 1})
	if err != nil {
		t.Fatal(err)
	}
	if got.Alpha != want.Dist.Alpha || got.Beta != want.Dist.Beta.Beta || got.SSE != want.SSE || got.MaxProbError != want.MaxProbError {
		t.Errorf("JSON %+v, elicit %+v", got, want)
	}
	for i := range want.Fitted {
		if got.Fitted[i] != want.Fitted[i] {
			t.Errorf("fitted[%d] %v, elicit %v", i, got.Fitted[i], want.Fitted[i])
		}
	}
	if got.Warnings == nil || len(got.Warnings) != len(want.Warnings) {
		t.Errorf("warnings %v, elicit %v", got.Warnings, want.Warnings)
	}
	// A J-shaped judgement (invented) must carry its warning as a string.
	_, out, _ = runCLI(t, "", "fit", "--probs", "0.5,0.9", "--values", "0.001,0.02", "--format", "json")
	var j struct{ Warnings []string }
	decodeJSON(t, out, &j)
	if len(j.Warnings) == 0 || !strings.Contains(j.Warnings[0], "J-shaped") {
		t.Errorf("J-shaped fit warnings %q", j.Warnings)
	}
}

func TestPoolJSON(t *testing.T) {
	in := `{"experts":[{"alpha":2,"beta":38,"weight":1},{"alpha":6,"beta":54,"weight":3}],"probs":[0.05,0.5,0.95],"method":"linear"}`
	code, out, errOut := runCLI(t, in, "pool", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	var got struct {
		Mean, SD  float64
		Quantiles []float64
		Beta      map[string]float64
	}
	decodeJSON(t, out, &got)
	ds := []elicit.ScaledBeta{elicit.Unit(elicit.Beta{Alpha: 2, Beta: 38}), elicit.Unit(elicit.Beta{Alpha: 6, Beta: 54})}
	p, err := elicit.LinearPool(ds, []float64{1, 3})
	if err != nil {
		t.Fatal(err)
	}
	qs, _ := p.Quantiles([]float64{0.05, 0.5, 0.95})
	for i := range qs {
		if got.Quantiles[i] != qs[i] {
			t.Errorf("quantile %d: %v, elicit %v", i, got.Quantiles[i], qs[i])
		}
	}
	// Mixture mean by hand: 0.25·2/40 + 0.75·6/60 = 0.0875.
	if math.Abs(got.Mean-0.0875) > 1e-15 || got.SD != p.SD() {
		t.Errorf("mean %v sd %v", got.Mean, got.SD)
	}
	r, _ := p.BestBeta()
	if got.Beta["alpha"] != r.Dist.Alpha || got.Beta["beta"] != r.Dist.Beta.Beta {
		t.Errorf("beta %v, elicit %v", got.Beta, r.Dist.Beta)
	}

	// Log pool (Genest & Zidek 1986): α = 0.25·2 + 0.75·6 = 5,
	// β = 0.25·38 + 0.75·54 = 50, worked by hand.
	in = strings.Replace(in, `"linear"`, `"log"`, 1)
	code, out, errOut = runCLI(t, in, "pool", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	decodeJSON(t, out, &got)
	if math.Abs(got.Beta["alpha"]-5) > 1e-14 || math.Abs(got.Beta["beta"]-50) > 1e-14 || math.Abs(got.Mean-5.0/55) > 1e-15 {
		t.Errorf("log pool beta %v mean %v", got.Beta, got.Mean)
	}
}

func TestScriptingBadInput(t *testing.T) {
	// Each bad input: exit 2, nothing on stdout, one line on stderr that
	// names the field and the rule.
	good := []string{"--alpha", "2", "--beta", "38", "--successes", "3", "--trials", "50"}
	with := func(args []string, flag, value string) []string {
		out := append([]string{"update"}, args...)
		for i := range out {
			if out[i] == flag {
				out[i+1] = value
			}
		}
		return out
	}
	tests := []struct {
		name  string
		args  []string
		stdin string
		want  []string // fragments of the message
	}{
		{"successes above trials", with(good, "--successes", "60"), "", []string{"successes", string(elicit.RuleCountRange)}},
		{"negative trials", with(good, "--trials", "-5"), "", []string{"trials", string(elicit.RuleCountRange), "got -5"}}, // a whole number below the range, not "not a whole number"
		{"hex alpha", with(good, "--alpha", "0x1p-2"), "", []string{"alpha", "plain decimal"}},
		{"underscore beta", with(good, "--beta", "3_8"), "", []string{"beta", "plain decimal"}},
		{"NaN alpha", with(good, "--alpha", "NaN"), "", []string{"alpha", "plain decimal"}},
		{"overflow alpha", with(good, "--alpha", "1e999"), "", []string{"alpha", string(elicit.RuleFinite)}},
		{"zero alpha", with(good, "--alpha", "0"), "", []string{"alpha", string(elicit.RulePositive)}},
		{"level 1", append(append([]string{"update"}, good...), "--level", "1"), "", []string{"level", string(elicit.RuleProbOpen)}},
		{"bad format", append(append([]string{"update"}, good...), "--format", "xml"), "", []string{"format", "text or json"}},
		{"unknown flag", []string{"update", "--alpah", "2"}, "", []string{"alpah"}},
		{"stray argument", []string{"fit", "extra"}, "", []string{"extra", "unexpected argument"}},
		// A list typed with spaces: the flag whose list it is is named, not
		// the rest of the list as a flag ("--0.5,: unexpected argument").
		{"list with spaces", []string{"fit", "--probs", "0.05,", "0.5,", "0.95", "--values", "0.01,0.04,0.12"}, "", []string{`--probs: unexpected argument "0.5," after its value "0.05,"`, "in quotes"}},
		{"list with spaces after =", []string{"fit", "--probs=0.05,", "0.5,", "0.95"}, "", []string{`--probs: unexpected argument "0.5," after its value "0.05,"`, "in quotes"}},
		{"negative list with spaces", []string{"fit", "--values", "-0.5,", "0.5"}, "", []string{`--values: unexpected argument "0.5" after its value "-0.5,"`}},
		{"fit probs decreasing", []string{"fit", "--probs", "0.5,0.25", "--values", "0.1,0.2"}, "", []string{"probs[1]", string(elicit.RuleProbIncreasing)}},
		{"fit values outside", []string{"fit", "--probs", "0.25,0.5", "--values", "0.1,1.2"}, "", []string{"values[1]", string(elicit.RuleValueInBounds)}},
		{"fit lengths", []string{"fit", "--probs", "0.25,0.5", "--values", "0.1"}, "", []string{"values", string(elicit.RuleLengthMatch)}},
		{"fit missing probs", []string{"fit", "--values", "0.1,0.2"}, "", []string{"probs", string(elicit.RuleRequired)}},
		{"fit bounds", []string{"fit", "--probs", "0.25,0.5", "--values", "3,4", "--lower", "5", "--upper", "2"}, "", []string{"lower", string(elicit.RuleBoundsOrder)}},
		{"pool unknown field", []string{"pool"}, `{"experts":[{"alpha":2,"beta":3}],"prob":[0.5]}`, []string{"prob", string(ruleJSONField)}},
		{"pool unknown expert field", []string{"pool"}, `{"experts":[{"alpha":2,"beta":3,"mean":0.4}]}`, []string{"mean", string(ruleJSONField)}},
		{"pool bad JSON", []string{"pool"}, `{"experts":[`, []string{"stdin", string(ruleJSONSyntax)}},
		{"pool trailing data", []string{"pool"}, `{"experts":[{"alpha":2,"beta":3}]} {}`, []string{"stdin", string(ruleJSONSyntax)}},
		{"pool string number", []string{"pool"}, `{"experts":[{"alpha":"2","beta":3}]}`, []string{"experts[0].alpha: " + string(ruleJSONType), "got string, want number"}},
		// Review 3, finding 6: encoding/json keeps the last of a repeated
		// key and matches keys in any letter case; both were taken silently.
		{"pool repeated key", []string{"pool"}, `{"experts":[{"alpha":2,"beta":30,"weight":1,"alpha":3}],"probs":[0.5]}`, []string{"experts[0].alpha: " + string(input.RuleDuplicateKey)}},
		{"pool repeated top key", []string{"pool"}, `{"experts":[{"alpha":2,"beta":30}],"probs":[0.5],"probs":[0.25]}`, []string{"probs: " + string(input.RuleDuplicateKey)}},
		{"pool key in capitals", []string{"pool"}, `{"experts":[{"Alpha":2,"beta":30}]}`, []string{"experts[0].Alpha: " + string(input.RuleKeySpelling), `"alpha", not "Alpha"`}},
		{"pool keys differing in case", []string{"pool"}, `{"experts":[{"alpha":2,"beta":30}],"Method":"log","method":"linear"}`, []string{"Method: " + string(input.RuleKeySpelling)}},
		{"pool long s", []string{"pool"}, "{\"expert\u017f\":[{\"alpha\":2,\"beta\":30}]}", []string{"expert\u017f: " + string(input.RuleKeySpelling)}},
		{"pool wrong type in the second expert", []string{"pool"}, `{"experts":[{"alpha":2,"beta":3},{"alpha":2,"beta":true}]}`, []string{"experts[1].beta: " + string(ruleJSONType), "got true or false, want number"}},
		{"pool wrong type in a list", []string{"pool"}, `{"experts":[{"alpha":2,"beta":3}],"probs":[0.5,"0.9"]}`, []string{"probs[1]: " + string(ruleJSONType)}},
		{"pool array for the object", []string{"pool"}, `[]`, []string{"stdin: " + string(ruleJSONType), "got array, want object"}},
		{"pool number beyond float64", []string{"pool"}, `{"experts":[{"alpha":1e400,"beta":3}]}`, []string{"experts[0].alpha: " + string(elicit.RuleFinite), "1e400"}},
		{"pool control character in a string", []string{"pool"}, `{"experts":[{"alpha":2,"beta":3}],"method":"lo\u001bg"}`, []string{"method: " + string(input.RuleTextValid)}},
		{"pool NaN literal", []string{"pool"}, `{"experts":[{"alpha":NaN,"beta":3}]}`, []string{"stdin", string(ruleJSONSyntax)}},
		{"pool no experts", []string{"pool"}, `{"experts":[]}`, []string{"experts", string(elicit.RuleCount)}},
		{"pool missing beta", []string{"pool"}, `{"experts":[{"alpha":2}]}`, []string{"experts[0].beta", string(elicit.RuleRequired)}},
		{"pool bad alpha", []string{"pool"}, `{"experts":[{"alpha":2,"beta":3},{"alpha":-1,"beta":3}]}`, []string{"experts[1].alpha", string(elicit.RulePositive)}},
		{"pool some weights", []string{"pool"}, `{"experts":[{"alpha":2,"beta":3,"weight":1},{"alpha":1,"beta":3}]}`, []string{"experts[1].weight", string(ruleAllOrNone)}},
		{"pool negative weight", []string{"pool"}, `{"experts":[{"alpha":2,"beta":3,"weight":-1}]}`, []string{"experts[0].weight", string(elicit.RuleNonNegative)}},
		{"pool zero weights", []string{"pool"}, `{"experts":[{"alpha":2,"beta":3,"weight":0}]}`, []string{"weight", string(elicit.RuleWeightsNotAllZero)}},
		{"pool probs", []string{"pool"}, `{"experts":[{"alpha":2,"beta":3}],"probs":[0.5,1]}`, []string{"probs[1]", string(elicit.RuleProbOpen)}},
		{"pool method", []string{"pool"}, `{"experts":[{"alpha":2,"beta":3}],"method":"mean"}`, []string{"method", string(elicit.RuleUnknown)}},
		// An empty method is refused, as an empty flag is, never read as
		// the method left out (it was taken as linear).
		{"pool method empty", []string{"pool"}, `{"experts":[{"alpha":2,"beta":3}],"method":""}`, []string{"method", string(elicit.RuleUnknown), `got ""`}},
		{"pool bounds", []string{"pool"}, `{"experts":[{"alpha":2,"beta":3}],"lower":1,"upper":1}`, []string{"lower", string(elicit.RuleBoundsOrder)}},
		{"log pool underflow", []string{"pool"}, `{"experts":[{"alpha":5e-324,"beta":3},{"alpha":5e-324,"beta":3}],"method":"log"}`, []string{"experts[0].alpha", string(elicit.RuleShapeRange)}},
		// Issue 11: inputs that overflowed or underflowed are refused up
		// front, naming the field and the rule.
		{"update alpha overflows", []string{"update", "--alpha", "1e308", "--beta", "3", "--successes", "1", "--trials", "10"}, "", []string{"alpha", string(elicit.RuleShapeRange)}},
		{"update beta overflows", []string{"update", "--alpha", "1", "--beta", "1e308", "--successes", "1", "--trials", "10"}, "", []string{"beta", string(elicit.RuleShapeRange)}},
		{"update beta subnormal", []string{"update", "--alpha", "2", "--beta", "1e-320", "--successes", "0", "--trials", "0"}, "", []string{"beta", string(elicit.RuleShapeRange)}},
		{"update posterior beyond envelope", []string{"update", "--alpha", "1", "--beta", "9500000", "--successes", "0", "--trials", "1000000"}, "", []string{"trials", string(elicit.RulePosteriorRange)}},
		{"update level too close to 1", []string{"update", "--alpha", "1", "--beta", "1", "--successes", "0", "--trials", "10", "--level", "0.99999999999999"}, "", []string{"level", string(elicit.RuleCentralTails)}},
		{"a flag given twice", []string{"fit", "--probs", "0.05,0.5,0.95", "--values", "0.01,0.04,0.12", "--probs", "0.1,0.5,0.9"}, "", []string{"--probs", "given more than once"}},
		{"a flag given twice, once with =", []string{"update", "--alpha=1", "--beta", "1", "--successes", "0", "--trials", "10", "-alpha", "2"}, "", []string{"--alpha", "given more than once"}},
		{"prior coverage too close to 1", []string{"prior", "--interval", "0.03,0.12", "--coverage", "0.9999999999999999"}, "", []string{"coverage", string(elicit.RuleCentralTails)}},
		// It said "interval: must be a finite number (… sd +Inf: got +Inf)".
		{"prior coverage too close to 0", []string{"prior", "--interval", "0.03,0.12", "--coverage", "1e-300", "--method", "moments"}, "", []string{"coverage", string(elicit.RuleCentralNarrow)}},
		{"update level too close to 0", []string{"update", "--alpha", "1", "--beta", "1", "--successes", "0", "--trials", "10", "--level", "1e-13"}, "", []string{"level", string(elicit.RuleCentralNarrow)}},
		{"plan level too close to 1", []string{"plan", "--alpha", "2", "--beta", "38", "--trials", "200", "--length", "0.04", "--level", "0.9999999999999999"}, "", []string{"level", string(elicit.RuleCentralTails)}},
		{"plan trials above the limit", []string{"plan", "--alpha", "2", "--beta", "38", "--trials", "1000001"}, "", []string{"trials", "1 to 1000000, got 1000001"}},
		{"plan confidence subnormal", []string{"plan", "--alpha", "2", "--beta", "38", "--trials", "200", "--threshold", "0.08", "--direction", "below", "--confidence", "1e-320"}, "", []string{"confidence", string(elicit.RuleProbRange)}},
		{"pool huge and tiny shapes", []string{"pool"}, `{"experts":[{"alpha":1e300,"beta":1e300},{"alpha":1e-300,"beta":1e-300}]}`, []string{"experts[0].alpha", string(elicit.RuleShapeRange)}},
		{"log pool alpha overflows", []string{"pool"}, `{"experts":[{"alpha":1e308,"beta":3},{"alpha":2,"beta":3}],"method":"log"}`, []string{"experts[0].alpha", string(elicit.RuleShapeRange)}},
		{"pool probability subnormal", []string{"pool"}, `{"experts":[{"alpha":2,"beta":3}],"probs":[1e-320,0.5]}`, []string{"probs[0]", string(elicit.RuleProbRange)}},
		{"fit subnormal values", []string{"fit", "--probs", "0.05,0.5,0.95", "--values", "4.9e-324,1e-323,1.5e-323"}, "", []string{"values[0]", string(elicit.RuleValueNearBound)}},
		{"fit probability subnormal", []string{"fit", "--probs", "1e-320,0.5", "--values", "0.1,0.2"}, "", []string{"probs[0]", string(elicit.RuleProbRange)}},
		// A number that underflows to 0 (strconv reads 1e-400 as 0 without
		// an error) was taken as a 0 nobody typed: on [-1, 1] the fit
		// went through the middle value 0, and elsewhere the message
		// said "got 0" of a number the user had typed above 0.
		{"fit value underflows", []string{"fit", "--probs", "0.05,0.5,0.95", "--values", "-0.5,1e-400,0.5", "--lower", "-1", "--upper", "1"}, "", []string{"values[1]", string(input.RuleUnderflow), "1e-400"}},
		{"fit bound underflows", []string{"fit", "--probs", "0.05,0.5,0.95", "--values", "0.2,0.5,0.9", "--lower", "1e-400"}, "", []string{"lower", string(input.RuleUnderflow)}},
		{"prior sd underflows", []string{"prior", "--mean", "0.5", "--sd", "1e-400"}, "", []string{"sd", string(input.RuleUnderflow)}},
		{"pool number longer than a form takes", []string{"pool"}, `{"experts":[{"alpha":2.` + strings.Repeat("0", 70) + `,"beta":3}]}`, []string{"experts[0].alpha", string(input.RuleNumberSyntax), "72 characters, at most 64"}},
		{"pool weight underflows", []string{"pool"}, `{"experts":[{"alpha":2,"beta":3,"weight":1e-400},{"alpha":3,"beta":3,"weight":1}]}`, []string{"experts[0].weight", string(input.RuleUnderflow)}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			code, out, errOut := runCLI(t, tc.stdin, tc.args...)
			if code != exitBadInput {
				t.Errorf("exit %d, want 2; stderr %q", code, errOut)
			}
			if out != "" {
				t.Errorf("stdout %q, want nothing", out)
			}
			if strings.Count(errOut, "\n") != 1 || !strings.HasSuffix(errOut, "\n") {
				t.Errorf("stderr is not one line: %q", errOut)
			}
			for _, w := range tc.want {
				if !strings.Contains(errOut, w) {
					t.Errorf("stderr %q does not contain %q", errOut, w)
				}
			}
			if strings.Contains(errOut, "main.") || strings.Contains(errOut, "float64") {
				t.Errorf("stderr %q names a Go type", errOut)
			}
		})
	}
}

// The largest central coverage the rule names, 1 − 2e-12 (typed
// 0.999999999998), is taken by every command that reads one; it was
// refused with "at most 1 − 2e-12" by 2.2e-17 of float64 rounding in its
// tail. The float64 above it is refused.
func TestTheLargestCoverageIsTaken(t *testing.T) {
	for _, args := range []func(c string) []string{
		func(c string) []string {
			return []string{"update", "--alpha", "2", "--beta", "3", "--successes", "1", "--trials", "10", "--level", c}
		},
		func(c string) []string { return []string{"prior", "--interval", "0.03,0.12", "--coverage", c} },
		func(c string) []string {
			return []string{"prior", "--interval", "0.03,0.12", "--coverage", c, "--method", "moments"}
		},
	} {
		if code, _, errOut := runCLI(t, "", args("0.999999999998")...); code != exitOK {
			t.Errorf("%v: exit %d, %s", args("0.999999999998"), code, errOut)
		}
		above := args("0.9999999999980001")
		if code, _, errOut := runCLI(t, "", above...); code != exitBadInput || !strings.Contains(errOut, string(elicit.RuleCentralTails)) {
			t.Errorf("%v: exit %d, %s", above, code, errOut)
		}
	}
}

func TestScriptingBinary(t *testing.T) {
	// The real binary: exit status and stderr as a shell sees them.
	if testing.Short() {
		t.Skip("builds the binary")
	}
	bin := parleyBinary(t)
	tests := []struct {
		args  []string
		stdin string
		code  int
		want  string
	}{
		{[]string{"update", "--alpha", "2", "--beta", "38", "--successes", "51", "--trials", "50"}, "", 2, "successes: " + string(elicit.RuleCountRange)},
		{[]string{"pool"}, `{"experts":[{"alpha":2,"beta":3}],"colour":"red"}`, 2, "colour: " + string(ruleJSONField)},
		{[]string{"pool"}, `{"experts":[{"alpha":2,"beta":30,"weight":1,"alpha":3}]}`, 2, "experts[0].alpha: " + string(input.RuleDuplicateKey)},
		{[]string{"fit", "--probs", "0.05,0.5,0.95", "--values", "0.01,0.04,Inf"}, "", 2, "values[2]"},
		{[]string{"update", "--alpha", "2", "--beta", "38", "--successes", "3", "--trials", "50", "--format", "json"}, "", 0, `"hdi"`},
	}
	for _, tc := range tests {
		cmd := exec.Command(bin, tc.args...)
		cmd.Stdin = strings.NewReader(tc.stdin)
		var out, errOut bytes.Buffer
		cmd.Stdout, cmd.Stderr = &out, &errOut
		err := cmd.Run()
		code := 0
		if ee, ok := err.(*exec.ExitError); ok {
			code = ee.ExitCode()
		} else if err != nil {
			t.Fatal(err)
		}
		if code != tc.code {
			t.Errorf("%v: exit %d, want %d; stderr %q", tc.args, code, tc.code, errOut.String())
		}
		text := out.String()
		if tc.code != 0 {
			text = errOut.String()
			if strings.Count(text, "\n") != 1 || strings.Contains(text, "goroutine") || out.Len() != 0 {
				t.Errorf("%v: stderr %q, stdout %q", tc.args, text, out.String())
			}
		}
		if !strings.Contains(text, tc.want) {
			t.Errorf("%v: output %q does not contain %q", tc.args, text, tc.want)
		}
	}
}

func TestPoolWithoutSingleBeta(t *testing.T) {
	// Beta(5, 0.001) and Beta(8, 0.002) (invented, extreme): their grid
	// quantiles crowd within an ulp of 1 and no Beta inside the fitter's
	// range represents the pool well, so it is printed with a warning,
	// not an error: either "beta": null, or a Beta whose distance from
	// the pool is flagged. (A pool of Beta(5, 0.001) alone is that Beta,
	// exactly: TestPoolOfOneBetaIsThatBeta.)
	code, out, errOut := runCLI(t, `{"experts":[{"alpha":5,"beta":0.001},{"alpha":8,"beta":0.002}]}`, "pool", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	var got struct {
		Beta     *elicit.Beta
		Warnings []string
		Mean     float64
	}
	decodeJSON(t, out, &got)
	switch {
	case len(got.Warnings) == 0:
		t.Errorf("beta %v, warnings %q; want a warning", got.Beta, got.Warnings)
	case got.Beta == nil && !strings.Contains(got.Warnings[0], "no single Beta"),
		got.Beta != nil && !strings.Contains(got.Warnings[0], "far from the pool"):
		t.Errorf("beta %v, warnings %q", got.Beta, got.Warnings)
	}
	if want := (5/5.001 + 8/8.002) / 2; math.Abs(got.Mean-want) > 1e-15 {
		t.Errorf("mean %v, want %v", got.Mean, want)
	}
}

// A pool of one expert is that expert's Beta, exactly and without a
// warning that it is far from one, even Beta(5, 0.001), whose grid
// quantiles crowd within an ulp of 1; its 5%, 50% and 95% points,
// 1 − 6.6e-24, 1 − 1.2e-302 and 1 − 1.2e-1302 (ln(1 − x) = (ln(1 − p) +
// ln 0.001 + lbeta(0.001, 5))/0.001, R 4.2.2's lbeta), are written 1 and
// said to be (the 5% and 50% points had been written as the last double
// below 1, without a word).
func TestPoolOfOneBetaIsThatBeta(t *testing.T) {
	code, out, errOut := runCLI(t, `{"experts":[{"alpha":5,"beta":0.001}]}`, "pool", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	var got struct {
		Beta     *elicit.Beta
		Warnings []string
	}
	decodeJSON(t, out, &got)
	if got.Beta == nil || *got.Beta != (elicit.Beta{Alpha: 5, Beta: 0.001}) || len(got.Warnings) != 1 ||
		!strings.HasPrefix(got.Warnings[0], "The pool's 5% point is about 1 − 6.6e-24, and the pool's 50% point is about 1 − 1.2e-302, and the pool's 95% point is about 1 − 1.2e-1302:") {
		t.Errorf("beta %v, warnings %q", got.Beta, got.Warnings)
	}
}

// Two experts who disagree sharply (invented: Beta(2, 30) and Beta(30, 2))
// pool to a bimodal mixture no single Beta is close to; the command says
// so, while a pool of two close experts carries no warning.
func TestPoolFarFromOneBetaWarns(t *testing.T) {
	code, out, errOut := runCLI(t, `{"experts":[{"alpha":2,"beta":30},{"alpha":30,"beta":2}]}`, "pool", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	var got struct {
		Beta    *elicit.Beta
		BetaFit struct {
			MaxCDFError float64 `json:"max_cdf_error"`
		} `json:"beta_fit"`
		Warnings []string
	}
	decodeJSON(t, out, &got)
	if got.Beta == nil || got.BetaFit.MaxCDFError <= elicit.PoorFitThreshold ||
		len(got.Warnings) == 0 || !strings.Contains(got.Warnings[0], "far from the pool") {
		t.Errorf("bimodal pool: beta %v, max CDF gap %v, warnings %q", got.Beta, got.BetaFit.MaxCDFError, got.Warnings)
	}

	code, out, errOut = runCLI(t, `{"experts":[{"alpha":4,"beta":60},{"alpha":5,"beta":70}]}`, "pool", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	got.Warnings = nil
	decodeJSON(t, out, &got)
	if len(got.Warnings) != 0 {
		t.Errorf("close experts: warnings %q, want none", got.Warnings)
	}
}

// rReference reads one reproducer's answer from
// testdata/r/envelope_reference.csv (written by
// testdata/r/envelope_reference.R with R 4.2's qbeta and uniroot).
func rReference(t *testing.T, name string) float64 {
	t.Helper()
	data, err := os.ReadFile("../../testdata/r/envelope_reference.csv")
	if err != nil {
		t.Fatal(err)
	}
	for _, line := range strings.Split(string(data), "\n") {
		c := strings.Split(line, ",")
		if len(c) == 7 && c[0] == "repro" && c[1] == name {
			v, err := strconv.ParseFloat(c[5], 64)
			if err != nil {
				t.Fatal(err)
			}
			return v
		}
	}
	t.Fatalf("no reference %q", name)
	return 0
}

// TestUpdateExtremeTails: issue 11's update reproducers give R's interval
// ends (to 1e-9 relative, in 1 − x near 1), and a J-shaped posterior says
// why its highest-density interval starts at the bound.
func TestUpdateExtremeTails(t *testing.T) {
	var got struct {
		Interval [2]float64 `json:"interval"`
		HDI      [2]float64 `json:"hdi"`
		Warnings []string   `json:"warnings"`
	}
	code, out, errOut := runCLI(t, "", "update", "--alpha", "1", "--beta", "1", "--successes", "0", "--trials", "1000000", "--level", "0.999999", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	decodeJSON(t, out, &got)
	if want := rReference(t, "update_upper"); math.Abs(got.Interval[1]-want) > 1e-9*want {
		t.Errorf("upper end %.17g, R %.17g", got.Interval[1], want)
	}
	if got.HDI[0] != 0 || len(got.Warnings) == 0 || !strings.Contains(strings.Join(got.Warnings, " "), "J-shaped") {
		t.Errorf("J-shaped posterior: hdi %v, warnings %q", got.HDI, got.Warnings)
	}
	code, out, errOut = runCLI(t, "", "update", "--alpha", "1", "--beta", "1", "--successes", "30000", "--trials", "30000", "--level", "0.999999", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	got.Warnings = nil
	decodeJSON(t, out, &got)
	if want := rReference(t, "update_lower"); math.Abs((1-got.Interval[0])-(1-want)) > 1e-9*(1-want) {
		t.Errorf("lower end %.17g, R %.17g", got.Interval[0], want)
	}
	if got.HDI[1] != 1 || !strings.Contains(strings.Join(got.Warnings, " "), "J-shaped") {
		t.Errorf("J-shaped posterior: hdi %v, warnings %q", got.HDI, got.Warnings)
	}
}

// TestUpdateHDIEndBeyondFloat64: for α just above 1 the highest-density
// interval's lower end, about 10^-2900000 for Beta(1.000001, 50), is
// printed as 0 (its float64) with a note saying why, not as the smallest
// subnormal 4.94066e-324. The reference is SciPy 1.10.1's equal-density
// solution in logs (testdata/scipy/update_pool_reference.py, hdi_far_*).
func TestUpdateHDIEndBeyondFloat64(t *testing.T) {
	var got struct {
		HDI      [2]float64 `json:"hdi"`
		Warnings []string   `json:"warnings"`
	}
	code, out, errOut := runCLI(t, "", "update", "--alpha", "1.000001", "--beta", "50", "--successes", "0", "--trials", "0", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	decodeJSON(t, out, &got)
	const hi = 0.058155115040525195 // hdi_far_hi of Beta(1.000001, 50) at 0.95
	if got.HDI[0] != 0 || math.Abs(got.HDI[1]-hi) > 1e-9*hi || !strings.Contains(strings.Join(got.Warnings, " "), "smaller than the computer can hold") {
		t.Errorf("hdi %v, want [0, %v]; warnings %q", got.HDI, hi, got.Warnings)
	}
	_, text, _ := runCLI(t, "", "update", "--alpha", "1.000001", "--beta", "50", "--successes", "0", "--trials", "0")
	if !strings.Contains(text, "highest-density interval [0, 0.0581551]") || strings.Contains(text, "e-324") ||
		!strings.Contains(text, "posterior Beta(1.000001, 50)") ||
		!strings.Contains(text, "α = 1.000001, just above 1") {
		t.Errorf("text output:\n%s", text)
	}
}

// TestPoolFlatGapAndTail: issue 11's pool reproducers through the
// command: the tail quantile is R's root of the mixture CDF, and the
// median of a symmetric pool of two distant experts is 0.5, reported as
// not unique, however it is asked for.
func TestPoolFlatGapAndTail(t *testing.T) {
	var got struct {
		Quantiles []float64             `json:"quantiles"`
		Detail    []elicit.PoolQuantile `json:"quantile_detail"`
		Warnings  []string              `json:"warnings"`
	}
	code, out, errOut := runCLI(t, `{"experts":[{"alpha":100000,"beta":1},{"alpha":50000,"beta":2}],"probs":[1e-8,0.5]}`, "pool", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	decodeJSON(t, out, &got)
	if want := rReference(t, "pool_tail"); math.Abs((1-got.Quantiles[0])-(1-want)) > 1e-9*(1-want) {
		t.Errorf("1e-8 quantile %.17g, R %.17g", got.Quantiles[0], want)
	}
	for _, probs := range []string{"[0.05,0.5,0.95]", "[0.4999,0.5,0.5001]"} {
		code, out, errOut := runCLI(t, `{"experts":[{"alpha":200,"beta":800},{"alpha":800,"beta":200}],"probs":`+probs+`}`, "pool", "--format", "json")
		if code != 0 {
			t.Fatalf("exit %d: %s", code, errOut)
		}
		got.Warnings = nil
		decodeJSON(t, out, &got)
		if got.Quantiles[1] != 0.5 || got.Detail[1].Unique || !strings.Contains(strings.Join(got.Warnings, " "), "not unique") {
			t.Errorf("probs %s: quantiles %v, detail %+v, warnings %q", probs, got.Quantiles, got.Detail[1], got.Warnings)
		}
	}
	_, text, _ := runCLI(t, `{"experts":[{"alpha":200,"beta":800},{"alpha":800,"beta":200}]}`, "pool")
	if !strings.Contains(text, "not unique") {
		t.Errorf("text output does not say the median is not unique:\n%s", text)
	}
}

// Bounds as wide as the rules allow give finite summaries: fit, pool and
// prior used to fail with exit 1 when the variance, (2e300)² times the
// unit one, overflowed.
func TestWidestBoundsOnTheCommandLine(t *testing.T) {
	for _, c := range []struct {
		stdin string
		args  []string
	}{
		{"", []string{"fit", "--probs", "0.05,0.5,0.95", "--values", "-1e299,0,1e299", "--lower", "-1e300", "--upper", "1e300", "--format", "json"}},
		{`{"experts":[{"alpha":2,"beta":30},{"alpha":20,"beta":3}],"lower":-1e300,"upper":1e300}`, []string{"pool", "--format", "json"}},
		{"", []string{"prior", "--uniform", "--upper", "1e300", "--format", "json"}},
	} {
		code, out, errOut := runCLI(t, c.stdin, c.args...)
		if code != 0 {
			t.Errorf("%v: exit %d: %s", c.args, code, errOut)
			continue
		}
		var v struct {
			SD float64 `json:"sd"`
		}
		decodeJSON(t, out, &v)
		if !(v.SD > 1e298 && v.SD < 2e300) {
			t.Errorf("%v: sd %v", c.args, v.SD)
		}
	}
}

// A negative number after a flag is its value, not a flag: giving the
// same negative value to two flags is no repetition.
func TestRepeatedFlagReadsNegativeNumbersAsValues(t *testing.T) {
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--lower", "-1", "--upper", "-1"}, ""},
		{[]string{"--values", "-.5,-.2", "--probs", "0.1,0.9", "--values", "1"}, "values"},
		{[]string{"--db", "x.db", "--", "--db"}, ""},
		{[]string{"-h", "--h"}, "h"},
	} {
		if got := repeatedFlag(c.args); got != c.want {
			t.Errorf("%v: %q, want %q", c.args, got, c.want)
		}
	}
}

// A value near a bound is written on its own side of the bound: a stated
// 0.9999999999 and its fitted 95% value are not "1", the bound itself, in
// the text of fit, and an upper interval end short of 1 is not "1" in
// update's (Beta(30001, 1)'s quantile is p^(1/30001) in closed form:
// (1 − 5e-7)^(1/30001) = 1 − 1.67e-11; the lower end 0.999517 is R 4.2's
// qbeta(5e-7, 30001, 1) to six figures).
func TestTextOutputKeepsValuesOffTheBounds(t *testing.T) {
	code, out, errOut := runCLI(t, "", "fit", "--probs", "0.05,0.5,0.95", "--values", "0.9,0.99999,0.9999999999")
	if code != 0 {
		t.Fatalf("fit: exit %d: %s", code, errOut)
	}
	if !strings.Contains(out, "95% 0.9999999999\n") || !strings.Contains(out, "0.95         0.9999999999 0.9999999999 ") {
		t.Errorf("fit text writes the value near 1 as 1:\n%s", out)
	}
	code, out, errOut = runCLI(t, "", "update", "--alpha", "1", "--beta", "1", "--successes", "30000", "--trials", "30000", "--level", "0.999999")
	if code != 0 {
		t.Fatalf("update: exit %d: %s", code, errOut)
	}
	if !strings.Contains(out, "equal-tailed interval [0.999517, 0.99999999998]") {
		t.Errorf("update text writes an interval end short of 1 as 1:\n%s", out)
	}
}

// plan's text writes the predictive count's mean and sd in plain digits,
// as the counts beside it: a Beta(2, 38) prior over 500,000 trials
// predicts a mean of 500000 × 2/40 = 25000 successes (the Beta-binomial
// mean, n·α/(α+β)), which %.4g wrote as 2.5e+04.
func TestPlanTextWritesCountsInPlainDigits(t *testing.T) {
	code, out, errOut := runCLI(t, "", "plan", "--alpha", "2", "--beta", "38", "--trials", "500000")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	if !strings.Contains(out, "in 500000 trials: mean 25000, sd ") || strings.Contains(out, "e+0") {
		t.Errorf("plan text:\n%s", out)
	}
}

// TestNegativeZeroBoundIsWrittenAsZero: a bound typed as -0 is 0 in the
// text and the JSON; it was "Beta(2.02244, 40.5924) on [-0, 1]" and
// "lower": -0.
func TestNegativeZeroBoundIsWrittenAsZero(t *testing.T) {
	code, out, errs := run("fit", "--probs", "0.05,0.5,0.95", "--values", "0.01,0.04,0.12", "--lower", "-0")
	if code != exitOK || !strings.Contains(out, "on [0, 1]") || strings.Contains(out, "[-0") {
		t.Errorf("fit --lower -0: exit %d, %q %q", code, out, errs)
	}
	code, out, errs = run("prior", "--uniform", "--lower", "-1", "--upper", "-0", "--format", "json")
	if code != exitOK || strings.Contains(out, ": -0,") || strings.Contains(out, ": -0\n") {
		t.Errorf("prior --upper -0: exit %d, %q %q", code, out, errs)
	}
}

// TestPoolKeepsItsJSONShape: "probs": [] asks for no quantiles, and the
// pool's quantiles and quantile_detail are then empty arrays, as every
// other list of the output is, not null (the linear pool printed
// "quantiles": null, the log pool "quantile_detail": null); a JSON -0
// bound is 0; one expert is "1 expert".
func TestPoolKeepsItsJSONShape(t *testing.T) {
	for _, method := range []string{"linear", "log"} {
		in := `{"experts":[{"alpha":2,"beta":30}],"probs":[],"lower":-0,"method":"` + method + `"}`
		code, out, errOut := runCLI(t, in, "pool", "--format", "json")
		if code != exitOK {
			t.Fatalf("%s: exit %d: %s", method, code, errOut)
		}
		var got map[string]any
		decodeJSON(t, out, &got)
		for _, key := range []string{"probs", "quantiles", "quantile_detail", "warnings"} {
			if a, ok := got[key].([]any); !ok || len(a) != 0 {
				t.Errorf("%s: %s is %#v, want []", method, key, got[key])
			}
		}
		if strings.Contains(out, "-0") {
			t.Errorf("%s: a bound written -0:\n%s", method, out)
		}
		code, out, errOut = runCLI(t, in, "pool")
		if code != exitOK || !strings.HasPrefix(out, method+" pool of 1 expert on [0, 1]:") {
			t.Errorf("%s: exit %d, %q %q", method, code, out, errOut)
		}
	}
}

// TestFlagErrorsNameTheFlagFirst: the flag package's own refusals name
// the flag as every other refusal names its field, first and spelled
// --name, then the rule; they read "flag provided but not defined:
// -bogus" and "invalid value "many" for flag -expert-save-burst: parse
// error".
func TestFlagErrorsNameTheFlagFirst(t *testing.T) {
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"fit", "--bogus"}, "parley fit: bad input: --bogus: is not a flag of parley fit (parley fit -h lists its flags)\n"},
		{[]string{"update", "--format"}, "parley update: bad input: --format: needs a value\n"},
		{[]string{"prior", "--uniform=maybe"}, `parley prior: bad input: --uniform: takes no value, or =true or =false, got "maybe"` + "\n"},
		{[]string{"serve", "--expert-save-burst", "many"}, `parley serve: bad input: --expert-save-burst: must be a whole number, got "many"` + "\n"},
		{[]string{"serve", "--expert-save-burst", "99999999999999999999"}, `parley serve: bad input: --expert-save-burst: is out of range, got "99999999999999999999"` + "\n"},
	} {
		code, out, errs := run(c.args...)
		if code != exitBadInput || out != "" || errs != c.want {
			t.Errorf("%v: exit %d, stdout %q, stderr %q; want 2 and %q", c.args, code, out, errs, c.want)
		}
	}
}

// TestEmptyFlagValueIsRefused: a flag given an empty value (a script's
// empty variable) is refused naming the flag, never read as the flag left
// out: fingerprint --check "" listed the values and exited 0, as a found
// value does; export --question "" wrote every question.
func TestEmptyFlagValueIsRefused(t *testing.T) {
	path, wid, _ := cliWorkshop(t)
	ws := strconv.FormatInt(wid, 10)
	record := filepath.Join(t.TempDir(), "record.json")
	if code, _, errs := run("export", "--db", path, "--workshop", ws, "--out", record); code != exitOK {
		t.Fatalf("export: %s", errs)
	}
	for _, c := range []struct {
		args []string
		flag string
	}{
		{[]string{"fingerprint", "--in", record, "--check", ""}, "check"},
		{[]string{"fingerprint", "--in", record, "--check", "  "}, "check"},
		{[]string{"export", "--db", path, "--workshop", ws, "--question", ""}, "question"},
		{[]string{"export", "--db", path, "--workshop", ws, "--out", ""}, "out"},
		{[]string{"calibrate", "--input", "../../testdata/calibration/inverter_seeds.csv", "--alpha", ""}, "alpha"},
		{[]string{"calibrate", "--input", "../../testdata/calibration/inverter_seeds.csv", "--overshoot", ""}, "overshoot"},
		{[]string{"fit", "--probs", "0.05,0.5,0.95", "--values", "0.01,0.04,0.12", "--lower", ""}, "lower"},
		{[]string{"facilitator-reset", "--db", path, "--base-url", ""}, "base-url"},
	} {
		code, out, errs := run(c.args...)
		if code != exitBadInput || out != "" || !strings.Contains(errs, "--"+c.flag+": is empty") {
			t.Errorf("%v: exit %d, %d bytes on stdout, stderr %q; want 2 naming --%s", c.args, code, len(out), errs, c.flag)
		}
	}
}

// TestFlagErrorsKeepTerminalCodesOut: a flag typed with control
// characters (an escape sequence that would clear the terminal or set
// its title) is shown quoted in the refusal, never raw.
func TestFlagErrorsKeepTerminalCodesOut(t *testing.T) {
	for _, arg := range []string{"--\x1b]0;evil\a", "---\x1b[2J"} {
		code, _, errs := run("fit", arg)
		if code != exitBadInput || strings.ContainsAny(errs, "\x1b\a") {
			t.Errorf("%q: exit %d, stderr %q", arg, code, errs)
		}
	}
}

// TestBadInputReadsOneWay: every bad input reads "parley CMD: bad input:
// FIELD: RULE", whether a flag or the statistics refused it. The
// statistics' refusals began "elicit: ", the name of a package inside
// Parley ("parley update: elicit: alpha: must be greater than 0"), beside
// the flags' "bad input: ". A failure that is no bad input (exit 1) is
// not called one, and loses the package's name too.
func TestBadInputReadsOneWay(t *testing.T) {
	for _, args := range [][]string{
		{"update", "--alpha", "-1", "--beta", "2", "--successes", "1", "--trials", "3"},
		{"fit", "--probs", "0.5,0.9", "--values", "0.3,0.2"},
		{"prior", "--mean", "0.5"},
		{"fit", "--bogus"},
	} {
		code, out, errOut := runCLI(t, "", args...)
		want := "parley " + args[0] + ": bad input: "
		if code != exitBadInput || out != "" || !strings.HasPrefix(errOut, want) || strings.Contains(errOut, "elicit") {
			t.Errorf("%v: exit %d, stderr %q; want exit 2 and a line starting %q, without the package's name", args, code, errOut, want)
		}
	}
	var buf strings.Builder
	if code := fail(&buf, "export", errors.New("elicit: the disk is full")); code != exitFailure || buf.String() != "parley export: the disk is full\n" {
		t.Errorf("a failure: exit %d, %q; want exit 1, not called bad input", code, buf.String())
	}
}

// The single Beta's distance from its pool, as `parley pool` prints it,
// is the largest over the whole curve, not only at the grid of the pool's
// 1st to 99th percentiles: the invented pool Beta(2, 30) and Beta(4, 60),
// weighted 1 and 3 on [10, 20], is within 0.005704258728926426 by SciPy
// 1.10.1 (testdata/scipy/pool_gap_reference.py, "review example on
// hours"); the grid alone read 0.00569 (found in review). 1e-8: the
// Beta's shapes differ from SciPy's least-squares Beta by about 4e-9
// relative (measured: 2.3e-10 apart).
func TestPoolPrintsTheWholeCurvesGap(t *testing.T) {
	in := `{"lower":10,"upper":20,"experts":[{"alpha":2,"beta":30,"weight":1},{"alpha":4,"beta":60,"weight":3}]}`
	code, out, errOut := runCLI(t, in, "pool", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	var got struct {
		BetaFit struct {
			MaxCDFError float64 `json:"max_cdf_error"`
		} `json:"beta_fit"`
	}
	decodeJSON(t, out, &got)
	if math.Abs(got.BetaFit.MaxCDFError-0.005704258728926426) > 1e-8 {
		t.Errorf("max_cdf_error %.10g, SciPy's supremum 0.005704258729", got.BetaFit.MaxCDFError)
	}
	code, out, errOut = runCLI(t, in, "pool")
	if code != 0 || !strings.Contains(out, "its CDF is within 0.0057 of the pool's") {
		t.Errorf("exit %d: %s%s", code, out, errOut)
	}
}

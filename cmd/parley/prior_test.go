package main

import (
	"bytes"
	"encoding/json"
	"math"
	"os/exec"
	"slices"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

func TestPriorJSON(t *testing.T) {
	cases := []struct {
		name     string
		args     []string
		method   string
		alpha    float64
		beta     float64
		interval bool
		coverage float64 // wanted coverage_achieved, when interval
		tol      float64
	}{
		// Beta(1, 1): every value equally likely.
		{"uniform", []string{"--uniform"}, "equivalent", 1, 1, false, 0, 0},
		// "About 3 in 25": Beta(s, n − s) = Beta(3, 22).
		{"equivalent sample", []string{"--successes", "3", "--trials", "25"}, "equivalent_sample", 3, 22, false, 0, 0},
		// Mean 0.1, sd 0.05: k = 0.09/0.0025 − 1 = 35, Beta(3.5, 31.5).
		{"mean and sd", []string{"--mean", "0.1", "--sd", "0.05"}, "mean_sd", 3.5, 31.5, false, 0, 1e-12},
		// [0.03, 0.12] at 90% by exact quantile match: R's nested uniroot
		// (testdata/r/interval_match_reference.csv, "solved" row) gives
		// Beta(5.6770622183254389, 76.53743512784844); 5% in each tail.
		{"interval quantiles", []string{"--interval", "0.03,0.12", "--coverage", "0.9"}, "interval_quantiles", 5.6770622183254389, 76.53743512784844, true, 0.9, 1e-7},
		// The same by moment match: R gives Beta(6.8767435973284874,
		// 84.813171033718021), holding 1 − 0.0223547 − 0.0646263 of its
		// probability in the interval ("moments" row).
		{"interval moments", []string{"--interval", "0.03,0.12", "--coverage", "0.9", "--method", "moments"}, "interval_moments", 6.8767435973284874, 84.813171033718021, true, 1 - 0.022354728177137299 - 0.06462633569679406, 1e-9},
	}
	cases[0].method = "uniform"
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, out, errOut := runCLI(t, "", append([]string{"prior", "--format", "json"}, c.args...)...)
			if code != 0 {
				t.Fatalf("exit %d: %s", code, errOut)
			}
			var keys map[string]json.RawMessage
			decodeJSON(t, out, &keys)
			for _, k := range []string{"alpha", "beta", "method", "mean", "sd", "q05", "q50", "q95"} {
				if _, ok := keys[k]; !ok {
					t.Errorf("key %q missing", k)
				}
			}
			if _, ok := keys["coverage_achieved"]; ok != c.interval {
				t.Errorf("coverage_achieved present %v, want %v", ok, c.interval)
			}
			var got priorOutput
			decodeJSON(t, out, &got)
			if got.Method != c.method || !nearRel(got.Alpha, c.alpha, c.tol) || !nearRel(got.Beta, c.beta, c.tol) {
				t.Errorf("%s Beta(%.12g, %.12g), want %s Beta(%.12g, %.12g)", got.Method, got.Alpha, got.Beta, c.method, c.alpha, c.beta)
			}
			d := elicit.Beta{Alpha: got.Alpha, Beta: got.Beta}
			if got.Mean != d.Mean() || got.SD != d.SD() || got.Q05 != d.Quantile(0.05) || got.Q50 != d.Quantile(0.5) || got.Q95 != d.Quantile(0.95) {
				t.Errorf("summaries %+v", got)
			}
			if c.interval && math.Abs(*got.CoverageAchieved-c.coverage) > 1e-9 {
				t.Errorf("coverage achieved %.12g, want %.12g", *got.CoverageAchieved, c.coverage)
			}
			if c.interval && (got.Alternative == nil || got.Alternative.Method == got.Method) {
				t.Errorf("the other interval method is missing: %+v", got.Alternative)
			}
		})
	}
}

// TestPriorScaled: on [0, 200], mean 50 and sd 20 are m = 0.25 and
// sd = 0.1 on the unit scale: k = 0.1875/0.01 − 1 = 17.75, Beta(4.4375,
// 13.3125), whose own mean and sd on [0, 200] are 50 and 20 again.
func TestPriorScaled(t *testing.T) {
	code, out, errOut := runCLI(t, "", "prior", "--mean", "50", "--sd", "20", "--lower", "0", "--upper", "200", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	var got priorOutput
	decodeJSON(t, out, &got)
	if !nearRel(got.Alpha, 4.4375, 1e-12) || !nearRel(got.Beta, 13.3125, 1e-12) || got.Upper != 200 ||
		!nearRel(got.Mean, 50, 1e-12) || !nearRel(got.SD, 20, 1e-12) || !(got.Q05 > 0 && got.Q95 < 200) {
		t.Errorf("scaled: %+v", got)
	}
}

func TestPriorText(t *testing.T) {
	code, out, errOut := runCLI(t, "", "prior", "--interval", "0.001,0.999", "--coverage", "0.5")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	for _, want := range []string{
		"Beta(0.102536, 0.102536) on [0, 1]",
		"by exact quantile match",
		"holds 50% of this prior (asked 50%): 25% below it, 25% above it",
		"the interval_moments method gives no prior for this interval",
		"U-shaped",
		"worth about 0.2051 observed trials",
		"Caution:",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("text output lacks %q:\n%s", want, out)
		}
	}
}

func TestPriorBadInput(t *testing.T) {
	iv := []string{"prior", "--interval", "0.03,0.12", "--coverage", "0.9"}
	with := func(base []string, more ...string) []string { return append(append([]string{}, base...), more...) }
	tests := []struct {
		name string
		args []string
		want []string
	}{
		{"nothing", []string{"prior"}, []string{"--uniform", "exactly one construction"}},
		{"uniform false", []string{"prior", "--uniform=false"}, []string{"--uniform", "exactly one construction"}},
		{"two constructions", []string{"prior", "--mean", "0.1", "--sd", "0.05", "--interval", "0.1,0.2"}, []string{"--interval", "cannot be combined with --mean"}},
		{"uniform and sample", []string{"prior", "--uniform", "--successes", "3"}, []string{"--successes", "cannot be combined with --uniform"}},
		{"successes alone", []string{"prior", "--successes", "3"}, []string{"--trials", "is required with --successes"}},
		{"trials alone", []string{"prior", "--trials", "25"}, []string{"--successes", "is required with --trials"}},
		{"successes zero", []string{"prior", "--successes", "0", "--trials", "25"}, []string{"successes", string(elicit.RulePositive)}},
		{"successes = trials", []string{"prior", "--successes", "25", "--trials", "25"}, []string{"successes", string(elicit.RuleBelowTrials)}},
		{"successes syntax", []string{"prior", "--successes", "three", "--trials", "25"}, []string{"successes", "plain decimal"}},
		{"trials huge", []string{"prior", "--successes", "3", "--trials", "2e9"}, []string{"trials", string(elicit.RuleShapeTooLarge)}},
		{"trials NaN", []string{"prior", "--successes", "3", "--trials", "NaN"}, []string{"trials", "plain decimal"}},
		{"sample scaled", []string{"prior", "--successes", "3", "--trials", "25", "--upper", "100"}, []string{"--upper", "equivalent prior sample"}},
		{"sd alone", []string{"prior", "--sd", "0.05"}, []string{"--mean", "is required with --sd"}},
		{"mean outside", []string{"prior", "--mean", "1.2", "--sd", "0.05"}, []string{"mean", string(elicit.RuleValueInBounds)}},
		{"mean overflow", []string{"prior", "--mean", "1e999", "--sd", "0.05"}, []string{"mean", string(elicit.RuleFinite)}},
		{"sd negative", []string{"prior", "--mean", "0.1", "--sd", "-0.05"}, []string{"sd", string(elicit.RulePositive)}},
		{"sd infeasible", []string{"prior", "--mean", "0.5", "--sd", "0.5"}, []string{"sd", string(elicit.RuleVarianceFeasible)}},
		{"sd too small", []string{"prior", "--mean", "0.5", "--sd", "1e-9"}, []string{"sd", string(elicit.RuleShapeTooLarge)}},
		{"interval one end", []string{"prior", "--interval", "0.1", "--coverage", "0.9"}, []string{"--interval", "two numbers"}},
		{"interval three", []string{"prior", "--interval", "0.1,0.2,0.3", "--coverage", "0.9"}, []string{"--interval", "two numbers"}},
		{"interval empty", []string{"prior", "--interval", "", "--coverage", "0.9"}, []string{"--interval", "is empty"}},
		{"interval syntax", []string{"prior", "--interval", "0.1,1/5", "--coverage", "0.9"}, []string{"interval[1]", "plain decimal"}},
		{"interval reversed", []string{"prior", "--interval", "0.2,0.1", "--coverage", "0.9"}, []string{"interval[1]", string(elicit.RuleValueIncreasing)}},
		{"interval at 0", []string{"prior", "--interval", "0,0.1", "--coverage", "0.9"}, []string{"interval[0]", string(elicit.RuleValueInBounds)}},
		{"interval too narrow", []string{"prior", "--interval", "0.1,0.1000001", "--coverage", "0.9"}, []string{"interval", string(elicit.RuleShapeTooLarge)}},
		{"interval too wide for moments", with(iv[:1], "--interval", "0.01,0.99", "--coverage", "0.5", "--method", "moments"), []string{"interval", string(elicit.RuleVarianceFeasible)}},
		{"coverage alone", []string{"prior", "--coverage", "0.9"}, []string{"--interval", "is required with --coverage"}},
		{"coverage percent", []string{"prior", "--interval", "0.03,0.12", "--coverage", "90"}, []string{"coverage", string(elicit.RuleProbOpen)}},
		{"coverage percent sign beyond", []string{"prior", "--interval", "0.03,0.12", "--coverage", "100%"}, []string{"coverage", string(elicit.RuleProbOpen)}},
		{"coverage percent sign syntax", []string{"prior", "--interval", "0.03,0.12", "--coverage", "ninety%"}, []string{"coverage", "plain decimal"}},
		{"method unknown", with(iv, "--method", "median"), []string{"--method", "quantiles or moments"}},
		{"method without interval", []string{"prior", "--mean", "0.1", "--sd", "0.05", "--method", "moments"}, []string{"--method", "applies only to --interval"}},
		{"bounds reversed", []string{"prior", "--uniform", "--lower", "5", "--upper", "1"}, []string{"lower", string(elicit.RuleBoundsOrder)}},
		{"lower syntax", []string{"prior", "--uniform", "--lower", "0x0"}, []string{"lower", "plain decimal"}},
		{"upper overflow", []string{"prior", "--uniform", "--upper", "1e400"}, []string{"upper", string(elicit.RuleFinite)}},
		{"interval outside scaled", with(iv, "--lower", "0.05"), []string{"interval[0]", string(elicit.RuleValueInBounds)}},
		{"format", with(iv, "--format", "csv"), []string{"format", "text or json"}},
		{"unknown flag", with(iv, "--coverge", "0.9"), []string{"coverge"}},
		{"stray argument", with(iv, "0.5"), []string{"0.5", "unexpected argument"}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			code, out, errOut := runCLI(t, "", tc.args...)
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
		})
	}
}

// TestPriorPlanBinary: the real binary, exit status and streams as a
// shell sees them.
func TestPriorPlanBinary(t *testing.T) {
	if testing.Short() {
		t.Skip("builds the binary")
	}
	bin := parleyBinary(t)
	tests := []struct {
		args []string
		code int
		want string
	}{
		{[]string{"prior", "--interval", "0.03,0.12", "--coverage", "0.9", "--format", "json"}, 0, `"coverage_achieved"`},
		{[]string{"prior", "--successes", "3", "--trials", "25"}, 0, "Beta(3, 22) on [0, 1]"},
		{[]string{"prior", "--interval", "0.2,0.1", "--coverage", "0.9"}, 2, "interval[1]: " + string(elicit.RuleValueIncreasing)},
		{[]string{"prior", "--mean", "0.1"}, 2, "--sd: is required with --mean"},
		{[]string{"plan", "--alpha", "2", "--beta", "38", "--trials", "50", "--format", "json"}, 0, `"predictive"`},
		{[]string{"plan", "--alpha", "2", "--beta", "38", "--trials", "100", "--threshold", "0.08", "--direction", "below", "--confidence", "0.95"}, 0, "assurance that P(θ < 0.08 | data) ≥ 0.95 after 100 trials"},
		{[]string{"plan", "--alpha", "2", "--beta", "38", "--trials", "0"}, 2, "trials: " + string(elicit.RuleCountRange)},
		{[]string{"plan", "--alpha", "2", "--beta", "38", "--trials", "50", "--length", "0.2", "--criterion", "median"}, 2, "criterion: " + string(elicit.RuleUnknown)},
	}
	for _, tc := range tests {
		cmd := exec.Command(bin, tc.args...)
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

// The text output gives a prior's weight in observed trials only for a
// proportion on [0, 1]; on other bounds it gives α + β, since trials mean
// nothing there.
func TestPriorWorthWordsFollowTheBounds(t *testing.T) {
	code, out, errOut := runCLI(t, "", "prior", "--mean", "0.2", "--sd", "0.1")
	if code != 0 || !strings.Contains(out, "worth about 15 observed trials (3 successes and 12 failures)") {
		t.Errorf("proportion: exit %d %s\n%s", code, errOut, out)
	}
	code, out, errOut = runCLI(t, "", "prior", "--mean", "12", "--sd", "4", "--lower", "0", "--upper", "30")
	if code != 0 || strings.Contains(out, "observed trials") || !strings.Contains(out, "α + β = ") {
		t.Errorf("days: exit %d %s\n%s", code, errOut, out)
	}
}

// A coverage short of 1 is not written as 100%: the moment match of
// [0.2, 0.4] at 99.999% is Beta(122.62, 286.12), which R's pbeta says
// holds 1 − 8.72e-7 − 1.256e-5 = 99.99866% of it
// (testdata/r/interval_match_reference.csv, "moments" row); four
// figures wrote "holds 100% of this prior (asked 99.999%)".
func TestPriorTextCoverageShortOfAll(t *testing.T) {
	code, out, errOut := runCLI(t, "", "prior", "--interval", "0.2,0.4", "--coverage", "0.99999", "--method", "moments")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	for _, want := range []string{"it holds 99.999%\n", "holds 99.999% of this prior (asked 99.999%)", "which holds 99.999% of its probability there"} {
		if !strings.Contains(out, want) {
			t.Errorf("text output lacks %q:\n%s", want, out)
		}
	}
	if strings.Contains(out, "100%") {
		t.Errorf("a coverage short of 1 written as 100%%:\n%s", out)
	}
}

// TestPriorPercentilesBeyondDouble: `parley prior --mean 0.5 --sd 0.4999`
// makes Beta(2.0006e-4, 2.0006e-4), whose 5% point is about 3.2e-4999
// (DLMF 8.17.8's leading term, evaluated in R 4.2.2: log10 −4998.5002) and
// 95% point 1 minus that. It printed "5% 0 … 95% 1" and nothing else; the
// text and the JSON now say that these are the bounds a double holds and
// give the values.
func TestPriorPercentilesBeyondDouble(t *testing.T) {
	code, out, errOut := runCLI(t, "", "prior", "--mean", "0.5", "--sd", "0.4999")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	for _, want := range []string{"5% 0, 50% 0.5, 95% 1 (a point nearer its bound than a double holds is shown as the bound",
		"The 5% point is about 3.2e-4999, and the 95% point is about 1 − 3.2e-4999"} {
		if !strings.Contains(out, want) {
			t.Errorf("text lacks %q:\n%s", want, out)
		}
	}
	code, out, errOut = runCLI(t, "", "prior", "--mean", "0.5", "--sd", "0.4999", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	var got struct {
		Q05      float64  `json:"q05"`
		Codes    []string `json:"warning_codes"`
		Warnings []string `json:"warnings"`
	}
	decodeJSON(t, out, &got)
	if got.Q05 != 0 || !slices.Contains(got.Codes, "beyond_double") || !strings.Contains(strings.Join(got.Warnings, " "), "3.2e-4999") {
		t.Errorf("JSON q05 %v, codes %v, warnings %v", got.Q05, got.Codes, got.Warnings)
	}
}

// TestFitPercentilesBeyondDouble: `parley fit` on [10, 20] with 0.4, 0.5
// and 0.9 at 10.00001, 10.1 and 16 fits Beta(0.0668198, 0.292528), whose
// 5% point lies 10·qbeta(0.05, 0.0668198, 0.292528) = 5.0e-18 above 10
// (R 4.2.2), which a double beside 10 holds only as 10. It printed "5% 10"
// without a word; the text and the JSON now say so, with the distance.
func TestFitPercentilesBeyondDouble(t *testing.T) {
	args := []string{"fit", "--lower", "10", "--upper", "20", "--probs", "0.4,0.5,0.9", "--values", "10.00001,10.1,16"}
	code, out, errOut := runCLI(t, "", args...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	for _, want := range []string{"5% 10, 50% 10.0046, 95% 19.898 (a point nearer its bound than a double holds is shown as the bound",
		"The fitted 5% point lies about 5.0e-18 above the lower bound, 10:"} {
		if !strings.Contains(out, want) {
			t.Errorf("text lacks %q:\n%s", want, out)
		}
	}
	code, out, errOut = runCLI(t, "", append(args, "--format", "json")...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	var got struct {
		Percentiles struct {
			P05 float64 `json:"p05"`
		} `json:"percentiles"`
		Codes    []string `json:"warning_codes"`
		Warnings []string `json:"warnings"`
	}
	decodeJSON(t, out, &got)
	if got.Percentiles.P05 != 10 || !slices.Contains(got.Codes, "beyond_double") || !strings.Contains(strings.Join(got.Warnings, " "), "5.0e-18") {
		t.Errorf("JSON p05 %v, codes %v, warnings %v", got.Percentiles.P05, got.Codes, got.Warnings)
	}
}

// TestPoolPointsBeyondDouble: `parley pool` of Beta(0.001, 0.001) and
// Beta(0.002, 0.001) printed "quantile 0.05 0" and "quantile 0.95 1"
// without a word, though the pool's points lie about 1.4e-748 above 0
// and 1.1e-1067 below 1, and its median 1.1e-67 below 1
// (elicit.TestPoolPointsHeldAsABoundAreSaid, R 4.2.2). The linear and the logarithmic pool now say so, with the
// distance, in the text and the JSON's warnings.
func TestPoolPointsBeyondDouble(t *testing.T) {
	in := `{"experts":[{"alpha":0.001,"beta":0.001},{"alpha":0.002,"beta":0.001}],"probs":[0.05,0.5,0.95]}`
	code, out, errOut := runCLI(t, in, "pool")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	for _, want := range []string{"quantile 0.05     0 (nearer the bound than a double holds: see the warning below)",
		"warning: The pool's 5% point is about 1.4e-748, and the pool's 50% point is about 1 − 1.1e-67, and the pool's 95% point is about 1 − 1.1e-1067:"} {
		if !strings.Contains(out, want) {
			t.Errorf("text lacks %q:\n%s", want, out)
		}
	}
	code, out, errOut = runCLI(t, in, "pool", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	var got struct {
		Quantiles []float64 `json:"quantiles"`
		Warnings  []string  `json:"warnings"`
	}
	decodeJSON(t, out, &got)
	if got.Quantiles[0] != 0 || !strings.Contains(strings.Join(got.Warnings, " "), "1.4e-748") {
		t.Errorf("JSON quantiles %v, warnings %v", got.Quantiles, got.Warnings)
	}
	// The logarithmic pool is one Beta, Beta(0.0015, 0.001), whose 5%
	// point is held as 0 as well.
	code, out, errOut = runCLI(t, `{"experts":[{"alpha":0.001,"beta":0.001},{"alpha":0.002,"beta":0.001}],"method":"log"}`, "pool")
	if code != 0 || !strings.Contains(out, "warning: The pool's 5% point is about") {
		t.Errorf("log pool: exit %d %s\n%s", code, errOut, out)
	}
}

// The successes and failures a prior's worth splits into are the α and β
// the output prints (six figures, in plain digits): 19997.4 failures
// beside Beta(3, 19997.4), where whole counts said 19997, and 1234570
// beside 1.23457e+06; a shape just short of 1 is not "1 success".
func TestPriorWorthSplitsAsTheBetaIsPrinted(t *testing.T) {
	for _, c := range []struct {
		successes, trials string
		beta, split       string
	}{
		{"3", "20000.4", "Beta(3, 19997.4)", "(3 successes and 19997.4 failures)"},
		{"2", "1234569.6", "Beta(2, 1.23457e+06)", "(2 successes and 1234570 failures)"},
		{"0.9999997", "5.9999997", "Beta(0.9999997, 5)", "(0.9999997 successes and 5 failures)"},
	} {
		code, out, errOut := runCLI(t, "", "prior", "--successes", c.successes, "--trials", c.trials)
		if code != 0 || !strings.Contains(out, c.beta) || !strings.Contains(out, c.split) {
			t.Errorf("prior --successes %s --trials %s: exit %d %s\n%s", c.successes, c.trials, code, errOut, out)
		}
		code, out, errOut = runCLI(t, "", "plan", "--alpha", c.successes, "--beta", strings.TrimPrefix(strings.TrimSuffix(c.beta, ")"), "Beta("+c.successes+", "), "--trials", "10")
		if code != 0 || !strings.Contains(out, c.split) {
			t.Errorf("plan for %s: exit %d %s\n%s", c.beta, code, errOut, out)
		}
	}
}

// TestPriorSampleOfOneSaysSuccess: one imagined success, or one
// imagined trial, is said in the singular, in the description (the
// record's source column and the quick priors page read it) and in a
// refusal; they said "1 successes in 2 imagined trials" and "(1
// successes in 1 trials)".
func TestPriorSampleOfOneSaysSuccess(t *testing.T) {
	for _, c := range []struct {
		args []string
		code int
		want string
	}{
		{[]string{"prior", "--successes", "1", "--trials", "2"}, exitOK, "equivalent prior sample: 1 success in 2 imagined trials,"},
		{[]string{"prior", "--successes", "0.5", "--trials", "1"}, exitOK, "equivalent prior sample: 0.5 successes in 1 imagined trial,"},
		{[]string{"prior", "--successes", "1", "--trials", "1"}, exitBadInput, "(1 success in 1 trial)"},
	} {
		code, out, errs := run(c.args...)
		if code != c.code || !strings.Contains(out+errs, c.want) {
			t.Errorf("%v: exit %d, %q %q; want %q", c.args, code, out, errs, c.want)
		}
	}
}

// --coverage takes a percentage with its sign, as the quick priors page
// does: 90% is 0.9, the same Beta; it was refused as not a plain decimal.
func TestPriorCoverageTakesAPercentSign(t *testing.T) {
	code, plain, errs := runCLI(t, "", "prior", "--interval", "0.03,0.12", "--coverage", "0.9", "--format", "json")
	if code != exitOK {
		t.Fatalf("--coverage 0.9: exit %d, %s", code, errs)
	}
	code, pct, errs := runCLI(t, "", "prior", "--interval", "0.03,0.12", "--coverage", "90%", "--format", "json")
	if code != exitOK {
		t.Fatalf("--coverage 90%%: exit %d, %s", code, errs)
	}
	if pct != plain {
		t.Errorf("--coverage 90%% gives\n%s\nwhere 0.9 gives\n%s", pct, plain)
	}
}

// On bounds 0 and 1 the interval's ends, the mean and the sd take a %
// sign, as the quick priors page does (3% is 0.03); on other bounds a %
// sign is refused naming the flag, exit 2.
func TestPriorValuesOfAProportionTakeAPercentSign(t *testing.T) {
	for _, c := range [][2][]string{
		{{"--interval", "3%,12%", "--coverage", "90%"}, {"--interval", "0.03,0.12", "--coverage", "0.9"}},
		{{"--mean", "10%", "--sd", "5%"}, {"--mean", "0.1", "--sd", "0.05"}},
	} {
		args := func(a []string) []string { return append(append([]string{"prior"}, a...), "--format", "json") }
		code, pct, errs := runCLI(t, "", args(c[0])...)
		if code != exitOK {
			t.Fatalf("%v: exit %d, %s", c[0], code, errs)
		}
		code, plain, errs := runCLI(t, "", args(c[1])...)
		if code != exitOK {
			t.Fatalf("%v: exit %d, %s", c[1], code, errs)
		}
		if pct != plain {
			t.Errorf("%v gives\n%s\nwhere %v gives\n%s", c[0], pct, c[1], plain)
		}
	}
	code, out, errs := runCLI(t, "", "prior", "--mean", "10%", "--sd", "5", "--upper", "100")
	if code != exitBadInput || out != "" || !strings.Contains(errs, "mean: takes a % sign only on bounds 0 and 1") {
		t.Errorf("a %% mean on [0, 100]: exit %d, stdout %q, stderr %q", code, out, errs)
	}
}

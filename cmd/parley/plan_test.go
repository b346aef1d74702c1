package main

import (
	"bufio"
	"encoding/json"
	"math"
	"os"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

// planReference reads one value, and its extra column, from
// testdata/scipy/plan_reference.csv (made by
// testdata/scipy/plan_reference.py with Debian's python3-scipy 1.10.1 by
// enumerating every outcome of the study).
func planReference(t *testing.T, kind, alpha, beta, n, spec string) (float64, string) {
	t.Helper()
	f, err := os.Open("../../testdata/scipy/plan_reference.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	prefix := strings.Join([]string{kind, alpha, beta, n, spec}, ",") + ","
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		if rest, ok := strings.CutPrefix(sc.Text(), prefix); ok {
			cols := strings.Split(rest, ",")
			v, err := strconv.ParseFloat(cols[0], 64)
			if err != nil {
				t.Fatal(err)
			}
			return v, cols[1]
		}
	}
	t.Fatalf("no reference row %s", prefix)
	return 0, ""
}

func runPlanJSON(t *testing.T, args ...string) (planOutput, map[string]json.RawMessage) {
	t.Helper()
	code, out, errOut := runCLI(t, "", append([]string{"plan", "--format", "json"}, args...)...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	var got planOutput
	var keys map[string]json.RawMessage
	decodeJSON(t, out, &got)
	decodeJSON(t, out, &keys)
	return got, keys
}

// TestPlanPredictive: the prior predictive of 50 trials under Beta(2, 38),
// all 51 probabilities, against scipy.stats.betabinom.
func TestPlanPredictive(t *testing.T) {
	got, keys := runPlanJSON(t, "--alpha", "2", "--beta", "38", "--trials", "50")
	for _, k := range []string{"trials", "predictive"} {
		if _, ok := keys[k]; !ok {
			t.Errorf("key %q missing", k)
		}
	}
	for _, k := range []string{"assurance", "sample_size"} {
		if _, ok := keys[k]; ok {
			t.Errorf("key %q present though not asked for", k)
		}
	}
	if got.Trials != 50 || len(got.Predictive) != 51 {
		t.Fatalf("trials %d, %d probabilities", got.Trials, len(got.Predictive))
	}
	sum := 0.0
	for x, p := range got.Predictive {
		want, _ := planReference(t, "predictive", "2.0", "38.0", "50", strconv.Itoa(x))
		if !nearRel(p, want, 1e-9) {
			t.Errorf("P(X = %d) = %.15g, scipy %.15g", x, p, want)
		}
		sum += p
	}
	// Beta-binomial moments (Johnson, Kemp & Kotz 2005, §6.7.2): mean
	// 50·2/40 = 2.5; variance 50·2·38·90/(40²·41) = 5.2134…
	if math.Abs(sum-1) > 1e-12 || math.Abs(got.PredictiveMean-2.5) > 1e-12 || math.Abs(got.PredictiveSD-math.Sqrt(50.0*2*38*90/(1600*41))) > 1e-12 {
		t.Errorf("sum %v, mean %v, sd %v", sum, got.PredictiveMean, got.PredictiveSD)
	}
	// Worth 40 trials; 50 planned trials get 50/90 of the posterior mean.
	if got.Worth.Trials != 40 || math.Abs(got.DataShare-50.0/90) > 1e-15 {
		t.Errorf("worth %+v, data share %v", got.Worth, got.DataShare)
	}
}

// TestPlanAssurance: assurance of P(θ < 0.08 | data) ≥ 0.95 after 100
// trials under Beta(2, 38), against SciPy's sum over every outcome; the
// curve's points against SciPy's too.
func TestPlanAssurance(t *testing.T) {
	got, keys := runPlanJSON(t, "--alpha", "2", "--beta", "38", "--trials", "100",
		"--threshold", "0.08", "--direction", "below", "--confidence", "0.95")
	if _, ok := keys["assurance"]; !ok {
		t.Fatal("assurance missing")
	}
	want, span := planReference(t, "assurance", "2.0", "38.0", "100", "0.08:below:0.95")
	if !nearRel(*got.Assurance, want, 1e-12) {
		t.Errorf("assurance %.15g, scipy %.15g", *got.Assurance, want)
	}
	if s := strconv.Itoa(got.Success.SuccessesFrom) + ":" + strconv.Itoa(got.Success.SuccessesTo); s != span {
		t.Errorf("successes %s, scipy %s", s, span)
	}
	if len(got.AssuranceCurve) != curvePoints || got.AssuranceCurve[len(got.AssuranceCurve)-1].Trials != 100 {
		t.Fatalf("curve %+v", got.AssuranceCurve)
	}
	for _, c := range got.AssuranceCurve {
		want, _ := planReference(t, "assurance", "2.0", "38.0", strconv.Itoa(c.Trials), "0.08:below:0.95")
		if !nearRel(c.Assurance, want, 1e-12) {
			t.Errorf("curve at %d: %.15g, scipy %.15g", c.Trials, c.Assurance, want)
		}
	}
	// Above: 50 trials under the uniform prior, P(θ > 0.5) ≥ 0.975.
	got, _ = runPlanJSON(t, "--alpha", "1", "--beta", "1", "--trials", "50",
		"--threshold", "0.5", "--direction", "above", "--confidence", "0.975")
	want, span = planReference(t, "assurance", "1.0", "1.0", "50", "0.5:above:0.975")
	if !nearRel(*got.Assurance, want, 1e-12) || strconv.Itoa(got.Success.SuccessesFrom)+":"+strconv.Itoa(got.Success.SuccessesTo) != span {
		t.Errorf("above: assurance %.15g from %d, scipy %.15g %s", *got.Assurance, got.Success.SuccessesFrom, want, span)
	}
}

// TestPlanSampleSize: the smallest n against SciPy trying every n from 1
// (no published table is used; see elicit's TestCriterionAgainstSciPy).
func TestPlanSampleSize(t *testing.T) {
	cases := []struct {
		args            []string
		alpha, beta     string
		spec            string
		worst, failsAgn bool
	}{
		{[]string{"--alpha", "2", "--beta", "38", "--length", "0.04"}, "2.0", "38.0", "alc:equal:0.95:0.04:0.0", false, false},
		{[]string{"--alpha", "2", "--beta", "38", "--length", "0.06", "--criterion", "acc", "--interval", "hpd", "--level", "0.9"}, "2.0", "38.0", "acc:hpd:0.9:0.06:0.0", false, false},
		{[]string{"--alpha", "2", "--beta", "38", "--length", "0.2", "--criterion", "woc"}, "2.0", "38.0", "woc:equal:0.95:0.2:0.0", true, true},
		{[]string{"--alpha", "2", "--beta", "38", "--length", "0.1", "--criterion", "woc", "--woc-trim", "0.05"}, "2.0", "38.0", "woc:equal:0.95:0.1:0.05", true, true},
	}
	for _, c := range cases {
		got, keys := runPlanJSON(t, append([]string{"--trials", "30"}, c.args...)...)
		var ss map[string]json.RawMessage
		if err := json.Unmarshal(keys["sample_size"], &ss); err != nil {
			t.Fatalf("%v: sample_size: %v", c.args, err)
		}
		for _, k := range []string{"criterion", "interval", "level", "length", "n"} {
			if _, ok := ss[k]; !ok {
				t.Errorf("%v: sample_size.%s missing", c.args, k)
			}
		}
		s := got.SampleSize
		want, extra := planReference(t, "samplesize", c.alpha, c.beta, strconv.Itoa(s.N), c.spec)
		if !nearRel(s.Value, want, 1e-9) {
			t.Errorf("%v: value %.12g at n %d, scipy %.12g", c.args, s.Value, s.N, want)
		}
		if spec := strings.Join([]string{s.Criterion, s.Interval, strconv.FormatFloat(s.Level, 'g', -1, 64), strconv.FormatFloat(s.Length, 'g', -1, 64)}, ":"); !strings.HasPrefix(c.spec, spec) {
			t.Errorf("echoed goal %s, asked %s", spec, c.spec)
		}
		if (s.WorstOutcome != nil) != c.worst {
			t.Errorf("%v: worst outcome %v", c.args, s.WorstOutcome)
		}
		if again, _ := strconv.Atoi(extra); (s.FailsAgainAt != 0) != c.failsAgn || s.FailsAgainAt != 0 && s.FailsAgainAt != again {
			t.Errorf("%v: fails again at %d, scipy %s", c.args, s.FailsAgainAt, extra)
		}
		if c.failsAgn && (len(got.Warnings) == 0 || !strings.Contains(strings.Join(got.Warnings, " "), "not monotone")) {
			t.Errorf("%v: no warning that the criterion is not monotone: %q", c.args, got.Warnings)
		}
		// At the planned 30 trials, the criterion as elicit gives it.
		goal := elicit.SampleSizeGoal{Criterion: elicit.Criterion(s.Criterion), Interval: elicit.IntervalKind(s.Interval), Level: s.Level, Length: s.Length, Trim: s.Trim}
		at, err := elicit.CriterionValue(elicit.Beta{Alpha: 2, Beta: 38}, goal, 30)
		if err != nil || *s.ValueAtTrials != at.Value || *s.MetAtTrials != at.Met {
			t.Errorf("%v: at 30 trials %v %v, elicit %+v %v", c.args, *s.ValueAtTrials, *s.MetAtTrials, at, err)
		}
	}
}

func TestPlanText(t *testing.T) {
	code, out, errOut := runCLI(t, "", "plan", "--alpha", "2", "--beta", "38", "--trials", "20",
		"--threshold", "0.1", "--direction", "below", "--confidence", "0.9", "--length", "0.2", "--criterion", "woc")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	for _, want := range []string{
		"prior Beta(2, 38): mean 0.05",
		"worth about 40 observed trials (2 successes and 38 failures)",
		"a study of 20 trials gets 33.3% of the weight in the posterior mean",
		"successes  probability",
		"assurance that P(θ < 0.1 | data) ≥ 0.9 after 20 trials",
		"the study succeeds if it sees at most",
		"sample size by worst outcome (woc), the smallest n for which its equal-tailed 95% intervals are at most 0.2 wide whatever the outcome: n = 1",
		"warning: the woc criterion is met at n = 1 but fails again at n = 5",
		"Caution:",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("text output lacks %q:\n%s", want, out)
		}
	}
	// The curve's points are separated by semicolons, and the line ends
	// with its last point, not with a semicolon.
	if !regexp.MustCompile(`(?m)^  assurance over the number of trials: \d+: [0-9.]+(; \d+: [0-9.]+)*$`).MatchString(out) {
		t.Errorf("the assurance curve's line is not a list of points:\n%s", out)
	}
}

// TestPlanBadInput: every flag's rules. One rule is tested in elicit
// instead (TestSampleSizeUnreachable, with a small limit): a length no n
// up to elicit.MaxSampleSize reaches, whose search takes seconds.
func TestPlanBadInput(t *testing.T) {
	base := []string{"plan", "--alpha", "2", "--beta", "38", "--trials", "50"}
	with := func(more ...string) []string { return append(append([]string{}, base...), more...) }
	set := func(flag, value string) []string {
		out := append([]string{}, base...)
		for i := range out {
			if out[i] == flag {
				out[i+1] = value
			}
		}
		return out
	}
	assure := []string{"--threshold", "0.08", "--direction", "below", "--confidence", "0.95"}
	tests := []struct {
		name string
		args []string
		want []string
	}{
		{"no alpha", []string{"plan", "--beta", "38", "--trials", "50"}, []string{"--alpha", "is required"}},
		{"no beta", []string{"plan", "--alpha", "2", "--trials", "50"}, []string{"--beta", "is required"}},
		{"no trials", []string{"plan", "--alpha", "2", "--beta", "38"}, []string{"--trials", "is required"}},
		{"alpha zero", set("--alpha", "0"), []string{"alpha", string(elicit.RulePositive)}},
		{"alpha syntax", set("--alpha", "2,5"), []string{"alpha", "plain decimal"}},
		{"beta negative", set("--beta", "-38"), []string{"beta", string(elicit.RulePositive)}},
		{"beta overflow", set("--beta", "1e309"), []string{"beta", string(elicit.RuleFinite)}},
		{"trials zero", set("--trials", "0"), []string{"trials", string(elicit.RuleCountRange)}},
		{"trials fraction", set("--trials", "50.5"), []string{"trials", string(elicit.RuleInteger)}},
		{"trials too many", set("--trials", "1000001"), []string{"trials", string(elicit.RuleCountRange)}},
		{"threshold alone", with("--threshold", "0.08"), []string{"--direction", "is required with --threshold"}},
		{"confidence alone", with("--confidence", "0.9"), []string{"--threshold", "is required with --confidence"}},
		{"direction alone", with("--direction", "below"), []string{"--threshold", "is required with --direction"}},
		{"threshold one", with("--threshold", "1", "--direction", "below", "--confidence", "0.95"), []string{"threshold", string(elicit.RuleProbOpen)}},
		{"threshold syntax", with("--threshold", "0,08", "--direction", "below", "--confidence", "0.95"), []string{"threshold", "plain decimal"}},
		{"direction unknown", with("--threshold", "0.08", "--direction", "less", "--confidence", "0.95"), []string{"direction", string(elicit.RuleUnknown)}},
		{"confidence percent", with("--threshold", "0.08", "--direction", "below", "--confidence", "95"), []string{"confidence", string(elicit.RuleProbOpen)}},
		{"confidence NaN", with("--threshold", "0.08", "--direction", "below", "--confidence", "NaN"), []string{"confidence", "plain decimal"}},
		{"length zero", with("--length", "0"), []string{"length", string(elicit.RuleProbOpen)}},
		{"length syntax", with("--length", "0.1.2"), []string{"length", "plain decimal"}},
		{"level one", with("--length", "0.1", "--level", "1"), []string{"level", string(elicit.RuleProbOpen)}},
		{"level without length", with("--level", "0.9"), []string{"--level", "give --length too"}},
		{"criterion without length", with("--criterion", "acc"), []string{"--criterion", "give --length too"}},
		{"interval without length", with("--interval", "hpd"), []string{"--interval", "give --length too"}},
		{"trim without length", with("--woc-trim", "0.1"), []string{"--woc-trim", "give --length too"}},
		{"exhaustive without length", with("--exhaustive"), []string{"--exhaustive", "give --length too"}},
		{"criterion unknown", with("--length", "0.1", "--criterion", "mse"), []string{"criterion", string(elicit.RuleUnknown)}},
		{"interval unknown", with("--length", "0.1", "--interval", "central"), []string{"interval", string(elicit.RuleUnknown)}},
		{"trim not woc", with("--length", "0.1", "--woc-trim", "0.05"), []string{"woc-trim", string(elicit.RuleTrimWOCOnly)}},
		{"trim one", with("--length", "0.1", "--criterion", "woc", "--woc-trim", "1"), []string{"woc-trim", string(elicit.RuleTrimRange)}},
		{"trim syntax", with("--length", "0.1", "--criterion", "woc", "--woc-trim", "-"), []string{"woc-trim", "plain decimal"}},
		{"format", append(with(assure...), "--format", "yaml"), []string{"format", "text or json"}},
		{"analysis alpha alone", with(append(assure, "--analysis-alpha", "1")...), []string{"--analysis-beta", "is required with --analysis-alpha"}},
		{"analysis beta alone", with(append(assure, "--analysis-beta", "1")...), []string{"--analysis-alpha", "is required with --analysis-beta"}},
		{"analysis without assurance or sample size", with("--analysis-alpha", "1", "--analysis-beta", "1"), []string{"--analysis-alpha", "applies to the assurance and the sample size"}},
		{"analysis alpha zero, sample size", with("--length", "0.06", "--analysis-alpha", "0", "--analysis-beta", "1"), []string{"analysis-alpha", string(elicit.RulePositive)}},
		{"analysis alpha zero", with(append(assure, "--analysis-alpha", "0", "--analysis-beta", "1")...), []string{"analysis-alpha", string(elicit.RulePositive)}},
		{"analysis beta too large", with(append(assure, "--analysis-alpha", "1", "--analysis-beta", "1e300")...), []string{"analysis-beta", string(elicit.RuleShapeRange)}},
		{"analysis beta syntax", with(append(assure, "--analysis-alpha", "1", "--analysis-beta", "one")...), []string{"analysis-beta", "plain decimal"}},
		{"unknown flag", with("--lenght", "0.1"), []string{"lenght"}},
		{"stray argument", with("200"), []string{"200", "unexpected argument"}},
		// A prior at the envelope's edge whose goal no n up to 10⁵ meets:
		// its posteriors' shapes pass 1e7, and the search exited 1 with
		// "the alc criterion at 1 trials is not a finite number"
		// (elicit.TestCriterionBeyondMaxShape).
		{"unreachable at the edge", []string{"plan", "--alpha", "1e7", "--beta", "1e7", "--trials", "10", "--length", "0.0003"}, []string{"length", string(elicit.RuleSampleSizeUnreachable)}},
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

// The data's share of the posterior mean is n/(α + β + n) (conjugate
// update, worked by hand): 10/(461.8 + 14900 + 10) = 0.065%, which a
// whole percent wrote as "0%", as if the study counted for nothing.
func TestPlanTextSmallDataShare(t *testing.T) {
	code, out, errOut := runCLI(t, "", "plan", "--alpha", "461.8", "--beta", "14900", "--trials", "10")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	if want := "a study of 10 trials gets 0.0651% of the weight in the posterior mean"; !strings.Contains(out, want) {
		t.Errorf("text output lacks %q:\n%s", want, out)
	}
}

// The data's share of the posterior mean short of 1 is not written as
// 100%: 10⁶ trials under Beta(2, 38) get 10⁶/(10⁶ + 40) = 99.996% of it
// (conjugate update, worked by hand), the prior the other 0.004%.
func TestPlanTextLargeDataShare(t *testing.T) {
	code, out, errOut := runCLI(t, "", "plan", "--alpha", "2", "--beta", "38", "--trials", "1000000")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	if want := "a study of 1000000 trials gets 99.996% of the weight in the posterior mean"; !strings.Contains(out, want) {
		t.Errorf("text output lacks %q:\n%s", want, out)
	}
}

// A mean inside its bounds does not read as a bound: Beta(1e7, 1) has
// mean α/(α + β) = 1e7/(1e7 + 1) = 0.99999990, and 10 trials under it
// expect nα/(α + β) = 9.9999990 successes (the beta-binomial's mean,
// Johnson, Kemp & Kotz 2005, §6.7.2; worked by hand), which %.4g and
// four figures wrote "mean 1" and "mean 10": a certain proportion, and
// every trial a success; so the table's probability of 10 successes.
func TestPlanTextMeansShortOfTheirBounds(t *testing.T) {
	code, out, errOut := runCLI(t, "", "plan", "--alpha", "1e7", "--beta", "1", "--trials", "10")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	// P(X = 10) = α/(α + 10) = 0.999999000001 (the beta-binomial's pmf
	// at n with β = 1, B(α + n, 1)/B(α, 1)), which the table wrote "1".
	for _, want := range []string{"prior Beta(1e+07, 1): mean 0.9999999, sd 1e-07;", "successes in 10 trials: mean 9.999999, sd 0.001;", "         10  0.999999\n"} {
		if !strings.Contains(out, want) {
			t.Errorf("text output lacks %q:\n%s", want, out)
		}
	}
	// The other end: Beta(1, 1e7)'s mean 1e-7 and 10 trials' 0.000001
	// were already apart from 0.
	_, out, _ = runCLI(t, "", "plan", "--alpha", "1", "--beta", "1e7", "--trials", "10")
	if want := "successes in 10 trials: mean 0.000001, sd 0.001;"; !strings.Contains(out, want) {
		t.Errorf("text output lacks %q:\n%s", want, out)
	}
}

// An assurance short of 1 is not printed as 1: under Beta(1, 199), 100
// trials meet P(θ < 0.05 | data) ≥ 0.9 with probability 0.9999872 by
// SciPy's sum over every outcome (testdata/scipy/plan_reference.csv),
// which four figures printed as "1", as if the study could not fail.
func TestPlanTextAssuranceShortOfOne(t *testing.T) {
	want, _ := planReference(t, "assurance", "1.0", "199.0", "100", "0.05:below:0.9")
	if !(want > 0.9999 && want < 1) {
		t.Fatalf("reference assurance %v", want)
	}
	code, out, errOut := runCLI(t, "", "plan", "--alpha", "1", "--beta", "199", "--trials", "100",
		"--threshold", "0.05", "--direction", "below", "--confidence", "0.9")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	m := regexp.MustCompile(`≥ 0\.9 after 100 trials: ([0-9.e+-]+)\n`).FindStringSubmatch(out)
	if m == nil {
		t.Fatalf("no assurance in:\n%s", out)
	}
	got, _ := strconv.ParseFloat(m[1], 64)
	if got >= 1 || math.Abs(got-want) > 5e-6 {
		t.Errorf("assurance printed %s, SciPy %.8g", m[1], want)
	}
	if strings.Contains(out, ": 1;") {
		t.Errorf("an assurance curve point short of 1 printed as 1:\n%s", out)
	}
}

// A criterion's value close to its goal keeps the figures that put it on
// its own side of the goal, as the study page writes it: not "expected
// width 0.06796 (not met)" beside a goal of 0.067962.
func TestPlanTextValueToldFromItsGoal(t *testing.T) {
	goal := elicit.SampleSizeGoal{Criterion: elicit.CriterionALC, Interval: elicit.IntervalEqual, Level: 0.95, Length: 0.1}
	at, err := elicit.CriterionValue(elicit.Beta{Alpha: 2, Beta: 38}, goal, 100)
	if err != nil {
		t.Fatal(err)
	}
	// A goal between the value and its four-figure rounding.
	four := strconv.FormatFloat(at.Value, 'g', 4, 64)
	r4, _ := strconv.ParseFloat(four, 64)
	if r4 == at.Value {
		t.Fatalf("the value %v has four figures; pick another goal", at.Value)
	}
	length := (at.Value + r4) / 2
	met := "not met"
	if at.Value <= length {
		met = "met"
	}
	code, out, errOut := runCLI(t, "", "plan", "--alpha", "2", "--beta", "38", "--trials", "100",
		"--length", strconv.FormatFloat(length, 'g', -1, 64), "--criterion", "alc")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	if strings.Contains(out, "planned 100 trials: expected width "+four+" (") {
		t.Errorf("the value at 100 trials reads %s, on the wrong side of the goal %v:\n%s", four, length, out)
	}
	if want := "planned 100 trials: expected width " + strconv.FormatFloat(at.Value, 'g', elicit.SideDigits(at.Value, length, 4), 64) + " (" + met + ")"; !strings.Contains(out, want) {
		t.Errorf("text output lacks %q:\n%s", want, out)
	}
}

// TestPlanSaysWhenThePriorAloneMeetsTheGoal: under Beta(461.8, 14900) the
// prior's own 95% interval is 0.0054 wide (R 4.2's qbeta,
// testdata/r/without_data_reference.R), so a goal of 0.04 needs no study;
// the answer n = 1 used to stand alone, read as a study of one trial.
// Under Beta(2, 38) (0.128 wide) the goal needs data, and nothing is said.
func TestPlanSaysWhenThePriorAloneMeetsTheGoal(t *testing.T) {
	got, keys := runPlanJSON(t, "--alpha", "461.8", "--beta", "14900", "--trials", "200", "--length", "0.04")
	var ss map[string]json.RawMessage
	if err := json.Unmarshal(keys["sample_size"], &ss); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"value_without_data", "met_without_data"} {
		if _, ok := ss[k]; !ok {
			t.Errorf("sample_size.%s missing", k)
		}
	}
	const rWidth = 0.0053993294378082701 // R: qbeta(0.975, 461.8, 14900) - qbeta(0.025, 461.8, 14900)
	if s := got.SampleSize; s.N != 1 || !s.MetWithoutData || !nearRel(s.ValueWithoutData, rWidth, 1e-7) {
		t.Errorf("n %d, met without data %v, value %.10g (R %.10g)", s.N, s.MetWithoutData, s.ValueWithoutData, rWidth)
	}
	code, out, _ := runCLI(t, "", "plan", "--alpha", "461.8", "--beta", "14900", "--trials", "200", "--length", "0.04")
	if code != 0 || !strings.Contains(out, "the prior alone, before any trial, already meets the goal (expected width with no data: 0.005399)") {
		t.Errorf("exit %d; the text does not say the prior alone meets the goal:\n%s", code, out)
	}
	got, _ = runPlanJSON(t, "--alpha", "2", "--beta", "38", "--trials", "200", "--length", "0.04")
	const rWidth238 = 0.12849194946380749 // R: qbeta(0.975, 2, 38) - qbeta(0.025, 2, 38)
	if s := got.SampleSize; s.MetWithoutData || !nearRel(s.ValueWithoutData, rWidth238, 1e-7) {
		t.Errorf("Beta(2, 38): met without data %v, value %.10g (R %.10g)", s.MetWithoutData, s.ValueWithoutData, rWidth238)
	}
	if _, out, _ := runCLI(t, "", "plan", "--alpha", "2", "--beta", "38", "--trials", "200", "--length", "0.04"); strings.Contains(out, "prior alone") {
		t.Errorf("Beta(2, 38) said to meet the goal alone:\n%s", out)
	}
}

// TestJSONCarriesTheCaution: the text of prior, plan, update, fit and
// pool ends with the caution on elicited priors, but their JSON, the form
// a script passes on, carried none. Each now has the key "caution".
func TestJSONCarriesTheCaution(t *testing.T) {
	for _, args := range [][]string{
		{"prior", "--interval", "0.03,0.12", "--coverage", "0.9"},
		{"plan", "--alpha", "2", "--beta", "38", "--trials", "20"},
		{"update", "--alpha", "2", "--beta", "38", "--successes", "1", "--trials", "20"},
		{"fit", "--probs", "0.05,0.5,0.95", "--values", "0.01,0.04,0.12"},
		{"pool"},
	} {
		stdin := ""
		if args[0] == "pool" {
			stdin = `{"experts":[{"alpha":2,"beta":38},{"alpha":3,"beta":30}],"probs":[0.5]}`
		}
		code, out, errOut := runCLI(t, stdin, append(args, "--format", "json")...)
		if code != 0 {
			t.Fatalf("%v: exit %d: %s", args, code, errOut)
		}
		var keys map[string]json.RawMessage
		decodeJSON(t, out, &keys)
		var caution string
		if err := json.Unmarshal(keys["caution"], &caution); err != nil || !strings.HasPrefix(caution, "An elicited prior is documented judgement, not data.") ||
			!strings.Contains(caution, "regulators") {
			t.Errorf("%v: caution %q (%v)", args, caution, err)
		}
	}
}

// TestPlanAnalysisPrior: --analysis-alpha and --analysis-beta judge success
// and take the sample size's intervals on the posterior under the
// analysis prior, with the outcomes drawn from the prior planned under,
// against SciPy's sums over every outcome
// (testdata/scipy/two_prior_plan_reference.py, scipy 1.10.1: Beta(2, 38)
// planned, Beta(1, 1) analysed, 100 trials, P(θ < 0.08 | data) ≥ 0.95;
// 95% equal-tailed intervals 0.06 wide on average need 188 trials). The
// JSON names the analysis prior; without the flags it has no such key and
// the assurance is the one-prior value.
func TestPlanAnalysisPrior(t *testing.T) {
	assure := []string{"--alpha", "2", "--beta", "38", "--trials", "100", "--threshold", "0.08", "--direction", "below", "--confidence", "0.95"}
	got, keys := runPlanJSON(t, append(assure, "--analysis-alpha", "1", "--analysis-beta", "1")...)
	const want = 0.4324046055593032 // scipy, two_prior_plan_reference.csv
	if got.Assurance == nil || math.Abs(*got.Assurance-want) > 1e-11 {
		t.Fatalf("assurance %v, scipy %.16g", got.Assurance, want)
	}
	if got.Success == nil || got.Success.SuccessesFrom != 0 || got.Success.SuccessesTo != 3 {
		t.Errorf("success %+v, scipy 0:3", got.Success)
	}
	var ap map[string]float64
	if err := json.Unmarshal(keys["analysis_prior"], &ap); err != nil || ap["alpha"] != 1 || ap["beta"] != 1 {
		t.Errorf("analysis_prior %s (%v), want alpha 1, beta 1", keys["analysis_prior"], err)
	}
	// The curve's last point is the assurance itself.
	if c := got.AssuranceCurve; len(c) == 0 || c[len(c)-1].Trials != 100 || c[len(c)-1].Assurance != *got.Assurance {
		t.Errorf("curve ends %+v, want 100 trials at the assurance", c[len(c)-1:])
	}
	one, keys := runPlanJSON(t, assure...)
	if _, ok := keys["analysis_prior"]; ok {
		t.Error("analysis_prior written without the flags")
	}
	oneWant, _ := planReference(t, "assurance", "2.0", "38.0", "100", "0.08:below:0.95")
	if math.Abs(*one.Assurance-oneWant) > 1e-11 {
		t.Errorf("one prior: assurance %v, scipy %v", *one.Assurance, oneWant)
	}
	size, _ := runPlanJSON(t, "--alpha", "2", "--beta", "38", "--trials", "200", "--length", "0.06", "--analysis-alpha", "1", "--analysis-beta", "1")
	if s := size.SampleSize; s == nil || s.N != 188 || math.Abs(s.Value-0.059865411024131905) > 1e-9 || s.ValueWithoutData != 0.95 || size.AnalysisPrior == nil {
		t.Errorf("sample size under the uniform analysis: %+v, scipy n 188 (0.0598654), 0.95 with no data", s)
	}
	code, text, errOut := runCLI(t, "", append([]string{"plan"}, append(assure, "--analysis-alpha", "1", "--analysis-beta", "1")...)...)
	if code != 0 || !strings.Contains(text, "judged under the analysis prior Beta(1, 1) with outcomes drawn from the prior above: 0.4324") {
		t.Errorf("exit %d, text %q, stderr %q", code, text, errOut)
	}
}

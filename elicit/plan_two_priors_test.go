package elicit

import (
	"context"
	"errors"
	"fmt"
	"math"
	"strconv"
	"testing"
)

// twoPriorRow is a row of testdata/scipy/two_prior_plan_reference.csv.
type twoPriorRow struct {
	kind             string
	design, analysis Beta
	n                int
	spec             string
	value            float64
	extra            string
}

func twoPriorRows(t *testing.T, kind string) []twoPriorRow {
	t.Helper()
	var out []twoPriorRow
	for _, c := range referenceTable(t, "../testdata/scipy/two_prior_plan_reference.csv", "# scipy 1.10.1", 9) {
		if c[0] != kind {
			continue
		}
		var v [4]float64
		for i := range v {
			x, err := strconv.ParseFloat(c[i+1], 64)
			if err != nil {
				t.Fatal(err)
			}
			v[i] = x
		}
		n, err1 := strconv.Atoi(c[5])
		value, err2 := strconv.ParseFloat(c[7], 64)
		if err := errors.Join(err1, err2); err != nil {
			t.Fatal(err)
		}
		out = append(out, twoPriorRow{c[0], Beta{v[0], v[1]}, Beta{v[2], v[3]}, n, c[6], value, c[8]})
	}
	if len(out) == 0 {
		t.Fatalf("no %s rows", kind)
	}
	return out
}

// TestAssuranceUnderTwoPriorsAgainstSciPy: outcomes drawn from the design
// prior's beta-binomial predictive, success judged on the analysis
// prior's posterior, against SciPy's sum over every outcome
// (testdata/scipy/two_prior_plan_reference.py; O'Hagan & Stevens 2001's
// design and analysis priors). With a uniform analysis prior the study of
// Beta(2, 38) succeeds on 0…3 successes in 100 trials, not 0…4 as under
// the design prior itself, and its assurance falls from 0.540 to 0.432.
func TestAssuranceUnderTwoPriorsAgainstSciPy(t *testing.T) {
	rows := twoPriorRows(t, "assurance")
	for _, r := range rows {
		goal := parseSuccess(t, r.spec)
		got, err := AssuranceUnder(r.design, r.analysis, r.n, goal)
		if err != nil {
			t.Fatal(err)
		}
		checkAssurance(t, fmt.Sprintf("design %v, analysis %v, n %d, %s", r.design, r.analysis, r.n, r.spec), got, r.value, r.extra)
		if r.design == r.analysis {
			same, err := Assurance(r.design, r.n, goal)
			if err != nil || same != got {
				t.Errorf("Assurance(%v) = %+v, %v; AssuranceUnder with the same prior twice %+v", r.design, same, err, got)
			}
		}
	}
	// The curve over n = 1…120 point for point.
	var ns []int
	var want []float64
	design, analysis := Beta{2, 38}, Beta{1, 1}
	goal := SuccessCriterion{0.08, DirectionBelow, 0.95}
	for _, r := range rows[8:] {
		if r.design != design || r.analysis != analysis || parseSuccess(t, r.spec) != goal {
			t.Fatalf("curve row %+v is not of the curve", r)
		}
		ns, want = append(ns, r.n), append(want, r.value)
	}
	curve, err := AssuranceCurveUnder(design, analysis, goal, ns)
	if err != nil {
		t.Fatal(err)
	}
	for i := range ns {
		if math.Abs(curve[i].Assurance-want[i]) > 1e-12 {
			t.Errorf("n %d: %.15g, scipy %.15g", ns[i], curve[i].Assurance, want[i])
		}
	}
}

// TestSampleSizeUnderTwoPriorsAgainstSciPy: the ALC, ACC and WOC criteria
// with each outcome's interval taken under the analysis prior and its
// probability from the design prior's predictive (De Santis 2007's
// design and analysis priors for these criteria), and the smallest n,
// against SciPy's enumeration over every outcome and every n
// (testdata/scipy/two_prior_plan_reference.py). Beta(2, 38) planned under
// a uniform analysis needs 188 trials for 95% equal-tailed intervals 0.06
// wide on average where it needs 140 analysed under itself
// (plan_reference.csv). The untrimmed worst outcome does not depend on
// the design prior; WithoutData is the analysis prior's own interval.
func TestSampleSizeUnderTwoPriorsAgainstSciPy(t *testing.T) {
	for _, r := range twoPriorRows(t, "criterion") {
		got, err := CriterionValueUnder(r.design, r.analysis, parseGoal(t, r.spec), r.n)
		if err != nil {
			t.Fatal(err)
		}
		if relErr(got.Value, r.value) > 1e-9 {
			t.Errorf("design %v, analysis %v, %s, n %d: %.15g, scipy %.15g", r.design, r.analysis, r.spec, r.n, got.Value, r.value)
		}
	}
	for _, r := range twoPriorRows(t, "samplesize") {
		goal := parseGoal(t, r.spec)
		got, err := SampleSizeUnder(context.Background(), r.design, r.analysis, goal)
		if err != nil {
			t.Fatalf("design %v, analysis %v, %s: %v", r.design, r.analysis, r.spec, err)
		}
		if got.N != r.n || relErr(got.At.Value, r.value) > 1e-9 || !got.Exhaustive {
			t.Errorf("design %v, analysis %v, %s: n %d (value %.12g, exhaustive %v), scipy n %d (value %.12g)", r.design, r.analysis, r.spec, got.N, got.At.Value, got.Exhaustive, r.n, r.value)
		}
		again, _ := strconv.Atoi(r.extra)
		switch {
		case got.FailsAgainAt != 0 && got.FailsAgainAt != again:
			t.Errorf("design %v, analysis %v, %s: fails again at %d, scipy %d", r.design, r.analysis, r.spec, got.FailsAgainAt, again)
		case got.FailsAgainAt == 0 && again != 0 && again <= got.CheckedTo:
			t.Errorf("design %v, analysis %v, %s: checked to %d and saw no failure, scipy fails at %d", r.design, r.analysis, r.spec, got.CheckedTo, again)
		}
		// With no data the criterion is the analysis prior's own
		// interval: for the uniform, a 95% equal-tailed interval is 0.95
		// wide and an interval 0.1 wide holds 0.1 (closed forms).
		if r.analysis == (Beta{1, 1}) && goal.Interval == IntervalEqual {
			want := goal.Level
			if goal.Criterion == CriterionACC {
				want = goal.Length
			}
			if math.Abs(got.WithoutData.Value-want) > 1e-12 {
				t.Errorf("design %v, uniform analysis, %s: %v with no data, want the uniform's own %v", r.design, r.spec, got.WithoutData.Value, want)
			}
		}
		if got.Exhaustive {
			same, err := SampleSizeExhaustiveUnder(context.Background(), r.design, r.analysis, goal)
			if err != nil || same.N != got.N || same.At != got.At {
				t.Errorf("design %v, analysis %v, %s: exhaustive search %+v, %v; the scan found %d", r.design, r.analysis, r.spec, same, err, got.N)
			}
		}
	}
	// One prior in both parts is SampleSize's own case.
	goal := SampleSizeGoal{Criterion: CriterionALC, Interval: IntervalEqual, Level: 0.95, Length: 0.06}
	one, err1 := SampleSize(context.Background(), Beta{2, 38}, goal)
	both, err2 := SampleSizeUnder(context.Background(), Beta{2, 38}, Beta{2, 38}, goal)
	if err := errors.Join(err1, err2); err != nil || one.N != both.N || one.At != both.At || one.WithoutData != both.WithoutData {
		t.Errorf("SampleSize %+v, SampleSizeUnder with the prior twice %+v (%v)", one, both, err)
	}
}

// TestAnalysisPriorRefusedByName: a bad analysis prior is refused naming
// analysis_alpha or analysis_beta, so a message tells it from the design
// prior's own alpha and beta.
func TestAnalysisPriorRefusedByName(t *testing.T) {
	goal := SuccessCriterion{0.08, DirectionBelow, 0.95}
	size := SampleSizeGoal{Criterion: CriterionALC, Interval: IntervalEqual, Level: 0.95, Length: 0.06}
	for _, c := range []struct {
		analysis Beta
		field    string
	}{{Beta{0, 1}, "analysis_alpha"}, {Beta{1, math.NaN()}, "analysis_beta"}, {Beta{1, 1e300}, "analysis_beta"}} {
		var errs []error
		_, err := AssuranceUnder(Beta{2, 38}, c.analysis, 100, goal)
		errs = append(errs, err)
		_, err = AssuranceCurveUnder(Beta{2, 38}, c.analysis, goal, []int{10})
		errs = append(errs, err)
		_, err = CriterionValueUnder(Beta{2, 38}, c.analysis, size, 10)
		errs = append(errs, err)
		_, err = SampleSizeUnder(context.Background(), Beta{2, 38}, c.analysis, size)
		errs = append(errs, err)
		for i, err := range errs {
			var ie *InputError
			if !errors.As(err, &ie) || ie.Field != c.field {
				t.Errorf("analysis %v, call %d: %v, want a refusal naming %s", c.analysis, i, err, c.field)
			}
		}
	}
	var ie *InputError
	if _, err := AssuranceUnder(Beta{-1, 38}, Beta{1, 1}, 100, goal); !errors.As(err, &ie) || ie.Field != "alpha" {
		t.Errorf("design alpha -1: %v, want a refusal naming alpha", err)
	}
}

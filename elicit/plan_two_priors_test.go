package elicit

import (
	"errors"
	"math"
	"strconv"
	"testing"
)

// twoPriorRow is a row of testdata/scipy/two_prior_assurance_reference.csv.
type twoPriorRow struct {
	design, analysis Beta
	n                int
	goal             SuccessCriterion
	value            float64
	span             string
}

func twoPriorRows(t *testing.T) []twoPriorRow {
	t.Helper()
	var out []twoPriorRow
	for _, c := range referenceTable(t, "../testdata/scipy/two_prior_assurance_reference.csv", "# scipy 1.10.1", 8) {
		var v [4]float64
		for i := range v {
			x, err := strconv.ParseFloat(c[i], 64)
			if err != nil {
				t.Fatal(err)
			}
			v[i] = x
		}
		n, err1 := strconv.Atoi(c[4])
		value, err2 := strconv.ParseFloat(c[6], 64)
		if err := errors.Join(err1, err2); err != nil {
			t.Fatal(err)
		}
		out = append(out, twoPriorRow{Beta{v[0], v[1]}, Beta{v[2], v[3]}, n, parseSuccess(t, c[5]), value, c[7]})
	}
	return out
}

// TestAssuranceUnderTwoPriorsAgainstSciPy: outcomes drawn from the design
// prior's beta-binomial predictive, success judged on the analysis
// prior's posterior, against SciPy's sum over every outcome
// (testdata/scipy/two_prior_assurance_reference.py; O'Hagan & Stevens
// 2001's design and analysis priors). With a uniform analysis prior the
// study of Beta(2, 38) succeeds on 0…3 successes in 100 trials, not 0…4
// as under the design prior itself, and its assurance falls from 0.540
// to 0.432.
func TestAssuranceUnderTwoPriorsAgainstSciPy(t *testing.T) {
	rows := twoPriorRows(t)
	for _, r := range rows {
		got, err := AssuranceUnder(r.design, r.analysis, r.n, r.goal)
		if err != nil {
			t.Fatal(err)
		}
		// Both sum beta-binomial probabilities from log-gamma functions,
		// each good to about 1e-13 relative at n = 1000.
		if math.Abs(got.Assurance-r.value) > 1e-11*math.Max(r.value, 1e-3) {
			t.Errorf("design %v, analysis %v, n %d, %+v: assurance %.15g, scipy %.15g", r.design, r.analysis, r.n, r.goal, got.Assurance, r.value)
		}
		if span := strconv.Itoa(got.SuccessFrom) + ":" + strconv.Itoa(got.SuccessTo); span != r.span {
			t.Errorf("design %v, analysis %v, n %d, %+v: successes %s, scipy %s", r.design, r.analysis, r.n, r.goal, span, r.span)
		}
		if r.design == r.analysis {
			same, err := Assurance(r.design, r.n, r.goal)
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
		if r.design != design || r.analysis != analysis || r.goal != goal {
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

// TestAnalysisPriorRefusedByName: a bad analysis prior is refused naming
// analysis_alpha or analysis_beta, so a message tells it from the design
// prior's own alpha and beta.
func TestAnalysisPriorRefusedByName(t *testing.T) {
	goal := SuccessCriterion{0.08, DirectionBelow, 0.95}
	for _, c := range []struct {
		analysis Beta
		field    string
	}{{Beta{0, 1}, "analysis_alpha"}, {Beta{1, math.NaN()}, "analysis_beta"}, {Beta{1, 1e300}, "analysis_beta"}} {
		_, err := AssuranceUnder(Beta{2, 38}, c.analysis, 100, goal)
		var ie *InputError
		if !errors.As(err, &ie) || ie.Field != c.field {
			t.Errorf("analysis %v: %v, want a refusal naming %s", c.analysis, err, c.field)
		}
		if _, err := AssuranceCurveUnder(Beta{2, 38}, c.analysis, goal, []int{10}); !errors.As(err, &ie) || ie.Field != c.field {
			t.Errorf("curve, analysis %v: %v, want a refusal naming %s", c.analysis, err, c.field)
		}
	}
	var ie *InputError
	if _, err := AssuranceUnder(Beta{-1, 38}, Beta{1, 1}, 100, goal); !errors.As(err, &ie) || ie.Field != "alpha" {
		t.Errorf("design alpha -1: %v, want a refusal naming alpha", err)
	}
}

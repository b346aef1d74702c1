package web

import (
	"bytes"
	"context"
	"fmt"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/web/chart"
)

// TestScoresBelowTheDoubleRangeAreWritten: 300 calibration questions at
// 1/50/99 %, every true value 0; expert A has 150 below the 1% value and
// 150 above the 99% value, B 200 and 100 (elicit's
// TestManyCalibrationQuestions). Their calibration scores are e^−1169.95
// = 7.878e-509 and e^−1186.93 = 3.318e-516 (R 4.2.2's pchisq(…, log.p =
// TRUE), testdata/r/pchisq_log_tail_reference.R), below the smallest
// double, and the optimised cut-off is A's score. The scores table, the
// cut-off's sentence, the pool's line and the weight map write them, not
// 0, and give B's weight of 0 its reason (the cut-off), not "calibration ×
// information is 0".
func TestScoresBelowTheDoubleRangeAreWritten(t *testing.T) {
	probs := []float64{0.01, 0.5, 0.99}
	var as []elicit.SeedAssessment
	real := map[string]float64{}
	for i := 0; i < 300; i++ {
		q := fmt.Sprintf("s%03d", i)
		real[q] = 0
		a, b := []float64{1, 2, 3}, []float64{1, 2, 3}
		if i >= 150 {
			a = []float64{-3, -2, -1}
		}
		if i >= 200 {
			b = []float64{-3, -2, -1}
		}
		as = append(as, elicit.SeedAssessment{Expert: "A", Question: q, Probs: probs, Quantiles: a},
			elicit.SeedAssessment{Expert: "B", Question: q, Probs: probs, Quantiles: b})
	}
	sc, experts := scoredPanel(t, as, real)
	var b bytes.Buffer
	if err := scoresTable("t", experts, sc.Pooled, len(sc.Questions), sc.Alpha, sc.LogAlpha).Render(context.Background(), &b); err != nil {
		t.Fatal(err)
	}
	table := b.String()
	for _, want := range []string{">7.878e-509<", ">3.318e-516<", "calibration score 3.318e-516 is below the cut-off 7.878e-509, so weight 0",
		"earns 7.878e-509 × ", "calibration score <strong>7.878e-509</strong>"} {
		if !strings.Contains(table, htmlEscape(want)) && !strings.Contains(table, want) {
			t.Errorf("scores table lacks %q:\n%s", want, table)
		}
	}
	if strings.Contains(table, "calibration × information is 0") {
		t.Errorf("B's weight is put down to a product of 0:\n%s", table)
	}
	if s := alphaSentence(sc.Alpha, sc.LogAlpha, workshop.AlphaOptimised); !strings.Contains(s, "Cut-off α = 7.878e-509") {
		t.Errorf("cut-off sentence %q", s)
	}
	b.Reset()
	if err := chart.Scores(scoresPicture("m", experts, sc.Pooled, sc.Alpha, sc.LogAlpha)).Render(context.Background(), &b); err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"cut-off α = 7.878e-509", "A: calibration 7.878e-509", "B: calibration 3.318e-516"} {
		if !strings.Contains(b.String(), want) {
			t.Errorf("weight map lacks %q", want)
		}
	}
}

// TestWeightTooSmallToHoldIsSaidSo: 300 calibration questions at
// 1/50/99 %, every true value 0; A's answers put 3, 147, 147 and 3 true
// values in the four bins (calibration 1), B's 150 and 0, 0, 150 (e^−1169.95
// = 7.878e-509, R 4.2.2's pchisq(…, log.p = TRUE) as in
// TestScoresBelowTheDoubleRangeAreWritten). B's share of the weight,
// about e^−1170, is below the double range and reads 0; the pools with
// and without B are then the same, so the optimised cut-off is B's score
// (ties go to the smaller α) and B stands at it with weight 0. Its line
// said "calibration × information is 0", which it is not (6.084e-509).
func TestWeightTooSmallToHoldIsSaidSo(t *testing.T) {
	probs := []float64{0.01, 0.5, 0.99}
	var as []elicit.SeedAssessment
	real := map[string]float64{}
	for i := 0; i < 300; i++ {
		q := fmt.Sprintf("s%03d", i)
		real[q] = 0
		var a []float64
		switch {
		case i < 3:
			a = []float64{1, 2, 3}
		case i < 150:
			a = []float64{-1, 1, 2}
		case i < 297:
			a = []float64{-2, -1, 1}
		default:
			a = []float64{-3, -2, -1}
		}
		b := []float64{1, 2, 3}
		if i >= 150 {
			b = []float64{-3, -2, -1}
		}
		as = append(as, elicit.SeedAssessment{Expert: "A", Question: q, Probs: probs, Quantiles: a},
			elicit.SeedAssessment{Expert: "B", Question: q, Probs: probs, Quantiles: b})
	}
	sc, experts := scoredPanel(t, as, real)
	if sc.LogAlpha == nil || experts[1].Weight != 0 || experts[1].Calibration != 0 {
		t.Fatalf("the scenario: cut-off %v (log %v), B's weight %v and score %v", sc.Alpha, sc.LogAlpha, experts[1].Weight, experts[1].Calibration)
	}
	lines := scoreLines(experts, sc.Alpha, sc.LogAlpha)
	why := lines[1].Why
	if strings.Contains(why, "is 0") || !strings.Contains(why, "earns 7.878e-509 × 0.7723 = 6.084e-509") || !strings.Contains(why, "too small") {
		t.Errorf("B's weight of 0 is put as %q", why)
	}
}

// TestBasisCutOffBelowTheDoubleRangeIsWritten: weights stored with a
// basis whose optimised cut-off is a score below the smallest double
// (Alpha 0, ln α = −1169.95, e^that = 7.878e-509 as in
// TestScoresBelowTheDoubleRangeAreWritten) are described with that
// cut-off, in the weights form's note and in the sentence the decision
// log and the record give the basis: both wrote "cut-off α = 0".
func TestBasisCutOffBelowTheDoubleRangeIsWritten(t *testing.T) {
	la := -1169.9517750719319
	b := workshop.WeightBasis{Method: workshop.BasisClassicalModel, Alpha: 0, LogAlpha: &la, AlphaRule: workshop.AlphaOptimised,
		Probs: []float64{0.01, 0.5, 0.99}}
	if s := basisSentence(b, nil); !strings.Contains(s, "cut-off α = 7.878e-509") {
		t.Errorf("basis sentence %q", s)
	}
	v := calibrationView{Workshop: workshop.Workshop{ID: 1}, Weights: workshop.Weights{WorkshopID: 1, Scheme: workshop.WeightsPerformance, Basis: &b},
		WeightsForm: newForm(nil)}
	var out bytes.Buffer
	if err := calibrationWeightsForm(v).Render(context.Background(), &out); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(out.String(), "the cut-off α = 7.878e-509") {
		t.Errorf("weights form's note lacks the cut-off 7.878e-509:\n%s", out.String())
	}
}

// TestRerunCutOffBelowTheDoubleRangeIsWritten: a leave-one-out rerun
// whose cut-off is a score below the smallest double (ln α = −1169.95,
// 7.878e-509) shows it in the steadiness table, where it read 0.
func TestRerunCutOffBelowTheDoubleRangeIsWritten(t *testing.T) {
	la := -1169.9517750719319
	rb := &workshop.Robustness{Rows: []workshop.RobustnessRow{{LeftOut: elicit.LeaveOutExpert, ID: 2, Label: "B", Alpha: 0, LogAlpha: &la,
		Weights: []workshop.ExpertWeight{}, Shifts: []float64{}}}}
	s := newSteadiness("s", rb, nil, map[int64]string{1: "A", 2: "B"})
	if len(s.Rows) != 1 || s.Rows[0].Alpha != "7.878e-509" {
		t.Errorf("rerun rows %+v, want the cut-off 7.878e-509", s.Rows)
	}
}

// scoredPanel scores the invented panel by Cooke's classical model with
// an optimised cut-off and gives its experts as the page lists them.
func scoredPanel(t *testing.T, as []elicit.SeedAssessment, real map[string]float64) (elicit.Scores, []workshop.PerformanceExpert) {
	t.Helper()
	sc, err := elicit.ClassicalModel(as, real, nil, elicit.ModelOptions{})
	if err != nil {
		t.Fatal(err)
	}
	var experts []workshop.PerformanceExpert
	for i, e := range sc.Experts {
		experts = append(experts, workshop.PerformanceExpert{ExpertID: int64(i + 1), Name: e.Expert, Answered: e.N,
			Calibration: e.Calibration, LogCalibration: e.LogCalibration, Information: e.Information, Combined: e.Combined, Weight: e.Weight})
	}
	return sc, experts
}

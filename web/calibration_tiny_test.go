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
	sc, err := elicit.ClassicalModel(as, real, nil, elicit.ModelOptions{})
	if err != nil {
		t.Fatal(err)
	}
	var experts []workshop.PerformanceExpert
	for i, e := range sc.Experts {
		experts = append(experts, workshop.PerformanceExpert{ExpertID: int64(i + 1), Name: e.Expert, Answered: e.N,
			Calibration: e.Calibration, LogCalibration: e.LogCalibration, Information: e.Information, Combined: e.Combined, Weight: e.Weight})
	}
	var b bytes.Buffer
	if err := scoresTable("t", experts, sc.Pooled, sc.Alpha, sc.LogAlpha).Render(context.Background(), &b); err != nil {
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
	for _, want := range []string{"cut-off α = 7.88e-509", "A: calibration 7.88e-509", "B: calibration 3.32e-516"} {
		if !strings.Contains(b.String(), want) {
			t.Errorf("weight map lacks %q", want)
		}
	}
}

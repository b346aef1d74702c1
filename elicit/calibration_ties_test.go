package elicit

import (
	"fmt"
	"math"
	"strconv"
	"strings"
	"testing"
)

// TestEqualScoresOfOtherCountsAreCutAlike: counts that differ but give
// the same I(s, p), and so by definition the same calibration score
// C = P(χ²ₙ > 2·N·I(s, p)) (Cooke 1991, ch. 12), give two experts one
// score to the last bit, and a cut-off at that score keeps both. The
// pairs and their scores are testdata/scipy/calibration_ties_reference.py's:
// I worked in Python's decimal arithmetic at 60 digits, the score from
// SciPy's chi2.sf. Before, Σ sⱼ ln(sⱼ/pⱼ) left such scores a few units in
// the last place apart (at 5/50/95, [0, 1, 1, 2] scored
// 0.07652376788738458 and [1, 0, 2, 1] 0.0765237678873844), and a cut-off
// at the higher left the other expert out.
func TestEqualScoresOfOtherCountsAreCutAlike(t *testing.T) {
	rows := referenceTable(t, "../testdata/scipy/calibration_ties_reference.csv", "# scipy 1.10.1", 5)
	ints := func(s string) []int {
		var out []int
		for _, f := range strings.Fields(s) {
			v, err := strconv.Atoi(f)
			if err != nil {
				t.Fatal(err)
			}
			out = append(out, v)
		}
		return out
	}
	for _, r := range rows {
		var probs []float64
		for _, f := range strings.Fields(r[0]) {
			p, err := strconv.ParseFloat(f, 64)
			if err != nil {
				t.Fatal(err)
			}
			probs = append(probs, p)
		}
		want, err := strconv.ParseFloat(r[4], 64)
		if err != nil {
			t.Fatal(err)
		}
		// Each expert answers the same questions, with the true value
		// 10 in the bin its counts give.
		var as []SeedAssessment
		real := map[string]float64{}
		for e, counts := range map[string][]int{"A": ints(r[2]), "B": ints(r[3])} {
			q := 0
			for bin, c := range counts {
				for range c {
					name := fmt.Sprintf("Q%02d", q)
					real[name] = 10
					qs := make([]float64, len(probs))
					for i := range qs {
						qs[i] = 10 + float64(i-bin) + 0.5
					}
					as = append(as, SeedAssessment{Expert: e, Question: name, Probs: probs, Quantiles: qs})
					q++
				}
			}
		}
		s, err := ClassicalModel(as, real, nil, ModelOptions{})
		if err != nil {
			t.Fatalf("%v: %v", r, err)
		}
		a, b := expertScore(t, s, "A"), expertScore(t, s, "B")
		if a.Calibration != b.Calibration || a.LogCalibration != b.LogCalibration {
			t.Errorf("probs %s, counts %s and %s: C %.17g and %.17g, equal by definition", r[0], r[2], r[3], a.Calibration, b.Calibration)
			continue
		}
		if math.Abs(a.Calibration-want) > 1e-12*want {
			t.Errorf("probs %s, counts %s: C %.17g, SciPy %.17g", r[0], r[2], a.Calibration, want)
		}
		cut := max(a.Calibration, b.Calibration)
		s, err = ClassicalModel(as, real, nil, ModelOptions{Alpha: &cut})
		if err != nil {
			t.Fatalf("%v: %v", r, err)
		}
		if wa, wb := expertScore(t, s, "A").Weight, expertScore(t, s, "B").Weight; (wa == 0) != (wb == 0) {
			t.Errorf("probs %s, counts %s and %s: cut-off at their score gives weights %v and %v", r[0], r[2], r[3], wa, wb)
		}
	}
}

package elicit

import "testing"

// TestPoolKeepsAQuantileItsExpertsShare: where every expert with weight
// gives the same 10% quantile, the performance-weighted pool (a linear
// pool of their minimal-information distributions, Cooke 1991, §12.4;
// Stone 1961) has CDF Σ wᵢ Fᵢ(x) = 0.1 there too, so its own 10% quantile
// is that value, and a true value equal to it counts in the bin below it,
// as it does for each expert. Invented answers; on Q0 the three experts
// give 2.73, the true value, as their 10% quantile. The weighted mean
// Σ wᵢ · 0.1 / Σ wᵢ rounded above 0.1, the pool's quantile came out below
// 2.73, and the true value fell in the bin above it.
func TestPoolKeepsAQuantileItsExpertsShare(t *testing.T) {
	probs := []float64{0.1, 0.5, 0.9}
	mk := func(e, q string, x ...float64) SeedAssessment {
		return SeedAssessment{Expert: e, Question: q, Probs: probs, Quantiles: x}
	}
	as := []SeedAssessment{
		mk("E0", "Q0", 2.73, 8.43, 13.94), mk("E1", "Q0", 2.73, 6, 11.79), mk("E2", "Q0", 2.73, 5.12, 9.93),
		mk("E0", "Q1", 75.45, 77.25, 79.2), mk("E1", "Q1", 75.53, 78.09, 81.41), mk("E2", "Q1", 75.28, 77.75, 80.87),
		mk("E0", "Q2", 83.33, 84.69, 87.64), mk("E1", "Q2", 82.88, 85, 86.93), mk("E2", "Q2", 83.47, 89.01, 94.52),
		mk("E0", "Q3", 91.75, 96.01, 97.62), mk("E1", "Q3", 91.3, 95.31, 98.24), mk("E2", "Q3", 91.69, 96.11, 98.22),
	}
	real := map[string]float64{"Q0": 2.73, "Q1": 75.7, "Q2": 83.79, "Q3": 91.81}
	zero := 0.0
	s, err := ClassicalModel(as, real, nil, ModelOptions{Alpha: &zero})
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range s.Experts {
		if e.Weight == 0 {
			t.Fatalf("%s has no weight under the cut-off 0", e.Expert)
		}
	}
	for _, q := range s.Questions {
		if q.Question == "Q0" && q.Pooled[0] != 2.73 {
			t.Errorf("the pool's 10%% quantile on Q0 is %.17g; every expert with weight gives 2.73", q.Pooled[0])
		}
	}
}

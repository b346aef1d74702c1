package elicit

import (
	"math"
	"testing"
)

// TestLargestCDFGapAgainstSciPy checks the single Beta's largest CDF
// distance from its pool, which `parley pool`, the panel, the report and
// the study page print, against SciPy 1.10.1
// (testdata/scipy/pool_gap_reference.py): the supremum over the whole of
// [0, 1] of |betainc(a, b, u) − Σ wᵢ betainc(aᵢ, bᵢ, u)| from dense
// points where every CDF rises by at most 1/4000, log-spaced tails, and
// scipy.optimize.minimize_scalar at each local maximum. The pools are
// invented (the two named, and 40 seeded random ones). Tolerances: for
// SciPy's own least-squares Beta, the gap within 1e-12 absolute
// (measured: 4.3e-15); for the Beta that BestBeta chooses, whose shapes
// differ a little from SciPy's, within 1e-7 (measured: 4.1e-9); the
// far-from-the-pool verdict the same as SciPy's wherever SciPy's gap lies
// more than 1e-6 from 0.05 (the nearest, 0.0500155, does). The grid of percentiles alone read the
// first pool 0.00569 for 0.00570 and put the second under the limit.
func TestLargestCDFGapAgainstSciPy(t *testing.T) {
	probs := make([]float64, representationGrid)
	for k := range probs {
		probs[k] = float64(k+1) / (representationGrid + 1)
	}
	rows := referenceTable(t, "../testdata/scipy/pool_gap_reference.csv", "# scipy", 9)
	if len(rows) < 30 {
		t.Fatalf("%d pools in the reference table", len(rows))
	}
	var missedByGrid, astride int
	for _, c := range rows {
		num := func(i int) float64 { return referenceCell(t, c, i) }
		p := referencePool(t, c)
		sup, grid, farCDF := num(7), num(6), c[8] == "1"
		if sup-grid > 1e-6 {
			missedByGrid++
		}
		if grid <= PoorFitThreshold && sup > PoorFitThreshold {
			astride++
		}
		sets, err := p.unitQuantileSet(probs)
		if err != nil {
			t.Fatalf("%s: %v", c[0], err)
		}
		var us []float64
		for _, set := range sets {
			us = append(us, set.value)
		}
		if got := p.withIncBeta().largestCDFGap(Beta{num(4), num(5)}, us, probs); math.Abs(got-sup) > 1e-12 {
			t.Errorf("%s: largest CDF gap of SciPy's Beta %.15g, SciPy %.15g (grid %.15g)", c[0], got, sup, grid)
		}
		// From the bounds alone, the screen finds the same: the grid
		// only saves it work.
		if got := p.withIncBeta().largestCDFGap(Beta{num(4), num(5)}, nil, nil); math.Abs(got-sup) > 1e-12 {
			t.Errorf("%s: largest CDF gap of SciPy's Beta from the bounds alone %.15g, SciPy %.15g", c[0], got, sup)
		}
		rep, err := p.BestBeta()
		if err != nil {
			t.Errorf("%s: %v", c[0], err)
			continue
		}
		if math.Abs(rep.MaxCDFError-sup) > 1e-7 {
			t.Errorf("%s: max_cdf_error %.10g, SciPy's supremum %.10g (grid %.10g)", c[0], rep.MaxCDFError, sup, grid)
		}
		if cdf, _, _ := rep.Far(); math.Abs(sup-PoorFitThreshold) > 1e-6 && cdf != farCDF {
			t.Errorf("%s: far from the pool %v at %.10g, SciPy %v at %.10g", c[0], cdf, rep.MaxCDFError, farCDF, sup)
		}
	}
	// The table must hold what the grid alone gets wrong.
	if missedByGrid < 5 || astride < 1 {
		t.Fatalf("%d pools whose grid misses the supremum by 1e-6, %d astride the limit", missedByGrid, astride)
	}
}

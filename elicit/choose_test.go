package elicit

import (
	"math"
	"strconv"
	"testing"
)

// TestLnChooseAgainstR checks ln C(n, k), which every beta-binomial
// predictive term carries, against R 4.2.2's lchoose(n, k) and
// dbinom(k, n, 0.5, log = TRUE) + n·log 2 (testdata/r/lchoose_reference.R),
// for n from 1 to 10⁹. As lnΓ(n+1) − lnΓ(k+1) − lnΓ(n−k+1) it was 3e-10
// off at n = 10⁶, k = 2 (1e-11 relative) and 7.6e-7 off at n = 10⁹, k = 1
// (3.7e-8 relative).
func TestLnChooseAgainstR(t *testing.T) {
	rows := referenceTable(t, "../testdata/r/lchoose_reference.csv", "# R version", 4)
	for _, c := range rows {
		n, err1 := strconv.Atoi(c[0])
		k, err2 := strconv.Atoi(c[1])
		want, err3 := strconv.ParseFloat(c[2], 64)
		ld, err4 := strconv.ParseFloat(c[3], 64)
		if err1 != nil || err2 != nil || err3 != nil || err4 != nil {
			t.Fatalf("row %v", c)
		}
		got := lnChoose(n, k)
		// 1e-14 relative (common practice, no source: a few ulps of the
		// value, as R's lchoose reaches through lbeta's Stirling form).
		if want == 0 {
			if got != 0 {
				t.Errorf("lnChoose(%d, %d) = %v, want 0", n, k, got)
			}
			continue
		}
		if e := math.Abs(got-want) / want; !(e <= 1e-14) {
			t.Errorf("lnChoose(%d, %d) = %.17g, R's lchoose %.17g (relative error %.2g)", n, k, got, want, e)
		}
		// R's dbinom reaches ln C(n, k) − n ln 2 by its own route (Loader's
		// saddle point); the difference cancels near k = n/2, so the check
		// is relative to the size of the terms, ln C(n, k) + n ln 2.
		if e := math.Abs(got-float64(n)*math.Ln2-ld) / (got + float64(n)*math.Ln2); !(e <= 1e-14) {
			t.Errorf("lnChoose(%d, %d) − n ln 2 = %.17g, R's dbinom %.17g (relative error %.2g)", n, k, got-float64(n)*math.Ln2, ld, e)
		}
	}
	if len(rows) < 200 {
		t.Fatalf("only %d rows", len(rows))
	}
}

// TestUniformPriorPredictiveIsFlat: under Beta(1, 1) every outcome of n
// trials has probability 1/(n + 1) (Bayes 1763; Gelman et al. 2013,
// BDA3 §2.1). At 10⁶ trials each term is within 1e-9 relative (measured
// 4.7e-10: the rest is the rounding of ln B(k + 1, n − k + 1), a number
// near −7e5 whose ulp is 1.2e-10); with lgamma differences for ln C(n, k)
// the worst term was 4.2e-9 off.
func TestUniformPriorPredictiveIsFlat(t *testing.T) {
	const n = 1_000_000
	pmf, err := PriorPredictive(Beta{Alpha: 1, Beta: 1}, n)
	if err != nil {
		t.Fatal(err)
	}
	worst := 0.0
	for _, p := range pmf {
		worst = math.Max(worst, math.Abs(p*(n+1)-1))
	}
	if worst > 1e-9 {
		t.Errorf("largest relative error %.2g of a term against 1/(n+1)", worst)
	}
}

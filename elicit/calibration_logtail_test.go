package elicit

import (
	"math"
	"strconv"
	"testing"
)

// TestLogChiSquareSurvivalAgainstR checks ln of the chi-square upper tail,
// on which the calibration score rests, against R 4.2.2's
// pchisq(x, df, lower.tail = FALSE, log.p = TRUE)
// (testdata/r/pchisq_log_tail_reference.R), out to x = 10⁷, where the tail
// itself is e^−5000000 and gonum's is 0 from about x = 1500.
func TestLogChiSquareSurvivalAgainstR(t *testing.T) {
	path := "../testdata/r/pchisq_log_tail_reference.csv"
	beyond := 0
	for _, c := range referenceTable(t, path, "# R version", 3) {
		var v [3]float64
		for i := range v {
			var err error
			if v[i], err = strconv.ParseFloat(c[i], 64); err != nil {
				t.Fatal(err)
			}
		}
		df, x, want := v[0], v[1], v[2]
		got := logChiSquareSurvival(df, x)
		// 1e-12 relative (common practice, no source): the continued
		// fraction's prefactor a·ln z − z rounds at ε·z.
		if e := math.Abs(got-want) / math.Abs(want); !(e <= 1e-12) {
			t.Errorf("df %v, x %v: ln Q = %v, R %v (relative error %.2g)", df, x, got, want, e)
		}
		if want < -745 {
			beyond++
		}
	}
	if beyond < 50 {
		t.Fatalf("only %d rows beyond the double range", beyond)
	}
}

// TestFormatExp writes values beyond the double range: e^−1170 is
// 7.507e-509 (R 4.2.2: exp(-1170 - log(10) * -509) = 7.50682, its
// mantissa at the decade 10^−509); the others by hand.
func TestFormatExp(t *testing.T) {
	for _, c := range []struct {
		log  float64
		sig  int
		want string
	}{
		{-1170, 4, "7.507e-509"},
		{math.Log(2.5e-3), 3, "2.50e-3"},
		{0, 3, "1.00e0"},
		{math.Log(9.9996) - 400*math.Ln10, 4, "1.000e-399"},
	} {
		if got := FormatExp(c.log, c.sig); got != c.want {
			t.Errorf("FormatExp(%v, %d) = %q, want %q", c.log, c.sig, got, c.want)
		}
	}
	if !BelowDouble(0, -1170) || BelowDouble(1e-300, math.Log(1e-300)) || BelowDouble(0, math.Inf(-1)) {
		t.Error("BelowDouble")
	}
}

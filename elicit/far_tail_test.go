package elicit

import (
	"math"
	"strconv"
	"testing"
)

// TestFarTailsAgainstR checks I_x(α, β), its complement and the density
// far into the tails of Betas with both shapes at least 10, against R
// 4.2.2's pbeta(log.p = TRUE) and dbeta(log = TRUE) (source:
// testdata/r/far_tail_reference.R): the smaller tail and the density
// within 1e-9 relative wherever they are normal doubles. There the
// prefactor's Stirling form once took ln(x/x₀) from a − (a+b)x, whose
// digits cancel for x far below the mean x₀: Beta(10, 50).CDF(1e-20) was
// 0 for R's 6.28e-190, CDF(1e-8) 5e-9 off, and the density of
// Beta(50, 10) at 1 − 1e-14 1.9% off.
func TestFarTailsAgainstR(t *testing.T) {
	const path = "../testdata/r/far_tail_reference.csv"
	num := func(s string) float64 {
		v, err := strconv.ParseFloat(s, 64)
		if err != nil {
			t.Fatalf("%s: bad number %q", path, s)
		}
		return v
	}
	floor := math.Log(0x1p-1000)
	var n int
	for _, c := range referenceTable(t, path, "# R version", 6) {
		a, b, x := num(c[0]), num(c[1]), num(c[2])
		rl, ru, rd := num(c[3]), num(c[4]), num(c[5])
		d := Beta{a, b}
		lo, up := d.CDF(x), d.Survival(x)
		check := func(what string, got, want float64) {
			if math.IsInf(want, 0) || math.IsNaN(want) || want < floor {
				return
			}
			n++
			if diff := math.Abs(math.Log(got) - want); !(diff <= 1e-9) {
				t.Errorf("Beta(%g, %g) %s at %.17g: log %.17g, R %.17g (%.1e)", a, b, what, x, math.Log(got), want, diff)
			}
		}
		if rl <= ru {
			check("lower tail", lo, rl)
		} else {
			check("upper tail", up, ru)
		}
		check("density", d.PDF(x), rd)
	}
	if n < 1500 {
		t.Fatalf("only %d values compared", n)
	}
}

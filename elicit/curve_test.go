package elicit

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/diff/fd"
)

// TestCurveFuncAgrees checks CurveFunc's three numbers against the
// package's own CDF and PDF (themselves checked against R's pbeta and
// dbeta in beta_test.go) and the slope against gonum's central finite
// difference of the PDF, the library as the oracle.
func TestCurveFuncAgrees(t *testing.T) {
	shapes := []ScaledBeta{
		{Beta{2.022, 40.59}, 0, 1},
		{Beta{2, 2}, 0, 1},
		{Beta{4.2, 17.9}, 10, 500},
		{Beta{55, 3.5}, -1, 1},
		{Beta{2000, 50000}, 0, 1},
		{Beta{1.5, 7}, 0, 1},
		{Beta{30, 12}, 0, 100},
	}
	for _, d := range shapes {
		f := d.CurveFunc()
		for _, p := range []float64{1e-6, 0.001, 0.05, 0.3, 0.5, 0.7, 0.95, 0.999, 1 - 1e-6} {
			x := d.Quantile(p)
			cdf, pdf, slope := f(x)
			if !relClose(cdf, d.CDF(x), 1e-13) {
				t.Errorf("%v at %v: cdf %v, CDF %v", d, x, cdf, d.CDF(x))
			}
			if !relClose(pdf, d.PDF(x), 1e-12) {
				t.Errorf("%v at %v: pdf %v, PDF %v", d, x, pdf, d.PDF(x))
			}
			// Central difference with a step of 1e-6 of the x's scale or
			// of its distance to a bound (gonum's fd.Central, second order).
			h := 1e-6 * math.Min(d.SD(), math.Min(x-d.Lower, d.Upper-x))
			want := fd.Derivative(d.PDF, x, &fd.Settings{Formula: fd.Central, Step: h})
			scale := d.PDF(d.Quantile(0.5)) / d.SD() // a typical slope
			if math.Abs(slope-want) > 1e-5*scale {
				t.Errorf("%v at %v: slope %v, finite difference %v", d, x, slope, want)
			}
		}
	}
}

// TestCurveFuncAtTheBounds checks the limits at the bounds: for α, β > 2
// the density and its slope vanish; for 1 < α < 2 the slope is infinite
// at the lower bound; for α < 1 the density is.
func TestCurveFuncAtTheBounds(t *testing.T) {
	cdf, pdf, slope := ScaledBeta{Beta{3, 4}, 0, 1}.CurveFunc()(0)
	if cdf != 0 || pdf != 0 || slope != 0 {
		t.Errorf("Beta(3,4) at 0: %v %v %v, want 0 0 0", cdf, pdf, slope)
	}
	cdf, pdf, slope = ScaledBeta{Beta{3, 4}, 0, 1}.CurveFunc()(1)
	if cdf != 1 || pdf != 0 || slope != 0 {
		t.Errorf("Beta(3,4) at 1: %v %v %v, want 1 0 0", cdf, pdf, slope)
	}
	// Beta(2, 2) is 6u(1−u): slopes 6 and −6 at the bounds, and on
	// [0, 2] they are 6/4 and −6/4 (Johnson, Kotz & Balakrishnan 1995,
	// ch. 25, the density's formula).
	for _, c := range []struct {
		d        ScaledBeta
		x, slope float64
	}{{ScaledBeta{Beta{2, 2}, 0, 1}, 0, 6}, {ScaledBeta{Beta{2, 2}, 0, 1}, 1, -6}, {ScaledBeta{Beta{2, 2}, 0, 2}, 0, 1.5}, {ScaledBeta{Beta{2, 2}, 0, 2}, 2, -1.5}} {
		if _, _, slope := c.d.CurveFunc()(c.x); !relClose(slope, c.slope, 1e-14) {
			t.Errorf("%v at %v: slope %v, want %v", c.d, c.x, slope, c.slope)
		}
	}
	if _, _, slope := (ScaledBeta{Beta{1.5, 4}, 0, 1}).CurveFunc()(0); !math.IsInf(slope, 1) {
		t.Errorf("Beta(1.5,4) at 0: slope %v, want +Inf", slope)
	}
	if _, _, slope := (ScaledBeta{Beta{4, 1.5}, 0, 1}).CurveFunc()(1); !math.IsInf(slope, -1) {
		t.Errorf("Beta(4,1.5) at 1: slope %v, want -Inf", slope)
	}
	if _, pdf, _ := (ScaledBeta{Beta{0.5, 4}, 0, 1}).CurveFunc()(0); !math.IsInf(pdf, 1) {
		t.Errorf("Beta(0.5,4) at 0: pdf %v, want +Inf", pdf)
	}
}

// TestQuantileFromAgreesWithQuantile checks that the starting estimate
// changes nothing but the work: from good, poor, out-of-range and NaN
// guesses QuantileFrom gives Quantile's answer (itself checked against
// R's qbeta in beta_test.go) to 1e-12 relative.
func TestQuantileFromAgreesWithQuantile(t *testing.T) {
	shapes := []ScaledBeta{
		{Beta{2.022, 40.59}, 0, 1},
		{Beta{0.3, 0.4}, 0, 1},
		{Beta{4.2, 17.9}, 10, 500},
		{Beta{1e5, 1}, 0, 1},
		{Beta{1, 1e6}, 0, 1},
		{Beta{2000, 50000}, 0, 1},
	}
	for _, d := range shapes {
		for _, p := range []float64{1e-9, 0.001, 0.05, 0.5, 0.95, 0.999, 1 - 1e-9} {
			want := d.Quantile(p)
			for _, guess := range []float64{want, d.Quantile(0.5), d.Lower, d.Upper, d.Lower + 0.999*(d.Upper-d.Lower), math.NaN(), -7} {
				got := d.QuantileFrom(p, guess)
				if !relClose(got, want, 1e-12) {
					t.Errorf("%v p=%v from %v: %v, Quantile %v", d, p, guess, got, want)
				}
			}
		}
	}
	if got := (ScaledBeta{Beta{2, 3}, 5, 9}).QuantileFrom(0, 7); got != 5 {
		t.Errorf("p=0: %v, want the lower bound 5", got)
	}
	if got := (ScaledBeta{Beta{2, 3}, 5, 9}).QuantileFrom(1, 7); got != 9 {
		t.Errorf("p=1: %v, want the upper bound 9", got)
	}
	if got := (ScaledBeta{Beta{-2, 3}, 5, 9}).QuantileFrom(0.5, 7); !math.IsNaN(got) {
		t.Errorf("invalid Beta: %v, want NaN", got)
	}
}

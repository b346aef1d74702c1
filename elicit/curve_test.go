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
	shapes := []Beta{{2.022, 40.59}, {2, 2}, {4.2, 17.9}, {55, 3.5}, {2000, 50000}, {1.5, 7}, {30, 12}}
	for _, d := range shapes {
		f := d.CurveFunc()
		for _, p := range []float64{1e-6, 0.001, 0.05, 0.3, 0.5, 0.7, 0.95, 0.999, 1 - 1e-6} {
			u := d.Quantile(p)
			cdf, pdf, slope := f(u)
			if !relClose(cdf, d.CDF(u), 1e-13) {
				t.Errorf("%v at %v: cdf %v, CDF %v", d, u, cdf, d.CDF(u))
			}
			if !relClose(pdf, d.PDF(u), 1e-12) {
				t.Errorf("%v at %v: pdf %v, PDF %v", d, u, pdf, d.PDF(u))
			}
			// Central difference with a step of 1e-6 of the spread or of
			// the distance to a bound (gonum's fd.Central, second order).
			h := 1e-6 * math.Min(d.SD(), math.Min(u, 1-u))
			want := fd.Derivative(d.PDF, u, &fd.Settings{Formula: fd.Central, Step: h})
			scale := d.PDF(d.Quantile(0.5)) / d.SD() // a typical slope
			if math.Abs(slope-want) > 1e-5*scale {
				t.Errorf("%v at %v: slope %v, finite difference %v", d, u, slope, want)
			}
		}
	}
}

// TestCurveFuncAtTheBounds checks the limits at the bounds: for α, β > 2
// the density and its slope vanish; for 1 < α < 2 the slope is infinite
// at the lower bound; for α < 1 the density is.
func TestCurveFuncAtTheBounds(t *testing.T) {
	cdf, pdf, slope := Beta{3, 4}.CurveFunc()(0)
	if cdf != 0 || pdf != 0 || slope != 0 {
		t.Errorf("Beta(3,4) at 0: %v %v %v, want 0 0 0", cdf, pdf, slope)
	}
	cdf, pdf, slope = Beta{3, 4}.CurveFunc()(1)
	if cdf != 1 || pdf != 0 || slope != 0 {
		t.Errorf("Beta(3,4) at 1: %v %v %v, want 1 0 0", cdf, pdf, slope)
	}
	// Beta(2, 2) is 6u(1−u): slopes 6 and −6 at the bounds (Johnson,
	// Kotz & Balakrishnan 1995, ch. 25, the density's formula).
	for _, c := range []struct{ u, slope float64 }{{0, 6}, {1, -6}} {
		if _, _, slope := (Beta{2, 2}).CurveFunc()(c.u); !relClose(slope, c.slope, 1e-14) {
			t.Errorf("Beta(2,2) at %v: slope %v, want %v", c.u, slope, c.slope)
		}
	}
	if _, _, slope := (Beta{1.5, 4}).CurveFunc()(0); !math.IsInf(slope, 1) {
		t.Errorf("Beta(1.5,4) at 0: slope %v, want +Inf", slope)
	}
	if _, _, slope := (Beta{4, 1.5}).CurveFunc()(1); !math.IsInf(slope, -1) {
		t.Errorf("Beta(4,1.5) at 1: slope %v, want -Inf", slope)
	}
	if _, pdf, slope := (Beta{0.5, 4}).CurveFunc()(0); !math.IsInf(pdf, 1) || !math.IsInf(slope, -1) {
		t.Errorf("Beta(0.5,4) at 0: pdf %v and slope %v, want +Inf and -Inf (the density falls from infinity)", pdf, slope)
	}
	// Shape 1 at a bound: Beta(1, 3) is 3(1−u)² (the density's formula,
	// Johnson, Kotz & Balakrishnan 1995, ch. 25), so f(0) = 3, f′(0) = −6.
	if _, pdf, slope := (Beta{1, 3}).CurveFunc()(0); !relClose(pdf, 3, 1e-14) || !relClose(slope, -6, 1e-14) {
		t.Errorf("Beta(1,3) at 0: pdf %v slope %v, want 3 and -6", pdf, slope)
	}
	// Outside the range the density and its slope are 0.
	for _, c := range []struct {
		d      Beta
		u, cdf float64
	}{{Beta{2, 5}, -0.1, 0}, {Beta{1.5, 5}, -0.1, 0}, {Beta{2, 5}, 1.2, 1}} {
		if cdf, pdf, slope := c.d.CurveFunc()(c.u); cdf != c.cdf || pdf != 0 || slope != 0 {
			t.Errorf("%v at %v: %v %v %v, want %v 0 0", c.d, c.u, cdf, pdf, slope, c.cdf)
		}
	}
	// At a subnormal u, where the power term underflows and the density
	// does not: Beta(2, 2) is 6u(1−u), so f ≈ 6u and f′ ≈ 6.
	if _, pdf, slope := (Beta{2, 2}).CurveFunc()(1e-310); !relClose(pdf, 6e-310, 1e-6) || !relClose(slope, 6, 1e-9) {
		t.Errorf("Beta(2,2) at 1e-310: pdf %v slope %v, want 6e-310 and 6", pdf, slope)
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

// TestLogSubnormal checks logSub where Go's math.Log on amd64 is wrong:
// a subnormal float64 is m·2⁻¹⁰⁷⁴ exactly, m its bits as an integer
// (IEEE 754), so ln x = ln m − 1074·ln 2; a normal 1e-300 against
// −300·ln 10.
func TestLogSubnormal(t *testing.T) {
	for _, x := range []float64{1e-310, 1e-320, 5e-324, 0x1p-1023} {
		m := float64(math.Float64bits(x))
		if got, want := logSub(x), math.Log(m)-1074*math.Ln2; !relClose(got, want, 1e-14) {
			t.Errorf("ln %v: %v, want %v", x, got, want)
		}
	}
	if got, want := logSub(1e-300), -300*math.Ln10; !relClose(got, want, 1e-14) {
		t.Errorf("ln 1e-300: %v, want %v", got, want)
	}
}

// TestDensitySlopeFuncIsCurveFuncsDensity checks DensitySlopeFunc, which
// skips the CDF, against CurveFunc's density and slope (checked above
// against the package's PDF and gonum's finite differences), inside the
// range, at the bounds and outside.
func TestDensitySlopeFuncIsCurveFuncsDensity(t *testing.T) {
	shapes := []Beta{{2.022, 40.59}, {2, 2}, {4.2, 17.9}, {55, 3.5}, {2000, 50000}, {1.5, 7}, {1, 3}, {0.5, 4}}
	for _, d := range shapes {
		full, f := d.CurveFunc(), d.DensitySlopeFunc()
		for _, u := range []float64{-0.1, 0, 1e-300, 1e-6, 0.001, 0.05, 0.3, 0.5, 0.7, 0.95, 0.999, 1 - 1e-6, 1, 1.2} {
			_, wantPDF, wantSlope := full(u)
			pdf, slope := f(u)
			if !sameOrClose(pdf, wantPDF) || !sameOrClose(slope, wantSlope) {
				t.Errorf("%v at %v: density %v and slope %v, CurveFunc %v and %v", d, u, pdf, slope, wantPDF, wantSlope)
			}
		}
	}
}

// sameOrClose is relClose at 1e-12 for finite numbers, equality for
// infinities and zeros.
func sameOrClose(a, b float64) bool {
	if a == b {
		return true
	}
	return !math.IsInf(a, 0) && !math.IsInf(b, 0) && relClose(a, b, 1e-12)
}

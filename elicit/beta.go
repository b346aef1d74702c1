package elicit

import (
	"math"

	"gonum.org/v1/gonum/mathext"
)

// Beta is the Beta(α, β) distribution on [0, 1], with density
// f(x) = x^(α−1) (1−x)^(β−1) / B(α, β) (Johnson, Kotz & Balakrishnan 1995,
// "Continuous Univariate Distributions", vol. 2, ch. 25).
// The zero value is invalid; check with Validate or build with NewBeta.
type Beta struct {
	Alpha float64 `json:"alpha"`
	Beta  float64 `json:"beta"`
}

// MinShape and MaxShape bound α and β everywhere in Parley: in a fit's
// search, in an expert's or a pool's Beta, in a prior and a posterior.
// Inside these bounds incBeta's I_x(α, β) agrees with R's pbeta to
// within 1e-9 relative in its smaller tail, and Quantile with qbeta to
// 1e-9 relative, for tail probabilities down to 1e-12 (TestBetaEnvelope;
// the accuracy envelope in DEVELOPERS.md). Beyond 1e7 the continued
// fraction for the upper tail of a Beta with small α loses digits
// (2e-9 at β = 10⁷, 1e-6 at 10¹⁰), and below 1e-6 the shapes carry no
// meaning an expert could state.
const (
	MinShape = 1e-6
	MaxShape = 1e7
)

// NewBeta returns Beta(α, β) after checking that both are finite and
// within [MinShape, MaxShape].
func newBeta(alpha, beta float64) (Beta, error) {
	d := Beta{Alpha: alpha, Beta: beta}
	return d, d.Validate()
}

// Validate reports whether α and β are finite and within [MinShape,
// MaxShape] (RuleShapeRange). gonum panics on invalid parameters, so
// every entry point checks this first.
func (d Beta) Validate() error {
	if err := checkShape("alpha", d.Alpha); err != nil {
		return err
	}
	return checkShape("beta", d.Beta)
}

// checkShape checks one shape parameter.
func checkShape(field string, v float64) error {
	if err := checkPositive(field, v); err != nil {
		return err
	}
	if v < MinShape || v > MaxShape {
		return inputErr(field, RuleShapeRange, "got %v", v)
	}
	return nil
}

func checkPositive(field string, v float64) error {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return inputErr(field, RuleFinite, "got %v", v)
	}
	if v <= 0 {
		return inputErr(field, RulePositive, "got %v", v)
	}
	return nil
}

// PDF is the density at x; 0 outside [0, 1]. The power x^(α−1)(1−x)^(β−1)
// / B(α, β) is formed as incBeta's prefactor, without the cancellation of
// lgamma values that costs gonum's density digits at large α, β.
func (d Beta) PDF(x float64) float64 {
	if x < 0 || x > 1 || d.Validate() != nil {
		return 0
	}
	c := newIncBeta(d.Alpha, d.Beta)
	return c.density(x, 1-x)
}

// CDF is P(X ≤ x), the regularised incomplete beta function I_x(α, β)
// (incBeta).
func (d Beta) CDF(x float64) float64 {
	switch {
	case x <= 0:
		return 0
	case x >= 1:
		return 1
	}
	c := newIncBeta(d.Alpha, d.Beta)
	lo, _ := c.tails(x, 1-x)
	return lo
}

// Survival is P(X > x) = 1 − I_x(α, β), computed directly where it is the
// smaller tail, so it keeps its relative precision far out in the upper
// tail (where 1 − CDF would be 0).
func (d Beta) Survival(x float64) float64 {
	switch {
	case x <= 0:
		return 1
	case x >= 1:
		return 0
	}
	c := newIncBeta(d.Alpha, d.Beta)
	_, up := c.tails(x, 1-x)
	return up
}

// Quantile is the inverse CDF at p in [0, 1] (see quantileFrom): it
// starts from gonum's inverse of the regularised incomplete beta
// function, checks the residual, and solves on in a bracket until the
// residual in the smaller tail is at rounding level.
func (d Beta) Quantile(p float64) float64 {
	switch {
	case math.IsNaN(p) || d.Validate() != nil:
		return math.NaN()
	case p <= 0:
		return 0
	case p >= 1:
		return 1
	}
	c := newIncBeta(d.Alpha, d.Beta)
	x0 := mathext.InvRegIncBeta(d.Alpha, d.Beta, p)
	return c.quantileFrom(p, x0)
}

// Mean is α/(α+β).
func (d Beta) Mean() float64 { return d.Alpha / (d.Alpha + d.Beta) }

// Variance is αβ / ((α+β)²(α+β+1)).
func (d Beta) Variance() float64 {
	s := d.Alpha + d.Beta
	return d.Alpha * d.Beta / (s * s * (s + 1))
}

// SD is the standard deviation.
func (d Beta) SD() float64 { return math.Sqrt(d.Variance()) }

// ESS is the effective sample size α+β: the number of imagined trials the
// prior is worth under the Beta–binomial conjugate update.
func (d Beta) ESS() float64 { return d.Alpha + d.Beta }

// Mode is (α−1)/(α+β−2) when α, β > 1. Otherwise the density has no
// interior maximum and ok is false; x is then the boundary where the
// density is largest (0 or 1), or NaN for Beta(1,1) and U shapes. It is
// computed as (α−1)/((α−1)+(β−1)): both differences are exact for shapes
// in (1, 2] (Sterbenz's lemma), where α+β−2 lost them to the rounding of
// α+β, so shapes within 1e-15 of 1 had a mode off by half.
func (d Beta) Mode() (x float64, ok bool) {
	a, b := d.Alpha, d.Beta
	switch {
	case a > 1 && b > 1:
		return (a - 1) / ((a - 1) + (b - 1)), true
	case a <= 1 && b > 1, a < 1 && b == 1:
		return 0, false
	case b <= 1 && a > 1, b < 1 && a == 1:
		return 1, false
	}
	return math.NaN(), false
}

// ScaledBeta is the four-parameter Beta on [Lower, Upper]: X = Lower +
// (Upper−Lower)·Y with Y ~ Beta(α, β). With Lower 0 and Upper 1 it is Beta.
type ScaledBeta struct {
	Beta
	Lower float64 `json:"lower"`
	Upper float64 `json:"upper"`
}

// Unit returns the Beta on [0, 1] as a ScaledBeta.
func Unit(d Beta) ScaledBeta { return ScaledBeta{Beta: d, Lower: 0, Upper: 1} }

// NewScaledBeta checks the parameters and the bounds.
func newScaledBeta(alpha, beta, lower, upper float64) (ScaledBeta, error) {
	d := ScaledBeta{Beta: Beta{alpha, beta}, Lower: lower, Upper: upper}
	return d, d.Validate()
}

// Validate checks α, β and that Lower < Upper are finite.
func (d ScaledBeta) Validate() error {
	if err := d.Beta.Validate(); err != nil {
		return err
	}
	return CheckBounds(d.Lower, d.Upper)
}

// CheckBounds checks a quantity's bounds: finite, within ±1e300, lower
// below upper, and upper − lower at least 1e-12 of their size.
func CheckBounds(lower, upper float64) error {
	if math.IsNaN(lower) || math.IsInf(lower, 0) {
		return inputErr("lower", RuleFinite, "got %v", lower)
	}
	if math.IsNaN(upper) || math.IsInf(upper, 0) {
		return inputErr("upper", RuleFinite, "got %v", upper)
	}
	if math.Abs(lower) > maxBound {
		return inputErr("lower", RuleBoundsRange, "got %v", lower)
	}
	if math.Abs(upper) > maxBound {
		return inputErr("upper", RuleBoundsRange, "got %v", upper)
	}
	if !(lower < upper) {
		return inputErr("lower", RuleBoundsOrder, "lower %v, upper %v", lower, upper)
	}
	if upper-lower < minBoundsWidth*math.Max(math.Abs(lower), math.Abs(upper)) || upper-lower < 1e-300 {
		return inputErr("upper", RuleBoundsWidth, "lower %v, upper %v", lower, upper)
	}
	return nil
}

// CheckMagnitude refuses a number beyond ±1e300 (RuleBoundsRange), the
// largest size at which Parley's differences of values and bounds stay
// finite.
func CheckMagnitude(field string, v float64) error {
	if math.Abs(v) > maxBound {
		return inputErr(field, RuleBoundsRange, "got %v", v)
	}
	return nil
}

// Limits of the bounds: their size keeps upper − lower and every value's
// distance to them finite, and their width keeps stated values apart.
const (
	maxBound       = 1e300
	minBoundsWidth = 1e-12
)

// OnUnit reports whether the bounds are [0, 1]: the Beta is of a
// proportion itself, where α + β reads as imagined binomial trials.
func (d ScaledBeta) OnUnit() bool { return d.Lower == 0 && d.Upper == 1 }

func (d ScaledBeta) width() float64           { return d.Upper - d.Lower }
func (d ScaledBeta) toUnit(x float64) float64 { return (x - d.Lower) / d.width() }

// PDF is the density at x on the quantity's scale.
func (d ScaledBeta) PDF(x float64) float64 { return d.Beta.PDF(d.toUnit(x)) / d.width() }

// Density returns the PDF as a function for evaluating at many points:
// what the density shares across points (log B(α, β) and the Stirling
// terms of incBeta) is computed once. At and beyond the bounds it is PDF.
func (d ScaledBeta) Density() func(float64) float64 {
	w := d.width()
	if d.Beta.Validate() != nil {
		return func(float64) float64 { return 0 }
	}
	c := newIncBeta(d.Alpha, d.Beta.Beta)
	return func(x float64) float64 {
		u := d.toUnit(x)
		if !(u > 0 && u < 1) {
			return d.PDF(x)
		}
		return c.density(u, 1-u) / w
	}
}

// CDF is P(X ≤ x).
func (d ScaledBeta) CDF(x float64) float64 { return d.Beta.CDF(d.toUnit(x)) }

// CDFFunc returns the CDF as a function for evaluating at many points,
// with what I_x(α, β) shares across points (log B(α, β) and the Stirling
// terms of incBeta) computed once, as Density does for the density.
func (d ScaledBeta) CDFFunc() func(float64) float64 {
	if d.Beta.Validate() != nil {
		return d.CDF
	}
	c := newIncBeta(d.Alpha, d.Beta.Beta)
	return func(x float64) float64 {
		u := d.toUnit(x)
		if !(u > 0 && u < 1) {
			return d.CDF(x)
		}
		lo, _ := c.tails(u, 1-u)
		return lo
	}
}

// CurveFunc returns, for drawing a Beta by cubic pieces, a function that
// gives at u its CDF, its density f and the density's slope
// f′(u) = f(u)·((α−1)/u − (β−1)/(1−u)) (the derivative of log f). One
// power term u^α(1−u)^β/B(α, β) serves both the incomplete beta function
// and the density, so a point costs little more than the CDF alone.
//
// At u = 0 and u = 1 it gives the limits: the density and its slope are 0
// where the shape at that bound exceeds 2; at a shape of exactly 2 the
// slope is ±1/B(α, β); where the shape is between 1 and 2 the slope is
// infinite, and below 1 the density is. Outside [0, 1] the density and its
// slope are 0.
func (d Beta) CurveFunc() func(u float64) (cdf, pdf, slope float64) {
	return d.curveFunc(true)
}

// DensitySlopeFunc is CurveFunc without the CDF: the density and its
// slope alone, the same numbers at a fraction of the cost (no continued
// fraction), for a drawing that has the CDF at its knots by other means.
func (d Beta) DensitySlopeFunc() func(u float64) (pdf, slope float64) {
	f := d.curveFunc(false)
	return func(u float64) (float64, float64) {
		_, pdf, slope := f(u)
		return pdf, slope
	}
}

// curveFunc is CurveFunc, whose CDF is computed only if withCDF (else it
// is NaN inside (0, 1)).
func (d Beta) curveFunc(withCDF bool) func(u float64) (cdf, pdf, slope float64) {
	if d.Validate() != nil {
		nan := math.NaN()
		return func(float64) (float64, float64, float64) { return nan, nan, nan }
	}
	c := newIncBeta(d.Alpha, d.Beta)
	a1, b1 := d.Alpha-1, d.Beta-1
	edge := func(e1, sign float64) (pdf, slope float64) {
		// The density near the bound is about t^e1/B, t the distance to it.
		switch {
		case e1 < 0:
			return math.Inf(1), -sign * math.Inf(1)
		case e1 == 0:
			// Flat at the bound: f = 1/B there; its slope is that of
			// (1−t)^(other−1)/B, finite.
			return math.Exp(-c.lnB), 0
		case e1 < 1:
			return 0, sign * math.Inf(1)
		case e1 == 1:
			return 0, sign * math.Exp(-c.lnB)
		}
		return 0, 0
	}
	return func(u float64) (float64, float64, float64) {
		switch {
		case math.IsNaN(u):
			return u, u, u
		case u < 0:
			return 0, 0, 0
		case u > 1:
			return 1, 0, 0
		case u == 0:
			f, s := edge(a1, 1)
			if a1 == 0 {
				s = -b1 * f
			}
			return 0, f, s
		case u == 1:
			f, s := edge(b1, -1)
			if b1 == 0 {
				s = a1 * f
			}
			return 1, f, s
		}
		v := 1 - u
		lo, f := math.NaN(), 0.0
		var k float64
		switch {
		case withCDF:
			lo, _, k = c.tailsK(u, v)
		case c.form != formStirling:
			// The density alone, in logs: lnPower's sum with the
			// exponents lowered by one, two logarithms where density
			// takes four (where the shapes are large, lnPower's
			// Stirling form keeps the digits, below).
			f = math.Exp(a1*logX(u, v) + b1*logX(v, u) + c.c0)
		}
		switch {
		case k > 0 && !math.IsInf(k, 0):
			f = k / u / v
		case withCDF || c.form == formStirling:
			// Where the CDF's power term under- or overflows while the
			// density need not (u or 1 − u subnormal), or with large
			// shapes: the density in logs.
			f = c.density(u, v)
		}
		slope := 0.0
		if f != 0 {
			slope = f*a1/u - f*b1/v
		}
		return lo, f, slope
	}
}

// QuantileFrom is Quantile solved from a starting estimate on the
// quantity's scale (a nearby quantile already known, for one) instead of
// gonum's inverse. The solve is Quantile's own bracketed one, so a poor
// or non-finite guess costs iterations, never accuracy.
func (d ScaledBeta) QuantileFrom(p, guess float64) float64 {
	switch {
	case math.IsNaN(p) || d.Validate() != nil:
		return math.NaN()
	case p <= 0:
		return d.Lower
	case p >= 1:
		return d.Upper
	}
	c := newIncBeta(d.Alpha, d.Beta.Beta)
	return d.Lower + d.width()*c.quantileFrom(p, d.toUnit(guess))
}

// Survival is P(X > x), with full relative precision in the upper tail.
func (d ScaledBeta) Survival(x float64) float64 { return d.Beta.Survival(d.toUnit(x)) }

// Quantile is the inverse CDF on the quantity's scale.
func (d ScaledBeta) Quantile(p float64) float64 {
	return d.Lower + d.width()*d.Beta.Quantile(p)
}

// Mean is Lower + (Upper−Lower)·α/(α+β).
func (d ScaledBeta) Mean() float64 { return d.Lower + d.width()*d.Beta.Mean() }

// Variance is (Upper−Lower)² times the unit Beta's variance. On bounds
// wider than about 1.3e154 it is beyond float64's range (+Inf), though
// the SD is not: ask for the SD.
func (d ScaledBeta) Variance() float64 { return d.width() * d.width() * d.Beta.Variance() }

// SD is the standard deviation on the quantity's scale, (Upper−Lower)
// times the unit Beta's: finite on every width the bounds allow.
func (d ScaledBeta) SD() float64 { return d.width() * d.Beta.SD() }

// Mode maps the unit Beta's mode to the quantity's scale.
func (d ScaledBeta) Mode() (float64, bool) {
	m, ok := d.Beta.Mode()
	return d.Lower + d.width()*m, ok
}

// MaxDensity is the largest value of the density when it is bounded, both
// shapes at least 1 (ok false otherwise, where it rises without limit at
// a bound): at the mode, or where a shape of exactly 1 puts it, at a
// bound: Beta(1, β) has f(0) = β and Beta(α, 1) has f(1) = α on the unit
// scale (Johnson, Kotz & Balakrishnan 1995, "Continuous Univariate
// Distributions", vol. 2, ch. 25), divided by the width here.
func (d ScaledBeta) MaxDensity() (float64, bool) {
	a, b, w := d.Alpha, d.Beta.Beta, d.width()
	switch {
	case !(a >= 1 && b >= 1):
		return 0, false
	case a > 1 && b > 1:
		m, _ := d.Mode()
		return d.PDF(m), true
	case a == 1 && b == 1:
		return 1 / w, true
	case a == 1:
		return b / w, true
	}
	return a / w, true
}

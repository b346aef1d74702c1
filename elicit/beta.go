package elicit

import (
	"math"

	"gonum.org/v1/gonum/mathext"
	"gonum.org/v1/gonum/stat/distuv"
)

// Beta is the Beta(α, β) distribution on [0, 1], with density
// f(x) = x^(α−1) (1−x)^(β−1) / B(α, β) (Johnson, Kotz & Balakrishnan 1995,
// "Continuous Univariate Distributions", vol. 2, ch. 25).
// The zero value is invalid; check with Validate or build with NewBeta.
type Beta struct {
	Alpha float64 `json:"alpha"`
	Beta  float64 `json:"beta"`
}

// NewBeta returns Beta(α, β) after checking that both are finite and > 0.
func NewBeta(alpha, beta float64) (Beta, error) {
	d := Beta{Alpha: alpha, Beta: beta}
	return d, d.Validate()
}

// Validate reports whether α and β are finite and positive. gonum panics
// on invalid parameters, so every entry point checks this first.
func (d Beta) Validate() error {
	if err := checkPositive("alpha", d.Alpha); err != nil {
		return err
	}
	return checkPositive("beta", d.Beta)
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

func (d Beta) dist() distuv.Beta { return distuv.Beta{Alpha: d.Alpha, Beta: d.Beta} }

// PDF is the density at x; 0 outside [0, 1].
func (d Beta) PDF(x float64) float64 {
	if x < 0 || x > 1 {
		return 0
	}
	return d.dist().Prob(x)
}

// CDF is P(X ≤ x), the regularised incomplete beta function I_x(α, β).
func (d Beta) CDF(x float64) float64 {
	switch {
	case x <= 0:
		return 0
	case x >= 1:
		return 1
	}
	return d.dist().CDF(x)
}

// Quantile is the inverse CDF at p in [0, 1]: gonum's inverse of the
// regularised incomplete beta function, polished by polishQuantile.
func (d Beta) Quantile(p float64) float64 {
	switch {
	case p <= 0:
		return 0
	case p >= 1:
		return 1
	}
	x, _ := d.polishQuantile(p, d.dist().Quantile(p), 3)
	return x
}

// polishQuantile refines an approximate quantile x by up to steps
// Halley steps on r(x) = F(x) − p, x ← x − t/(1 − t·c/2) with the Newton
// step t = r/f and c = f′/f = (α−1)/x − (β−1)/(1−x) (Press et al. 2007,
// "Numerical Recipes", 3rd ed., §9.4 and §6.14.2, where the inverse
// incomplete beta function is refined the same way), keeping a step only
// while it shrinks the residual. F is gonum's CDF; for p > 0.5 the
// residual is taken on the upper tail, (1−p) − S(x), where it keeps its
// relative precision. Why: against R's qbeta
// (testdata/r/beta_reference.csv) gonum's inverse alone is off by about
// 1e-9 relative in the far upper tail of extreme shapes, e.g.
// Beta(0.2, 1000) at p = 0.999999. It returns the refined x and its
// residual F(x) − p.
func (d Beta) polishQuantile(p, x float64, steps int) (float64, float64) {
	resid := d.quantileResid(p)
	return d.polishQuantileFrom(p, x, resid(x), steps, resid)
}

// quantileResid returns x ↦ F(x) − p, on the upper tail for p > 0.5.
func (d Beta) quantileResid(p float64) func(float64) float64 {
	g := d.dist()
	return func(x float64) float64 {
		if p <= 0.5 {
			return g.CDF(x) - p
		}
		return (1 - p) - g.Survival(x)
	}
}

// polishQuantileFrom is polishQuantile from x whose residual r is known.
func (d Beta) polishQuantileFrom(p, x, r float64, steps int, resid func(float64) float64) (float64, float64) {
	a, b := d.Alpha, d.Beta
	lnB := mathext.Lbeta(a, b)
	for i := 0; i < steps && r != 0; i++ {
		f := math.Exp((a-1)*math.Log(x) + (b-1)*math.Log1p(-x) - lnB)
		if !(f > 0) || math.IsInf(f, 0) {
			break
		}
		t := r / f
		y := x - t
		// The Halley correction, unless it would more than double the step
		// or turn it round.
		if den := 1 - 0.5*t*((a-1)/x-(b-1)/(1-x)); den > 0.5 {
			if h := x - t/den; h > 0 && h < 1 {
				y = h
			}
		}
		if !(y > 0 && y < 1) {
			break
		}
		ry := resid(y)
		if !(math.Abs(ry) < math.Abs(r)) {
			break
		}
		x, r = y, ry
	}
	return x, r
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
// density is largest (0 or 1), or NaN for Beta(1,1) and U shapes.
func (d Beta) Mode() (x float64, ok bool) {
	a, b := d.Alpha, d.Beta
	switch {
	case a > 1 && b > 1:
		return (a - 1) / (a + b - 2), true
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
func NewScaledBeta(alpha, beta, lower, upper float64) (ScaledBeta, error) {
	d := ScaledBeta{Beta: Beta{alpha, beta}, Lower: lower, Upper: upper}
	return d, d.Validate()
}

// Validate checks α, β and that Lower < Upper are finite.
func (d ScaledBeta) Validate() error {
	if err := d.Beta.Validate(); err != nil {
		return err
	}
	return checkBounds(d.Lower, d.Upper)
}

func checkBounds(lower, upper float64) error {
	if math.IsNaN(lower) || math.IsInf(lower, 0) {
		return inputErr("lower", RuleFinite, "got %v", lower)
	}
	if math.IsNaN(upper) || math.IsInf(upper, 0) {
		return inputErr("upper", RuleFinite, "got %v", upper)
	}
	if !(lower < upper) {
		return inputErr("lower", RuleBoundsOrder, "lower %v, upper %v", lower, upper)
	}
	if math.IsInf(upper-lower, 0) {
		return inputErr("upper", RuleFinite, "upper − lower overflows: lower %v, upper %v", lower, upper)
	}
	return nil
}

func (d ScaledBeta) width() float64           { return d.Upper - d.Lower }
func (d ScaledBeta) toUnit(x float64) float64 { return (x - d.Lower) / d.width() }

// PDF is the density at x on the quantity's scale.
func (d ScaledBeta) PDF(x float64) float64 { return d.Beta.PDF(d.toUnit(x)) / d.width() }

// Density returns the PDF as a function for evaluating at many points:
// the log of the beta function, log B(α, β), is computed once (gonum's
// Lbeta) instead of at every point, and inside (Lower, Upper) the density
// is exp((α−1)·log u + (β−1)·log(1−u) − log B(α, β)) / (Upper − Lower) at
// u = (x − Lower)/(Upper − Lower). At and beyond the bounds it is PDF.
func (d ScaledBeta) Density() func(float64) float64 {
	a, b, w := d.Alpha, d.Beta.Beta, d.width()
	lnB := mathext.Lbeta(a, b)
	return func(x float64) float64 {
		u := d.toUnit(x)
		if !(u > 0 && u < 1) {
			return d.PDF(x)
		}
		return math.Exp((a-1)*math.Log(u)+(b-1)*math.Log1p(-u)-lnB) / w
	}
}

// CDF is P(X ≤ x).
func (d ScaledBeta) CDF(x float64) float64 { return d.Beta.CDF(d.toUnit(x)) }

// Quantile is the inverse CDF on the quantity's scale.
func (d ScaledBeta) Quantile(p float64) float64 {
	return d.Lower + d.width()*d.Beta.Quantile(p)
}

// Mean is Lower + (Upper−Lower)·α/(α+β).
func (d ScaledBeta) Mean() float64 { return d.Lower + d.width()*d.Beta.Mean() }

// Variance is (Upper−Lower)² times the unit Beta's variance.
func (d ScaledBeta) Variance() float64 { return d.width() * d.width() * d.Beta.Variance() }

// SD is the standard deviation on the quantity's scale.
func (d ScaledBeta) SD() float64 { return math.Sqrt(d.Variance()) }

// Mode maps the unit Beta's mode to the quantity's scale.
func (d ScaledBeta) Mode() (float64, bool) {
	m, ok := d.Beta.Mode()
	return d.Lower + d.width()*m, ok
}

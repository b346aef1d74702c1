package chart

import (
	"math"
	"sort"

	"github.com/parley-elicit/parley/elicit"
)

// Curve is one distribution to draw. Dist is used unless PDF and CDF are
// given, as they are for a pooled mixture; Quantile, when given, is used
// for the table's percentiles (otherwise CDF is inverted by bisection).
type Curve struct {
	Label    string
	Role     Role
	Dist     elicit.ScaledBeta
	PDF      func(float64) float64
	CDF      func(float64) float64
	Quantile func(float64) float64
}

// Point is a value an expert stated and the cumulative probability they
// gave it: P(X ≤ X) = P.
type Point struct {
	X, P float64
}

func (c Curve) usesFuncs() bool { return c.PDF != nil && c.CDF != nil }

// valid reports whether the curve can be evaluated without panicking.
func (c Curve) valid() bool { return c.usesFuncs() || c.Dist.Validate() == nil }

func (c Curve) pdf(x float64) float64 {
	if c.usesFuncs() {
		return c.PDF(x)
	}
	return c.Dist.PDF(x)
}

func (c Curve) cdf(x float64) float64 {
	if c.usesFuncs() {
		return c.CDF(x)
	}
	return c.Dist.CDF(x)
}

// quantile inverts the curve's CDF on [lower, upper].
func (c Curve) quantile(p, lower, upper float64) float64 {
	if c.Quantile != nil {
		return c.Quantile(p)
	}
	if !c.usesFuncs() {
		return c.Dist.Quantile(p)
	}
	lo, hi := lower, upper
	for range 80 {
		mid := lo + (hi-lo)/2
		if c.CDF(mid) < p {
			lo = mid
		} else {
			hi = mid
		}
	}
	return lo + (hi-lo)/2
}

// Tail probabilities that bound the plotted window: the axis spans where
// all but 0.2% of the probability lies, widened a little.
const (
	tailLow  = 0.001
	tailHigh = 0.999
	widen    = 0.06 // of the window's span, on each side
	snap     = 0.12 // a gap to a bound smaller than this share of the span is closed
)

// window chooses the x range to draw: from the lowest 0.1% point to the
// highest 99.9% point over all curves, stretched to cover extra points,
// widened by a margin and snapped to a bound that is nearly reached.
func window(lower, upper float64, curves []Curve, extra []float64) (x0, x1 float64) {
	x0, x1 = math.Inf(1), math.Inf(-1)
	for _, c := range curves {
		if !c.valid() {
			continue
		}
		lo, hi := c.quantile(tailLow, lower, upper), c.quantile(tailHigh, lower, upper)
		if isFinite(lo) {
			x0 = math.Min(x0, lo)
		}
		if isFinite(hi) {
			x1 = math.Max(x1, hi)
		}
	}
	for _, x := range extra {
		if isFinite(x) {
			x0, x1 = math.Min(x0, x), math.Max(x1, x)
		}
	}
	if !(x1 > x0) {
		return lower, upper
	}
	span := x1 - x0
	x0, x1 = x0-widen*span, x1+widen*span
	if x0-lower < snap*span {
		x0 = lower
	}
	if upper-x1 < snap*span {
		x1 = upper
	}
	return math.Max(x0, lower), math.Min(x1, upper)
}

// densityCap returns the top of the density axis for sampled densities:
// their largest finite value, unless that is a spike towards a bound (over
// three times the upper quartile of the samples), in which case the axis
// stops at three times the upper quartile so the rest of the curve stays
// readable. capped reports whether the cut applies.
func densityCap(samples []float64) (top float64, capped bool) {
	var fin []float64
	for _, v := range samples {
		if isFinite(v) && v >= 0 {
			fin = append(fin, v)
		}
	}
	if len(fin) == 0 {
		return 1, false
	}
	sort.Float64s(fin)
	hi := fin[len(fin)-1]
	q3 := fin[(len(fin)*3)/4]
	for _, v := range samples {
		if math.IsInf(v, 1) {
			capped = true
		}
	}
	if q3 > 0 && hi > 3*q3 {
		return 3 * q3, true
	}
	if !(hi > 0) {
		return 1, capped
	}
	return hi, capped
}

func isFinite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

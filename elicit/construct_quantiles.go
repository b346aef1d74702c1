package elicit

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mathext"
	"gonum.org/v1/gonum/stat/distuv"
)

// ErrMatchFailed is returned (wrapped) when the exact quantile match finds
// no Beta within its limits whose tails agree with the interval's to
// matchTol. It is never replaced by a guess.
var ErrMatchFailed = errors.New("elicit: the exact quantile match did not converge")

// FromIntervalQuantiles is the Beta whose central interval with the given
// coverage c is exactly [low, high] on [0, 1]: its quantiles at (1 − c)/2
// and (1 + c)/2 are low and high,
//
//	I_low(α, β) = (1 − c)/2,  1 − I_high(α, β) = (1 − c)/2,
//
// with I_x(α, β) the regularised incomplete beta function (the Beta's
// CDF). Such a Beta always exists and is unique (van Dorp & Mazzuchi 2000,
// "Solving for the parameters of a beta distribution under two quantile
// constraints", J. Statist. Comput. Simul. 67(2)). Existence is easy to
// see: along the Betas whose (1 − c)/2 quantile is low, the upper tail
// beyond high runs from nearly (1 + c)/2 as α + β → 0 (mass at 0 and 1)
// to 0 as α + β → ∞ (mass at low), passing (1 − c)/2 on the way.
//
// The search follows that path. With κ = α + β and μ = α/κ, for each κ an
// inner search finds the μ that puts the (1 − c)/2 quantile at low (the
// CDF at low falls as μ rises); an outer search finds the κ whose upper
// tail beyond high is (1 − c)/2 (it falls as κ rises). Each is bracketed
// by stepping out from a start, in log κ and logit μ, then solved by
// Brent's method (brentRoot). The outer start is the logit-normal
// approximation, logit X ≈ m + s·z, whose mean and variance give
// κ ≈ 1/(s² μ(1 − μ)) (Johnson, Kotz & Balakrishnan 1995, ch. 25).
//
// Rules: low, high and coverage as FromIntervalMoments; a matching Beta
// with α or β above MaxPriorShape is RuleShapeTooLarge, below
// MinPriorShape RuleShapeTooSmall, both on the field "interval". Very
// narrow intervals (Beta(1e6, 1e6)'s 95% interval, width 0.0014) and very
// wide ones ([0.001, 0.999] at 50%, a U-shaped Beta) are matched.
func FromIntervalQuantiles(low, high, coverage float64) (Beta, error) {
	if err := checkInterval(low, high, coverage); err != nil {
		return Beta{}, err
	}
	t := (1 - coverage) / 2
	m := quantileMatch{low: low, high: high, coverage: coverage, tail: t}
	z := distuv.UnitNormal.Quantile(1 - t)
	l1, l2 := logit(low), logit(high)
	s := (l2 - l1) / (2 * z)
	mu := 1 / (1 + math.Exp(-(l1+l2)/2))
	k0 := 1 / (s * s * mu * (1 - mu))
	m.lambda = (l1 + l2) / 2
	d, err := m.solve(math.Log(math.Min(math.Max(k0, 4*MinPriorShape), MaxPriorShape)))
	if err != nil {
		return Beta{}, err
	}
	return d, nil
}

// matchTol is the relative accuracy to which the exact quantile match
// checks its two tails: 1e-9, or for large α + β = κ the accuracy of
// gonum's incomplete beta function there, whose values at neighbouring
// shapes scatter by about 40·κ·ε relative (measured: 7e-9 at κ = 1e6,
// 1e-5 at κ = 1e9), with a margin of 5.
func matchTol(kappa float64) float64 { return 1e-9 + 200*kappa*floatEps }

// quantileMatch is the search of FromIntervalQuantiles; lambda carries
// the last inner solution over as the next inner start.
type quantileMatch struct {
	low, high, coverage, tail float64
	lambda                    float64
}

// Limits of the searches: log κ between log(2·MinPriorShape) and
// log(2·MaxPriorShape), beyond which α or β must break its limit, and
// logit μ within ±700, where μ or 1 − μ is still above 1e-304.
var (
	logKappaMin = math.Log(2 * MinPriorShape)
	logKappaMax = math.Log(2 * MaxPriorShape)
)

const lambdaLimit = 700

func logit(u float64) float64 { return math.Log(u) - math.Log1p(-u) }

// shapes returns α = κ·μ and β = κ·(1 − μ) for log κ and logit μ,
// computing 1 − μ as μ at −λ so that it keeps its precision.
func shapes(logKappa, lambda float64) (a, b float64) {
	k := math.Exp(logKappa)
	return k / (1 + math.Exp(-lambda)), k / (1 + math.Exp(lambda))
}

// solve runs the outer search from log κ = s0.
func (m *quantileMatch) solve(s0 float64) (Beta, error) {
	// g(log κ) = upper tail beyond high − tail, falling in κ.
	g := func(s float64) float64 {
		a, b := shapes(s, m.innerLambda(s))
		return mathext.RegIncBeta(b, a, 1-m.high) - m.tail
	}
	lo, hi, glo, ghi, found := bracketFalling(g, s0, 2, logKappaMin, logKappaMax)
	if !found {
		if glo > 0 || (math.IsNaN(glo) && ghi > 0) {
			return Beta{}, m.refusal(RuleShapeTooLarge, logKappaMax)
		}
		return Beta{}, m.refusal(RuleShapeTooSmall, logKappaMin)
	}
	s, ok := brentRoot(g, lo, hi, glo, ghi, 1e-13)
	if !ok {
		return Beta{}, fmt.Errorf("%w: no root between alpha+beta %.3g and %.3g", ErrMatchFailed, math.Exp(lo), math.Exp(hi))
	}
	a, b := shapes(s, m.innerLambda(s))
	switch {
	case a > MaxPriorShape || b > MaxPriorShape:
		return Beta{}, m.refusal(RuleShapeTooLarge, s)
	case a < MinPriorShape || b < MinPriorShape:
		return Beta{}, m.refusal(RuleShapeTooSmall, s)
	}
	// Check the answer: both tails within matchTol of (1 − c)/2.
	below, above := mathext.RegIncBeta(a, b, m.low), mathext.RegIncBeta(b, a, 1-m.high)
	if tol := matchTol(a + b); !(math.Abs(below/m.tail-1) <= tol && math.Abs(above/m.tail-1) <= tol) {
		return Beta{}, fmt.Errorf("%w: Beta(%.6g, %.6g) leaves %.6g below and %.6g above, want %.6g", ErrMatchFailed, a, b, below, above, m.tail)
	}
	return Beta{Alpha: a, Beta: b}, nil
}

// refusal is the error for a matching Beta outside the limits, reporting
// the shapes where the search stopped.
func (m *quantileMatch) refusal(rule Rule, s float64) error {
	a, b := shapes(s, m.innerLambda(s))
	why := "the interval is too narrow, or too close to a bound"
	if rule == RuleShapeTooSmall {
		why = "the interval is too wide for its coverage"
	}
	return inputErr("interval", rule, "%s: [%v, %v] at %s%% coverage; the search reached Beta(%.3g, %.3g)", why, m.low, m.high, percentOf(m.coverage), a, b)
}

// innerLambda returns the logit μ at which the Beta with α + β = e^s has
// its tail-quantile at low: the root of tail − I_low(κμ, κ(1 − μ)), which
// rises with μ. If the root lies beyond ±lambdaLimit it returns the limit.
func (m *quantileMatch) innerLambda(s float64) float64 {
	h := func(lambda float64) float64 {
		a, b := shapes(s, lambda)
		if !(a > 0 && b > 0) {
			return math.NaN()
		}
		return m.tail - mathext.RegIncBeta(a, b, m.low)
	}
	// h rises with logit μ; bracketFalling wants a falling function, so
	// search −h.
	neg := func(lambda float64) float64 { return -h(lambda) }
	lo, hi, flo, fhi, found := bracketFalling(neg, m.lambda, 1, -lambdaLimit, lambdaLimit)
	if !found {
		if flo > 0 {
			return lambdaLimit
		}
		return -lambdaLimit
	}
	lambda, ok := brentRoot(neg, lo, hi, flo, fhi, 1e-13)
	if !ok {
		return m.lambda
	}
	m.lambda = lambda
	return lambda
}

// bracketFalling looks for a bracket of a root of a falling function f by
// stepping out from x0 in steps that double, within [min, max]. It
// returns the bracket [lo, hi] with f(lo) ≥ 0 ≥ f(hi) and found true; or,
// when f keeps its sign up to a limit, found false with flo = fhi = the
// value at that limit (positive: the root lies beyond max; negative:
// below min).
func bracketFalling(f func(float64) float64, x0, step, min, max float64) (lo, hi, flo, fhi float64, found bool) {
	x0 = math.Min(math.Max(x0, min), max)
	f0 := f(x0)
	switch {
	case f0 == 0:
		return x0, x0, 0, 0, true
	case f0 > 0:
		lo, flo = x0, f0
		for x := x0; x < max; {
			x = math.Min(x+step, max)
			step *= 2
			fx := f(x)
			if !(fx > 0) {
				return lo, x, flo, fx, !math.IsNaN(fx)
			}
			lo, flo = x, fx
		}
		return lo, lo, flo, flo, false
	case f0 < 0:
		hi, fhi = x0, f0
		for x := x0; x > min; {
			x = math.Max(x-step, min)
			step *= 2
			fx := f(x)
			if !(fx < 0) {
				return x, hi, fx, fhi, !math.IsNaN(fx)
			}
			hi, fhi = x, fx
		}
		return hi, hi, fhi, fhi, false
	}
	return x0, x0, f0, f0, false
}

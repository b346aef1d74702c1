package elicit

import (
	"fmt"
	"math"
)

// RuleSameBounds is broken when the experts' distributions to be pooled
// are not all on the same bounds [lower, upper].
const RuleSameBounds Rule = "all distributions must share the same bounds"

// RuleWeightsSumToOne is broken by a Pool whose weights do not sum to 1
// (within 1e-9); LinearPool always normalises them.
const RuleWeightsSumToOne Rule = "pool weights must sum to 1"

// Component is one expert's distribution in a pool with its normalised
// weight.
type Component struct {
	Dist   ScaledBeta `json:"dist"`
	Weight float64    `json:"weight"`
}

// Pool is the linear opinion pool of Beta distributions (Stone 1961, "The
// opinion pool", Ann. Math. Statist. 32: 1339–1342): the mixture
//
//	f(x) = Σᵢ wᵢ fᵢ(x),  F(x) = Σᵢ wᵢ Fᵢ(x),  Σᵢ wᵢ = 1,
//
// of the components on one shared [Lower, Upper]. Build it with
// LinearPool; the zero value has no components and is invalid.
type Pool struct {
	Components []Component `json:"components"`
	Lower      float64     `json:"lower"`
	Upper      float64     `json:"upper"`

	ib []incBeta // each component's incomplete beta function
}

// LinearPool returns the linear opinion pool of dists with the given
// weights. Weights must be finite and non-negative, not all zero, and one
// per distribution; they are normalised to sum to 1. A nil weights slice
// means equal weights. Components of weight zero are left out of the pool.
// Every distribution is validated and all must share the same bounds.
func LinearPool(dists []ScaledBeta, weights []float64) (Pool, error) {
	w, err := poolWeights(dists, weights)
	if err != nil {
		return Pool{}, err
	}
	p := Pool{Lower: dists[0].Lower, Upper: dists[0].Upper}
	for i, d := range dists {
		if w[i] == 0 {
			continue
		}
		p.Components = append(p.Components, Component{Dist: d, Weight: w[i]})
		p.ib = append(p.ib, newIncBeta(d.Alpha, d.Beta.Beta))
	}
	return p, nil
}

// poolWeights validates the inputs shared by LinearPool and LogPool and
// returns the normalised weights.
func poolWeights(dists []ScaledBeta, weights []float64) ([]float64, error) {
	if len(dists) == 0 {
		return nil, inputErr("experts", RuleCount, "need at least 1 distribution, got 0")
	}
	for i, d := range dists {
		if err := d.Validate(); err != nil {
			return nil, prefixField(fmt.Sprintf("experts[%d]", i), err)
		}
		if d.Lower != dists[0].Lower || d.Upper != dists[0].Upper {
			return nil, inputErr(fmt.Sprintf("experts[%d].lower", i), RuleSameBounds,
				"[%v, %v] differs from [%v, %v]", d.Lower, d.Upper, dists[0].Lower, dists[0].Upper)
		}
	}
	if weights == nil {
		w := make([]float64, len(dists))
		for i := range w {
			w[i] = 1 / float64(len(dists))
		}
		return w, nil
	}
	if len(weights) != len(dists) {
		return nil, inputErr("weights", RuleLengthMatch, "%d distributions, %d weights", len(dists), len(weights))
	}
	var maxW float64
	for i, x := range weights {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return nil, inputErr(fmt.Sprintf("weights[%d]", i), RuleFinite, "got %v", x)
		}
		if x < 0 {
			return nil, inputErr(fmt.Sprintf("weights[%d]", i), RuleNonNegative, "got %v", x)
		}
		maxW = math.Max(maxW, x)
	}
	if maxW == 0 {
		return nil, inputErr("weights", RuleWeightsNotAllZero, "")
	}
	return Shares(weights), nil
}

// Shares turns unnormalised pool weights into each one's share of the
// pool, w_i / Σ_j w_j, summing to 1. It divides by the largest weight
// before summing, so weights near the largest float64 (four of 1e308)
// give their true shares instead of an overflowed sum and shares of 0.
// Every share shown or recorded (the facilitator's panel, the decision
// log, the export) and the pool's own normalisation come from here.
// It returns nil when a weight is negative, NaN or infinite, or no weight
// is above zero: such weights have no shares.
func Shares(raw []float64) []float64 {
	var largest float64
	for _, x := range raw {
		if math.IsNaN(x) || math.IsInf(x, 0) || x < 0 {
			return nil
		}
		largest = math.Max(largest, x)
	}
	if largest == 0 {
		return nil
	}
	out := make([]float64, len(raw))
	var sum float64
	for i, x := range raw {
		out[i] = x / largest
		sum += out[i]
	}
	for i := range out {
		out[i] /= sum
	}
	return out
}

// prefixField puts prefix in front of the field of an *InputError.
func prefixField(prefix string, err error) error {
	if ie, ok := err.(*InputError); ok {
		c := *ie
		c.Field = prefix + "." + c.Field
		return &c
	}
	return err
}

// Validate checks a Pool that was not built by LinearPool (a literal, or
// decoded JSON): at least one component, each a valid Beta on the pool's
// bounds, weights finite and non-negative and summing to 1 within 1e-9.
// Quantiles and BestBeta return its error; CDF, PDF and Quantile return
// NaN for an invalid Pool rather than let gonum panic.
func (p Pool) Validate() error {
	if len(p.Components) == 0 {
		return inputErr("experts", RuleCount, "the pool has no components")
	}
	var sum float64
	for i, c := range p.Components {
		// The field's name is made only for an error: Validate runs on
		// every density and CDF call of a pool of hundreds.
		f := func() string { return fmt.Sprintf("experts[%d]", i) }
		if err := c.Dist.Validate(); err != nil {
			return prefixField(f(), err)
		}
		if c.Dist.Lower != p.Lower || c.Dist.Upper != p.Upper {
			return inputErr(f()+".lower", RuleSameBounds, "[%v, %v] differs from [%v, %v]", c.Dist.Lower, c.Dist.Upper, p.Lower, p.Upper)
		}
		if math.IsNaN(c.Weight) || math.IsInf(c.Weight, 0) {
			return inputErr(fmt.Sprintf("weights[%d]", i), RuleFinite, "got %v", c.Weight)
		}
		if c.Weight < 0 {
			return inputErr(fmt.Sprintf("weights[%d]", i), RuleNonNegative, "got %v", c.Weight)
		}
		sum += c.Weight
	}
	if math.Abs(sum-1) > 1e-9 {
		return inputErr("weights", RuleWeightsSumToOne, "sum %v", sum)
	}
	return nil
}

func (p Pool) width() float64 { return p.Upper - p.Lower }

// withIncBeta returns p with its components' incomplete beta functions
// filled in, for a Pool that was not built by LinearPool (a literal, or
// decoded JSON).
func (p Pool) withIncBeta() Pool {
	if len(p.ib) == len(p.Components) {
		return p
	}
	p.ib = make([]incBeta, len(p.Components))
	for i, c := range p.Components {
		p.ib[i] = newIncBeta(c.Dist.Alpha, c.Dist.Beta.Beta)
	}
	return p
}

// unitTails is Σ wᵢ Iᵤ(αᵢ, βᵢ) and Σ wᵢ (1 − Iᵤ(αᵢ, βᵢ)) at u in [0, 1],
// each summed from the components' own tails, so that a small pooled
// tail keeps its relative precision.
func (p Pool) unitTails(u float64) (lower, upper float64) {
	switch {
	case u <= 0:
		return 0, 1
	case u >= 1:
		return 1, 0
	}
	y := 1 - u
	for i, c := range p.Components {
		l, r := p.ib[i].tails(u, y)
		lower += c.Weight * l
		upper += c.Weight * r
	}
	return lower, upper
}

// resid is F(u) − prob taken in the smaller tail: Σ wᵢ Iᵤ − prob for
// prob ≤ ½, (1 − prob) − Σ wᵢ(1 − Iᵤ) above. It rises with u.
func (p Pool) resid(u, prob float64) float64 {
	l, r := p.unitTails(u)
	if prob > 0.5 {
		return (1 - prob) - r
	}
	return l - prob
}

// residDensity is resid and unitDensity at u in (0, 1) at once: each
// component's density is taken from the prefactor its tail evaluation
// formed (incBeta.densityK), where unitDensity forms it afresh in logs,
// a fifth of a quantile's time.
func (p Pool) residDensity(u, prob float64) (r, f, df, d2f float64) {
	if !(u > 0 && u < 1) {
		return p.resid(u, prob), 0, 0, 0
	}
	y := 1 - u
	var lower, upper float64
	for i, c := range p.Components {
		l, h, k := p.ib[i].tailsK(u, y)
		lower += c.Weight * l
		upper += c.Weight * h
		a, b := c.Dist.Alpha-1, c.Dist.Beta.Beta-1
		fi := c.Weight * p.ib[i].densityK(u, y, k)
		g1 := a/u - b/y
		g2 := -a/(u*u) - b/(y*y)
		f += fi
		df += fi * g1
		d2f += fi * (g1*g1 + g2)
	}
	if prob > 0.5 {
		return (1 - prob) - upper, f, df, d2f
	}
	return lower - prob, f, df, d2f
}

// unitDensity is the unit-scale density f(u) and its first two
// derivatives at u in (0, 1): with gᵢ = log fᵢ, gᵢ′ = (αᵢ−1)/u −
// (βᵢ−1)/(1−u) and gᵢ″ = −(αᵢ−1)/u² − (βᵢ−1)/(1−u)², f′ = Σ wᵢ fᵢ gᵢ′ and
// f″ = Σ wᵢ fᵢ (gᵢ′² + gᵢ″).
func (p Pool) unitDensity(u float64) (f, df, d2f float64) {
	if !(u > 0 && u < 1) {
		return 0, 0, 0
	}
	for i, c := range p.Components {
		a, b := c.Dist.Alpha-1, c.Dist.Beta.Beta-1
		fi := c.Weight * p.ib[i].density(u, 1-u)
		g1 := a/u - b/(1-u)
		g2 := -a/(u*u) - b/((1-u)*(1-u))
		f += fi
		df += fi * g1
		d2f += fi * (g1*g1 + g2)
	}
	return f, df, d2f
}

// PDF is the pooled density Σ wᵢ fᵢ(x); 0 outside [Lower, Upper].
func (p Pool) PDF(x float64) float64 {
	if p.Validate() != nil {
		return math.NaN()
	}
	var s float64
	for _, c := range p.Components {
		s += c.Weight * c.Dist.PDF(x)
	}
	return s
}

// CDF is the pooled probability P(X ≤ x) = Σ wᵢ Fᵢ(x).
func (p Pool) CDF(x float64) float64 {
	if p.Validate() != nil {
		return math.NaN()
	}
	l, _ := p.withIncBeta().unitTails((x - p.Lower) / p.width())
	return l
}

// Mean is Σ wᵢ μᵢ, the weighted mean of the components' means.
func (p Pool) Mean() float64 {
	var m float64
	for _, c := range p.Components {
		m += c.Weight * c.Dist.Mean()
	}
	return m
}

// Variance follows the law of total variance for a mixture,
// Var X = Σ wᵢ σᵢ² + Σ wᵢ (μᵢ − μ)², with μ the pooled mean (e.g.
// Frühwirth-Schnatter 2006, "Finite Mixture and Markov Switching Models",
// §1.2.4).
// It is computed on the unit scale, where every component lies (they
// share the pool's bounds), and scaled by (Upper−Lower)²: beyond
// float64's range (+Inf) on bounds wider than about 1.3e154, where the
// SD is still finite.
func (p Pool) Variance() float64 {
	w := p.width()
	return w * w * p.unitVariance()
}

// unitVariance is the pool's variance on the unit scale of its bounds.
func (p Pool) unitVariance() float64 {
	var m float64
	for _, c := range p.Components {
		m += c.Weight * c.Dist.Beta.Mean()
	}
	var v float64
	for _, c := range p.Components {
		d := c.Dist.Beta.Mean() - m
		v += c.Weight * (c.Dist.Beta.Variance() + d*d)
	}
	return v
}

// SD is the pooled standard deviation, (Upper−Lower) times the unit
// scale's: finite on every width the bounds allow.
func (p Pool) SD() float64 { return p.width() * math.Sqrt(p.unitVariance()) }

// Quantile is the pooled inverse CDF at prob in [0, 1]: the root of
// F(x) = prob found by quantileIn between the smallest and the largest of
// the components' own quantiles at prob, which bracket it because
// Σ wᵢ Fᵢ(minᵢ qᵢ) ≤ prob ≤ Σ wᵢ Fᵢ(maxᵢ qᵢ); where the pooled CDF is
// flat there, the midpoint of the flat set (see PoolQuantile). It
// returns Lower for prob ≤ 0 and Upper for prob ≥ 1, and NaN for an
// invalid pool.
func (p Pool) Quantile(prob float64) float64 {
	if p.Validate() != nil || math.IsNaN(prob) {
		return math.NaN()
	}
	switch {
	case prob <= 0:
		return p.Lower
	case prob >= 1:
		return p.Upper
	}
	p = p.withIncBeta()
	lo, hi, mid := p.componentRange(prob)
	u, f, _, _ := p.quantileIn(prob, lo, hi, mid)
	return p.Lower + p.width()*p.settle(prob, u, f).value
}

// PoolQuantile is one quantile of a pool. Where the pooled CDF is flat
// to within its rounding over an interval wider than the quantile
// accuracy (1e-9 relative) — between two experts who leave no
// probability to speak of in a gap — every value of [Low, High] has
// probability Prob as far as double precision can tell: the quantile is
// not unique there, Unique is false and Value is the midpoint of
// [Low, High]. Otherwise Low = High = Value.
type PoolQuantile struct {
	Prob   float64 `json:"prob"`
	Value  float64 `json:"value"`
	Unique bool    `json:"unique"`
	Low    float64 `json:"low"`
	High   float64 `json:"high"`
}

// Quantiles returns the pooled quantiles at probs (see QuantileSet).
func (p Pool) Quantiles(probs []float64) ([]float64, error) {
	qs, err := p.QuantileSet(probs)
	if err != nil {
		return nil, err
	}
	out := make([]float64, len(qs))
	for i, q := range qs {
		out[i] = q.Value
	}
	return out, nil
}

// QuantileSet returns the pooled quantiles at probs, which must pass
// CheckProbs (finite, inside [1e-12, 1 − 1e-12], strictly increasing),
// with where each is not unique. The first is bracketed as by Quantile.
// The increasing order lets every later root be bracketed by the previous
// root and the upper bound, and started from a third-order Taylor step of
// the quantile function from the previous root, so most take one or two
// CDF evaluations.
func (p Pool) QuantileSet(probs []float64) ([]PoolQuantile, error) {
	sets, err := p.unitQuantileSet(probs)
	if err != nil {
		return nil, err
	}
	out := make([]PoolQuantile, len(probs))
	w := p.width()
	for i, set := range sets {
		out[i] = PoolQuantile{Prob: probs[i], Value: p.Lower + w*set.value, Unique: set.unique,
			Low: p.Lower + w*set.low, High: p.Lower + w*set.high}
	}
	return out, nil
}

// unitQuantileSet is QuantileSet on the unit scale, [0, 1].
func (p Pool) unitQuantileSet(probs []float64) ([]flatSet, error) {
	if err := CheckProbs("probs", probs); err != nil {
		return nil, err
	}
	if err := p.Validate(); err != nil {
		return nil, err
	}
	out := make([]flatSet, len(probs))
	if len(probs) == 0 {
		return out, nil
	}
	p = p.withIncBeta()
	lo, hi, x0 := p.componentRange(probs[0])
	for i, pr := range probs {
		if i > 0 {
			hi = 1
		}
		u, f, df, d2f := p.quantileIn(pr, lo, hi, x0)
		set := p.settle(pr, u, f)
		out[i] = set
		lo, x0 = set.high, set.high
		if !set.unique {
			continue
		}
		if i+1 < len(probs) && f > 0 && finite3(f, df, d2f) {
			// Third-order Taylor step of Q: Q′ = 1/f, Q″ = −f′/f³,
			// Q‴ = (3f′² − f f″)/f⁵ (derivatives of an inverse function).
			dp := probs[i+1] - pr
			q1, q2, q3 := 1/f, -df/(f*f*f), (3*df*df-f*d2f)/(f*f*f*f*f)
			x0 = u + dp*(q1+dp*(q2/2+dp*q3/6))
		}
	}
	return out, nil
}

// flatSet is a root of the pooled CDF with the set it may stand for.
type flatSet struct {
	value, low, high float64
	unique           bool
}

// poolFlatTol is the residual, relative to min(prob, 1 − prob), within
// which the pooled CDF counts as equal to prob: one rounding of the sum
// (2⁻⁵², an ulp of 1 relative), so that a flat set is the set where
// double precision cannot tell F from prob.
const poolFlatTol = 0x1p-52

// poolFlatWide is the relative width (of min(u, 1−u)) beyond which a flat
// set makes a quantile not unique. Between the quantile accuracy (1e-9)
// and this width the midpoint of the set is returned as unique: the
// pooled density there is so low that the quantile moves by more than
// 1e-9 for a change of p in the last bit.
const poolFlatWide = 1e-6

// settle decides whether the root u of F = prob (density f there) is
// unique: when the CDF, rising at rate f, crosses its rounding band well
// within poolFlatWide of u it is; otherwise the set {v : |F(v) − prob| ≤
// poolFlatTol·min(prob, 1−prob)} is found by bisection from both sides,
// and its midpoint stands for the quantile, not unique when the set is
// wider than poolFlatWide.
func (p Pool) settle(prob, u, f float64) flatSet {
	tol := poolFlatTol * math.Min(prob, 1-prob)
	scale := math.Min(u, 1-u)
	if f > 0 && !math.IsInf(f, 0) && tol/f <= 1e-9*scale {
		return flatSet{value: u, low: u, high: u, unique: true}
	}
	// The set's ends: the last point below it and the first above it. A
	// point is below (above) only when both ways of taking the residual,
	// from the lower tail and from the upper, say so: either one that
	// cannot tell F from prob puts the point in the set, which keeps the
	// set symmetric for a symmetric pool.
	edge := func(a, b float64, below bool) float64 {
		for it := 0; it < 2000; it++ {
			m := bisect(a, b)
			if !(m > a && m < b) {
				break
			}
			l, r := p.unitTails(m)
			lo, up := l-prob, (1-prob)-r
			if (below && lo < -tol && up < -tol) || (!below && !(lo > tol && up > tol)) {
				a = m
			} else {
				b = m
			}
		}
		if below {
			return b
		}
		return a
	}
	low := edge(0, u, true)
	high := edge(u, 1, false)
	mid := 0.5 * (low + high)
	if !(high-low > poolFlatWide*scale) {
		return flatSet{value: mid, low: mid, high: mid, unique: true}
	}
	return flatSet{value: mid, low: low, high: high, unique: false}
}

// componentRange is the smallest, the largest and the weighted mean of
// the components' unit quantiles at prob.
func (p Pool) componentRange(prob float64) (lo, hi, mean float64) {
	lo, hi = 1, 0
	for _, c := range p.Components {
		q := c.Dist.Beta.Quantile(prob)
		lo, hi = math.Min(lo, q), math.Max(hi, q)
		mean += c.Weight * q
	}
	return lo, hi, math.Min(math.Max(mean, lo), hi)
}

// Tolerances of quantileIn on the unit scale.
const (
	// poolQuantileXTol is the relative width, in u near 0 or in 1−u near
	// 1, below which a bracket counts as converged.
	poolQuantileXTol = 1e-14
	// poolHalleyAccept is the relative size of a Halley step below which
	// the step is taken as the answer without another CDF evaluation:
	// Halley's error after a step δ is of order δ³ times the density's
	// relative curvature, far below 1e-14 relative for δ ≤ 1e-6 relative.
	poolHalleyAccept = 1e-6
	// poolNewtonAccept is the same for a plain Newton step, whose error
	// is of order δ² times the relative slope of the density.
	poolNewtonAccept = 1e-9
)

// quantileIn solves F(u) = prob for u in the bracket [lo, hi], where
// F(lo) ≤ prob ≤ F(hi), on the unit scale, starting from x0 (a start
// outside the bracket is replaced by a bisection point). It is a
// safeguarded Halley iteration, the bracketing scheme of rtsafe (Press et
// al. 2007, "Numerical Recipes", 3rd ed., §9.4) with Halley's step
// δ = (r/f) / (1 − (r/f)·f′/(2f)) for residual r = F(u) − prob (§9.4.2):
// each evaluation narrows the bracket, and a step that leaves the
// bracket, or follows a step that failed to halve the residual, is
// replaced by a bisection step. Bisection splits the bracket
// geometrically when it spans orders of magnitude near 0 (or near 1, in
// 1−u), so extreme shapes still converge in a few dozen steps. The root
// is exact to about 1e-14 relative to min(u, 1−u), or to a residual of
// poolFlatTol·min(prob, 1−prob). It also returns the density and its first two
// derivatives at the last point evaluated.
func (p Pool) quantileIn(prob, lo, hi, x0 float64) (u, f, df, d2f float64) {
	if lo >= hi {
		f, df, d2f = p.unitDensity(lo)
		return lo, f, df, d2f
	}
	x := x0
	if !(x > lo && x < hi) {
		x = bisect(lo, hi)
	}
	prevR := math.Inf(1)
	tol := poolFlatTol * math.Min(prob, 1-prob)
	for iter := 0; iter < 300; iter++ {
		var r float64
		r, f, df, d2f = p.residDensity(x, prob)
		if math.Abs(r) <= tol {
			return x, f, df, d2f
		}
		if r < 0 {
			lo = x
		} else {
			hi = x
		}
		if converged(lo, hi) {
			return 0.5 * (lo + hi), f, df, d2f
		}
		if mid := bisect(lo, hi); !(mid > lo && mid < hi) {
			// No float64 lies strictly between lo and hi: the root is
			// below the smallest subnormal or within an ulp of 1.
			return p.nearerEnd(prob, lo, hi)
		}
		next, accept := math.NaN(), poolNewtonAccept
		if f > 0 && !math.IsInf(f, 0) && math.Abs(r) <= 0.5*prevR {
			d := r / f
			if h := 1 - 0.5*d*df/f; h > 0.5 && !math.IsInf(df, 0) {
				d, accept = d/h, poolHalleyAccept // Halley; else plain Newton
			}
			next = x - d
		}
		if !(next > lo && next < hi) {
			next = bisect(lo, hi)
		} else if math.Abs(next-x) <= accept*math.Min(next, 1-next) {
			return next, f, df, d2f
		}
		prevR = math.Abs(r)
		x = next
	}
	f, df, d2f = p.unitDensity(x)
	return x, f, df, d2f
}

// nearerEnd is whichever of two adjacent floats lo < hi has the smaller
// CDF residual, with its density and derivatives; the bound where the
// quantile lies in the last gap before it and nearer the bound
// (boundGapEnd).
func (p Pool) nearerEnd(prob, lo, hi float64) (u, f, df, d2f float64) {
	u = hi
	if math.Abs(p.resid(lo, prob)) < math.Abs(p.resid(hi, prob)) {
		u = lo
	}
	halved := func(x float64) (lower, upper float64) {
		for i, c := range p.Components {
			l, r := p.ib[i].tails(x, 1-x)
			lower += c.Weight * l * math.Exp2(-p.ib[i].a)
			upper += c.Weight * r * math.Exp2(-p.ib[i].b)
		}
		return lower, upper
	}
	if end, ok := boundGapEnd(prob, lo, hi, halved); ok {
		u = end
	}
	f, df, d2f = p.unitDensity(u)
	return u, f, df, d2f
}

func finite3(a, b, c float64) bool {
	return !math.IsInf(a, 0) && !math.IsInf(b, 0) && !math.IsInf(c, 0) && !math.IsNaN(a+b+c)
}

// converged reports whether a < b are equal to poolQuantileXTol relative
// to the distance from the nearer bound of [0, 1].
func converged(a, b float64) bool {
	return b-a <= poolQuantileXTol*math.Min(b, 1-a)
}

// bisect splits [lo, hi] in (0, 1): geometrically near 0 when the bracket
// spans more than a factor 16 there, likewise in 1−u near 1, else in half.
func bisect(lo, hi float64) float64 {
	switch {
	case lo > 0 && hi < 0.5 && hi > 16*lo:
		// √lo·√hi, not √(lo·hi): with lo the smallest subnormal the
		// product underflowed to 0, the bracket read as unsplittable,
		// and a pool's median came back as 5e-324 (found in review).
		return math.Sqrt(lo) * math.Sqrt(hi)
	case lo == 0 && hi < 0.5:
		if m := hi / 16; m > 0 {
			return m
		}
		// hi a few subnormals: the last step is to the smallest double,
		// so that the bracket ends in the gap beside 0 (boundGapEnd).
		return math.SmallestNonzeroFloat64
	case hi < 1 && lo > 0.5 && (1-lo) > 16*(1-hi):
		return 1 - math.Sqrt((1-lo)*(1-hi))
	case hi == 1 && lo > 0.5:
		if m := 1 - (1-lo)/16; m < 1 {
			return m
		}
		return 1 - 0x1p-53 // the last double below 1, likewise
	}
	return 0.5 * (lo + hi)
}

// Representation is the single Beta that best stands for a pool, with how
// far it is from the pool.
type Representation struct {
	Dist  ScaledBeta `json:"dist"`
	Probs []float64  `json:"probs"` // the grid: 0.01, 0.02, …, 0.99
	// SSE is the least-squares objective Σ (F_B(Q(p)) − p)² over the
	// grid, with F_B the Beta's CDF and Q the pool's quantile function.
	SSE float64 `json:"sse"`
	// MaxCDFError is supₓ |F_B(x) − F(x)| over the whole support, F the
	// pool's CDF (largestCDFGap): how far, in probability, the Beta's CDF
	// strays from the pool's, between the grid's points and beyond them
	// too.
	MaxCDFError float64 `json:"max_cdf_error"`
	// QuantileDiffs are Q_B(p) − Q(p) at p = 0.05, 0.5 and 0.95, on the
	// quantity's scale: the same distance read as values.
	QuantileDiffs [3]float64 `json:"quantile_diffs"`
	// SDRatio is the Beta's standard deviation over the pool's, and
	// IntervalRatio the width of the Beta's central 90% interval over
	// the pool's: how far the Beta's spread is from the pool's, which the
	// CDF distance can understate (a pool of a sharp expert and a vague
	// one, say, whose sd the vague one sets).
	SDRatio       float64 `json:"sd_ratio"`
	IntervalRatio float64 `json:"interval_ratio"`
	// Warnings say, in sentences for a facilitator, where the Beta is
	// far from the pool (RepresentationWarnings).
	Warnings []string `json:"warnings"`
}

// SpreadRatioLimit is the largest factor by which the single Beta's sd,
// or the width of its central 90% interval, may differ from the pool's
// (either way) before the Beta is reported as far from the pool: a fifth
// more or less spread is already a different prior to a decision maker.
const SpreadRatioLimit = 1.2

// representationGrid is the number of grid probabilities k/(n+1).
const representationGrid = 99

// BestBeta returns the single Beta on [Lower, Upper] that best represents
// the pool: least squares on the probability scale at the pool's
// quantiles,
//
//	minimise Σₖ (F(Q(pₖ); α, β) − pₖ)²,  pₖ = k/100, k = 1…99,
//
// the criterion FitQuantiles applies to an expert's judgement (O'Hagan et
// al. 2006, "Uncertain Judgements", §6.4), solved in log-parameter space
// with gonum/optimize by the same local fits, though started and ranked
// on subsets of the grid first (representationFit). A pool whose
// components are all one Beta is that Beta, exactly, whatever its
// weights: no fit is made (the grid cannot see a Beta whose quantiles
// all round to a bound, such as Beta(1000, 1e-6), a point mass at 1 in
// float64). Grid points whose pool quantile rounds to a bound are left
// out of the fit; the reported distance is taken over the whole support,
// not only at the grid (largestCDFGap), and where the pool's grid
// quantiles lie beyond the last double before a bound, where no double
// can compare the curves, the grid's distance at them is kept.
func (p Pool) BestBeta() (Representation, error) {
	probs := make([]float64, representationGrid)
	for k := range probs {
		probs[k] = float64(k+1) / (representationGrid + 1)
	}
	if err := p.Validate(); err == nil && len(p.Components) > 0 {
		d, same := p.Components[0].Dist.Beta, true
		for _, c := range p.Components[1:] {
			same = same && c.Dist.Beta == d
		}
		if same {
			return Representation{Dist: ScaledBeta{Beta: d, Lower: p.Lower, Upper: p.Upper}, Probs: probs,
				SDRatio: 1, IntervalRatio: 1, Warnings: []string{}}, nil
		}
	}
	sets, err := p.unitQuantileSet(probs)
	if err != nil {
		return Representation{}, err
	}
	qs, units := make([]float64, len(sets)), make([]float64, len(sets))
	for k, set := range sets {
		qs[k], units[k] = p.Lower+p.width()*set.value, set.value
	}
	// A pool quantile that rounds to a bound (an extreme U or J shaped
	// expert) cannot enter the fit, which needs interior points; the
	// reported distance is over the whole support, beside the bounds too.
	var u, up []float64
	for k, q := range qs {
		if x := (q - p.Lower) / p.width(); x > 0 && x < 1 {
			u, up = append(u, x), append(up, probs[k])
		}
	}
	if len(u) < 2 {
		return Representation{}, fmt.Errorf("%w: fewer than 2 of the pool's grid quantiles lie inside the bounds", ErrFitFailed)
	}
	d, _, err := p.representationFit(u, up)
	if err != nil {
		return Representation{}, err
	}
	r := Representation{
		Dist:  ScaledBeta{Beta: d, Lower: p.Lower, Upper: p.Upper},
		Probs: probs,
	}
	r.MaxCDFError = p.withIncBeta().largestCDFGap(d, units, probs)
	for k, q := range qs {
		e := r.Dist.CDF(q) - probs[k]
		r.SSE += e * e
		// Beyond the last double before a bound the curves cannot be
		// compared; a grid quantile held as the bound keeps the grid's
		// distance there, which overstates rather than hides it.
		if x := (q - p.Lower) / p.width(); !(x > 0 && x < 1) {
			r.MaxCDFError = math.Max(r.MaxCDFError, math.Abs(e))
		}
	}
	var bq [3]float64
	for i, k := range [3]int{4, 49, 94} { // p = 0.05, 0.5, 0.95
		bq[i] = r.Dist.Quantile(probs[k])
		r.QuantileDiffs[i] = bq[i] - qs[k]
	}
	r.SDRatio = r.Dist.SD() / p.SD()
	r.IntervalRatio = (bq[2] - bq[0]) / (qs[94] - qs[4])
	r.Warnings = r.representationWarnings()
	return r, nil
}

// Far reports which of the representation's checks the Beta fails: its
// CDF strays from the pool's by more than PoorFitThreshold, its standard
// deviation or its central 90% interval's width is off the pool's by more
// than the factor SpreadRatioLimit either way. Warnings says the same in
// sentences.
func (r Representation) Far() (cdf, sd, interval bool) {
	far := func(x float64) bool { return !(x <= SpreadRatioLimit && x >= 1/SpreadRatioLimit) }
	return PoorFit(r.MaxCDFError), far(r.SDRatio), far(r.IntervalRatio)
}

// representationWarnings flags the Beta by the CDF distance
// (PoorFitThreshold, the rule an expert's fit is judged by) and by the
// spread ratios (SpreadRatioLimit).
func (r Representation) representationWarnings() []string {
	w := []string{}
	cdf, sd, interval := r.Far()
	if cdf {
		w = append(w, fmt.Sprintf("The single Beta is far from the pool: their CDFs differ by up to %s (more than %.2g). Report the pool itself or agree a consensus judgement.",
			GapText(r.MaxCDFError), PoorFitThreshold))
	}
	if sd {
		w = append(w, fmt.Sprintf("The single Beta's standard deviation is %.3g times the pool's (outside %.3g to %.3g): it misstates how uncertain the panel is.", r.SDRatio, 1/SpreadRatioLimit, SpreadRatioLimit))
	}
	if interval {
		w = append(w, fmt.Sprintf("The single Beta's central 90%% interval is %.3g times as wide as the pool's (outside %.3g to %.3g): it misstates how uncertain the panel is.", r.IntervalRatio, 1/SpreadRatioLimit, SpreadRatioLimit))
	}
	return w
}

// searchStride: the representing Beta is first fitted, and proved
// global, on every fifth grid point (p = 0.05, 0.10, …, 0.95), a fifth
// of the cost; the fit on the whole grid starts from there.
const searchStride = 5

// representationCells is the branch and bound's budget in the search for
// the representing Beta, and representationClose the largest probability
// error on the subset at which the local fits from the two starts settle
// it (TestBestBetaFastPathMatchesGrid checks the rule against an
// exhaustive search).
const (
	representationCells = 40
	representationClose = 0.035
)

// subsample is the problem on every stride-th point (the stride-th, the
// 2·stride-th, …), or on all of them when that would leave fewer than 4.
func subsample(u, up []float64, stride int) *lsq {
	if len(u) >= 4*stride {
		var cu, cp []float64
		for k := stride - 1; k < len(u); k += stride {
			cu, cp = append(cu, u[k]), append(cp, up[k])
		}
		u, up = cu, cp
	}
	return newLSQ(u, up)
}

// representationFit minimises Σ (F(uₖ; α, β) − pₖ)² over the pool's grid
// quantiles uₖ (all inside (0, 1)) at probabilities pₖ. The global search
// (fitGlobal) runs on every fifth grid point, from the moment-matched
// Beta (the pool's mean m and variance v, α+β = m(1−m)/v − 1, feasible
// since a pool on [0, 1] has v < m(1−m)) and the quantile-based start of
// FitQuantiles; the fit on the whole grid is a local fit from its answer,
// which the nineteen points of the subset place in the right basin (the
// whole grid only sharpens a curve the subset already follows closely).
func (p Pool) representationFit(u, up []float64) (d Beta, sse float64, err error) {
	coarse := subsample(u, up, searchStride)
	starts := [][2]float64{coarse.momentStart()}
	m := (p.Mean() - p.Lower) / p.width()
	if v := p.unitVariance(); v > 0 && v < m*(1-m) {
		starts = append(starts, clampBox(logShape(m, m*(1-m)/v-1)))
	}
	// A pool close to one Beta is settled by local fits from these
	// starts, when the best misses no subset probability by more than
	// representationClose; otherwise the global search runs, with its
	// branch and bound kept short (representationCells), since a Beta that
	// far from the pool is flagged anyway.
	var first fitResult
	first.s = math.Inf(1)
	for _, st := range starts {
		if th, s := coarse.localFit(st); s < first.s {
			first.th, first.s = th, s
		}
	}
	coarse.sse(first.th)
	if coarse.maxAbsResid() > representationClose {
		coarse.cells = representationCells
		first = coarse.fitGlobal(append(starts, first.th))
	}
	full := newLSQ(u, up)
	if len(full.u) == len(coarse.u) {
		full = coarse
	}
	th, _ := full.localFit(first.th)
	sse = full.sse(th)
	for _, t := range th {
		if t <= logParamMin+boundTol || t >= logParamMax-boundTol {
			return Beta{}, 0, fmt.Errorf("%w: the closest single Beta has alpha %.3g and beta %.3g, at the edge of the range Parley fits (%g to %g)",
				ErrFitFailed, math.Exp(th[0]), math.Exp(th[1]), MinShape, MaxShape)
		}
	}
	if math.IsNaN(sse) || math.IsInf(sse, 0) {
		return Beta{}, 0, fmt.Errorf("%w: no local fit gave a number", ErrFitFailed)
	}
	return Beta{Alpha: math.Exp(th[0]), Beta: math.Exp(th[1])}, sse, nil
}

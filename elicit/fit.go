package elicit

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"sort"
	"strconv"

	"gonum.org/v1/gonum/stat/distuv"
)

// PoorFitThreshold is the largest probability error |F(xᵢ) − pᵢ| above
// which a fit is reported as poor (WarnPoorFit; PoorFit).
const PoorFitThreshold = 0.05

// PoorFit reports whether a largest probability error is above
// PoorFitThreshold by more than rounding. A fit that puts all its mass
// below a stated 95% point has F = 1 there, and 1 − 0.95 is
// 0.050000000000000044 in float64 (0.95 is not a binary fraction), while
// the same fit below a point whose F rounds to 1 − 1e-17 gave
// 0.049999999999999996: one expert warned and the other not, for one gap
// of 0.05, and the warning read "misses by 0.050 (more than 0.05)". The
// margin, 1e-12, is far above that rounding and far below any gap a
// person could mean (common practice, no source for its size).
func PoorFit(gap float64) bool { return gap > PoorFitThreshold+1e-12 }

// GapText writes a largest probability gap (a fit's, or a single Beta's
// from its pool) to four significant figures, as the pages write every
// other gap beside it, or as many more as it takes to read on its own
// side of PoorFitThreshold: a warning that said 0.127 under a line that
// said 0.1271 gave one distance two values.
func GapText(gap float64) string {
	return strconv.FormatFloat(gap, 'g', SideDigits(gap, PoorFitThreshold, 4), 64)
}

// A stated outer point, one whose tail chance min(p, 1 − p) is at most
// TailPointMax, is reported as missed (WarnTailMisfit) when the fitted
// Beta's chance beyond it is more than TailRatioLimit times the stated
// one or less than 1/TailRatioLimit of it. The absolute rule
// (PoorFitThreshold) cannot see a tail: at a 95% point no gap exceeds
// 0.05, however far the Beta falls short of the stated value. A tail
// chance is read on a ratio scale ("1 in 20" against "1 in 60"); the
// limit of 3 is common practice, no source. At 2 it flagged most
// ordinary right-skewed judgements (0.06/0.15/0.35 at 5/50/95, whose
// fitted 95% value is 0.31), which would teach a facilitator to ignore
// it.
const (
	TailRatioLimit = 3
	TailPointMax   = 0.25
)

// NearCertaintyESS is the effective sample size α+β above which a fit is
// reported as implying near-certainty (WarnNearCertainty).
const NearCertaintyESS = 1000

// WarningCode names one thing a facilitator should look at in a fit.
type WarningCode string

// The warnings a fit can carry.
const (
	// WarnUShaped: α < 1 and β < 1, so the density is unbounded at both
	// ends and lowest in the middle.
	WarnUShaped WarningCode = "u_shaped"
	// WarnJShaped: exactly one of α, β is below 1 (and the other is at
	// least 1), so the density is unbounded at one end.
	WarnJShaped WarningCode = "j_shaped"
	// WarnPoorFit: the largest probability error exceeds PoorFitThreshold.
	WarnPoorFit WarningCode = "poor_fit"
	// WarnTailMisfit: the fit misses a stated outer point on the ratio
	// scale of its tail chance (TailRatioLimit), while its largest
	// probability error is within PoorFitThreshold. Quantile judgements
	// only: a chip is too coarse a unit for a tail.
	WarnTailMisfit WarningCode = "tail_misfit"
	// WarnNearCertainty: α+β exceeds NearCertaintyESS.
	WarnNearCertainty WarningCode = "near_certainty"
	// WarnBeyondDouble: a point a prior or a fit shows (a prior's 5%,
	// 50% or 95% point; a fit's percentiles and fitted values) lies
	// nearer a bound than a double beside that bound can hold (shapes
	// far below 1), so that it shows as the bound; the warning gives how
	// far from the bound it really lies.
	WarnBeyondDouble WarningCode = "beyond_double"
)

// Warning is one caution about a fit; Message is plain language for a
// facilitator.
type Warning struct {
	Code    WarningCode `json:"code"`
	Message string      `json:"message"`
}

// Fit is a Beta fitted to an expert's judgement, with what a facilitator
// needs to judge the fit.
type Fit struct {
	Dist         ScaledBeta `json:"dist"`           // alpha, beta, lower, upper
	SSE          float64    `json:"sse"`            // least-squares objective Σ (F(xᵢ) − pᵢ)²
	Probs        []float64  `json:"probs"`          // stated probabilities
	Stated       []float64  `json:"stated"`         // stated values
	Fitted       []float64  `json:"fitted"`         // fitted quantiles at Probs
	ProbErrors   []float64  `json:"prob_errors"`    // F(stated_i) − p_i
	MaxProbError float64    `json:"max_prob_error"` // max |ProbErrors[i]|
	Percentiles  [3]float64 `json:"percentiles"`    // fitted 5th, 50th and 95th percentiles
	Warnings     []Warning  `json:"warnings"`
}

// ErrFitFailed is returned (wrapped) when no Beta within the accuracy
// envelope can be fitted where the input rules cannot say so beforehand,
// as for a pool that no single Beta represents. It is never replaced by
// a guess. (A judgement no Beta fits is refused with RuleFitRange.)
var ErrFitFailed = errors.New("elicit: no Beta within the accuracy envelope fits")

// FitQuantiles fits a Beta on [j.Lower, j.Upper] to the judgement by least
// squares on the probability scale,
//
//	minimise S(α, β) = Σᵢ (F(uᵢ; α, β) − pᵢ)²,  uᵢ = (xᵢ − lower)/(upper − lower),
//
// the usual choice in the elicitation literature (O'Hagan et al. 2006,
// "Uncertain Judgements", §6.4). fitCumulative searches the whole box
// MinShape ≤ α, β ≤ MaxShape in (log α, log β) with a Levenberg–Marquardt
// solver on analytic derivatives, from a moment-based start and the Betas
// that match two of the pairs exactly (pairStarts), and proves the
// minimum it reaches global (fitGlobal, whose doc comment gives the
// argument), trying further starts and a branch and bound where it
// cannot. A judgement of two pairs is matched exactly
// (|F(xᵢ) − pᵢ| ≤ 1e-10), or refused with RuleFitRange if no Beta in the
// box matches it; so is one whose minimum lies on the box's edge.
func FitQuantiles(j Judgement) (Fit, error) {
	if err := j.Validate(); err != nil {
		return Fit{}, err
	}
	d, sse, resid, err := fitCumulative("values", j.unit(), j.Probs)
	if err != nil {
		return Fit{}, err
	}
	f := newFit(ScaledBeta{Beta: d, Lower: j.Lower, Upper: j.Upper}, j.Probs, j.Values, sse, resid)
	if !PoorFit(f.MaxProbError) {
		if w, ok := tailWarning(j.Probs, j.Values, resid); ok {
			f.Warnings = append(f.Warnings, w)
		}
	}
	return f, nil
}

// weightWords says how much a Beta whose α + β is ess weighs, for
// WarnNearCertainty: in observed trials for a proportion on [0, 1]
// (WorthInTrials), and as α + β itself on other bounds, where trials
// mean nothing. Above NearCertaintyESS, ESSText writes whole numbers, as
// this warning always has, so a fit kept by an earlier version says what
// a fresh one says.
func weightWords(ess float64, proportion bool) string {
	limit := strconv.Itoa(NearCertaintyESS)
	if proportion {
		return "is " + WorthInTrials(ess) + " (α + β above " + limit + ")"
	}
	return "has α + β of about " + ESSText(ess) + " (above " + limit + ")"
}

// newFit fills in the report of a fit at the solution d, whose residuals
// F(values[i]) − probs[i] are resid.
func newFit(d ScaledBeta, probs, values []float64, sse float64, resid []float64) Fit {
	f := Fit{
		Dist:       d,
		SSE:        sse,
		Probs:      append([]float64(nil), probs...),
		Stated:     append([]float64(nil), values...),
		Fitted:     make([]float64, len(probs)),
		ProbErrors: append([]float64(nil), resid...),
		Warnings:   []Warning{},
	}
	c := newIncBeta(d.Alpha, d.Beta.Beta)
	for i, p := range probs {
		f.Fitted[i] = d.fittedValue(&c, p, values[i], resid[i])
		f.MaxProbError = math.Max(f.MaxProbError, math.Abs(f.ProbErrors[i]))
	}
	for k, p := range [3]float64{0.05, 0.5, 0.95} {
		// Start from the fitted quantile at the nearest stated probability.
		near := 0
		for i, q := range probs {
			if math.Abs(q-p) < math.Abs(probs[near]-p) {
				near = i
			}
		}
		if probs[near] == p {
			f.Percentiles[k] = f.Fitted[near]
		} else {
			f.Percentiles[k] = d.quantileNear(p, f.Fitted[near])
		}
	}
	f.Warnings = fitWarnings(d.Beta, f.MaxProbError, d.OnUnit())
	return f.Refreshed() // a point written as a bound (WarnBeyondDouble)
}

// Refreshed is f with the warnings this version derives from a fit's
// own points that a fit kept by an earlier version may lack: a point
// written as a bound (WarnBeyondDouble). The store reads kept fits
// through it, so a fit kept before the warning existed says what a fresh
// fit of the same answer says.
func (f Fit) Refreshed() Fit {
	for _, w := range f.Warnings {
		if w.Code == WarnBeyondDouble {
			return f
		}
	}
	if m, ok := beyondDouble(f.Dist, f.Shown(), "the fitted "); ok {
		f.Warnings = append(slices.Clone(f.Warnings), Warning{WarnBeyondDouble, m})
	}
	return f
}

// Shown is every point of the fit that pages and commands write, in
// order of probability: the fitted value at each stated probability and
// the 5th, 50th and 95th percentiles.
func (f Fit) Shown() []ShownPoint {
	out := make([]ShownPoint, 0, len(f.Probs)+3)
	for i, p := range f.Probs {
		if i < len(f.Fitted) {
			out = append(out, ShownPoint{P: p, X: f.Fitted[i]})
		}
	}
	for k, p := range [3]float64{0.05, 0.5, 0.95} {
		out = append(out, ShownPoint{P: p, X: f.Percentiles[k]})
	}
	sort.SliceStable(out, func(i, j int) bool { return out[i].P < out[j].P })
	return out
}

// fittedQuantileAccept is the Halley step (relative) that a fitted value
// accepts as converged (incBeta.quantileWithin).
const fittedQuantileAccept = 1e-6

// fittedValue is d's quantile at p, the fitted value beside a stated
// value x0 whose CDF under d is p + r (the fit's residual, known): a
// Newton step x0 − r/f(x0) from there costs only the density, and the
// Halley steps that follow stop once they fall below
// fittedQuantileAccept, usually after one CDF evaluation instead of three.
func (d ScaledBeta) fittedValue(c *incBeta, p, x0, r float64) float64 {
	u := d.toUnit(x0)
	if !(p > 0 && p < 1) || !(u > 0 && u < 1) || d.Beta.Validate() != nil {
		return d.Quantile(p)
	}
	if f := c.density(u, 1-u); f > 0 && !math.IsInf(f, 0) && !math.IsNaN(r) {
		if v := u - r/f; v > 0 && v < 1 {
			u = v
		}
	}
	return d.Lower + d.width()*c.quantileWithin(p, u, fittedQuantileAccept)
}

// quantileNear is d.Quantile(p) solved from x0, a value whose
// probability under d is already near p, such as the stated value: a
// few steps from there cost less than gonum's inverse.
func (d ScaledBeta) quantileNear(p, x0 float64) float64 {
	u := d.toUnit(x0)
	if !(p > 0 && p < 1) || d.Beta.Validate() != nil {
		return d.Quantile(p)
	}
	c := newIncBeta(d.Alpha, d.Beta.Beta)
	return d.Lower + d.width()*c.quantileFrom(p, u)
}

// fitWarnings applies the warning rules to a fitted Beta; proportion says
// its bounds are [0, 1] (weightWords).
func fitWarnings(d Beta, maxErr float64, proportion bool) []Warning {
	w := []Warning{}
	a, b := d.Alpha, d.Beta
	switch {
	case shapeBelowOne(a) && shapeBelowOne(b):
		w = append(w, Warning{WarnUShaped, fmt.Sprintf(
			"The fitted density is U-shaped (α = %s and β = %s are both below 1): it says the value is most likely close to one bound or the other, and least likely in the middle. Check with the expert that this is what they meant.", ShapeText(a), ShapeText(b))})
	case shapeBelowOne(a):
		w = append(w, Warning{WarnJShaped, fmt.Sprintf(
			"The fitted density is J-shaped (α = %s is below 1): it rises without limit towards the lower bound. Check with the expert that values right at the lower bound are the most likely.", ShapeText(a))})
	case shapeBelowOne(b):
		w = append(w, Warning{WarnJShaped, fmt.Sprintf(
			"The fitted density is J-shaped (β = %s is below 1): it rises without limit towards the upper bound. Check with the expert that values right at the upper bound are the most likely.", ShapeText(b))})
	}
	if PoorFit(maxErr) {
		w = append(w, Warning{WarnPoorFit, fmt.Sprintf(
			"The fitted Beta misses one of the stated probabilities by %s (more than %.2f): no single Beta matches these answers well. Show the expert the fit and ask whether they want to revise.",
			GapText(maxErr), PoorFitThreshold)})
	}
	if ess := a + b; ess > NearCertaintyESS {
		w = append(w, Warning{WarnNearCertainty, "The fitted prior " + weightWords(ess, proportion) + ": it implies near-certainty about the value. Check that the expert really is this sure."})
	}
	return w
}

const (
	// exactAccept is the largest probability error at which a two-pair
	// fit counts as exact.
	exactAccept = 1e-10
	// boundTol: a fitted log α or log β within this of the search box's
	// edge means the least-squares minimum lies on the edge.
	boundTol = 1e-9
	// moreStarts is how many starts from the grid of gridStarts are tried
	// before the branch and bound when the first fit cannot be proved
	// global.
	moreStarts = 6
)

// fitCumulative is the least-squares fitter behind FitQuantiles and
// FitChips: it minimises Σ (F(uᵢ; α, β) − pᵢ)² for points uᵢ strictly
// inside (0, 1) and cumulative fractions pᵢ in [0, 1] (chips may put 0
// or 1 at interior points) over the whole box MinShape ≤ α, β ≤
// MaxShape, and proves the minimum global (fitGlobal). The caller
// validates. A minimum on the edge of the box (the data want a Beta
// beyond the accuracy envelope) and a two-pair judgement no Beta in the
// box matches exactly are refused with RuleFitRange on field.
func fitCumulative(field string, u, p []float64) (d Beta, sse float64, resid []float64, err error) {
	q := newLSQ(u, p)
	res := q.fitGlobal(append([][2]float64{q.momentStart()}, q.pairStarts()...))
	if !res.certified && !res.bnb {
		res = q.fitGlobal(append([][2]float64{res.th}, q.gridStarts(moreStarts)...))
	}
	th := res.th
	sse = q.sse(th)
	if math.IsNaN(sse) || math.IsInf(sse, 0) {
		return Beta{}, 0, nil, fmt.Errorf("%w: objective %v at alpha %v, beta %v", ErrFitFailed, sse, math.Exp(th[0]), math.Exp(th[1]))
	}
	for _, t := range th {
		if t <= logParamMin+boundTol || t >= logParamMax-boundTol {
			return Beta{}, 0, nil, inputErr(field, RuleFitRange,
				"the closest Beta has alpha %.3g and beta %.3g, at the edge of the range", math.Exp(th[0]), math.Exp(th[1]))
		}
	}
	if q.exactlyDetermined() && !(q.maxAbsResid() <= exactAccept) {
		return Beta{}, 0, nil, inputErr(field, RuleFitRange,
			"no Beta matches both stated pairs; the closest misses by %.3g", q.maxAbsResid())
	}
	d = Beta{Alpha: math.Exp(th[0]), Beta: math.Exp(th[1])}
	return d, sse, append([]float64(nil), q.r...), nil
}

// exactlyDetermined reports whether the data are two pairs with
// probabilities strictly inside (0, 1), which a Beta can match exactly.
func (q *lsq) exactlyDetermined() bool {
	if len(q.u) != 2 {
		return false
	}
	for _, p := range q.p {
		if !(p > 0 && p < 1) {
			return false
		}
	}
	return true
}

// momentStart is the better (by the objective) of two moment-based starts
// from the stated quantiles: a normal approximation on the probability
// scale, u ≈ m + s·zᵢ with zᵢ = Φ⁻¹(pᵢ), turned into α, β by the method of
// moments; and a logit-normal approximation, logit u ≈ μ + σ·zᵢ, using
// α/β ≈ e^μ and 1/α + 1/β ≈ σ² (the large-α, β forms of the mean and
// variance of logit Y: ψ(α) − ψ(β) and ψ′(α) + ψ′(β); Johnson, Kotz &
// Balakrishnan 1995, ch. 25). Both lines are least-squares lines through
// the pairs with pᵢ strictly inside (0, 1). The default 5/50/95
// judgement, the common case, takes a third start alone, without
// evaluating the objective at the other two: the mean and variance from
// the extended Pearson–Tukey approximation, then the method of moments.
// A start decides only how soon the fit gets there, not where: fitGlobal
// proves its answer the global minimum, or searches further, whatever
// the start (comparing the three cost a fit a sixth of its time).
func (q *lsq) momentStart() [2]float64 {
	if m, v, ok := q.pearsonTukey(); ok && v < m*(1-m) {
		return clampBox(logShape(m, m*(1-m)/v-1))
	}
	var zs, us, ls []float64
	for i, p := range q.p {
		if p > 0 && p < 1 {
			z := distuv.UnitNormal.Quantile(p)
			zs = append(zs, z)
			us = append(us, q.u[i])
			ls = append(ls, math.Log(q.u[i]/(1-q.u[i])))
		}
	}
	var cands [][2]float64
	if m, s, ok := line(zs, us); ok && m > 0 && m < 1 && s > 0 {
		ess := m*(1-m)/(s*s) - 1
		if ess < 0.5 {
			ess = 0.5
		}
		cands = append(cands, logShape(m, ess))
	}
	if mu, sg, ok := line(zs, ls); ok && sg > 0 {
		m := 1 / (1 + math.Exp(-mu))
		cands = append(cands, logShape(m, 1/(sg*sg*m*(1-m))))
	}
	if len(cands) == 0 {
		cands = append(cands, logShape(q.medianGuess(), 2))
	}
	best, bestF := cands[0], math.Inf(1)
	for _, c := range cands {
		c = clampBox(c)
		if f := q.sse(c); f < bestF {
			best, bestF = c, f
		}
	}
	return best
}

// pearsonTukey is the extended Pearson–Tukey approximation of the mean
// and variance from the 5th, 50th and 95th percentiles, a three-point
// distribution with weights 0.185, 0.63, 0.185 (Keefer & Bodily 1983,
// "Three-point approximations for continuous random variables",
// Management Science 29(5)); ok is false unless the probabilities are
// exactly 0.05, 0.5, 0.95.
func (q *lsq) pearsonTukey() (m, v float64, ok bool) {
	if len(q.p) != 3 || q.p[0] != 0.05 || q.p[1] != 0.5 || q.p[2] != 0.95 {
		return 0, 0, false
	}
	w := [3]float64{0.185, 0.63, 0.185}
	var s2 float64
	for i, x := range q.u {
		m += w[i] * x
		s2 += w[i] * x * x
	}
	return m, s2 - m*m, m > 0 && m < 1 && s2-m*m > 0
}

// medianGuess interpolates the cumulative points (0,0), (uᵢ,pᵢ), (1,1)
// linearly at probability 0.5.
func (q *lsq) medianGuess() float64 {
	pu, pp := 0.0, 0.0
	for i, p := range append(q.p, 1) {
		x := 1.0
		if i < len(q.u) {
			x = q.u[i]
		}
		if p >= 0.5 {
			if p == pp {
				return x
			}
			return pu + (x-pu)*(0.5-pp)/(p-pp)
		}
		pu, pp = x, p
	}
	return 0.5
}

// gridStarts returns up to k further starts from a deterministic grid:
// α+β log-spaced from 0.01 to 1e6 and the mean at each stated point,
// between neighbouring points and beyond the outermost ones. For
// diversity it keeps the best mean of each α+β level and returns the k
// best of those, best first.
func (q *lsq) gridStarts(k int) [][2]float64 {
	means := make([]float64, 0, 2*len(q.u)+1)
	prev := 0.0
	for _, x := range q.u {
		means = append(means, (prev+x)/2, x)
		prev = x
	}
	means = append(means, (prev+1)/2)
	type pt struct {
		th [2]float64
		f  float64
	}
	var pts []pt
	const levels = 15
	lo, hi := math.Log(0.01), math.Log(1e6)
	for l := 0; l < levels; l++ {
		ess := math.Exp(lo + (hi-lo)*float64(l)/(levels-1))
		best := pt{f: math.Inf(1)}
		for _, m := range means {
			th := clampBox(logShape(m, ess))
			if f := q.sse(th); f < best.f {
				best = pt{th, f}
			}
		}
		pts = append(pts, best)
	}
	sort.SliceStable(pts, func(a, b int) bool { return pts[a].f < pts[b].f })
	out := make([][2]float64, 0, k)
	for i := 0; i < k && i < len(pts); i++ {
		out = append(out, pts[i].th)
	}
	return out
}

// logShape is θ = (log mα, log (1−m)α) for mean m and α+β = ess.
func logShape(m, ess float64) [2]float64 {
	return [2]float64{math.Log(m * ess), math.Log((1 - m) * ess)}
}

// line is the least-squares line y ≈ a + b·x; ok is false with fewer than
// two distinct x.
func line(x, y []float64) (a, b float64, ok bool) {
	n := float64(len(x))
	if len(x) < 2 {
		return 0, 0, false
	}
	var sx, sy float64
	for i := range x {
		sx += x[i]
		sy += y[i]
	}
	mx, my := sx/n, sy/n
	var sxx, sxy float64
	for i := range x {
		sxx += (x[i] - mx) * (x[i] - mx)
		sxy += (x[i] - mx) * (y[i] - my)
	}
	if sxx == 0 {
		return 0, 0, false
	}
	b = sxy / sxx
	return my - b*mx, b, true
}

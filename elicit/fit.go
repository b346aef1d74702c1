package elicit

import (
	"errors"
	"fmt"
	"math"
	"sort"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/optimize"
	"gonum.org/v1/gonum/stat/distuv"
)

// PoorFitThreshold is the largest probability error |F(xᵢ) − pᵢ| above
// which a fit is reported as poor (WarnPoorFit).
const PoorFitThreshold = 0.05

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
	// WarnNearCertainty: α+β exceeds NearCertaintyESS.
	WarnNearCertainty WarningCode = "near_certainty"
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

// ErrFitFailed is returned (wrapped) when the optimiser cannot produce a
// finite fit. It is never replaced by a guess.
var ErrFitFailed = errors.New("elicit: the least-squares fit did not converge")

// FitQuantiles fits a Beta on [j.Lower, j.Upper] to the judgement by least
// squares on the probability scale,
//
//	minimise S(α, β) = Σᵢ (F(uᵢ; α, β) − pᵢ)²,  uᵢ = (xᵢ − lower)/(upper − lower),
//
// the usual choice in the elicitation literature (O'Hagan et al. 2006,
// "Uncertain Judgements", §6.4). The search runs over (log α, log β) with
// gonum/optimize from a moment-based start; unless that fit misses no
// probability by more than 0.035 (closeFit), from two further starts at
// the same mean with α+β 30 times larger and smaller; and unless the best
// fit then misses by no more than PoorFitThreshold, from a deterministic
// grid of starts over α+β and the mean. A judgement of two pairs is
// matched exactly (|F(xᵢ) − pᵢ| ≤ 1e-10) by a final Newton root-finding
// polish, or refused with ErrFitFailed if no Beta in the search range
// matches it.
func FitQuantiles(j Judgement) (Fit, error) {
	if err := j.Validate(); err != nil {
		return Fit{}, err
	}
	d, sse, resid, err := fitCumulative(j.unit(), j.Probs)
	if err != nil {
		return Fit{}, err
	}
	return newFit(ScaledBeta{Beta: d, Lower: j.Lower, Upper: j.Upper}, j.Probs, j.Values, sse, resid), nil
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
	for i, p := range probs {
		f.Fitted[i] = d.quantileNearFrom(p, values[i], resid[i])
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
	f.Warnings = fitWarnings(d.Beta, f.MaxProbError)
	return f
}

// quantileNear is d.Quantile(p) found by Newton steps (polishQuantile)
// from x0, a value whose probability under d is already near p, such as
// the stated value: a few steps from there cost less than gonum's inverse.
// If the steps do not bring the residual down to rounding level it falls
// back to Quantile.
func (d ScaledBeta) quantileNear(p, x0 float64) float64 {
	return d.quantileNearFrom(p, x0, math.NaN())
}

// quantileNearFrom is quantileNear when F(x0) − p = r0 is already known
// (the fit's residual at a stated value); r0 NaN means unknown.
func (d ScaledBeta) quantileNearFrom(p, x0, r0 float64) float64 {
	u := d.toUnit(x0)
	if u > 0 && u < 1 && p > 0 && p < 1 {
		var y, r float64
		if math.IsNaN(r0) {
			y, r = d.Beta.polishQuantile(p, u, 8)
		} else {
			y, r = d.Beta.polishQuantileFrom(p, u, r0, 8, d.Beta.quantileResid(p))
		}
		if math.Abs(r) <= 1e-13*math.Min(p, 1-p) {
			return d.Lower + d.width()*y
		}
	}
	return d.Quantile(p)
}

// fitWarnings applies the warning rules to a fitted Beta.
func fitWarnings(d Beta, maxErr float64) []Warning {
	w := []Warning{}
	a, b := d.Alpha, d.Beta
	switch {
	case a < 1 && b < 1:
		w = append(w, Warning{WarnUShaped, fmt.Sprintf(
			"The fitted density is U-shaped (alpha %.3g and beta %.3g are both below 1): it says the value is most likely close to one bound or the other, and least likely in the middle. Check with the expert that this is what they meant.", a, b)})
	case a < 1:
		w = append(w, Warning{WarnJShaped, fmt.Sprintf(
			"The fitted density is J-shaped (alpha %.3g is below 1): it rises without limit towards the lower bound. Check with the expert that values right at the lower bound are the most likely.", a)})
	case b < 1:
		w = append(w, Warning{WarnJShaped, fmt.Sprintf(
			"The fitted density is J-shaped (beta %.3g is below 1): it rises without limit towards the upper bound. Check with the expert that values right at the upper bound are the most likely.", b)})
	}
	if maxErr > PoorFitThreshold {
		w = append(w, Warning{WarnPoorFit, fmt.Sprintf(
			"The fitted Beta misses one of the stated probabilities by %.3f (more than %.2f): no single Beta matches these answers well. Show the expert the fit and ask whether they want to revise.", maxErr, PoorFitThreshold)})
	}
	if ess := a + b; ess > NearCertaintyESS {
		w = append(w, Warning{WarnNearCertainty, fmt.Sprintf(
			"The fitted prior is worth about %.0f observed trials (alpha+beta above %d): it implies near-certainty about the value. Check that the expert really is this sure.", ess, NearCertaintyESS)})
	}
	return w
}

// Limits of the search in log-parameter space: α and β in [1e-6, 1e9].
// Outside it the objective is +Inf, so line searches step back.
var (
	logParamMin = math.Log(1e-6)
	logParamMax = math.Log(1e9)
)

const (
	// closeFit is the largest probability error at which the fit from the
	// moment-based start is accepted without trying further starts. Up to
	// PoorFitThreshold two more starts are tried, at the same mean with
	// α+β 30 times larger and smaller; beyond it, the whole grid.
	closeFit = 0.035
	// gridRestarts is how many grid points are used as further starts
	// (all 15 levels of α+β: the starting objective is a poor guide to
	// which basin holds the global minimum).
	gridRestarts = 15
	// exactTol is the largest probability error of an exactly determined
	// (two-pair) fit after the root-finding polish.
	exactTol = 1e-12
	// exactAccept is the largest probability error at which a two-pair
	// fit counts as exact; the polish aims at exactTol but rounding in
	// the CDF at extreme shapes can leave a little more.
	exactAccept = 1e-10
	// edgeMargin: a fit within this distance (in log α or log β) of the
	// search limits is refused as running off to α, β → 0 or ∞.
	edgeMargin = 1.0
	// fdStep is the forward-difference step in log α and log β.
	fdStep = 1e-7
)

// fitCumulative is the generalised least-squares fitter behind
// FitQuantiles and FitChips: it minimises Σ (F(uᵢ; α, β) − pᵢ)² for
// points uᵢ strictly inside (0, 1) and cumulative fractions pᵢ in [0, 1]
// (chips may put 0 or 1 at interior points). The caller validates.
func fitCumulative(u, p []float64) (d Beta, sse float64, resid []float64, err error) {
	q := &lsq{u: u, p: p, r: make([]float64, len(u)), rh: make([]float64, len(u))}
	best, bestF := q.fitFrom(q.momentStart())
	try := func(starts [][2]float64) {
		for _, th := range starts {
			if x, f := q.fitFrom(th); f < bestF {
				best, bestF = x, f
			}
			if q.exactlyDetermined() && q.acceptable(best, exactAccept) {
				return
			}
		}
	}
	if !q.acceptable(best, closeFit) {
		// Neighbouring basins lie mostly along α+β at the same mean.
		m, ess := math.Exp(best[0]), math.Exp(best[0])+math.Exp(best[1])
		m /= ess
		try([][2]float64{clampBox(logShape(m, ess*30)), clampBox(logShape(m, ess/30))})
		if !q.acceptable(best, PoorFitThreshold) {
			try(q.gridStarts(gridRestarts))
		}
	}
	d, err = fittedBeta(best, bestF)
	if err != nil {
		return Beta{}, 0, nil, err
	}
	if q.exactlyDetermined() && !(q.maxAbsResid(best[:]) <= exactAccept) {
		return Beta{}, 0, nil, fmt.Errorf("%w: no Beta with alpha and beta between 1e-6 and 1e9 matches both stated pairs exactly (closest misses by %.3g)", ErrFitFailed, q.maxAbsResid(best[:]))
	}
	q.at(best[:])
	return d, bestF, append([]float64(nil), q.r...), nil
}

// fittedBeta is the Beta at θ = (log α, log β) with objective f, or
// ErrFitFailed if f is not finite or θ lies within edgeMargin of the
// search limits (the fit runs off to α, β → 0 or ∞).
func fittedBeta(th [2]float64, f float64) (Beta, error) {
	d := Beta{Alpha: math.Exp(th[0]), Beta: math.Exp(th[1])}
	if math.IsNaN(f) || math.IsInf(f, 0) || d.Validate() != nil {
		return Beta{}, fmt.Errorf("%w: alpha %v, beta %v, objective %v", ErrFitFailed, d.Alpha, d.Beta, f)
	}
	for _, t := range th {
		if t < logParamMin+edgeMargin || t > logParamMax-edgeMargin {
			return Beta{}, fmt.Errorf("%w: the best fit runs to the edge of the search (alpha %.3g, beta %.3g): no Beta with alpha and beta between 1e-6 and 1e9 fits these answers", ErrFitFailed, d.Alpha, d.Beta)
		}
	}
	return d, nil
}

// fitFrom is a local fit from θ₀, followed for exactly determined data by
// the root-finding polish.
func (q *lsq) fitFrom(th0 [2]float64) ([2]float64, float64) {
	x, f := q.localFit(th0)
	if q.exactlyDetermined() {
		x = q.polishRoot(x)
		f = q.sse(x[:])
	}
	return x, f
}

// acceptable reports whether a fit is good enough to skip further
// starts: exact (exactAccept) for two pairs, and otherwise a largest
// probability error of at most tol. The rule was checked against an
// exhaustive search on random judgements (TestFitFastPath).
func (q *lsq) acceptable(th [2]float64, tol float64) bool {
	if q.exactlyDetermined() {
		return q.maxAbsResid(th[:]) <= exactAccept
	}
	return q.maxAbsResid(th[:]) <= tol
}

// lsq is the least-squares problem in θ = (log α, log β), with the
// residuals and their forward-difference Jacobian cached at the last θ.
type lsq struct {
	u, p  []float64
	r, rh []float64 // residuals at θ and at a shifted θ
	jac   [][2]float64
	th    [2]float64 // θ at which r and jac are cached
	hasR  bool
	hasJ  bool
}

func inBox(th []float64) bool {
	return th[0] >= logParamMin && th[0] <= logParamMax && th[1] >= logParamMin && th[1] <= logParamMax
}

// resid writes F(uᵢ; e^θ₀, e^θ₁) − pᵢ into r.
func (q *lsq) resid(th []float64, r []float64) {
	a, b := math.Exp(th[0]), math.Exp(th[1])
	d := distuv.Beta{Alpha: a, Beta: b}
	for i, x := range q.u {
		r[i] = d.CDF(x) - q.p[i]
	}
}

func (q *lsq) at(th []float64) {
	if q.hasR && q.th[0] == th[0] && q.th[1] == th[1] {
		return
	}
	q.th = [2]float64{th[0], th[1]}
	q.resid(th, q.r)
	q.hasR, q.hasJ = true, false
}

func (q *lsq) jacobian(th []float64) {
	q.at(th)
	if q.hasJ {
		return
	}
	if q.jac == nil {
		q.jac = make([][2]float64, len(q.u))
	}
	for k := 0; k < 2; k++ {
		s := []float64{th[0], th[1]}
		s[k] += fdStep
		q.resid(s, q.rh)
		for i := range q.u {
			q.jac[i][k] = (q.rh[i] - q.r[i]) / fdStep
		}
	}
	q.hasJ = true
}

func (q *lsq) sse(th []float64) float64 {
	if !inBox(th) {
		return math.Inf(1)
	}
	q.at(th)
	s := 0.0
	for _, v := range q.r {
		s += v * v
	}
	return s
}

func (q *lsq) maxAbsResid(th []float64) float64 {
	q.at(th)
	m := 0.0
	for _, v := range q.r {
		m = math.Max(m, math.Abs(v))
	}
	return m
}

// grad is ∇S = 2 Jᵀ r.
func (q *lsq) grad(g, th []float64) {
	q.jacobian(th)
	g[0], g[1] = 0, 0
	for i, v := range q.r {
		g[0] += 2 * q.jac[i][0] * v
		g[1] += 2 * q.jac[i][1] * v
	}
}

// hess is the Gauss–Newton approximation 2 JᵀJ of ∇²S.
func (q *lsq) hess(h *mat.SymDense, th []float64) {
	q.jacobian(th)
	var h00, h01, h11 float64
	for _, j := range q.jac {
		h00 += 2 * j[0] * j[0]
		h01 += 2 * j[0] * j[1]
		h11 += 2 * j[1] * j[1]
	}
	h.SetSym(0, 0, h00)
	h.SetSym(0, 1, h01)
	h.SetSym(1, 1, h11)
}

// localFit minimises the objective from θ₀ with gonum's Newton direction
// (Nocedal & Wright 2006, Algorithm 3.3, on the Gauss–Newton Hessian
// 2JᵀJ) and gonum's backtracking (Armijo) line search, driven through
// optimize.LinesearchMethod's reverse-communication Init/Iterate. Driving
// it directly rather than through optimize.Minimize avoids Minimize's
// goroutine hand-offs, which cost more than the fit itself here. It stops
// when a major iteration improves the objective by less than 1e-10 + 1e-7·S
// and returns the best point seen.
func (q *lsq) localFit(th0 [2]float64) ([2]float64, float64) {
	return q.localFitTol(th0, 1e-10, 1e-7)
}

// localFitTol is localFit stopping when a major iteration improves the
// objective by less than abs + rel·S.
func (q *lsq) localFitTol(th0 [2]float64, abs, rel float64) ([2]float64, float64) {
	best, bestF := th0, q.sse(th0[:])
	if math.IsInf(bestF, 0) || math.IsNaN(bestF) {
		return best, bestF
	}
	loc := &optimize.Location{
		X:        []float64{th0[0], th0[1]},
		F:        bestF,
		Gradient: make([]float64, 2),
		Hessian:  mat.NewSymDense(2, nil),
	}
	q.grad(loc.Gradient, loc.X)
	q.hess(loc.Hessian, loc.X)
	ls := &optimize.LinesearchMethod{
		NextDirectioner: &optimize.Newton{Increase: 5},
		Linesearcher:    &optimize.Backtracking{},
	}
	op, err := ls.Init(loc)
	for evals := 0; err == nil && evals < 300; evals++ {
		if op == optimize.MajorIteration {
			prev := bestF
			if loc.F < bestF {
				best, bestF = [2]float64{loc.X[0], loc.X[1]}, loc.F
			}
			if !(prev-bestF > abs+rel*bestF) {
				break
			}
		} else {
			if op&optimize.FuncEvaluation != 0 {
				loc.F = q.sse(loc.X)
			}
			if op&optimize.GradEvaluation != 0 {
				q.grad(loc.Gradient, loc.X)
			}
			if op&optimize.HessEvaluation != 0 {
				q.hess(loc.Hessian, loc.X)
			}
		}
		op, err = ls.Iterate(loc)
	}
	return best, bestF
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

// polishRoot solves r(θ) = 0 for two residuals by Newton's method with the
// forward-difference Jacobian, keeping a step only while it shrinks the
// largest residual.
func (q *lsq) polishRoot(th [2]float64) [2]float64 {
	cur := q.maxAbsResid(th[:])
	for it := 0; it < 20 && cur > exactTol; it++ {
		q.jacobian(th[:])
		j := q.jac
		det := j[0][0]*j[1][1] - j[0][1]*j[1][0]
		if det == 0 || math.IsNaN(det) {
			break
		}
		r0, r1 := q.r[0], q.r[1]
		d0 := (j[1][1]*r0 - j[0][1]*r1) / det
		d1 := (-j[1][0]*r0 + j[0][0]*r1) / det
		next := [2]float64{th[0] - d0, th[1] - d1}
		if !inBox(next[:]) {
			break
		}
		m := q.maxAbsResid(next[:])
		if !(m < cur) {
			break
		}
		th, cur = next, m
	}
	return th
}

// momentStart is the better (by the objective) of two moment-based starts
// from the stated quantiles: a normal approximation on the probability
// scale, u ≈ m + s·zᵢ with zᵢ = Φ⁻¹(pᵢ), turned into α, β by the method of
// moments; and a logit-normal approximation, logit u ≈ μ + σ·zᵢ, using
// α/β ≈ e^μ and 1/α + 1/β ≈ σ² (the large-α, β forms of the mean and
// variance of logit Y: ψ(α) − ψ(β) and ψ′(α) + ψ′(β); Johnson, Kotz &
// Balakrishnan 1995, ch. 25). Both lines are least-squares lines through
// the pairs with pᵢ strictly inside (0, 1). For the default 5/50/95
// judgement a third start takes the mean and variance from the extended
// Pearson–Tukey approximation, then the method of moments.
func (q *lsq) momentStart() [2]float64 {
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
	if m, v, ok := q.pearsonTukey(); ok && v < m*(1-m) {
		cands = append(cands, logShape(m, m*(1-m)/v-1))
	}
	if len(cands) == 0 {
		cands = append(cands, logShape(q.medianGuess(), 2))
	}
	best, bestF := cands[0], math.Inf(1)
	for _, c := range cands {
		c = clampBox(c)
		if f := q.sse(c[:]); f < bestF {
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
			if f := q.sse(th[:]); f < best.f {
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

func clampBox(th [2]float64) [2]float64 {
	for k := range th {
		th[k] = math.Max(logParamMin, math.Min(logParamMax, th[k]))
		if math.IsNaN(th[k]) {
			th[k] = 0
		}
	}
	return th
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

package elicit

import (
	"container/heap"
	"math"
)

// Why the fit cannot miss a better basin
//
// fitGlobal minimises S(θ) = Σ (F(uᵢ; α, β) − pᵢ)² over the whole box
// MinShape ≤ α, β ≤ MaxShape. It rests on two facts about the Beta
// family.
//
//  1. Monotonicity. I_x(α, β) decreases in α and increases in β: the
//     density ratio of Beta(α+δ, β) to Beta(α, β) is ∝ x^δ, increasing in
//     x, so the family is ordered by likelihood ratio and hence
//     stochastically (Shaked & Shanthikumar 2007, "Stochastic Orders",
//     Thm 1.C.1); likewise in β with (1−x)^δ.
//  2. Single crossing. The CDFs of two different Betas cross at most once
//     inside (0, 1): the log density ratio c + Δα ln x + Δβ ln(1−x) has a
//     derivative Δα/x − Δβ/(1−x) with at most one zero, so the densities
//     cross at most twice, and F₂ − F₁, which is 0 at both ends, has at
//     most one interior zero (the variation-diminishing argument of
//     Karlin 1968, "Total Positivity", ch. 5). Two pairs therefore fix at
//     most one Beta. And along a level curve {F(u_k) = t} of one stated
//     point u_k — a curve on which α and β rise together, by fact 1 —
//     F(uᵢ) rises with α for every uᵢ > u_k and falls for every
//     uᵢ < u_k (near 1 the Beta with the larger β has the larger CDF; near
//     0 the one with the larger α the smaller).
//
// The argument, for the point θ* that the local fits reach (certify):
// any θ with S(θ) < S* has |rᵢ(θ)| < ρ = √S* for every i. Take a pivot
// point k; then t = F(u_k; θ) lies in (p_k − ρ, p_k + ρ), a band between
// two level curves. By facts 1 and 2, F(uᵢ) is monotone in θ₁ = log α
// along the band and in t across it, so its value at one corner of
// {θ₁ ≥ a} ∩ band bounds it over that whole unbounded region; when the
// bound puts F(uᵢ) outside (pᵢ − ρ, pᵢ + ρ), no point east of a can beat
// S*. The same west of a second abscissa leaves only a box R around θ*:
// everything outside R is proved no better than θ*. Inside R the
// residuals are checked against their linear (Gauss–Newton) model at R's
// corners; a second basin inside R would need the residuals to bend away
// from that model by a sizeable share of ρ across R. When they do, local
// fits start from R's four corners (and a grid of starts over the box):
// if none leads below S*, R counts as covered. When R cannot be formed
// (as for poor fits where ρ is large), or a start finds a lower point
// whose own R is not covered in turn, branch and bound (branchAndBound)
// covers the whole box: fact 1 bounds every F(uᵢ) over a
// cell [α₁, α₂]×[β₁, β₂] between its values at (α₂, β₁) and (α₁, β₂),
// hence S from below, and a cell is dropped when that bound is at least
// S* − τ (τ = certTol·S*), or when it lies in the neighbourhood of θ*
// where the residuals keep to their linear model; cells narrower than
// bnbFitWidth get a local fit from their centre. Every basin whose
// minimum is lower than S* − τ lies in a cell that is never dropped, so
// it gets a local fit. TestFitGlobalReference checks the outcome against
// a multi-start search in SciPy on more than 1000 judgements.

// certTol is the relative tolerance τ/S* of the certificate.
const certTol = 1e-10

// certFloor is the absolute part of τ: the rounding of S itself.
const certFloor = 1e-28

// fitResult is the outcome of fitGlobal.
type fitResult struct {
	th        [2]float64
	s         float64
	certified bool // settled by certify (or trivially exact)
	bnb       bool // branch and bound was needed
}

// fitGlobal finds the global minimum of q's objective on the box, from
// the given starts (at least one).
func (q *lsq) fitGlobal(starts [][2]float64) fitResult {
	best := fitResult{s: math.Inf(1)}
	atBest := false // q.r and q.jac hold best.th's
	try := func(st [2]float64) {
		th, s := q.localFit(st)
		atBest = s < best.s
		if atBest {
			best.th, best.s = th, s
		}
	}
	for _, st := range starts {
		try(st)
		if q.trivially(best.s) {
			break
		}
	}
	if q.trivially(best.s) {
		best.certified = true
		return best
	}
	if !atBest {
		q.sseJac(best.th)
	}
	box, ok := q.certify(best.th, best.s)
	if ok {
		best.certified = true
		return best
	}
	// More starts: the corners of R when it could be formed, and a grid.
	// When none of them leads below S*, R is covered: every point outside
	// it is proved no better, and local fits from its four corners all
	// return to θ* or stop higher.
	formed := box[1] > box[0]
	var more [][2]float64
	if formed {
		more = append(more, [2]float64{box[0], box[2]}, [2]float64{box[1], box[3]},
			[2]float64{box[0], box[3]}, [2]float64{box[1], box[2]})
	}
	more = append(more, q.gridStarts(moreStarts)...)
	prev, prevS := best.th, best.s
	for _, st := range more {
		try(st)
	}
	if !(best.s < prevS-q.tau(prevS)) {
		best.th, best.s = prev, prevS
		if formed {
			q.sseJac(best.th)
			best.certified = true
			return best
		}
	} else {
		if !atBest {
			q.sseJac(best.th)
		}
		box, ok := q.certify(best.th, best.s)
		if ok {
			best.certified = true
			return best
		}
		if box[1] > box[0] {
			// R around the new best, covered the same way.
			prev, prevS = best.th, best.s
			for _, c := range [4][2]float64{{box[0], box[2]}, {box[1], box[3]}, {box[0], box[3]}, {box[1], box[2]}} {
				try(c)
			}
			if !(best.s < prevS-q.tau(prevS)) {
				best.th, best.s = prev, prevS
				q.sseJac(best.th)
				best.certified = true
				return best
			}
		}
	}
	if !atBest {
		q.sseJac(best.th)
	}
	return q.branchAndBound(best)
}

// trivially reports whether S is at the rounding level of the residuals,
// where no point can be better.
func (q *lsq) trivially(s float64) bool {
	return s <= certFloor*float64(len(q.u))
}

func (q *lsq) tau(s float64) float64 { return certTol*s + certFloor }

// linTol is the share of ρ by which the residuals may leave their linear
// model at a checked point of R, and linAbs the most in probability
// (for poor fits, where ρ is large).
const (
	linTol = 0.5
	linAbs = 0.02
)

// certify carries out the argument at the top of this file for θ* = th:
// it returns the box R = [θ₁lo, θ₁hi] × [θ₂lo, θ₂hi] outside which no
// point beats S*, and whether the residuals keep to their linear model
// at R's corners. A zero box means R could not be formed. q.r and q.jac
// must hold the residuals and Jacobian at th.
func (q *lsq) certify(th [2]float64, s float64) (box [4]float64, ok bool) {
	n := len(q.u)
	if n < 3 {
		return box, false
	}
	rho := math.Sqrt(s) * (1 + 1e-12)
	r := append([]float64(nil), q.r...)
	jac := append([][2]float64(nil), q.jac...)
	// The pivot: the stated probability nearest ½.
	k := 0
	for i, p := range q.p {
		if math.Abs(p-0.5) < math.Abs(q.p[k]-0.5) {
			k = i
		}
	}
	tLo, tHi := q.p[k]-rho, q.p[k]+rho
	if !(tLo > 0 && tHi < 1) || !(jac[k][1] > 0) {
		return box, false
	}
	slope := -jac[k][0] / jac[k][1]
	// Predicted distances east (dir +1) and west (−1) at which the
	// bounds exclude the region beyond, from the linear model: at (θ₁* ±
	// h, band edge) the residual of point i is rᵢ ± Dᵢh + ratioᵢ(t − F_k*),
	// with Dᵢ its rate along the pivot's level curve.
	hFor := func(dir float64) float64 {
		gapAt := func(h float64) float64 {
			sum := 0.0
			for i := range q.u {
				if i == k {
					continue
				}
				d := dir * (jac[i][0] + jac[i][1]*slope)
				ratio := jac[i][1] / jac[k][1]
				var gap float64
				if (q.u[i] > q.u[k]) == (dir > 0) {
					gap = r[i] + d*h + ratio*(-rho-r[k]) // at the lower edge
				} else {
					gap = -(r[i] + d*h + ratio*(rho-r[k])) // at the upper edge
				}
				if gap >= rho {
					return math.Inf(1)
				}
				if gap > 0 {
					sum += gap * gap
				}
			}
			return sum
		}
		for h := 0.01; h < 64; h *= 1.25 {
			if gapAt(h) >= 1.3*rho*rho {
				return h
			}
		}
		return math.Inf(1)
	}
	hE, hW := hFor(1), hFor(-1)
	if math.IsInf(hE, 0) || math.IsInf(hW, 0) {
		return box, false
	}
	var east, west probe
	done := false
	for try := 0; try < 4 && !done; try++ {
		east = q.excluded(th, k, th[0]+hE, tLo, tHi, rho, +1, slope, jac[k][1])
		west = q.excluded(th, k, th[0]-hW, tLo, tHi, rho, -1, slope, jac[k][1])
		done = east.ok && west.ok
		if !east.ok {
			hE *= 2
		}
		if !west.ok {
			hW *= 2
		}
	}
	if !done {
		return box, false
	}
	box = [4]float64{th[0] - hW, th[0] + hE, west.bLo, east.bHi}
	// The linear model at the four points where R was formed.
	for _, pr := range []probe{east, west} {
		for e, b := range [2]float64{pr.bLo, pr.bHi} {
			d := [2]float64{pr.a - th[0], b - th[1]}
			for i := range q.u {
				lin := r[i] + jac[i][0]*d[0] + jac[i][1]*d[1]
				if dev := math.Abs(pr.resid[e][i] - lin); dev > linTol*rho || dev > linAbs {
					return box, false
				}
			}
		}
	}
	return box, true
}

// probe is one side of R: the abscissa a, the band's edges bLo and bHi
// there, the residuals at (a, bLo) and (a, bHi), and whether the region
// beyond a is excluded.
type probe struct {
	a, bLo, bHi float64
	resid       [2][]float64
	ok          bool
}

// excluded checks the region {θ₁ on the dir side of a} ∩ band of the
// pivot k: it finds the band's edges at θ₁ = a and tests whether some
// point's bound leaves its window there, or the bounds together reach S*.
func (q *lsq) excluded(th [2]float64, k int, a, tLo, tHi, rho, dir, slope, dF float64) probe {
	// First guesses from the linear model at θ*, where F(u_k) = p_k + r_k.
	guess := th[1] + slope*(a-th[0])
	fk := q.p[k] + q.r[k]
	pr := probe{a: a}
	var okLo, okHi bool
	var gLo, gHi float64
	// The band's edges need not be exact, only on the outer side of
	// t_lo and t_hi (which widens the band a little).
	slack := 0.02 * rho
	pr.bLo, gLo, okLo = q.levelTheta2(k, a, tLo, guess+(tLo-fk)/dF, -1, slack, dF)
	pr.bHi, gHi, okHi = q.levelTheta2(k, a, tHi, guess+(tHi-fk)/dF, +1, slack, dF)
	if !okLo || !okHi {
		return pr
	}
	const margin = 1e-13
	for e, b := range [2]float64{pr.bLo, pr.bHi} {
		c := newIncBeta(math.Exp(a), math.Exp(b))
		pr.resid[e] = make([]float64, len(q.u))
		for i := range q.u {
			if i == k {
				// The pivot's residual is known from the level solve.
				pr.resid[e][i] = [2]float64{tLo - q.p[k] + gLo, tHi - q.p[k] + gHi}[e]
				continue
			}
			lo, up := c.tails(q.u[i], q.y[i])
			pr.resid[e][i] = q.resid(i, lo, up)
		}
		q.evals += len(q.u) - 1
	}
	sum := 0.0
	for i := range q.u {
		if i == k {
			continue
		}
		var gap float64
		if rises := (q.u[i] > q.u[k]) == (dir > 0); rises {
			// F(uᵢ) is smallest at (a, lower edge).
			gap = pr.resid[0][i] - margin
		} else {
			gap = -pr.resid[1][i] - margin
		}
		if gap >= rho {
			pr.ok = true
			return pr
		}
		if gap > 0 {
			sum += gap * gap
		}
	}
	pr.ok = sum >= rho*rho
	return pr
}

// levelTheta2 finds θ₂ with F(u_k; e^θ₁, e^θ₂) on the far side of t: at
// most t for side −1 and at least t for side +1, by no more than slack,
// by secant steps in θ₂ (F rises with θ₂; the first step uses slope, the
// pivot's ∂F/∂θ₂ at θ*) inside an expanding bracket. ok is false when θ₂
// would leave [logParamMin − 40, logParamMax + 40].
func (q *lsq) levelTheta2(k int, th1, t, guess, side, slack, slope float64) (float64, float64, bool) {
	a := math.Exp(th1)
	lo, hi := math.Inf(-1), math.Inf(1)
	x := guess
	prevX, prevG := math.NaN(), math.NaN()
	const limit = 40
	for it := 0; it < 100; it++ {
		if x < logParamMin-limit || x > logParamMax+limit {
			return x, 0, false
		}
		c := newIncBeta(a, math.Exp(x))
		l, u := c.tails(q.u[k], q.y[k])
		q.evals++
		// Residual on the smaller tail.
		var g float64
		if t > 0.5 {
			g = (1 - t) - u
		} else {
			g = l - t
		}
		// g is F(u_k) − t in either tail's form.
		if side < 0 && g <= 0 && g >= -slack {
			return x, g, true
		}
		if side > 0 && g >= 0 && g <= slack {
			return x, g, true
		}
		if g < 0 {
			lo = x
		} else {
			hi = x
		}
		if d := (g - prevG) / (x - prevX); d > 0 {
			slope = d // secant through the last two points
		}
		target := side * slack / 2
		next := x - (g-target)/slope
		prevX, prevG = x, g
		if !(next > lo && next < hi) || math.IsNaN(next) {
			switch {
			case math.IsInf(lo, 0):
				next = hi - 2
			case math.IsInf(hi, 0):
				next = lo + 2
			default:
				next = (lo + hi) / 2
			}
		}
		if hi-lo < 1e-14 {
			return x, g, (side < 0 && g <= 0) || (side > 0 && g >= 0)
		}
		x = next
	}
	return x, 0, false
}

// modelBox is the largest square [θ* ± h] (h from a fixed list, 0 when
// none) at whose corners and edge midpoints every residual keeps within
// linTol·ρ (and within linAbs) of its linear model at θ* and S is at
// least S* − τ.
func (q *lsq) modelBox(th [2]float64, s float64) float64 {
	q.sseJac(th)
	r := append([]float64(nil), q.r...)
	jac := append([][2]float64(nil), q.jac...)
	rho := math.Sqrt(s)
	for _, h := range []float64{0.5, 0.2, 0.1, 0.05, 0.02, 0.01, 0.005, 0.002, 0.001} {
		good := true
		for _, d := range [8][2]float64{{h, h}, {h, -h}, {-h, h}, {-h, -h}, {h, 0}, {-h, 0}, {0, h}, {0, -h}} {
			pt := [2]float64{th[0] + d[0], th[1] + d[1]}
			if q.sse(pt) < s-q.tau(s) {
				good = false
				break
			}
			for i := range q.u {
				lin := r[i] + jac[i][0]*d[0] + jac[i][1]*d[1]
				if dev := math.Abs(q.r[i] - lin); dev > linTol*rho || dev > linAbs {
					good = false
					break
				}
			}
			if !good {
				break
			}
		}
		if good {
			return h
		}
	}
	return 0
}

// Limits of the branch and bound.
const (
	// bnbFitWidth: a bnbCell narrower than this (in log α and log β) gets a
	// local fit from its centre.
	bnbFitWidth = 1.0
	// bnbMinWidth: a bnbCell narrower than this is not split further.
	bnbMinWidth = 1e-9
	// bnbMaxCells bounds the work; past it the fit is returned without
	// proof (certified false), which the tests count.
	bnbMaxCells = 150
)

type bnbCell struct {
	lo, hi [2]float64
	lb     float64
	fitted bool
}

type bnbHeap []bnbCell

func (h bnbHeap) Len() int           { return len(h) }
func (h bnbHeap) Less(i, j int) bool { return h[i].lb < h[j].lb }
func (h bnbHeap) Swap(i, j int)      { h[i], h[j] = h[j], h[i] }
func (h *bnbHeap) Push(x any)        { *h = append(*h, x.(bnbCell)) }
func (h *bnbHeap) Pop() any {
	old := *h
	c := old[len(old)-1]
	*h = old[:len(old)-1]
	return c
}

// branchAndBound is the fallback search of the comment at the top of
// this file, from the best local fit found so far.
func (q *lsq) branchAndBound(best fitResult) fitResult {
	best.bnb = true
	corners := map[[2]float64][]float64{}
	// corner returns the residuals at θ (cached: neighbouring cells share
	// corners).
	corner := func(th [2]float64) []float64 {
		if r, ok := corners[th]; ok {
			return r
		}
		c := newIncBeta(math.Exp(th[0]), math.Exp(th[1]))
		r := make([]float64, len(q.u))
		for i := range q.u {
			lo, up := c.tails(q.u[i], q.y[i])
			r[i] = q.resid(i, lo, up)
		}
		q.evals += len(q.u)
		corners[th] = r
		return r
	}
	lower := func(c *bnbCell) {
		// Smallest F at (α_hi, β_lo), largest at (α_lo, β_hi).
		rLo := corner([2]float64{c.hi[0], c.lo[1]})
		rHi := corner([2]float64{c.lo[0], c.hi[1]})
		s := 0.0
		for i := range rLo {
			switch {
			case rLo[i] > 0:
				s += rLo[i] * rLo[i]
			case rHi[i] < 0:
				s += rHi[i] * rHi[i]
			}
		}
		c.lb = s
	}
	// The neighbourhood of the best point where the residuals keep to
	// their linear model: cells inside it are not searched.
	var near [4]float64
	// setNear finds the neighbourhood and fits from its four corners: a
	// corner that leads to a lower point replaces the best, and the search
	// for the neighbourhood starts again there.
	var setNear func()
	setNear = func() {
		h := q.modelBox(best.th, best.s)
		near = [4]float64{best.th[0] - h, best.th[0] + h, best.th[1] - h, best.th[1] + h}
		if h == 0 {
			return
		}
		for _, c := range [4][2]float64{{near[0], near[2]}, {near[0], near[3]}, {near[1], near[2]}, {near[1], near[3]}} {
			if th, s := q.localFit(c); s < best.s-q.tau(best.s) {
				best.th, best.s = th, s
				setNear()
				return
			}
		}
	}
	setNear()
	inNear := func(c bnbCell) bool {
		return c.lo[0] >= near[0] && c.hi[0] <= near[1] && c.lo[1] >= near[2] && c.hi[1] <= near[3]
	}
	h := &bnbHeap{}
	const initial = 8
	w := (logParamMax - logParamMin) / initial
	for i := 0; i < initial; i++ {
		for j := 0; j < initial; j++ {
			c := bnbCell{lo: [2]float64{logParamMin + float64(i)*w, logParamMin + float64(j)*w}}
			c.hi = [2]float64{c.lo[0] + w, c.lo[1] + w}
			if i == initial-1 {
				c.hi[0] = logParamMax
			}
			if j == initial-1 {
				c.hi[1] = logParamMax
			}
			lower(&c)
			heap.Push(h, c)
		}
	}
	processed := 0
	best.certified = true
	for h.Len() > 0 {
		c := heap.Pop(h).(bnbCell)
		if c.lb >= best.s-q.tau(best.s) {
			break // the heap is ordered by bound: every bnbCell left is no better
		}
		if inNear(c) {
			continue
		}
		processed++
		budget := bnbMaxCells
		if q.cells > 0 {
			budget = q.cells
		}
		if processed > budget {
			best.certified = false
			break
		}
		width := math.Max(c.hi[0]-c.lo[0], c.hi[1]-c.lo[1])
		if width <= bnbFitWidth && !c.fitted {
			c.fitted = true
			mid := [2]float64{(c.lo[0] + c.hi[0]) / 2, (c.lo[1] + c.hi[1]) / 2}
			th, s := q.localFit(mid)
			if s < best.s-q.tau(best.s) {
				best.th, best.s = th, s
				setNear()
			}
			if c.lb >= best.s-q.tau(best.s) || inNear(c) {
				continue
			}
		}
		if width <= bnbMinWidth {
			best.certified = false
			continue
		}
		// Split in four.
		m := [2]float64{(c.lo[0] + c.hi[0]) / 2, (c.lo[1] + c.hi[1]) / 2}
		for _, part := range [4][2][2]float64{
			{{c.lo[0], c.lo[1]}, {m[0], m[1]}},
			{{m[0], c.lo[1]}, {c.hi[0], m[1]}},
			{{c.lo[0], m[1]}, {m[0], c.hi[1]}},
			{{m[0], m[1]}, {c.hi[0], c.hi[1]}},
		} {
			d := bnbCell{lo: part[0], hi: part[1], fitted: c.fitted}
			lower(&d)
			if d.lb < best.s-q.tau(best.s) {
				heap.Push(h, d)
			}
		}
	}
	q.sseJac(best.th)
	return best
}

package elicit

import "math"

// lsq is the least-squares problem behind every Beta fit,
//
//	S(θ) = Σᵢ rᵢ(θ)²,  rᵢ = F(uᵢ; α, β) − pᵢ,  θ = (log α, log β),
//
// for points uᵢ strictly inside (0, 1) and cumulative probabilities pᵢ
// in [0, 1]. A residual with pᵢ > ½ is formed on the upper tail,
// rᵢ = (1 − pᵢ) − (1 − F), which keeps its digits when both are near 1.
// The search box is MinShape ≤ α, β ≤ MaxShape.
type lsq struct {
	u, p []float64
	y, q []float64 // 1 − uᵢ, 1 − pᵢ
	r    []float64 // residuals at the last evaluation
	jac  [][2]float64
	// evals counts evaluations of I_x(α, β) (with or without
	// derivatives), for the tests and benchmarks.
	evals int
}

func newLSQ(u, p []float64) *lsq {
	n := len(u)
	q := &lsq{u: u, p: p, y: make([]float64, n), q: make([]float64, n), r: make([]float64, n), jac: make([][2]float64, n)}
	for i := range u {
		q.y[i] = 1 - u[i]
		q.q[i] = 1 - p[i]
	}
	return q
}

// The search box in θ.
var (
	logParamMin = math.Log(MinShape)
	logParamMax = math.Log(MaxShape)
)

func inBox(th [2]float64) bool {
	return th[0] >= logParamMin && th[0] <= logParamMax && th[1] >= logParamMin && th[1] <= logParamMax
}

// resid is rᵢ from the tails (lower, upper) of F at uᵢ.
func (q *lsq) resid(i int, lower, upper float64) float64 {
	if q.p[i] > 0.5 {
		return q.q[i] - upper
	}
	return lower - q.p[i]
}

// sse is S(θ), with the residuals left in q.r; +Inf outside the box.
func (q *lsq) sse(th [2]float64) float64 {
	if !inBox(th) {
		return math.Inf(1)
	}
	c := newIncBeta(math.Exp(th[0]), math.Exp(th[1]))
	s := 0.0
	for i := range q.u {
		lo, up := c.tails(q.u[i], q.y[i])
		q.r[i] = q.resid(i, lo, up)
		s += q.r[i] * q.r[i]
	}
	q.evals += len(q.u)
	return s
}

// sseJac is S(θ) with the residuals and their Jacobian
// ∂rᵢ/∂θ = (α ∂F/∂α, β ∂F/∂β) left in q.r and q.jac.
func (q *lsq) sseJac(th [2]float64) float64 {
	a, b := math.Exp(th[0]), math.Exp(th[1])
	c := newIncBeta(a, b).withDerivs()
	s := 0.0
	for i := range q.u {
		lo, up, da, db := c.grad(q.u[i], q.y[i])
		q.r[i] = q.resid(i, lo, up)
		q.jac[i] = [2]float64{a * da, b * db}
		s += q.r[i] * q.r[i]
	}
	q.evals += len(q.u)
	return s
}

func (q *lsq) maxAbsResid() float64 {
	m := 0.0
	for _, v := range q.r {
		m = math.Max(m, math.Abs(v))
	}
	return m
}

// normalEq returns JᵀJ (as h00, h01, h11) and Jᵀr at the last sseJac.
func (q *lsq) normalEq() (h00, h01, h11, g0, g1 float64) {
	for i, j := range q.jac {
		h00 += j[0] * j[0]
		h01 += j[0] * j[1]
		h11 += j[1] * j[1]
		g0 += j[0] * q.r[i]
		g1 += j[1] * q.r[i]
	}
	return
}

// Stopping rules of localFit.
const (
	// lmStep: the fit stops when an accepted step moves θ by less than
	// this in both coordinates (log α and log β); by then Gauss–Newton
	// has converged to far below the certificate's tolerance.
	lmStep = 1e-11
	// lmMaxIter bounds the iterations of one local fit.
	lmMaxIter = 200
	// lmRound: a step whose predicted decrease of S is below this share
	// of S is lost in the rounding of S itself (about n·2⁻⁵² relative).
	lmRound = 1e-14
)

// localFit minimises S from θ₀ inside the search box by the
// Levenberg–Marquardt method (Levenberg 1944; Marquardt 1963, "An
// algorithm for least-squares estimation of nonlinear parameters",
// J. SIAM 11(2): 431–441; Nocedal & Wright 2006, "Numerical
// Optimization", 2nd ed., §10.3): the step δ solves
// (JᵀJ + λ·diag(JᵀJ)) δ = −Jᵀr in closed form (a 2×2 system), with the
// analytic Jacobian of incBeta.grad; λ shrinks after a step that lowers
// S and grows after one that does not. A coordinate at a bound of the
// box whose gradient points out of the box is held there (a projected
// step). It returns the best point and its objective, with q.r and
// q.jac evaluated there.
func (q *lsq) localFit(th0 [2]float64) (th [2]float64, s float64) {
	th = clampBox(th0)
	s = q.sseJac(th)
	if math.IsNaN(s) || math.IsInf(s, 0) {
		return th, s
	}
	lambda := 1e-3
	for it := 0; it < lmMaxIter && s > 0; it++ {
		h00, h01, h11, g0, g1 := q.normalEq()
		free := [2]bool{true, true}
		for k, g := range [2]float64{g0, g1} {
			if (th[k] <= logParamMin && g > 0) || (th[k] >= logParamMax && g < 0) {
				free[k] = false
			}
		}
		improved := false
		for try := 0; try < 30; try++ {
			d := lmStepSolve(h00, h01, h11, g0, g1, lambda, free)
			next := clampBox([2]float64{th[0] + d[0], th[1] + d[1]})
			d = [2]float64{next[0] - th[0], next[1] - th[1]}
			// The decrease the Gauss–Newton model predicts for the step;
			// once it is at the rounding level of S, S is converged.
			pred := -2*(g0*d[0]+g1*d[1]) - (h00*d[0]*d[0] + 2*h01*d[0]*d[1] + h11*d[1]*d[1])
			if next == th || pred <= lmRound*s {
				break
			}
			sn := q.sseJac(next)
			if sn < s {
				moved := math.Max(math.Abs(next[0]-th[0]), math.Abs(next[1]-th[1]))
				th, s = next, sn
				lambda = math.Max(lambda/5, 1e-12)
				improved = true
				if moved <= lmStep {
					return th, s
				}
				break
			}
			lambda *= 8
			if lambda > 1e16 {
				break
			}
		}
		if !improved {
			// q.r and q.jac may hold a rejected trial: evaluate at th again.
			return th, q.sseJac(th)
		}
	}
	return th, s
}

// lmStepSolve solves (H + λ diag H + εI) δ = −g for the free coordinates.
func lmStepSolve(h00, h01, h11, g0, g1, lambda float64, free [2]bool) [2]float64 {
	eps := 1e-300 + 1e-14*(h00+h11)
	a00 := h00*(1+lambda) + eps
	a11 := h11*(1+lambda) + eps
	switch {
	case free[0] && free[1]:
		det := a00*a11 - h01*h01
		if !(det > 0) {
			return [2]float64{-g0 / a00, -g1 / a11}
		}
		return [2]float64{(-g0*a11 + g1*h01) / det, (-g1*a00 + g0*h01) / det}
	case free[0]:
		return [2]float64{-g0 / a00, 0}
	case free[1]:
		return [2]float64{0, -g1 / a11}
	}
	return [2]float64{}
}

func clampBox(th [2]float64) [2]float64 {
	for k := range th {
		if math.IsNaN(th[k]) {
			th[k] = 0
		}
		th[k] = math.Max(logParamMin, math.Min(logParamMax, th[k]))
	}
	return th
}

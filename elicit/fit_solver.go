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
	// rKeep, jacKeep: localFit's copy of r and jac at its current point.
	rKeep   []float64
	jacKeep [][2]float64
	// evals counts evaluations of I_x(α, β) (with or without
	// derivatives), for the tests and benchmarks.
	evals int
	// cells, when positive, replaces bnbMaxCells as the branch and
	// bound's budget.
	cells int
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
// Optimization", 2nd ed., §10.3) with the analytic Jacobian of
// incBeta.grad. The model Hessian is JᵀJ + A, where A estimates the
// residual curvature Σ rᵢ∇²rᵢ that Gauss–Newton leaves out, by the
// structured secant update of Dennis, Gay & Welsch (1981, "An adaptive
// nonlinear least-squares algorithm", ACM TOMS 7(3): 348–368): after a
// step s, A s = (J₊ − J)ᵀ r₊, imposed by the symmetric (Powell) rank-two
// update. With it the iteration converges superlinearly also when the
// residuals are not small, where Gauss–Newton alone converges only
// linearly. The step solves (JᵀJ + A + λ·diag(JᵀJ)) δ = −Jᵀr in closed
// form (a 2×2 system; A is dropped when it would make the matrix
// indefinite); λ shrinks after a step that lowers S and grows after one
// that does not. A coordinate at a bound of the box whose gradient
// points out of the box is held there (a projected step). It returns the
// best point and its objective, with q.r and q.jac evaluated there.
func (q *lsq) localFit(th0 [2]float64) (th [2]float64, s float64) {
	th = clampBox(th0)
	s = q.sseJac(th)
	if math.IsNaN(s) || math.IsInf(s, 0) {
		return th, s
	}
	n := len(q.u)
	if cap(q.rKeep) < n {
		q.rKeep, q.jacKeep = make([]float64, n), make([][2]float64, n)
	}
	rKeep, jacKeep := q.rKeep[:n], q.jacKeep[:n]
	var a00, a01, a11 float64
	lambda := 1e-3
	for it := 0; it < lmMaxIter && s > 0; it++ {
		h00, h01, h11, g0, g1 := q.normalEq()
		copy(rKeep, q.r)
		copy(jacKeep, q.jac)
		free := [2]bool{true, true}
		for k, g := range [2]float64{g0, g1} {
			if (th[k] <= logParamMin && g > 0) || (th[k] >= logParamMax && g < 0) {
				free[k] = false
			}
		}
		m00, m01, m11 := h00+a00, h01+a01, h11+a11
		if !(m00 > 0 && m11 > 0 && m00*m11 > m01*m01) {
			m00, m01, m11 = h00, h01, h11
			a00, a01, a11 = 0, 0, 0
		}
		// Converged when the undamped model step predicts a decrease at
		// the rounding level of S.
		if d, ok := lmStepSolve(m00, m01, m11, h00, h11, g0, g1, 0, free); ok {
			if lmPredict(m00, m01, m11, g0, g1, d) <= lmRound*s {
				return th, s
			}
		}
		improved, fresh := false, false
		for try := 0; try < 40; try++ {
			d, ok := lmStepSolve(m00, m01, m11, h00, h11, g0, g1, lambda, free)
			if !ok {
				lambda = math.Max(lambda*8, 1e-6)
				continue
			}
			// A step that would leave the box is shortened to its edge
			// (a projection would turn it).
			if t := boxFraction(th, d); t < 1 {
				d = [2]float64{t * d[0], t * d[1]}
			}
			next := clampBox([2]float64{th[0] + d[0], th[1] + d[1]})
			d = [2]float64{next[0] - th[0], next[1] - th[1]}
			if next == th || lmPredict(m00, m01, m11, g0, g1, d) <= 0 {
				// At an edge with nowhere to go along the step: hold the
				// coordinates at their bounds and solve again.
				held := false
				for k := range th {
					if free[k] && (th[k] <= logParamMin || th[k] >= logParamMax) {
						free[k], held = false, true
					}
				}
				if held {
					continue
				}
				break
			}
			sn := q.sseJac(next)
			fresh = true
			if sn < s {
				moved := math.Max(math.Abs(d[0]), math.Abs(d[1]))
				// y# = (J₊ − J)ᵀ r₊, and the Powell symmetric update of A.
				var y0, y1 float64
				for i, r := range q.r {
					y0 += (q.jac[i][0] - jacKeep[i][0]) * r
					y1 += (q.jac[i][1] - jacKeep[i][1]) * r
				}
				v0 := y0 - (a00*d[0] + a01*d[1])
				v1 := y1 - (a01*d[0] + a11*d[1])
				if ss := d[0]*d[0] + d[1]*d[1]; ss > 0 {
					vs := (v0*d[0] + v1*d[1]) / (ss * ss)
					a00 += 2*v0*d[0]/ss - vs*d[0]*d[0]
					a01 += (v0*d[1]+v1*d[0])/ss - vs*d[0]*d[1]
					a11 += 2*v1*d[1]/ss - vs*d[1]*d[1]
				}
				th, s = next, sn
				lambda = math.Max(lambda/5, 1e-12)
				improved, fresh = true, false
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
			if fresh {
				// q.r and q.jac hold a rejected trial: put back th's.
				copy(q.r, rKeep)
				copy(q.jac, jacKeep)
			}
			return th, s
		}
	}
	return th, s
}

// lmPredict is the decrease of S the model predicts for the step d:
// −2gᵀd − dᵀMd (S = Σr², so its gradient is 2g and its model Hessian 2M).
func lmPredict(m00, m01, m11, g0, g1 float64, d [2]float64) float64 {
	return -2*(g0*d[0]+g1*d[1]) - (m00*d[0]*d[0] + 2*m01*d[0]*d[1] + m11*d[1]*d[1])
}

// lmStepSolve solves (M + λ diag H + εI) δ = −g for the free
// coordinates, with M the model Hessian and H = JᵀJ; ok is false when
// the system is singular to working precision (then λ must grow).
func lmStepSolve(m00, m01, m11, h00, h11, g0, g1, lambda float64, free [2]bool) (d [2]float64, ok bool) {
	eps := 1e-300 + 1e-14*(h00+h11)
	a00 := m00 + lambda*h00 + eps
	a11 := m11 + lambda*h11 + eps
	switch {
	case free[0] && free[1]:
		det := a00*a11 - m01*m01
		if !(det > 1e-12*a00*a11) {
			return d, false
		}
		return [2]float64{(-g0*a11 + g1*m01) / det, (-g1*a00 + g0*m01) / det}, true
	case free[0]:
		return [2]float64{-g0 / a00, 0}, a00 > 0
	case free[1]:
		return [2]float64{0, -g1 / a11}, a11 > 0
	}
	return d, true
}

// boxFraction is the largest t ≤ 1 with th + t·d inside the box.
func boxFraction(th, d [2]float64) float64 {
	t := 1.0
	for k := range th {
		switch {
		case th[k]+d[k] > logParamMax && d[k] > 0:
			t = math.Min(t, (logParamMax-th[k])/d[k])
		case th[k]+d[k] < logParamMin && d[k] < 0:
			t = math.Min(t, (logParamMin-th[k])/d[k])
		}
	}
	return math.Max(t, 0)
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

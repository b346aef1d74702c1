package elicit

import (
	"math"

	"gonum.org/v1/gonum/mathext"
)

// The credible intervals of one posterior Beta(a, b) that the sample-size
// criteria sum over the outcomes of a planned study: widths at a level
// and coverages at a length, for equal-tailed and highest-density
// intervals. They give the same intervals as EqualTailed and HDI (the
// tests check them against both), but each starts from the answer for the
// neighbouring outcome, moved by the shift of the posterior mean, so that
// two or three Newton steps replace a search from nothing: a criterion at
// n trials needs n + 1 of them, and finding the smallest n evaluates many
// n. Measured against EqualTailed and HDI, this is the bottleneck of the
// search (see BenchmarkCriterion).

// posterior is Beta(a, b) with its log normalising constant; ib is set,
// and own true, where gonum's RegIncBeta is not accurate enough (see
// cdf).
type posterior struct {
	a, b, lnB float64
	own       bool
	ib        incBeta
}

// gonumMaxShape is the largest shape at which cdf and sf use gonum's
// RegIncBeta (see cdf).
const gonumMaxShape = 1e5

func newPosterior(a, b float64) posterior {
	if a < 1 || b < 1 || a > gonumMaxShape || b > gonumMaxShape {
		ib := newIncBeta(a, b)
		return posterior{a: a, b: b, lnB: ib.lnB, own: true, ib: ib}
	}
	return posterior{a: a, b: b, lnB: mathext.Lbeta(a, b)}
}

// cdf is I_x(a, b); sf is 1 − I_x(a, b) = I_{1−x}(b, a), which keeps its
// relative precision in the upper tail. Where a shape is below 1 or above
// gonumMaxShape they are Parley's incBeta. gonum's RegIncBeta is off by
// up to several per cent where the second shape is about 0.01 or less and
// 1 − x at most 1e-6 (I_{1−1e-7}(10⁴, 0.001) is 0.0063124 by R 4.2's
// pbeta, 0.0057761 by gonum), and in the bulk of large shapes, where it
// stops its continued fraction after 300 terms: I_{0.5}(10500035,
// 10499965) is 0.493906 by R, 0.500040 by gonum, 2e-4 off at shapes of
// 3·10⁶ and 4e-7 at 10⁶ (TestPosteriorTails), enough to move which
// outcomes of a planned study meet an assurance goal. Elsewhere gonum's
// is used: its error there is the cancellation incBeta's doc describes
// (1e-10 relative at shapes of 10⁵), and in the bulk of moderate shapes
// it is several times faster (measured with BenchmarkCriterion; only the
// outcomes at the ends of a planned study leave a posterior shape below
// 1).
func (p posterior) cdf(x float64) float64 {
	switch {
	case x <= 0:
		return 0
	case x >= 1:
		return 1
	case p.own:
		lower, _ := p.ib.tails(x, 1-x)
		return lower
	}
	return mathext.RegIncBeta(p.a, p.b, x)
}

func (p posterior) sf(x float64) float64 {
	switch {
	case x <= 0:
		return 1
	case x >= 1:
		return 0
	case p.own:
		_, upper := p.ib.tails(x, 1-x)
		return upper
	}
	return mathext.RegIncBeta(p.b, p.a, 1-x)
}

// pdf is x^(a−1) (1−x)^(b−1) / B(a, b) inside (0, 1).
func (p posterior) pdf(x float64) float64 {
	if !(x > 0 && x < 1) {
		return 0
	}
	return math.Exp((p.a-1)*math.Log(x) + (p.b-1)*math.Log1p(-x) - p.lnB)
}

func (p posterior) mean() float64 { return p.a / (p.a + p.b) }

// mirror is Beta(b, a), the distribution of 1 − X.
func (p posterior) mirror() posterior {
	m := posterior{a: p.b, b: p.a, lnB: p.lnB, own: p.own}
	if p.own {
		m.ib = newIncBeta(p.b, p.a)
	}
	return m
}

// warm carries the answers for one outcome over to the next as starts.
// Zero is no start. The fixed-length intervals and the highest-density
// widths are computed on the posterior or its mirror (see oriented), and
// keep a start for each: index 0 as is, 1 mirrored.
type warm struct {
	started bool
	mean    float64    // the last posterior's mean
	shift   float64    // the change of mean from the outcome before
	q       [2]float64 // lower-tail quantiles of the posterior and its mirror
	c       [2]float64 // where the last fixed-length interval began
	w       [2]float64 // the last highest-density width
	wc      [2]float64 // where that interval began
}

// move records the next outcome's posterior.
func (s *warm) move(p posterior) {
	m := p.mean()
	if s.started {
		s.shift = m - s.mean
	}
	s.started, s.mean = true, m
}

// oriented returns the Beta to compute an interval's width or coverage
// with, which index of warm's starts it uses, and the shift of its mean:
// the posterior itself when its mass leans towards 0 (a ≤ b), else its
// mirror Beta(b, a), the distribution of 1 − X, which has the same widths
// and coverages. Either way the interval's ends near the bound the mass
// leans to are distances from that bound, which keep their precision
// (an end at 1 − 1e-14 is 1e-14 in the mirror).
func (p posterior) oriented(s *warm) (posterior, int, float64) {
	if p.a > p.b {
		return p.mirror(), 1, -s.shift
	}
	return p, 0, s.shift
}

// lowerQuantile is the quantile at q, found by Newton's method on
// log F(e^y) = log q in y = log x, which is nearly straight in the lower
// tail (F(x) ≈ C·x^a there), from x0 when 0 < x0 < 1 and otherwise as
// Beta.Quantile computes it, from gonum's inverse. It keeps relative
// precision in x. Beta.Quantile itself is not called: it refuses shapes
// above MaxShape with NaN, and a prior at the envelope's edge has
// posteriors beyond it (Beta(1e7, 1e7) after 10 trials;
// TestCriterionBeyondMaxShape).
func (p posterior) lowerQuantile(q, x0 float64) float64 {
	if !(x0 > 0 && x0 < 1) {
		c := newIncBeta(p.a, p.b)
		return c.quantileFrom(q, mathext.InvRegIncBeta(p.a, p.b, q))
	}
	lq := math.Log(q)
	fdf := func(y float64) (float64, float64) {
		x := math.Exp(y)
		f := p.cdf(x)
		if !(f > 0) {
			return math.Inf(-1), math.Inf(1)
		}
		return math.Log(f) - lq, x * p.pdf(x) / f
	}
	return math.Exp(newtonRoot(fdf, math.Log(x0), -745, 0, 0, 1e-9, 1e-14))
}

// equalWidth is the width of the equal-tailed interval with tail mass t
// on each side, Q(1 − t) − Q(t) = 1 − Q'(t) − Q(t) with Q' the quantile
// of the mirror Beta(b, a), so both ends keep their relative precision.
func (p posterior) equalWidth(t float64, s *warm) float64 {
	lo := p.lowerQuantile(t, s.q[0]+s.shift)
	hiMirror := p.mirror().lowerQuantile(t, s.q[1]-s.shift)
	s.q = [2]float64{lo, hiMirror}
	return (1 - hiMirror) - lo
}

// equalCoverage is the coverage of the equal-tailed interval of length
// l < 1: [c, c + l] with F(c) = 1 − F(c + l), the root of
// F(c) − S(c + l), which rises with c from −S(l) at c = 0 to F(1 − l) at
// c = 1 − l. The coverage is then 1 − F(c) − S(c + l).
func (p posterior) equalCoverage(l float64, s *warm) float64 {
	q, k, shift := p.oriented(s)
	fdf := func(c float64) (float64, float64) {
		return q.cdf(c) - q.sf(c+l), q.pdf(c) + q.pdf(c+l)
	}
	x0 := s.c[k] + shift
	if !(s.c[k] > 0 && x0 > 0 && x0 < 1-l) {
		x0 = math.Min(math.Max(q.mean()-l/2, 0), 1-l) // the interval round the mean
	}
	c := newtonRoot(fdf, x0, 0, 1-l, 1e-15, 1e-300, 1e-17)
	s.c[k] = c
	return 1 - q.cdf(c) - q.sf(c+l)
}

// hpdStart returns where the highest-density interval of length l begins
// when it is held against a bound, and interior false; or interior true
// when the density has an interior mode (a > 1 and b > 1). The cases are
// HDI's: non-increasing density, [0, l]; non-decreasing, [1 − l, 1];
// uniform, the central interval; U-shaped, the end with more probability.
func (p posterior) hpdStart(l float64) (c float64, interior bool) {
	a, b := p.a, p.b
	switch {
	case a == 1 && b == 1:
		return (1 - l) / 2, false
	case a <= 1 && b >= 1:
		return 0, false
	case b <= 1 && a >= 1:
		return 1 - l, false
	case a < 1 && b < 1:
		if p.cdf(l) >= p.sf(1-l) {
			return 0, false
		}
		return 1 - l, false
	}
	return 0, true
}

// hpdAt is where the highest-density interval of length l begins for
// a, b > 1: the c in (0, 1 − l) with f(c) = f(c + l), the root of
//
//	g(c) = (a−1)·log(1 + l/c) − (b−1)·log(1 + l/(1 − c − l)),
//
// the log density's rise over [c, c + l], which falls with c from +∞ to
// −∞ (the density is log-concave), so the root is unique (Box & Tiao
// 1973, §2.8: the interval of given length with the most probability has
// equal density at its ends). Only logarithms are needed. x0 is a start.
func (p posterior) hpdAt(l, x0 float64) float64 {
	a1, b1 := p.a-1, p.b-1
	fdf := func(c float64) (float64, float64) {
		// −g, which rises with c.
		v := -a1*math.Log1p(l/c) + b1*math.Log1p(l/(1-c-l))
		d := a1*l/(c*(c+l)) + b1*l/((1-c)*(1-c-l))
		return v, d
	}
	if !(x0 > 0 && x0 < 1-l) {
		x0 = math.Min(math.Max(a1/(a1+b1)-l/2, 0), 1-l) // round the mode
	}
	return newtonRoot(fdf, x0, 0, 1-l, 1e-15, 1e-300, 0)
}

// hpdCoverage is the coverage of the highest-density interval of length
// l < 1, the interval of that length with the most probability.
func (p posterior) hpdCoverage(l float64, s *warm) float64 {
	q, k, shift := p.oriented(s)
	c, interior := q.hpdStart(l)
	if interior {
		c = q.hpdAt(l, s.c[k]+shift)
	}
	s.c[k] = c
	return 1 - q.cdf(c) - q.sf(c+l)
}

// hpdWidth is the width of the highest-density interval with coverage
// level. Held against a bound it is a quantile; with an interior mode it
// solves C(w) = level, where C(w) is the coverage of the best interval of
// width w (hpdCoverage), by Newton's method with C′(w) = f(c + w), the
// density at the interval's ends (by the envelope theorem, since the ends
// have equal density). C rises from 0 to 1 on [0, 1] and is concave for a
// unimodal density, so after the first step Newton's steps approach the
// root from below. With no start from a neighbour it starts from the
// equal-tailed width, which is never shorter.
func (p posterior) hpdWidth(level float64, s *warm) float64 {
	a, b := p.a, p.b
	switch {
	case a == 1 && b == 1:
		return level
	case a <= 1 && b >= 1:
		return p.lowerQuantile(level, 0)
	case b <= 1 && a >= 1:
		return p.mirror().lowerQuantile(level, 0)
	case a < 1 && b < 1:
		return math.Min(p.lowerQuantile(level, 0), p.mirror().lowerQuantile(level, 0))
	}
	q, k, shift := p.oriented(s)
	c := s.wc[k] + shift
	fdf := func(w float64) (float64, float64) {
		c = q.hpdAt(w, c)
		return (1 - q.cdf(c) - q.sf(c+w)) - level, q.pdf(c + w)
	}
	w0 := s.w[k]
	if !(w0 > 0 && w0 < 1) {
		var fresh warm
		w0 = q.equalWidth((1-level)/2, &fresh)
	}
	w := newtonRoot(fdf, w0, 0, 1, 1e-14, 0, 1e-16)
	s.w[k], s.wc[k] = w, c
	return w
}

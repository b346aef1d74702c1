package elicit

import (
	"math"

	"gonum.org/v1/gonum/mathext"
)

// incBeta evaluates the regularised incomplete beta function I_x(a, b)
// (and, for the fit's Jacobian, its derivatives in a and b) many times
// at one (a, b), with what every evaluation shares computed once.
//
// Why not gonum's mathext.RegIncBeta alone: it forms log B(a, b) as
// lgamma(a) + lgamma(b) − lgamma(a+b), which loses about b·2⁻⁵² of
// absolute accuracy to cancellation (relative errors of 1e-10 at
// b = 10⁵ and 1e-6 at b = 10⁹ against R's pbeta), stops its continued
// fraction after 300 terms, and returns only 1 − I for the upper tail, so
// a tail below 1.1e-16 is lost. gonum stays the oracle in the tests.
//
// The method: I_x(a, b) = K(x) · w / a with the prefactor
// K(x) = x^a (1−x)^b / B(a, b) and w the continued fraction of Press et
// al. (2007, "Numerical Recipes", 3rd ed., §6.4, eq. 6.4.5), evaluated
// for x < (a+1)/(a+b+2) and otherwise for the other tail, 1 − I_x(a, b)
// = I_{1−x}(b, a), so that the smaller tail always has full relative
// precision. log K is formed without cancellation as in DiDonato & Morris
// (1992, "Algorithm 708: significant digit computation of the incomplete
// beta function ratios", ACM TOMS 18(3): 360–373, their BRCOMP): with
// Stirling's remainder δ(z) = lnΓ(z) − (z−½)ln z + z − ½ln 2π and
// λ = a − (a+b)x,
//
//	log K = −a·rlog1(−λ/a) − b·rlog1(λ/b) + ½ ln(ab/(a+b)) − ½ ln 2π − δ(a) − δ(b) + δ(a+b)
//
// when a, b ≥ stirlingMin, where rlog1(t) = t − ln(1+t) ≥ 0; with one of
// them small, log B is lgamma of the small one plus
// lnΓ(L) − lnΓ(s+L) = −s ln L − (s+L−½) ln(1+s/L) + s + δ(L) − δ(s+L)
// (their ALGDIV).
type incBeta struct {
	a, b float64
	// lnB is log B(a, b), accurate to a few ulps of its size.
	lnB float64
	// form says how log K is assembled (see lnPower).
	form int
	// c0 is the part of log K that depends only on (a, b).
	c0 float64
	// Derivatives of −log B: ψ(a+b) − ψ(a) and ψ(a+b) − ψ(b); set by
	// withDerivs.
	dlnBa, dlnBb float64
}

// The forms of log K.
const (
	formStirling = iota // a, b ≥ stirlingMin
	formSmallA          // a < stirlingMin ≤ b
	formSmallB          // b < stirlingMin ≤ a
	formSmall           // both below stirlingMin: lgamma directly
)

// stirlingMin is the smallest argument at which stirlingRem's series is
// used; there its 8 terms leave an error below 3e-17.
const stirlingMin = 10

// cfMaxTerms bounds the continued fraction; see cfTerms in the tests for
// the number actually needed across the accuracy envelope.
const cfMaxTerms = 200000

// cfGradTerms bounds betaCFGrad: beyond it the derivatives of a
// fraction that converges this slowly (shapes near MaxShape at points in
// the bulk) steer a fit no better.
const cfGradTerms = 20000

// When the tail the continued fraction gives in its fast orientation is
// above 1 − otherTail, the other tail is wanted with its own relative
// precision: the fraction is also tried the other way round, where it
// converges more slowly, with at most cfOtherTerms terms.
const (
	otherTail    = 1e-3
	cfOtherTerms = 400
)

func newIncBeta(a, b float64) incBeta {
	c := incBeta{a: a, b: b}
	switch {
	case a >= stirlingMin && b >= stirlingMin:
		c.form = formStirling
		d := stirlingRem(a) + stirlingRem(b) - stirlingRem(a+b)
		c.c0 = 0.5*(math.Log(a)+math.Log(b)-math.Log(a+b)) - lnSqrt2Pi - d
		c.lnB = (a-0.5)*math.Log(a/(a+b)) + (b-0.5)*math.Log(b/(a+b)) - 0.5*math.Log(a+b) + lnSqrt2Pi + d
	case a < stirlingMin && b >= stirlingMin:
		c.form = formSmallA
		lgA, _ := math.Lgamma(a)
		c.lnB = lgA + lnGammaRatio(a, b)
		c.c0 = -c.lnB
	case b < stirlingMin && a >= stirlingMin:
		c.form = formSmallB
		lgB, _ := math.Lgamma(b)
		c.lnB = lgB + lnGammaRatio(b, a)
		c.c0 = -c.lnB
	default:
		c.form = formSmall
		c.lnB = mathext.Lbeta(a, b)
		c.c0 = -c.lnB
	}
	return c
}

// lnBeta is log B(a, b) as newIncBeta forms it, to a few ulps of its
// size, where mathext.Lbeta (lgamma(a) + lgamma(b) − lgamma(a+b)) loses
// about max(a, b)·2⁻⁵² to cancellation: 2e-12 at b = 10⁴, which a
// beta-binomial probability near 1 passes on to 1 minus it.
func lnBeta(a, b float64) float64 { return newIncBeta(a, b).lnB }

// withDerivs fills in what the derivatives in a and b need.
func (c incBeta) withDerivs() incBeta {
	pab := mathext.Digamma(c.a + c.b)
	c.dlnBa = pab - mathext.Digamma(c.a)
	c.dlnBb = pab - mathext.Digamma(c.b)
	return c
}

const lnSqrt2Pi = 0.91893853320467274178032973640562 // ½ ln 2π

// stirlingRem is δ(z) = lnΓ(z) − (z−½) ln z + z − ½ ln 2π for
// z ≥ stirlingMin, by its asymptotic series Σ B₂ₖ/(2k(2k−1)z^(2k−1))
// (Abramowitz & Stegun 1964, 6.1.40), which alternates and so errs by
// less than its first omitted term, 3617/(122400·z¹⁵) < 3e-17.
func stirlingRem(z float64) float64 {
	if z < stirlingMin {
		lg, _ := math.Lgamma(z)
		return lg - (z-0.5)*math.Log(z) + z - lnSqrt2Pi
	}
	w := 1 / (z * z)
	return (1.0/12 + w*(-1.0/360+w*(1.0/1260+w*(-1.0/1680+w*(1.0/1188+w*(-691.0/360360+w*(1.0/156+w*(-3617.0/122400)))))))) / z
}

// lnGammaRatio is lnΓ(L) − lnΓ(s+L) for L ≥ stirlingMin, from
// Stirling's formula with remainder, without the cancellation of two
// large lgamma values.
func lnGammaRatio(s, l float64) float64 {
	return -s*math.Log(l) - (s+l-0.5)*math.Log1p(s/l) + s + stirlingRem(l) - stirlingRem(s+l)
}

// rlog1 is t − ln(1+t) for t > −1, accurate near 0 where it is about
// t²/2: with r = t/(2+t), ln(1+t) = 2 atanh r, so t − ln(1+t) =
// r·t − 2(r³/3 + r⁵/5 + …).
func rlog1(t float64) float64 {
	if t < -0.3 || t > 0.5 {
		return t - math.Log1p(t)
	}
	r := t / (2 + t)
	r2 := r * r
	// |r| ≤ 0.2: 12 terms leave < 0.2²⁴/25, below 1e-18.
	s := 0.0
	for k := 23; k >= 3; k -= 2 {
		s = s*r2 + 1/float64(k)
	}
	return r*t - 2*r*r2*s
}

// rlogRatio is rlog1(e) for 1 + e = x/x0, the ratio of x (with y = 1 − x)
// to its mean x0: below 0.7 it is e − (ln x − ln x0), from x itself,
// since 1 + e formed from e (a − (a+b)x over a) keeps only the absolute
// precision of a: for x far below x0 the digits of x/x0 cancel, and
// below x0·2⁻⁵³ it rounds to 0 and rlog1 to +Inf (Beta(10, 50).CDF(1e-20)
// was 0 for R's 6.28e-190, and CDF(1e-8) 5e-9 relative off). DiDonato &
// Morris (1992, BRCOMP) switch the same way.
func rlogRatio(e, x, y, x0 float64) float64 {
	if e >= -0.3 {
		return rlog1(e)
	}
	return e - (logX(x, y) - math.Log(x0))
}

// lnPower is log(x^a y^b / B(a, b)) for y = 1 − x, both in (0, 1).
func (c *incBeta) lnPower(x, y float64) float64 {
	a, b := c.a, c.b
	switch c.form {
	case formStirling:
		var lam float64
		if x <= y {
			lam = a - (a+b)*x
		} else {
			lam = (a+b)*y - b
		}
		return c.c0 - a*rlogRatio(-lam/a, x, y, a/(a+b)) - b*rlogRatio(lam/b, y, x, b/(a+b))
	}
	return a*logX(x, y) + b*logX(y, x) + c.c0
}

// logX is ln x for x + y = 1, taken from the smaller of the two.
func logX(x, y float64) float64 {
	if x <= 0.5 {
		return logSub(x)
	}
	return math.Log1p(-y)
}

// logSub is ln x for x > 0, right for subnormal x too: Go's math.Log on
// amd64 (assembly) returns about ln 2⁻¹⁰²³ = −709.09 for every subnormal
// (ln 1e-310 comes out −709.09 for −713.80), so those are scaled into
// the normal range first.
func logSub(x float64) float64 {
	if x > 0 && x < 0x1p-1022 {
		return math.Log(x*0x1p52) - 52*math.Ln2
	}
	return math.Log(x)
}

// tails returns I_x(a, b) and 1 − I_x(a, b) for y = 1 − x, the smaller of
// the two with full relative precision, for x in [0, 1].
func (c *incBeta) tails(x, y float64) (lower, upper float64) {
	lower, upper, _ = c.tailsK(x, y)
	return lower, upper
}

// tailsK is tails that also returns the prefactor K = x^a y^b / B(a, b)
// it computed, from which the density is K/(x·y) (0 at x = 0 or 1).
func (c *incBeta) tailsK(x, y float64) (lower, upper, k float64) {
	switch {
	case x <= 0:
		return 0, 1, 0
	case y <= 0:
		return 1, 0, 0
	}
	// The continued fraction converges fastest for x below about the
	// mean (Numerical Recipes §6.4); it converges elsewhere too, more
	// slowly, and is used there when the tail it gives directly is the
	// smaller one, which 1 − (the larger) would leave with too few digits.
	k = math.Exp(c.lnPower(x, y))
	if x*(c.a+c.b+2) < c.a+1 {
		w, _ := betaCF(c.a, c.b, x, y, cfMaxTerms)
		t := k * w / c.a
		if t > 1-otherTail {
			if w, ok := betaCF(c.b, c.a, y, x, cfOtherTerms); ok {
				u := k * w / c.b
				return 1 - u, u, k
			}
		}
		return t, 1 - t, k
	}
	w, _ := betaCF(c.b, c.a, y, x, cfMaxTerms)
	t := k * w / c.b
	if t > 1-otherTail {
		if w, ok := betaCF(c.a, c.b, x, y, cfOtherTerms); ok {
			l := k * w / c.a
			return l, 1 - l, k
		}
	}
	return 1 - t, t, k
}

// betaCF is the continued fraction w of I_x(a, b) = K(x)·w/a (Numerical
// Recipes §6.4, eq. 6.4.5, with coefficients d₂ₘ₊₁ = −(a+m)(a+b+m)x /
// ((a+2m)(a+2m+1)) and d₂ₘ = m(b−m)x / ((a+2m−1)(a+2m))), by the modified
// Lentz method (§5.2), to a relative change below 2⁻⁵².
func betaCF(a, b, x, y float64, maxTerms int) (w float64, ok bool) {
	const tiny = 1e-300
	qab, qap, qam := a+b, a+1, a-1
	// The first coefficient, 1 − (a+b)x/(a+1), from y = 1 − x when x is
	// near 1, where the subtraction would cancel.
	d := 1 - qab*x/qap
	if x > 0.5 {
		d = (1 - b + qab*y) / qap
	}
	cc := 1.0
	if math.Abs(d) < tiny {
		d = tiny
	}
	d = 1 / d
	h := d
	for m := 1; m <= maxTerms; m++ {
		fm := float64(m)
		m2 := 2 * fm
		aa := fm * (b - fm) * x / ((qam + m2) * (a + m2))
		d = 1 + aa*d
		if math.Abs(d) < tiny {
			d = tiny
		}
		cc = 1 + aa/cc
		if math.Abs(cc) < tiny {
			cc = tiny
		}
		d = 1 / d
		h *= d * cc
		aa = -(a + fm) * (qab + fm) * x / ((a + m2) * (qap + m2))
		d = 1 + aa*d
		if math.Abs(d) < tiny {
			d = tiny
		}
		cc = 1 + aa/cc
		if math.Abs(cc) < tiny {
			cc = tiny
		}
		d = 1 / d
		del := d * cc
		h *= del
		if math.Abs(del-1) <= 0x1p-52 {
			return h, true
		}
	}
	return h, false
}

// grad returns I_x(a, b) and 1 − I_x(a, b) (as tails does) and the
// derivatives of I_x(a, b) in a and in b. The continued fraction's
// convergents Aₖ/Bₖ are run forward, Aₖ₊₁ = Aₖ + dₖAₖ₋₁ (and Bₖ alike),
// with their derivatives in a and b carried along by the product rule,
// the method of Boik & Robison-Cox (1998, "Derivatives of the incomplete
// beta function", J. Statist. Software 3(1)); the prefactor's
// derivatives are ∂ log K/∂a = ln x + ψ(a+b) − ψ(a) and ∂ log K/∂b =
// ln(1−x) + ψ(a+b) − ψ(b). c must come from withDerivs.
func (c *incBeta) grad(x, y float64) (lower, upper, da, db float64) {
	lk := c.lnPower(x, y)
	lx, ly := logX(x, y), logX(y, x)
	if x*(c.a+c.b+2) < c.a+1 {
		w, wa, wb := betaCFGrad(c.a, c.b, x, y)
		t := math.Exp(lk) * w / c.a
		da = t * (lx + c.dlnBa + wa/w - 1/c.a)
		db = t * (ly + c.dlnBb + wb/w)
		if t > 1-otherTail {
			if w, ok := betaCF(c.b, c.a, y, x, cfOtherTerms); ok {
				u := math.Exp(lk) * w / c.b
				return 1 - u, u, da, db
			}
		}
		return t, 1 - t, da, db
	}
	// Here the fraction gives the upper tail u = I_y(b, a), whose first
	// shape parameter is b.
	w, wb, wa := betaCFGrad(c.b, c.a, y, x)
	u := math.Exp(lk) * w / c.b
	da = -u * (lx + c.dlnBa + wa/w)
	db = -u * (ly + c.dlnBb + wb/w - 1/c.b)
	if u > 1-otherTail {
		if w, ok := betaCF(c.a, c.b, x, y, cfOtherTerms); ok {
			l := math.Exp(lk) * w / c.a
			return l, 1 - l, da, db
		}
	}
	return 1 - u, u, da, db
}

// betaCFGrad is betaCF's fraction w with its derivatives in a and b, by
// forward recurrence of the convergents (see grad), rescaled to stay in
// range, until w changes by less than 2⁻⁵⁰ relative and the derivatives
// by less than 1e-12 (the Jacobian of a fit needs no more), or after
// cfGradTerms terms.
func betaCFGrad(a, b, x, y float64) (w, wa, wb float64) {
	// Convergents of w = 1/(1 + d₁/(1 + d₂/(1 + …))): A₁ = B₁ = 1,
	// A₀ = 0, B₀ = 1; Aₖ₊₁ = Aₖ + dₖAₖ₋₁.
	a0, a1, b0, b1 := 0.0, 1.0, 1.0, 1.0
	var a0a, a1a, b0a, b1a, a0b, a1b, b0b, b1b float64
	prevW, prevA, prevB := 1.0, 0.0, 0.0
	for k := 1; k <= 2*cfGradTerms; k++ {
		var d, dA, dB float64
		if k%2 == 1 {
			m := float64(k-1) / 2
			d = -(a + m) * (a + b + m) * x / ((a + 2*m) * (a + 2*m + 1))
			dA = d * (1/(a+m) + 1/(a+b+m) - 1/(a+2*m) - 1/(a+2*m+1))
			dB = d / (a + b + m)
		} else {
			m := float64(k) / 2
			den := (a + 2*m - 1) * (a + 2*m)
			d = m * (b - m) * x / den
			dA = -d * (1/(a+2*m-1) + 1/(a+2*m))
			dB = m * x / den
		}
		a2 := a1 + d*a0
		b2 := b1 + d*b0
		a2a := a1a + d*a0a + dA*a0
		b2a := b1a + d*b0a + dA*b0
		a2b := a1b + d*a0b + dB*a0
		b2b := b1b + d*b0b + dB*b0
		if k == 1 && x > 0.5 {
			// 1 + d₁ = 1 − (a+b)x/(a+1) from y = 1 − x, without cancellation.
			b2 = (1 - b + (a+b)*y) / (a + 1)
		}
		a0, a1, b0, b1 = a1, a2, b1, b2
		a0a, a1a, b0a, b1a = a1a, a2a, b1a, b2a
		a0b, a1b, b0b, b1b = a1b, a2b, b1b, b2b
		if s := math.Abs(b1); s > 1e100 || (s < 1e-100 && s > 0) {
			f := 1 / s
			a0, a1, b0, b1 = a0*f, a1*f, b0*f, b1*f
			a0a, a1a, b0a, b1a = a0a*f, a1a*f, b0a*f, b1a*f
			a0b, a1b, b0b, b1b = a0b*f, a1b*f, b0b*f, b1b*f
		}
		if k%2 == 1 {
			continue
		}
		w = a1 / b1
		wa = (a1a*b1 - a1*b1a) / (b1 * b1)
		wb = (a1b*b1 - a1*b1b) / (b1 * b1)
		const tol, dtol = 0x1p-50, 1e-12
		if math.Abs(w-prevW) <= tol*math.Abs(w) &&
			math.Abs(wa-prevA) <= dtol*(math.Abs(wa)+math.Abs(w)) &&
			math.Abs(wb-prevB) <= dtol*(math.Abs(wb)+math.Abs(w)) {
			return w, wa, wb
		}
		prevW, prevA, prevB = w, wa, wb
	}
	return w, wa, wb
}

// density is x^(a−1) y^(b−1) / B(a, b) for y = 1 − x, formed in logs
// from lnPower; at x = 0 or 1 it is the limit (+Inf where the exponent
// is negative).
func (c *incBeta) density(x, y float64) float64 {
	edge := func(e, lnB float64) float64 {
		switch {
		case e < 1:
			return math.Inf(1)
		case e == 1:
			return math.Exp(-lnB)
		}
		return 0
	}
	switch {
	case x <= 0:
		return edge(c.a, c.lnB)
	case y <= 0:
		return edge(c.b, c.lnB)
	}
	return math.Exp(c.lnPower(x, y) - logX(x, y) - logX(y, x))
}

// densityK is the density at x from the prefactor k that tailsK
// returned there, K/(x·y), unless K is so small (or x·y so near a
// bound) that the quotient would lose digits, when density forms it
// afresh in logs.
func (c *incBeta) densityK(x, y, k float64) float64 {
	if xy := x * y; k > 0x1p-900 && xy > 0x1p-900 {
		return k / xy
	}
	return c.density(x, y)
}

// nearerEnd is whichever of lo < hi, the ends of a bracket that cannot
// be split further, has I_x(a, b) nearer p; 0 or 1 when the quantile
// lies beyond the last float64 before a bound.
func (c *incBeta) nearerEnd(p, lo, hi float64) float64 {
	halved := func(x float64) (float64, float64) {
		l, u := c.tails(x, 1-x)
		return l * math.Exp2(-c.a), u * math.Exp2(-c.b)
	}
	if end, ok := boundGapEnd(p, lo, hi, halved); ok {
		return end
	}
	dist := func(x float64) float64 {
		l, u := c.tails(x, 1-x)
		if p > 0.5 {
			return math.Abs(u - (1 - p))
		}
		return math.Abs(l - p)
	}
	if dist(lo) <= dist(hi) {
		return lo
	}
	return hi
}

// boundGapEnd decides a quantile that lies in the last gap of float64s
// before a bound, between 0 and the smallest double (5e-324) or between
// 1 − 2⁻⁵³ and 1, by where it lies in x: the bound when the quantile is
// nearer it than the float beside it. ok is false for any other bracket.
// There the CDF is far from linear, so the nearer residual in p, which
// nearerEnd takes elsewhere, picked 5e-324 for a median of about
// 10^−30103 (Beta(1e-5, 0.99999)) and showed it as a number, where the
// nearest double is 0 and the page says the point is beyond the double
// range (found in review). Near 0 a Beta's CDF is C·xᵃ (DLMF 8.17.8's
// leading term), so at hi/2 it is 2⁻ᵃ of its value at hi; near 1 its
// upper tail at 1 − (1−lo)/2 is 2⁻ᵇ of its value at lo. halved gives
// these, summed with the weights for a pool: when the lower one is at
// least p, or the upper one at least 1 − p, the quantile lies in the half
// of the gap beside the bound.
func boundGapEnd(p, lo, hi float64, halved func(x float64) (lower, upper float64)) (float64, bool) {
	switch {
	case lo == 0 && hi == math.SmallestNonzeroFloat64:
		if l, _ := halved(hi); l >= p {
			return 0, true
		}
	case hi == 1 && lo == 1-0x1p-53:
		if _, u := halved(lo); u >= 1-p {
			return 1, true
		}
	}
	return 0, false
}

// quantileFrom solves I_x(a, b) = p for x in (0, 1), 0 < p < 1, from an
// estimate x0 (gonum's inverse, or a stated value near the answer). It
// works in the smaller tail and in logs, on g(x) = ln I_x − ln p for
// p ≤ ½ and g(x) = ln(1−p) − ln(1 − I_x) above, which is increasing and
// keeps its relative precision however far out the tail is. Halley steps
// (Newton's x ← x − g/g′, g′ = f(x)/tail(x), with the second-order
// correction) run inside a bracket that every
// evaluation narrows, and a step that leaves the bracket is replaced by
// bisection, geometric near 0 and near 1 (bisect), so the solve always
// converges: to a Newton step below 2⁻⁵⁰ of min(x, 1−x), or to a
// bracket of that relative width or of two adjacent floats (nearerEnd).
func (c *incBeta) quantileFrom(p, x0 float64) float64 {
	return c.quantileWithin(p, x0, 0)
}

// quantileWithin is quantileFrom that also accepts a Halley step smaller
// than halleyAccept·min(x, 1−x) as the answer without evaluating the CDF
// again: Halley's error after a step δ is of order δ³ times the relative
// curvature of g, so for δ ≤ 1e-6 relative it lies far below 1e-12 of x
// for every shape the accuracy envelope admits (TestQuantileWithinAgrees
// checks it against quantileFrom). A fit's fitted values take it; the
// quantile function itself takes quantileFrom.
func (c *incBeta) quantileWithin(p, x0, halleyAccept float64) float64 {
	upper := p > 0.5
	lnq := math.Log(p)
	if upper {
		lnq = math.Log1p(-p)
	}
	lo, hi := 0.0, 1.0
	x := x0
	if !(x > lo && x < hi) {
		x = 0.5
	}
	for iter := 0; iter < 400; iter++ {
		y := 1 - x
		l, u, k := c.tailsK(x, y)
		var g, t float64
		if upper {
			t, g = u, lnq-math.Log(u)
		} else {
			t, g = l, math.Log(l)-lnq
		}
		switch {
		case g < 0:
			lo = x
		case g > 0:
			hi = x
		default:
			return x
		}
		next := math.NaN()
		if f := c.densityK(x, y, k); t > 0 && f > 0 && !math.IsInf(g, 0) && !math.IsInf(f, 0) {
			// Halley's step on g: with g′ = f/tail and c₁ = f′/f =
			// (a−1)/x − (b−1)/(1−x), g″ = g′(c₁ ∓ g′) (− in the lower
			// tail, + in the upper); plain Newton when the correction is
			// large.
			g1 := f / t
			c1 := (c.a-1)/x - (c.b-1)/y
			g2 := g1 * (c1 - g1)
			if upper {
				g2 = g1 * (c1 + g1)
			}
			step := g / g1
			halley := false
			if den := 1 - 0.5*step*g2/g1; den > 0.5 && den < 2 {
				step, halley = step/den, true
			}
			next = x - step
			if halley && next > lo && next < hi && math.Abs(step) <= halleyAccept*math.Min(next, 1-next) {
				return next
			}
		}
		if next > lo && next < hi {
			if math.Abs(next-x) <= 0x1p-50*math.Min(next, 1-next) {
				return next
			}
		} else {
			next = bisect(lo, hi)
			if !(next > lo && next < hi) || hi-lo <= 0x1p-50*math.Min(lo, 1-hi) {
				return c.nearerEnd(p, lo, hi)
			}
		}
		x = next
	}
	return c.nearerEnd(p, lo, hi)
}

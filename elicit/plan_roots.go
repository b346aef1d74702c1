package elicit

import "math"

// One-dimensional root finding for the quick constructions and the
// planning sums. gonum has no exported scalar root finder (its optimize
// package minimises), so these follow the textbook algorithms; the tests
// check them against closed forms and against gonum's optimiser.

// brentRoot returns a root of f in the bracket [a, b], where fa = f(a)
// and fb = f(b) differ in sign or one is 0, by Brent's method: inverse
// quadratic interpolation and secant steps, falling back to bisection
// whenever they do not shrink the bracket fast enough (Brent 1973,
// "Algorithms for Minimization without Derivatives", ch. 4; Press et al.
// 2007, "Numerical Recipes", 3rd ed., §9.3). It stops when the bracket is
// narrower than 4ε|x| + xtol, or after 200 steps; ok is false when [a, b]
// is not a bracket or f returns NaN.
func brentRoot(f func(float64) float64, a, b, fa, fb, xtol float64) (x float64, ok bool) {
	if math.IsNaN(fa) || math.IsNaN(fb) || (fa > 0) == (fb > 0) && fa != 0 && fb != 0 {
		return math.NaN(), false
	}
	if fa == 0 {
		return a, true
	}
	c, fc := a, fa
	d := b - a
	e := d
	for i := 0; i < 200; i++ {
		if (fb > 0) == (fc > 0) {
			c, fc = a, fa
			d = b - a
			e = d
		}
		if math.Abs(fc) < math.Abs(fb) {
			a, b, c = b, c, b
			fa, fb, fc = fb, fc, fb
		}
		tol := 2*floatEps*math.Abs(b) + 0.5*xtol
		m := 0.5 * (c - b)
		if math.Abs(m) <= tol || fb == 0 {
			return b, true
		}
		if math.Abs(e) >= tol && math.Abs(fa) > math.Abs(fb) {
			s := fb / fa
			var p, q float64
			if a == c {
				p, q = 2*m*s, 1-s
			} else {
				// Inverse quadratic interpolation (Brent 1973, ch. 4):
				// q is assigned, not declared, so the step below sees it.
				var r float64
				q, r = fa/fc, fb/fc
				p = s * (2*m*q*(q-r) - (b-a)*(r-1))
				q = (q - 1) * (r - 1) * (s - 1)
			}
			if p > 0 {
				q = -q
			}
			p = math.Abs(p)
			if 2*p < math.Min(3*m*q-math.Abs(tol*q), math.Abs(e*q)) {
				e, d = d, p/q
			} else {
				d, e = m, m
			}
		} else {
			d, e = m, m
		}
		a, fa = b, fb
		if math.Abs(d) > tol {
			b += d
		} else {
			b += math.Copysign(tol, m)
		}
		fb = f(b)
		if math.IsNaN(fb) {
			return math.NaN(), false
		}
	}
	return b, true
}

// floatEps is the float64 machine epsilon, 2⁻⁵².
const floatEps = 0x1p-52

// newtonRoot solves f(x) = 0 for an increasing f on a bracket [lo, hi]
// with f(lo) ≤ 0 ≤ f(hi), which it does not evaluate, starting from x0:
// Newton's method kept inside a bracket that every evaluation narrows
// (rtsafe; Press et al. 2007, "Numerical Recipes", 3rd ed., §9.4). A step
// that would leave the bracket, or that comes from a slope that is zero or
// not finite, is replaced by a split of the bracket (see splitBracket). fdf
// returns f(x) and f′(x). It stops when |f(x)| ≤ ftol (a residual at the
// level of rounding), when a step is no larger than rtol·|x| + atol, when
// the bracket has no float64 left inside it, or after 300 evaluations, and
// returns the last x.
func newtonRoot(fdf func(float64) (float64, float64), x0, lo, hi, rtol, atol, ftol float64) float64 {
	x := x0
	if !(x > lo && x < hi) {
		x = splitBracket(lo, hi)
	}
	for i := 0; i < 300; i++ {
		fx, dfx := fdf(x)
		switch {
		case math.Abs(fx) <= ftol:
			return x
		case fx < 0:
			lo = x
		case fx > 0:
			hi = x
		default: // NaN: split the bracket towards the side not yet ruled out
			hi = x
		}
		next := x - fx/dfx
		if !(next > lo && next < hi) {
			next = splitBracket(lo, hi)
			if !(next > lo && next < hi) {
				return x
			}
		} else if math.Abs(next-x) <= rtol*math.Abs(x)+atol {
			return next
		}
		x = next
	}
	return x
}

// splitBracket divides a bracket [lo, hi]: geometrically when it lies in
// (0, 1) near 0 and spans more than a factor 16, likewise in 1−x near 1,
// so that roots near 1e-300 are reached in a few hundred splits; else in
// half.
func splitBracket(lo, hi float64) float64 {
	switch {
	case lo > 0 && hi <= 0.5 && hi > 16*lo:
		return math.Sqrt(lo * hi)
	case lo == 0 && hi > 0 && hi <= 0.5:
		return hi / 16
	case lo >= 0.5 && hi < 1 && 1-lo > 16*(1-hi):
		return 1 - math.Sqrt((1-lo)*(1-hi))
	case hi == 1 && lo >= 0.5 && lo < 1:
		return 1 - (1-lo)/16
	}
	return lo + 0.5*(hi-lo)
}

// neumaierSum is a compensated running sum (Neumaier 1974, "Rundungsfehler-
// analyse einiger Verfahren zur Summation endlicher Summen", ZAMM 54),
// whose error does not grow with the number of terms: the planning sums
// run over up to a million outcomes.
type neumaierSum struct{ s, c float64 }

func (k *neumaierSum) add(v float64) {
	t := k.s + v
	if math.Abs(k.s) >= math.Abs(v) {
		k.c += (k.s - t) + v
	} else {
		k.c += (v - t) + k.s
	}
	k.s = t
}

func (k *neumaierSum) sum() float64 { return k.s + k.c }

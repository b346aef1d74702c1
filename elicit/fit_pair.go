package elicit

import "math"

// pairTail: a judgement that states a probability below it (or above
// 1 − pairTail) gets, besides the usual starts, the Betas that match two
// of its pairs exactly (pairMatch).
//
// Why: the least-squares residuals of such a judgement differ in size by
// orders of magnitude. Away from the answer, the residual at a value
// stated at 1e-8 is −1e-8 whatever the shapes (the Beta leaves
// practically nothing below it), its gradient is of the size of the
// Beta's own tiny CDF there, and the median's rounding (1e-16) outweighs
// it; the normal equations, which square J's condition, cannot see the
// direction only that residual sets. The local fits then stopped short:
// Beta(1.5, 1.5)'s quantiles at 1e-8, ½ and 1 − 1e-8 were fitted as
// Beta(1.98, 1.98), missing the stated tails by nearly all their 1e-8,
// and its quantiles at 1e-8 and ½ were refused as matched by no Beta (found
// in review). From a Beta that matches two pairs exactly, the local fit
// starts in the right valley.
const pairTail = 1e-4

// pairStarts are the exact two-pair matches, in θ = (log α, log β) and
// inside the box, of the judgement's first and last pairs and of each
// with the pair nearest the median, when q states a probability in a
// far tail (pairTail) and its probabilities lie strictly inside (0, 1).
func (q *lsq) pairStarts() [][2]float64 {
	n := len(q.u)
	far, mid := false, 0
	for i, p := range q.p {
		if !(p > 0 && p < 1) {
			return nil
		}
		far = far || math.Min(p, 1-p) < pairTail
		if math.Abs(p-0.5) < math.Abs(q.p[mid]-0.5) {
			mid = i
		}
	}
	if !far || n < 2 {
		return nil
	}
	pairs := [][2]int{{0, n - 1}}
	if mid != 0 && mid != n-1 {
		pairs = append(pairs, [2]int{0, mid}, [2]int{mid, n - 1})
	}
	var out [][2]float64
	for _, pr := range pairs {
		i, j := pr[0], pr[1]
		if a, b, ok := pairMatch(q.u[i], q.p[i], q.u[j], q.p[j]); ok {
			if th := [2]float64{math.Log(a), math.Log(b)}; inBox(th) {
				out = append(out, th)
			}
		}
	}
	return out
}

// pairMatch is the Beta with F(u1) = p1 and F(u2) = p2, u1 < u2 and
// p1 < p2, all strictly inside (0, 1): unique where it exists (two Beta
// CDFs cross at most once; see fit_global.go). It is found as
// FromIntervalQuantiles finds its match, along the path of Betas with
// F(u1) = p1 (logit of the mean for each log(α + β), by Brent's method),
// on which F(u2) rises with α + β; but each tail is taken from incBeta
// with its relative precision, since p1 may be as small as 1e-12. ok is
// false when the match lies beyond 2·MinShape ≤ α + β ≤ 2·MaxShape.
func pairMatch(u1, p1, u2, p2 float64) (a, b float64, ok bool) {
	// r is F(u) − p taken in the smaller tail.
	r := func(a, b, u, p float64) float64 {
		c := newIncBeta(a, b)
		lo, up := c.tails(u, 1-u)
		if p > 0.5 {
			return (1 - p) - up
		}
		return lo - p
	}
	lam := logit(0.5 * (u1 + u2)) // the inner search's start, carried over
	inner := func(s float64) float64 {
		// F(u1) falls as the mean rises.
		h := func(l float64) float64 {
			a, b := shapes(s, l)
			if !(a > 0 && b > 0) {
				return math.NaN()
			}
			return r(a, b, u1, p1)
		}
		lo, hi, flo, fhi, found := bracketFalling(h, lam, 1, -lambdaLimit, lambdaLimit)
		if !found {
			return math.NaN()
		}
		l, ok := brentRoot(h, lo, hi, flo, fhi, 1e-13)
		if !ok {
			return math.NaN()
		}
		lam = l
		return l
	}
	// Along the path F(u2) rises with α + β: g falls.
	g := func(s float64) float64 {
		l := inner(s)
		if math.IsNaN(l) {
			return math.NaN()
		}
		a, b := shapes(s, l)
		return -r(a, b, u2, p2)
	}
	sMin, sMax := math.Log(2*MinShape), math.Log(2*MaxShape)
	lo, hi, glo, ghi, found := bracketFalling(g, math.Log(4), 2, sMin, sMax)
	if !found {
		return 0, 0, false
	}
	s, ok := brentRoot(g, lo, hi, glo, ghi, 1e-13)
	if !ok {
		return 0, 0, false
	}
	l := inner(s)
	if math.IsNaN(l) {
		return 0, 0, false
	}
	a, b = shapes(s, l)
	return a, b, a > 0 && b > 0
}

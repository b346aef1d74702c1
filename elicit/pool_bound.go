package elicit

import "math"

// BeyondDouble says which of the pool's shown points (its quantiles at
// the probabilities a page or command writes) lie so near a bound that
// their double is the bound itself, and how far from the bound each
// really lies, as beyondDouble does for one Beta (WarnBeyondDouble): a
// pool of Beta(0.001, 0.001) and Beta(0.002, 0.001) puts its 5% point
// about 1e-748 above 0, written 0. ok is false when none is.
func (p Pool) BeyondDouble(shown []ShownPoint) (w Warning, ok bool) {
	if len(p.Components) == 0 {
		return Warning{}, false
	}
	m, ok := heldAsBound(p.Lower, p.Upper, shown, "the pool's ", p.logGap)
	return Warning{WarnBeyondDouble, m}, ok
}

// logGap is ln u of the pool's p-quantile u on the unit scale, from the
// lower bound (or of 1 − u, from the upper bound): the root in t = ln u
// of ln Σᵢ wᵢ Fᵢ(eᵗ) = ln p, each component's ln Fᵢ from its CDF where
// that is a normal double and, below, from the leading term of the
// incomplete beta function at 0, ln Fᵢ(u) ≈ α ln u + β ln(1 − u) −
// ln α − ln B(α, β) (DLMF 8.17.8, as logTinyQuantile), so that points
// far below the smallest double are found too. Bisection on t.
func (p Pool) logGap(prob float64, upper bool) float64 {
	type part struct {
		lnW float64
		d   Beta
	}
	parts := make([]part, len(p.Components))
	for i, c := range p.Components {
		d := c.Dist.Beta
		if upper {
			d = Beta{Alpha: d.Beta, Beta: d.Alpha}
		}
		parts[i] = part{math.Log(c.Weight), d}
	}
	target := math.Log(prob)
	if upper {
		target = math.Log1p(-prob)
	}
	lnF := func(t float64) float64 {
		u := math.Exp(t)
		terms := make([]float64, len(parts))
		for i, c := range parts {
			lf := c.d.Alpha*t + c.d.Beta*math.Log1p(-u) - math.Log(c.d.Alpha) - lnBeta(c.d.Alpha, c.d.Beta)
			if u >= minNormal {
				if f := c.d.CDF(u); f >= minNormal {
					lf = math.Log(f)
				}
			}
			terms[i] = c.lnW + lf
		}
		return logSumExp(terms)
	}
	lo, hi := -1.0, 0.0
	for lnF(lo) >= target {
		hi, lo = lo, 2*lo
		if math.IsInf(lo, 0) {
			return math.Inf(-1)
		}
	}
	for range 400 {
		mid := lo + (hi-lo)/2
		if mid == lo || mid == hi || hi-lo <= 1e-12*math.Abs(lo) {
			break
		}
		if lnF(mid) < target {
			lo = mid
		} else {
			hi = mid
		}
	}
	return lo + (hi-lo)/2
}

// logSumExp is ln Σ exp(xs), without overflow or underflow.
func logSumExp(xs []float64) float64 {
	m := math.Inf(-1)
	for _, x := range xs {
		m = math.Max(m, x)
	}
	if math.IsInf(m, 0) {
		return m
	}
	s := 0.0
	for _, x := range xs {
		s += math.Exp(x - m)
	}
	return m + math.Log(s)
}

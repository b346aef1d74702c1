package chart

import (
	"math"
	"sort"

	"github.com/parley-elicit/parley/elicit"
)

// A Beta with both shapes at least 2 is smooth on its whole range: its
// density is finite, vanishes at the bounds and has a finite slope
// everywhere, with one interior maximum at the mode (α−1)/(α+β−2). Most
// experts' fits are of this kind. Such a curve is drawn as cubic Bézier
// pieces through a few knots instead of as a polyline through
// gridPoints+1 samples: at each knot the density's value and slope are
// known exactly (the slope from the density's log-derivative,
// elicit.Beta.DensitySlopeFunc, on the unit scale so that no bounds'
// width puts them out of range), the CDF's slope is the density, and the
// CDF itself is summed from the density to well within the tolerance
// (cumulate, below), so each piece is the cubic Hermite interpolant, whose error between two knots h
// apart is at most h⁴/384·max|f⁗| (Burden & Faires, "Numerical
// Analysis", Theorem 3.13). Knots are placed adaptively, starting on the
// curve's own window so that a narrow expert in a wide panel is resolved:
// a piece is halved until, at its midpoint, the Hermite cubic lies within
// smoothTolerance pixels of the curve in the wide layout, whose plots are
// the taller (the compact layout's are shorter, so its error is smaller
// still), or at most smoothDepth times; a curve that then still misses
// by more than smoothLast times the tolerance is drawn as the clipped
// polyline. Tests compare every piece with the exact curve at many points
// between its knots, alone and in panels.
//
// Shapes below 2 keep the polyline: their density or its slope is
// infinite at a bound, where no cubic follows it, and their density's
// top is read from samples (densityCap) because it may rise to a spike.
//
// For a smooth Beta the top of the density axis is the density at the
// mode, exact, where the polyline took the largest sample. densityCap's
// spike rule cannot apply to such a shape: over its own window the
// density's largest value is less than three times its upper quartile
// (the widest ratio is in the Gamma(2) limit of α = 2, β → ∞, about 1.9).

// smoothShape reports whether b is drawn by cubic pieces.
func smoothShape(b elicit.ScaledBeta) bool {
	return b.Alpha >= 2 && b.Beta.Beta >= 2 && b.Validate() == nil
}

// smoothTolerance is the largest vertical distance, in the wide layout's
// pixels, between a drawn piece and the curve at the piece's midpoint.
const smoothTolerance = 0.1

// Knot placement starts from smoothStart equal pieces over the curve's
// own window (its 0.1–99.9% range, widened), with a knot also at its
// mode, and pieces doubling in width on each side out to the picture's
// window; it halves a piece at most smoothDepth times. A piece at that
// depth may miss by up to smoothLast times the tolerance; a curve with a
// piece that misses by more is drawn as the clipped polyline instead.
const (
	smoothStart = 8
	smoothDepth = 8
	// smoothLast is how far past the tolerance a piece at the greatest
	// depth may still be, as a multiple of it: 0.25 px.
	smoothLast = 2.5
)

// knot is a smooth Beta's CDF, density and the density's slope at u, on
// the unit scale of Beta(α, β): the quantity is Lower + (Upper−Lower)·u.
// The bounds' width enters only the map to pixels, so bounds of any width
// the question allows keep every number in range.
type knot struct {
	u, cdf, pdf, slope float64
}

// The CDF at the knots comes from the density rather than from the
// incomplete beta function, which costs a continued fraction at each
// point: between two knots h apart the CDF rises by ∫f, and the corrected
// trapezoid rule h(f₀+f₁)/2 + h²(f′₀−f′₁)/12 (the Euler–Maclaurin
// formula with its first end correction; Davis & Rabinowitz, "Methods of
// Numerical Integration", 2nd ed., §2.9) gives it with an error of
// h⁵/720·|f⁗| at most, a fraction of h times the density's own Hermite
// error h⁴/384·|f⁗|, which the knots already hold within the tolerance.
// The sums are pinned at anchors whose CDF is known without a solve: the
// span's five quantiles (0.1%, 5%, 50%, 95%, 99.9%, solved for anyway),
// the bounds (0 and 1) and, where the window cuts the curve, the window's
// ends, each one evaluation. Between two anchors the increments are
// scaled to meet the known rise exactly, which keeps the CDF increasing;
// where the sum missed that rise by more than the tolerance the stretch's
// knots are computed exactly instead. The adaptive rule's CDF test at a
// piece's midpoint uses the same sums: the drawn cubic's value there
// against the rise over the piece's first half, each half integrated.

// trapezoid is the corrected trapezoid rule's ∫f over [a.u, z.u], at
// least 0. In a far tail, where a piece is long beside the density's
// scale (h·|f′/f| above 6), the end correction outweighs the trapezoid
// and the rule goes below 0 by a hair (3e-7 beside Beta(3, 60)'s tail on
// [0, 1]), where ∫f cannot: the CDF drawn would fall.
func trapezoid(a, z knot) float64 {
	h := z.u - a.u
	return math.Max(0, h*(a.pdf+z.pdf)/2+h*h*(a.slope-z.slope)/12)
}

// smoothKnots places the knots of b's cubic pieces over [x0, x1], the
// picture's window, from b's span s; ok is false when some piece misses
// the tolerance at the greatest depth.
func smoothKnots(b elicit.ScaledBeta, x0, x1 float64, s curveSpan) (ks []knot, ok bool) {
	f := b.Beta.DensitySlopeFunc()
	w := b.Upper - b.Lower
	unit := func(x float64) float64 { return math.Min(1, math.Max(0, (x-b.Lower)/w)) }
	at := func(u float64) knot {
		p, sl := f(u)
		return knot{u, math.NaN(), p, sl}
	}
	// Unit densities per wide-layout pixel: the density axis tops out
	// at 1.08 times the density's top (newTwin), at least; a panel's axis
	// is taller still, which only makes pieces more exact.
	m, _ := b.Beta.Mode()
	tolPDF := smoothTolerance * 1.08 * b.Beta.PDF(m) / wideLayout.DensityH
	tolCDF := smoothTolerance / wideLayout.CDFH

	u0, u1 := unit(x0), unit(x1)
	seeds := []float64{u0, u1}
	own0, own1 := math.Max(u0, unit(s.ownX0)), math.Min(u1, unit(s.ownX1))
	if span := own1 - own0; span > 0 {
		for k := 0; k <= smoothStart; k++ {
			seeds = append(seeds, own0+span*float64(k)/smoothStart)
		}
		// Out to the picture's window in pieces that double in width, so
		// that the steep flanks of a narrow curve are not one long piece.
		for d := span; own0-d > u0 || own1+d < u1; d *= 2 {
			seeds = append(seeds, own0-d, own1+d)
		}
	}
	// Knots at the peak and at the tails: where a shape lies between 2
	// and 3 the density leaves its bound as t^(shape−1), flat at the bound
	// but curving sharply just inside, and the tail's knot gives that
	// stretch a short piece of its own. The span's quantiles are knots
	// too, the anchors of the CDF's sums.
	anchors := []knot{{u: unit(s.lo), cdf: tailLow}, {u: unit(s.hi), cdf: tailHigh}}
	for k, p := range percentileProbs {
		anchors = append(anchors, knot{u: unit(s.percentile[k]), cdf: p})
	}
	seeds = append(seeds, m)
	for _, a := range anchors {
		seeds = append(seeds, a.u)
	}
	sort.Float64s(seeds)

	ok = true
	ks = make([]knot, 0, 4*len(seeds))
	var refine func(a, z knot, depth int)
	refine = func(a, z knot, depth int) {
		h := z.u - a.u
		mid := at(a.u + h/2)
		// The Hermite cubics' misses at the midpoint: the density's
		// against the density there, the CDF's against the rise over the
		// first half, with the rise over the whole piece taken as the two
		// halves' sum.
		qa, qz := trapezoid(a, mid), trapezoid(mid, z)
		missPDF := math.Abs((a.pdf+z.pdf)/2 + h*(a.slope-z.slope)/8 - mid.pdf)
		missCDF := math.Abs((qz-qa)/2 + h*(a.pdf-z.pdf)/8)
		if !(missPDF <= tolPDF) || !(missCDF <= tolCDF) {
			if depth >= smoothDepth {
				if !(missPDF <= smoothLast*tolPDF) || !(missCDF <= smoothLast*tolCDF) {
					ok = false
					return
				}
				ks = append(ks, z)
				return
			}
			refine(a, mid, depth+1)
			refine(mid, z, depth+1)
			return
		}
		ks = append(ks, z)
	}
	prev := at(u0)
	ks = append(ks, prev)
	for _, u := range seeds[1:] {
		if !(u > prev.u) || u > u1 {
			continue // a repeated or out-of-window seed
		}
		next := at(u)
		refine(prev, next, 0)
		prev = next
	}
	if !ok || len(ks) < 2 {
		return nil, false
	}
	cumulate(b.Beta, ks, anchors, tolCDF)
	return ks, true
}

// cumulate fills in the CDF at the knots ks of d from the density (see
// trapezoid), pinned at the anchors whose CDF is known, at the bounds and
// at the ends of ks (evaluated where they are not a bound).
func cumulate(d elicit.Beta, ks []knot, anchors []knot, tol float64) {
	var exact func(u float64) (float64, float64, float64)
	cdf := func(u float64) float64 {
		if exact == nil {
			exact = d.CurveFunc()
		}
		c, _, _ := exact(u)
		return c
	}
	last := len(ks) - 1
	pinned := func(i int) (float64, bool) {
		u := ks[i].u
		switch {
		case u == 0:
			return 0, true
		case u == 1:
			return 1, true
		}
		for _, a := range anchors {
			if a.u == u && !math.IsNaN(a.u) {
				return a.cdf, true
			}
		}
		if i == 0 || i == last {
			return cdf(u), true
		}
		return 0, false
	}
	from := 0
	ks[0].cdf, _ = pinned(0)
	for i := 1; i <= last; i++ {
		c, ok := pinned(i)
		if !ok {
			continue
		}
		ks[i].cdf = c
		rise := c - ks[from].cdf
		sum := 0.0
		for k := from + 1; k <= i; k++ {
			sum += trapezoid(ks[k-1], ks[k])
		}
		if math.Abs(sum-rise) <= tol && sum > 0 {
			acc := 0.0
			for k := from + 1; k < i; k++ {
				acc += trapezoid(ks[k-1], ks[k])
				ks[k].cdf = ks[from].cdf + rise*(acc/sum)
			}
		} else {
			for k := from + 1; k < i; k++ {
				ks[k].cdf = cdf(ks[k].u)
			}
		}
		from = i
	}
}

// smoothTop is the largest value of a smooth Beta's density: at its mode.
func smoothTop(b elicit.ScaledBeta) float64 {
	m, _ := b.Mode()
	return b.PDF(m)
}

// smoothSpan is a smooth Beta's span on [lower, upper]. Its percentiles
// are solved for from starting points: known ones (a fit's, which then
// cost one evaluation each to confirm) or the median's close
// approximation (α−⅓)/(α+β−⅔) (Kerman 2011, "A closed-form approximation
// for the median of the beta distribution") and the logit scale, where a
// Beta is close to normal; its tails from points extrapolated on the
// logit scale. The starting points only save work: the solves are
// elicit's bracketed ones, so what is remembered is the Beta's own.
func smoothSpan(b elicit.ScaledBeta, lower, upper float64, known *[3]float64) curveSpan {
	a, bb := b.Alpha, b.Beta.Beta
	w := b.Upper - b.Lower
	logit := func(x float64) float64 { u := (x - b.Lower) / w; return math.Log(u / (1 - u)) }
	expit := func(l float64) float64 { return b.Lower + w/(1+math.Exp(-l)) }
	var guess [3]float64
	if known != nil {
		guess = *known
	} else {
		med := b.Lower + w*(a-1.0/3)/(a+bb-2.0/3)
		// The logit of a Beta has a variance of about 1/α + 1/β.
		sd := math.Sqrt(1/a + 1/bb)
		guess = [3]float64{expit(logit(med) - 1.645*sd), med, expit(logit(med) + 1.645*sd)}
	}
	var s curveSpan
	for k, p := range percentileProbs {
		s.percentile[k] = b.QuantileFrom(p, guess[k])
	}
	// z(0.999)/z(0.95) = 3.090/1.645.
	const stretch = 3.090 / 1.645
	lm := logit(s.percentile[1])
	s.lo = b.QuantileFrom(tailLow, expit(lm-stretch*(lm-logit(s.percentile[0]))))
	s.hi = b.QuantileFrom(tailHigh, expit(lm+stretch*(logit(s.percentile[2])-lm)))
	s.ownX0, s.ownX1 = window(lower, upper, [][2]float64{{s.lo, s.hi}}, nil)
	s.top, s.topKnown = smoothTop(b), true
	return s
}

// bezierPath draws the knots' values (cdf or density, by which) of a Beta
// on [lower, lower + w] as cubic Bézier pieces in f: a Hermite piece from
// (u₀, y₀, slope s₀) to (u₁, y₁, s₁) has control points
// (u₀ + h/3, y₀ + h·s₀/3) and (u₁ − h/3, y₁ − h·s₁/3), h = u₁ − u₀, and
// the maps from the unit scale to the quantity's (x = lower + w·u, a
// density divided by w) and on to pixels are affine, so they map them too.
// A piece as wide as the one before it is written with SVG's S command:
// its first control point is then the reflection of the previous piece's
// second about their shared knot, which is exactly the Hermite one, since
// the slope at the knot is shared.
func (f frame) bezierPath(ks []knot, lower, w float64, density bool) string {
	px := func(u float64) float64 { return f.px(lower + w*u) }
	py := func(y float64) float64 {
		if density {
			return f.py(y / w)
		}
		return f.py(y)
	}
	val := func(k knot) (y, slope float64) {
		if density {
			return k.pdf, k.slope
		}
		return k.cdf, k.pdf
	}
	b := make([]byte, 0, 16+32*len(ks))
	y0, s0 := val(ks[0])
	b = append(b, 'M')
	b = appendXY(b, px(ks[0].u), py(y0))
	prevH := math.NaN()
	for i := 1; i < len(ks); i++ {
		a, z := ks[i-1], ks[i]
		h := z.u - a.u
		y1, s1 := val(z)
		if math.Abs(h-prevH) <= 1e-9*h {
			b = append(b, " S"...)
		} else {
			b = append(b, " C"...)
			b = appendXY(b, px(a.u+h/3), py(y0+h*s0/3))
			b = append(b, ' ')
		}
		b = appendXY(b, px(z.u-h/3), py(y1-h*s1/3))
		b = append(b, ' ')
		b = appendXY(b, px(z.u), py(y1))
		y0, s0, prevH = y1, s1, h
	}
	return string(b)
}

// closeArea turns a density path that starts with "M" into the shaded
// area under it, down to the plot's baseline between x0 and x1 (pixels).
func (f frame) closeArea(d string, x0, x1 float64) string {
	b := make([]byte, 0, len(d)+48)
	b = append(b, 'M')
	b = appendXY(b, x0, f.bottom())
	b = append(b, " L"...)
	b = append(b, d[1:]...)
	b = append(b, " L"...)
	b = appendXY(b, x1, f.bottom())
	b = append(b, " Z"...)
	return string(b)
}

// appendXY appends "x,y".
func appendXY(b []byte, x, y float64) []byte {
	b = appendCoord(b, x)
	b = append(b, ',')
	return appendCoord(b, y)
}

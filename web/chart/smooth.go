package chart

import (
	"math"

	"github.com/parley-elicit/parley/elicit"
)

// A Beta with both shapes at least 2 is smooth on its whole range: its
// density is finite, vanishes at the bounds and has a finite slope
// everywhere, with one interior maximum at the mode (α−1)/(α+β−2). Most
// experts' fits are of this kind. Such a curve is drawn as cubic Bézier
// pieces through a few knots instead of as a polyline through
// gridPoints+1 samples: at each knot the density's and the CDF's values
// and slopes are known exactly (the CDF's slope is the density, the
// density's comes from its log-derivative, elicit.ScaledBeta.CurveFunc),
// so each piece is the cubic Hermite interpolant, whose error between two
// knots h apart is at most h⁴/384·max|f⁗| (Burden & Faires, "Numerical
// Analysis", Theorem 3.13). Knots are placed adaptively: a piece is halved
// until, at its midpoint, the Hermite cubic lies within smoothTolerance
// pixels of the curve in the wide layout, whose plots are the taller; the
// compact layout's are shorter, so its error is smaller still. A test
// compares every piece with the exact curve at many points between its
// knots.
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

// Knot placement starts from smoothStart equal pieces and halves a piece
// at most smoothDepth times.
const (
	smoothStart = 8
	smoothDepth = 8
)

// knot is a smooth Beta's CDF, density and the density's slope at x.
type knot struct {
	x, cdf, pdf, slope float64
}

// smoothKnots places the knots of b's cubic pieces over [x0, x1]; top is
// the density's largest value, which sets the density plot's scale.
func smoothKnots(b elicit.ScaledBeta, x0, x1, top float64) []knot {
	f := b.CurveFunc()
	at := func(x float64) knot {
		c, p, s := f(x)
		return knot{x, c, p, s}
	}
	// Data units per wide-layout pixel: the density axis tops out at
	// 1.08 times the density's top (newTwin), at most; a panel's axis
	// is taller still, which only makes pieces more exact.
	tolPDF := smoothTolerance * 1.08 * top / wideLayout.DensityH
	tolCDF := smoothTolerance / wideLayout.CDFH
	out := make([]knot, 0, 4*smoothStart)
	var refine func(a, z knot, depth int)
	refine = func(a, z knot, depth int) {
		h := z.x - a.x
		m := at(a.x + h/2)
		// The Hermite cubics' values at the midpoint.
		hp := (a.pdf+z.pdf)/2 + h*(a.slope-z.slope)/8
		hc := (a.cdf+z.cdf)/2 + h*(a.pdf-z.pdf)/8
		if depth < smoothDepth && (!(math.Abs(hp-m.pdf) <= tolPDF) || !(math.Abs(hc-m.cdf) <= tolCDF)) {
			refine(a, m, depth+1)
			refine(m, z, depth+1)
			return
		}
		out = append(out, z)
	}
	prev := at(x0)
	out = append(out, prev)
	for k := 1; k <= smoothStart; k++ {
		x := x0 + (x1-x0)*float64(k)/smoothStart
		if k == smoothStart {
			x = x1
		}
		next := at(x)
		refine(prev, next, 0)
		prev = next
	}
	return out
}

// smoothTop is the largest value of a smooth Beta's density: at its mode.
func smoothTop(b elicit.ScaledBeta) float64 {
	m, _ := b.Mode()
	return b.PDF(m)
}

// smoothSpan is a smooth Beta's span on [lower, upper]. Its percentiles
// are known ones (a fit's) or solved for from the median's close
// approximation (α−⅓)/(α+β−⅔) (Kerman 2011, "A closed-form approximation
// for the median of the beta distribution"); its tails are solved for
// from starting points extrapolated on the logit scale, where a Beta is
// close to normal. The starting points only save work: the solves are
// elicit's bracketed ones.
func smoothSpan(b elicit.ScaledBeta, lower, upper float64, known *[3]float64) curveSpan {
	a, bb := b.Alpha, b.Beta.Beta
	w := b.Upper - b.Lower
	logit := func(x float64) float64 { u := (x - b.Lower) / w; return math.Log(u / (1 - u)) }
	expit := func(l float64) float64 { return b.Lower + w/(1+math.Exp(-l)) }
	var s curveSpan
	if known != nil {
		s.percentile = *known
	} else {
		med := b.QuantileFrom(0.5, b.Lower+w*(a-1.0/3)/(a+bb-2.0/3))
		// The logit of a Beta has a variance of about 1/α + 1/β.
		sd := math.Sqrt(1/a + 1/bb)
		s.percentile = [3]float64{
			b.QuantileFrom(percentileProbs[0], expit(logit(med)-1.645*sd)),
			med,
			b.QuantileFrom(percentileProbs[2], expit(logit(med)+1.645*sd)),
		}
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

// bezierPath draws the knots' values (cdf or density, by which) as cubic
// Bézier pieces in f: a Hermite piece from (x₀, y₀, slope s₀) to
// (x₁, y₁, s₁) has control points (x₀ + h/3, y₀ + h·s₀/3) and
// (x₁ − h/3, y₁ − h·s₁/3), h = x₁ − x₀, and the frame's map to pixels is
// affine, so it maps them too. A piece as wide as the one before it is
// written with SVG's S command: its first control point is then the
// reflection of the previous piece's second about their shared knot,
// which is exactly the Hermite one, since the slope at the knot is
// shared.
func (f frame) bezierPath(ks []knot, density bool) string {
	val := func(k knot) (y, slope float64) {
		if density {
			return k.pdf, k.slope
		}
		return k.cdf, k.pdf
	}
	b := make([]byte, 0, 16+32*len(ks))
	y0, s0 := val(ks[0])
	b = append(b, 'M')
	b = appendXY(b, f.px(ks[0].x), f.py(y0))
	prevH := math.NaN()
	for i := 1; i < len(ks); i++ {
		a, z := ks[i-1], ks[i]
		h := z.x - a.x
		y1, s1 := val(z)
		if math.Abs(h-prevH) <= 1e-9*h {
			b = append(b, " S"...)
		} else {
			b = append(b, " C"...)
			b = appendXY(b, f.px(a.x+h/3), f.py(y0+h*s0/3))
			b = append(b, ' ')
		}
		b = appendXY(b, f.px(z.x-h/3), f.py(y1-h*s1/3))
		b = append(b, ' ')
		b = appendXY(b, f.px(z.x), f.py(y1))
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

package chart

import (
	"errors"
	"math"
	"sort"
	"unicode"
	"unicode/utf8"

	"github.com/parley-elicit/parley/elicit"
)

// Curve is one distribution to draw, with its label and role in the
// picture.
type Curve struct {
	Label string
	// Prose names the curve in a sentence under the picture, where Label
	// would read badly mid-sentence ("your curve" for the key's "You");
	// empty means Label.
	Prose string
	Role  Role
	Dist  Distribution
	// Percentiles are the curve's 5th, 50th and 95th percentiles when
	// they are already known (a fit's), or nil. They are starting points
	// only: a smooth Beta's percentiles and window are solved for from
	// them, so wrong ones cost time, never a wrong picture.
	Percentiles *[3]float64
	// Slot fixes an expert curve's line style: the k-th style (from 1)
	// whatever its place in the picture, so that a panel's "Expert B"
	// is the same line on the projector and on every expert's page,
	// where "You" comes first and one letter is missing. 0 takes the
	// curve's place among the picture's experts.
	Slot int
}

// proseName is how a sentence under the picture names the curve: Prose
// when given; an expert by their label; a pool, a prior or another
// curve of the panel's by its label as a common noun ("the equal-weight
// pool", "the agreed prior"), which mid-sentence read as a name ("for
// Ole Brandt and Equal-weight pool").
func (c Curve) proseName() string {
	switch {
	case c.Prose != "":
		return c.Prose
	case c.Role == RoleExpert || c.Label == "":
		return c.Label
	}
	r, n := utf8.DecodeRuneInString(c.Label)
	return "the " + string(unicode.ToLower(r)) + c.Label[n:]
}

// Distribution is what a picture needs of a distribution on a question's
// bounds: its density, its CDF and its quantile function.
// elicit.ScaledBeta is one, and so is elicit.Pool (draw it as a Pool to
// offer its components).
//
// A Distribution may offer more, found by type assertion as io.WriterTo
// is: several quantiles at once (BatchQuantiler), the components of a
// mixture (Mixture), and a Validate method, which must return nil for the
// curve to be drawn. A Beta (elicit.ScaledBeta) is drawn with its
// normalising constant computed once for all its points, and its span,
// samples and paths are remembered, keyed by its parameters.
type Distribution interface {
	PDF(x float64) float64
	CDF(x float64) float64
	Quantile(p float64) float64
}

// BatchQuantiler is a Distribution that finds several increasing
// quantiles at once, cheaper than a Quantile call each (elicit.Pool's
// Quantiles). The picture's window and percentiles use it when it is
// there.
type BatchQuantiler interface {
	Quantiles(probs []float64) ([]float64, error)
}

// Mixture is a Distribution that is a weighted sum of Betas: its PDF and
// CDF are Σ wᵢ fᵢ and Σ wᵢ Fᵢ of its components, and its quantiles are
// functions of them. The picture samples it from its components'
// remembered samples instead of calling PDF and CDF at every point, and
// remembers its span and samples by the components' fingerprint.
type Mixture interface {
	Components() []elicit.Component
}

// Pool is a linear opinion pool to draw: an elicit.Pool that offers its
// components as a Mixture.
type Pool struct{ elicit.Pool }

// Components returns the pool's weighted Betas.
func (p Pool) Components() []elicit.Component { return p.Pool.Components }

// Point is a value an expert stated and the cumulative probability they
// gave it: P(X ≤ X) = P.
type Point struct {
	X, P float64
}

// beta is the curve's distribution when it is a Beta.
func (c Curve) beta() (elicit.ScaledBeta, bool) {
	b, ok := c.Dist.(elicit.ScaledBeta)
	return b, ok
}

// components are the curve's mixture components, or none.
func (c Curve) components() []elicit.Component {
	if m, ok := c.Dist.(Mixture); ok {
		return m.Components()
	}
	return nil
}

// valid reports whether the curve can be evaluated without panicking.
func (c Curve) valid() bool {
	if c.Dist == nil {
		return false
	}
	if v, ok := c.Dist.(interface{ Validate() error }); ok {
		return v.Validate() == nil
	}
	return true
}

// quantiles is the distribution's batch of quantiles, or an error when
// it has no BatchQuantiler.
func (c Curve) quantiles(probs []float64) ([]float64, error) {
	if b, ok := c.Dist.(BatchQuantiler); ok {
		return b.Quantiles(probs)
	}
	return nil, errNoQuantiles
}

var errNoQuantiles = errors.New("chart: the curve has no Quantiles")

// Tail probabilities that bound the plotted window: the axis spans where
// all but 0.2% of the probability lies, widened a little.
const (
	tailLow  = 0.001
	tailHigh = 0.999
	widen    = 0.06 // of the window's span, on each side
	snap     = 0.12 // a gap to a bound smaller than this share of the span is closed
)

// curveSpan is what the layout needs of one curve besides its samples:
// its lowest 0.1% and highest 99.9% points, its own window, the top of
// its density over that window (when known before sampling) and its 5th,
// 50th and 95th percentiles.
type curveSpan struct {
	lo, hi     float64
	ownX0      float64
	ownX1      float64
	top        float64
	topKnown   bool
	percentile [3]float64
}

// span computes the curve's span on [lower, upper]; a Beta's is
// remembered. A mixture with Components leaves its top to be found from
// its samples.
func (c Curve) span(lower, upper float64) curveSpan {
	if b, ok := c.beta(); ok {
		return remembered.spans.Get(spanKey{b, lower, upper}, func() curveSpan { return c.computeSpan(lower, upper) })
	}
	if cs := c.components(); len(cs) > 0 {
		return remembered.mixSpans.Get(mixKey{fingerprint(cs), lower, upper}, func() curveSpan { return c.mixtureSpan(cs, lower, upper) })
	}
	return c.computeSpan(lower, upper)
}

func (c Curve) computeSpan(lower, upper float64) curveSpan {
	if b, ok := c.beta(); ok && smoothShape(b) {
		return smoothSpan(b, lower, upper, c.Percentiles)
	}
	var s curveSpan
	probs := []float64{tailLow, percentileProbs[0], percentileProbs[1], percentileProbs[2], tailHigh}
	if qs, err := c.quantiles(probs); err == nil && len(qs) == len(probs) {
		s.lo, s.hi = qs[0], qs[4]
		copy(s.percentile[:], qs[1:4])
	} else {
		s.lo, s.hi = c.Dist.Quantile(tailLow), c.Dist.Quantile(tailHigh)
		for k, q := range percentileProbs {
			s.percentile[k] = c.Dist.Quantile(q)
		}
	}
	s.ownX0, s.ownX1 = window(lower, upper, [][2]float64{{s.lo, s.hi}}, nil)
	own := frame{X0: s.ownX0, X1: s.ownX1}
	cxs := own.grid(gridPoints)
	ys := make([]float64, len(cxs))
	pdf := c.pdfFunc()
	for k, x := range cxs {
		ys[k] = pdf(x)
	}
	s.top, _ = densityCap(ys)
	// A bounded density (both shapes at least 1) falls from its top
	// without a spike, however steeply (the posterior Beta(1, n + 1) of a
	// uniform prior after n trials without a success): its top is its
	// largest value, never cut as a spike.
	if b, ok := c.beta(); ok {
		if top, ok := b.MaxDensity(); ok && isFinite(top) {
			s.top = top
		}
	}
	s.topKnown = true
	return s
}

// mixtureSpan is the span of a mixture with Components. Its tails lie
// between its components' (Σ wᵢ Fᵢ(x) ≤ p wherever every Fᵢ(x) ≤ p), so
// the components' remembered tails stand in for its own in the window;
// only its percentiles are solved for. Its own window and top are found
// later from its samples (ownTop).
func (c Curve) mixtureSpan(cs []elicit.Component, lower, upper float64) curveSpan {
	s := curveSpan{lo: math.Inf(1), hi: math.Inf(-1)}
	for _, comp := range cs {
		part := Curve{Dist: comp.Dist}
		if !part.valid() {
			continue
		}
		ps := part.span(lower, upper)
		s.lo, s.hi = math.Min(s.lo, ps.lo), math.Max(s.hi, ps.hi)
	}
	if qs, err := c.quantiles(percentileProbs[:]); err == nil && len(qs) == 3 {
		copy(s.percentile[:], qs)
	} else {
		for k, q := range percentileProbs {
			s.percentile[k] = c.Dist.Quantile(q)
		}
	}
	return s
}

// sample returns the curve's density and CDF at xs, the grid of
// gridPoints+1 points over [x0, x1]. The slices may be shared and must
// not be modified.
func (c Curve) sample(xs []float64, x0, x1 float64) sampled {
	if b, ok := c.beta(); ok {
		return remembered.samples.Get(gridKey{b, x0, x1}, func() sampled { return evaluate(c, xs) })
	}
	if cs := c.components(); len(cs) > 0 {
		return remembered.mixSamples.Get(mixKey{fingerprint(cs), x0, x1}, func() sampled { return c.sumComponents(cs, xs, x0, x1) })
	}
	return evaluate(c, xs)
}

// sumComponents samples a mixture as the weighted sum of its components'
// remembered samples.
func (c Curve) sumComponents(cs []elicit.Component, xs []float64, x0, x1 float64) sampled {
	m := sampled{pdf: make([]float64, len(xs)), cdf: make([]float64, len(xs))}
	for _, comp := range cs {
		part := Curve{Dist: comp.Dist}
		if !part.valid() {
			return evaluate(c, xs)
		}
		ps := part.sample(xs, x0, x1)
		for k := range xs {
			m.pdf[k] += comp.Weight * ps.pdf[k]
			m.cdf[k] += comp.Weight * ps.cdf[k]
		}
	}
	return m
}

func evaluate(c Curve, xs []float64) sampled {
	s := sampled{pdf: make([]float64, len(xs)), cdf: make([]float64, len(xs))}
	pdf, cdf := c.pdfFunc(), c.cdfFunc()
	for k, x := range xs {
		s.pdf[k], s.cdf[k] = pdf(x), cdf(x)
	}
	return s
}

// cdfFunc is the curve's CDF for evaluating at many points: a Beta's with
// what its incomplete beta function shares across points computed once.
func (c Curve) cdfFunc() func(float64) float64 {
	if b, ok := c.beta(); ok {
		return b.CDFFunc()
	}
	return c.Dist.CDF
}

// pdfFunc is the curve's density for evaluating at many points: a Beta's
// with its normalising constant computed once.
func (c Curve) pdfFunc() func(float64) float64 {
	if b, ok := c.beta(); ok {
		return b.Density()
	}
	return c.Dist.PDF
}

// window chooses the x range to draw: from the lowest 0.1% point to the
// highest 99.9% point over all curves (tails holds each curve's pair),
// stretched to cover extra points, widened by a margin and snapped to a
// bound that is nearly reached.
func window(lower, upper float64, tails [][2]float64, extra []float64) (x0, x1 float64) {
	x0, x1 = math.Inf(1), math.Inf(-1)
	for _, t := range tails {
		lo, hi := t[0], t[1]
		if isFinite(lo) {
			x0 = math.Min(x0, lo)
		}
		if isFinite(hi) {
			x1 = math.Max(x1, hi)
		}
	}
	for _, x := range extra {
		if isFinite(x) {
			x0, x1 = math.Min(x0, x), math.Max(x1, x)
		}
	}
	// A curve whose mass sits within a billionth of the range (a Beta
	// with a shape at the floor, whose upper quantile underflows to the
	// smallest double) is drawn on the whole range: a narrower window has
	// no ticks to speak of.
	if !(x1 > x0) || !(x1-x0 > 1e-9*(upper-lower)) {
		return lower, upper
	}
	span := x1 - x0
	x0, x1 = x0-widen*span, x1+widen*span
	if x0-lower < snap*span {
		x0 = lower
	}
	if upper-x1 < snap*span {
		x1 = upper
	}
	return math.Max(x0, lower), math.Min(x1, upper)
}

// densityCap returns the top of the density axis for sampled densities:
// their largest finite value, unless that is a spike towards a bound (over
// three times the upper quartile of the samples), in which case the axis
// stops at three times the upper quartile so the rest of the curve stays
// readable. capped reports whether the cut applies.
func densityCap(samples []float64) (top float64, capped bool) {
	var fin []float64
	for _, v := range samples {
		if isFinite(v) && v >= 0 {
			fin = append(fin, v)
		}
	}
	if len(fin) == 0 {
		return 1, false
	}
	sort.Float64s(fin)
	hi := fin[len(fin)-1]
	q3 := fin[(len(fin)*3)/4]
	for _, v := range samples {
		if math.IsInf(v, 1) {
			capped = true
		}
	}
	if q3 > 0 && hi > 3*q3 {
		return 3 * q3, true
	}
	if !(hi > 0) {
		return 1, capped
	}
	return hi, capped
}

func isFinite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

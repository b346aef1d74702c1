package chart

import (
	"crypto/sha256"
	"encoding/binary"
	"math"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/internal/memo"
)

// A Beta curve's tail points, percentiles, density top and samples depend
// on nothing but its parameters and the window it is drawn over. A panel
// of a whole workshop's experts is drawn again on every expert's page, and
// between two views usually only one curve has changed and the window has
// stayed put; so these are remembered, keyed by the exact values they are
// computed from, and can never be stale.

// spanKey is a Beta curve on a question's bounds.
type spanKey struct {
	dist         elicit.ScaledBeta
	lower, upper float64
}

// gridKey is a Beta curve over the window [x0, x1]: the key of its samples
// at gridPoints+1 points, or of its knots when it is drawn smooth.
type gridKey struct {
	dist   elicit.ScaledBeta
	x0, x1 float64
}

// sampled holds a curve's density and CDF at the grid's points. Shared
// between requests: never modified once stored.
type sampled struct {
	pdf, cdf []float64
}

// pathKey is a Beta curve's pair of lines in a twin whose x window is
// [x0, x1] and whose density axis stops at top; area adds the shaded
// density.
type pathKey struct {
	dist        elicit.ScaledBeta
	x0, x1, top float64
	area        bool
	layout      layout // the whole layout, as frameKey's
}

// paths are a curve's SVG path data in both plots.
type paths struct {
	density, cumul, area string
	clipped              bool
}

// mixKey is a Mixture, by the fingerprint of its
// components, over a window: [a, b] is the question's bounds for its
// span and the drawn window for its samples. A mixture's PDF, CDF and
// quantiles are functions of its components (Mixture's contract), so the
// fingerprint stands for the whole curve.
type mixKey struct {
	components [sha256.Size]byte
	a, b       float64
}

// fingerprint is the SHA-256 of the components' weights and parameters:
// two mixtures share it only when every component is exactly the same.
func fingerprint(cs []elicit.Component) [sha256.Size]byte {
	b := make([]byte, 0, len(cs)*5*8)
	for _, c := range cs {
		for _, v := range [...]float64{c.Weight, c.Dist.Alpha, c.Dist.Beta.Beta, c.Dist.Lower, c.Dist.Upper} {
			b = binary.LittleEndian.AppendUint64(b, math.Float64bits(v))
		}
	}
	return sha256.Sum256(b)
}

// memos are the remembered curves, one memo per kind of result. The
// package owns them, in the one variable remembered, and every picture
// drawn in the process shares them: what they hold depends only on its
// key. Sizes: a workshop of 200 experts and 10 questions has 2000 current
// curves; a sampled curve is about 5 kB.
type memos struct {
	spans   *memo.Memo[spanKey, curveSpan]
	samples *memo.Memo[gridKey, sampled]
	drawn   *memo.Memo[pathKey, paths]      // about 9 kB each
	knots   *memo.Memo[gridKey, []knot]     // a smooth Beta's, about 1 kB
	frames  *memo.Memo[frameKey, twinFrame] // about 12 kB each
	// A pool is drawn on every round-2 page of its question; a workshop
	// has a pool per question, and a few windows each.
	mixSpans   *memo.Memo[mixKey, curveSpan]
	mixSamples *memo.Memo[mixKey, sampled]
}

var remembered = newMemos()

func newMemos() memos {
	return memos{
		spans:      memo.New[spanKey, curveSpan](8192),
		samples:    memo.New[gridKey, sampled](4096),
		drawn:      memo.New[pathKey, paths](4096),
		knots:      memo.New[gridKey, []knot](4096),
		frames:     memo.New[frameKey, twinFrame](512),
		mixSpans:   memo.New[mixKey, curveSpan](256),
		mixSamples: memo.New[mixKey, sampled](256),
	}
}

// reset forgets every remembered curve, for tests that draw afresh.
func (m memos) reset() {
	m.spans.Reset()
	m.samples.Reset()
	m.drawn.Reset()
	m.knots.Reset()
	m.frames.Reset()
	m.mixSpans.Reset()
	m.mixSamples.Reset()
}

package chart

import (
	"sync"

	"github.com/parley-elicit/parley/elicit"
)

// A Beta curve's tail points, percentiles, density top and samples depend
// on nothing but its parameters and the window it is drawn over. A panel
// of a whole workshop's experts is drawn again on every expert's page, and
// between two views usually only one curve has changed and the window has
// stayed put; so these are remembered, keyed by the exact values they are
// computed from, and can never be stale.

// memo is a bounded, concurrency-safe table of computed values. It keeps
// two generations of at most half entries each: a hit in the older one
// moves the entry to the newer, and when the newer fills it becomes the
// older and the oldest is dropped.
type memo[K comparable, V any] struct {
	mu       sync.Mutex
	half     int
	cur, old map[K]V
}

func newMemo[K comparable, V any](size int) *memo[K, V] {
	half := max(1, size/2)
	return &memo[K, V]{half: half, cur: make(map[K]V, half), old: map[K]V{}}
}

// get returns the value for k, computing it outside the lock when absent.
func (m *memo[K, V]) get(k K, compute func() V) V {
	m.mu.Lock()
	if v, ok := m.cur[k]; ok {
		m.mu.Unlock()
		return v
	}
	v, ok := m.old[k]
	if !ok {
		m.mu.Unlock()
		v = compute()
		m.mu.Lock()
	}
	if len(m.cur) >= m.half {
		m.old, m.cur = m.cur, make(map[K]V, m.half)
	}
	m.cur[k] = v
	m.mu.Unlock()
	return v
}

// reset forgets every value.
func (m *memo[K, V]) reset() {
	m.mu.Lock()
	m.cur, m.old = make(map[K]V, m.half), map[K]V{}
	m.mu.Unlock()
}

func (m *memo[K, V]) len() int {
	m.mu.Lock()
	defer m.mu.Unlock()
	return len(m.cur) + len(m.old)
}

// spanKey is a Beta curve on a question's bounds.
type spanKey struct {
	dist         elicit.ScaledBeta
	lower, upper float64
}

// gridKey is a Beta curve sampled at gridPoints+1 points over [x0, x1].
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
}

// paths are a curve's SVG path data in both plots.
type paths struct {
	density, cumul, area string
	clipped              bool
}

// Sizes: a workshop of 200 experts and 10 questions has 2000 current
// curves; a sampled curve is about 5 kB.
var (
	spans   = newMemo[spanKey, curveSpan](8192)
	samples = newMemo[gridKey, sampled](4096)
	drawn   = newMemo[pathKey, paths](4096) // about 9 kB each
)

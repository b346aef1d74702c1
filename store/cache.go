package store

import (
	"slices"
	"sync"
	"sync/atomic"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// An expert's every request reads the same few rows: the expert behind
// the token, the workshop (its round) and the question. They change
// rarely (a round opens, a truth is revealed, a token is revoked) while
// revisions are saved many times a second. So these reads are remembered
// until the next write that could change them: every write except a
// saved revision moves the cache's generation on, and an entry read in an
// older generation is read again. The generation moves after the commit,
// and an entry is stamped with the generation seen before its read began,
// so an entry can only be older than what it claims, never newer: a
// stale row is never served.
//
// This holds for writes through this DB. Every parley command that writes
// to a database another process is serving only adds rows (import) or
// touches the facilitator's secret and sessions, which are not cached.

// rowCache remembers rows by key, each with the generation it was read in.
type rowCache[K comparable, V any] struct {
	mu      sync.Mutex
	entries map[K]cached[V]
	limit   int
}

type cached[V any] struct {
	gen uint64
	v   V
}

func newRowCache[K comparable, V any](limit int) *rowCache[K, V] {
	return &rowCache[K, V]{entries: map[K]cached[V]{}, limit: limit}
}

// get returns the value for k read in generation gen, if any.
func (c *rowCache[K, V]) get(k K, gen uint64) (V, bool) {
	c.mu.Lock()
	defer c.mu.Unlock()
	e, ok := c.entries[k]
	if !ok || e.gen != gen {
		var zero V
		return zero, false
	}
	return e.v, true
}

// put remembers v for k as read in generation gen. When full it forgets
// everything first: the rows an expert's pages read are few, and a full
// cache means most entries are stale anyway.
func (c *rowCache[K, V]) put(k K, gen uint64, v V) {
	c.mu.Lock()
	defer c.mu.Unlock()
	if len(c.entries) >= c.limit {
		clear(c.entries)
	}
	c.entries[k] = cached[V]{gen, v}
}

// rows is the DB's cache of rows read on every expert request.
type rows struct {
	gen       atomic.Uint64
	workshops *rowCache[int64, workshop.Workshop]
	questions *rowCache[int64, workshop.Question]
	byToken   *rowCache[string, workshop.Expert]
}

func newRows() *rows {
	return &rows{
		workshops: newRowCache[int64, workshop.Workshop](1024),
		questions: newRowCache[int64, workshop.Question](4096),
		byToken:   newRowCache[string, workshop.Expert](4096),
	}
}

// changed moves the generation on after a write that may change a cached
// row.
func (r *rows) changed() { r.gen.Add(1) }

// remembered reads through cache c: the remembered value when it is of
// the current generation, otherwise read's, remembered unless it failed.
func remembered[K comparable, V any](r *rows, c *rowCache[K, V], k K, read func() (V, error)) (V, error) {
	gen := r.gen.Load()
	if v, ok := c.get(k, gen); ok {
		return v, nil
	}
	v, err := read()
	if err == nil {
		c.put(k, gen, v)
	}
	return v, err
}

// copyQuestion gives a caller its own slices and true value, so no caller
// can change what another reads.
func copyQuestion(q workshop.Question) workshop.Question {
	q.Probs = slices.Clone(q.Probs)
	q.BinEdges = slices.Clone(q.BinEdges)
	if q.TrueValue != nil {
		v := *q.TrueValue
		q.TrueValue = &v
	}
	if q.RevealedAt != nil {
		t := *q.RevealedAt
		q.RevealedAt = &t
	}
	return q
}

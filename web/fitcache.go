package web

import (
	"encoding/binary"
	"math"
	"sync"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// A saved revision never changes (revisions are append-only) and a
// question's bounds, format, probabilities and bins are fixed when it is
// added, so the fit of a saved answer is the same every time a page asks
// for it. The expert pages and the facilitator's panel ask for every
// expert's current fit on every request; fits remembers them instead of
// running the least-squares fit again.
//
// The key is the revision id together with everything Question.Fit
// reads: the question's bounds, format, probabilities, bins and chips,
// and the answer. So the key is never stale, even when several databases
// with the same revision ids are served from one process, as in tests.

// fitCacheSize bounds the fits kept: a full workshop of 200 experts and
// 10 questions has 2000 current fits.
const fitCacheSize = 8192

// fits is shared by every Server in the process.
var fits = newFitCache(fitCacheSize)

// fitCache is a bounded, concurrency-safe memo of Question.Fit. It keeps
// two generations of at most size/2 entries each: a hit in the older one
// moves the entry to the newer, and when the newer fills it becomes the
// older and the oldest generation is dropped, so entries in use survive
// and the total never exceeds size.
type fitCache struct {
	mu       sync.Mutex
	half     int
	cur, old map[string]fitResult
	misses   int // fits computed, for tests
}

type fitResult struct {
	fit elicit.Fit
	err error
}

func newFitCache(size int) *fitCache {
	half := max(1, size/2)
	return &fitCache{half: half, cur: make(map[string]fitResult, half), old: map[string]fitResult{}}
}

// fit returns q.Fit(rv.Answer), computed at most once per key while it
// stays in the cache. The returned Fit's slices are shared between
// callers and must not be modified.
func (c *fitCache) fit(q workshop.Question, rv workshop.Revision) (elicit.Fit, error) {
	key := fitKey(q, rv)
	c.mu.Lock()
	if r, ok := c.cur[key]; ok {
		c.mu.Unlock()
		return r.fit, r.err
	}
	if r, ok := c.old[key]; ok {
		c.put(key, r)
		c.mu.Unlock()
		return r.fit, r.err
	}
	c.mu.Unlock()
	// Fitting takes milliseconds; other requests go on meanwhile. Two
	// requests for the same new revision may both fit it, with equal
	// results.
	fit, err := q.Fit(rv.Answer)
	c.mu.Lock()
	c.misses++
	c.put(key, fitResult{fit, err})
	c.mu.Unlock()
	return fit, err
}

// put stores r under key; c.mu is held.
func (c *fitCache) put(key string, r fitResult) {
	if len(c.cur) >= c.half {
		c.old, c.cur = c.cur, make(map[string]fitResult, c.half)
	}
	c.cur[key] = r
}

// len is the number of fits held.
func (c *fitCache) len() int {
	c.mu.Lock()
	defer c.mu.Unlock()
	return len(c.cur) + len(c.old)
}

// fitKey writes the revision id and every input of Question.Fit as bytes.
func fitKey(q workshop.Question, rv workshop.Revision) string {
	b := make([]byte, 0, 16*8+8*(len(q.Probs)+len(q.BinEdges)+len(rv.Answer.Values)+len(rv.Answer.Counts)))
	u := func(v uint64) { b = binary.LittleEndian.AppendUint64(b, v) }
	f := func(v float64) { u(math.Float64bits(v)) }
	fs := func(vs []float64) {
		u(uint64(len(vs)))
		for _, v := range vs {
			f(v)
		}
	}
	u(uint64(rv.ID))
	u(uint64(q.ID))
	f(q.Lower)
	f(q.Upper)
	u(uint64(len(q.Format)))
	b = append(b, q.Format...)
	fs(q.Probs)
	fs(q.BinEdges)
	u(uint64(q.Chips))
	a := rv.Answer
	fs(a.Values)
	f(a.Lowest)
	f(a.Highest)
	f(a.Best)
	f(a.Confidence)
	u(uint64(len(a.Counts)))
	for _, n := range a.Counts {
		u(uint64(n))
	}
	return string(b)
}

package web

import (
	"encoding/binary"
	"math"
	"sync/atomic"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/internal/memo"
)

// A saved revision never changes (revisions are append-only) and a
// question's bounds, format, probabilities and bins are fixed when it is
// added, so the fit of a saved answer is the same every time a page asks
// for it. A revision saved or imported since fits were kept carries its
// fit (Revision.Kept); the expert pages and the facilitator's panel ask
// for every expert's current fit on every request, and fitCache serves
// the kept fit, or fits a revision that has none once and remembers it.
//
// The key is the revision id together with everything Question.Fit
// reads: the question's bounds, format, probabilities, bins and chips,
// and the answer. So the key is never stale, even when several databases
// with the same revision ids are served from one process, as in tests.

// fitCacheSize bounds the fits remembered: a full workshop of 200
// experts and 10 questions has 2000 current fits.
const fitCacheSize = 8192

// fitCache is the fits of revisions: the kept fit when there is one,
// else Question.Fit remembered in a memo.Memo (a revision missed by many
// requests at once is fitted once). Each Server owns one.
type fitCache struct {
	memo     *memo.Memo[string, fitResult]
	computed atomic.Int64 // fits run, for tests
}

// fitResult is a fit or why there is none; a judgement the question
// cannot fit is remembered with its error.
type fitResult struct {
	fit elicit.Fit
	err error
}

func newFitCache(size int) *fitCache {
	return &fitCache{memo: memo.New[string, fitResult](size)}
}

// fit returns rv's fit under q: rv.Kept when kept, else q.Fit(rv.Answer)
// computed at most once per key while it stays in the memo. The returned
// Fit's slices are shared between callers and must not be modified.
func (c *fitCache) fit(q workshop.Question, rv workshop.Revision) (elicit.Fit, error) {
	if rv.Kept != nil {
		return *rv.Kept, nil
	}
	r := c.memo.Get(fitKey(q, rv), func() fitResult {
		c.computed.Add(1)
		fit, err := q.Fit(rv.Answer)
		return fitResult{fit, err}
	})
	return r.fit, r.err
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

package web

import (
	"bytes"
	"context"
	"errors"
	"io"
	"log/slog"
	"net/http"
	"net/http/httptest"
	"reflect"
	"slices"
	"sort"
	"strings"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/store"
	"github.com/parley-elicit/parley/web/chart"
)

func cacheQuestion() workshop.Question {
	return workshop.Question{ID: 7, Wording: "Share of invented pumps that leak?", Quantity: "leak share", Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95}}
}

func cacheRevision(id int64, median float64) workshop.Revision {
	return workshop.Revision{ID: id, QuestionID: 7, ExpertID: 1,
		Answer: workshop.Answer{Values: []float64{median - 0.15, median, median + 0.15}}}
}

func TestFitCacheHitIsTheSameFit(t *testing.T) {
	c := newFitCache(16)
	q, rv := cacheQuestion(), cacheRevision(1, 0.4)
	want, err := q.Fit(rv.Answer)
	if err != nil {
		t.Fatal(err)
	}
	for range 3 {
		got, err := c.fit(q, rv)
		if err != nil || !reflect.DeepEqual(got, want) {
			t.Fatalf("cached fit = %+v, %v; want %+v", got, err, want)
		}
	}
	if c.computed.Load() != 1 {
		t.Errorf("fitted %d times for one revision, want once", c.computed.Load())
	}
}

// A new revision, or the same id with another answer or question (another
// database in the same process), is fitted afresh, never served an
// earlier fit.
func TestFitCacheNeverStale(t *testing.T) {
	c := newFitCache(16)
	q := cacheQuestion()
	first, _ := c.fit(q, cacheRevision(1, 0.3))
	for _, tt := range []struct {
		name string
		q    workshop.Question
		rv   workshop.Revision
	}{
		{"new revision", q, cacheRevision(2, 0.6)},
		{"same id, other answer", q, cacheRevision(1, 0.6)},
		{"same id and answer, other bounds", func() workshop.Question { q := q; q.Upper = 2; return q }(), cacheRevision(1, 0.3)},
	} {
		got, err := c.fit(tt.q, tt.rv)
		want, werr := tt.q.Fit(tt.rv.Answer)
		if err != nil || werr != nil {
			t.Fatalf("%s: %v, %v", tt.name, err, werr)
		}
		if !reflect.DeepEqual(got, want) || reflect.DeepEqual(got.Dist, first.Dist) {
			t.Errorf("%s: got %+v, want %+v (the first fit was %+v)", tt.name, got.Dist, want.Dist, first.Dist)
		}
	}
	if c.computed.Load() != 4 {
		t.Errorf("%d fits computed, want 4", c.computed.Load())
	}
}

// A judgement elicit refuses is remembered with its error.
func TestFitCacheKeepsErrors(t *testing.T) {
	c := newFitCache(16)
	q := cacheQuestion()
	bad := workshop.Revision{ID: 3, Answer: workshop.Answer{Values: []float64{0.5, 0.4, 0.6}}}
	_, werr := q.Fit(bad.Answer)
	if werr == nil {
		t.Fatal("elicit accepted values that do not increase")
	}
	for range 2 {
		if _, err := c.fit(q, bad); err == nil || err.Error() != werr.Error() {
			t.Fatalf("cached error %v, want %v", err, werr)
		}
	}
	if c.computed.Load() != 1 {
		t.Errorf("fitted %d times, want once", c.computed.Load())
	}
}

func TestFitCacheBounded(t *testing.T) {
	c := newFitCache(8)
	q := cacheQuestion()
	for i := range 40 {
		if _, err := c.fit(q, cacheRevision(int64(i+1), 0.2+0.01*float64(i))); err != nil {
			t.Fatal(err)
		}
		if n := c.memo.Len(); n > 8 {
			t.Fatalf("after %d fits the cache holds %d, more than its size 8", i+1, n)
		}
	}
	// An entry in use survives the turnover of generations.
	hot := cacheRevision(100, 0.5)
	c.fit(q, hot)
	for i := range 20 {
		c.fit(q, cacheRevision(int64(200+i), 0.2+0.01*float64(i)))
		c.fit(q, hot)
	}
	if c.computed.Load() != 40+1+20 {
		t.Errorf("%d fits computed, want %d: the revision asked for each time was fitted again", c.computed.Load(), 61)
	}
}

// Run with -race: many requests sharing the cache.
func TestFitCacheConcurrent(t *testing.T) {
	c := newFitCache(8)
	q := cacheQuestion()
	var wg sync.WaitGroup
	for g := range 8 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range 30 {
				rv := cacheRevision(int64(i%12+1), 0.2+0.02*float64(i%12))
				got, err := c.fit(q, rv)
				want, _ := q.Fit(rv.Answer)
				if err != nil || got.Dist != want.Dist {
					t.Errorf("goroutine %d: revision %d got %+v, want %+v", g, rv.ID, got.Dist, want.Dist)
					return
				}
			}
		}()
	}
	wg.Wait()
}

// Through the server: from round 2 an expert's page shows the panel as
// the previous round closed (controlled Delphi feedback). A revision
// saved in round 2 changes the reviser's own curve at once but reaches
// the others only when round 2 has closed and round 3 opened; a revoked
// expert leaves the panel at once, though the panel is remembered.
func TestPanelShowsTheRoundAsItClosed(t *testing.T) {
	// Dario answers too, so that Ada reads two others' answers after
	// Bruno leaves (othersShown).
	g := newExpertRig(t, "Ada Quell", "Bruno Ferrante", "Chiara Osei", "Dario Ruiz")
	ctx := context.Background()
	save := func(i int, vals ...string) {
		t.Helper()
		if resp, _ := g.post(g.qpath(i, g.q)+"/save", quantiles(vals...)); resp.StatusCode != http.StatusSeeOther {
			t.Fatalf("expert %d save: %d", i, resp.StatusCode)
		}
	}
	next := func(round int) {
		t.Helper()
		if err := g.db.SetRound(ctx, g.ws.ID, round-1, false, "discussion"); err != nil {
			t.Fatal(err)
		}
		if err := g.db.SetRound(ctx, g.ws.ID, round, true, "next round"); err != nil {
			t.Fatal(err)
		}
	}
	// params names a curve as the panel's caption does, by its points:
	// the expert's page does not write its Beta.
	params := func(vals ...float64) string {
		t.Helper()
		fit, err := g.q.Fit(workshop.Answer{Values: vals})
		if err != nil {
			t.Fatal(err)
		}
		ps := chart.FormatRangeWithin(fit.Percentiles[:], g.q.Lower, g.q.Upper, false)
		return "median " + ps[1] + ", 90% between " + ps[0] + " and " + ps[2]
	}
	panelOf := func(i int) string {
		t.Helper()
		_, page := g.get(g.qpath(i, g.q))
		start, end := strings.Index(page, "What the other experts said"), strings.Index(page, "Your history")
		if start < 0 || end < start {
			t.Fatalf("expert %d: no panel before the history", i)
		}
		return page[start:end]
	}
	save(0, "0.05", "0.2", "0.4")
	save(1, "0.02", "0.08", "0.2")
	save(2, "0.1", "0.3", "0.5")
	save(3, "0.04", "0.12", "0.3")
	next(2)
	bruno1, bruno2, chiara := params(0.02, 0.08, 0.2), params(0.3, 0.55, 0.8), params(0.1, 0.3, 0.5)
	if p := panelOf(0); !strings.Contains(p, bruno1) || !strings.Contains(p, "as they stood when round 1 closed") {
		t.Fatalf("round 2 panel lacks Bruno's round-1 %s or does not say which round it shows", bruno1)
	}
	save(1, "0.3", "0.55", "0.8")
	if p := panelOf(0); !strings.Contains(p, bruno1) || strings.Contains(p, bruno2) {
		t.Errorf("in round 2 Ada's panel should still show Bruno's round-1 %s, not his round-2 %s", bruno1, bruno2)
	}
	if p := panelOf(1); !strings.Contains(p, bruno2) {
		t.Errorf("Bruno's own panel does not draw his revised curve %s as his own", bruno2)
	}
	next(3)
	if p := panelOf(0); !strings.Contains(p, bruno2) || strings.Contains(p, bruno1) || !strings.Contains(p, "round 2 closed") {
		t.Errorf("in round 3 Ada's panel should show Bruno's round-2 %s and not his round-1 %s", bruno2, bruno1)
	}
	// Chiara did not revise in round 2: her round-1 judgement stands.
	if p := panelOf(0); !strings.Contains(p, chiara) {
		t.Errorf("round 3 panel lacks Chiara's standing %s", chiara)
	}
	if err := g.db.RevokeExpert(ctx, g.experts[1].ID, "left the panel"); err != nil {
		t.Fatal(err)
	}
	if p := panelOf(0); strings.Contains(p, bruno2) || !strings.Contains(p, chiara) {
		t.Errorf("after Bruno's revocation Ada's panel should drop his %s and keep Chiara's %s", bruno2, chiara)
	}
	// Chiara's own page previews her standing fit.
	_, own := g.get(g.qpath(2, g.q))
	if !strings.Contains(own, params2(t, g.q, 0.1, 0.3, 0.5)) {
		t.Errorf("Chiara's page does not preview her fit %s", params2(t, g.q, 0.1, 0.3, 0.5))
	}
}

// params2 is the preview's wording of the fit to vals.
func params2(t *testing.T, q workshop.Question, vals ...float64) string {
	t.Helper()
	fit, err := q.Fit(workshop.Answer{Values: vals})
	if err != nil {
		t.Fatal(err)
	}
	return "Beta(α = " + chart.FormatValue(fit.Dist.Alpha) + ", β = " + chart.FormatValue(fit.Dist.Beta.Beta) + ")"
}

// The live preview's fragment, even in round 2 with a panel on the page
// and a history behind it, carries only the fitted picture and its
// read-backs.
func TestPreviewFragmentIsOnlyTheFit(t *testing.T) {
	g := newExpertRig(t, "Ada Quell", "Bruno Ferrante")
	for i, vals := range [][]string{{"0.05", "0.2", "0.4"}, {"0.02", "0.08", "0.2"}} {
		if resp, _ := g.post(g.qpath(i, g.q)+"/save", quantiles(vals...)); resp.StatusCode != http.StatusSeeOther {
			t.Fatalf("expert %d save: %d", i, resp.StatusCode)
		}
	}
	g.secondRound()
	if _, page := g.get(g.qpath(0, g.q)); !strings.Contains(page, "What the other experts said") || !strings.Contains(page, "Your history") {
		t.Fatal("the round 2 page lacks the panel or the history the fragment must leave out")
	}
	resp, frag := g.post(g.qpath(0, g.q)+"/preview?fragment=1", quantiles("0.06", "0.21", "0.41"))
	if resp.StatusCode != http.StatusOK {
		t.Fatalf("fragment: status %d", resp.StatusCode)
	}
	if want := params2(t, g.q, 0.06, 0.21, 0.41); !strings.Contains(frag, want) || !strings.Contains(frag, "You are saying") {
		t.Errorf("fragment lacks the fit %s or its read-backs", want)
	}
	for _, absent := range []string{"What the other experts said", "Your history", "Equal-weight pool", `data-label="Expert 1"`, "<html"} {
		if strings.Contains(frag, absent) {
			t.Errorf("fragment carries %q", absent)
		}
	}
}

// The feedback's order is keyed by the workshop's secret salt: stable for
// one salt, different under another, so knowing the ids is not enough to
// tell which curve is whose.
func TestPanelOrderNeedsTheSalt(t *testing.T) {
	a, b := bytes.Repeat([]byte{1}, 32), bytes.Repeat([]byte{2}, 32)
	order := func(salt []byte) []int64 {
		ids := []int64{1, 2, 3, 4, 5, 6, 7, 8}
		sort.Slice(ids, func(i, j int) bool { return panelOrder(salt, 9, ids[i]) < panelOrder(salt, 9, ids[j]) })
		return ids
	}
	if !slices.Equal(order(a), order(a)) {
		t.Error("the order under one salt is not stable")
	}
	if slices.Equal(order(a), order(b)) {
		t.Errorf("two salts give the same order %v", order(a))
	}
	if panelOrder(a, 9, 1) == panelOrder(a, 10, 1) {
		t.Error("the order does not change from question to question")
	}
}

// failingFeedback is the store with the round feedback's read failing.
type failingFeedback struct{ *store.DB }

func (failingFeedback) LatestRevisions(context.Context, int64, int) ([]workshop.Revision, error) {
	return nil, errors.New("disk unreadable (test)")
}

// When the panel cannot be read, the round-2 page still shows the form
// and says the panel is missing, instead of silently leaving it out.
func TestPanelReadFailureIsSaid(t *testing.T) {
	g := newExpertRig(t, "Ada Quell", "Bruno Ferrante")
	for i, vals := range [][]string{{"0.05", "0.2", "0.4"}, {"0.02", "0.08", "0.2"}} {
		if resp, _ := g.post(g.qpath(i, g.q)+"/save", quantiles(vals...)); resp.StatusCode != http.StatusSeeOther {
			t.Fatalf("save: %d", resp.StatusCode)
		}
	}
	g.secondRound()
	s, err := New(failingFeedback{g.db}, Options{Logger: slog.New(slog.NewTextHandler(io.Discard, nil))})
	if err != nil {
		t.Fatal(err)
	}
	srv := httptest.NewServer(s.Handler())
	defer srv.Close()
	res, err := http.Get(srv.URL + g.qpath(0, g.q))
	if err != nil {
		t.Fatal(err)
	}
	b, _ := io.ReadAll(res.Body)
	res.Body.Close()
	page := string(b)
	if res.StatusCode != http.StatusOK || !strings.Contains(page, "could not be read just now") || strings.Contains(page, "What the other experts said") {
		t.Errorf("status %d; page should keep the form and say the panel is missing", res.StatusCode)
	}
	if !strings.Contains(page, `name="values[1]"`) {
		t.Error("the form is missing")
	}
}

// A revision that carries its kept fit is served that fit, never fitted
// again; only a revision without one is fitted.
func TestFitCacheServesTheKeptFitFirst(t *testing.T) {
	c := newFitCache(16)
	q := cacheQuestion()
	rv := cacheRevision(1, 0.4)
	fresh, err := q.Fit(rv.Answer)
	if err != nil {
		t.Fatal(err)
	}
	// A kept fit unlike a fresh one shows which was served.
	kept := fresh
	kept.Dist.Alpha, kept.Dist.Beta.Beta = 2, 5
	rv.Kept = &kept
	for range 2 {
		got, err := c.fit(q, rv)
		if err != nil || got.Dist != kept.Dist {
			t.Fatalf("fit of a revision with a kept fit = %+v, %v; want the kept %+v", got.Dist, err, kept.Dist)
		}
	}
	if n := c.computed.Load(); n != 0 || c.memo.Len() != 0 {
		t.Errorf("a revision with a kept fit was fitted %d times (%d remembered), want never", n, c.memo.Len())
	}
	rv.Kept = nil
	if got, err := c.fit(q, rv); err != nil || got.Dist != fresh.Dist || c.computed.Load() != 1 {
		t.Errorf("without a kept fit: %+v, %v after %d fits; want the fresh %+v after one", got.Dist, err, c.computed.Load(), fresh.Dist)
	}
}

// blockingFeedback is the store with the round feedback's read held
// until release is closed, counting the reads.
type blockingFeedback struct {
	*store.DB
	reads   atomic.Int32
	release chan struct{}
}

func (b *blockingFeedback) LatestRevisions(ctx context.Context, question int64, through int) ([]workshop.Revision, error) {
	b.reads.Add(1)
	<-b.release
	return b.DB.LatestRevisions(ctx, question, through)
}

// Every expert opening round 2 at once needs the same feedback: it is
// read and pooled once, not once per expert. The first read is held
// until every request has come in (or a moment has passed), so the
// requests overlap; without the memo's one computation per key each
// would read the panel itself.
func TestRoundFeedbackComputedOnceForConcurrentRequests(t *testing.T) {
	g := newExpertRig(t, "Ada Quell", "Bruno Ferrante", "Chiara Osei")
	for i, vals := range [][]string{{"0.05", "0.2", "0.4"}, {"0.02", "0.08", "0.2"}, {"0.1", "0.3", "0.5"}} {
		if resp, _ := g.post(g.qpath(i, g.q)+"/save", quantiles(vals...)); resp.StatusCode != http.StatusSeeOther {
			t.Fatalf("expert %d save: %d", i, resp.StatusCode)
		}
	}
	ctx := context.Background()
	g.secondRound()
	ws, err := g.db.Workshop(ctx, g.ws.ID)
	if err != nil {
		t.Fatal(err)
	}
	st := &blockingFeedback{DB: g.db, release: make(chan struct{})}
	s, err := New(st, Options{Logger: slog.New(slog.NewTextHandler(io.Discard, nil))})
	if err != nil {
		t.Fatal(err)
	}
	const n = 12
	var wg sync.WaitGroup
	fbs := make([]*feedback, n)
	for i := range n {
		wg.Add(1)
		go func() {
			defer wg.Done()
			fb, err := s.panelThrough(httptest.NewRequest("GET", "/", nil), ws, g.q, 1)
			if err != nil {
				t.Errorf("request %d: %v", i, err)
			}
			fbs[i] = fb
		}()
	}
	for deadline := time.Now().Add(300 * time.Millisecond); st.reads.Load() < n && time.Now().Before(deadline); {
		time.Sleep(time.Millisecond)
	}
	close(st.release)
	wg.Wait()
	if r := st.reads.Load(); r != 1 {
		t.Errorf("%d concurrent requests read the round's panel %d times, want once", n, r)
	}
	for i, fb := range fbs {
		if fb == nil || fb != fbs[0] || len(fb.members) != 3 {
			t.Fatalf("request %d got feedback %p, want the one shared feedback of 3 experts", i, fb)
		}
	}
}

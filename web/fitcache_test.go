package web

import (
	"context"
	"net/http"
	"reflect"
	"strings"
	"sync"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/web/chart"
)

func cacheQuestion() elicit.Question {
	return elicit.Question{ID: 7, Wording: "Share of invented pumps that leak?", Quantity: "leak share", Lower: 0, Upper: 1, Format: elicit.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95}}
}

func cacheRevision(id int64, median float64) elicit.Revision {
	return elicit.Revision{ID: id, QuestionID: 7, ExpertID: 1,
		Answer: elicit.Answer{Values: []float64{median - 0.15, median, median + 0.15}}}
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
	if c.misses != 1 {
		t.Errorf("fitted %d times for one revision, want once", c.misses)
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
		q    elicit.Question
		rv   elicit.Revision
	}{
		{"new revision", q, cacheRevision(2, 0.6)},
		{"same id, other answer", q, cacheRevision(1, 0.6)},
		{"same id and answer, other bounds", func() elicit.Question { q := q; q.Upper = 2; return q }(), cacheRevision(1, 0.3)},
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
	if c.misses != 4 {
		t.Errorf("%d fits computed, want 4", c.misses)
	}
}

// A judgement elicit refuses is remembered with its error.
func TestFitCacheKeepsErrors(t *testing.T) {
	c := newFitCache(16)
	q := cacheQuestion()
	bad := elicit.Revision{ID: 3, Answer: elicit.Answer{Values: []float64{0.5, 0.4, 0.6}}}
	_, werr := q.Fit(bad.Answer)
	if werr == nil {
		t.Fatal("elicit accepted values that do not increase")
	}
	for range 2 {
		if _, err := c.fit(q, bad); err == nil || err.Error() != werr.Error() {
			t.Fatalf("cached error %v, want %v", err, werr)
		}
	}
	if c.misses != 1 {
		t.Errorf("fitted %d times, want once", c.misses)
	}
}

func TestFitCacheBounded(t *testing.T) {
	c := newFitCache(8)
	q := cacheQuestion()
	for i := range 40 {
		if _, err := c.fit(q, cacheRevision(int64(i+1), 0.2+0.01*float64(i))); err != nil {
			t.Fatal(err)
		}
		if n := c.len(); n > 8 {
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
	if c.misses != 40+1+20 {
		t.Errorf("%d fits computed, want %d: the revision asked for each time was fitted again", c.misses, 61)
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

// Through the server: from round 2 an expert's page shows the other
// experts' current fits, so when one of them revises, the next view of
// the page carries the revised fit and not the one remembered before.
func TestPanelShowsARevisionSavedAfterTheLastView(t *testing.T) {
	g := newExpertRig(t, "Ada Quell", "Bruno Ferrante")
	save := func(i int, vals ...string) {
		t.Helper()
		if resp, _ := g.post(g.qpath(i, g.q)+"/save", quantiles(vals...)); resp.StatusCode != http.StatusSeeOther {
			t.Fatalf("expert %d save: %d", i, resp.StatusCode)
		}
	}
	params := func(vals ...float64) string {
		t.Helper()
		fit, err := g.q.Fit(elicit.Answer{Values: vals})
		if err != nil {
			t.Fatal(err)
		}
		return "Beta(" + chart.FormatValue(fit.Dist.Alpha) + ", " + chart.FormatValue(fit.Dist.Beta.Beta) + ")"
	}
	save(0, "0.05", "0.2", "0.4")
	save(1, "0.02", "0.08", "0.2")
	ctx := context.Background()
	if err := g.db.SetRound(ctx, g.ws.ID, 1, false, "discussion"); err != nil {
		t.Fatal(err)
	}
	if err := g.db.SetRound(ctx, g.ws.ID, 2, true, "second round"); err != nil {
		t.Fatal(err)
	}
	before, after := params(0.02, 0.08, 0.2), params(0.3, 0.55, 0.8)
	if _, page := g.get(g.qpath(0, g.q)); !strings.Contains(page, before) {
		t.Fatalf("round 2 page lacks the other expert's %s", before)
	}
	save(1, "0.3", "0.55", "0.8")
	_, page := g.get(g.qpath(0, g.q))
	if !strings.Contains(page, after) {
		t.Errorf("after the revision the panel lacks the revised %s", after)
	}
	if strings.Contains(page, before) {
		t.Errorf("after the revision the panel still shows the superseded %s", before)
	}
	// The reviser's own page shows their new fit in the preview and both
	// in their history.
	_, own := g.get(g.qpath(1, g.q))
	if !strings.Contains(own, params2(t, g.q, 0.3, 0.55, 0.8)) {
		t.Errorf("the reviser's page does not preview the revised fit %s", params2(t, g.q, 0.3, 0.55, 0.8))
	}
}

// params2 is the preview's wording of the fit to vals.
func params2(t *testing.T, q elicit.Question, vals ...float64) string {
	t.Helper()
	fit, err := q.Fit(elicit.Answer{Values: vals})
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
	ctx := context.Background()
	if err := g.db.SetRound(ctx, g.ws.ID, 1, false, "discussion"); err != nil {
		t.Fatal(err)
	}
	if err := g.db.SetRound(ctx, g.ws.ID, 2, true, "second round"); err != nil {
		t.Fatal(err)
	}
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

package web

import (
	"context"
	"net/http"
	"net/http/httptest"
	"sync"
	"sync/atomic"
	"testing"
	"time"
)

// At most n handlers run at once in turns; each held response reaches its
// client whole, with its status and headers.
func TestTurnsBoundHandlersAtOnce(t *testing.T) {
	const n = 2
	s := &Server{turns: newTurns(n)}
	var running, most atomic.Int32
	h := s.inTurn(pagePriority, func(w http.ResponseWriter, r *http.Request) {
		k := running.Add(1)
		for {
			m := most.Load()
			if k <= m || most.CompareAndSwap(m, k) {
				break
			}
		}
		time.Sleep(2 * time.Millisecond) // hold the turn so that others queue
		w.Header().Set("X-Page", "question")
		w.WriteHeader(http.StatusConflict)
		w.Write([]byte("page body"))
		running.Add(-1)
	})
	recs := make([]*httptest.ResponseRecorder, 4*n+3)
	var wg sync.WaitGroup
	for i := range recs {
		recs[i] = httptest.NewRecorder()
		wg.Add(1)
		go func() {
			defer wg.Done()
			h(recs[i], httptest.NewRequest(http.MethodGet, "/e/x/q/1", nil))
		}()
	}
	wg.Wait()
	if m := most.Load(); m > n || m < 1 {
		t.Errorf("%d handlers ran at once, want between 1 and %d", m, n)
	}
	for i, rec := range recs {
		if rec.Code != http.StatusConflict || rec.Body.String() != "page body" || rec.Header().Get("X-Page") != "question" {
			t.Errorf("response %d: %d %q %v", i, rec.Code, rec.Body.String(), rec.Header())
		}
	}
	if s.turns.free != n {
		t.Errorf("%d turns free after the burst, want %d", s.turns.free, n)
	}
}

// waitQueued waits until the turns have fast and slow waiters queued.
func waitQueued(t *testing.T, tr *turns, fast, slow int) {
	t.Helper()
	for deadline := time.Now().Add(5 * time.Second); time.Now().Before(deadline); time.Sleep(time.Millisecond) {
		tr.mu.Lock()
		f, s := len(tr.fastQ), len(tr.pageQ)
		tr.mu.Unlock()
		if f == fast && s == slow {
			return
		}
	}
	t.Fatalf("waiters never reached %d fast and %d slow", fast, slow)
}

// With the one turn taken, a preview that arrives after a page still goes
// first; and a page waiting behind a stream of previews and saves gets
// its turn after fastRun of them.
func TestTurnsPutPreviewsBeforePages(t *testing.T) {
	tr := newTurns(1)
	req := httptest.NewRequest(http.MethodGet, "/", nil)
	if !tr.acquire(req, pagePriority) {
		t.Fatal("no first turn")
	}
	var mu sync.Mutex
	var order []string
	var wg sync.WaitGroup
	wait := func(name string, p priority) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			if !tr.acquire(req, p) {
				t.Errorf("%s got no turn", name)
				return
			}
			mu.Lock()
			order = append(order, name)
			mu.Unlock()
			tr.release(p)
		}()
	}
	wait("page", pagePriority)
	waitQueued(t, tr, 0, 1)
	for i := range fastRun + 3 {
		wait("preview", interactivePriority)
		waitQueued(t, tr, i+1, 1)
	}
	tr.release(pagePriority)
	wg.Wait()
	if len(order) != fastRun+4 {
		t.Fatalf("%d turns taken, want %d", len(order), fastRun+4)
	}
	for i, name := range order {
		want := "preview"
		if i == fastRun {
			want = "page"
		}
		if name != want {
			t.Errorf("turn %d went to a %s, want a %s (order %v)", i, name, want, order)
			break
		}
	}
	if tr.free != 1 || tr.run != 0 {
		t.Errorf("after the run: %d free, run %d; want 1, 0", tr.free, tr.run)
	}
}

// A request cancelled while waiting runs nothing, sends nothing and
// leaves the turns as they were.
func TestCancelledWaitRunsNothing(t *testing.T) {
	s := &Server{turns: newTurns(1)}
	hold := httptest.NewRequest(http.MethodGet, "/", nil)
	if !s.turns.acquire(hold, interactivePriority) {
		t.Fatal("no first turn")
	}
	ctx, cancel := context.WithCancel(context.Background())
	rec := httptest.NewRecorder()
	ran := false
	done := make(chan struct{})
	go func() {
		s.inTurn(pagePriority, func(http.ResponseWriter, *http.Request) { ran = true })(rec,
			httptest.NewRequest(http.MethodGet, "/", nil).WithContext(ctx))
		close(done)
	}()
	waitQueued(t, s.turns, 0, 1)
	cancel()
	<-done
	if ran || rec.Body.Len() != 0 {
		t.Errorf("a cancelled wait ran %v and sent %q", ran, rec.Body.String())
	}
	waitQueued(t, s.turns, 0, 0)
	s.turns.release(interactivePriority)
	if s.turns.free != 1 {
		t.Errorf("%d turns free, want 1", s.turns.free)
	}
}

// acquireAsync asks for a turn in the background; the function it returns
// reports whether the turn was given within d.
func acquireAsync(tr *turns, p priority) (started func(time.Duration) bool) {
	done := make(chan struct{})
	go func() {
		tr.acquire(httptest.NewRequest(http.MethodGet, "/", nil), p)
		close(done)
	}()
	return func(d time.Duration) bool {
		select {
		case <-done:
			return true
		case <-time.After(d):
			return false
		}
	}
}

// With two turns, one page runs at a time and the other turn stays for
// previews and saves; no page starts while a preview runs or a save is
// away at the database.
func TestTurnsKeepRoomForPreviews(t *testing.T) {
	tr := newTurns(2)
	req := httptest.NewRequest(http.MethodGet, "/", nil)
	if !tr.acquire(req, pagePriority) {
		t.Fatal("no turn for the first page")
	}
	second := acquireAsync(tr, pagePriority)
	if second(20 * time.Millisecond) {
		t.Fatal("a second page started beside the first on two turns")
	}
	if !acquireAsync(tr, interactivePriority)(time.Second) {
		t.Fatal("a preview did not get the free turn")
	}
	// The preview is running: the page's turn comes back, but the
	// waiting page may not start until the preview is done.
	tr.release(pagePriority)
	if second(20 * time.Millisecond) {
		t.Fatal("a page started while a preview was running")
	}
	// The preview's save goes away to the database: still no page.
	tr.leave(interactivePriority)
	if second(20 * time.Millisecond) {
		t.Fatal("a page started while a save was away at the database")
	}
	tr.back(interactivePriority)
	if !second(time.Second) {
		t.Fatal("the page did not start once previews and saves were done")
	}
	tr.release(pagePriority)
	if tr.free != 2 || tr.pages != 0 || tr.fast != 0 || tr.away != 0 {
		t.Errorf("turns not all back: %+v", tr)
	}
}

// A save that steps away through the handler gives its turn to a waiting
// preview, and comes back for a turn before drawing.
func TestStepAwayLendsTheTurn(t *testing.T) {
	s := &Server{turns: newTurns(1)}
	previewRan := make(chan struct{})
	var preview func(time.Duration) bool
	h := s.inTurn(interactivePriority, func(w http.ResponseWriter, r *http.Request) {
		preview = acquireAsync(s.turns, interactivePriority)
		if preview(20 * time.Millisecond) {
			t.Error("the preview ran while the save held the only turn")
		}
		stepAway(r)
		if !preview(time.Second) {
			t.Error("the preview did not get the turn the save stepped away from")
		}
		close(previewRan)
		s.turns.release(interactivePriority) // the preview is done
		if !stepBack(r) {
			t.Error("the save did not get a turn back")
		}
		w.WriteHeader(http.StatusSeeOther)
	})
	rec := httptest.NewRecorder()
	h(rec, httptest.NewRequest(http.MethodPost, "/", nil))
	<-previewRan
	if rec.Code != http.StatusSeeOther {
		t.Errorf("status %d, want 303", rec.Code)
	}
	if s.turns.free != 1 || s.turns.fast != 0 || s.turns.away != 0 {
		t.Errorf("turns not all back: %+v", s.turns)
	}
}

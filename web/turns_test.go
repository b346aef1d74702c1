package web

import (
	"context"
	"io"
	"net/http"
	"net/http/httptest"
	"strings"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	"github.com/parley-elicit/parley/internal/turns"
)

// At most n handlers run at once in turns; each held response reaches its
// client whole, with its status and headers.
func TestTurnsBoundHandlersAtOnce(t *testing.T) {
	const n = 2
	s := &Server{turns: turns.New(n)}
	var running, most atomic.Int32
	h := s.inTurn(turns.Page, func(w http.ResponseWriter, r *http.Request) {
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
	if !s.turns.Idle() {
		t.Errorf("turns not all back after the burst: %+v", s.turns)
	}
}

// waitQueued waits until the turns have fast and slow waiters queued.
func waitQueued(t *testing.T, tr *turns.Turns, fast, slow int) {
	t.Helper()
	for deadline := time.Now().Add(5 * time.Second); time.Now().Before(deadline); time.Sleep(time.Millisecond) {
		if f, s := tr.Waiting(); f == fast && s == slow {
			return
		}
	}
	t.Fatalf("waiters never reached %d fast and %d slow", fast, slow)
}

// A request cancelled while waiting runs nothing, sends nothing and
// leaves the turns as they were.
func TestCancelledWaitRunsNothing(t *testing.T) {
	s := &Server{turns: turns.New(1)}
	if !s.turns.Acquire(context.Background(), turns.Interactive) {
		t.Fatal("no first turn")
	}
	ctx, cancel := context.WithCancel(context.Background())
	rec := httptest.NewRecorder()
	ran := false
	done := make(chan struct{})
	go func() {
		s.inTurn(turns.Page, func(http.ResponseWriter, *http.Request) { ran = true })(rec,
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
	s.turns.Release(turns.Interactive)
	if !s.turns.Idle() {
		t.Errorf("turns not all back: %+v", s.turns)
	}
}

// acquireAsync asks for a turn in the background; the function it returns
// reports whether the turn was given within d.
func acquireAsync(tr *turns.Turns, p turns.Priority) (started func(time.Duration) bool) {
	done := make(chan struct{})
	go func() {
		tr.Acquire(context.Background(), p)
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

// A save that steps away through the handler gives its turn to a waiting
// preview, and comes back for a turn before drawing.
func TestStepAwayLendsTheTurn(t *testing.T) {
	s := &Server{turns: turns.New(1)}
	previewRan := make(chan struct{})
	var preview func(time.Duration) bool
	h := s.inTurn(turns.Interactive, func(w http.ResponseWriter, r *http.Request) {
		preview = acquireAsync(s.turns, turns.Interactive)
		if preview(20 * time.Millisecond) {
			t.Error("the preview ran while the save held the only turn")
		}
		turns.StepAway(r.Context())
		if !preview(time.Second) {
			t.Error("the preview did not get the turn the save stepped away from")
		}
		close(previewRan)
		s.turns.Release(turns.Interactive) // the preview is done
		if !turns.StepBack(r.Context()) {
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
	if !s.turns.Idle() {
		t.Errorf("turns not all back: %+v", s.turns)
	}
}

// A client that sends its save's body slowly holds no turn while it
// does: with a single turn, another expert's preview still gets through,
// and the slow save is stored once its body arrives.
func TestSlowBodyHoldsNoTurn(t *testing.T) {
	g := newExpertRig(t, "Ada Quell", "Bruno Ferrante")
	g.s.turns = turns.New(1)
	form := quantiles("0.05", "0.2", "0.4")
	form.Set("reason", "sent slowly")
	body := form.Encode()
	pr, pw := io.Pipe()
	req, err := http.NewRequest(http.MethodPost, g.srv.URL+g.qpath(0, g.q)+"/save", pr)
	if err != nil {
		t.Fatal(err)
	}
	req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
	req.Header.Set("Origin", g.srv.URL)
	req.ContentLength = int64(len(body))
	type result struct {
		status int
		err    error
	}
	done := make(chan result, 1)
	go func() {
		res, err := (&http.Client{CheckRedirect: func(*http.Request, []*http.Request) error { return http.ErrUseLastResponse }}).Do(req)
		if err != nil {
			done <- result{0, err}
			return
		}
		res.Body.Close()
		done <- result{res.StatusCode, nil}
	}()
	if _, err := pw.Write([]byte(body[:10])); err != nil { // the head and a little of the body
		t.Fatal(err)
	}
	time.Sleep(50 * time.Millisecond) // let the server start reading it
	preview := make(chan int, 1)
	go func() {
		pv, _ := http.NewRequest(http.MethodPost, g.srv.URL+g.qpath(1, g.q)+"/preview?fragment=1",
			strings.NewReader(quantiles("0.02", "0.08", "0.2").Encode()))
		pv.Header.Set("Content-Type", "application/x-www-form-urlencoded")
		pv.Header.Set("Origin", g.srv.URL)
		res, err := http.DefaultClient.Do(pv)
		if err != nil {
			preview <- 0
			return
		}
		res.Body.Close()
		preview <- res.StatusCode
	}()
	select {
	case status := <-preview:
		if status != http.StatusOK {
			t.Errorf("preview beside a slow save: status %d, want 200", status)
		}
	case <-time.After(10 * time.Second):
		t.Error("a preview waited behind a save whose body had not arrived")
	}
	if _, err := pw.Write([]byte(body[10:])); err != nil {
		t.Fatal(err)
	}
	pw.Close()
	if r := <-done; r.err != nil || r.status != http.StatusSeeOther {
		t.Fatalf("slow save: status %d, error %v; want 303", r.status, r.err)
	}
	revs := g.revisions()
	if len(revs) != 1 || revs[0].Reason != "sent slowly" {
		t.Errorf("stored %+v, want the slow save", revs)
	}
}

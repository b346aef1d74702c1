package web

import (
	"bytes"
	"context"
	"io"
	"net/http"
	"strconv"
	"sync"
	"time"
)

// An expert's requests take turns at the CPUs. Typing into a judgement
// sends a live fit preview on every pause, and a save is what the expert
// waits on before moving on; opening a page is the one request a person
// expects to take a moment. When the server is busy (a room of experts
// at once on a two-core laptop), handlers beyond the number of CPUs wait
// for a turn, and a waiting preview or save is given the next turn
// before a waiting page. So queueing lands on page loads, and previews
// and saves stay quick; pages are still never starved, since after
// fastRun previews and saves have started while a page waits, the page
// goes next.

// priority is a request's place in the queue for a turn.
type priority int

const (
	pagePriority        priority = iota // pages: home, question
	interactivePriority                 // fit previews and saves
)

// fastRun is the most previews and saves started while a page waits
// before the page is started anyway.
const fastRun = 16

// turns admits at most n handlers at once. A preview or save starts
// whenever a turn is free. A page starts only when no preview or save is
// waiting, fewer than m = max(1, n−1) are running or away at the
// database, no other page has finished within pageSettle (unless a
// preview or save has started since), and fewer than m pages are
// running. A page sends its expert on to previews and saves, so starting
// pages only while those are few keeps their line short, and the waiting
// falls on page loads instead. After fastRun previews and saves have
// started while a page waited, the page starts at the next free turn
// whatever else is waiting.
type turns struct {
	mu          sync.Mutex
	free        int
	pageCap     int
	pages, fast int             // running
	away        int             // previews and saves waiting on the database, their turns given back
	fastQ       []chan struct{} // waiting previews and saves, oldest first
	pageQ       []chan struct{} // waiting pages, oldest first
	run         int             // previews and saves started while a page waited
	settling    bool            // a page has just finished; see pageSettle
	settle      *time.Timer
	settleFor   time.Duration // pageSettle; tests lengthen it
}

// pageSettle is how long after a page finishes the next waiting page is
// held back, unless a preview or save starts first. An expert who has
// just been sent a page usually previews next; pages drawn back to back
// while those previews are still on their way would send a crowd of
// experts to preview at once.
const pageSettle = time.Millisecond

func newTurns(n int) *turns {
	n = max(1, n)
	return &turns{free: n, pageCap: max(1, n-1), settleFor: pageSettle}
}

// acquire waits for a turn; it reports false, holding no turn, when the
// request is cancelled first.
func (t *turns) acquire(r *http.Request, p priority) bool {
	t.mu.Lock()
	if p == interactivePriority && t.free > 0 || p == pagePriority && len(t.pageQ) == 0 && t.pageMay() {
		t.start(p)
		t.mu.Unlock()
		return true
	}
	ch := make(chan struct{})
	if p == interactivePriority {
		t.fastQ = append(t.fastQ, ch)
	} else {
		t.pageQ = append(t.pageQ, ch)
	}
	t.mu.Unlock()
	select {
	case <-ch:
		return true
	case <-r.Context().Done():
	}
	t.mu.Lock()
	removed := removeWaiter(&t.fastQ, ch) || removeWaiter(&t.pageQ, ch)
	t.mu.Unlock()
	if !removed {
		// The turn was handed over as the request was cancelled: pass it on.
		t.release(p)
	}
	return false
}

// pageMay reports whether a page may start now; t.mu is held.
func (t *turns) pageMay() bool {
	return t.free > 0 && t.pages < t.pageCap && (len(t.fastQ) == 0 && t.fast+t.away < t.pageCap && !t.settling || t.run >= fastRun)
}

// start counts a turn taken at priority p; t.mu is held.
func (t *turns) start(p priority) {
	t.free--
	if p == pagePriority {
		t.pages++
		t.run = 0
		return
	}
	t.fast++
	t.settling = false
	if len(t.pageQ) > 0 {
		t.run++
	}
}

// release gives back a turn taken at priority p and hands free turns to
// waiters.
func (t *turns) release(p priority) {
	t.mu.Lock()
	t.free++
	if p == pagePriority {
		t.pages--
		t.settling = true
		if t.settle == nil {
			t.settle = time.AfterFunc(t.settleFor, t.settled)
		} else {
			t.settle.Reset(t.settleFor)
		}
	} else {
		t.fast--
	}
	t.handOn()
	t.mu.Unlock()
}

// settled ends the hold after a page (pageSettle).
func (t *turns) settled() {
	t.mu.Lock()
	t.settling = false
	t.handOn()
	t.mu.Unlock()
}

// leave gives back the turn of a handler at priority p that goes on to
// wait on the database; an interactive one still holds pages back until
// it comes back.
func (t *turns) leave(p priority) {
	t.mu.Lock()
	if p == interactivePriority {
		t.away++
	}
	t.mu.Unlock()
	t.release(p)
}

// back ends a wait begun by leave.
func (t *turns) back(p priority) {
	if p != interactivePriority {
		return
	}
	t.mu.Lock()
	t.away--
	t.handOn()
	t.mu.Unlock()
}

// handOn passes free turns to waiters; t.mu is held.
func (t *turns) handOn() {
	for t.free > 0 {
		switch {
		case len(t.pageQ) > 0 && t.run >= fastRun && t.pageMay():
			t.startWaiter(pagePriority)
		case len(t.fastQ) > 0:
			t.startWaiter(interactivePriority)
		case len(t.pageQ) > 0 && t.pageMay():
			t.startWaiter(pagePriority)
		default:
			return
		}
	}
}

// startWaiter starts the oldest waiter at priority p; t.mu is held.
func (t *turns) startWaiter(p priority) {
	q := &t.fastQ
	if p == pagePriority {
		q = &t.pageQ
	}
	ch := (*q)[0]
	*q = (*q)[1:]
	t.start(p)
	close(ch)
}

func removeWaiter(q *[]chan struct{}, ch chan struct{}) bool {
	for i, c := range *q {
		if c == ch {
			*q = append((*q)[:i], (*q)[i+1:]...)
			return true
		}
	}
	return false
}

// inTurn runs h in a turn of s.turns at priority p. The response is held
// in memory and sent after the turn is given back, so a slow connection
// never keeps others from their turn. Nothing is sent when the request
// is cancelled while waiting.
func (s *Server) inTurn(p priority, h http.HandlerFunc) http.HandlerFunc {
	return func(w http.ResponseWriter, r *http.Request) {
		readBodyFirst(r)
		if !s.turns.acquire(r, p) {
			return
		}
		held := &heldResponse{w: w, body: getBuffer()}
		defer putBuffer(held.body)
		hold := &turnHold{t: s.turns, p: p, held: true}
		func() {
			defer func() {
				if hold.held {
					s.turns.release(p)
				}
				if hold.away {
					s.turns.back(p)
				}
			}()
			h(held, r.WithContext(context.WithValue(r.Context(), turnKey{}, hold)))
		}()
		held.send()
	}
}

// readBodyFirst reads a request's body (at most the limit limitBody set)
// before the request asks for a turn, so a client sending its body
// slowly waits on the network without holding a turn that others need.
// The handler reads the same bytes, and the same error if reading failed
// (a body over the limit is still refused with 413 by the handler).
func readBodyFirst(r *http.Request) {
	if r.Body == nil || r.Body == http.NoBody {
		return
	}
	b, err := io.ReadAll(r.Body)
	var rd io.Reader = bytes.NewReader(b)
	if err != nil {
		rd = io.MultiReader(rd, failingReader{err})
	}
	r.Body = io.NopCloser(rd)
}

// failingReader returns its error on every read.
type failingReader struct{ err error }

func (f failingReader) Read([]byte) (int, error) { return 0, f.err }

// turnHold is a handler's turn, which it may step away from.
type turnHold struct {
	t    *turns
	p    priority
	held bool // the turn is held
	away bool // the turn was given back by stepAway
}

type turnKey struct{}

// stepAway gives the request's turn back while the handler waits on
// something other than a CPU (a database write waits on the disk and on
// other writers). Meanwhile other previews and saves may take the turn;
// pages may not, since the expert whose save this is will be back. A handler that has stepped away calls stepBack before
// it draws anything. Outside inTurn both do nothing.
func stepAway(r *http.Request) {
	if hold, _ := r.Context().Value(turnKey{}).(*turnHold); hold != nil && hold.held {
		hold.t.leave(hold.p)
		hold.held, hold.away = false, true
	}
}

// stepBack takes a turn again at the request's priority. It reports
// false, holding no turn, when the request is cancelled first; the
// handler should then stop.
func stepBack(r *http.Request) bool {
	hold, _ := r.Context().Value(turnKey{}).(*turnHold)
	if hold == nil || hold.held {
		return true
	}
	hold.t.back(hold.p)
	hold.away = false
	hold.held = hold.t.acquire(r, hold.p)
	return hold.held
}

// heldResponse keeps a handler's status and body until send; headers go
// straight to the real response's header map.
type heldResponse struct {
	w      http.ResponseWriter
	status int
	body   *bytes.Buffer
}

func (h *heldResponse) Header() http.Header { return h.w.Header() }

func (h *heldResponse) WriteHeader(status int) {
	if h.status == 0 {
		h.status = status
	}
}

func (h *heldResponse) Write(b []byte) (int, error) {
	h.WriteHeader(http.StatusOK)
	return h.body.Write(b)
}

func (h *heldResponse) send() {
	if h.status == 0 {
		return
	}
	if h.status >= 200 && h.status != http.StatusNoContent && h.status != http.StatusNotModified {
		h.w.Header().Set("Content-Length", strconv.Itoa(h.body.Len()))
	}
	h.w.WriteHeader(h.status)
	_, _ = h.body.WriteTo(h.w)
}

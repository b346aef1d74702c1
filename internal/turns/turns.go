// Package turns shares a server's CPUs among its requests, putting the
// quick requests a person is waiting on before the slower ones they
// expect to take a moment.
//
// Typing into a judgement sends a live fit preview on every pause, and a
// save is what the expert waits on before moving on; opening a page is
// the one request a person expects to take a moment. When the server is
// busy (a room of experts at once on a two-core laptop), handlers beyond
// the number of CPUs wait for a turn, and a waiting preview or save
// (Interactive) is given the next turn before a waiting page (Page). So
// queueing lands on page loads, and previews and saves stay quick; pages
// are still never starved, since after fastRun previews and saves have
// started while a page waits, the page goes next.
package turns

import (
	"context"
	"sync"
	"time"
)

// Priority is a request's place in the queue for a turn.
type Priority int

const (
	Page        Priority = iota // pages: an expert's home, a question
	Interactive                 // fit previews and saves
)

// fastRun is the most previews and saves started while a page waits
// before the page is started anyway.
const fastRun = 16

// pageSettle is how long after a page finishes the next waiting page is
// held back, unless a preview or save starts first. An expert who has
// just been sent a page usually previews next; pages drawn back to back
// while those previews are still on their way would send a crowd of
// experts to preview at once.
const pageSettle = time.Millisecond

// Turns admits at most n handlers at once. A preview or save starts
// whenever a turn is free. A page starts only when no preview or save is
// waiting, fewer than m = max(1, n−1) are running or away at the
// database, no other page has finished within pageSettle (unless a
// preview or save has started since), and fewer than m pages are
// running. A page sends its expert on to previews and saves, so starting
// pages only while those are few keeps their line short, and the waiting
// falls on page loads instead. After fastRun previews and saves have
// started while a page waited, the page starts at the next free turn
// whatever else is waiting.
type Turns struct {
	mu          sync.Mutex
	n           int // turns in all
	free        int
	pageCap     int
	pages, fast int             // running
	away        int             // previews and saves waiting on the database, their turns given back
	fastQ       []chan struct{} // waiting previews and saves, oldest first
	pageQ       []chan struct{} // waiting pages, oldest first
	run         int             // previews and saves started while the oldest waiting page waited
	settling    bool            // a page has just finished; see pageSettle
	settleGen   uint64          // which page's hold settling is; a timer of an earlier one ends nothing
	settle      stopper
	settleFor   time.Duration                       // pageSettle; tests lengthen it
	after       func(time.Duration, func()) stopper // time.AfterFunc; tests replace it
}

// stopper is a timer that can be stopped (*time.Timer).
type stopper interface{ Stop() bool }

// New returns turns for n CPUs.
func New(n int) *Turns {
	n = max(1, n)
	return &Turns{n: n, free: n, pageCap: max(1, n-1), settleFor: pageSettle,
		after: func(d time.Duration, f func()) stopper { return time.AfterFunc(d, f) }}
}

// Acquire waits for a turn at priority p; it reports false, holding no
// turn, when ctx is done first.
func (t *Turns) Acquire(ctx context.Context, p Priority) bool {
	t.mu.Lock()
	if p == Interactive && t.free > 0 || p == Page && len(t.pageQ) == 0 && t.pageMay() {
		t.start(p)
		t.mu.Unlock()
		return true
	}
	ch := make(chan struct{})
	if p == Interactive {
		t.fastQ = append(t.fastQ, ch)
	} else {
		t.pageQ = append(t.pageQ, ch)
	}
	t.mu.Unlock()
	select {
	case <-ch:
		return true
	case <-ctx.Done():
	}
	t.mu.Lock()
	removed := t.removeWaiter(p, ch)
	t.mu.Unlock()
	if !removed {
		// The turn was handed over as the request was cancelled: pass it on.
		t.Release(p)
	}
	return false
}

// removeWaiter takes a cancelled waiter off its queue, reporting false
// when it is no longer there (its turn was handed over); t.mu is held.
// The count of previews and saves that went ahead of a waiting page is
// the oldest waiting page's: when that page leaves, the count starts
// again for the next, as when a page starts. A waiter gone may also let
// others start.
func (t *Turns) removeWaiter(p Priority, ch chan struct{}) bool {
	q := &t.fastQ
	if p == Page {
		q = &t.pageQ
	}
	for i, c := range *q {
		if c == ch {
			*q = append((*q)[:i], (*q)[i+1:]...)
			if p == Page && i == 0 {
				t.run = 0
			}
			t.handOn()
			return true
		}
	}
	return false
}

// pageMay reports whether a page may start now; t.mu is held.
func (t *Turns) pageMay() bool {
	return t.free > 0 && t.pages < t.pageCap && (len(t.fastQ) == 0 && t.fast+t.away < t.pageCap && !t.settling || t.run >= fastRun)
}

// start counts a turn taken at priority p; t.mu is held.
func (t *Turns) start(p Priority) {
	t.free--
	if p == Page {
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

// Release gives back a turn taken at priority p and hands free turns to
// waiters.
func (t *Turns) Release(p Priority) {
	t.mu.Lock()
	t.free++
	if p == Page {
		t.pages--
		t.settling = true
		// A new timer for each hold: a timer of an earlier hold that has
		// already fired, its callback waiting for t.mu, must not end this
		// one (settled checks the generation).
		t.settleGen++
		if t.settle != nil {
			t.settle.Stop()
		}
		gen := t.settleGen
		t.settle = t.after(t.settleFor, func() { t.settled(gen) })
	} else {
		t.fast--
	}
	t.handOn()
	t.mu.Unlock()
}

// settled ends the hold after page number gen finished (pageSettle),
// unless a later page's hold has begun since.
func (t *Turns) settled(gen uint64) {
	t.mu.Lock()
	if gen == t.settleGen {
		t.settling = false
		t.handOn()
	}
	t.mu.Unlock()
}

// Leave gives back the turn of a handler at priority p that goes on to
// wait on the database; an interactive one still holds pages back until
// it comes Back.
func (t *Turns) Leave(p Priority) {
	t.mu.Lock()
	if p == Interactive {
		t.away++
	}
	t.mu.Unlock()
	t.Release(p)
}

// Back ends a wait begun by Leave.
func (t *Turns) Back(p Priority) {
	if p != Interactive {
		return
	}
	t.mu.Lock()
	t.away--
	t.handOn()
	t.mu.Unlock()
}

// handOn passes free turns to waiters; t.mu is held.
func (t *Turns) handOn() {
	for t.free > 0 {
		switch {
		case len(t.pageQ) > 0 && t.run >= fastRun && t.pageMay():
			t.startWaiter(Page)
		case len(t.fastQ) > 0:
			t.startWaiter(Interactive)
		case len(t.pageQ) > 0 && t.pageMay():
			t.startWaiter(Page)
		default:
			return
		}
	}
}

// startWaiter starts the oldest waiter at priority p; t.mu is held.
func (t *Turns) startWaiter(p Priority) {
	q := &t.fastQ
	if p == Page {
		q = &t.pageQ
	}
	ch := (*q)[0]
	*q = (*q)[1:]
	t.start(p)
	close(ch)
}

// Waiting is the number of previews and saves, and of pages, waiting for
// a turn.
func (t *Turns) Waiting() (interactive, pages int) {
	t.mu.Lock()
	defer t.mu.Unlock()
	return len(t.fastQ), len(t.pageQ)
}

// Idle reports whether every turn is free: nothing running, away or
// waiting.
func (t *Turns) Idle() bool {
	t.mu.Lock()
	defer t.mu.Unlock()
	return t.free == t.n && t.pages == 0 && t.fast == 0 && t.away == 0 && len(t.fastQ) == 0 && len(t.pageQ) == 0
}

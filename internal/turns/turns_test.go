package turns

import (
	"context"
	"sync"
	"testing"
	"time"
)

var bg = context.Background()

// waitQueued waits until the turns have fast and slow waiters queued.
func waitQueued(t *testing.T, tr *Turns, fast, slow int) {
	t.Helper()
	for deadline := time.Now().Add(5 * time.Second); time.Now().Before(deadline); time.Sleep(time.Millisecond) {
		if f, s := tr.Waiting(); f == fast && s == slow {
			return
		}
	}
	t.Fatalf("waiters never reached %d fast and %d slow", fast, slow)
}

// With the one turn taken, a preview that arrives after a page still goes
// first; and a page waiting behind a stream of previews and saves gets
// its turn after fastRun of them.
func TestTurnsPutPreviewsBeforePages(t *testing.T) {
	tr := New(1)
	if !tr.Acquire(bg, Page) {
		t.Fatal("no first turn")
	}
	var mu sync.Mutex
	var order []string
	var wg sync.WaitGroup
	wait := func(name string, p Priority) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			if !tr.Acquire(bg, p) {
				t.Errorf("%s got no turn", name)
				return
			}
			mu.Lock()
			order = append(order, name)
			mu.Unlock()
			tr.Release(p)
		}()
	}
	wait("page", Page)
	waitQueued(t, tr, 0, 1)
	for i := range fastRun + 3 {
		wait("preview", Interactive)
		waitQueued(t, tr, i+1, 1)
	}
	tr.Release(Page)
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

// acquireAsync asks for a turn in the background under ctx; the function
// it returns reports whether the turn was given within d.
func acquireAsync(ctx context.Context, tr *Turns, p Priority) (started func(time.Duration) bool) {
	done := make(chan bool, 1)
	go func() { done <- tr.Acquire(ctx, p) }()
	var got, ok bool
	return func(d time.Duration) bool {
		if got {
			return ok
		}
		select {
		case ok = <-done:
			got = true
			return ok
		case <-time.After(d):
			return false
		}
	}
}

// A wait cancelled through its context takes no turn and leaves the
// turns as they were.
func TestCancelledWaitTakesNoTurn(t *testing.T) {
	tr := New(1)
	if !tr.Acquire(bg, Interactive) {
		t.Fatal("no first turn")
	}
	ctx, cancel := context.WithCancel(bg)
	done := make(chan bool)
	go func() { done <- tr.Acquire(ctx, Page) }()
	waitQueued(t, tr, 0, 1)
	cancel()
	if <-done {
		t.Error("a cancelled wait reported a turn")
	}
	waitQueued(t, tr, 0, 0)
	tr.Release(Interactive)
	if !tr.Idle() {
		t.Errorf("turns not all back: %+v", tr)
	}
}

// With two turns, one page runs at a time and the other turn stays for
// previews and saves; no page starts while a preview runs or a save is
// away at the database.
func TestTurnsKeepRoomForPreviews(t *testing.T) {
	tr := New(2)
	if !tr.Acquire(bg, Page) {
		t.Fatal("no turn for the first page")
	}
	second := acquireAsync(bg, tr, Page)
	if second(20 * time.Millisecond) {
		t.Fatal("a second page started beside the first on two turns")
	}
	if !acquireAsync(bg, tr, Interactive)(time.Second) {
		t.Fatal("a preview did not get the free turn")
	}
	// The preview is running: the page's turn comes back, but the
	// waiting page may not start until the preview is done.
	tr.Release(Page)
	if second(20 * time.Millisecond) {
		t.Fatal("a page started while a preview was running")
	}
	// The preview's save goes away to the database: still no page.
	tr.Leave(Interactive)
	if second(20 * time.Millisecond) {
		t.Fatal("a page started while a save was away at the database")
	}
	tr.Back(Interactive)
	if !second(time.Second) {
		t.Fatal("the page did not start once previews and saves were done")
	}
	tr.Release(Page)
	if !tr.Idle() {
		t.Errorf("turns not all back: %+v", tr)
	}
}

// A page that finishes holds the next waiting page back until a preview
// or save starts (or pageSettle passes), so pages are not drawn back to
// back while their experts' previews are on the way.
func TestPageSettlesBeforeTheNext(t *testing.T) {
	tr := New(2)
	tr.settleFor = time.Hour // only a preview ends the hold here
	if !tr.Acquire(bg, Page) {
		t.Fatal("no turn for the first page")
	}
	next := acquireAsync(bg, tr, Page)
	waitQueued(t, tr, 0, 1)
	tr.Release(Page)
	tr.mu.Lock()
	held := len(tr.pageQ) == 1 && tr.settling
	tr.mu.Unlock()
	if !held {
		t.Fatal("the next page started the moment the first finished")
	}
	// The first page's expert previews: the hold ends, but the page
	// waits while the preview runs (one turn is kept for previews).
	if !tr.Acquire(bg, Interactive) {
		t.Fatal("no turn for the preview")
	}
	tr.mu.Lock()
	settling := tr.settling
	tr.mu.Unlock()
	if settling {
		t.Error("a starting preview did not end the hold")
	}
	tr.Release(Interactive)
	if !next(time.Second) {
		t.Fatal("the waiting page never started")
	}
	tr.Release(Page)
}

// fakeTimers records the settle timers' callbacks, to be fired by hand.
type fakeTimers struct {
	fire []func()
}

type fakeTimer struct{}

func (fakeTimer) Stop() bool { return true }

func (f *fakeTimers) after(_ time.Duration, fn func()) stopper {
	f.fire = append(f.fire, fn)
	return fakeTimer{}
}

// The settle timer of a page that finished earlier, firing after a
// later page has finished (its callback waiting for the lock while that
// page's hold was set), ends nothing: the later page's hold stands until
// its own time is up.
func TestEarlierSettleTimerKeepsALaterHold(t *testing.T) {
	tr := New(3) // two pages at once
	timers := &fakeTimers{}
	tr.after = timers.after
	for i := 0; i < 2; i++ {
		if !tr.Acquire(bg, Page) {
			t.Fatalf("no turn for page %d of two", i+1)
		}
	}
	tr.Release(Page) // the first page's hold begins
	tr.Release(Page) // the second's; the first's timer has already fired
	if len(timers.fire) != 2 {
		t.Fatalf("%d settle timers set, want 2", len(timers.fire))
	}
	timers.fire[0]() // the first page's callback runs late
	next := acquireAsync(bg, tr, Page)
	if next(20 * time.Millisecond) {
		t.Fatal("a page started within the settle time of the page before it: an earlier timer ended the later hold")
	}
	timers.fire[1]()
	if !next(time.Second) {
		t.Fatal("the waiting page did not start when the hold ended")
	}
	tr.Release(Page)
}

// A page that waited while previews went ahead of it and was then
// cancelled leaves no count behind: the next page to wait is let ahead
// of previews only after fastRun previews have gone ahead of it.
func TestCancelledPageLeavesNoRunBehind(t *testing.T) {
	tr := New(2) // one page at a time
	if !tr.Acquire(bg, Page) {
		t.Fatal("no turn for the running page")
	}
	preview := func(n int) {
		for range n {
			if !tr.Acquire(bg, Interactive) {
				t.Fatal("no turn for a preview")
			}
			tr.Release(Interactive)
		}
	}
	ctx, cancel := context.WithCancel(bg)
	first := acquireAsync(ctx, tr, Page)
	waitQueued(t, tr, 0, 1)
	preview(fastRun - 6) // go ahead of the first waiting page
	cancel()
	if first(time.Second) {
		t.Fatal("the cancelled page reported a turn")
	}
	waitQueued(t, tr, 0, 0)
	second := acquireAsync(bg, tr, Page)
	waitQueued(t, tr, 0, 1)
	preview(5)
	// One turn is taken by a preview and another preview waits; when
	// the running page finishes, the waiting preview goes first, since
	// only 6 previews have gone ahead of the second page.
	if !tr.Acquire(bg, Interactive) {
		t.Fatal("no turn for the preview that holds one")
	}
	waiting := acquireAsync(bg, tr, Interactive)
	waitQueued(t, tr, 1, 1)
	tr.Release(Page)
	if !waiting(time.Second) {
		t.Fatal("the waiting preview did not get the freed turn")
	}
	if second(20 * time.Millisecond) {
		t.Error("the second page went ahead of a waiting preview after 6 previews: the cancelled page's count was kept")
	}
	tr.Release(Interactive)
	tr.Release(Interactive)
	if !second(time.Second) {
		t.Fatal("the second page never started")
	}
	tr.Release(Page)
	if !tr.Idle() {
		t.Errorf("turns not all back: %+v", tr)
	}
}

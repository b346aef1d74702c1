package web

import (
	"net/http"
	"strconv"
	"sync"
	"time"
)

// One expert's link cannot crowd out the others' previews. Previews go
// before pages in the request turns (turns.go), first come first served,
// so a link whose page (or a script) sent previews without pause held
// every turn and the other experts' pictures waited behind it. Each
// expert may now ask for PreviewBurst previews at once and then one every
// previewEvery; a preview beyond that is answered 429 with Retry-After
// before it asks for a turn, and costs nothing. An expert typing sends a
// preview at most every 350 ms (preview.js waits for a pause), well
// inside the allowance; on a 429 the page keeps its last picture and
// asks again a second later.
//
// Saves have an allowance of their own: every save is a new revision,
// kept for good in the record, so a link (or a script holding one) that
// saved without pause wrote thousands of revisions a minute into the
// workshop's file. An expert may save SaveBurst times at once and then
// once every saveEvery, more than a person answering a whole workshop
// question after question can use (the load test's experts save ten
// questions a round without a pause); beyond it the save is refused with
// 429, Retry-After and a page saying nothing was saved.
//
// Pages have one too. A link handed on, or a script or a stuck tab
// reloading an expert's home and question pages without pause, took one
// page turn after another from the experts reading theirs: a page of
// round 2 pools the others' answers. An expert may open PageBurst pages
// at once and then one every pageEvery, four a second, far more than a
// person reading can ask for, and more than a live page fetches, which
// gathers changes arriving together into one fetch (live.js) and, on a
// 429, simply tries again a few seconds later. Beyond it a page is
// answered 429 with Retry-After and a few words before it takes a turn.
// The facilitator's pages, behind the sign-in, have no such allowance.
const (
	PreviewBurst = 20
	previewEvery = 100 * time.Millisecond
	SaveBurst    = 30
	saveEvery    = time.Second
	PageBurst    = 120
	pageEvery    = 250 * time.Millisecond
)

// linkThrottle holds each expert's allowance of one kind of request.
type linkThrottle struct {
	mu      sync.Mutex
	experts limiters[int64]
}

// newLinkThrottle allows burst requests at once (def when burst is 0),
// then one every every.
func newLinkThrottle(burst, def int, every time.Duration) *linkThrottle {
	if burst <= 0 {
		burst = def
	}
	return &linkThrottle{experts: newLimiters[int64](every, burst)}
}

// admit takes one request from the expert's allowance at now, or returns
// how long to wait when it is spent.
func (t *linkThrottle) admit(expert int64, now time.Time) time.Duration {
	t.mu.Lock()
	defer t.mu.Unlock()
	r := t.experts.get(expert, now).ReserveN(now, 1)
	if d := r.DelayFrom(now); d > 0 {
		r.CancelAt(now)
		return d
	}
	return 0
}

// throttled answers a request over the expert's allowance in t with 429,
// Retry-After and the page's words, before it takes a turn.
func (s *Server) throttled(t *linkThrottle, title, words string, next http.HandlerFunc) http.HandlerFunc {
	return func(w http.ResponseWriter, r *http.Request) {
		wait := t.admit(expertFrom(r.Context()).ID, s.now())
		if wait <= 0 {
			next(w, r)
			return
		}
		secs := int((wait + time.Second - 1) / time.Second)
		w.Header().Set("Retry-After", strconv.Itoa(secs))
		s.renderPage(w, r, http.StatusTooManyRequests, pageMeta{Title: title}, messagePage(title, words))
	}
}

// throttlePreviews answers a preview over the expert's allowance with 429
// and Retry-After, before it takes a turn.
func (s *Server) throttlePreviews(next http.HandlerFunc) http.HandlerFunc {
	return s.throttled(s.previews, "One moment", "Your page asked for more pictures of your fit than the server draws for one person at a time. "+
		"Nothing is lost: wait a second, then go back and press Show the fit again.", next)
}

// throttleSaves answers a save over the expert's allowance with 429 and
// Retry-After; nothing is saved.
func (s *Server) throttleSaves(next http.HandlerFunc) http.HandlerFunc {
	return s.throttled(s.saves, "One moment", "This link has saved more answers in a short while than the server takes from one person. "+
		"Nothing was saved this time: wait a few seconds, then go back and save again.", next)
}

// throttlePages answers a page over the expert's allowance with 429 and
// Retry-After, before it takes a turn.
func (s *Server) throttlePages(next http.HandlerFunc) http.HandlerFunc {
	return s.throttled(s.pages, "One moment", "This link has opened more pages in a short while than the server shows one person. "+
		"Nothing is lost: wait a few seconds, then reload the page.", next)
}

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
const (
	PreviewBurst = 20
	previewEvery = 100 * time.Millisecond
)

// previewThrottle holds each expert's allowance of previews.
type previewThrottle struct {
	mu      sync.Mutex
	experts limiters[int64]
}

// newPreviewThrottle allows burst previews at once (PreviewBurst when 0).
func newPreviewThrottle(burst int) *previewThrottle {
	if burst <= 0 {
		burst = PreviewBurst
	}
	return &previewThrottle{experts: newLimiters[int64](previewEvery, burst)}
}

// admit takes one preview from the expert's allowance at now, or returns
// how long to wait when it is spent.
func (t *previewThrottle) admit(expert int64, now time.Time) time.Duration {
	t.mu.Lock()
	defer t.mu.Unlock()
	r := t.experts.get(expert, now).ReserveN(now, 1)
	if d := r.DelayFrom(now); d > 0 {
		r.CancelAt(now)
		return d
	}
	return 0
}

// throttlePreviews answers a preview over the expert's allowance with 429
// and Retry-After, before it takes a turn.
func (s *Server) throttlePreviews(next http.HandlerFunc) http.HandlerFunc {
	return func(w http.ResponseWriter, r *http.Request) {
		wait := s.previews.admit(expertFrom(r.Context()).ID, s.now())
		if wait <= 0 {
			next(w, r)
			return
		}
		secs := int((wait + time.Second - 1) / time.Second)
		w.Header().Set("Retry-After", strconv.Itoa(secs))
		s.renderPage(w, r, http.StatusTooManyRequests, pageMeta{Title: "One moment"},
			messagePage("One moment", "Your page asked for more pictures of your fit than the server draws for one person at a time. "+
				"Nothing is lost: wait a second, then go back and press Show the fit again."))
	}
}

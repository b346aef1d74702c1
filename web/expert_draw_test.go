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

// At most cap(pageDraws) pages are drawn at once; each drawn page reaches
// its client whole, with its status and headers.
func TestQuestionPagesDrawnInTurns(t *testing.T) {
	var running, most atomic.Int32
	var wg sync.WaitGroup
	recs := make([]*httptest.ResponseRecorder, 4*cap(pageDraws)+3)
	for i := range recs {
		recs[i] = httptest.NewRecorder()
		wg.Add(1)
		go func() {
			defer wg.Done()
			r := httptest.NewRequest(http.MethodGet, "/e/x/q/1", nil)
			withDrawTurn(recs[i], r, func(w http.ResponseWriter) {
				n := running.Add(1)
				for {
					m := most.Load()
					if n <= m || most.CompareAndSwap(m, n) {
						break
					}
				}
				time.Sleep(2 * time.Millisecond) // hold the turn so that others queue
				w.Header().Set("X-Page", "question")
				w.WriteHeader(http.StatusConflict)
				w.Write([]byte("page body"))
				running.Add(-1)
			})
		}()
	}
	wg.Wait()
	if m := most.Load(); m > int32(cap(pageDraws)) || m < 1 {
		t.Errorf("%d pages drawn at once, want between 1 and %d", m, cap(pageDraws))
	}
	for i, rec := range recs {
		if rec.Code != http.StatusConflict || rec.Body.String() != "page body" || rec.Header().Get("X-Page") != "question" {
			t.Errorf("response %d: %d %q %v", i, rec.Code, rec.Body.String(), rec.Header())
		}
	}
}

// A request cancelled while waiting for its turn draws and sends nothing.
func TestCancelledPageWaitDrawsNothing(t *testing.T) {
	for range cap(pageDraws) {
		pageDraws <- struct{}{}
	}
	defer func() {
		for range cap(pageDraws) {
			<-pageDraws
		}
	}()
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	rec := httptest.NewRecorder()
	drew := false
	withDrawTurn(rec, httptest.NewRequest(http.MethodGet, "/", nil).WithContext(ctx), func(http.ResponseWriter) { drew = true })
	if drew || rec.Body.Len() != 0 {
		t.Errorf("a cancelled wait drew %v and sent %q", drew, rec.Body.String())
	}
}

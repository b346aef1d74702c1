package web

import (
	"context"
	"errors"
	"io"
	"log/slog"
	"net/http"
	"net/http/httptest"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/store"
)

// trouble is the store with faults switched on by the test: a read that
// fails, a read that waits until the client gives up, and a panic.
type trouble struct {
	*store.DB
	mu      sync.Mutex
	mode    string
	entered chan struct{} // a waiting read has begun
	errText string        // the failing read's message
}

func (s *trouble) set(mode string) {
	s.mu.Lock()
	s.mode = mode
	s.mu.Unlock()
}

func (s *trouble) current() string {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.mode
}

// QuestionExpertRevisions is read by the question page and by a refused
// save; "fail" makes it an error, "stall" waits for the client to go
// away and then pretends the read went well, so the page is drawn for
// nobody.
func (s *trouble) QuestionExpertRevisions(ctx context.Context, q, e int64) ([]workshop.Revision, error) {
	switch s.current() {
	case "fail":
		return nil, errors.New(s.errText)
	case "stall":
		s.entered <- struct{}{}
		<-ctx.Done()
		return nil, nil
	}
	return s.DB.QuestionExpertRevisions(ctx, q, e)
}

// ExpertRevisions is read by the expert's home page; "wait" holds it
// until the client goes away.
func (s *trouble) ExpertRevisions(ctx context.Context, e int64) ([]workshop.Revision, error) {
	switch s.current() {
	case "wait":
		s.entered <- struct{}{}
		<-ctx.Done()
		return nil, ctx.Err()
	case "panic":
		panic("store exploded (test)")
	}
	return s.DB.ExpertRevisions(ctx, e)
}

// lockedLog collects log output from concurrent handlers.
type lockedLog struct {
	mu sync.Mutex
	b  strings.Builder
}

func (l *lockedLog) Write(p []byte) (int, error) {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.Write(p)
}

func (l *lockedLog) String() string {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.String()
}

// TestNoTokenInTheLog: server errors, a panic and requests the client
// abandoned (at a store read and while the page is drawn), over and
// over, and not one log line carries the expert's token, even at debug
// level and even when an error's own text holds it. A server error names
// the expert by id; an abandoned request is not an error (issue 13,
// item 1).
func TestNoTokenInTheLog(t *testing.T) {
	g := newExpertRig(t)
	tok, e := g.tokens[0], g.experts[0]
	logs := &lockedLog{}
	st := &trouble{DB: g.db, entered: make(chan struct{}), errText: "cannot read /e/" + tok + "/q/1 (test)"}
	s, err := New(st, Options{Logger: slog.New(slog.NewTextHandler(logs, &slog.HandlerOptions{Level: slog.LevelDebug}))})
	if err != nil {
		t.Fatal(err)
	}
	srv := httptest.NewServer(s.Handler())
	defer srv.Close()
	home := srv.URL + "/e/" + tok + "/"
	page := srv.URL + g.qpath(0, g.q)

	get := func(url string) int {
		res, err := http.Get(url)
		if err != nil {
			t.Fatal(err)
		}
		io.Copy(io.Discard, res.Body)
		res.Body.Close()
		return res.StatusCode
	}
	// abandon starts a request, waits until the server is inside it,
	// and hangs up.
	abandon := func(url string) {
		ctx, cancel := context.WithCancel(context.Background())
		req, _ := http.NewRequestWithContext(ctx, http.MethodGet, url, nil)
		done := make(chan struct{})
		go func() {
			defer close(done)
			if res, err := http.DefaultClient.Do(req); err == nil {
				res.Body.Close()
			}
		}()
		select {
		case <-st.entered:
		case <-time.After(10 * time.Second):
			t.Fatal("the request never reached the store")
		}
		cancel()
		<-done
	}

	st.set("fail")
	if code := get(page); code != http.StatusInternalServerError {
		t.Errorf("failing read: %d, want 500", code)
	}
	st.set("panic")
	if code := get(home); code != http.StatusInternalServerError {
		t.Errorf("panic: %d, want 500", code)
	}
	errorLines := strings.Count(logs.String(), "level=ERROR")
	if errorLines != 2 {
		t.Errorf("%d ERROR lines for a failed read and a panic, want 2:\n%s", errorLines, logs.String())
	}
	for i := 0; i < 20; i++ {
		st.set([]string{"wait", "stall"}[i%2])
		abandon([]string{home, page}[i%2])
	}
	st.set("")
	// The server notices the hang-up asynchronously; wait for the last
	// abandoned request's line.
	deadline := time.Now().Add(10 * time.Second)
	for strings.Count(logs.String(), "abandoned by the client") < 20 && time.Now().Before(deadline) {
		time.Sleep(10 * time.Millisecond)
	}

	out := logs.String()
	if strings.Contains(out, tok) {
		t.Errorf("the log holds the expert's token:\n%s", out)
	}
	if n := strings.Count(out, "level=ERROR"); n != errorLines {
		t.Errorf("abandoned requests logged %d ERROR lines:\n%s", n-errorLines, out)
	}
	if n := strings.Count(out, "abandoned by the client"); n != 20 {
		t.Errorf("%d of 20 abandoned requests logged at debug level:\n%s", n, out)
	}
	want := "path=/e/{token}/q/" + strconv.FormatInt(g.q.ID, 10) + " expert=" + strconv.FormatInt(e.ID, 10)
	if !strings.Contains(out, want) {
		t.Errorf("the failed read is not logged with %q:\n%s", want, out)
	}
	if !strings.Contains(out, "store exploded (test)") {
		t.Errorf("the panic is not logged:\n%s", out)
	}
}

func TestLoggedPath(t *testing.T) {
	tok := strings.Repeat("Ab9_-", 8) + "xyz"
	for in, want := range map[string]string{
		"/e/" + tok + "/q/3/save": "/e/{token}/q/3/save",
		"/e/" + tok:               "/e/{token}",
		"/e/short/":               "/e/{token}/",
		"/w/1/q/2":                "/w/1/q/2",
		"/static/" + tok:          "/static/{secret}",
	} {
		if got := loggedPath(in); got != want {
			t.Errorf("loggedPath(%q) = %q, want %q", in, got, want)
		}
	}
}

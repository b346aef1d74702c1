// Package web is Parley's HTTP face: chi routes, access control, form
// parsing, templ pages and embedded static assets. It computes no
// statistics; every number comes from package elicit, and every byte
// saved goes through the Store interface.
package web

import (
	"bytes"
	"context"
	"errors"
	"log/slog"
	"net/http"
	"runtime"
	"strings"
	"sync"
	"sync/atomic"
	"time"

	"github.com/a-h/templ"
	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/internal/memo"
)

// Options configure a Server. The zero value works: links are printed
// relative, the clock is time.Now, logs go to slog.Default, and cookies
// are sent without the Secure flag (set SecureCookies when serving TLS).
type Options struct {
	// BaseURL is the address printed in links handed to people, such as
	// "http://192.168.1.20:8080"; without it links start at "/".
	BaseURL string
	// Now is the clock; tests set it.
	Now func() time.Time
	// Logger receives request errors.
	Logger *slog.Logger
	// SecureCookies marks the session cookie Secure (TLS only).
	SecureCookies bool
}

// Server serves one Parley database to facilitators and experts.
type Server struct {
	store   Store
	opt     Options
	now     func() time.Time
	log     *slog.Logger
	handler http.Handler
	// feedbacks remembers each question's round feedback (see feedbackFor).
	feedbacks *memo.Memo[feedbackKey, *feedback]
	// turns bounds the expert handlers running at once to the CPUs and
	// puts previews and saves before pages (turns.go).
	turns *turns
	// reasonGen moves on whenever a reason is withheld or shown again, so
	// that the remembered feedback is read afresh (feedbackKey).
	reasonGen atomic.Uint64
	// live carries each workshop's changes to the facilitator's open
	// pages (live.go).
	live *liveHub
	// issued holds private links just issued, for the page the
	// facilitator is sent to after adding an expert (facilitator_roster.go).
	issued *kept[issuedEntry]
	// sheets holds answer sheets between their preview and their
	// confirmation (facilitator_sheet.go).
	sheets *kept[keptSheet]
}

// New returns a Server over st.
func New(st Store, opt Options) (*Server, error) {
	if st == nil {
		return nil, errors.New("web: New needs a Store")
	}
	s := &Server{store: st, opt: opt, now: opt.Now, log: opt.Logger, feedbacks: memo.New[feedbackKey, *feedback](256),
		turns: newTurns(runtime.GOMAXPROCS(0)), live: newLiveHub(),
		issued: newKept[issuedEntry](issuedFor), sheets: newKept[keptSheet](sheetFor)}
	if s.now == nil {
		s.now = time.Now
	}
	if s.log == nil {
		s.log = slog.Default()
	}
	s.opt.BaseURL = strings.TrimRight(opt.BaseURL, "/")
	s.handler = s.routes()
	return s, nil
}

// Handler returns the server's root handler, with the security headers,
// body limit and cross-origin protection applied to every route.
func (s *Server) Handler() http.Handler { return s.handler }

// link returns path as an address to hand to a person: absolute when a
// BaseURL is set.
func (s *Server) link(path string) string { return s.opt.BaseURL + path }

// render writes component c with the given status. The page is rendered
// into a buffer first so a failing component yields a clean 500 and never
// half a page.
func (s *Server) render(w http.ResponseWriter, r *http.Request, status int, c templ.Component) {
	// A held response (turns.go) is drawn straight into its own buffer.
	buf, held := (*bytes.Buffer)(nil), false
	if h, ok := w.(*heldResponse); ok && h.status == 0 && h.body.Len() == 0 {
		buf, held = h.body, true
	} else {
		buf = getBuffer()
		defer putBuffer(buf)
	}
	if err := c.Render(r.Context(), buf); err != nil {
		if held {
			buf.Reset()
		}
		s.log.ErrorContext(r.Context(), "render", "path", r.URL.Path, "err", err)
		w.Header().Set("Content-Type", "text/plain; charset=utf-8")
		w.WriteHeader(http.StatusInternalServerError)
		_, _ = w.Write([]byte("Parley could not draw this page. The error is in the server log.\n"))
		return
	}
	w.Header().Set("Content-Type", "text/html; charset=utf-8")
	w.WriteHeader(status)
	if !held {
		_, _ = buf.WriteTo(w)
	}
}

// buffers are reused for drawing pages and holding responses: a round-2
// question page is some 90 kB, and drawing each into a fresh buffer grown
// from nothing made most of the server's garbage.
var buffers = sync.Pool{New: func() any { return new(bytes.Buffer) }}

func getBuffer() *bytes.Buffer { return buffers.Get().(*bytes.Buffer) }

// putBuffer returns b to the pool, unless it has grown unusually large.
func putBuffer(b *bytes.Buffer) {
	if b.Cap() > 1<<20 {
		return
	}
	b.Reset()
	buffers.Put(b)
}

// renderPage wraps body in the page shell described by m.
func (s *Server) renderPage(w http.ResponseWriter, r *http.Request, status int, m PageMeta, body templ.Component) {
	s.render(w, r, status, page(m, body))
}

// notFound answers 404 with a page that says nothing about why.
func (s *Server) notFound(w http.ResponseWriter, r *http.Request) {
	s.renderPage(w, r, http.StatusNotFound, PageMeta{Title: "Not found"},
		messagePage("Not found", "There is nothing at this address."))
}

// fail answers an error from the domain or the store: not found → 404,
// bad input → 400 naming the field and rule, round closed → 409,
// anything else → 500 with details only in the log.
func (s *Server) fail(w http.ResponseWriter, r *http.Request, err error) {
	var ie *elicit.InputError
	switch {
	case errors.Is(err, elicit.ErrNotFound):
		s.notFound(w, r)
	case errors.As(err, &ie):
		s.renderPage(w, r, http.StatusBadRequest, PageMeta{Title: "Not accepted"},
			messagePage("Not accepted", ie.Field+": "+string(ie.Rule)+detailSuffix(ie.Detail)))
	case errors.Is(err, elicit.ErrRetired):
		s.renderPage(w, r, http.StatusGone, PageMeta{Title: "Question withdrawn"},
			messagePage("Question withdrawn", "The facilitator has withdrawn this question, so it takes no answers. Your other questions are on your own page; your private link still works."))
	case errors.Is(err, elicit.ErrRoundClosed):
		s.renderPage(w, r, http.StatusConflict, PageMeta{Title: "Round closed"},
			messagePage("Round closed", "The round is closed, so nothing was saved."))
	case errors.Is(err, context.Canceled):
		// The client went away; nothing to answer.
	default:
		s.log.ErrorContext(r.Context(), "request", "method", r.Method, "path", r.URL.Path, "err", err)
		s.renderPage(w, r, http.StatusInternalServerError, PageMeta{Title: "Server error"},
			messagePage("Server error", "Something went wrong on the server; nothing further was saved. The details are in the server log."))
	}
}

func detailSuffix(d string) string {
	if d == "" {
		return ""
	}
	return " (" + d + ")"
}

// Package web is Parley's HTTP face: chi routes, access control, form
// parsing, templ pages and embedded static assets. It computes no
// statistics; every number comes from package elicit, and every byte
// saved goes through the Store interface.
package web

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"log/slog"
	"net/http"
	"regexp"
	"runtime"
	"runtime/debug"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"time"

	"github.com/a-h/templ"
	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/internal/memo"
	"github.com/parley-elicit/parley/internal/turns"
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
	// PreviewBurst is how many previews an expert may ask for at once
	// (preview_throttle.go); 0 means web.PreviewBurst. Tests that post an
	// expert's previews in a loop raise it.
	PreviewBurst int
	// SaveBurst is how many answers an expert may save at once
	// (preview_throttle.go); 0 means web.SaveBurst.
	SaveBurst int
	// PageBurst is how many pages an expert's link may open at once
	// (preview_throttle.go); 0 means web.PageBurst.
	PageBurst int
	// Heartbeat is how often an idle event stream says it is still
	// there (live.go); 0 means 20 s. A page that hears nothing for a
	// little over two of them takes its stream for dead. Tests shorten it.
	Heartbeat time.Duration
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
	// fits serves revisions' fits (fitcache.go).
	fits *fitCache
	// turns bounds the expert handlers running at once to the CPUs and
	// puts previews and saves before pages (internal/turns, turns.go).
	turns *turns.Turns
	// reasonGen moves on whenever a reason is withheld or shown again, so
	// that the remembered feedback is read afresh (feedbackKey).
	reasonGen atomic.Uint64
	// withdrawnGen moves on whenever a judgement is withdrawn: the panel a
	// closed round feeds back loses it (feedbackKey).
	withdrawnGen atomic.Uint64
	// roundGen moves on whenever a round is closed, opened or reopened: a
	// reopened round takes answers again, so the panel as it closes anew
	// is not the one remembered when it first closed (feedbackKey).
	roundGen atomic.Uint64
	// live carries each workshop's changes to the facilitator's open
	// pages (live.go).
	live *liveHub
	// issued holds private links just issued, for the page the
	// facilitator is sent to after adding an expert (facilitator_roster.go).
	issued *kept[issuedEntry]
	// sheets holds answer sheets between their preview and their
	// confirmation (facilitator_sheet.go).
	sheets *kept[keptSheet]
	// once holds the posts of forms sent with a key, so that a form
	// sent twice is saved once (once.go).
	once *sentOnce
	// previews, saves and pages limit each expert's previews, saves and pages
	// (preview_throttle.go).
	previews, saves, pages *linkThrottle
	// signIns limits what sign-in attempts may cost (signin_throttle.go).
	signIns *signInThrottle
}

// New returns a Server over st.
func New(st Store, opt Options) (*Server, error) {
	if st == nil {
		return nil, errors.New("web: New needs a Store")
	}
	s := &Server{store: st, opt: opt, now: opt.Now, log: opt.Logger, feedbacks: memo.New[feedbackKey, *feedback](256),
		fits:  newFitCache(fitCacheSize),
		turns: turns.New(runtime.GOMAXPROCS(0)), live: newLiveHub(), signIns: newSignInThrottle(), once: newSentOnce(), previews: newLinkThrottle(opt.PreviewBurst, PreviewBurst, previewEvery),
		saves:  newLinkThrottle(opt.SaveBurst, SaveBurst, saveEvery),
		pages:  newLinkThrottle(opt.PageBurst, PageBurst, pageEvery),
		issued: newKept[issuedEntry](issuedFor, keptLinks), sheets: newKept[keptSheet](sheetFor, keptSheets)}
	if s.now == nil {
		s.now = time.Now
	}
	if s.log == nil {
		s.log = slog.Default()
	}
	if s.opt.Heartbeat <= 0 {
		s.opt.Heartbeat = heartbeat
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
		s.logFailure(r, "render", err)
		if r.Context().Err() != nil {
			return // nobody is waiting for the page
		}
		w.Header().Set("Content-Type", "text/plain; charset=utf-8")
		w.WriteHeader(http.StatusInternalServerError)
		_, _ = w.Write([]byte("Parley could not draw this page. The error is in the server log.\n"))
		return
	}
	w.Header().Set("Content-Type", "text/html; charset=utf-8")
	if _, inTurn := w.(*heldResponse); held || inTurn {
		w.WriteHeader(status) // heldResponse.send gzips it
		if !held {
			_, _ = buf.WriteTo(w)
		}
		return
	}
	// A page drawn outside a turn (every facilitator's page) is gzipped as
	// an expert's is: an invented workshop of 30 experts and 25 questions
	// sent its report as 2.6 MB, its calibration page as 1 MB and each
	// live refresh of a question's panel as 87 kB; gzipped, 0.37 MB,
	// 82 kB and 16 kB.
	body := buf
	if hdr := w.Header(); hdr.Get("Content-Encoding") == "" {
		hdr.Add("Vary", "Accept-Encoding")
		if acceptsGzip(r) && r.Method != http.MethodHead && buf.Len() >= gzipFrom {
			z := getBuffer()
			defer putBuffer(z)
			gzipInto(z, buf.Bytes())
			hdr.Set("Content-Encoding", "gzip")
			body = z
		}
	}
	w.Header().Set("Content-Length", strconv.Itoa(body.Len()))
	w.WriteHeader(status)
	_, _ = body.WriteTo(w)
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
func (s *Server) renderPage(w http.ResponseWriter, r *http.Request, status int, m pageMeta, body templ.Component) {
	if m.Path == "" {
		m.Path = r.URL.Path
	}
	s.render(w, r, status, page(m, body))
}

// notFound answers 404 with a page that says nothing about why.
func (s *Server) notFound(w http.ResponseWriter, r *http.Request) {
	s.renderPage(w, r, http.StatusNotFound, shell(r, "Not found"),
		messagePage("Not found", "There is nothing at this address."))
}

// fail answers an error from the domain or the store: not found → 404,
// bad input → 400 with a page that says so in words (refusalPage), round closed → 409,
// a link ended while its request was on the way → 404 as any ended link
// (409 saying so to the facilitator),
// anything else → 500 with details only in the log.
func (s *Server) fail(w http.ResponseWriter, r *http.Request, err error) {
	var ie *elicit.InputError
	switch {
	case errors.Is(err, workshop.ErrNotFound):
		s.notFound(w, r)
	case errors.Is(err, workshop.ErrRevoked) && expertFrom(r.Context()).ID != 0:
		s.linkGone(w, r)
	case errors.Is(err, workshop.ErrRevoked):
		s.renderPage(w, r, http.StatusConflict, shell(r, "Private link ended"),
			messagePage("Private link ended", "An expert's private link was ended while this was being saved, so nothing was saved. Go back to see the panel as it is now."))
	case errors.As(err, &ie):
		v := newRefusal(r, ie)
		s.renderPage(w, r, http.StatusBadRequest, shell(r, v.Title), refusalPage(v))
	case errors.Is(err, workshop.ErrRetired):
		s.renderPage(w, r, http.StatusGone, shell(r, "Question withdrawn"),
			messagePage("Question withdrawn", "The facilitator has withdrawn this question, so it takes no answers. Your other questions are on your own page; your private link still works."))
	case errors.Is(err, workshop.ErrRoundClosed):
		s.renderPage(w, r, http.StatusConflict, shell(r, "Round closed"),
			messagePage("Round closed", "The round is closed, so nothing was saved."))
	case errors.Is(err, context.Canceled) || r.Context().Err() != nil:
		// The client went away; nothing to answer.
		s.logFailure(r, "request", err)
	default:
		s.logFailure(r, "request", err)
		s.renderPage(w, r, http.StatusInternalServerError, shell(r, "Server error"),
			messagePage("Server error", "Something went wrong on the server; nothing further was saved. The details are in the server log."))
	}
}

// The sentences shown beside a form that was fine but could not be saved
// because of the server: its disk is full or failing, or the database
// became read-only. The typed values are kept on the form.
const (
	notSavedForExpert = "Nothing was saved: the server could not write your answer down just now. " +
		"Your values are kept below. Try Save again in a minute; if it still fails, tell the facilitator."
	notSavedForFacilitator = "Nothing was saved: the database could not be written (the disk may be full or failing; " +
		"the server log has the cause). What you entered is kept below: free some space or fix the disk, then send the form again."
	// A question corrected (before its first answer) while the page was open.
	questionChangedForExpert = "Your answer was not saved: the facilitator corrected this question while you were answering. " +
		"Please read the question again. Your values are kept below; check them against it and save again."
	questionChangedForFacilitator = "Nothing was saved: this question was corrected after the form was opened. " +
		"The values are kept below, checked against the corrected question; check them and save again."
)

// serverFault reports whether err, from a save, is the server's own
// failure (disk full, I/O error, a read-only database) rather than a
// refusal of the domain's (not found, bad input, round closed) or a
// client that went away.
func serverFault(r *http.Request, err error) bool {
	var ie *elicit.InputError
	if err == nil || r.Context().Err() != nil || errors.Is(err, context.Canceled) || errors.As(err, &ie) {
		return false
	}
	for _, refusal := range []error{workshop.ErrNotFound, workshop.ErrRoundClosed, workshop.ErrAnswersFrozen,
		workshop.ErrRetired, workshop.ErrRevoked, workshop.ErrRoundStillOpen, workshop.ErrQuestionChanged} {
		if errors.Is(err, refusal) {
			return false
		}
	}
	return true
}

// notSaved takes a facilitator's form whose save failed with err. When
// the failure is the server's it logs it, puts the sentence on the form
// and reports true: the caller shows the form again, typed values kept,
// with f.refusedStatus() (503). Otherwise it does nothing.
// formSaved sorts out the store's answer err to a facilitator's form f:
// a refusal goes beside the fields (Form.Fail, with fields mapping the
// store's field names to the form's), a fault on the server's side says
// nothing was saved (notSaved), and the form is shown again by the
// caller; anything else fails the request, and formSaved returns false
// with the response written.
func (s *Server) formSaved(w http.ResponseWriter, r *http.Request, f *Form, err error, fields map[string]string) bool {
	switch {
	case err == nil:
	case isInputError(err):
		f.Fail(err, fields)
	case !s.notSaved(r, f, err):
		s.fail(w, r, err)
		return false
	}
	return true
}

func (s *Server) notSaved(r *http.Request, f *Form, err error) bool {
	if !serverFault(r, err) {
		return false
	}
	s.logFailure(r, "save", err)
	f.set("", notSavedForFacilitator)
	f.unsaved = true
	return true
}

func detailSuffix(d string) string {
	if d == "" {
		return ""
	}
	return " (" + d + ")"
}

// logFailure logs a request's failure at ERROR level, or at DEBUG when
// the client abandoned the request (closed the tab, stopped loading, lost
// the network): that is nothing wrong with the server, and hundreds of
// such lines would bury the real errors.
func (s *Server) logFailure(r *http.Request, msg string, err error, extra ...any) {
	attrs := append(requestAttrs(r, err), extra...)
	if r.Context().Err() != nil || errors.Is(err, context.Canceled) {
		s.log.DebugContext(r.Context(), msg+": abandoned by the client", attrs...)
		return
	}
	s.log.ErrorContext(r.Context(), msg, attrs...)
}

// recoverPanics turns a panic in a handler into the server-error page and
// one log line, with the request described by requestAttrs, so no token
// reaches the log this way either.
func (s *Server) recoverPanics(next http.Handler) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		defer func() {
			v := recover()
			if v == nil {
				return
			}
			if v == http.ErrAbortHandler {
				panic(v)
			}
			s.logFailure(r, "panic", fmt.Errorf("%v", v), "stack", string(debug.Stack()))
			s.renderPage(w, r, http.StatusInternalServerError, shell(r, "Server error"),
				messagePage("Server error", "Something went wrong on the server; nothing further was saved. The details are in the server log."))
		}()
		next.ServeHTTP(w, r)
	})
}

// requestAttrs describes a request and its error for the log without any
// secret in it: an expert's token is replaced by "{token}" and the
// expert's id is given instead, and anything else in the path long
// enough to be a token is replaced too. Whoever reads the log cannot act
// as an expert or as the facilitator.
func requestAttrs(r *http.Request, err error) []any {
	attrs := []any{"method", r.Method, "path", loggedPath(r.URL.Path)}
	if e := expertFrom(r.Context()); e.ID != 0 {
		attrs = append(attrs, "expert", e.ID)
	}
	if err != nil {
		attrs = append(attrs, "err", tokenLike.ReplaceAllString(err.Error(), "{secret}"))
	}
	return attrs
}

// tokenLike matches a run of base64url characters as long as a token
// (43); no other word in Parley's paths or messages is that long.
var tokenLike = regexp.MustCompile(`[A-Za-z0-9_-]{40,}`)

// loggedPath is path with the segment after /e/, the expert's token
// however spelt, and anything token-like elsewhere replaced.
func loggedPath(path string) string {
	if rest, ok := strings.CutPrefix(path, "/e/"); ok {
		path = "/e/{token}"
		if i := strings.IndexByte(rest, '/'); i >= 0 {
			path += rest[i:]
		}
	}
	return tokenLike.ReplaceAllString(path, "{secret}")
}

package web

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"net/http"
	"strconv"
	"strings"
	"sync"
	"time"

	"github.com/go-chi/chi/v5"
)

// Live pages: the facilitator's overview, question panels and room view
// follow a workshop's changes as they happen. Every change to a workshop
// (an expert's save, a round closed or opened, a reveal, a decision) is
// published on the server's liveHub; GET /w/{workshop}/events streams
// them to the facilitator's browser as server-sent events, and
// static/live.js fetches the page again and swaps its parts marked
// data-live. Pages work without script; they just do not move.

// liveEvent is one change to a workshop, as sent to the browser.
type liveEvent struct {
	Kind     string    `json:"kind"`               // "save", "round", "truth", "weights", "prior", ...
	Question int64     `json:"question,omitempty"` // the question it concerns, if one
	At       time.Time `json:"at"`
	// Version is the workshop's live version after this change
	// (liveHub.version).
	Version string `json:"version,omitempty"`
}

// A live page can miss a change made between the moment the server read
// it and the moment its stream opens (the page's script loading, a room
// view moved to the next question by a key, a tab joining the browser's
// shared stream): the change was published to nobody, and the projector
// showed "3 of 4 experts have answered" until some later change. So the
// hub counts each workshop's changes, a live page carries the count as it
// was before the page was read (data-live-version, liveVersionOf), and a
// stream says the count as it opens (the event "hello"): a page whose
// count differs fetches itself again. The count starts afresh with the
// server, under a mark of its own start, so a page read before a restart
// never matches a count after it.

// maxStreams bounds the open event streams of the whole server. A stream
// costs a goroutine and a connection, never a request turn (turns.go
// serves only experts), so the bound is about connections: a room needs a
// handful, a page left open in many tabs a few dozen.
const maxStreams = 256

// errTooManyStreams is returned when maxStreams are open.
var errTooManyStreams = errors.New("too many open event streams")

// liveHub fans a workshop's changes out to its open streams. Publishing
// never blocks: each stream has room for one pending event, and a newer
// change takes the place of one pending, since the browser fetches the
// whole page on either and the newer carries the latest count.
type liveHub struct {
	mu     sync.Mutex
	subs   map[int64]map[chan liveEvent]struct{}
	n      int
	done   chan struct{}
	closed bool
	// changes counts each workshop's published changes; start marks
	// this hub's start (see liveEvent).
	changes map[int64]uint64
	start   string
	// experts are the experts' streams and counts (live_expert.go).
	experts expertAudience
}

func newLiveHub() *liveHub {
	return &liveHub{subs: map[int64]map[chan liveEvent]struct{}{}, done: make(chan struct{}),
		changes: map[int64]uint64{}, start: strconv.FormatInt(time.Now().UnixNano(), 36),
		experts: newExpertAudience()}
}

// version is workshop's live version: the changes published to it since
// the hub started, under the hub's start mark.
func (h *liveHub) version(workshop int64) string {
	h.mu.Lock()
	defer h.mu.Unlock()
	return h.versionLocked(workshop)
}

func (h *liveHub) versionLocked(workshop int64) string {
	return h.start + "-" + strconv.FormatUint(h.changes[workshop], 10)
}

// subscribe opens a stream of workshop's changes; cancel closes it.
// version is the workshop's live version as the stream opens: every
// change after it reaches ch.
func (h *liveHub) subscribe(workshop int64) (ch chan liveEvent, version string, cancel func(), err error) {
	h.mu.Lock()
	defer h.mu.Unlock()
	if h.closed {
		return nil, "", nil, http.ErrServerClosed
	}
	if h.n >= maxStreams {
		return nil, "", nil, errTooManyStreams
	}
	ch = make(chan liveEvent, 1)
	if h.subs[workshop] == nil {
		h.subs[workshop] = map[chan liveEvent]struct{}{}
	}
	h.subs[workshop][ch] = struct{}{}
	h.n++
	return ch, h.versionLocked(workshop), func() {
		h.mu.Lock()
		defer h.mu.Unlock()
		if _, ok := h.subs[workshop][ch]; ok {
			delete(h.subs[workshop], ch)
			h.n--
		}
	}, nil
}

// publish sends ev to every open stream of workshop, without waiting.
func (h *liveHub) publish(workshop int64, kind string) {
	h.publishEvent(workshop, liveEvent{Kind: kind, At: time.Now().UTC()})
}

func (h *liveHub) publishEvent(workshop int64, ev liveEvent) {
	h.mu.Lock()
	defer h.mu.Unlock()
	h.changes[workshop]++
	ev.Version = h.versionLocked(workshop)
	for ch := range h.subs[workshop] {
		offer(ch, ev)
	}
}

// streams is the number of open streams.
func (h *liveHub) streams() int {
	h.mu.Lock()
	defer h.mu.Unlock()
	return h.n
}

// close ends every stream, for a server shutting down: open streams are
// active requests, which a graceful shutdown would otherwise wait for.
func (h *liveHub) close() {
	h.mu.Lock()
	defer h.mu.Unlock()
	if !h.closed {
		h.closed = true
		close(h.done)
	}
}

// EndStreams ends every open event stream so that a graceful shutdown
// need not wait for them; wire it to http.Server.RegisterOnShutdown.
func (s *Server) EndStreams() { s.live.close() }

// heartbeat is how often an idle stream says it is still there, by
// default (Options.Heartbeat). It is a named event, "beat", not an SSE
// comment: a connection left dead by a laptop's sleep (or a network that
// dropped it without a word) looks open to EventSource for as long as
// nothing is written to it, and the page said it followed the workshop
// while it heard nothing. A comment never reaches the page's script; the
// event does, and a page that hears nothing for a little over two beats
// (static/live.js, silentAfter) says it stopped following and opens its
// stream again. Each beat carries the workshop's count of changes, as
// hello does.
const heartbeat = 20 * time.Second

// streamWriteLimit is how long one write to a stream may wait for its
// client. A client that reads nothing (a tab frozen by its browser, a
// laptop asleep behind a connection that stays up) held the stream's
// goroutine, its connection and one of maxStreams places for as long as
// the connection lived; now the stream ends, and a browser that wakes
// opens it again and fetches what changed (the event hello). A variable
// for tests.
var streamWriteLimit = time.Minute

// liveEvents streams the workshop's changes to the signed-in facilitator.
// It is mounted behind requireFacilitatorStream: anyone else gets 404.
func (s *Server) liveEvents(w http.ResponseWriter, r *http.Request) {
	ws, ok := s.loadWorkshop(w, r)
	if !ok {
		return
	}
	ch, version, cancel, err := s.live.subscribe(ws.ID)
	if err != nil {
		streamRefused(w, err)
		return
	}
	defer cancel()
	s.serveStream(w, r, liveStream{
		label:   fmt.Sprintf("changes of workshop %d", ws.ID),
		changes: ch, version: version,
		now:    func() string { return s.live.version(ws.ID) },
		still:  func() bool { return s.stillSignedIn(r) },
		change: func(ev liveEvent) any { return ev },
	})
}

// streamRefused answers a stream that cannot be opened: too many open,
// or the server stopping.
func streamRefused(w http.ResponseWriter, err error) {
	msg, status := "Parley has too many live pages open; this page will try again shortly.", http.StatusServiceUnavailable
	switch {
	case errors.Is(err, http.ErrServerClosed):
		msg = "Parley is stopping; this page will try again shortly."
	case errors.Is(err, errTooManyLinkStreams):
		msg, status = "This private link has too many live pages open; this page will try again shortly.", http.StatusTooManyRequests
	}
	w.Header().Set("Retry-After", "10")
	http.Error(w, msg, status)
}

// liveStream is what one event stream sends: the facilitator's, or an
// expert's (live_expert.go).
type liveStream struct {
	label   string              // for the stream's opening comment
	changes chan liveEvent      // from the hub
	version string              // the count as the stream opens
	now     func() string       // the count now, for a beat
	still   func() bool         // whether the stream may go on, checked before each change and beat
	gone    string              // the event sent when still is false, if any ("" ends the stream without a word)
	change  func(liveEvent) any // what a change event carries
}

// serveStream sends st to the browser as server-sent events: hello as it
// opens, a change for each change heard, a beat every Options.Heartbeat,
// until the client leaves, the server stops, a write waits past
// streamWriteLimit, or st.still fails.
func (s *Server) serveStream(w http.ResponseWriter, r *http.Request, st liveStream) {
	rc := http.NewResponseController(w)
	// A stream outlives the server's write timeout by design; each write
	// has streamWriteLimit instead.
	send := func(format string, args ...any) bool {
		_ = rc.SetWriteDeadline(time.Now().Add(streamWriteLimit))
		_, err := fmt.Fprintf(w, format, args...)
		return err == nil && rc.Flush() == nil
	}
	_ = rc.SetWriteDeadline(time.Now().Add(streamWriteLimit))
	h := w.Header()
	h.Set("Content-Type", "text/event-stream; charset=utf-8")
	h.Set("Cache-Control", "no-store")
	h.Set("X-Accel-Buffering", "no")
	w.WriteHeader(http.StatusOK)
	// hello says the count as the stream opens and how often beats come
	// (in ms), from which the page knows how long a silence means a dead
	// connection.
	hello, _ := json.Marshal(struct {
		Version string `json:"version"`
		Beat    int64  `json:"beat"`
	}{st.version, s.opt.Heartbeat.Milliseconds()})
	if !send("retry: 2000\n: Parley live %s\n\nevent: hello\ndata: %s\n\n", st.label, hello) {
		return
	}
	ended := func() {
		if st.gone != "" {
			send("event: %s\ndata: {}\n\n", st.gone)
		}
	}
	tick := time.NewTicker(s.opt.Heartbeat)
	defer tick.Stop()
	for {
		select {
		case <-r.Context().Done():
			return
		case <-s.live.done:
			return
		case <-tick.C:
			if !st.still() {
				ended()
				return
			}
			beat, _ := json.Marshal(struct {
				Version string `json:"version"`
			}{st.now()})
			if !send("event: beat\ndata: %s\n\n", beat) {
				return
			}
		case ev := <-st.changes:
			if !st.still() {
				ended()
				return
			}
			b, _ := json.Marshal(st.change(ev))
			if !send("event: change\ndata: %s\n\n", b) {
				return
			}
		}
	}
}

// stillSignedIn reports whether the session a stream was opened with is
// still valid. A stream outlives the request that checked it; without
// this, a browser signed out (or every browser, by facilitator-reset, for
// a session that may have leaked) went on hearing of every change.
func (s *Server) stillSignedIn(r *http.Request) bool {
	ok, err := s.signedIn(r)
	return ok && err == nil
}

// requireFacilitatorStream lets only a signed-in facilitator open a
// stream. Anyone else, an expert's browser included, gets a bare 404:
// a redirect to the sign-in page would only make EventSource retry.
func (s *Server) requireFacilitatorStream(next http.Handler) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		ok, err := s.signedIn(r)
		if err != nil || !ok {
			s.notFound(w, r)
			return
		}
		next.ServeHTTP(w, r)
	})
}

// statusRecorder notes the status a handler answered with.
type statusRecorder struct {
	http.ResponseWriter
	status int
}

func (sr *statusRecorder) WriteHeader(code int) {
	if sr.status == 0 {
		sr.status = code
	}
	sr.ResponseWriter.WriteHeader(code)
}

func (sr *statusRecorder) Write(b []byte) (int, error) {
	if sr.status == 0 {
		sr.status = http.StatusOK
	}
	return sr.ResponseWriter.Write(b)
}

func (sr *statusRecorder) Unwrap() http.ResponseWriter { return sr.ResponseWriter }

// liveVersionKey keys the workshop's live version in a page request's
// context, read before the page reads anything else.
type liveVersionKey struct{}

// liveVersionOf is the live version of the workshop a page shows, as it
// was before the page was read (data-live-version); "" outside a
// workshop's pages.
func liveVersionOf(ctx context.Context) string {
	v, _ := ctx.Value(liveVersionKey{}).(string)
	return v
}

// publishChanges publishes every facilitator change to a workshop that
// succeeded: a POST under /w/{workshop} answered with a redirect, as every
// change is (a form sent twice is sent on to where the first went, which
// publishes once more, harmlessly). A POST answered 200 changed nothing: a
// preview of a judgement entered for an expert (sent as the facilitator
// types), the check of an answer sheet, a confirmation asked for; each
// sent every live page, the projector's among them, to fetch itself again.
// The kind is the last part of its path ("round", "weights", "agree", ...).
// Any other
// request under /w/{workshop} notes the workshop's live version first,
// for a live page to carry (liveVersionOf).
func (s *Server) publishChanges(next http.Handler) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		if r.Method != http.MethodPost {
			if id, err := strconv.ParseInt(chi.URLParam(r, "workshop"), 10, 64); err == nil {
				r = r.WithContext(context.WithValue(r.Context(), liveVersionKey{}, s.live.version(id)))
			}
			next.ServeHTTP(w, r)
			return
		}
		sr := &statusRecorder{ResponseWriter: w}
		next.ServeHTTP(sr, r)
		if sr.status < 300 || sr.status >= 400 {
			return
		}
		id, err := strconv.ParseInt(chi.URLParam(r, "workshop"), 10, 64)
		if err != nil {
			return
		}
		ev := liveEvent{Kind: r.URL.Path[strings.LastIndexByte(r.URL.Path, '/')+1:], At: time.Now().UTC()}
		if rest, ok := strings.CutPrefix(r.URL.Path, workshopPath(id)+"/q/"); ok {
			ev.Question, _ = strconv.ParseInt(strings.SplitN(rest, "/", 2)[0], 10, 64)
		}
		if rest, ok := strings.CutPrefix(r.URL.Path, workshopPath(id)+"/calibration/q/"); ok {
			ev.Question, _ = strconv.ParseInt(rest, 10, 64)
		}
		s.live.publishEvent(id, ev)
		s.tellExperts(r, id, chi.RouteContext(r.Context()).RoutePattern())
	})
}

package web

import (
	"bufio"
	"context"
	"encoding/json"
	"errors"
	"net/http"
	"net/http/httptest"
	"net/url"
	"regexp"
	"runtime"
	"strconv"
	"strings"
	"testing"
	"time"
)

// stream is an open event stream read line by line.
type stream struct {
	res    *http.Response
	events chan liveEvent
	hello  chan string // the version the stream opened at
	beats  chan liveBeat
}

// liveBeat is a heartbeat as a stream sends it: the version, and the
// interval hello announced.
type liveBeat struct {
	Version string
	Every   time.Duration // from hello's "beat"
}

// openStream opens GET path as the harness's client (with its cookies).
func (h *harness) openStream(t *testing.T, path string) (*http.Response, *stream) {
	t.Helper()
	ctx, cancel := context.WithCancel(context.Background())
	t.Cleanup(cancel)
	req, _ := http.NewRequestWithContext(ctx, http.MethodGet, h.ts.URL+path, nil)
	req.Header.Set("Accept", "text/event-stream")
	res, err := h.client.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { res.Body.Close() })
	if res.StatusCode != http.StatusOK {
		return res, nil
	}
	st := &stream{res: res, events: make(chan liveEvent, 64), hello: make(chan string, 1), beats: make(chan liveBeat, 64)}
	go func() {
		defer close(st.events)
		sc := bufio.NewScanner(res.Body)
		var kind string
		var every time.Duration
		for sc.Scan() {
			line := sc.Text()
			switch {
			case strings.HasPrefix(line, "event: "):
				kind = strings.TrimPrefix(line, "event: ")
			case strings.HasPrefix(line, "data: ") && kind == "hello":
				var hello struct {
					Version string
					Beat    int64
				}
				if json.Unmarshal([]byte(strings.TrimPrefix(line, "data: ")), &hello) == nil {
					every = time.Duration(hello.Beat) * time.Millisecond
					st.hello <- hello.Version
				}
			case strings.HasPrefix(line, "data: ") && kind == "beat":
				b := liveBeat{Every: every}
				if json.Unmarshal([]byte(strings.TrimPrefix(line, "data: ")), &b) == nil {
					select {
					case st.beats <- b:
					default:
					}
				}
			case strings.HasPrefix(line, "data: ") && kind == "change":
				var ev liveEvent
				if json.Unmarshal([]byte(strings.TrimPrefix(line, "data: ")), &ev) == nil {
					st.events <- ev
				}
			case line == "":
				kind = ""
			}
		}
	}()
	return res, st
}

// next waits up to limit for the next event.
func (st *stream) next(t *testing.T, limit time.Duration, what string) liveEvent {
	t.Helper()
	select {
	case ev, ok := <-st.events:
		if !ok {
			t.Fatalf("%s: the stream ended", what)
		}
		return ev
	case <-time.After(limit):
		t.Fatalf("%s: no event within %v", what, limit)
	}
	return liveEvent{}
}

// The stream delivers an expert's save, and each facilitator change,
// within the two seconds; other workshops' changes do not reach it.
func TestEventStreamDeliversChanges(t *testing.T) {
	h, ws, qs, _, links := seeded(t)
	res, st := h.openStream(t, workshopPath(ws.ID)+"/events")
	if res.StatusCode != http.StatusOK || !strings.HasPrefix(res.Header.Get("Content-Type"), "text/event-stream") {
		t.Fatalf("events: %d %q", res.StatusCode, res.Header.Get("Content-Type"))
	}
	// An expert's save.
	expert := links[2].Path // Priya, who has not answered question 1
	saved := time.Now()
	if r, body := h.post(expert+"q/"+strconv.FormatInt(qs[0].ID, 10)+"/save", url.Values{
		"values[0]": {"0.02"}, "values[1]": {"0.05"}, "values[2]": {"0.12"}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("save: %d %s", r.StatusCode, body)
	}
	ev := st.next(t, 2*time.Second, "the expert's save")
	if ev.Kind != "save" || ev.Question != qs[0].ID {
		t.Fatalf("save event %+v", ev)
	}
	t.Logf("save delivered %v after it", time.Since(saved).Round(time.Microsecond))

	// A refused save sends nothing; a facilitator change does.
	if r, _ := h.post(expert+"q/"+strconv.FormatInt(qs[0].ID, 10)+"/save", url.Values{"values[0]": {"x"}}); r.StatusCode != http.StatusUnprocessableEntity {
		t.Fatalf("bad save: %d", r.StatusCode)
	}
	if r, _ := h.post(workshopPath(ws.ID)+"/round", url.Values{"action": {"close"}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("close round: %d", r.StatusCode)
	}
	if ev := st.next(t, 2*time.Second, "closing the round"); ev.Kind != "round" {
		t.Fatalf("after a refused save and a round change the next event is %+v, want the round", ev)
	}
	truth := calibrationPath(ws.ID) + "/q/" + strconv.FormatInt(qs[1].ID, 10)
	if r, _ := h.post(truth, url.Values{"true_value": {"0.0413"}, "reveal": {"on"}, "reason": {"Shown (invented)."}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("reveal: %d", r.StatusCode)
	}
	if ev := st.next(t, 2*time.Second, "the reveal"); ev.Question != qs[1].ID {
		t.Fatalf("reveal event %+v", ev)
	}
	// Another workshop's change is not this stream's.
	other := h.newWorkshop("Other (invented)")
	if r, _ := h.post(workshopPath(other.ID)+"/edit", url.Values{"title": {"Other, renamed (invented)"}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("edit other: %d", r.StatusCode)
	}
	select {
	case ev := <-st.events:
		t.Fatalf("another workshop's change reached this stream: %+v", ev)
	case <-time.After(300 * time.Millisecond):
	}
}

// Only the signed-in facilitator can open the workshop's stream: an
// expert's token, anywhere in the address, and a stranger get a bare
// 404. (An expert's own stream, /e/{token}/events, carries only what
// their pages show: live_expert_test.go.)
func TestEventStreamRefusesExperts(t *testing.T) {
	h, ws, _, _, links := seeded(t)
	tok := strings.TrimSuffix(strings.TrimPrefix(links[0].Path, "/e/"), "/")
	stranger := newHarness(t)
	stranger.ts.Close()
	stranger.ts = h.ts // the same server, no session
	for _, path := range []string{
		workshopPath(ws.ID) + "/events",
		workshopPath(ws.ID) + "/events?token=" + tok,
		links[0].Path + "w/" + strconv.FormatInt(ws.ID, 10) + "/events",
	} {
		res, st := stranger.openStream(t, path)
		if res.StatusCode != http.StatusNotFound || st != nil {
			t.Errorf("%s without a session: %d, want 404", path, res.StatusCode)
		}
	}
}

// Many open streams hold no request turns: experts' previews and saves
// go on while they are open, and the server refuses streams beyond its
// bound with 503 instead of running out of connections.
func TestManyStreamsDoNotHoldExperts(t *testing.T) {
	h, ws, qs, _, links := seeded(t)
	var streams []*stream
	for i := 0; i < 3*runtime.GOMAXPROCS(0)+8; i++ {
		_, st := h.openStream(t, workshopPath(ws.ID)+"/events")
		if st == nil {
			t.Fatal("stream refused")
		}
		streams = append(streams, st)
	}
	q := links[2].Path + "q/" + strconv.FormatInt(qs[0].ID, 10)
	form := url.Values{"values[0]": {"0.02"}, "values[1]": {"0.05"}, "values[2]": {"0.12"}}
	if r, _ := h.post(q+"/preview?fragment=1", form); r.StatusCode != http.StatusOK {
		t.Fatalf("preview with %d streams open: %d", len(streams), r.StatusCode)
	}
	if r, _ := h.post(q+"/save", form); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("save with %d streams open: %d", len(streams), r.StatusCode)
	}
	for i, st := range streams {
		if ev := st.next(t, 2*time.Second, "stream "+strconv.Itoa(i)); ev.Kind != "save" {
			t.Fatalf("stream %d got %+v", i, ev)
		}
	}
	if n := h.srv.live.streams(); n != len(streams) {
		t.Fatalf("the hub counts %d streams, want %d", n, len(streams))
	}
	// Beyond the bound: 503 with Retry-After.
	hub := newLiveHub()
	for i := 0; i < maxStreams; i++ {
		if _, _, _, err := hub.subscribe(1); err != nil {
			t.Fatal(err)
		}
	}
	if _, _, _, err := hub.subscribe(1); !errors.Is(err, errTooManyStreams) {
		t.Fatalf("stream %d: %v, want errTooManyStreams", maxStreams+1, err)
	}
}

// A graceful shutdown ends open streams instead of waiting for them.
func TestShutdownEndsStreams(t *testing.T) {
	h, ws, _, _, _ := seeded(t)
	hs := h.ts.Config
	hs.RegisterOnShutdown(h.srv.EndStreams)
	_, st := h.openStream(t, workshopPath(ws.ID)+"/events")
	if st == nil {
		t.Fatal("no stream")
	}
	ctx, cancel := context.WithTimeout(context.Background(), 10*time.Second)
	defer cancel()
	if err := hs.Shutdown(ctx); err != nil {
		t.Fatalf("shutdown with a stream open: %v", err)
	}
	select {
	case _, ok := <-st.events:
		if ok {
			t.Fatal("an event instead of the end")
		}
	case <-time.After(5 * time.Second):
		t.Fatal("the stream did not end at shutdown")
	}
}

// A stream ends with its session: signed out everywhere (facilitator-reset,
// for a session that may have leaked), the next change ends the stream
// instead of reaching it. Before, a stream opened with the session went on
// hearing of every save and decision.
func TestEventStreamEndsWithItsSession(t *testing.T) {
	h, ws, qs, _, links := seeded(t)
	res, st := h.openStream(t, workshopPath(ws.ID)+"/events")
	if res.StatusCode != http.StatusOK {
		t.Fatalf("events: %d", res.StatusCode)
	}
	if _, err := ResetFacilitatorSecret(context.Background(), h.db); err != nil {
		t.Fatal(err)
	}
	if r, body := h.post(links[2].Path+"q/"+strconv.FormatInt(qs[0].ID, 10)+"/save", url.Values{
		"values[0]": {"0.02"}, "values[1]": {"0.05"}, "values[2]": {"0.12"}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("save: %d %s", r.StatusCode, body)
	}
	select {
	case ev, ok := <-st.events:
		if ok {
			t.Fatalf("a signed-out stream was sent %+v", ev)
		}
	case <-time.After(2 * time.Second):
		t.Fatal("the signed-out stream is still open 2 s after a change")
	}
	if n := h.srv.live.streams(); n != 0 {
		t.Errorf("%d streams still counted", n)
	}
}

// liveVersionAttr reads the data-live-version a live page carries.
var liveVersionAttr = regexp.MustCompile(`data-live-src="[^"]*" data-live-version="([^"]+)"`)

// A live page carries the workshop's count of changes as it was read, and
// a stream says the count as it opens, so that a page read before a
// change it was not yet listening for can tell it missed one
// (TestLivePageCatchesAChangeBeforeItsStreamOpened in e2e is the
// browser's half). Every kind of live page carries it: the overview, a
// question's panel, its room view.
func TestLivePagesCarryTheVersionTheirStreamOpensAt(t *testing.T) {
	h, ws, qs, _, links := seeded(t)
	q := workshopPath(ws.ID) + "/q/" + strconv.FormatInt(qs[0].ID, 10)
	pages := []string{workshopPath(ws.ID), q, q + "/room"}
	versionsOf := func() []string {
		var out []string
		for _, p := range pages {
			res, body := h.get(p)
			m := liveVersionAttr.FindStringSubmatch(body)
			if res.StatusCode != http.StatusOK || m == nil {
				t.Fatalf("%s: %d, no data-live-version", p, res.StatusCode)
			}
			out = append(out, m[1])
		}
		return out
	}
	hello := func() string {
		_, st := h.openStream(t, workshopPath(ws.ID)+"/events")
		select {
		case v := <-st.hello:
			return v
		case <-time.After(2 * time.Second):
			t.Fatal("the stream said no version as it opened")
		}
		return ""
	}
	before := versionsOf()
	opened := hello()
	for i, v := range before {
		if v != opened {
			t.Errorf("%s carries version %q; a stream opened after it with nothing changed says %q", pages[i], v, opened)
		}
	}
	// Priya saves while no stream is open: a page read before says the
	// old count, a stream opened after says the new.
	if r, body := h.post(links[2].Path+"q/"+strconv.FormatInt(qs[0].ID, 10)+"/save", url.Values{
		"values[0]": {"0.02"}, "values[1]": {"0.05"}, "values[2]": {"0.12"}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("save: %d %s", r.StatusCode, body)
	}
	now := hello()
	if now == opened {
		t.Fatalf("a stream opened after a save says the version %q it said before it", now)
	}
	for i, v := range versionsOf() {
		if v != now {
			t.Errorf("%s read after the save carries %q; the stream says %q", pages[i], v, now)
		}
	}
	// The change itself carries the version after it.
	_, st := h.openStream(t, workshopPath(ws.ID)+"/events")
	<-st.hello
	if r, _ := h.post(workshopPath(ws.ID)+"/round", url.Values{"action": {"close"}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("close round: %d", r.StatusCode)
	}
	ev := st.next(t, 2*time.Second, "closing the round")
	if ev.Version == "" || ev.Version == now || ev.Version != versionsOf()[2] {
		t.Errorf("the round's change carries version %q (before it %q; the room view now %q)", ev.Version, now, versionsOf()[2])
	}
}

// A POST that changes nothing publishes nothing: the facilitator's
// preview of a judgement entered for an expert (sent as they type) and
// the confirmation asked before an expert's access is ended, as the check
// of an answer sheet before it is saved would be. Each sent every live page, the
// projector's room view among them, to fetch itself again for a change
// that was not made. The change that follows is the next event.
func TestPostsThatChangeNothingPublishNothing(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	_, st := h.openStream(t, workshopPath(ws.ID)+"/events")
	if st == nil {
		t.Fatal("no stream")
	}
	entry := entryPath(ws.ID, qs[0].ID, es[2].ID)
	form := url.Values{"channel": {"paper_form"}, "values[0]": {"0.01"}, "values[1]": {"0.03"}, "values[2]": {"0.09"}}
	for _, p := range []struct {
		path string
		form url.Values
	}{
		{entry + "/preview?fragment=1", form},
		{entry + "/preview", form},
		{workshopPath(ws.ID) + "/experts/" + strconv.FormatInt(es[2].ID, 10) + "/revoke", url.Values{}},
	} {
		r, _ := h.post(p.path, p.form)
		if r.StatusCode != http.StatusOK {
			t.Fatalf("%s answered %d, want 200", p.path, r.StatusCode)
		}
		select {
		case ev := <-st.events:
			t.Errorf("%s (%d), which saves nothing, was published: %+v", p.path, r.StatusCode, ev)
		case <-time.After(200 * time.Millisecond):
		}
	}
	if r, _ := h.post(entry+"/save", form); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("entry save: %d", r.StatusCode)
	}
	if ev := st.next(t, 2*time.Second, "the entry's save"); ev.Kind != "save" || ev.Question != qs[0].ID {
		t.Errorf("the save's event is %+v", ev)
	}
}

// A stream asked for while the server stops is refused in words that say
// so: it said "Parley has too many live pages open".
func TestStreamRefusedWhileStoppingSaysSo(t *testing.T) {
	h, ws, _, _, _ := seeded(t)
	h.srv.EndStreams()
	res, body := h.get(workshopPath(ws.ID) + "/events")
	if res.StatusCode != http.StatusServiceUnavailable || !strings.Contains(body, "Parley is stopping") || strings.Contains(body, "too many") {
		t.Errorf("a stream asked for while the server stops: %d %q", res.StatusCode, body)
	}
}

// A stream outlives the server's read and write timeouts (parley serve
// sets 30 s and 60 s): the stream clears its write deadline, and net/http
// clears the read deadline once the request is read. Without the first, a
// live page lost its stream every minute, and missed what changed in the
// two seconds before it came back. (This fails without the stream's
// SetWriteDeadline, which no test held before.)
func TestStreamOutlivesTheServersTimeouts(t *testing.T) {
	h, ws, qs, _, links := seeded(t)
	ts := httptest.NewUnstartedServer(h.srv.Handler())
	ts.Config.ReadTimeout, ts.Config.WriteTimeout = time.Second, time.Second
	ts.Start()
	t.Cleanup(ts.Close)
	h.ts = ts // the harness's cookies are the host's, whatever its port
	_, st := h.openStream(t, workshopPath(ws.ID)+"/events")
	if st == nil {
		t.Fatal("no stream")
	}
	<-st.hello
	time.Sleep(2500 * time.Millisecond) // past both timeouts
	if r, body := h.post(links[2].Path+"q/"+strconv.FormatInt(qs[0].ID, 10)+"/save", url.Values{
		"values[0]": {"0.02"}, "values[1]": {"0.05"}, "values[2]": {"0.12"}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("save: %d %s", r.StatusCode, body)
	}
	if ev := st.next(t, 2*time.Second, "a save after the server's timeouts passed"); ev.Kind != "save" {
		t.Errorf("the stream's next event is %+v", ev)
	}
}

// A stream's heartbeat was an SSE comment, which a page's script never
// sees: a connection left dead by a laptop's sleep looked open, and the
// page said it followed the workshop while it heard nothing. The beat is
// a named event the page listens for, at the interval hello announces,
// and it carries the workshop's count of changes, so a page behind the
// count fetches itself.
func TestStreamBeatsAsAnEventThePageHears(t *testing.T) {
	h, ws, _, _, _ := seeded(t)
	srv, err := New(h.db, Options{Heartbeat: 50 * time.Millisecond})
	if err != nil {
		t.Fatal(err)
	}
	ts := httptest.NewServer(srv.Handler())
	t.Cleanup(ts.Close)
	h.ts = ts // the harness's cookies are the host's, whatever its port
	_, st := h.openStream(t, workshopPath(ws.ID)+"/events")
	if st == nil {
		t.Fatal("the stream was refused")
	}
	opened := <-st.hello
	next := func(what string) liveBeat {
		t.Helper()
		select {
		case b := <-st.beats:
			return b
		case <-time.After(5 * time.Second):
			t.Fatalf("%s: no beat within 5 s of a stream beating every 50 ms", what)
		}
		return liveBeat{}
	}
	if b := next("an idle stream"); b.Version != opened || b.Every != 50*time.Millisecond {
		t.Errorf("a beat says version %q every %v; want %q every 50ms", b.Version, b.Every, opened)
	}
	srv.live.publish(ws.ID, "save")
	ev := st.next(t, 2*time.Second, "a change")
	for deadline := time.Now().Add(5 * time.Second); ; {
		if b := next("after a change"); b.Version == ev.Version {
			break
		}
		if time.Now().After(deadline) {
			t.Fatalf("no beat carries the version %q of the change", ev.Version)
		}
	}
}

// An overview of a workshop without an expert or a question in use held
// no event stream: its status line lived in the table of who answered
// what, drawn only once there was one, so the page followed nothing (a
// round closed, the workshop archived, the first expert added in another
// tab). The line, and with it the stream, is there from the start.
func TestOverviewOfAnEmptyWorkshopFollowsIt(t *testing.T) {
	h := newHarness(t)
	h.signIn()
	ws := h.newWorkshop("Empty for now (invented)")
	_, body := h.get(workshopPath(ws.ID))
	if !liveVersionAttr.MatchString(body) {
		t.Fatal("the overview of a workshop without experts or questions opens no event stream (no data-live-src)")
	}
	if !strings.Contains(body, "this page follows the workshop; a table of who has answered what comes here once it has an expert and a question in use.") {
		t.Error("the overview of an empty workshop does not say what it follows")
	}
}

package web

import (
	"bufio"
	"context"
	"encoding/json"
	"fmt"
	"net/http"
	"net/http/httptest"
	"net/url"
	"regexp"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// rawStream is an expert's event stream as the bytes arrive, every line
// kept, for checking what it carries.
type rawStream struct {
	events chan rawEvent
	mu     sync.Mutex
	all    strings.Builder
	ended  chan struct{}
}

// text is every line the stream has sent so far.
func (st *rawStream) text() string {
	st.mu.Lock()
	defer st.mu.Unlock()
	return st.all.String()
}

type rawEvent struct {
	Kind, Data string
}

// openRawStream opens path with a client that carries no cookie: an
// expert's stream is authorised by the link alone.
func openRawStream(t *testing.T, base, path string) (*http.Response, *rawStream) {
	t.Helper()
	ctx, cancel := context.WithCancel(context.Background())
	t.Cleanup(cancel)
	req, _ := http.NewRequestWithContext(ctx, http.MethodGet, base+path, nil)
	req.Header.Set("Accept", "text/event-stream")
	res, err := http.DefaultClient.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { res.Body.Close() })
	if res.StatusCode != http.StatusOK {
		return res, nil
	}
	st := &rawStream{events: make(chan rawEvent, 256), ended: make(chan struct{})}
	lines := make(chan string, 1024)
	go func() {
		defer close(lines)
		sc := bufio.NewScanner(res.Body)
		for sc.Scan() {
			lines <- sc.Text()
		}
	}()
	go func() {
		defer close(st.ended)
		kind := ""
		for line := range lines {
			st.mu.Lock()
			st.all.WriteString(line + "\n")
			st.mu.Unlock()
			switch {
			case strings.HasPrefix(line, "event: "):
				kind = strings.TrimPrefix(line, "event: ")
			case strings.HasPrefix(line, "data: "):
				st.events <- rawEvent{kind, strings.TrimPrefix(line, "data: ")}
			}
		}
	}()
	return res, st
}

// next is the stream's next event other than a beat whose version is
// version; it fails after 5 s.
func (st *rawStream) next(t *testing.T, what string) rawEvent {
	t.Helper()
	select {
	case ev := <-st.events:
		return ev
	case <-time.After(5 * time.Second):
		t.Fatalf("%s: nothing on the stream within 5 s", what)
	}
	return rawEvent{}
}

func versionIn(t *testing.T, ev rawEvent) string {
	t.Helper()
	var v struct{ Version string }
	if err := json.Unmarshal([]byte(ev.Data), &v); err != nil || v.Version == "" {
		t.Fatalf("%s event without a version: %q", ev.Kind, ev.Data)
	}
	return v.Version
}

// expertLiveHarness is a workshop of two experts and a question, on a
// server whose streams beat every 100 ms.
func expertLiveHarness(t *testing.T) (h *harness, ws workshop.Workshop, q workshop.Question, tokA, tokB string) {
	t.Helper()
	return expertLiveHarnessBeating(t, 100*time.Millisecond)
}

// expertLiveHarnessBeating is expertLiveHarness with streams that beat
// every beat.
func expertLiveHarnessBeating(t *testing.T, beat time.Duration) (h *harness, ws workshop.Workshop, q workshop.Question, tokA, tokB string) {
	t.Helper()
	h = newHarness(t)
	srv, err := New(h.db, Options{Heartbeat: beat})
	if err != nil {
		t.Fatal(err)
	}
	ts := httptest.NewServer(srv.Handler())
	t.Cleanup(ts.Close)
	h.ts, h.srv = ts, srv
	h.signIn()
	ws = h.newWorkshop("Invented: pump seal failures")
	q = h.addQuantileQuestion(t, ws.ID, "What share of seals fail in the first year? (invented)", "share failing")
	_, tokA = h.addExpert(ws, "Ada Quist")
	_, tokB = h.addExpert(ws, "Bruno Marsh")
	return h, ws, q, tokA, tokB
}

// An expert's stream tells them of what their pages show, and of nothing
// about the other experts: another expert's saves, an expert added, an
// answer entered or a link ended for another expert in round 1, a reason
// withheld that no page of theirs shows, a hidden true value entered move
// neither its events nor the count its beats carry; a round closed, and
// their own save, do. It carries no names, no questions, no kinds.
func TestExpertStreamCarriesNothingAboutTheOthers(t *testing.T) {
	h, ws, q, tokA, tokB := expertLiveHarness(t)
	res, st := openRawStream(t, h.ts.URL, "/e/"+tokA+"/events")
	if st == nil {
		t.Fatalf("the expert's stream answered %d", res.StatusCode)
	}
	hello := st.next(t, "hello")
	if hello.Kind != "hello" {
		t.Fatalf("the stream opened with %q", hello.Kind)
	}
	opened := versionIn(t, hello)
	qpath := "/e/" + tokB + "/q/" + strconv.FormatInt(q.ID, 10)
	others := newHarnessClient(h)
	for _, vals := range [][]string{{"0.01", "0.05", "0.2"}, {"0.02", "0.06", "0.25"}} {
		f := quantiles(vals...)
		f.Set("reason", "The invented plant's records, as Bruno Marsh read them.")
		if res, body := others.post(qpath+"/save", f); res.StatusCode != http.StatusSeeOther {
			t.Fatalf("the other expert's save: %d %s", res.StatusCode, body)
		}
	}
	c, tokC := h.addExpert(ws, "Celia Hidden")
	if res, _ := others.post("/e/"+tokC+"/q/"+strconv.FormatInt(q.ID, 10)+"/save", quantiles("0.03", "0.07", "0.3")); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("the third expert's save: %d", res.StatusCode)
	}
	revs, err := h.db.Revisions(context.Background(), ws.ID)
	if err != nil {
		t.Fatal(err)
	}
	if res, body := h.post(workshopPath(ws.ID)+"/q/"+strconv.FormatInt(q.ID, 10)+"/reasons/"+strconv.FormatInt(revs[0].ID, 10),
		url.Values{"action": {"withhold"}, "withhold_reason": {"Names a colleague (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("withhold: %d %.300s", res.StatusCode, body)
	}
	if res, body := h.post(workshopPath(ws.ID)+"/experts/"+strconv.FormatInt(c.ID, 10)+"/revoke",
		url.Values{"confirm": {"yes"}, "reason": {"Left the panel (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("revoke: %d %s", res.StatusCode, body)
	}
	// Two beats after all that, the count is as it opened, and nothing
	// but beats came.
	for beats := 0; beats < 2; {
		ev := st.next(t, "beats after the other experts' changes")
		if ev.Kind != "beat" {
			t.Fatalf("the other experts' saves, an expert added and revoked and a reason withheld in round 1 sent expert A %q %s", ev.Kind, ev.Data)
		}
		if v := versionIn(t, ev); v != opened {
			t.Fatalf("the count moved from %s to %s with the other experts' changes", opened, v)
		}
		beats++
	}

	// A round closed reaches the expert.
	if res, body := h.post(workshopPath(ws.ID)+"/round", url.Values{"action": {"close"}, "round": {"1"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("close the round: %d %s", res.StatusCode, body)
	}
	closed := ""
	for closed == "" {
		if ev := st.next(t, "the round closed"); ev.Kind == "change" {
			closed = versionIn(t, ev)
		}
	}
	if closed == opened {
		t.Fatalf("the round's close left the count at %s", closed)
	}
	// Round 2 opens: in it the feedback shows round 1, and its reasons.
	h.post(workshopPath(ws.ID)+"/round", url.Values{"action": {"open"}, "round": {"2"}, "reason": {"Round 2 (invented)."}})
	for {
		if ev := st.next(t, "round 2 opened"); ev.Kind == "change" {
			break
		}
	}
	// The expert's own save reaches their other devices.
	mine := newHarnessClient(h)
	if res, body := mine.post("/e/"+tokA+"/q/"+strconv.FormatInt(q.ID, 10)+"/save", quantiles("0.02", "0.04", "0.1")); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("expert A's save: %d %s", res.StatusCode, body)
	}
	for {
		if ev := st.next(t, "their own save"); ev.Kind == "change" {
			break
		}
	}
	all := st.text()
	for _, secret := range []string{"Bruno", "Marsh", "Celia", "Hidden", "Ada", "question", "kind", "save", strconv.FormatInt(q.ID, 10) + ","} {
		if strings.Contains(all, secret) {
			t.Errorf("the expert's stream carries %q:\n%s", secret, all)
		}
	}
}

// A link ended while its stream is open: the stream says "gone" and
// ends; opened again, and on the expert's pages, the link is refused.
func TestRevokedLinksStreamEndsAndIsRefused(t *testing.T) {
	h, ws, _, tokA, _ := expertLiveHarness(t)
	_, st := openRawStream(t, h.ts.URL, "/e/"+tokA+"/events")
	if st == nil {
		t.Fatal("the stream was refused before the link was ended")
	}
	st.next(t, "hello")
	es, err := h.db.Experts(context.Background(), ws.ID)
	if err != nil {
		t.Fatal(err)
	}
	if res, body := h.post(workshopPath(ws.ID)+"/experts/"+strconv.FormatInt(es[0].ID, 10)+"/revoke",
		url.Values{"confirm": {"yes"}, "reason": {"Left the panel (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("revoke: %d %s", res.StatusCode, body)
	}
	for {
		ev := st.next(t, "the link ended")
		if ev.Kind == "gone" {
			break
		}
		if ev.Kind == "change" {
			t.Fatalf("the ended link's stream was told of a change: %s", ev.Data)
		}
	}
	select {
	case <-st.ended:
	case <-time.After(5 * time.Second):
		t.Fatal("the ended link's stream stayed open")
	}
	if res, _ := openRawStream(t, h.ts.URL, "/e/"+tokA+"/events"); res.StatusCode != http.StatusNotFound {
		t.Fatalf("the ended link's stream opened again: %d", res.StatusCode)
	}
	if n := h.srv.live.expertStreams(); n != 0 {
		t.Errorf("%d expert streams still open", n)
	}
}

// One link holds at most maxLinkStreams streams: the next is refused with
// 429 and Retry-After, and another expert's link is not held back by it.
func TestOneLinkHoldsABoundedNumberOfStreams(t *testing.T) {
	h, _, _, tokA, tokB := expertLiveHarness(t)
	for i := 0; i < maxLinkStreams; i++ {
		if res, st := openRawStream(t, h.ts.URL, "/e/"+tokA+"/events"); st == nil {
			t.Fatalf("stream %d of one link refused: %d", i+1, res.StatusCode)
		}
	}
	res, _ := openRawStream(t, h.ts.URL, "/e/"+tokA+"/events")
	if res.StatusCode != http.StatusTooManyRequests || res.Header.Get("Retry-After") == "" {
		t.Fatalf("stream %d of one link: %d (Retry-After %q), want 429 with Retry-After", maxLinkStreams+1, res.StatusCode, res.Header.Get("Retry-After"))
	}
	if res, st := openRawStream(t, h.ts.URL, "/e/"+tokB+"/events"); st == nil {
		t.Fatalf("another expert's stream refused beside a link at its bound: %d", res.StatusCode)
	}
	if res, _ := openRawStream(t, h.ts.URL, "/e/not-a-link-at-all/events"); res.StatusCode != http.StatusNotFound {
		t.Fatalf("a stream without a working link: %d", res.StatusCode)
	}
}

// The bound of maxLinkStreams is a link's, not an expert's: the streams
// of a link just replaced, not yet ended, were counted against the new
// one, which was refused. A replaced link's streams then say "gone" and
// end, and free their places.
func TestReplacedLinksStreamsCountAgainstThemselvesAndEnd(t *testing.T) {
	// Streams that beat once an hour: none ends on a beat here, only as
	// the test makes it.
	h, ws, _, tokA, _ := expertLiveHarnessBeating(t, time.Hour)
	ctx := context.Background()
	es, err := h.db.Experts(ctx, ws.ID)
	if err != nil {
		t.Fatal(err)
	}
	ada := es[0].ID
	open := func(tok, what string, n int) []*rawStream {
		t.Helper()
		var sts []*rawStream
		for i := 0; i < n; i++ {
			res, st := openRawStream(t, h.ts.URL, "/e/"+tok+"/events")
			if st == nil {
				t.Fatalf("%s: stream %d refused: %d", what, i+1, res.StatusCode)
			}
			st.next(t, what+": hello")
			sts = append(sts, st)
		}
		return sts
	}
	first := open(tokA, "the first link", maxLinkStreams)

	// A new link, given while the first link's streams are still open
	// (its streams not yet told, as between the store's change and the
	// hub's word).
	tokB, hash, err := newToken()
	if err != nil {
		t.Fatal(err)
	}
	if err := h.db.ReissueToken(ctx, ada, hash, "Lost the first link (invented)."); err != nil {
		t.Fatal(err)
	}
	second := open(tokB, "the new link beside the old one's open streams", maxLinkStreams)
	if res, _ := openRawStream(t, h.ts.URL, "/e/"+tokB+"/events"); res.StatusCode != http.StatusTooManyRequests {
		t.Fatalf("stream %d of the new link: %d, want 429", maxLinkStreams+1, res.StatusCode)
	}

	// The facilitator gives a third link: every stream of the two ended
	// links says gone and ends, and the places are free for the third.
	res, body := h.post(workshopPath(ws.ID)+"/experts/"+strconv.FormatInt(ada, 10)+"/reissue",
		url.Values{"confirm": {"yes"}, "reason": {"Lost the second link too (invented)."}})
	if res.StatusCode != http.StatusSeeOther {
		t.Fatalf("reissue: %d %s", res.StatusCode, body)
	}
	_, page := h.get(res.Header.Get("Location"))
	m := linkPattern.FindStringSubmatch(page)
	if m == nil {
		t.Fatal("reissue: no link on the page it leads to")
	}
	for i, st := range append(first, second...) {
		for said := ""; said != "gone"; {
			ev := st.next(t, fmt.Sprintf("ended stream %d", i+1))
			if ev.Kind == "change" {
				t.Fatalf("ended stream %d was told of a change: %s", i+1, ev.Data)
			}
			said = ev.Kind
		}
		select {
		case <-st.ended:
		case <-time.After(5 * time.Second):
			t.Fatalf("ended stream %d stayed open after saying gone", i+1)
		}
	}
	deadline := time.Now().Add(5 * time.Second)
	for h.srv.live.expertStreams() != 0 && time.Now().Before(deadline) {
		time.Sleep(10 * time.Millisecond)
	}
	if n := h.srv.live.expertStreams(); n != 0 {
		t.Fatalf("%d streams of ended links still counted", n)
	}
	open(m[1], "the third link", maxLinkStreams)
}

// The expert's question page, fetched by its live script with the state
// its form was drawn in (?drawn=), says what the facilitator changed
// since, and its save button says why it does not save; the form is the
// page's own business. Round 2's feedback is marked as the round's, for
// the script to offer rather than put in under the reader. The page
// carries the count its stream opens at.
func TestExpertQuestionPageSaysWhatChangedSinceItsForm(t *testing.T) {
	h, ws, q, tokA, tokB := expertLiveHarness(t)
	// A third expert: round 2 shows the others' answers only where two or
	// more others answered (feedback.othersShown).
	_, tokC := h.addExpert(ws, "Cleo Rask")
	ex := newHarnessClient(h)
	page := "/e/" + tokA + "/q/" + strconv.FormatInt(q.ID, 10)
	for _, tok := range []string{tokA, tokB, tokC} {
		if res, body := ex.post("/e/"+tok+"/q/"+strconv.FormatInt(q.ID, 10)+"/save", quantiles("0.02", "0.05", "0.15")); res.StatusCode != http.StatusSeeOther {
			t.Fatalf("save: %d %.300s", res.StatusCode, body)
		}
	}
	_, st := openRawStream(t, h.ts.URL, "/e/"+tokA+"/events")
	if st == nil {
		t.Fatal("the stream was refused")
	}
	opened := versionIn(t, st.next(t, "hello"))
	res, body := ex.get(page)
	if res.StatusCode != http.StatusOK {
		t.Fatalf("the page: %d", res.StatusCode)
	}
	for _, want := range []string{`data-live-version="` + opened + `"`, `data-live-src="/e/` + tokA + `/events"`, `data-live-page="` + page + `?drawn=1-open"`} {
		if !strings.Contains(body, want) {
			t.Errorf("the page drawn in round 1 lacks %s", want)
		}
	}
	if strings.Contains(body, "The facilitator has") {
		t.Errorf("the page as drawn says something changed")
	}

	h.post(workshopPath(ws.ID)+"/round", url.Values{"action": {"close"}, "round": {"1"}})
	_, body = ex.get(page + "?drawn=1-open")
	notice := textOf(t, body, "live-notice")
	for _, want := range []string{"The facilitator has closed round 1.", "Your answer saved on ", " stands.",
		"Anything you typed in the form and had not saved stays there, but it cannot be saved now"} {
		if !strings.Contains(notice, want) {
			t.Errorf("the round closed: the notice %q lacks %q", notice, want)
		}
	}
	if got := textOf(t, body, "save-live"); got != "Saving is closed for this round" || !strings.Contains(body, `<button type="submit" class="button" disabled>Saving is closed for this round`) {
		t.Errorf("the round closed: the save button reads %q", got)
	}
	// A form drawn in the closed round hears nothing new of it.
	if _, body := ex.get(page + "?drawn=1-closed"); textOf(t, body, "live-notice") != "" {
		t.Errorf("a form drawn closed is told %q", textOf(t, body, "live-notice"))
	}

	h.post(workshopPath(ws.ID)+"/round", url.Values{"action": {"open"}, "round": {"2"}, "reason": {"Round 2 (invented)."}})
	_, body = ex.get(page + "?drawn=1-open")
	notice = textOf(t, body, "live-notice")
	for _, want := range []string{"The facilitator has opened round 2.", "What the other experts said in round 1 can now be shown on this page, without their names.",
		"Your answer from round 1 stands unless you save a new one", "Show what the other experts said"} {
		if !strings.Contains(notice, want) {
			t.Errorf("round 2 opened: the notice %q lacks %q", notice, want)
		}
	}
	if !strings.Contains(body, `id="feedback-live" data-live data-live-offer="round-1"`) {
		t.Errorf("round 2's feedback is not marked as round 1's")
	}
	if got := textOf(t, body, "save-live"); got != "Save this answer" {
		t.Errorf("round 2 opened: the save button reads %q", got)
	}
	// A state the script never writes says nothing.
	for _, odd := range []string{"1-ajar", "0-open", "x", "101-open"} {
		res, body := ex.get(page + "?drawn=" + url.QueryEscape(odd))
		if res.StatusCode != http.StatusOK || textOf(t, body, "live-notice") != "" {
			t.Errorf("?drawn=%s: %d, notice %q", odd, res.StatusCode, textOf(t, body, "live-notice"))
		}
	}
}

// textOf is the text of the element with the given id in body (block),
// its tags removed and its spaces folded.
func textOf(t *testing.T, body, id string) string {
	t.Helper()
	b := block(body, id)
	if b == "" {
		t.Fatalf("no #%s on the page", id)
	}
	b = b[strings.Index(b, ">")+1:]
	return strings.Join(strings.Fields(regexp.MustCompile(`<[^>]*>`).ReplaceAllString(b, " ")), " ")
}

// The expert's home follows the workshop on the link's stream: it carries
// the stream, the count it opens at and its own address; the round's
// line, the questions and a workshop archived (a banner) are its live
// parts, and a link that no longer works is said in the home's words.
func TestExpertHomeFollowsTheWorkshop(t *testing.T) {
	h, ws, _, tokA, _ := expertLiveHarness(t)
	_, st := openRawStream(t, h.ts.URL, "/e/"+tokA+"/events")
	if st == nil {
		t.Fatal("the stream was refused")
	}
	opened := versionIn(t, st.next(t, "hello"))
	ex := newHarnessClient(h)
	home := "/e/" + tokA + "/"
	_, body := ex.get(home)
	for _, want := range []string{`data-live-src="/e/` + tokA + `/events"`, `data-live-version="` + opened + `"`, `data-live-page="` + home + `"`,
		`id="home-state-live" data-live`, `id="home-questions-live" data-live`, `data-live-gone="` + expertHomeLinkGone + `"`, `/static/live.js`} {
		if !strings.Contains(body, want) {
			t.Errorf("the home lacks %s", want)
		}
	}
	if !strings.Contains(textOf(t, body, "home-questions-live"), "What share of seals fail in the first year?") {
		t.Errorf("the home's live list lacks the question")
	}
	h.post(workshopPath(ws.ID)+"/archive", url.Values{"action": {"archive"}, "archive_reason": {"Done (invented)."}})
	_, body = ex.get(home)
	if b := block(body, "home-state-live"); !strings.Contains(b, `class="banner banner-live banner-finished"`) ||
		!strings.Contains(textOf(t, body, "home-state-live"), "The facilitator has closed this workshop after round 1.") {
		t.Errorf("the archived workshop's home has no banner in its live part:\n%s", b)
	}
}

// An answer the facilitator enters for one expert reaches that expert's
// stream and no other's; a true value entered and hidden reaches nobody
// (a change then would tell the experts which questions are calibration
// questions); shown, it reaches every expert.
func TestExpertStreamHearsItsOwnEntryAndTheTrueValueShown(t *testing.T) {
	h, ws, q, tokA, tokB := expertLiveHarness(t)
	if res, body := h.post(workshopPath(ws.ID)+"/questions", url.Values{"wording": {"What share of the invented audit's seals leaked?"}, "quantity": {"share leaking"},
		"lower": {"0"}, "upper": {"1"}, "format": {"quantiles"}, "preset": {"p05_50_95"}, "calibration": {"on"}, "true_value": {"0.3"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("a calibration question: %d %.300s", res.StatusCode, body)
	}
	qs, err := h.db.Questions(context.Background(), ws.ID)
	if err != nil {
		t.Fatal(err)
	}
	seed := qs[len(qs)-1]
	_, a := openRawStream(t, h.ts.URL, "/e/"+tokA+"/events")
	_, b := openRawStream(t, h.ts.URL, "/e/"+tokB+"/events")
	if a == nil || b == nil {
		t.Fatal("a stream was refused")
	}
	va, vb := versionIn(t, a.next(t, "hello A")), versionIn(t, b.next(t, "hello B"))
	// changed waits for st's next event that moves its count from v,
	// failing when beats say it stays; still checks two beats say it did.
	changed := func(st *rawStream, v, what string) string {
		t.Helper()
		for i := 0; i < 20; i++ {
			if got := versionIn(t, st.next(t, what)); got != v {
				return got
			}
		}
		t.Fatalf("%s: the count stayed at %s", what, v)
		return ""
	}
	still := func(st *rawStream, v, what string) {
		t.Helper()
		for i := 0; i < 2; i++ {
			ev := st.next(t, what)
			if got := versionIn(t, ev); ev.Kind != "beat" || got != v {
				t.Fatalf("%s: %s %s, the count was %s", what, ev.Kind, got, v)
			}
		}
	}
	es, err := h.db.Experts(context.Background(), ws.ID)
	if err != nil {
		t.Fatal(err)
	}
	qp := workshopPath(ws.ID) + "/q/" + strconv.FormatInt(q.ID, 10)
	entry := quantiles("0.02", "0.05", "0.2")
	entry.Set("channel", "paper_form")
	if res, body := h.post(qp+"/enter/"+strconv.FormatInt(es[0].ID, 10)+"/save", entry); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("enter for A: %d %.300s", res.StatusCode, body)
	}
	va = changed(a, va, "an answer entered for A, on A's stream")
	still(b, vb, "an answer entered for A, on B's stream")

	cal := workshopPath(ws.ID) + "/calibration/q/" + strconv.FormatInt(seed.ID, 10)
	if res, body := h.post(cal, url.Values{"true_value": {"0.04"}, "reason": {"Known from the invented audit."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("enter a hidden true value: %d %.300s", res.StatusCode, body)
	}
	still(a, va, "a hidden true value, on A's stream")
	still(b, vb, "a hidden true value, on B's stream")
	if res, body := h.post(cal, url.Values{"true_value": {"0.04"}, "reveal": {"on"}, "reason": {"Shown to the panel (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("show the true value: %d %.300s", res.StatusCode, body)
	}
	changed(a, va, "the true value shown, on A's stream")
	changed(b, vb, "the true value shown, on B's stream")
}

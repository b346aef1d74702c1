package e2e

import (
	"context"
	"errors"
	"fmt"
	"net/http"
	"net/url"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/cdproto/cdp"
	"github.com/chromedp/cdproto/fetch"
	"github.com/chromedp/cdproto/network"
	"github.com/chromedp/cdproto/page"
	"github.com/chromedp/chromedp"

	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/web"
)

// TestLivePageCatchesAChangeBeforeItsStreamOpened: a change saved after
// the server read a live page but before the page's stream opened (its
// script still loading, the room view just moved to the next question by
// a key, a tab joining the browser's shared stream) was published to
// nobody, and the page showed the panel without it until some later
// change: the projector said "3 of 4 experts have answered" after the
// fourth had. The page's script is held back here while an expert saves.
func TestLivePageCatchesAChangeBeforeItsStreamOpened(t *testing.T) {
	site, d := startDemo(t)
	q1 := strconv.FormatInt(d.qs[0].ID, 10)
	fac := signedInFacilitator(t, site)
	fac.viewport(1366, 768, false)

	// The projector's only tab: its stream is the browser's first.
	fac.openHoldingLiveScript(d.url+"/q/"+q1+"/room", func() {
		priyaSaves(t, site, d, "0.02", "0.05", "0.12")
	})
	if err := fac.poll(liveWithin+3*time.Second, `document.body.innerText.includes("4 of 4 experts have answered this question in round 1 so far.")`); err != nil {
		t.Fatalf("the room view did not show the save made before its stream opened: %v; it shows:\n%s", err, clip(fac.text(), 1500))
	}

	// A second tab joins the stream the projector's tab holds.
	fac.liveConnected("the room's stream")
	overview := fac.tab("overview")
	overview.viewport(1366, 900, false)
	overview.openHoldingLiveScript(d.url+"/", func() {
		priyaSaves(t, site, d, "0.02", "0.06", "0.13")
	})
	cell := `(() => { const row = Array.from(document.querySelectorAll("#answered tbody tr")).find(r => r.innerText.startsWith("Priya Raman")); return row ? row.cells[1].innerText : "<no row>"; })()`
	if err := overview.poll(liveWithin+3*time.Second, cell+` === "answered (2 saves)"`); err != nil {
		t.Fatalf("the overview did not show the save made before it joined the stream: %v (Priya's cell reads %q)", err, eval[string](overview, "cell", cell))
	}
}

// priyaSaves posts Priya's answer to the demo's question 1, as her page
// would.
func priyaSaves(t *testing.T, site *site, d demo, values ...string) {
	t.Helper()
	priyaSavesTo(t, site, d, d.qs[0], values...)
}

// priyaSavesTo posts Priya's answer to q.
func priyaSavesTo(t *testing.T, site *site, d demo, q workshop.Question, values ...string) {
	t.Helper()
	priyaSavesWith(t, site, d, q, "Line audits (invented).", values...)
}

// priyaSavesWith posts Priya's answer to q with the reason given.
func priyaSavesWith(t *testing.T, site *site, d demo, q workshop.Question, reason string, values ...string) {
	t.Helper()
	form := url.Values{"reason": {reason}}
	for i, v := range values {
		form.Set("values["+strconv.Itoa(i)+"]", v)
	}
	req, _ := http.NewRequest(http.MethodPost, site.URL+linkOf(t, d.links, "Priya Raman")+"q/"+strconv.FormatInt(q.ID, 10)+"/save",
		strings.NewReader(form.Encode()))
	req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
	req.Header.Set("Origin", site.URL)
	res, err := http.DefaultClient.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	res.Body.Close()
	if res.StatusCode >= 400 {
		t.Fatalf("Priya's save: status %d", res.StatusCode)
	}
}

// pausedRequests passes on the ids of the requests the Fetch domain holds
// in p's tab (enabled by the caller), until ctx ends: up to n wait to be
// read, any more are dropped.
func (p *person) pausedRequests(ctx context.Context, n int) <-chan fetch.RequestID {
	p.t.Helper()
	paused := make(chan fetch.RequestID, n)
	if err := chromedp.Listen(ctx, func(ev any) {
		if e, ok := ev.(*fetch.EventRequestPaused); ok {
			select {
			case paused <- e.RequestID:
			default:
			}
		}
	}); err != nil {
		p.t.Fatal(err)
	}
	return paused
}

// withoutSharedWorkers takes SharedWorker away from the pages p opens from
// now on, so each opens its own live stream, whose requests Chromium can
// hold or fail (a shared worker's are not the page's).
func (p *person) withoutSharedWorkers() {
	p.t.Helper()
	p.do("a browser without shared workers", chromedp.Func(func(ctx context.Context, t *chromedp.Target) error {
		_, err := cdp.Call(ctx, t, page.AddScriptToEvaluateOnNewDocument, page.AddScriptToEvaluateOnNewDocumentParams{Source: "delete window.SharedWorker;"})
		return err
	}))
}

// openHoldingLiveScript opens address with /static/live.js held back
// until meanwhile has run: the page is read by the server, and its
// stream opens only after meanwhile.
func (p *person) openHoldingLiveScript(address string, meanwhile func()) {
	p.t.Helper()
	p.openHoldingScript(address, "live.js", meanwhile, false)
}

// openHoldingScript opens address with /static/{script} (a deferred
// script) held back until meanwhile has run, then lets it load, or fails
// its request (fail): the page as it stands, read to its end, before its
// script runs, or without it.
func (p *person) openHoldingScript(address, script string, meanwhile func(), fail bool) {
	p.t.Helper()
	ctx, cancel := context.WithCancel(p.ctx)
	defer cancel()
	paused := p.pausedRequests(ctx, 1)
	p.do("hold back "+script, chromedp.Func(func(ctx context.Context, t *chromedp.Target) error {
		if _, err := cdp.Call(ctx, t, network.Enable, network.EnableParams{}); err != nil {
			return err
		}
		if _, err := cdp.Call(ctx, t, network.SetCacheDisabled, network.SetCacheDisabledParams{CacheDisabled: true}); err != nil {
			return err
		}
		_, err := cdp.Call(ctx, t, fetch.Enable, fetch.EnableParams{Patterns: []*fetch.RequestPattern{{URLPattern: "*/static/" + script + "*", RequestStage: fetch.RequestStageRequest}}})
		return err
	}))
	p.do("start loading "+address, chromedp.Func(func(ctx context.Context, t *chromedp.Target) error {
		res, err := cdp.Call(ctx, t, page.Navigate, page.NavigateParams{URL: address})
		if err == nil && res.ErrorText != "" {
			return errors.New(res.ErrorText)
		}
		return err
	}))
	var id fetch.RequestID
	select {
	case id = <-paused:
	case <-time.After(stepTimeout):
		p.t.Fatalf("%s: %s was never requested", p.name, script)
	}
	// The page's scripts are deferred and asked for from its head, before
	// its body is read: meanwhile sees the page read to its end (a room
	// test read the side column before it was there, under load in CI).
	p.waitFor("the page read to its end", `document.readyState !== "loading"`)
	meanwhile()
	p.do("let "+script+" load or fail", chromedp.Func(func(ctx context.Context, t *chromedp.Target) error {
		var err error
		if fail {
			_, err = cdp.Call(ctx, t, fetch.FailRequest, fetch.FailRequestParams{RequestID: id, ErrorReason: network.ErrorReasonFailed})
		} else {
			_, err = cdp.Call(ctx, t, fetch.ContinueRequest, fetch.ContinueRequestParams{RequestID: id})
		}
		if err != nil {
			return err
		}
		_, err = cdp.Call(ctx, t, fetch.Disable, cdp.Empty{})
		return err
	}))
	p.waitFor("the page to load", `document.readyState === "complete"`)
}

// TestLivePageFollowsAfterARefusedForm: a page shown again after a
// refused form (the weights set without a reason, a round opened without
// one) stands at the form's address, and its script fetched that address
// on each change: a GET there answers 405, so the panel and the overview
// stood still while they said they followed new answers. They follow
// their own address now.
func TestLivePageFollowsAfterARefusedForm(t *testing.T) {
	site, d, fac := facilitatorOnDemo(t)
	fac.viewport(1366, 900, false)
	panel := d.url + "/q/" + strconv.FormatInt(d.qs[0].ID, 10)
	fac.open(panel)
	if st := fac.load("set weights without a reason", chromedp.Click(chromedp.CSS(`form[action$="/weights"] button[type=submit]`))); st != http.StatusUnprocessableEntity {
		t.Fatalf("weights without a reason: %d, want 422", st)
	}
	if u := fac.url(); !strings.HasSuffix(u, "/weights") {
		t.Fatalf("the refused form's page stands at %s", u)
	}
	fac.liveConnected("the live stream to connect")
	priyaSaves(t, site, d, "0.02", "0.05", "0.12")
	listed := `Array.from(document.querySelectorAll("#reasons li")).some(li => li.innerText.includes("Line audits (invented)."))`
	if err := fac.poll(liveWithin, listed); err != nil {
		t.Errorf("the panel shown again after a refused form did not list Priya's new reason within %v: %v", liveWithin, err)
	}
	fac.sees("the refused form, still there", "Nothing was saved")
}

// TestLivePageResumesAfterSigningInAgain: the projector's room view, left
// open while the facilitator's session ended (signed out, or its twelve
// hours up), was refused its stream (404) and never asked again: signed
// in anew in another tab, the facilitator found the room view standing
// still until it was reloaded by hand, and the panel beside it still said
// it followed new answers. A refused stream is asked for again every few
// seconds, a page's status line says meanwhile that it does not follow
// changes, and the pages follow again once the facilitator is signed in:
// with the browser's shared stream, and with a stream per page (a
// browser without shared workers).
func TestLivePageResumesAfterSigningInAgain(t *testing.T) {
	site, d := startDemo(t)
	br := startBrowser(t)
	shots := newScreenshots(t)
	for _, mode := range []string{"shared", "direct"} {
		fac := br.person("facilitator, " + mode + " stream")
		signInAnew(t, site, fac)
		panel := fac.tab("the panel, " + mode + " stream")
		for _, p := range []*person{fac, panel} {
			p.viewport(1366, 768, false)
			if mode == "direct" {
				p.withoutSharedWorkers()
			}
		}
		q := d.qs[0]
		fac.open(d.url + "/q/" + strconv.FormatInt(q.ID, 10) + "/room")
		panel.open(d.url + "/q/" + strconv.FormatInt(q.ID, 10))
		for _, p := range []*person{fac, panel} {
			p.liveConnected("the stream")
		}
		fac.postFromPage("/signout", "")
		// The next change ends the stream of a session that has ended;
		// asked for again, it is refused.
		priyaSavesTo(t, site, d, q, "0.02", "0.05", "0.12")
		for _, p := range []*person{fac, panel} {
			p.waitFor("the stream refused", `document.documentElement.getAttribute("data-live") === "stopped"`)
		}
		panel.sees("the panel whose stream was refused", "Not following the workshop since ")
		shots.part(panel, "p.live-status", "live-stopped-panel-"+mode)
		signInAnew(t, site, fac.tab("signing in again"))
		updated := eval[string](fac, "the room's last update", `String(document.documentElement.getAttribute("data-live-updated"))`)
		priyaSavesTo(t, site, d, q, "0.02", "0.06", "0.13")
		followed := fmt.Sprintf(`document.body.innerText.includes("4 of 4 experts have answered this question in round 1 so far.") && String(document.documentElement.getAttribute("data-live-updated")) !== %q`, updated)
		if err := fac.poll(liveWithin+liveRetry, followed); err != nil {
			t.Fatalf("%s stream: the room view did not follow again within %v of signing in: %v (the stream is %q)", mode, liveWithin+liveRetry, err,
				eval[string](fac, "the stream's state", `String(document.documentElement.getAttribute("data-live"))`))
		}
		if err := panel.poll(liveWithin+liveRetry, `document.documentElement.getAttribute("data-live") === "connected" && !document.getElementById("live-stopped")`); err != nil {
			t.Errorf("%s stream: the panel still says it does not follow changes: %v", mode, err)
		}
	}
}

// signInAnew signs p in with a new sign-in address of its own
// (IssueFacilitatorSecret).
func signInAnew(t *testing.T, site *site, p *person) {
	t.Helper()
	secret, err := web.IssueFacilitatorSecret(context.Background(), site.DB)
	if err != nil {
		t.Fatal(err)
	}
	p.open(site.URL + web.SignInPath(secret))
	p.do("wait for the workshop list after sign-in", chromedp.WaitVisible(chromedp.CSS(`form[action="/workshops"]`)))
}

// liveRetry is how long a page waits before asking again for a stream
// that was refused (live.js, live-worker.js).
const liveRetry = 5 * time.Second

// TestLivePageFetchesAgainAfterAFailedFetch: the room view fetches itself
// on a change; a fetch that failed (the server busy or restarting, the
// network dropped) left it as it was until some later change, and one
// that hung (a connection left dead by a laptop's sleep) kept every later
// change from fetching it at all. A failed fetch is tried again, and a
// hung one given up and tried again.
func TestLivePageFetchesAgainAfterAFailedFetch(t *testing.T) {
	site, d, fac, paused, call := roomWithFetchesCaught(t)
	next := func(what string, within time.Duration) fetch.RequestID {
		select {
		case id := <-paused:
			return id
		case <-time.After(within):
			t.Fatalf("%s: the room view did not fetch itself within %v", what, within)
		}
		return ""
	}
	priyaSaves(t, site, d, "0.02", "0.05", "0.12")
	// The first fetch fails.
	id := next("after Priya's save", liveWithin)
	call("the fetch fails", func(ctx context.Context, t *chromedp.Target) error {
		_, err := cdp.Call(ctx, t, fetch.FailRequest, fetch.FailRequestParams{RequestID: id, ErrorReason: network.ErrorReasonConnectionReset})
		return err
	})
	// The next hangs: it is never answered.
	next("after a failed fetch", 5*time.Second)
	// Given up, it is tried again; this one goes through.
	id = next("after a fetch that hung", 25*time.Second)
	call("the fetch goes through", func(ctx context.Context, t *chromedp.Target) error {
		if _, err := cdp.Call(ctx, t, fetch.ContinueRequest, fetch.ContinueRequestParams{RequestID: id}); err != nil {
			return err
		}
		_, err := cdp.Call(ctx, t, fetch.Disable, cdp.Empty{})
		return err
	})
	if err := fac.poll(liveWithin, `document.body.innerText.includes("4 of 4 experts have answered this question in round 1 so far.")`); err != nil {
		t.Fatalf("the room view did not show Priya's save after its fetches failed: %v", err)
	}
}

// TestOverviewRosterFollowsALiveSave: after an expert's save the
// overview's table of who answered what followed it, and the panel's
// roster under it still said "3 of 6 have a current answer" beside a row
// of four answers: one screen, two counts.
func TestOverviewRosterFollowsALiveSave(t *testing.T) {
	site, d, fac := facilitatorOnDemo(t)
	fac.viewport(1366, 900, false)
	fac.open(d.url + "/")
	fac.liveConnected("the overview's stream")
	count := `(() => { const row = Array.from(document.querySelectorAll("table.table-roster tbody tr")).find(r => r.innerText.startsWith("Priya Raman")); return row ? row.querySelector('td[data-label="Answers"]').innerText : "<no row>"; })()`
	if got := eval[string](fac, "Priya's count before", count); got != "3 of 6 have a current answer" {
		t.Fatalf("Priya's roster line reads %q before her save", got)
	}
	priyaSaves(t, site, d, "0.02", "0.05", "0.12")
	if err := fac.poll(liveWithin, count+` === "4 of 6 have a current answer"`); err != nil {
		t.Errorf("the roster did not follow Priya's save within %v: it reads %q", liveWithin, eval[string](fac, "Priya's count", count))
	}
}

// TestLivePageCutsItsWaitShortOnAChange: fetches of the room view that
// failed (the server restarting) are tried again ever later, up to a
// minute apart; a change heard meanwhile waited for the next try, so the
// projector stood a minute behind the room after the server came back,
// while it said it was connected. A change cuts the wait short.
func TestLivePageCutsItsWaitShortOnAChange(t *testing.T) {
	site, d, fac, paused, call := roomWithFetchesCaught(t)
	priyaSaves(t, site, d, "0.02", "0.05", "0.12")
	// Three fetches fail, 2 s and 4 s apart; the next waits 8 s.
	for i, within := range []time.Duration{liveWithin, 5 * time.Second, 8 * time.Second} {
		var id fetch.RequestID
		select {
		case id = <-paused:
		case <-time.After(within):
			t.Fatalf("fetch %d: the room view did not fetch itself within %v", i+1, within)
		}
		call("the fetch fails", func(ctx context.Context, t *chromedp.Target) error {
			_, err := cdp.Call(ctx, t, fetch.FailRequest, fetch.FailRequestParams{RequestID: id, ErrorReason: network.ErrorReasonConnectionRefused})
			return err
		})
	}
	call("the server is back", func(ctx context.Context, t *chromedp.Target) error {
		_, err := cdp.Call(ctx, t, fetch.Disable, cdp.Empty{})
		return err
	})
	priyaSaves(t, site, d, "0.02", "0.06", "0.13")
	if err := fac.poll(liveWithin, `document.body.innerText.includes("4 of 4 experts have answered this question in round 1 so far.")`); err != nil {
		t.Fatalf("the room view did not follow a change within %v of it while a failed fetch waited: %v", liveWithin, err)
	}
}

// roomWithFetchesCaught opens the invented demo's first question's room
// view at 1366×768, signed in and its stream connected, with Chromium
// holding the room's fetches of itself: each held fetch's id arrives on
// paused, for call to fail, continue or leave hanging (call runs a
// command of Chromium's in the facilitator's tab).
func roomWithFetchesCaught(t *testing.T) (*site, demo, *person, <-chan fetch.RequestID, func(string, func(context.Context, *chromedp.Target) error)) {
	t.Helper()
	site, d, fac := facilitatorOnDemo(t)
	fac.viewport(1366, 768, false)
	room := d.url + "/q/" + strconv.FormatInt(d.qs[0].ID, 10) + "/room"
	fac.open(room)
	fac.liveConnected("the room's stream")

	ctx, cancel := context.WithCancel(fac.ctx)
	t.Cleanup(cancel)
	paused := fac.pausedRequests(ctx, 8)
	call := func(what string, f func(ctx context.Context, t *chromedp.Target) error) {
		fac.do(what, chromedp.Func(f))
	}
	call("catch the room's fetches of itself", func(ctx context.Context, t *chromedp.Target) error {
		_, err := cdp.Call(ctx, t, fetch.Enable, fetch.EnableParams{Patterns: []*fetch.RequestPattern{{URLPattern: "*/q/" + strconv.FormatInt(d.qs[0].ID, 10) + "/room", RequestStage: fetch.RequestStageRequest}}})
		return err
	})
	return site, d, fac, paused, call
}

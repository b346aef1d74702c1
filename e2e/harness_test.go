package e2e

import (
	"context"
	"errors"
	"fmt"
	"net"
	"net/http"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/chromedp/cdproto/cdp"
	"github.com/chromedp/cdproto/emulation"
	"github.com/chromedp/cdproto/input"
	"github.com/chromedp/cdproto/runtime"
	"github.com/chromedp/chromedp"

	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/internal/browsertest"
	"github.com/parley-elicit/parley/store"
	"github.com/parley-elicit/parley/web"
)

// Time limits. Every browser step runs under stepTimeout so a broken page
// fails the test instead of hanging it; the whole browser lives under
// browserTimeout.
const (
	stepTimeout    = 15 * time.Second
	browserTimeout = 150 * time.Second
)

// Widths of the screenshots: a laptop on a projector and a phone.
const (
	desktopWidth  = 1280
	desktopHeight = 900
	phoneWidth    = 390
	phoneHeight   = 844
)

// site is Parley running for one test: the real server on a loopback
// listener over a real SQLite file.
type site struct {
	URL    string    // "http://127.0.0.1:PORT"
	DB     *store.DB // the same file the server writes, for the test's own reads
	SignIn string    // the facilitator's one-time sign-in address
}

// demo is the invented demo workshop (web.SeedDemo) as seeded on a site:
// the experts' links, the workshop, its questions and experts, and its
// address (no trailing slash).
type demo struct {
	links   []web.DemoLink
	w       workshop.Workshop
	qs      []workshop.Question
	experts []workshop.Expert
	url     string
}

// startDemo starts a site and seeds the invented demo workshop on it.
func startDemo(t *testing.T) (*site, demo) {
	t.Helper()
	return startDemoWith(t, web.Options{})
}

// startDemoWith is startDemo with the server's options (a shorter
// heartbeat, say).
func startDemoWith(t *testing.T, opt web.Options) (*site, demo) {
	t.Helper()
	s := startSiteWith(t, opt)
	ctx := context.Background()
	links, err := web.SeedDemo(ctx, s.DB)
	if err != nil {
		t.Fatalf("seed demo: %v", err)
	}
	wss, err := s.DB.Workshops(ctx)
	if err != nil || len(wss) != 1 {
		t.Fatalf("demo workshops %v, %v", wss, err)
	}
	d := demo{links: links, w: wss[0], url: s.URL + "/w/" + strconv.FormatInt(wss[0].ID, 10)}
	if d.qs, err = s.DB.Questions(ctx, d.w.ID); err != nil {
		t.Fatal(err)
	}
	if d.experts, err = s.DB.Experts(ctx, d.w.ID); err != nil {
		t.Fatal(err)
	}
	return s, d
}

// facilitatorOnDemo starts the invented demo workshop on a loopback
// server and a headless browser, and signs the facilitator in: the set-up
// of most tests of the facilitator's pages.
func facilitatorOnDemo(t *testing.T) (*site, demo, *person) {
	t.Helper()
	s, d := startDemo(t)
	return s, d, signedInFacilitator(t, s)
}

// demoRoomAfterRoundOne is facilitatorOnDemo with the demo's round 1
// closed through the overview's form, and the address of question 1's
// room view, which then shows the panel as round 1 closed.
func demoRoomAfterRoundOne(t *testing.T) (*site, demo, *person, string) {
	t.Helper()
	s, d, fac := facilitatorOnDemo(t)
	fac.open(d.url + "/")
	fac.postFromPage(d.url+"/round", "action=close")
	return s, d, fac, d.url + "/q/" + strconv.FormatInt(d.qs[0].ID, 10) + "/room"
}

// scriptsOff turns scripts off in p's tab: the page as a browser without
// script shows it.
func (p *person) scriptsOff() {
	p.t.Helper()
	p.do("turn scripts off", chromedp.Func(func(ctx context.Context, tg *chromedp.Target) error {
		_, err := cdp.Call(ctx, tg, emulation.SetScriptExecutionDisabled, emulation.SetScriptExecutionDisabledParams{Value: true})
		return err
	}))
}

// signedInFacilitator starts a headless browser and signs the facilitator
// in to s, in a browser context of their own.
func signedInFacilitator(t *testing.T, s *site) *person {
	t.Helper()
	fac := startBrowser(t).person("facilitator")
	signIn(t, s, fac)
	return fac
}

// startSite opens a new database in a temp dir, issues the facilitator
// secret the way `parley serve` does, and serves it on 127.0.0.1:0.
func startSite(t *testing.T) *site {
	t.Helper()
	return startSiteWith(t, web.Options{})
}

// startSiteWith is startSite with the server's options.
func startSiteWith(t *testing.T, opt web.Options) *site {
	t.Helper()
	db, err := store.Open(filepath.Join(t.TempDir(), "parley.db"))
	if err != nil {
		t.Fatalf("open store: %v", err)
	}
	secret, err := web.EnsureFacilitatorSecret(context.Background(), db)
	if err != nil || secret == "" {
		t.Fatalf("facilitator secret: %q, %v", secret, err)
	}
	srv, err := web.New(db, opt)
	if err != nil {
		t.Fatalf("web.New: %v", err)
	}
	ln, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Fatalf("listen: %v", err)
	}
	hs := &http.Server{Handler: srv.Handler(), ReadHeaderTimeout: 5 * time.Second}
	done := make(chan error, 1)
	go func() { done <- hs.Serve(ln) }()
	t.Cleanup(func() {
		_ = hs.Close()
		if err := <-done; err != nil && !errors.Is(err, http.ErrServerClosed) {
			t.Errorf("serve: %v", err)
		}
		_ = db.Close()
	})
	base := "http://" + ln.Addr().String()
	return &site{URL: base, DB: db, SignIn: base + web.SignInPath(secret)}
}

// browser is one headless Chromium; each person gets their own browser
// context inside it (own cookies, own storage), like separate devices.
type browser struct {
	t    *testing.T
	root context.Context
}

// startBrowser starts chromium (internal/browsertest). It skips the
// test, loudly, when chromium is missing.
func startBrowser(t *testing.T) *browser {
	t.Helper()
	return startBrowserFor(t, browserTimeout)
}

// startBrowserFor is startBrowser for a test that walks many pages, whose
// browser may live longer; each step keeps stepTimeout, which is what
// stops a hung page.
func startBrowserFor(t *testing.T, life time.Duration) *browser {
	t.Helper()
	return &browser{t: t, root: browsertest.Start(t, life, desktopWidth, desktopHeight)}
}

// person is one participant's browser context and tab.
type person struct {
	t    *testing.T
	name string
	ctx  context.Context

	mu     sync.Mutex
	thrown []string // uncaught script errors seen on this person's pages
}

// person opens a new browser context for name.
func (b *browser) person(name string) *person {
	b.t.Helper()
	ctx, cancel := chromedp.NewContext(b.root, chromedp.WithNewBrowserContext())
	b.t.Cleanup(cancel)
	return newPerson(b.t, name, ctx)
}

// tab opens another tab in p's browser context, with p's cookies: the
// facilitator's second window, for the projector.
func (p *person) tab(name string) *person {
	p.t.Helper()
	ctx, cancel := chromedp.NewContext(p.ctx)
	p.t.Cleanup(cancel)
	return newPerson(p.t, name, ctx)
}

func newPerson(t *testing.T, name string, ctx context.Context) *person {
	b := struct{ t *testing.T }{t}
	p := &person{t: t, name: name, ctx: ctx}
	// The first run opens the tab; it must not carry a step timeout.
	if err := chromedp.Do(ctx, chromedp.Navigate("about:blank")); err != nil {
		b.t.Fatalf("%s: open tab: %v", name, err)
	}
	if err := chromedp.Listen(ctx, func(ev any) {
		if e, ok := ev.(*runtime.EventExceptionThrown); ok {
			p.mu.Lock()
			d := e.ExceptionDetails
			msg := fmt.Sprintf("%s (%s:%d)", d.Text, d.URL, d.LineNumber+1)
			if d.Exception != nil && d.Exception.Description != "" {
				msg = d.Exception.Description + " " + msg
			}
			p.thrown = append(p.thrown, msg)
			p.mu.Unlock()
		}
	}); err != nil {
		b.t.Fatalf("%s: listen: %v", name, err)
	}
	return p
}

// do runs steps in this person's tab under the step timeout.
func (p *person) do(what string, steps ...chromedp.Action[chromedp.Void]) {
	p.t.Helper()
	ctx, cancel := context.WithTimeout(p.ctx, stepTimeout)
	defer cancel()
	defer p.slow(what, time.Now())
	if err := chromedp.Do(ctx, steps...); err != nil {
		p.t.Fatalf("%s: %s: %v", p.name, what, err)
	}
	p.noScriptErrors(what)
}

// load runs a step that makes the page navigate (a link, a form's submit
// button) and waits for the new page; it returns the HTTP status.
func (p *person) load(what string, step chromedp.Action[chromedp.Void]) int64 {
	p.t.Helper()
	ctx, cancel := context.WithTimeout(p.ctx, stepTimeout)
	defer cancel()
	defer p.slow(what, time.Now())
	resp, err := chromedp.RunResponse(ctx, step)
	if err != nil {
		p.t.Fatalf("%s: %s: %v", p.name, what, err)
	}
	p.noScriptErrors(what)
	if resp == nil {
		p.t.Fatalf("%s: %s: no page loaded", p.name, what)
	}
	p.noBrokenNumbers(what)
	return resp.Status
}

// brokenOnScreen matches what must never reach a person: numbers that
// are not numbers, and Go's panic output.
var brokenOnScreen = regexp.MustCompile(`\bNaN\b|[+-]?Inf\b|goroutine \d+ \[|panic:|runtime error`)

// noBrokenNumbers fails when the page shows NaN, an infinity or a stack
// trace.
func (p *person) noBrokenNumbers(after string) {
	p.t.Helper()
	if m := brokenOnScreen.FindString(p.text()); m != "" {
		p.t.Errorf("%s: after %s the page shows %q", p.name, after, m)
	}
}

// media switches the tab's CSS media type ("print", or "" for screen).
func (p *person) media(kind string) {
	p.t.Helper()
	p.do("emulate "+kind+" media", chromedp.Func(func(ctx context.Context, t *chromedp.Target) error {
		_, err := cdp.Call(ctx, t, emulation.SetEmulatedMedia, emulation.SetEmulatedMediaParams{Media: kind})
		return err
	}))
}

// visible reports whether the first element matching css is rendered.
func (p *person) visible(css string) bool {
	p.t.Helper()
	return eval[bool](p, "is "+css+" visible", fmt.Sprintf(
		`(() => { const e = document.querySelector(%q); return !!e && e.getClientRects().length > 0 && getComputedStyle(e).visibility !== "hidden"; })()`, css))
}

// open navigates to url and returns the status.
func (p *person) open(url string) int64 {
	p.t.Helper()
	return p.load("open "+url, chromedp.Navigate(url))
}

// eval evaluates a script expression in the page and decodes its value.
func eval[T any](p *person, what, expr string) T {
	p.t.Helper()
	return evalWithin[T](p, what, expr, stepTimeout)
}

// evalWithin is eval with its own time limit, for a step that is heavy
// by nature (axe-core's half-megabyte script and its run over a page),
// which a loaded machine can slow past stepTimeout.
func evalWithin[T any](p *person, what, expr string, limit time.Duration) T {
	p.t.Helper()
	ctx, cancel := context.WithTimeout(p.ctx, limit)
	defer cancel()
	v, err := chromedp.Run(ctx, chromedp.Evaluate[T](expr, chromedp.EvalAwaitPromise))
	if err != nil {
		p.t.Fatalf("%s: %s: %v", p.name, what, err)
	}
	return v
}

// text is what a person reads on the page: the body's rendered text.
func (p *person) text() string {
	p.t.Helper()
	// A page that is still loading (after a script's form post) has no
	// body yet; wait for it. A navigation that a script started commits
	// while it is read (the sign-in page's post, under a loaded machine),
	// and the page's context goes with it: read the next page then.
	const read = `new Promise(resolve => {
		const read = () => document.readyState === "complete" && document.body ? resolve(document.body.innerText) : setTimeout(read, 20);
		read();
	})`
	ctx, cancel := context.WithTimeout(p.ctx, stepTimeout)
	defer cancel()
	for {
		v, err := chromedp.Run(ctx, chromedp.Evaluate[string](read, chromedp.EvalAwaitPromise))
		switch {
		case err == nil:
			return v
		case ctx.Err() == nil && navigatedAway(err):
			time.Sleep(50 * time.Millisecond)
		default:
			p.t.Fatalf("%s: read the page: %v", p.name, err)
		}
	}
}

// navigatedAway says err is an evaluation cut short by the page going
// away under it (a navigation committed meanwhile), not a fault of the
// page or the script.
func navigatedAway(err error) bool {
	m := err.Error()
	return strings.Contains(m, "navigated or closed") || strings.Contains(m, "context was destroyed") || strings.Contains(m, "Cannot find context")
}

// url is the address in this person's address bar.
func (p *person) url() string {
	p.t.Helper()
	return eval[string](p, "read the address", `location.href`)
}

// sees fails the test unless every phrase is in the page's visible text.
func (p *person) sees(where string, phrases ...string) {
	p.t.Helper()
	body := p.text()
	for _, s := range phrases {
		if !strings.Contains(body, s) {
			p.t.Errorf("%s: %s: page does not show %q; it shows:\n%s", p.name, where, s, clip(body, 3000))
		}
	}
}

// typedLength is the longest value fill types key by key.
const typedLength = 12

// fill replaces the value of the form field named name inside the form
// matched by formSel, typing it as a person would (so input events fire).
func (p *person) fill(formSel, name, value string) {
	p.t.Helper()
	css := fmt.Sprintf(`%s [name=%q]`, formSel, name)
	if n := eval[int](p, "clear "+name, fmt.Sprintf(
		`(() => { const el = document.querySelector(%q); if (!el) return 0; el.value = ""; return 1; })()`, css)); n != 1 {
		p.t.Fatalf("%s: no field %s on %s", p.name, css, p.url())
	}
	if len(value) <= typedLength {
		p.do("type "+name, chromedp.SendKeys(chromedp.CSS(css), value))
		return
	}
	// Longer text arrives as one input, the way a paste or a phone's
	// keyboard suggestion does; key by key it costs seconds per field.
	p.do("enter "+name, chromedp.Focus(chromedp.CSS(css)), chromedp.Func(func(ctx context.Context, t *chromedp.Target) error {
		_, err := cdp.Call(ctx, t, input.InsertText, input.InsertTextParams{Text: value})
		return err
	}))
}

// count is the number of elements matching a CSS selector.
func (p *person) count(css string) int {
	p.t.Helper()
	return eval[int](p, "count "+css, fmt.Sprintf(`document.querySelectorAll(%q).length`, css))
}

// point is the drawn position of an SVG circle.
type point struct {
	X float64 `json:"x"`
	Y float64 `json:"y"`
}

// circles reads the positions of the circles matching css, in the SVG's
// own coordinates.
func (p *person) circles(css string) []point {
	p.t.Helper()
	return eval[[]point](p, "read "+css, fmt.Sprintf(
		`Array.from(document.querySelectorAll(%q)).map(c => ({x: parseFloat(c.getAttribute("cx")), y: parseFloat(c.getAttribute("cy"))}))`, css))
}

// slowStep is how long a step may take before the log says so, to find
// what makes the run slow.
const slowStep = 2 * time.Second

func (p *person) slow(what string, start time.Time) {
	if d := time.Since(start); d > slowStep {
		p.t.Logf("%s: %s took %v", p.name, what, d.Round(time.Millisecond))
	}
}

// noScriptErrors fails when a page script threw.
func (p *person) noScriptErrors(after string) {
	p.t.Helper()
	p.mu.Lock()
	thrown := p.thrown
	p.thrown = nil
	p.mu.Unlock()
	for _, e := range thrown {
		p.t.Errorf("%s: after %s: page script threw: %s", p.name, after, e)
	}
}

// viewport sets the tab's width and height (CSS pixels).
func (p *person) viewport(w, h int64, mobile bool) {
	p.t.Helper()
	var opts []chromedp.EmulateViewportOption
	if mobile {
		opts = append(opts, chromedp.EmulateMobile, chromedp.EmulateTouch)
	}
	p.do("set the viewport", chromedp.EmulateViewport(w, h, opts...))
}

// screenshots is where the scenario's full-page PNGs go.
type screenshots struct {
	t   *testing.T
	dir string
}

// newScreenshots uses $PARLEY_SCREENSHOTS when set (kept), else a temp
// folder; either way the path is logged.
func newScreenshots(t *testing.T) *screenshots {
	t.Helper()
	dir := os.Getenv("PARLEY_SCREENSHOTS")
	if dir == "" {
		dir = t.TempDir()
	} else if err := os.MkdirAll(dir, 0o755); err != nil {
		t.Fatalf("screenshot folder: %v", err)
	}
	t.Logf("screenshots of the main pages go to %s", dir)
	return &screenshots{t: t, dir: dir}
}

// take writes a full-page PNG of p's current page as name.png.
func (s *screenshots) take(p *person, name string) {
	s.t.Helper()
	ctx, cancel := context.WithTimeout(p.ctx, stepTimeout)
	defer cancel()
	png, err := chromedp.Run(ctx, chromedp.FullScreenshot(100))
	if err != nil {
		s.t.Fatalf("%s: screenshot %s: %v", p.name, name, err)
	}
	path := filepath.Join(s.dir, name+".png")
	if err := os.WriteFile(path, png, 0o644); err != nil {
		s.t.Fatalf("write %s: %v", path, err)
	}
}

// part writes a PNG of the first element sel matches on p's page as
// name.png: a table or a card to look at closely, where the full page is
// many screens tall.
func (s *screenshots) part(p *person, sel, name string) {
	s.t.Helper()
	ctx, cancel := context.WithTimeout(p.ctx, stepTimeout)
	defer cancel()
	png, err := chromedp.Run(ctx, chromedp.Screenshot(chromedp.CSS(sel)))
	if err != nil {
		s.t.Fatalf("%s: screenshot %s of %s: %v", p.name, name, sel, err)
	}
	path := filepath.Join(s.dir, name+".png")
	if err := os.WriteFile(path, png, 0o644); err != nil {
		s.t.Fatalf("write %s: %v", path, err)
	}
}

// expertLink matches an expert's private link as the roster prints it.
var expertLink = regexp.MustCompile(`https?://127\.0\.0\.1:\d+/e/[A-Za-z0-9_-]{43}/`)

func clip(s string, n int) string {
	if len(s) <= n {
		return s
	}
	return s[:n] + "…"
}

// liveConnected waits until the page's live stream is open (live.js
// sets data-live="connected" on <html> when it opens); what names the
// stream in a failure.
func (p *person) liveConnected(what string) {
	p.t.Helper()
	p.waitFor(what, `document.documentElement.getAttribute("data-live") === "connected"`)
}

// waitFor waits until the script expression is truthy in the page.
func (p *person) waitFor(what, expr string) {
	p.t.Helper()
	if err := p.poll(stepTimeout, expr); err != nil {
		p.t.Fatalf("%s: wait for %s: %v\npage shows:\n%s", p.name, what, err, clip(p.text(), 2000))
	}
	p.noScriptErrors(what)
}

// poll evaluates expr every 50 ms until it is true or limit passes. A
// page that navigates in between (a script's form post) only delays it.
func (p *person) poll(limit time.Duration, expr string) error {
	ctx, cancel := context.WithTimeout(p.ctx, limit)
	defer cancel()
	var last error
	for {
		ok, err := chromedp.Run(ctx, chromedp.Evaluate[bool](expr))
		if err == nil && ok {
			return nil
		}
		if err != nil {
			last = err
		}
		select {
		case <-ctx.Done():
			if last != nil {
				return fmt.Errorf("%w (last error: %v)", ctx.Err(), last)
			}
			return ctx.Err()
		case <-time.After(50 * time.Millisecond):
		}
	}
}

// value is the current value of the form field matched by css.
func (p *person) value(css string) string {
	p.t.Helper()
	return eval[string](p, "read "+css, fmt.Sprintf(`(document.querySelector(%q) || {value: "<missing>"}).value`, css))
}

// postFromPage posts body (form-encoded) to path from the page p is on,
// as the page's own forms do (same origin, same cookies: another tab of
// the facilitator's), and fails the test on a 4xx or 5xx.
func (p *person) postFromPage(path, body string) {
	p.t.Helper()
	status := eval[int](p, "post "+path, fmt.Sprintf(
		`fetch(%q, {method: "POST", headers: {"Content-Type": "application/x-www-form-urlencoded"}, body: %q, redirect: "manual"}).then(r => r.status || 303)`,
		path, body))
	if status >= 400 {
		p.t.Fatalf("post %s: status %d", path, status)
	}
}

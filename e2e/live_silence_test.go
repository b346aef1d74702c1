package e2e

import (
	"context"
	"net"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/chromedp/cdproto/cdp"
	"github.com/chromedp/cdproto/page"
	"github.com/chromedp/chromedp"

	"github.com/parley-elicit/parley/web"
)

// TestLivePageSaysWhenItsStreamFallsSilent: a laptop that sleeps (or a
// network that drops a connection without a word) leaves the stream's
// connection dead but open: EventSource hears nothing and reports
// nothing, and the page said it followed the workshop while an expert's
// save never reached it. The server's heartbeat was an SSE comment, which
// the page's script never sees. Now it is an event the page listens for;
// after a little over two beats of silence the page says, in the room
// view's words and style, that it does not follow the workshop, opens its
// stream anew, and catches up by itself once the connection is back. The
// connections run through a proxy on loopback that the test puts to
// sleep (every open connection goes dead, and so does any new one) and
// wakes (new connections pass; the dead ones stay dead, and one the
// browser sends a request on again is reset). Both ways a page holds its
// stream: the browser's shared one (the room view) and a page's own (the
// panel, in a browser without shared workers).
func TestLivePageSaysWhenItsStreamFallsSilent(t *testing.T) {
	site, d := startDemoWith(t, web.Options{Heartbeat: time.Second})
	px := startSleepyProxy(t, strings.TrimPrefix(site.URL, "http://"))
	br := startBrowser(t)
	shots := newScreenshots(t)
	q := strconv.FormatInt(d.qs[0].ID, 10)
	via := strings.Replace(d.url, site.URL, px.url, 1)
	for i, c := range []struct {
		mode, page, notice, followed string
		width, height                int64
	}{
		{"shared", via + "/q/" + q + "/room", "if this stays, reload the page.",
			`document.body.innerText.includes("4 of 4 experts have answered this question in round 1 so far.")`, 1366, 768},
		{"direct", via + "/q/" + q, "It asks the server again every few seconds and catches up by itself",
			`Array.from(document.querySelectorAll("#reasons li")).some(li => li.innerText.includes("Audits after a silence (invented)."))`, 1366, 900},
	} {
		fac := br.person("facilitator, " + c.mode + " stream")
		signInAnew(t, site, fac) // the session's cookie is the host's, whatever its port
		fac.viewport(c.width, c.height, false)
		if c.mode == "direct" {
			fac.withoutSharedWorkers()
		}
		fac.open(c.page)
		fac.liveConnected("the stream")
		// A beat or two heard: the page knows how often they come.
		if err := fac.poll(10*time.Second, `!document.getElementById("live-stopped")`); err != nil {
			t.Fatal(err)
		}

		px.sleep()
		reason := "Line audits (invented)."
		if i == 1 {
			reason = "Audits after a silence (invented)."
		}
		priyaSavesWith(t, site, d, d.qs[0], reason, "0.02", "0.05", "0.12")
		if err := fac.poll(20*time.Second, `!!document.getElementById("live-stopped")`); err != nil {
			t.Fatalf("%s stream: the page whose connection went dead still says nothing after 20 s of silence (the stream is %q): %v\npage shows:\n%s",
				c.mode, eval[string](fac, "the stream's state", `String(document.documentElement.getAttribute("data-live"))`), err, clip(fac.text(), 1200))
		}
		fac.sees("the notice", "Not following the workshop since ")
		fac.sees("the notice", c.notice)
		if c.mode == "direct" {
			// The notice stands in place of the line saying it follows.
			if eval[bool](fac, "the usual words", `(() => { const w = document.querySelector(".live-status .live-words"); return !!w && w.getClientRects().length > 0; })()`) {
				t.Errorf("the panel says it follows new answers beside the notice that it does not")
			}
			shots.part(fac, "p.live-status", "live-silent-panel-1366")
			fac.viewport(phoneWidth, phoneHeight, true)
			shots.part(fac, "p.live-status", "live-silent-panel-390")
			fac.viewport(c.width, c.height, false)
		} else {
			shots.take(fac, "live-silent-room-1366x768")
		}

		px.wake()
		if err := fac.poll(60*time.Second, c.followed+` && document.documentElement.getAttribute("data-live") === "connected" && !document.getElementById("live-stopped")`); err != nil {
			t.Fatalf("%s stream: the page did not catch up by itself within 60 s of the connection coming back (the stream is %q): %v",
				c.mode, eval[string](fac, "the stream's state", `String(document.documentElement.getAttribute("data-live"))`), err)
		}
	}
}

// sleepyProxy forwards loopback connections to a server, and can be put
// to sleep as a laptop is: every open connection goes dead (its bytes
// are dropped both ways, and it stays open), and so does any new one.
// Woken, it forwards new connections again; the dead stay dead, and one
// the browser sends a request on again is closed, as a peer that has
// forgotten the connection resets it.
type sleepyProxy struct {
	url    string
	target string
	mu     sync.Mutex
	asleep bool
	conns  map[*proxied]struct{}
}

type proxied struct {
	client, server net.Conn
	dead           bool
}

func startSleepyProxy(t *testing.T, target string) *sleepyProxy {
	t.Helper()
	ln, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	px := &sleepyProxy{url: "http://" + ln.Addr().String(), target: target, conns: map[*proxied]struct{}{}}
	var wg sync.WaitGroup
	t.Cleanup(func() {
		ln.Close()
		px.mu.Lock()
		for c := range px.conns {
			c.client.Close()
			c.server.Close()
		}
		px.mu.Unlock()
		wg.Wait()
	})
	wg.Add(1)
	go func() {
		defer wg.Done()
		for {
			client, err := ln.Accept()
			if err != nil {
				return
			}
			server, err := net.Dial("tcp", target)
			if err != nil {
				client.Close()
				continue
			}
			c := &proxied{client: client, server: server}
			px.mu.Lock()
			c.dead = px.asleep
			px.conns[c] = struct{}{}
			px.mu.Unlock()
			wg.Add(2)
			go func() { defer wg.Done(); px.pipe(c, client, server, true) }()
			go func() { defer wg.Done(); px.pipe(c, server, client, false) }()
		}
	}()
	return px
}

// pipe copies src to dst while c lives.
func (px *sleepyProxy) pipe(c *proxied, src, dst net.Conn, fromClient bool) {
	defer func() {
		src.Close()
		dst.Close()
		px.mu.Lock()
		delete(px.conns, c)
		px.mu.Unlock()
	}()
	buf := make([]byte, 32<<10)
	for {
		n, err := src.Read(buf)
		if n > 0 {
			px.mu.Lock()
			dead, awake := c.dead, !px.asleep
			px.mu.Unlock()
			switch {
			case dead && fromClient && awake:
				return // a request on a connection the other side forgot
			case dead:
				// dropped
			default:
				if _, werr := dst.Write(buf[:n]); werr != nil {
					return
				}
			}
		}
		if err != nil {
			return
		}
	}
}

// sleep leaves every connection open and dead, and every new one too.
func (px *sleepyProxy) sleep() {
	px.mu.Lock()
	defer px.mu.Unlock()
	px.asleep = true
	for c := range px.conns {
		c.dead = true
	}
}

// wake lets new connections through again.
func (px *sleepyProxy) wake() {
	px.mu.Lock()
	defer px.mu.Unlock()
	px.asleep = false
}

// TestLivePageNoticesASleepByTheWallClock: a laptop's sleep stops the
// clock of a page's timers, not the wall clock, so a timer set to notice
// silentAfter of silence fired up to that long after the laptop woke, the
// page saying all the while that it followed the workshop. The silence
// is measured on the wall clock, looked at every few seconds. Here the
// page's wall clock jumps two minutes, as it does over a sleep, while its
// stream is alive: the page takes the stream for dead at once, opens it
// anew and follows again (a page's own stream; the shared worker's is the
// same code).
func TestLivePageNoticesASleepByTheWallClock(t *testing.T) {
	_, d, fac := facilitatorOnDemo(t)
	fac.viewport(1366, 900, false)
	fac.do("a browser without shared workers, and a wall clock to move", chromedp.Func(func(ctx context.Context, t *chromedp.Target) error {
		_, err := cdp.Call(ctx, t, page.AddScriptToEvaluateOnNewDocument, page.AddScriptToEvaluateOnNewDocumentParams{
			Source: `delete window.SharedWorker; (() => {
				const Real = Date;
				window.__skew = 0;
				window.Date = class extends Real {
					constructor(...a) { if (a.length === 0) { super(Real.now() + window.__skew); } else { super(...a); } }
					static now() { return Real.now() + window.__skew; }
				};
			})();`})
		return err
	}))
	fac.open(d.url + "/q/" + strconv.FormatInt(d.qs[0].ID, 10))
	fac.liveConnected("the stream")
	eval[bool](fac, "note the stream's states", `(() => {
		window.__states = [];
		window.__notices = [];
		new MutationObserver(() => {
			window.__states.push(document.documentElement.getAttribute("data-live"));
			const n = document.getElementById("live-stopped");
			if (n) window.__notices.push(n.textContent);
		}).observe(document.documentElement, {attributes: true, attributeFilter: ["data-live"], childList: true, subtree: true});
		// The page last heard its stream within a beat (20 s) of now.
		const hhmm = d => ("0" + d.getHours()).slice(-2) + ":" + ("0" + d.getMinutes()).slice(-2);
		window.__heardAround = [hhmm(new Date(Date.now() - 21000)), hhmm(new Date())];
		return true;
	})()`)
	eval[bool](fac, "two minutes pass on the wall clock", `(window.__skew = 120000, true)`)
	// The server beats every 20 s and the page allows 45 s of silence:
	// only the wall clock can tell it within 15 s.
	if err := fac.poll(15*time.Second, `window.__states.includes("silent")`); err != nil {
		t.Fatalf("two minutes gone on the wall clock, the page did not take its stream for dead within 15 s (states %v): %v",
			eval[[]string](fac, "states", `window.__states`), err)
	}
	// The notice gives the time the page last heard the workshop, not
	// the time it noticed the silence (two minutes on).
	if err := fac.poll(5*time.Second, `window.__notices.length > 0`); err != nil {
		t.Fatalf("the page that took its stream for dead showed no notice: %v", err)
	}
	if !eval[bool](fac, "the notice's time", `window.__heardAround.some(t => window.__notices[0].includes("since " + t + ":"))`) {
		t.Errorf("the notice reads %q; want the time the page last heard its stream, one of %v",
			eval[string](fac, "the notice", `window.__notices[0]`), eval[[]string](fac, "times", `window.__heardAround`))
	}
	if err := fac.poll(15*time.Second, `document.documentElement.getAttribute("data-live") === "connected" && !document.getElementById("live-stopped")`); err != nil {
		t.Errorf("the page did not follow again after opening its stream anew: %v", err)
	}
}

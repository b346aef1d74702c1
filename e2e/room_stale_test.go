package e2e

import (
	"context"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/cdproto/cdp"
	"github.com/chromedp/cdproto/fetch"
	"github.com/chromedp/cdproto/network"
	"github.com/chromedp/chromedp"
)

// roomStale reads the room view's notice that it no longer follows the
// workshop: its words, whether it is drawn, whether it lies wholly on the
// screen, and the size of its type.
type roomStale struct {
	Text    string  `json:"text"`
	Shown   bool    `json:"shown"`
	Onto    bool    `json:"onto"`
	FontPx  float64 `json:"fontPx"`
	Overlap bool    `json:"overlap"`
}

const readRoomStale = `(() => {
	const line = document.querySelector(".room-live-status");
	if (!line) return {text: "<no status line>", shown: false, onto: false, fontPx: 0, overlap: false};
	const r = line.getBoundingClientRect();
	const nav = document.getElementById("room-nav").getBoundingClientRect();
	return {
		text: line.innerText,
		shown: line.getClientRects().length > 0 && r.height > 0,
		onto: r.top >= 0 && r.bottom <= innerHeight + 0.5 && r.left >= 0 && r.right <= innerWidth + 0.5,
		fontPx: parseFloat(getComputedStyle(line).fontSize),
		overlap: r.height > 0 && r.bottom > nav.top + 0.5 && r.top < nav.bottom,
	};
})()`

// noticeOverPictures scrolls the page from top to bottom and lists, at
// each position, the room view's pictures the notice lies over.
const noticeOverPictures = `(() => {
	const line = document.querySelector(".room-live-status");
	const out = [];
	for (let y = 0; ; y += 100) {
		scrollTo(0, y);
		const n = line.getBoundingClientRect();
		document.querySelectorAll(".room-view svg.chart-svg").forEach(s => {
			const r = s.getBoundingClientRect();
			if (r.height > 0 && n.height > 0 && r.bottom > n.top && r.top < n.bottom && n.bottom > 0 && n.top < innerHeight) {
				out.push("at " + scrollY + " px: " + s.getAttribute("class") + " " + Math.round(r.top) + "–" + Math.round(r.bottom) + " under the notice " + Math.round(n.top) + "–" + Math.round(n.bottom));
			}
		});
		if (y >= document.documentElement.scrollHeight - innerHeight) break;
	}
	scrollTo(0, 0);
	return out;
})()`

// TestRoomSaysWhenItStopsFollowing: the room view had no status line,
// so when its stream was refused (the facilitator signed out in another
// tab, the session's hours up) the projector went on showing the panel as
// it stood, in silence, while the experts saved. It says nothing while it
// follows the workshop, says so in the state line's type above the foot
// bar once it does not, with how to bring it back, and says nothing again
// once it follows again.
func TestRoomSaysWhenItStopsFollowing(t *testing.T) {
	site, d := startDemo(t)
	br := startBrowser(t)
	shots := newScreenshots(t)
	fac := br.person("facilitator")
	signInAnew(t, site, fac)
	fac.viewport(1366, 768, false)
	// Round 2 open: the room shows round 1's panel, the picture the
	// notice must leave on the screen.
	fac.open(d.url + "/")
	fac.postFromPage(d.url+"/round", "action=close")
	fac.postFromPage(d.url+"/round", "action=open&reason=Second+round+%28invented%29.")
	q := d.qs[0]
	fac.open(d.url + "/q/" + strconv.FormatInt(q.ID, 10) + "/room")
	fac.liveConnected("the stream")
	if s := eval[roomStale](fac, "the notice while live", readRoomStale); s.Shown || s.Text != "" {
		t.Errorf("while the room follows the workshop it shows %q (drawn: %v); want nothing", s.Text, s.Shown)
	}
	signOutElsewhere(site, fac)
	// The next change ends the stream of the ended session; asked for
	// again, it is refused.
	priyaSavesTo(t, site, d, q, "0.02", "0.05", "0.12")
	fac.waitFor("the stream refused", `document.documentElement.getAttribute("data-live") === "stopped"`)
	s := eval[roomStale](fac, "the notice once stopped", readRoomStale)
	if !s.Shown || !strings.Contains(s.Text, "Not following the workshop since ") || !strings.Contains(s.Text, "if this stays, reload the page.") {
		t.Fatalf("the room whose stream was refused shows %q (drawn: %v); want that it does not follow the workshop, and to reload", s.Text, s.Shown)
	}
	// Read from the back of a room: on the screen, not over the keys'
	// bar, in type no smaller than the state line's (its clamp's floor
	// is 16 px; 1.3vw is 17.8 px at 1366).
	if !s.Onto || s.Overlap || s.FontPx < 17.5 {
		t.Errorf("the notice at 1366×768: on the screen %v, over the foot bar %v, type %.1f px", s.Onto, s.Overlap, s.FontPx)
	}
	fitsScreen(t, fac, 1366, 768)
	shots.take(fac, "room-stale-1366x768")
	fac.viewport(1920, 1080, false)
	fitsScreen(t, fac, 1920, 1080)
	shots.take(fac, "room-stale-1920x1080")
	fac.viewport(phoneWidth, phoneHeight, true)
	if s := eval[roomStale](fac, "the notice on a phone", readRoomStale); !s.Shown || !s.Onto {
		t.Errorf("on a phone the notice is drawn %v, on the screen %v", s.Shown, s.Onto)
	}
	// Kept over the screen's foot as the page scrolled, its five lines
	// covered the picture and the strip of medians: no scroll position
	// may show the notice over a picture.
	if covered := eval[[]string](fac, "the notice over the pictures", noticeOverPictures); len(covered) > 0 {
		t.Errorf("on a phone the notice covers pictures as the page scrolls: %v", covered)
	}
	shots.take(fac, "room-stale-390")
	fac.viewport(1366, 768, false)

	signInAnew(t, site, fac.tab("signing in again"))
	if err := fac.poll(liveWithin+liveRetry, `document.documentElement.getAttribute("data-live") === "connected" && !document.getElementById("live-stopped")`); err != nil {
		t.Fatalf("the room did not follow again within %v of signing in: %v", liveWithin+liveRetry, err)
	}
	if s := eval[roomStale](fac, "the notice once live again", readRoomStale); s.Shown || s.Text != "" {
		t.Errorf("following again, the room still shows %q", s.Text)
	}
}

// TestRoomSaysWhenItCannotReachTheServer: a stream that drops and cannot
// be opened again (the server restarting or stopped, the network gone)
// is asked for again by the browser without end, and the room view
// showed the panel as it last stood, in silence. After staleAfter (10 s:
// a short break says nothing) it says it does not follow the workshop.
// A stream per page here, whose requests Chromium can fail (the shared
// worker's are not the page's).
func TestRoomSaysWhenItCannotReachTheServer(t *testing.T) {
	site, d := startDemo(t)
	br := startBrowser(t)
	fac := br.person("facilitator")
	signInAnew(t, site, fac)
	fac.viewport(1366, 768, false)
	fac.withoutSharedWorkers()
	q := d.qs[0]
	fac.open(d.url + "/q/" + strconv.FormatInt(q.ID, 10) + "/room")
	fac.liveConnected("the stream")

	// Every new request for the stream fails as if no server listened.
	ctx, cancel := context.WithCancel(fac.ctx)
	defer cancel()
	if err := chromedp.Listen(ctx, func(ev any) {
		if e, ok := ev.(*fetch.EventRequestPaused); ok {
			go func() {
				_ = chromedp.Do(ctx, chromedp.Func(func(ctx context.Context, t *chromedp.Target) error {
					_, err := cdp.Call(ctx, t, fetch.FailRequest, fetch.FailRequestParams{RequestID: e.RequestID, ErrorReason: network.ErrorReasonConnectionRefused})
					return err
				}))
			}()
		}
	}); err != nil {
		t.Fatal(err)
	}
	fac.do("fail the stream's requests", chromedp.Func(func(ctx context.Context, t *chromedp.Target) error {
		_, err := cdp.Call(ctx, t, fetch.Enable, fetch.EnableParams{Patterns: []*fetch.RequestPattern{{URLPattern: "*/events*", RequestStage: fetch.RequestStageRequest}}})
		return err
	}))
	// The open stream ends (its session ended by a sign-out and a change).
	signOutElsewhere(site, fac)
	priyaSavesTo(t, site, d, q, "0.02", "0.05", "0.12")
	fac.waitFor("the stream trying again", `document.documentElement.getAttribute("data-live") === "reconnecting"`)
	if s := eval[roomStale](fac, "the notice at once", readRoomStale); s.Shown {
		t.Errorf("a break of a moment already shows %q", s.Text)
	}
	if err := fac.poll(15*time.Second, `!!document.getElementById("live-stopped")`); err != nil {
		t.Fatalf("the room that cannot reach its stream still says nothing after 15 s (the stream is %q): %v",
			eval[string](fac, "the stream's state", `String(document.documentElement.getAttribute("data-live"))`), err)
	}
	if s := eval[roomStale](fac, "the notice", readRoomStale); !s.Shown || !strings.Contains(s.Text, "if this stays, reload the page.") {
		t.Errorf("the room that cannot reach its stream shows %q (drawn: %v)", s.Text, s.Shown)
	}
}

// signOutElsewhere signs p's browser out from another of its tabs.
func signOutElsewhere(site *site, p *person) {
	p.t.Helper()
	out := p.tab("signing out")
	out.open(site.URL + "/")
	out.postFromPage("/signout", "")
}

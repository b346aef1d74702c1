package e2e

import (
	"net/url"
	"strconv"
	"strings"
	"testing"
)

// priorDisplayMeasure is the prior display as drawn: the picture's drawn
// width (its plots and legend, as the screen scales them), the parts
// drawn over one another, and whether the side column scrolls within
// itself.
type priorDisplayMeasure struct {
	Drawn      float64  `json:"drawn"`
	Over       []string `json:"over"`
	SideScroll bool     `json:"sideScroll"`
	Offscreen  []string `json:"offscreen"`
}

const readPriorDisplay = `(() => {
	const svg = document.querySelector(".room-chart svg.chart-svg");
	const parts = [".room-head", ".room-reasons-head", ".room-prior-changed", ".room-chart svg.chart-svg", ".room-chart-notes", ".room-prior-why", ".room-side", ".room-live-status", ".room-nav"].
		map(sel => [sel, document.querySelector(sel)]).filter(([, e]) => e && e.getClientRects().length);
	const over = [], offscreen = [];
	for (let i = 0; i < parts.length; i++) {
		const a = parts[i][1].getBoundingClientRect();
		if (a.bottom > innerHeight + 0.5 || a.right > innerWidth + 0.5) offscreen.push(parts[i][0]);
		for (let j = i + 1; j < parts.length; j++) {
			const b = parts[j][1].getBoundingClientRect();
			if (a.top < b.bottom - 1 && b.top < a.bottom - 1 && a.left < b.right - 1 && b.left < a.right - 1) over.push(parts[i][0] + " over " + parts[j][0]);
		}
	}
	const side = document.querySelector(".room-side");
	return {
		drawn: svg.viewBox.baseVal.width * svg.getScreenCTM().a,
		over: over,
		sideScroll: side.scrollHeight > side.clientHeight + 1,
		offscreen: offscreen,
	};
})()`

// TestPriorDisplayKeepsItsPicture: on the prior display, the notice that
// the pool changed since and a rationale of the most the room shows
// (roomRationaleChars), both set over and under the picture in its
// column, drew the picture 410 px wide at 1366×768, 61% of its size
// without them (and 62% at 1920×1080). The notice now stands across the
// screen's width above the picture and the words beside it, and the
// rationale across it under both (beside the side's words at 1024×768,
// where they run long).
//
// The bound: with either or both, the picture keeps at least three
// quarters of the size it has on the same screen with neither. Three
// quarters of its size at 1366×768 writes its tick labels at 11.9 px,
// the size they have with neither on a 1024×768 projector, the smallest
// the room is laid out for; the numbers the room reads off this display
// stand beside it in words, in the state line's type. And nothing on the
// display scrolls, overlaps or leaves the screen.
func TestPriorDisplayKeepsItsPicture(t *testing.T) {
	site, d, fac := facilitatorOnDemo(t)
	shots := newScreenshots(t)
	q := d.qs[0]
	qp := d.url + "/q/" + strconv.FormatInt(q.ID, 10)
	agree := func(rationale string) {
		fac.postFromPage(qp+"/agree", url.Values{"source": {"pool"}, "confirm_open": {"on"}, "rationale": {rationale}}.Encode())
	}
	// 500 characters: the display shows the first 400 or so, cut at a word.
	long := strings.Repeat("The panel weighed the supplier audits against the field returns and settled on the pool (invented). ", 5)
	screens := [][2]int64{{1024, 768}, {1366, 768}, {1920, 1080}}
	plain := map[int64]float64{}
	measure := func(state string, shows ...string) {
		t.Helper()
		for _, s := range screens {
			fac.viewport(s[0], s[1], false)
			fac.open(qp + "/room?show=prior")
			fac.sees(state, shows...)
			m := eval[priorDisplayMeasure](fac, "the prior display", readPriorDisplay)
			t.Logf("%s, %d×%d: the picture is drawn %.0f px wide", state, s[0], s[1], m.Drawn)
			if state == "neither" {
				plain[s[0]] = m.Drawn
			} else if m.Drawn < 0.75*plain[s[0]] {
				t.Errorf("%s, %d×%d: the picture is drawn %.0f px wide, %.0f%% of its %.0f px with neither; want at least 75%%",
					state, s[0], s[1], m.Drawn, 100*m.Drawn/plain[s[0]], plain[s[0]])
			}
			if len(m.Over) > 0 || len(m.Offscreen) > 0 || m.SideScroll {
				t.Errorf("%s, %d×%d: parts over one another %q, off the screen %q, the side column scrolls %v", state, s[0], s[1], m.Over, m.Offscreen, m.SideScroll)
			}
			fitsScreen(t, fac, int(s[0]), int(s[1]))
			shots.take(fac, "room-prior-"+state+"-"+strconv.FormatInt(s[0], 10))
		}
		fac.viewport(phoneWidth, phoneHeight, true)
		fac.open(qp + "/room?show=prior")
		shots.take(fac, "room-prior-"+state+"-390")
	}
	agree("The pool as it stands (invented).")
	const notice, cut = "The pool has changed since this prior was agreed", "(cut here"
	measure("neither", "The pool as it stands (invented).")
	priyaSaves(t, site, d, "0.01", "0.06", "0.2")
	measure("notice", notice)
	agree(long)
	measure("rationale", cut)
	priyaSaves(t, site, d, "0.02", "0.07", "0.25")
	measure("both", notice, cut)

	// And the room's notice that it no longer follows the workshop, two
	// lines more above the foot bar: the side's words (the caution among
	// them) ran under the foot of their column, which scrolled, and at
	// 1024×768 the picture, held to 36vh, ran over its notes and the
	// rationale. The side's words take the height beside the rationale
	// too, and the picture gives way. The screen says it may be out of
	// date and to reload: what must hold is that nothing is hidden, cut
	// or drawn over; at half its size the picture still shows the curve
	// and its marks.
	fac.viewport(1366, 768, false)
	fac.open(qp + "/room?show=prior")
	fac.liveConnected("the stream")
	signOutElsewhere(site, fac)
	priyaSaves(t, site, d, "0.02", "0.08", "0.25")
	fac.waitFor("the stream refused", `!!document.getElementById("live-stopped")`)
	for _, s := range screens {
		fac.viewport(s[0], s[1], false)
		m := eval[priorDisplayMeasure](fac, "the prior display", readPriorDisplay)
		t.Logf("both and not following, %d×%d: the picture is drawn %.0f px wide", s[0], s[1], m.Drawn)
		if m.Drawn < 0.5*plain[s[0]] {
			t.Errorf("both and not following, %d×%d: the picture is drawn %.0f px wide, %.0f%% of its %.0f px with neither; want at least half",
				s[0], s[1], m.Drawn, 100*m.Drawn/plain[s[0]], plain[s[0]])
		}
		if len(m.Over) > 0 || len(m.Offscreen) > 0 || m.SideScroll {
			t.Errorf("both and not following, %d×%d: parts over one another %q, off the screen %q, the side column scrolls %v", s[0], s[1], m.Over, m.Offscreen, m.SideScroll)
		}
		fitsScreen(t, fac, int(s[0]), int(s[1]))
		shots.take(fac, "room-prior-stale-"+strconv.FormatInt(s[0], 10))
	}
}

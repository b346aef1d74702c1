package e2e

import (
	"fmt"
	"math"
	"strconv"
	"testing"

	"github.com/chromedp/chromedp"
)

// TestPanelKeepsItsPlaceOnALiveChange: a facilitator reading a
// question's revision history saw the page jump (29 px at 1366 px) when
// an expert saved: the history, replaced by the live update, held the
// browser's scroll anchor, and the rows added above it (the judgements,
// the reasons) pushed it down. The history's heading stays where it was
// on the screen, at the projector's width and on a phone.
func TestPanelKeepsItsPlaceOnALiveChange(t *testing.T) {
	site, d, fac := facilitatorOnDemo(t)
	heading := `document.querySelector("#history h2").getBoundingClientRect().top`
	for i, size := range []struct {
		w, h   int64
		mobile bool
	}{{1366, 768, false}, {phoneWidth, phoneHeight, true}} {
		fac.viewport(size.w, size.h, size.mobile)
		fac.open(d.url + "/q/" + strconv.FormatInt(d.qs[0].ID, 10))
		fac.liveConnected("the stream")
		// The window's top 40 px into the history, under its heading, or
		// as far down as the page goes (at 1366×768 the history's heading
		// stands 35 px under the window's top).
		fac.do("scroll to the history", chromedp.Evaluate[chromedp.Void](`window.scrollTo(0, window.scrollY + document.getElementById("history").getBoundingClientRect().top + 40)`))
		fac.waitFor("the scroll", `(() => { const r = document.getElementById("history").getBoundingClientRect(); return r.top < 100 && r.bottom > 0 && window.scrollY > 0; })()`)
		before := eval[float64](fac, "the heading before", heading)
		updated := eval[string](fac, "the last update", `String(document.documentElement.getAttribute("data-live-updated"))`)
		priyaSaves(t, site, d, "0.02", fmt.Sprintf("0.0%d", 5+i), "0.12")
		if err := fac.poll(liveWithin, fmt.Sprintf(`String(document.documentElement.getAttribute("data-live-updated")) !== %q && document.querySelectorAll("#history tbody tr").length > 0`, updated)); err != nil {
			t.Fatalf("%d px: the panel did not follow Priya's save: %v", size.w, err)
		}
		// Two frames: the browser's own scroll anchoring acts at layout.
		eval[bool](fac, "two frames", `new Promise(r => requestAnimationFrame(() => requestAnimationFrame(() => r(true))))`)
		if after := eval[float64](fac, "the heading after", heading); math.Abs(after-before) >= 1 {
			t.Errorf("%d px: the history's heading moved from %.1f to %.1f px on the screen when Priya saved", size.w, before, after)
		}
	}
}

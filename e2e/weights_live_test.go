package e2e

import (
	"fmt"
	"net/url"
	"strconv"
	"strings"
	"testing"
)

// TestPanelWeightsFollowALiveChange: with question 1's panel of the
// invented demo open (at the projector, say), the facilitator chose
// performance weights on the calibration page in another tab. The
// panel's live part redrew the pool as the "Performance-weight pool"
// with Ines Varga at 100%, while the weights card under it still said
// "In force: equal weights" and that performance weights "would rest on
// weak ground": one screen, two contradicting accounts of the weights.
// The card's account of the weights in force follows the change now.
func TestPanelWeightsFollowALiveChange(t *testing.T) {
	_, d, fac := facilitatorOnDemo(t)
	shots := newScreenshots(t)
	panel := d.url + "/q/" + strconv.FormatInt(d.qs[0].ID, 10)
	for _, w := range []int64{1366, 390} {
		fac.viewport(w, 768, w < 600)
		fac.open(panel)
		fac.liveConnected("the live stream to connect")
		scheme := "performance"
		if w == 390 {
			scheme = "equal" // and back
		}
		// The other tab's post (same browser, same cookies).
		fac.postFromPage(d.url+"/calibration/weights", "scheme="+scheme+"&reason=From+the+calibration+page+%28invented%29.")
		want, stale := "In force: performance weights", "In force: equal weights."
		pool := "Performance-weight pool"
		if scheme == "equal" {
			want, stale, pool = "In force: equal weights.", "In force: performance weights", "Equal-weight pool"
		}
		if err := fac.poll(liveWithin, fmt.Sprintf(`document.querySelector("#pool-summary").innerText.includes(%q)`, pool)); err != nil {
			t.Fatalf("at %d px the pool did not follow the new weights within %v: %v", w, liveWithin, err)
		}
		fac.sees("the panel after "+scheme+" weights were set elsewhere", want)
		if card := eval[string](fac, "the weights card", `document.querySelector("#pool").innerText`); strings.Contains(card, stale) {
			t.Errorf("at %d px the pool is the %s, but the weights card still says %q", w, pool, stale)
		}
		shots.part(fac, "#pool", "panel-weights-live-"+strconv.FormatInt(w, 10))
	}
}

// TestPanelAgreedPriorFollowsALiveChange: with question 1's panel open,
// a prior recorded in another tab redrew the picture's "Agreed prior"
// curve and its row in the table of curves (the live part), while the
// Agreed prior card under them still gave the earlier Beta, its
// rationale and its code: two agreed priors on one screen. The card's
// account of the prior in force follows the change now (its form stays
// as it is).
func TestPanelAgreedPriorFollowsALiveChange(t *testing.T) {
	_, d, fac := facilitatorOnDemo(t)
	shots := newScreenshots(t)
	panel := d.url + "/q/" + strconv.FormatInt(d.qs[0].ID, 10)
	for i, w := range []int64{1366, 390} {
		fac.viewport(w, 768, w < 600)
		fac.open(panel)
		fac.liveConnected("the live stream to connect")
		rationale := fmt.Sprintf("Recorded from another tab, take %d (invented).", i+1)
		fac.postFromPage(panel+"/agree", "source=pool&confirm_open=on&rationale="+url.QueryEscape(rationale))
		// The pool's single Beta, as the live part shows it.
		if err := fac.poll(liveWithin, `document.documentElement.hasAttribute("data-live-updated")`); err != nil {
			t.Fatalf("at %d px the panel did not redraw within %v: %v", w, liveWithin, err)
		}
		card := eval[string](fac, "the agreed prior card", `document.querySelector("#agreed").innerText`)
		if !strings.Contains(card, rationale) {
			t.Errorf("at %d px a prior was recorded elsewhere and the picture redrawn, but the Agreed prior card does not give its rationale %q:\n%s", w, rationale, clip(card, 600))
		}
		shots.part(fac, "#agreed", "panel-agreed-live-"+strconv.FormatInt(w, 10))
	}
}

// TestWeightHistoryOnAPhone: on a phone the report's table of pool
// weights over time kept its five columns:
// the date broke over four lines ("2026-" / "12-04" / "00:53" / "UTC"),
// what the weights were made from ran a word a line down a narrow column,
// and the reason and the priors recorded under them lay past the screen's
// edge. Each weight set is now a block of labelled lines, as the other
// wide tables are on a phone.
func TestWeightHistoryOnAPhone(t *testing.T) {
	_, d, fac := facilitatorOnDemo(t)
	shots := newScreenshots(t)
	fac.open(d.url + "/")
	fac.postFromPage(d.url+"/calibration/weights", "scheme=performance&reason=Classical+model+weights+%28invented%29.")
	fac.viewport(390, 844, true)
	for _, page := range []string{"report"} {
		fac.open(d.url + "/" + page)
		if n := fac.count("#weight-history tbody tr"); n == 0 {
			t.Fatalf("the %s has no table of weights over time", page)
		}
		if cut := eval[[]string](fac, "the table's cells", `Array.from(document.querySelectorAll("#weight-history td, #weight-history th")).filter(c => c.getClientRects().length && c.getBoundingClientRect().right > 390.5).map(c => c.innerText.trim())`); len(cut) > 0 {
			t.Errorf("the %s at 390 px: the weights over time run past the screen: %q", page, cut)
		}
		if side := eval[int](fac, "the rows' cells", `Array.from(document.querySelectorAll("#weight-history tbody tr")).filter(r => new Set(Array.from(r.cells).filter(c => c.getClientRects().length).map(c => Math.round(c.getBoundingClientRect().left))).size > 1).length`); side > 0 {
			t.Errorf("the %s at 390 px: %d weight sets lay their cells side by side", page, side)
		}
	}
	// At the projector the date broke inside itself, "2026-12-" over
	// "04 00:54 UTC": a date and time is read whole.
	for _, w := range []int64{1366, 390} {
		fac.viewport(w, 768, w < 600)
		fac.open(d.url + "/report")
		if lines := eval[int](fac, "the date's lines", `(() => {
			const th = document.querySelector("#weight-history tbody th");
			const m = /\d{4}-\d\d-\d\d \d\d:\d\d UTC/.exec(th.textContent);
			const w = document.createTreeWalker(th, NodeFilter.SHOW_TEXT);
			for (let t = w.nextNode(); t; t = w.nextNode()) {
				const i = t.textContent.indexOf(m[0]);
				if (i < 0) continue;
				const r = document.createRange(); r.setStart(t, i); r.setEnd(t, i + m[0].length);
				return new Set(Array.from(r.getClientRects()).filter(b => b.width > 0).map(b => Math.round(b.top))).size;
			}
			return -1;
		})()`); lines != 1 {
			t.Errorf("at %d px the date a weight set was applied stands on %d lines", w, lines)
		}
		shots.part(fac, "#weight-history", "weight-history-report-"+strconv.FormatInt(w, 10))
	}
}

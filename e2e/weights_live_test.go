package e2e

import (
	"fmt"
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
	site, d := startDemo(t)
	br := startBrowser(t)
	fac := br.person("facilitator")
	signIn(t, site, fac)
	shots := newScreenshots(t)
	panel := d.url + "/q/" + strconv.FormatInt(d.qs[0].ID, 10)
	for _, w := range []int64{1366, 390} {
		fac.viewport(w, 768, w < 600)
		fac.open(panel)
		fac.waitFor("the live stream to connect", `document.documentElement.getAttribute("data-live") === "connected"`)
		scheme := "performance"
		if w == 390 {
			scheme = "equal" // and back
		}
		// The other tab's post (same browser, same cookies).
		status := eval[int](fac, "set "+scheme+" weights elsewhere", fmt.Sprintf(
			`fetch(%q, {method: "POST", headers: {"Content-Type": "application/x-www-form-urlencoded"}, body: "scheme=%s&reason=From+the+calibration+page+%%28invented%%29.", redirect: "manual"}).then(r => r.status || 303)`,
			d.url+"/calibration/weights", scheme))
		if status >= 400 {
			t.Fatalf("%s weights: status %d", scheme, status)
		}
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
	site, d := startDemo(t)
	br := startBrowser(t)
	fac := br.person("facilitator")
	signIn(t, site, fac)
	shots := newScreenshots(t)
	panel := d.url + "/q/" + strconv.FormatInt(d.qs[0].ID, 10)
	for i, w := range []int64{1366, 390} {
		fac.viewport(w, 768, w < 600)
		fac.open(panel)
		fac.waitFor("the live stream to connect", `document.documentElement.getAttribute("data-live") === "connected"`)
		rationale := fmt.Sprintf("Recorded from another tab, take %d (invented).", i+1)
		status := eval[int](fac, "agree the pool elsewhere", fmt.Sprintf(
			`fetch(%q, {method: "POST", headers: {"Content-Type": "application/x-www-form-urlencoded"}, body: "source=pool&confirm_open=on&rationale="+encodeURIComponent(%q), redirect: "manual"}).then(r => r.status || 303)`,
			panel+"/agree", rationale))
		if status >= 400 {
			t.Fatalf("agree: status %d", status)
		}
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

package e2e

import (
	"fmt"
	"net/http"
	"strconv"
	"strings"
	"testing"

	"github.com/chromedp/chromedp"
)

// TestOverviewRoundsAndAccessFollowALiveChange: the overview followed
// experts' saves in its table of who answered what, but its Rounds card,
// the round's tag by the title and the roster's access stood still: a
// round closed in another tab left this one saying "Round 1 is open" over
// a "Close round 1" button the server now refuses, and an expert revoked
// there stayed "active" here beside a Revoke button. They follow the
// workshop now; a refused round form, shown with its message, is left as
// it is while other changes arrive.
func TestOverviewRoundsAndAccessFollowALiveChange(t *testing.T) {
	_, d, fac := facilitatorOnDemo(t)
	shots := newScreenshots(t)
	fac.viewport(1366, 900, false)
	fac.open(d.url + "/")
	fac.liveConnected("the overview's stream")
	other := fac.tab("another tab")
	other.open(d.url + "/")

	rounds := `document.getElementById("rounds").innerText`
	tag := `document.querySelector("h1 .tag").innerText`
	other.postFromPage(d.url+"/round", "action=close")
	if err := fac.poll(liveWithin, rounds+`.includes("Round 1 is closed") && `+rounds+`.includes("Open round 2") && `+tag+` === "Round 1 (closed)"`); err != nil {
		t.Errorf("the overview did not follow a round closed in another tab within %v: its tag reads %q, its Rounds card:\n%s", liveWithin,
			eval[string](fac, "the tag", tag), eval[string](fac, "the card", rounds))
	}

	// The card put in keeps the count of characters left under each of
	// its reasons (page.js), which took a line.
	if n, want := fac.count(`#rounds .text-count`), fac.count(`#rounds textarea[data-max-chars]`); n != want || n == 0 {
		t.Errorf("the Rounds card put in by the change has %d counts of characters left under its %d reasons", n, want)
	}

	var priya int64
	for _, e := range d.experts {
		if e.Name == "Priya Raman" {
			priya = e.ID
		}
	}
	id := strconv.FormatInt(priya, 10)
	access := fmt.Sprintf(`document.getElementById("access-e%s").innerText.trim()`, id)
	actions := fmt.Sprintf(`document.getElementById("access-actions-e%s").innerText`, id)
	if got := eval[string](fac, "Priya's access", access); got != "active" {
		t.Fatalf("Priya's access reads %q before the revoke", got)
	}
	other.postFromPage(d.url+"/experts/"+id+"/revoke", "confirm=yes&reason=Left+the+panel+%28invented%29.")
	if err := fac.poll(liveWithin, access+` === "revoked" && !`+actions+`.includes("Revoke")`); err != nil {
		t.Errorf("the roster did not follow a revoke in another tab within %v: Priya's access reads %q, beside %q", liveWithin,
			eval[string](fac, "Priya's access", access), eval[string](fac, "her actions", actions))
	}
	shots.take(fac, "overview-live-rounds-1366")

	// A round opened without its reason is refused; the card shows why
	// and keeps the page's words while a change made elsewhere arrives.
	if st := fac.load("open round 2 without a reason", chromedp.Click(chromedp.CSS(`#rounds form button[type=submit]`))); st != http.StatusUnprocessableEntity {
		t.Fatalf("round 2 without a reason: %d, want 422", st)
	}
	fac.liveConnected("the stream")
	// The page puts the focus on the refused field; the facilitator
	// clicks elsewhere to read the message (a focused field alone would
	// hold the card).
	fac.do("leave the field", chromedp.Evaluate[chromedp.Void](`document.activeElement.blur()`))
	refused := eval[string](fac, "the refused card", rounds)
	updated := eval[string](fac, "the last update", `String(document.documentElement.getAttribute("data-live-updated"))`)
	other.postFromPage(d.url+"/experts/"+id+"/reissue", "confirm=yes&reason=Back+%28invented%29.")
	if err := fac.poll(liveWithin, fmt.Sprintf(`String(document.documentElement.getAttribute("data-live-updated")) !== %q`, updated)); err != nil {
		t.Fatalf("the overview shown after a refused form did not follow a change: %v", err)
	}
	if got := eval[string](fac, "the card after a change", rounds); got != refused || !strings.Contains(got, "Nothing was saved") {
		t.Errorf("a change elsewhere replaced the refused round form's card: it read\n%s\nand now reads\n%s", refused, got)
	}
	fac.viewport(phoneWidth, phoneHeight, true)
	shots.part(fac, "#rounds", "overview-live-rounds-refused-390")
}

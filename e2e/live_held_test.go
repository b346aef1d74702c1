package e2e

import (
	"net/http"
	"strconv"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
)

// TestRefusedFormHeldFetchesNothingOnBlur: a live part that shows a
// refused form's message is left as it is while changes arrive, so that
// the message and the words it kept stay until the form is sent again.
// Once a change had left it so, every blur anywhere on the page (a click
// on a link, Tab through the page) fetched the whole page again, found the
// part still held, and waited for the next blur to fetch it once more. A
// blur fetches the page only when it frees a part held; a part held by its
// focus is still brought up to date when the focus leaves it.
func TestRefusedFormHeldFetchesNothingOnBlur(t *testing.T) {
	site, d, fac := facilitatorOnDemo(t)
	fac.viewport(1366, 900, false)
	priyaSaves(t, site, d, "0.02", "0.05", "0.12") // a reason to withhold
	fac.open(d.url + "/q/" + strconv.FormatInt(d.qs[0].ID, 10))
	// Withhold a reason without saying why: refused, its message in the
	// reasons' live part.
	if st := fac.load("withhold without a reason", chromedp.Click(chromedp.CSS(`#reasons-live form button[type=submit]`))); st != http.StatusUnprocessableEntity {
		t.Fatalf("withholding without a reason: %d, want 422", st)
	}
	fac.waitFor("the refusal in the reasons", `!!document.querySelector("#reasons-live .form-error")`)
	fac.liveConnected("the stream")
	priyaSaves(t, site, d, "0.02", "0.06", "0.12")
	if err := fac.poll(liveWithin+3*time.Second, `document.documentElement.hasAttribute("data-live-updated")`); err != nil {
		t.Fatalf("the panel did not fetch itself after Priya's save: %v", err)
	}
	const fetches = `performance.getEntriesByType("resource").filter(e => e.initiatorType === "fetch").length`
	before := eval[int](fac, "the fetches so far", fetches)
	// Five blurs, each well past the 250 ms in which changes are gathered.
	for i := 0; i < 5; i++ {
		eval[bool](fac, "focus a link and leave it", `(() => { const a = document.querySelector("main a[href]"); a.focus(); a.blur(); return true; })()`)
		time.Sleep(400 * time.Millisecond)
	}
	time.Sleep(time.Second)
	if after := eval[int](fac, "the fetches after", fetches); after != before {
		t.Errorf("five blurs with the refused form held fetched the page %d times; want none", after-before)
	}
	fac.sees("the refused form, still there", "Nothing was saved")

	// A part held by the focus in it is brought up to date as the focus
	// leaves it.
	fac.open(d.url + "/q/" + strconv.FormatInt(d.qs[0].ID, 10))
	fac.liveConnected("the stream")
	fac.do("focus a withhold box", chromedp.Focus(chromedp.CSS(`#reasons-live form input[name=withhold_reason]`)))
	priyaSavesWith(t, site, d, d.qs[0], "Audits held by the focus (invented).", "0.02", "0.06", "0.13")
	if err := fac.poll(liveWithin+3*time.Second, `document.documentElement.hasAttribute("data-live-updated")`); err != nil {
		t.Fatalf("the panel did not fetch itself after Priya's second save: %v", err)
	}
	listed := `document.getElementById("reasons-live").innerText.includes("Audits held by the focus (invented).")`
	if eval[bool](fac, "the reasons while focused", listed) {
		t.Fatalf("the reasons were replaced under the focus")
	}
	eval[bool](fac, "leave the box", `(document.activeElement.blur(), true)`)
	if err := fac.poll(liveWithin+3*time.Second, listed); err != nil {
		t.Errorf("the reasons held by the focus did not follow once it left: %v", err)
	}
}

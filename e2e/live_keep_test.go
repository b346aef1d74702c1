package e2e

import (
	"strconv"
	"testing"

	"github.com/chromedp/chromedp"
	"github.com/chromedp/chromedp/kb"
)

// TestLiveRefreshKeepsWhatTheFacilitatorIsDoing: the live pages replace
// their live parts when an answer arrives. On question 1's panel the
// facilitator, by keyboard, typed why a reason is withheld and pressed
// Tab to its Withhold button; Carmen's save arrived and the reasons were
// redrawn: the typed words were gone and the focus fell to the page's
// top, so the next Tab started again from the masthead. On the overview,
// the focus on the scrolling table of who answered what fell to the
// page's top the same way. Both stay where they were now, and the
// overview keeps its scroll position.
func TestLiveRefreshKeepsWhatTheFacilitatorIsDoing(t *testing.T) {
	g := newDeviceRig(t)
	br := startBrowser(t)
	fac := br.person("facilitator")
	signIn(t, g.site, fac)
	overview := fac.tab("overview")
	panelURL := g.wsURL() + "/q/" + strconv.FormatInt(g.qs[0].ID, 10)
	fac.viewport(1366, 768, false)
	fac.open(panelURL)
	fac.liveConnected("the panel's live stream")
	overview.viewport(390, 844, true)
	overview.open(g.wsURL())
	overview.liveConnected("the overview's live stream")

	// The panel: a withhold reason typed, then Tab to its button.
	const why = "Names a colleague (invented)."
	fac.do("type why the first reason is withheld", chromedp.Focus(chromedp.CSS(`#reasons-live form input[name=withhold_reason]`)), chromedp.SendKeys(chromedp.CSS(`#reasons-live form input[name=withhold_reason]`), why))
	fac.do("Tab to its button", chromedp.KeyEvent(kb.Tab))
	onButton := `(() => { const a = document.activeElement; return !!a && a.tagName === "BUTTON" && !!a.form && a.form.querySelector("input[name=withhold_reason]").value === ` + strconv.Quote(why) + `; })()`
	if !eval[bool](fac, "focus on the Withhold button", onButton) {
		t.Fatalf("after Tab the focus is not on the Withhold button of the form typed in: %s", eval[string](fac, "focus", `document.activeElement.outerHTML.slice(0, 200)`))
	}
	// The overview: the table of who answered what focused, the page
	// scrolled to it.
	overview.do("focus the table of answers", chromedp.Focus(chromedp.CSS(`#answered .table-scroll`)))
	scrolled := eval[float64](overview, "scroll position", `window.scrollY`)
	if scrolled < 100 {
		t.Fatalf("the overview is scrolled to %v: the test wants it scrolled down to the table", scrolled)
	}
	for _, p := range []*person{fac, overview} {
		eval[bool](p, "forget the last refresh", `document.documentElement.removeAttribute("data-live-updated"), true`)
	}

	carmen := br.person("Carmen Ruiz")
	openQuestion(t, carmen, g.carmensLink(), 1)
	typeValues(carmen, "0.02", "0.05", "0.12")
	carmen.fill(`form.answer-form`, "reason", "From the repair crews' notes (invented).")
	saveAnswer(t, carmen)

	for _, p := range []*person{fac, overview} {
		if err := p.poll(liveWithin, `document.documentElement.hasAttribute("data-live-updated")`); err != nil {
			t.Fatalf("%s did not refresh within %v of Carmen's save: %v", p.name, liveWithin, err)
		}
	}
	if got := eval[string](fac, "the typed reason", `(document.querySelector("#reasons-live form input[name=withhold_reason]") || {}).value || ""`); got != why {
		t.Errorf("on the panel the typed reason for withholding reads %q after a refresh, want %q", got, why)
	}
	if !eval[bool](fac, "focus after the refresh", onButton) {
		t.Errorf("on the panel the focus left the Withhold button on a refresh: it is on %s", eval[string](fac, "focus", `document.activeElement.outerHTML.slice(0, 120)`))
	}
	if !eval[bool](overview, "focus after the refresh", `document.activeElement === document.querySelector("#answered .table-scroll")`) {
		t.Errorf("on the overview the focus left the table of answers on a refresh: it is on %s", eval[string](overview, "focus", `document.activeElement.outerHTML.slice(0, 120)`))
	}
	if got := eval[float64](overview, "scroll position", `window.scrollY`); got != scrolled {
		t.Errorf("on the overview a refresh moved the page from %v to %v", scrolled, got)
	}
	// The overview did show the answer.
	overview.sees("the overview after Carmen's save", "answered (1 save)")
}

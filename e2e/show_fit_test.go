package e2e

import (
	"context"
	"net/http"
	"strconv"
	"strings"
	"testing"

	"github.com/chromedp/chromedp"
	"github.com/chromedp/chromedp/kb"
)

// TestShowTheFitStaysOnThePage: an expert on a phone types her values,
// taps "Show the fit" as the page invites her to, then saves, then taps
// Back. The fit came by posting the page, which came back drawn from its
// top, away from the picture, and after the save Back led to the
// browser's "Confirm Form Resubmission". The fit now comes in place and
// into view, and Back leads to the question's page; Enter in a value box
// does the same. Values that stop the fit, and any page without scripts,
// still post the form, whose page marks the fields to put right.
func TestShowTheFitStaysOnThePage(t *testing.T) {
	g := newDeviceRig(t)
	shots := newScreenshots(t)
	carmen := carmenIn(t, "on a phone")
	link := g.carmensLink()
	q1 := link + "q/" + strconv.FormatInt(g.qs[0].ID, 10)
	carmen.viewport(390, 844, true)
	carmen.open(link)
	carmen.open(q1)
	// The page as it was when she tapped: a mark a new page would not
	// carry.
	eval[bool](carmen, "mark the page", `window.parleyStayed = true`)
	typeValues(carmen, "0.03", "0.07", "0.16")
	carmen.do("tap Show the fit", chromedp.Click(chromedp.CSS(`form.answer-form button:not([formaction])`)))
	if err := carmen.poll(livePreviewWait, `window.parleyStayed === true && document.querySelectorAll("#preview svg.chart-wide circle.stated").length === 3 && !document.querySelector("#preview[aria-busy=true]")`); err != nil {
		t.Fatalf("after Show the fit the fit is not drawn on the same page (%v); the address is %s", err, carmen.url())
	}
	if top := eval[float64](carmen, "where the fit stands", `document.getElementById("preview").getBoundingClientRect().top`); top < -1 || top > 844/2 {
		t.Errorf("after Show the fit the fit's top stands at %.0f px on an 844 px screen; want it in view", top)
	}
	shots.take(carmen, "show-fit-in-place-390")
	saveAnswer(t, carmen)
	carmen.back(t)
	if u := carmen.url(); strings.HasPrefix(u, "chrome-error:") || !strings.HasSuffix(u, "/q/"+strconv.FormatInt(g.qs[0].ID, 10)) {
		t.Errorf("Back after saving leads to %s, showing %q; want the question's page", u, clip(carmen.text(), 200))
	}

	// Enter in a value box shows the fit in place too, and saves nothing.
	carmen.viewport(1366, 768, false)
	carmen.open(link + "q/" + strconv.FormatInt(g.qs[3].ID, 10))
	eval[bool](carmen, "mark the page", `window.parleyStayed = true`)
	typeValues(carmen, "2", "3", "6")
	carmen.do("press Enter", chromedp.KeyEvent("\r"))
	if err := carmen.poll(livePreviewWait, `window.parleyStayed === true && document.querySelectorAll("#preview svg.chart-wide circle.stated").length === 3 && document.getElementById("preview").innerText.includes("below 2 (days)")`); err != nil {
		t.Errorf("after Enter the fit is not drawn on the same page (%v)", err)
	}
	revs, _ := g.site.DB.Revisions(context.Background(), g.ws.ID)
	for _, r := range revs {
		if r.QuestionID == g.qs[3].ID && r.ExpertID == g.experts[2].ID {
			t.Error("Enter in a value box saved the answer")
		}
	}
	shots.take(carmen, "show-fit-enter-1366")

	// Values that stop the fit: the button posts the form, and the page
	// that comes back marks the field to put right, with the focus on it.
	typeValues(carmen, "2", "3..5", "6")
	if st := carmen.load("Show the fit of an unreadable value", chromedp.Click(chromedp.CSS(`form.answer-form button:not([formaction])`))); st != http.StatusUnprocessableEntity {
		t.Errorf("Show the fit of an unreadable value: status %d, want the marked page's 422", st)
	}
	if id := eval[string](carmen, "the focus", `document.activeElement.id`); id != "f-values-1" || carmen.count(`.field-invalid #f-values-1`) != 1 {
		t.Errorf("after Show the fit of an unreadable value the focus is on %q and the field is marked %d times", id, carmen.count(`.field-invalid #f-values-1`))
	}

	// Without scripts the button posts the form and the page shows the fit.
	carmen.scriptsOff()
	carmen.open(link + "q/" + strconv.FormatInt(g.qs[3].ID, 10))
	typeValues(carmen, "2", "3", "7")
	if st := carmen.load("Show the fit without scripts", chromedp.Click(chromedp.CSS(`form.answer-form button:not([formaction])`))); st != http.StatusOK {
		t.Errorf("Show the fit without scripts: status %d", st)
	}
	if n := carmen.count(`#preview svg.chart-wide circle.stated`); n != 3 || !strings.HasSuffix(carmen.url(), "/preview") {
		t.Errorf("without scripts Show the fit leads to %s with %d stated points", carmen.url(), n)
	}
}

// back taps the browser's Back and waits for the page it leads to; an
// error page ("Confirm Form Resubmission") is what the caller checks.
func (p *person) back(t *testing.T) {
	t.Helper()
	p.do("tap Back", chromedp.Func(func(ctx context.Context, tg *chromedp.Target) error {
		_, _ = chromedp.NavigateBack()(ctx, tg)
		return nil
	}))
	if err := p.poll(stepTimeout, `document.readyState === "complete"`); err != nil {
		t.Fatal(err)
	}
}

// TestShowTheFitKeepsTheFocusInView: an expert by keyboard types her
// values, Tabs to "Show the fit" and presses Space. The fit was scrolled
// to the screen's top, and the button holding the focus, just above it,
// out of view: the focus could not be seen. The button and the fit's
// top are both in view now, at 390 and 1366 px.
func TestShowTheFitKeepsTheFocusInView(t *testing.T) {
	g := newDeviceRig(t)
	carmen := carmenIn(t, "keyboard only")
	link := g.carmensLink()
	for _, w := range []int64{390, 1366} {
		carmen.viewport(w, 844, w < 600)
		carmen.open(link + "q/" + strconv.FormatInt(g.qs[0].ID, 10))
		typeValues(carmen, "0.03", "0.07", "0.16")
		carmen.waitFor("the live fit", `document.querySelectorAll("#preview svg.chart-wide circle.stated").length === 3 && !document.querySelector("#preview[aria-busy=true]")`)
		// From the last value box: Tab past the reasoning to the button.
		carmen.do("Tab to the reasoning", chromedp.KeyEvent(kb.Tab))
		carmen.do("Tab to Show the fit", chromedp.KeyEvent(kb.Tab))
		if got := eval[string](carmen, "the focus", `document.activeElement.innerText || document.activeElement.tagName`); got != "Show the fit" {
			t.Fatalf("at %d px two Tabs from the last value reach %q, want Show the fit", w, got)
		}
		eval[bool](carmen, "forget the last fit", `document.getElementById("preview").removeAttribute("data-updated"), true`)
		carmen.do("press Space", chromedp.KeyEvent(" "))
		carmen.waitFor("the fit", `document.getElementById("preview").hasAttribute("data-updated") && !document.querySelector("#preview[aria-busy=true]")`)
		got := eval[[]float64](carmen, "where the button and the fit stand", `(() => {
			const b = document.activeElement.getBoundingClientRect(), p = document.getElementById("preview").getBoundingClientRect();
			return [b.top, b.bottom, p.top, innerHeight, document.activeElement.innerText === "Show the fit" ? 1 : 0];
		})()`)
		if got[4] != 1 {
			t.Errorf("at %d px Show the fit lost the focus", w)
		}
		if got[0] < -1 || got[1] > got[3]+1 {
			t.Errorf("at %d px the focused Show the fit stands at %.0f-%.0f px of a %.0f px screen: out of view", w, got[0], got[1], got[3])
		}
		if got[2] < -1 || got[2] > got[3]/2 {
			t.Errorf("at %d px the fit's top stands at %.0f px of a %.0f px screen; want it in view", w, got[2], got[3])
		}
	}
}

package e2e

import (
	"context"
	"fmt"
	"math"
	"testing"

	"github.com/chromedp/cdproto/cdp"
	"github.com/chromedp/cdproto/input"
	"github.com/chromedp/chromedp"
)

// TestSaveStaysPutWhileThePreviewRedraws: an expert on a phone, her fit
// drawn under the form, puts a value right in a box above "Save this
// answer" with the button in view under her thumb. The live preview,
// drawn below the form, went from the picture to a line saying what
// stops the fit (or back): the page lost the picture's height, the
// browser, scrolled past the page's new end, scrolled up, and the button
// moved down the screen under the tap (once in CI a click met no
// button). The preview now keeps the room it has taken, so the button
// stays where it was at 390×844, 360×640 and on its side at 844×390.
func TestSaveStaysPutWhileThePreviewRedraws(t *testing.T) {
	site, d := startDemo(t)
	br := startBrowser(t)
	link := site.URL + linkOf(t, d.links, "Priya Raman")
	priya := br.person("Priya (on a phone)")
	const save = `form.answer-form button[formaction$="/save"]`
	saveTop := func() float64 {
		return eval[float64](priya, "where Save stands", fmt.Sprintf(`document.querySelector(%q).getBoundingClientRect().top`, save))
	}
	// retype puts text in the third box as a phone's keyboard does, the
	// box focused where it stands (a tap on it), the page not scrolled.
	retype := func(text string) {
		eval[bool](priya, "tap the third box", `(() => { const b = document.getElementById("f-values-2"); b.focus({preventScroll: true}); b.select(); return true; })()`)
		priya.do("type "+text, chromedp.Func(func(ctx context.Context, tg *chromedp.Target) error {
			_, err := cdp.Call(ctx, tg, input.InsertText, input.InsertTextParams{Text: text})
			return err
		}))
	}
	settled := func(what, expr string) {
		priya.waitFor(what, `(() => { const p = document.getElementById("preview"); return !p.hasAttribute("aria-busy") && p.getAttribute("data-updated") !== window.parleySeen && (`+expr+`); })()`)
		eval[bool](priya, "note the drawing", `(window.parleySeen = document.getElementById("preview").getAttribute("data-updated"), true)`)
	}
	for _, vp := range []struct {
		w, h int64
		name string
	}{{390, 844, "390×844"}, {360, 640, "360×640"}, {844, 390, "844×390 on its side"}} {
		priya.viewport(vp.w, vp.h, true)
		priya.open(fmt.Sprintf("%sq/%d", link, d.qs[0].ID))
		priya.do("choose percentages", chromedp.Click(chromedp.CSS(`#f-unit-percent`)))
		typeValues(priya, "2", "5", "12")
		settled("the fit of 2, 5 and 12%", `p.querySelectorAll("svg.chart-wide circle.stated").length === 3`)
		// The third box at the screen's top, Save under it in view.
		eval[bool](priya, "scroll to the third box", `(window.scrollBy(0, document.getElementById("f-values-2").getBoundingClientRect().top - 8), true)`)
		if top := saveTop(); top > float64(vp.h)-50 {
			t.Fatalf("%s: Save stands at %.0f px, out of view under the third box", vp.name, top)
		}
		for _, step := range []struct{ typed, what, drawn string }{
			{"12..5", "what stops the fit", `!!p.querySelector(".preview-problem")`},
			{"12.5", "the fit again", `p.querySelectorAll("svg.chart-wide circle.stated").length === 3`},
			{"", "what stops the fit", `!!p.querySelector(".preview-problem")`},
			{"30", "the fit of a wider range", `p.innerText.includes("30%")`},
		} {
			before := saveTop()
			retype(step.typed)
			settled(step.what, step.drawn)
			if after := saveTop(); math.Abs(after-before) > 1 {
				t.Errorf("%s: with %q typed and %s drawn, Save moved from %.0f to %.0f px down the screen", vp.name, step.typed, step.what, before, after)
			}
		}
	}
}

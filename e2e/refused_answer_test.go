package e2e

import (
	"fmt"
	"net/http"
	"strconv"
	"testing"

	"github.com/chromedp/chromedp"
)

// TestRefusedAnswerOnAPhone refuses an expert's save (values typed as
// percentages that do not increase, one beyond the bounds) and a chips
// board with too few bins, and checks the pages that say so at 360, 390
// and 1366 px with fits: the messages beside their fields, "Nothing was
// saved" apart from the label under it.
func TestRefusedAnswerOnAPhone(t *testing.T) {
	g := newDeviceRig(t)
	shots := newScreenshots(t)
	carmen := carmenIn(t, "on a phone")
	link := g.carmensLink()
	qURL := func(i int) string { return link + "q/" + strconv.FormatInt(g.qs[i].ID, 10) }
	refuse := func(what string) {
		t.Helper()
		if st := carmen.load(what, chromedp.Click(chromedp.CSS(`form.answer-form button[formaction$="/save"]`))); st != http.StatusUnprocessableEntity {
			t.Fatalf("%s: status %d, want 422", what, st)
		}
	}
	look := func(name string) {
		t.Helper()
		for _, w := range []int64{360, 390, 1366} {
			carmen.viewport(w, 844, w < 600)
			fits(t, carmen, name, w)
			shots.take(carmen, fmt.Sprintf("refused-%s-%d", name, w))
		}
	}
	carmen.viewport(360, 780, true)
	carmen.open(qURL(0))
	carmen.do("type percentages", chromedp.Click(chromedp.CSS(`#f-unit-percent`)))
	typeValues(carmen, "9", "8", "200")
	refuse("save values that do not increase")
	carmen.sees("values refused", "Nothing was saved.", "Must be larger than your 5% value.")
	look("quantiles")

	carmen.viewport(360, 780, true)
	carmen.open(qURL(2))
	carmen.waitFor("the chips board", `!document.querySelector(".chips-board").hidden`)
	for range 5 {
		carmen.do("tap a bin", chromedp.Click(chromedp.CSS(".chips-bin:nth-child(2) .chips-add")))
	}
	refuse("save chips in one bin")
	look("chips")
}

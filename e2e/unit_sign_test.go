package e2e

import (
	"fmt"
	"strconv"
	"testing"

	"github.com/chromedp/chromedp"
)

// TestUnitChoiceMovesThePercentSign switches an expert's answer form
// between "As proportions" and "As percentages" without sending it: the
// "%" beside each value box follows the choice at once (it changed only
// when the page was drawn again), a box whose value carries its own sign
// shows none, and the values typed are left as they are.
func TestUnitChoiceMovesThePercentSign(t *testing.T) {
	g := newDeviceRig(t)
	shots := newScreenshots(t)
	carmen := carmenIn(t, "on a phone")
	link := g.carmensLink()
	carmen.viewport(390, 844, true)
	carmen.open(link + "q/" + strconv.FormatInt(g.qs[0].ID, 10))
	signs := func(want string) string {
		// The signs shown, one letter a box: "%" shown, "-" none.
		return fmt.Sprintf(`Array.from(document.querySelectorAll("form.answer-form .input-with-suffix")).map(s => { const e = s.querySelector(".input-suffix"); return e && e.getClientRects().length > 0 ? e.textContent : "-"; }).join("") === %q`, want)
	}
	carmen.waitFor("no signs as proportions", signs("---"))
	typeValues(carmen, "4", "9%", "20")
	carmen.do("type percentages", chromedp.Click(chromedp.CSS(`#f-unit-percent`)))
	carmen.waitFor("a sign beside each box but the one typed with its own", signs("%-%"))
	for _, w := range []int64{390, 1366} {
		carmen.viewport(w, 844, w < 600)
		shots.take(carmen, fmt.Sprintf("unit-sign-percent-%d", w))
	}
	carmen.viewport(390, 844, true)
	carmen.do("type proportions", chromedp.Click(chromedp.CSS(`#f-unit-proportion`)))
	carmen.waitFor("no signs as proportions again", signs("---"))
	for i, want := range []string{"4", "9%", "20"} {
		if got := carmen.value(fmt.Sprintf(`[name="values[%d]"]`, i)); got != want {
			t.Errorf("box %d reads %q after the switches, want %q as typed", i, got, want)
		}
	}
	carmen.noScriptErrors("switching the unit")
}

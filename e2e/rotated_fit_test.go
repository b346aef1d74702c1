package e2e

import (
	"fmt"
	"testing"

	"github.com/chromedp/chromedp"
)

// TestFitTableFitsAPhoneOnItsSide: an expert with her phone on its side
// (844, 915 and 932 px wide) types a 95% value far above the curve's 95%
// point. The fit's table beside the picture keeps "more than 99.9999%"
// on one line, and at those widths its column was narrower than the
// table: the page scrolled sideways by 44 px at 844 px, and the picture,
// in three fifths of the width, drew its labels at 8 to 10.5 px. Up to
// 68rem the table now stands under the picture, as on a phone held
// upright; wider, its column is never narrower than the table. A tablet
// on its side, or a 1024×768 projector, drew the labels at 10.8 px with
// the table beside the picture up to 60rem; they are at least 11 px from
// 68rem (1089 px) up.
func TestFitTableFitsAPhoneOnItsSide(t *testing.T) {
	g := newDeviceRig(t)
	shots := newScreenshots(t)
	carmen := carmenIn(t, "phone on its side")
	q1 := g.carmensPage(0)
	for _, size := range [][2]int64{{844, 390}, {915, 412}, {932, 430}, {1024, 768}, {1040, 800}, {1088, 800}, {1089, 800}, {1120, 800}} {
		carmen.viewport(size[0], size[1], true)
		carmen.open(q1)
		carmen.do("choose percentages", chromedp.Click(chromedp.CSS(`#f-unit-percent`)))
		typeValues(carmen, "2", "5", "30")
		carmen.waitFor("the fit of 2, 5 and 30%", `(() => { const p = document.getElementById("preview"); return !p.hasAttribute("aria-busy") && p.querySelectorAll("svg.chart-wide circle.stated").length === 3 && p.innerText.includes("more than 99.9999%"); })()`)
		fits(t, carmen, "a far 95% value's fit on a phone on its side", size[0])
		shots.take(carmen, fmt.Sprintf("rotated-far-fit-%d", size[0]))
	}
}

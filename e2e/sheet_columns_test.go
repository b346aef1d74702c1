package e2e

import (
	"fmt"
	"testing"
)

// TestSheetColumnsFitAPhone: the answer sheet page's table of each
// question's columns wrote them as one unbroken word
// ("lowest,highest,best,confidence", "bin1,bin2,…,bin8"), which ran past
// a phone's screen: the last columns were out of sight, behind a sideways
// scroll. They now break after a comma, and copy as they did.
func TestSheetColumnsFitAPhone(t *testing.T) {
	g := newDeviceRig(t)
	shots := newScreenshots(t)
	br := startBrowser(t)
	fac := br.person("facilitator")
	signIn(t, g.site, fac)
	for _, w := range []int64{360, 390, 1366} {
		fac.viewport(w, 844, w < 600)
		fac.open(g.wsURL() + "/answers/import")
		over := eval[[]string](fac, "the columns table's reach", `(() => {
			const t = document.getElementById("sheet-question-columns"), box = t.closest(".table-scroll").getBoundingClientRect();
			return Array.from(t.querySelectorAll("td, th")).filter(c => c.getBoundingClientRect().right > box.right + 0.5).map(c => c.textContent.trim());
		})()`)
		if len(over) > 0 {
			t.Errorf("at %d px the table of columns runs past its box: %q", w, over)
		}
		if got := eval[string](fac, "a copy of the interval's columns", `Array.from(document.querySelectorAll("#sheet-question-columns td code")).map(c => c.textContent).join("|")`); got != "q05,q50,q95|lowest,highest,best,confidence|bin1,bin2,bin3,bin4,bin5,bin6,bin7,bin8|q25,q50,q75|q05,q50,q95" {
			t.Errorf("at %d px the columns read %q", w, got)
		}
		fits(t, fac, "the answer sheet page", w)
		shots.take(fac, fmt.Sprintf("sheet-columns-%d", w))
	}
}

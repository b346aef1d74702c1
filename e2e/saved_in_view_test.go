package e2e

import (
	"fmt"
	"testing"
)

// TestSavedIsInViewAfterTheSave: an expert on a phone taps "Save this
// answer" under her values. The page that came back stood at its top,
// the question's wording and facts, and "Saved." with the way to the next
// question lay under the screen's edge (852 px down an 844 px screen, 546
// down a phone on its side): she saw no sign that anything was saved. The
// page now opens at what it says of the save.
func TestSavedIsInViewAfterTheSave(t *testing.T) {
	site, d := startDemo(t)
	br := startBrowser(t)
	link := site.URL + linkOf(t, d.links, "Priya Raman")
	priya := br.person("Priya (on a phone)")
	for i, size := range [][2]int64{{390, 844}, {360, 640}, {844, 390}} {
		priya.viewport(size[0], size[1], true)
		priya.open(fmt.Sprintf("%sq/%d", link, d.qs[i].ID))
		typeValues(priya, "0.02", "0.05", "0.13")
		saveAnswer(t, priya)
		r := eval[[]float64](priya, "where Saved stands", `(() => { const r = document.querySelector(".banner-saved").getBoundingClientRect(); return [r.top, r.bottom, innerHeight]; })()`)
		if r[0] < -1 || r[1] > r[2]+1 {
			t.Errorf("at %d×%d after the save “Saved.” stands at %.0f to %.0f px of a %.0f px screen; want it in view", size[0], size[1], r[0], r[1], r[2])
		}
	}
}

package e2e

import (
	"fmt"
	"strconv"
	"testing"
)

// TestRotatedPhoneKeepsTargetsLarge: a phone turned on its side is 844 px
// wide, past the phone layout's width, but still tapped with a finger.
// What an expert taps on the answer form stays at least 44 px each way
// there, as it is upright: the value boxes and buttons were 37 and 39 px
// tall, and the choice of proportions or percentages rows of 24 px.
func TestRotatedPhoneKeepsTargetsLarge(t *testing.T) {
	g := newDeviceRig(t)
	shots := newScreenshots(t)
	carmen := carmenIn(t, "phone on its side")
	link := g.carmensLink()
	carmen.viewport(844, 390, true)
	for i := range 3 {
		carmen.open(link + "q/" + strconv.FormatInt(g.qs[i].ID, 10))
		if i == 2 {
			carmen.waitFor("the chips board", `!document.querySelector(".chips-board").hidden`)
		}
		where := fmt.Sprintf("Q%d on a phone on its side", i+1)
		if small := eval[[]string](carmen, "the answer form's targets", `Array.from(document.querySelectorAll(".answer-form input:not([type=hidden]):not([type=radio]), .answer-form select, .answer-form button, .answer-form .field-check label, .banner-saved .button")).filter(e => e.getClientRects().length).filter(e => { const r = e.getBoundingClientRect(); return r.width < 43.5 || r.height < 43.5; }).slice(0, 6).map(e => (e.getAttribute("aria-label") || e.textContent.trim() || e.name || e.tagName).slice(0, 40) + " " + Math.round(e.getBoundingClientRect().width) + "×" + Math.round(e.getBoundingClientRect().height) + " px")`); len(small) > 0 {
			t.Errorf("%s: targets on the answer form under 44 px: %q", where, small)
		}
		fits(t, carmen, where, 844)
		shots.take(carmen, fmt.Sprintf("rotated-Q%d-844", i+1))
	}
	// The way back to her questions is a target too, upright and on its
	// side, with a short title on one line and a long one on two.
	for _, size := range [][2]int64{{390, 844}, {844, 390}} {
		carmen.viewport(size[0], size[1], true)
		carmen.open(link + "q/" + strconv.FormatInt(g.qs[0].ID, 10))
		for _, title := range []string{"Mains", "Water mains survey (invented), second district"} {
			r := eval[[]float64](carmen, "the way back's box", fmt.Sprintf(`(() => {
				const a = document.querySelector(".breadcrumb a");
				a.textContent = %q + ": your questions";
				const r = a.getBoundingClientRect();
				return [r.width, r.height];
			})()`, title))
			if r[0] < 43.5 || r[1] < 43.5 {
				t.Errorf("at %d px the way back to the questions (%q) is %.0f×%.0f px", size[0], title, r[0], r[1])
			}
		}
	}
	// A laptop with a mouse keeps the form as it was.
	carmen.viewport(1366, 768, false)
	carmen.open(link + "q/" + strconv.FormatInt(g.qs[0].ID, 10))
	if h := eval[float64](carmen, "a value box's height", `document.querySelector(".answer-form input[type=text]").getBoundingClientRect().height`); h >= 43.5 {
		t.Errorf("with a mouse at 1366 px a value box is %.0f px tall; the touch sizes are for touch", h)
	}
	shots.take(carmen, "rotated-laptop-Q1-1366")
}

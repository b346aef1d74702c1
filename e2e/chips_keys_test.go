package e2e

import (
	"strconv"
	"strings"
	"testing"

	"github.com/chromedp/chromedp"
	"github.com/chromedp/chromedp/kb"
)

// TestChipsBoardSaysItsKeys: an expert by keyboard Tabbed to the chips
// board, whose first column took the focus, and the next Tab left the
// board: its + and − buttons are out of the Tab order, and nothing on the
// page (nor in what a screen reader reads with the column) said that ↑
// and ↓ place and take away chips and ← and → move between the columns.
// With the focus on the board its keys are said under it, and read with
// the column.
func TestChipsBoardSaysItsKeys(t *testing.T) {
	g := newDeviceRig(t)
	carmen := carmenIn(t, "keyboard only")
	shots := newScreenshots(t)
	for _, w := range []int64{390, 1366} {
		carmen.viewport(w, 844, w < 600)
		carmen.open(g.carmensPage(2))
		carmen.waitFor("the board", `!document.querySelector(".chips-board").hidden`)
		if carmen.visible(`.chips-keys`) {
			t.Errorf("at %d px the board's keys are said before the board has the focus", w)
		}
		// A tap places a chip and says no keys (the page would jump).
		carmen.do("tap a column's +", chromedp.Click(chromedp.CSS(`.chips-bin:nth-child(3) .chips-add`)))
		carmen.do("tap a column", chromedp.Click(chromedp.CSS(`.chips-bin:nth-child(4) .chips-stack`)))
		if carmen.visible(`.chips-keys`) {
			t.Errorf("at %d px a tap on the board says its keys", w)
		}
		carmen.open(g.carmensPage(2))
		carmen.waitFor("the board", `!document.querySelector(".chips-board").hidden`)
		for k := 0; k < 10 && !eval[bool](carmen, "on the board", `document.activeElement.classList.contains("chips-bin")`); k++ {
			carmen.do("Tab", chromedp.KeyEvent(kb.Tab))
		}
		if !eval[bool](carmen, "on the board", `document.activeElement.classList.contains("chips-bin")`) {
			t.Fatalf("at %d px Tab does not reach the board", w)
		}
		if !carmen.visible(`.chips-keys`) {
			t.Errorf("at %d px the board has the focus and its keys are not said", w)
		}
		said := eval[string](carmen, "what the column is described by", `(document.activeElement.closest("[aria-describedby]") ? [document.activeElement, document.activeElement.closest(".chips-grid")] : [document.activeElement]).map(e => (e.getAttribute("aria-describedby") || "").split(" ")).flat().map(id => document.getElementById(id)).filter(x => x).map(x => x.textContent).join(" ")`)
		for _, key := range []string{"↑", "↓", "←", "→"} {
			if !strings.Contains(said, key) {
				t.Errorf("at %d px the column is described by %q, without the key %s", w, said, key)
			}
		}
		keys := eval[string](carmen, "the keys", `document.querySelector(".chips-keys").textContent`)
		carmen.do("place a chip", chromedp.KeyEvent(kb.ArrowUp))
		carmen.do("next column", chromedp.KeyEvent(kb.ArrowRight))
		carmen.do("place a chip", chromedp.KeyEvent(kb.ArrowUp))
		shots.take(carmen, "chips-keys-"+strconv.FormatInt(w, 10))
		if got := carmen.value(`#f-counts-1`); got != "1" {
			t.Errorf("at %d px the keys said (%q) did not place a chip in the second column: it holds %q", w, keys, got)
		}
	}
}

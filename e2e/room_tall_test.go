package e2e

import (
	"fmt"
	"strconv"
	"testing"
)

// TestRoomPictureFillsAFourByThreeProjector: at 1024×768 the room's
// picture, as tall as its column's width draws it, left some 90 px blank
// under its notes, the screen's height that a 16:9 projector of that width
// does not have, and at 1280×1024 (5:4) some 200 px. Where its column is
// that much taller for its width the room now shows a tall drawing
// (chart.PanelView.Tall), whose plots take that height: the first at
// 4:3, the second, taller, at 5:4; 16:9 projectors and phones keep
// theirs. At each size one picture is shown, the view fits the screen, no
// part and no two words of a picture stand over one another, and at most
// 30 px of the picture's column stay blank under the notes on 4:3 and 5:4
// (on 16:9, a tenth of the screen's height, as pictureFills asks).
func TestRoomPictureFillsAFourByThreeProjector(t *testing.T) {
	_, _, fac, room := demoRoomAfterRoundOne(t)
	shots := newScreenshots(t)
	shown := `Array.from(document.querySelectorAll(".room-chart svg.chart-svg")).map((e, i) => e.getClientRects().length > 0 ? i : -1).filter(i => i >= 0)`
	for _, sz := range []struct {
		w, h int64
		// drawing is the picture's drawing shown: 0 the wide one, 1 the
		// compact one, 2 and 3 the tall ones.
		drawing int
	}{{1024, 768, 2}, {1280, 1024, 3}, {1366, 768, 0}, {1920, 1080, 0}, {phoneWidth, phoneHeight, 1}} {
		screen := fmt.Sprintf("%d×%d", sz.w, sz.h)
		fac.viewport(sz.w, sz.h, sz.w == phoneWidth)
		fac.open(room)
		if got := eval[[]int](fac, "the pictures shown", shown); len(got) != 1 || got[0] != sz.drawing {
			t.Errorf("%s: the room shows its drawings %v, want only %d", screen, got, sz.drawing)
		}
		if over := overlappingParts(fac); len(over) > 0 {
			t.Errorf("%s: the room view draws parts over one another: %q", screen, over)
		}
		if over := overlappingWords(fac); len(over) > 0 {
			t.Errorf("%s: the room's pictures draw words over one another or outside themselves: %q", screen, over)
		}
		if sz.w == phoneWidth {
			fits(t, fac, "the room view on a phone", phoneWidth)
		} else {
			fitsScreen(t, fac, int(sz.w), int(sz.h))
			m := measurePicture(t, fac)
			t.Logf("%s: %.0f px of the picture's column blank under the notes", screen, m.Spare)
			// On 16:9 pictureFills' tenth of the screen's height stands.
			most := 0.1 * float64(sz.h)
			if sz.drawing >= 2 {
				most = 30
			}
			if m.Spare > most {
				t.Errorf("%s: %.0f px of the picture's column stand blank under its notes, want at most %.0f", screen, m.Spare, most)
			}
		}
		shots.take(fac, "room-tall-"+strconv.FormatInt(sz.w, 10))
	}
}

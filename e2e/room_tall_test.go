package e2e

import (
	"fmt"
	"testing"
)

// TestRoomPictureFillsAFourByThreeProjector: at 1024×768 the room's
// picture, as tall as its column's width draws it, left some 90 px blank
// under its notes, the screen's height that a 16:9 projector of that width
// does not have, and at 1280×1024 (5:4) some 200 px; a large panel's
// picture (chart.Spread, beyond 12 experts) some 145 and 305 px. Where its
// column is taller for its width the room now shows a tall drawing
// (chart.PanelView.Tall, SpreadView.Tall) whose plots take that height,
// the tallest whose shape the column holds: for the demo's room the first
// at 4:3 and the fourth at 5:4, for a large panel's, under a shorter
// header, the third and the fifth; the prior display's picture, laid out
// with the rationale under it, left some 200 px at 1280×1024 and takes
// the third; 16:9 projectors and phones keep theirs. At each size one picture is shown, the view fits the screen, no
// part and no two words of a picture stand over one another, and at most
// 30 px of the picture's column stay blank under the notes on 4:3 and 5:4
// (on 16:9, a tenth of the screen's height, as pictureFills asks).
func TestRoomPictureFillsAFourByThreeProjector(t *testing.T) {
	s, _, fac, demoRoom := demoRoomAfterRoundOne(t)
	ws, q := largePanelWith(t, s, 20, nil)
	largeRoom := roomAfterRoundOne(t, s, ws, q)
	shots := newScreenshots(t)
	// The class of each drawing shown, past "chart-svg".
	shown := `Array.from(document.querySelectorAll(".room-chart svg.chart-svg")).filter(e => e.getClientRects().length > 0).map(e => e.getAttribute("class").replace(/^chart-svg /, ""))`
	type size struct {
		w, h int64
		// drawing is the class of the picture's drawing shown.
		drawing string
	}
	for _, room := range []struct {
		name, shot, url string
		sizes           []size
	}{
		{"the demo's room", "demo", demoRoom, []size{{1024, 768, "chart-wide chart-tall chart-tall-1"}, {1280, 1024, "chart-wide chart-tall chart-tall-4"},
			{1366, 768, "chart-wide"}, {1920, 1080, "chart-wide"}, {phoneWidth, phoneHeight, "chart-compact"}}},
		{"a large panel's room", "large", largeRoom, []size{{1024, 768, "chart-wide chart-tall chart-tall-3"}, {1280, 1024, "chart-wide chart-tall chart-tall-5"},
			{1366, 768, "chart-wide"}, {1920, 1080, "chart-wide"}, {phoneWidth, phoneHeight, "chart-compact"}}},
		// Up to 70rem the prior display's picture row is as tall as the
		// picture (style.css), which takes the width it is given.
		{"the demo's prior display", "prior", demoRoom + "?show=prior", []size{{1024, 768, "chart-wide"}, {1280, 1024, "chart-wide chart-tall chart-tall-3"},
			{1366, 768, "chart-wide"}, {1920, 1080, "chart-wide"}, {phoneWidth, phoneHeight, "chart-compact"}}},
	} {
		for _, sz := range room.sizes {
			screen := fmt.Sprintf("%s at %d×%d", room.name, sz.w, sz.h)
			fac.viewport(sz.w, sz.h, sz.w == phoneWidth)
			fac.open(room.url)
			if got := eval[[]string](fac, "the pictures shown", shown); len(got) != 1 || got[0] != sz.drawing {
				t.Errorf("%s: the room shows its drawings %q, want only %q", screen, got, sz.drawing)
			}
			if over := overlappingParts(fac); len(over) > 0 {
				t.Errorf("%s: the room view draws parts over one another: %q", screen, over)
			}
			if over := overlappingWords(fac); len(over) > 0 {
				t.Errorf("%s: the room's pictures draw words over one another or outside themselves: %q", screen, over)
			}
			if sz.w == phoneWidth {
				fits(t, fac, room.name+" on a phone", phoneWidth)
			} else {
				fitsScreen(t, fac, int(sz.w), int(sz.h))
				m := measurePicture(t, fac)
				t.Logf("%s: %.0f px of the picture's column blank under the notes", screen, m.Spare)
				// On 16:9 pictureFills' tenth of the screen's height stands.
				most := 0.1 * float64(sz.h)
				if sz.drawing != "chart-wide" {
					most = 30
				}
				if m.Spare > most {
					t.Errorf("%s: %.0f px of the picture's column stand blank under its notes, want at most %.0f", screen, m.Spare, most)
				}
			}
			shots.take(fac, fmt.Sprintf("room-tall-%s-%d", room.shot, sz.w))
		}
	}
}

package e2e

import (
	"fmt"
	"net/http"
	"reflect"
	"testing"
	"time"
)

// convergedPanel is an invented panel of n experts after Delphi rounds:
// most medians drawn together in a narrow band (several the same), a few
// apart. Every expert gives a reason of a line. The round is closed.
func convergedPanel(t *testing.T, s *site, n int) string {
	t.Helper()
	ws, q := sealPanel{title: "Invented: a converged panel",
		// Invented: one in six stands apart (0.05 to 0.25); the rest
		// converged on 0.10 to 0.13, in steps of 0.005, so that some
		// give the same median.
		median: func(i int) float64 {
			if i%6 == 5 {
				return 0.05 + 0.04*float64(i/6)
			}
			return 0.10 + 0.005*float64(i%7)
		},
		reason: "Invented: returns of a similar seal, site %d."}.add(t, s, n)
	return roomAfterRoundOne(t, s, ws, q)
}

// sideShown is what the room's side column shows of what the room must
// always see.
type sideShown struct {
	Link     bool         `json:"link"`     // the count of reasons and its link, or the reasons beside
	LinkIn   bool         `json:"linkIn"`   // ... inside the side column's box and the screen
	LegendIn bool         `json:"legendIn"` // the strip's legend inside them
	Dots     int          `json:"dots"`     // the shown strip's medians
	Labels   [][4]float64 `json:"labels"`   // their letters' boxes
	Font     float64      `json:"font"`     // the letters' size on the screen, px
	Table    bool         `json:"table"`    // the table of the medians' quartiles is shown
	Away     bool         `json:"away"`     // the line saying where the table is is shown
}

// TestRoomSideKeepsWhatTheRoomMustSee: panels of 4, 12 and 30 invented
// experts whose medians converged (Delphi rounds draw them together). A
// review found the 30 experts' median strip stacked 9 rows high (563
// px): the side column held 769 px in 510–544 at 1366×768 and 729 in
// 508 at 1280×720, and the projector showed no legend, no quartile
// table and no link to the reasons. At 1280×720, 1366×768 and
// 1920×1080 the side column now ends on the screen, the link to the
// reasons (or the reasons beside) and the strip's legend are inside it,
// and every expert's median is drawn, its letter apart from the others
// and set in at least 11.5 px on the screen (a strip shrunk to fit set
// them in 10.4 px at 1280×720 before its rows closed up).
func TestRoomSideKeepsWhatTheRoomMustSee(t *testing.T) {
	s := startSite(t)
	shots := newScreenshots(t)
	fac := signedInFacilitator(t, s)
	for _, n := range []int{4, 12, 30} {
		room := convergedPanel(t, s, n)
		for _, sz := range [][2]int64{{1280, 720}, {1366, 768}, {1920, 1080}, {390, 844}} {
			w, h := sz[0], sz[1]
			phone := w < 600
			screen := fmt.Sprintf("%d experts, %d×%d", n, w, h)
			fac.viewport(w, h, phone)
			if st := fac.open(room); st != http.StatusOK {
				t.Fatalf("%s: room view: %d", screen, st)
			}
			shots.take(fac, fmt.Sprintf("room-side-%d-%d", n, w))
			if phone {
				fits(t, fac, screen, w)
				continue
			}
			// Measured once the layout has settled: the fonts loaded and
			// the readings steady. Under load in CI the 30 experts' strip
			// at 1280×720 was once read at 11.2 px, which that page at
			// that size never showed again.
			if err := fac.poll(stepTimeout, `document.fonts.status === "loaded"`); err != nil {
				t.Fatal(err)
			}
			sideEnds(t, fac, screen)
			fitsScreen(t, fac, int(w), int(h))
			measure := `(() => {
				const side = document.querySelector(".room-side"), sb = side.getBoundingClientRect();
				const foot = Math.min(sb.bottom, window.innerHeight);
				const inside = e => { const r = e.getBoundingClientRect(); return r.height > 0 && r.top >= sb.top - 1 && r.bottom <= foot + 1; };
				const link = Array.from(side.querySelectorAll(".room-reasons-more, .room-reasons")).find(e => e.getClientRects().length > 0);
				const svg = Array.from(side.querySelectorAll("svg.chart-strip")).find(e => e.getBoundingClientRect().height > 0);
				const labels = Array.from(svg.querySelectorAll(".median-label")).map(e => { const r = e.getBoundingClientRect(); return [r.left, r.top, r.right, r.bottom]; });
				const shown = sel => { const e = side.querySelector(sel); return !!e && e.getBoundingClientRect().height > 0; };
				return {table: shown(".chart-table"), away: shown(".room-table-away"), link: !!link, linkIn: !!link && inside(link), legendIn: inside(svg.querySelector(".strip-legend")),
					dots: svg.querySelectorAll(".median-dot").length, labels: labels,
					font: Math.min(...Array.from(svg.querySelectorAll(".median-label")).map(e => parseFloat(getComputedStyle(e).fontSize) * svg.getScreenCTM().a))};
			})()`
			// Read until two readings a tenth of a second apart agree
			// (at most two seconds): what the room sees once the page
			// stands still, not a frame of it being laid out.
			got := eval[sideShown](fac, "the side column", measure)
			for i := 0; i < 20; i++ {
				time.Sleep(100 * time.Millisecond)
				again := eval[sideShown](fac, "the side column", measure)
				if reflect.DeepEqual(again, got) {
					break
				}
				got = again
			}
			if !got.Link || !got.LinkIn {
				t.Errorf("%s: the reasons (or the link to them) are not on the screen in the side column", screen)
			}
			// The table is left out, with a line saying where it is, only
			// where the compact strip is drawn (up to 1600 px) and stacks
			// many rows: the 30 at 1280 and 1366 px.
			if crowded := n == 30 && w <= 1600; got.Table == crowded || got.Away != crowded {
				t.Errorf("%s: the table of quartiles shown %v, the line saying where it is %v; want the table %v", screen, got.Table, got.Away, !crowded)
			}
			if !got.LegendIn {
				t.Errorf("%s: the median strip's legend is not on the screen in the side column", screen)
			}
			if got.Dots != n || len(got.Labels) != n {
				t.Errorf("%s: the strip draws %d medians and %d letters, want %d", screen, got.Dots, len(got.Labels), n)
			}
			if got.Font < 11.5 {
				t.Errorf("%s: the strip's letters are set in %.1f px, too small for the back of a room", screen, got.Font)
			}
			for i, a := range got.Labels {
				for _, b := range got.Labels[i+1:] {
					if a[0] < b[2]-0.5 && b[0] < a[2]-0.5 && a[1] < b[3]-0.5 && b[1] < a[3]-0.5 {
						t.Errorf("%s: two of the strip's letters overlap: %v and %v", screen, a, b)
					}
				}
			}
		}
	}
}

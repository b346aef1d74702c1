package e2e

import (
	"context"
	"net/http"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// TestLargePanelRoomInBrowser opens the room view of a calibration
// question answered by 20 experts (invented), once its true value is
// revealed: the picture is the curves over the strip of intervals, one
// picture drawn at one scale, and both parts draw the true value as a red
// dashed line in one column; the
// median strip names its box; the page fits each projector without
// scrolling, and on a phone no part is drawn over another.
func TestLargePanelRoomInBrowser(t *testing.T) {
	const n, truth = 20, 0.12
	s := startSite(t)
	ws, q := largePanelWith(t, s, n, func(q *workshop.Question) {
		tv := truth
		q.Calibration, q.TrueValue = true, &tv
	})
	ctx := context.Background()
	if err := s.DB.SetRound(ctx, ws.ID, 1, false, "Discussion of round 1 (invented)."); err != nil {
		t.Fatalf("close round 1: %v", err)
	}
	if err := s.DB.SetTrueValue(ctx, q.ID, truth, true, "Revealed after round 1 (invented)."); err != nil {
		t.Fatal(err)
	}
	shots := newScreenshots(t)
	fac := signedInFacilitator(t, s)
	room := s.URL + "/w/" + strconv.FormatInt(ws.ID, 10) + "/q/" + strconv.FormatInt(q.ID, 10) + "/room"
	type shown struct {
		Lines  []float64 `json:"lines"`  // the screen x of each shown truth line
		Labels []string  `json:"labels"` // the shown truth labels
		Legend []string  `json:"legend"` // the median strip's legend
	}
	for _, sz := range [][2]int64{{1920, 1080}, {1366, 768}, {1280, 720}, {390, 844}} {
		w, h := sz[0], sz[1]
		fac.viewport(w, h, w < 600)
		if st := fac.open(room); st != http.StatusOK {
			t.Fatalf("room view: %d", st)
		}
		screen := strconv.FormatInt(w, 10) + "×" + strconv.FormatInt(h, 10)
		if w < 600 {
			fits(t, fac, "the large panel's room view on a phone", w)
			if over := overlappingParts(fac); len(over) > 0 {
				t.Errorf("on a phone the large panel's room view draws parts over one another: %q", over)
			}
		} else {
			fitsScreen(t, fac, int(w), int(h))
			if over := overlappingParts(fac); len(over) > 0 {
				t.Errorf("%s: the large panel's room view draws parts over one another: %q", screen, over)
			}
			if over := overlappingWords(fac); len(over) > 0 {
				t.Errorf("%s: the large panel's room pictures draw words over one another or outside themselves: %q", screen, over)
			}
		}
		got := eval[shown](fac, "the true value and the strip's legend", `(() => {
			const shown = e => e.getClientRects().length > 0;
			const pics = Array.from(document.querySelectorAll(".room-chart svg.chart-svg")).filter(shown);
			return {
				lines: pics.flatMap(p => Array.from(p.querySelectorAll(".truth-line"))).map(l => { const r = l.getBoundingClientRect(); return (r.left + r.right) / 2; }),
				labels: pics.flatMap(p => Array.from(p.querySelectorAll(".truth-label"))).map(e => e.textContent),
				legend: Array.from(document.querySelectorAll(".room-side svg.chart-svg")).filter(shown).flatMap(p => Array.from(p.querySelectorAll(".legend-label"))).map(e => e.textContent),
			};
		})()`)
		if len(got.Lines) != 2 {
			t.Errorf("%s: the true value is drawn %d times, want over the curves and in the strip", screen, len(got.Lines))
		} else if d := got.Lines[0] - got.Lines[1]; d > 1.5 || d < -1.5 {
			t.Errorf("%s: the true value stands at x %.1f over the curves and at %.1f in the strip", screen, got.Lines[0], got.Lines[1])
		}
		if len(got.Labels) != 1 || !strings.HasPrefix(got.Labels[0], "true value 0.12") {
			t.Errorf("%s: the true value is labelled %q, want once", screen, got.Labels)
		}
		if !strings.Contains(strings.Join(got.Legend, "|"), "middle half of the medians") {
			t.Errorf("%s: the median strip's legend reads %q, without its box", screen, got.Legend)
		}
		// The axis stops at 0.6: the notes say so under the picture,
		// which the room kept hidden inside it for a large panel.
		if notes := eval[string](fac, "the notes under the picture", `(document.querySelector(".room-chart-notes") || {innerText: ""}).innerText`); !strings.Contains(notes, "Zoomed in: the axis stops at") {
			t.Errorf("%s: the notes under the large panel's picture read %q", screen, notes)
		}
		shots.take(fac, "large-room-"+strconv.FormatInt(w, 10))
	}
	// The question's own page draws the curves and the strip as two
	// pictures: the strip stood in a narrower column beside the medians'
	// table, so the true value's two lines stood 70 px apart at 1366 px.
	// Both now take the column's width, one under the other.
	panel := s.URL + "/w/" + strconv.FormatInt(ws.ID, 10) + "/q/" + strconv.FormatInt(q.ID, 10)
	for _, w := range []int64{1366, 1920} {
		fac.viewport(w, 900, false)
		if st := fac.open(panel); st != http.StatusOK {
			t.Fatalf("the question's panel: %d", st)
		}
		lines := eval[[]float64](fac, "the true value's lines on the panel", `Array.from(document.querySelectorAll(".chart-spread svg.chart-svg")).filter(e => e.getClientRects().length).flatMap(p => Array.from(p.querySelectorAll(".truth-line"))).map(l => { const r = l.getBoundingClientRect(); return (r.left + r.right) / 2; })`)
		if len(lines) != 2 {
			t.Errorf("the panel at %d px draws the true value %d times, want over the curves and in the strip", w, len(lines))
		} else if d := lines[0] - lines[1]; d > 1.5 || d < -1.5 {
			t.Errorf("the panel at %d px: the true value stands at x %.1f over the curves and at %.1f in the strip", w, lines[0], lines[1])
		}
		fits(t, fac, "the large panel's question page at "+strconv.FormatInt(w, 10)+" px", w)
		shots.take(fac, "large-panel-page-"+strconv.FormatInt(w, 10))
	}
}

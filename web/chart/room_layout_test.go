package chart

import (
	"regexp"
	"strings"
	"testing"
)

// roomCurves is a zoomed-in panel with a spike cut at the top, so that its
// picture has notes to write: four invented experts and their pool.
func roomCurves() []Curve {
	return []Curve{
		{Label: "Expert A", Role: RoleExpert, Dist: sbeta(3, 60, 0, 1)},
		{Label: "Expert B", Role: RoleExpert, Dist: sbeta(4, 70, 0, 1)},
		{Label: "Expert C", Role: RoleExpert, Dist: sbeta(400, 13000, 0, 1)},
		{Label: "Expert D", Role: RoleExpert, Dist: sbeta(5, 90, 0, 1)},
		{Label: "Equal-weight pool", Role: RolePool, Dist: sbeta(4, 70, 0, 1)},
	}
}

// lowestTitle is the baseline of the x axis title's last line.
func lowestTitle(t *testing.T, ns []node) float64 {
	t.Helper()
	y := 0.0
	for _, n := range find(ns, "text", "axis-title") {
		if !n.hasClass("axis-title-y") {
			y = max(y, n.num(t, "y"))
		}
	}
	return y
}

// The room writes the picture's notes under it in its own type
// (PanelNotes), so its picture leaves them out, and the room they took:
// on a phone that room stood empty between the axis's title and the
// legend. Other pages keep their notes in the picture.
func TestRoomPictureLeavesItsNotesToThePage(t *testing.T) {
	v := PanelView{ID: "p", Quantity: "first-year failure share", Units: "proportion of units", Lower: 0, Upper: 1, Curves: roomCurves()}
	if len(PanelNotes(v)) == 0 {
		t.Fatal("the test's panel has no notes to leave out")
	}
	plain := render(t, Panel(v))
	if !strings.Contains(plain, `class="chart-note"`) {
		t.Fatal("a picture outside the room does not write its notes")
	}
	v.Room = true
	for _, lay := range []string{"wide", "compact"} {
		html := renderLayout(t, Panel(v), lay)
		ns, _, h := drawing(t, html, lay)
		if notes := find(ns, "text", "chart-note"); len(notes) > 0 {
			t.Errorf("%s: the room's picture writes %d lines of notes the page writes itself", lay, len(notes))
		}
		title := lowestTitle(t, ns)
		// Under the title, the legend's first row or the picture's end
		// follows within a line of text: no room kept for notes.
		next := h
		for _, n := range find(ns, "text", "legend-label") {
			if y := n.num(t, "y"); y > title {
				next = min(next, y-0.76*17)
			}
		}
		if gap := next - (title + 0.24*15); gap > 20 {
			t.Errorf("%s: %.0f units stand empty under the axis's title (baseline %.0f) before the legend or the picture's end", lay, gap, title)
		}
	}
}

// On the projector the room's picture stands its legend beside the plots
// rather than under them, in one column inside the picture, and ends just
// under the axis's title, so that a wide screen draws it larger; the
// phone's drawing keeps the legend under the plots. The strip of a large
// panel is drawn in one picture with the curves above it, each tick in
// the same column.
func TestRoomPictureStandsItsLegendBesideThePlots(t *testing.T) {
	v := PanelView{ID: "p", Quantity: "first-year failure share", Units: "proportion of units", Lower: 0, Upper: 1, Curves: roomCurves(), Room: true}
	ns, w, h := drawing(t, renderLayout(t, Panel(v), "wide"), "wide")
	var right, top, bottom float64
	for _, r := range find(ns, "rect", "plot-area") {
		right = max(right, r.num(t, "x")+r.num(t, "width"))
		if top == 0 || r.num(t, "y") < top {
			top = r.num(t, "y")
		}
		bottom = max(bottom, r.num(t, "y")+r.num(t, "height"))
	}
	labels := find(ns, "text", "legend-label")
	if len(labels) != len(v.Curves) {
		t.Fatalf("%d legend labels, want %d", len(labels), len(v.Curves))
	}
	for _, s := range find(ns, "line", "legend-sample") {
		if x := s.num(t, "x1"); x <= right {
			t.Errorf("a legend sample starts at x %.0f, inside the plots (to %.0f)", x, right)
		}
	}
	for _, l := range labels {
		x, y := l.num(t, "x"), l.num(t, "y")
		if end := x + labelEm(l.Text, false)*17; end > w {
			t.Errorf("legend %q ends at %.0f in a picture %.0f wide", l.Text, end, w)
		}
		if y-0.76*17 < top || y > bottom {
			t.Errorf("legend %q at baseline %.0f, beside plots from %.0f to %.0f", l.Text, y, top, bottom)
		}
	}
	if title := lowestTitle(t, ns); h > title+12 {
		t.Errorf("the picture runs %.0f units below the axis's title", h-title)
	}
	cns, _, _ := drawing(t, renderLayout(t, Panel(v), "compact"), "compact")
	title := lowestTitle(t, cns)
	for _, l := range find(cns, "text", "legend-label") {
		if l.num(t, "y") < title {
			t.Errorf("on a phone the legend %q stands above the axis's title", l.Text)
		}
	}

	// A large panel's strip under the room's curves: one picture with
	// them, so that the screen scales both alike, its ticks in the same
	// columns as theirs.
	sv, _ := spreadInputs(30)
	sv.Room = true
	sv.Truth = ptr(0.4321)
	for _, lay := range []string{"wide", "compact"} {
		pics := regexp.MustCompile(`(?s)<svg class="chart-svg[^"]*".*?</svg>`).FindAllString(renderLayout(t, Spread(sv), lay), -1)
		if len(pics) != 1 {
			t.Fatalf("%s: %d pictures of a large panel in the room, want the curves and the strip in one", lay, len(pics))
		}
		at := strings.Index(pics[0], `<g class="chart-strip-part"`)
		if at < 0 {
			t.Fatalf("%s: the room's picture of a large panel has no strip", lay)
		}
		grid := regexp.MustCompile(`class="grid grid-x" x1="([^"]+)"`)
		var curves, strip []string
		for _, m := range grid.FindAllStringSubmatch(pics[0][:at], -1) {
			curves = append(curves, m[1])
		}
		for _, m := range grid.FindAllStringSubmatch(pics[0][at:], -1) {
			strip = append(strip, m[1])
		}
		if len(strip) == 0 || len(curves) < len(strip) || strings.Join(curves[:len(strip)], " ") != strings.Join(strip, " ") {
			t.Errorf("%s: ticks at %v over the curves, at %v in the strip", lay, curves, strip)
		}
		lines := regexp.MustCompile(`class="truth-line" x1="([^"]+)"`).FindAllStringSubmatch(pics[0], -1)
		if len(lines) != 2 || lines[0][1] != lines[1][1] {
			t.Errorf("%s: the true value's lines %q, want one over the curves and one in the strip, in one column", lay, lines)
		}
	}
}

package chart

import (
	"strings"
	"testing"
)

// A marked panel (PanelView.Marked) draws its first curve's 90% interval
// as a band between dashed ends and its median as a solid upright line,
// at the curve's own 5%, 50% and 95% points; outside the room its legend
// names both with their values, and in the room it leaves them to the
// page, whose type a projector can read.
func TestPanelMarksTheMedianAndInterval(t *testing.T) {
	d := sbeta(3, 60, 0, 1)
	v := PanelView{ID: "m", Quantity: "failure share", Lower: 0, Upper: 1,
		Curves: []Curve{{Label: "Agreed prior", Role: RoleAgreed, Dist: d}}, Marked: true}
	ps := FormatRangeWithin([]float64{d.Quantile(0.05), d.Quantile(0.5), d.Quantile(0.95)}, 0, 1, false)
	for _, lay := range []string{"wide", "compact"} {
		html := renderLayout(t, Panel(v), lay)
		for _, want := range []string{">median " + ps[1] + "</text>", ">90% interval " + ps[0] + " to " + ps[2] + "</text>"} {
			if !strings.Contains(html, want) {
				t.Errorf("the %s legend does not name %q", lay, want)
			}
		}
		if n, m := strings.Count(html, `class="mark-median"`), strings.Count(html, `class="mark-interval-end"`); n != 1 || m != 2 {
			t.Errorf("%s: %d median lines and %d interval ends, want 1 and 2", lay, n, m)
		}
	}
	v.Room = true
	room := render(t, Panel(v))
	if strings.Contains(room, ">median "+ps[1]+"</text>") || !strings.Contains(room, `class="mark-median"`) {
		t.Error("in the room the picture names its marks in its legend, or draws none")
	}
	// Unmarked, nothing is marked.
	v.Marked = false
	if plain := render(t, Panel(v)); strings.Contains(plain, "mark-") || strings.Contains(plain, "shaded band") {
		t.Error("an unmarked panel draws or names marks")
	}
}

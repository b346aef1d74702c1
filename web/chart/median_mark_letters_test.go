package chart

import (
	"testing"
)

// The upright mark at the middle expert's median stops short of the
// letters standing on it: the middle expert's own letter always stands
// on it, and the mark ran through that letter, and through the letters
// of medians equal or close to it, on the projector. Each letter's box
// (its width in DejaVu Sans Bold at the largest size the strip sets it,
// from a capital's height above the baseline down to the baseline) is
// kept clear of every piece of the mark; the mark still runs from the
// box's top to the axis everywhere else.
func TestMedianMarkStopsShortOfItsLetters(t *testing.T) {
	for _, c := range []struct {
		name    string
		medians []float64
	}{
		{"two", []float64{0.045, 0.063}},
		{"three, one alone in the middle", []float64{0.03, 0.05, 0.08}},
		{"five, three at the middle", []float64{0.03, 0.05, 0.05, 0.05, 0.07}},
		{"twelve converged", []float64{0.10, 0.105, 0.11, 0.11, 0.115, 0.12, 0.12, 0.125, 0.13, 0.05, 0.09, 0.2}},
	} {
		labels := make([]string, len(c.medians))
		for i := range labels {
			labels[i] = "Expert " + string(rune('A'+i))
		}
		comp := MedianStrip(MedianStripView{ID: "m", Quantity: "share", Lower: 0, Upper: 1, Labels: labels, Medians: c.medians})
		for _, lay := range []string{"wide", "compact"} {
			size := 15.0
			if lay == "wide" {
				size = 17
			}
			ns, _, _ := drawing(t, renderLayout(t, comp, lay), lay)
			marks := find(ns, "line", "median-mid")
			if len(marks) == 0 {
				t.Fatalf("%s, %s: no upright mark", c.name, lay)
			}
			x := marks[0].num(t, "x1")
			top, bottom := marks[0].num(t, "y1"), marks[0].num(t, "y2")
			drawn := 0.0
			for _, m := range marks {
				top, bottom = min(top, m.num(t, "y1")), max(bottom, m.num(t, "y2"))
				drawn += m.num(t, "y2") - m.num(t, "y1")
			}
			box := find(ns, "rect", "median-box")
			axis := find(ns, "line", "strip-axis")
			if len(axis) != 1 || bottom != axis[0].num(t, "y1") || (len(box) == 1 && top != box[0].num(t, "y")) {
				t.Errorf("%s, %s: the mark runs from %.1f to %.1f, not from the box's top to the axis", c.name, lay, top, bottom)
			}
			on := 0
			for _, l := range find(ns, "text", "median-label") {
				lx, ly := l.num(t, "x"), l.num(t, "y")
				half := labelEm(l.Text, true) * size / 2
				if x < lx-half-1.5 || x > lx+half+1.5 {
					continue
				}
				on++
				for _, m := range marks {
					if m.num(t, "y1") < ly && m.num(t, "y2") > ly-0.76*size {
						t.Errorf("%s, %s: the mark from %.1f to %.1f runs through letter %s (baseline %.1f)", c.name, lay, m.num(t, "y1"), m.num(t, "y2"), l.Text, ly)
					}
				}
			}
			if on == 0 {
				t.Errorf("%s, %s: no letter stands on the mark; the test checks nothing", c.name, lay)
			}
			if drawn < (bottom-top)/3 {
				t.Errorf("%s, %s: only %.1f of the mark's %.1f units are drawn", c.name, lay, drawn, bottom-top)
			}
		}
	}
}

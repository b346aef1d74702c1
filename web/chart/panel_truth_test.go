package chart

import (
	"strconv"
	"strings"
	"testing"
)

// Once a calibration question's true value is revealed, the panel's main
// picture draws it as a labelled upright line in both layouts, its label
// inside the picture at the largest size a stylesheet gives it (the
// room's 16px; truthLabelPx allows 17), and the caption says it. Without
// a true value there is neither line nor label nor words.
func TestPanelDrawsTheRevealedTrueValue(t *testing.T) {
	curves := func() []Curve {
		return []Curve{
			{Label: "Expert A", Role: RoleExpert, Dist: sbeta(3, 40, 0, 1)},
			{Label: "Expert B", Role: RoleExpert, Dist: sbeta(6, 30, 0, 1)},
		}
	}
	// At the left end of the window, in the middle, and beyond every
	// curve to the right (the window widens to keep it inside).
	for _, truth := range []float64{0.0413, 0.12, 0.6} {
		c := Panel(PanelView{ID: "p", Quantity: "share", Lower: 0, Upper: 1, Curves: curves(), Truth: ptr(truth)})
		want := "true value " + FormatWithin(truth, 0, 1, false)
		for _, lay := range []string{"wide", "compact"} {
			ns, w, _ := drawing(t, renderLayout(t, c, lay), lay)
			labels := find(ns, "text", "truth-label")
			lines := find(ns, "line", "truth-line")
			if len(labels) != 1 || len(lines) != 1 {
				t.Fatalf("truth %v, %s: %d labels and %d lines, want one of each", truth, lay, len(labels), len(lines))
			}
			label := labels[0]
			if label.Text != want {
				t.Errorf("truth %v, %s: label %q, want %q", truth, lay, label.Text, want)
			}
			x, _ := strconv.ParseFloat(label.Attr["x"], 64)
			y, _ := strconv.ParseFloat(label.Attr["y"], 64)
			width := labelEm(label.Text, true) * truthLabelPx
			left := map[string]float64{"start": x, "middle": x - width/2, "end": x - width}[label.Attr["text-anchor"]]
			if left < 0 || left+width > w || y-0.76*truthLabelPx < 0 {
				t.Errorf("truth %v, %s: label %q from %.1f to %.1f (baseline %.1f) in a picture %.0f wide", truth, lay, label.Text, left, left+width, y, w)
			}
			// The line stands at the true value on the x axis: between
			// the ticks' positions for their values.
			lx := lines[0].num(t, "x1")
			ticks := find(ns, "line", "grid-x")
			if len(ticks) >= 2 {
				t0, t1 := ticks[0], ticks[len(ticks)-1]
				v0, _ := strconv.ParseFloat(t0.Attr["data-value"], 64)
				v1, _ := strconv.ParseFloat(t1.Attr["data-value"], 64)
				at := t0.num(t, "x1") + (truth-v0)/(v1-v0)*(t1.num(t, "x1")-t0.num(t, "x1"))
				if d := lx - at; d > 1 || d < -1 {
					t.Errorf("truth %v, %s: line at x %.1f, the axis puts the value at %.1f", truth, lay, lx, at)
				}
			}
		}
		m := newPanelModel(PanelView{ID: "p", Quantity: "share", Lower: 0, Upper: 1, Curves: curves(), Truth: ptr(truth)})
		if !strings.Contains(m.Desc, "The true value, now revealed, is "+FormatWithin(truth, 0, 1, false)) {
			t.Errorf("truth %v: the caption does not say it: %q", truth, m.Desc)
		}
	}
	html := render(t, Panel(PanelView{ID: "p", Quantity: "share", Lower: 0, Upper: 1, Curves: curves()}))
	if strings.Contains(html, "truth-") || strings.Contains(html, "true value") {
		t.Errorf("a panel without a true value draws or says one")
	}
}

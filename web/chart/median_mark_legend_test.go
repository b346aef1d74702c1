package chart

import (
	"testing"
)

// The median strip's upright mark at the middle expert's median is named
// by a legend under the axis, in the strip's words, inside the strip at
// the largest size a stylesheet draws it (17px on the wide strip), with a
// sample of the mark itself: on the projector it stood unexplained.
func TestMedianStripNamesItsMiddleMark(t *testing.T) {
	for _, ms := range [][]float64{{0.045, 0.063}, {0.03, 0.04, 0.05, 0.06, 0.07}} {
		labels := make([]string, len(ms))
		for i := range ms {
			labels[i] = "Expert " + string(rune('A'+i))
		}
		c := MedianStrip(MedianStripView{ID: "m", Quantity: "share", Lower: 0, Upper: 1, Labels: labels, Medians: ms, Truth: ptr(0.0413)})
		for _, lay := range []string{"wide", "compact"} {
			ns, w, h := drawing(t, renderLayout(t, c, lay), lay)
			var legend []node
			for _, n := range find(ns, "text", "legend-label") {
				if n.Text == "middle expert's median" {
					legend = append(legend, n)
				}
			}
			mark, sample := find(ns, "line", "median-mid"), find(ns, "line", "median-mid-sample")
			if len(legend) != 1 || len(mark) < 1 || len(sample) != 1 {
				t.Fatalf("%d medians, %s: %d legend labels, %d marks, %d samples; want the mark named once with its sample", len(ms), lay, len(legend), len(mark), len(sample))
			}
			if sample[0].Attr["stroke"] != mark[0].Attr["stroke"] || sample[0].Attr["stroke-width"] != mark[0].Attr["stroke-width"] {
				t.Errorf("%d medians, %s: the sample is not drawn as the mark is", len(ms), lay)
			}
			x, y := legend[0].num(t, "x"), legend[0].num(t, "y")
			width := labelEm(legend[0].Text, false) * 17
			if x < 0 || x+width > w || y-0.76*17 < 0 || y+0.24*17 > h {
				t.Errorf("%d medians, %s: legend from %.1f to %.1f, baseline %.1f, in a strip %.0f×%.0f", len(ms), lay, x, x+width, y, w, h)
			}
			// Below the tick labels, not on them.
			for _, tl := range find(ns, "text", "tick-label") {
				if ty := tl.num(t, "y"); y-0.76*17 < ty+0.24*17 {
					t.Errorf("%d medians, %s: legend baseline %.1f runs into the tick labels at %.1f", len(ms), lay, y, ty)
					break
				}
			}
		}
	}
}

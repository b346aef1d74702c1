package chart

import (
	"testing"
)

// The median strip's box, from the lower to the upper quartile of the
// medians, is named by the legend as the middle mark is: a sample drawn
// as the box is and words the room reads, inside the strip at the largest
// size a stylesheet draws them, below the tick labels and clear of the
// mark's own entry. A strip too short for a box (minBoxMedians) names
// none.
func TestMedianStripNamesItsBox(t *testing.T) {
	for _, ms := range [][]float64{{0.045, 0.063}, {0.03, 0.04, 0.05, 0.06, 0.07}, {0.03, 0.031, 0.04, 0.05, 0.06, 0.07, 0.2}} {
		labels := make([]string, len(ms))
		for i := range ms {
			labels[i] = "Expert " + string(rune('A'+i))
		}
		c := MedianStrip(MedianStripView{ID: "m", Quantity: "share", Lower: 0, Upper: 1, Labels: labels, Medians: ms, Truth: ptr(0.0413)})
		for _, lay := range []string{"wide", "compact"} {
			ns, w, h := drawing(t, renderLayout(t, c, lay), lay)
			entries := map[string]node{}
			for _, n := range find(ns, "text", "legend-label") {
				entries[n.Text] = n
			}
			box, sample := find(ns, "rect", "median-box"), find(ns, "rect", "median-box-sample")
			legend, named := entries["middle half of the medians"]
			if len(ms) < minBoxMedians {
				if named || len(sample) > 0 || len(box) > 0 {
					t.Errorf("%d medians, %s: no box is drawn, but the legend names one", len(ms), lay)
				}
				continue
			}
			if !named || len(sample) != 1 || len(box) != 1 {
				t.Fatalf("%d medians, %s: legend %v, %d box samples, %d boxes; want the box named once with its sample", len(ms), lay, keysOf(entries), len(sample), len(box))
			}
			for _, a := range []string{"fill", "stroke", "stroke-width"} {
				if sample[0].Attr[a] != box[0].Attr[a] {
					t.Errorf("%d medians, %s: the sample's %s is %q, the box's %q", len(ms), lay, a, sample[0].Attr[a], box[0].Attr[a])
				}
			}
			x, y := legend.num(t, "x"), legend.num(t, "y")
			width := labelEm(legend.Text, false) * 17
			sx, sy := sample[0].num(t, "x"), sample[0].num(t, "y")
			sw, sh := sample[0].num(t, "width"), sample[0].num(t, "height")
			if sx < 0 || x+width > w || sy < 0 || y+0.24*17 > h || sy+sh > h {
				t.Errorf("%d medians, %s: box legend from %.1f to %.1f (sample at %.1f), baseline %.1f, in a strip %.0f×%.0f", len(ms), lay, sx, x+width, sx, y, w, h)
			}
			if sx+sw > x {
				t.Errorf("%d medians, %s: the sample (%.1f to %.1f) runs into its words at %.1f", len(ms), lay, sx, sx+sw, x)
			}
			for _, tl := range find(ns, "text", "tick-label") {
				if ty := tl.num(t, "y"); y-0.76*17 < ty+0.24*17 || sy < ty+0.24*17 {
					t.Errorf("%d medians, %s: the box's legend (baseline %.1f) runs into the tick labels at %.1f", len(ms), lay, y, ty)
					break
				}
			}
			mid := entries["middle expert's median"]
			mx, my := mid.num(t, "x"), mid.num(t, "y")
			midRight := mx + labelEm(mid.Text, false)*17
			sameLine := my-0.76*17 < y+0.24*17 && y-0.76*17 < my+0.24*17
			if sameLine && sx < midRight && mx < x+width {
				t.Errorf("%d medians, %s: the box's entry (from %.1f) runs into the mark's (to %.1f)", len(ms), lay, sx, midRight)
			}
		}
	}
}

func keysOf(m map[string]node) []string {
	var out []string
	for k := range m {
		out = append(out, k)
	}
	return out
}

package chart

import (
	"bytes"
	"context"
	"math"
	"math/rand/v2"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// drawnLabelWidth estimates a tick label's drawn width at size: 0.58 of the
// size a character, as textWidth does (common practice for layout
// estimates, no source); the browser tests measure the real fonts.
func drawnLabelWidth(label string, size float64) float64 {
	return 0.58 * size * float64(len([]rune(strings.TrimSpace(label))))
}

// checkTickLabels fails when a tick label of the SVG fragment svg,
// drawn size high, leaves [0, width].
func checkTickLabels(t *testing.T, where, svg string, size, width float64) {
	t.Helper()
	for _, n := range find(parse(t, svg), "text", "tick-label") {
		if n.hasClass("tick-y") {
			continue
		}
		x, tw := n.num(t, "x"), drawnLabelWidth(n.Text, size)
		if n.Attr["text-anchor"] != "middle" {
			t.Fatalf("%s: tick label %q anchored %q, want middle", where, n.Text, n.Attr["text-anchor"])
		}
		if lo, hi := x-tw/2, x+tw/2; lo < -1 || hi > width+1 {
			t.Errorf("%s: tick label %q at %v, about %.0f wide, leaves the picture's 0 to %v", where, n.Text, x, tw, width)
		}
	}
}

// TestTickLabelsStayInsideThePicture: no x tick label leaves its
// picture's box, in either layout, for any window. A rare event's prior,
// Beta(3, 19997.4) on 0 to 1, drew its last label "0.0006" centred on
// the compact plot's right edge, half of it beyond the 18-unit margin:
// a phone cut it. The windows run from a billionth of the bounds' width
// to all of it, on scales from 1e-7 to 1e7, in plain numbers and, on 0
// to 1, in percentages; the study's plots are held to the same.
func TestTickLabelsStayInsideThePicture(t *testing.T) {
	rare := PanelView{ID: "rare", Quantity: "first-year failure proportion", Units: "proportion of units", Lower: 0, Upper: 1,
		Curves: []Curve{{Label: "Equivalent prior sample", Role: RoleAgreed, Dist: sbeta(3, 19997.4, 0, 1)}}}
	for _, lay := range layouts {
		html := renderLayout(t, Panel(rare), lay.Name)
		pics := regexp.MustCompile(`(?s)<svg class="chart-svg[^"]*chart-`+lay.Name+`".*?</svg>`).FindAllString(html, -1)
		if len(pics) == 0 {
			t.Fatalf("no %s drawing", lay.Name)
		}
		for _, pic := range pics {
			checkTickLabels(t, "Beta(3, 19997.4), "+lay.Name, pic, tickLabelPx(lay.Name), lay.width())
		}
	}

	r := rand.New(rand.NewPCG(3, 19997))
	for i := range 3000 {
		scale := math.Pow(10, -7+14*r.Float64())
		lower, upper := 0.0, 1.0
		switch i % 4 {
		case 1:
			lower, upper = 0, scale
		case 2:
			lower, upper = -scale, scale*(1+9*r.Float64())
		case 3:
			lower = scale * (1 + 99*r.Float64())
			upper = lower + scale*(0.01+10*r.Float64())
		}
		span := (upper - lower) * math.Pow(10, -9*r.Float64())
		x0 := lower + (upper-lower-span)*r.Float64()
		x1 := math.Min(upper, x0+span)
		if !(x1 > x0) {
			continue
		}
		percent := i%4 == 0 && r.IntN(2) == 0
		for _, lay := range layouts {
			k := frameKey{layout: lay.Name, quantity: "q", lower: lower, upper: upper, x0: x0, x1: x1, top: 1, percent: percent}
			dens := frame{Left: lay.Left, Top: lay.Top, Width: lay.PlotW, Height: lay.DensityH, X0: x0, X1: x1, Y0: 0, Y1: 1}
			cumul := frame{Left: lay.Left, Top: lay.Top + lay.DensityH + lay.Gap, Width: lay.PlotW, Height: lay.CDFH, X0: x0, X1: x1, Y0: 0, Y1: 1}
			g := newTwinFrame(lay, k, dens, cumul)
			var b bytes.Buffer
			if err := twinAxesSVG(g).Render(context.Background(), &b); err != nil {
				t.Fatal(err)
			}
			where := lay.Name + " twin over [" + strconv.FormatFloat(x0, 'g', -1, 64) + ", " + strconv.FormatFloat(x1, 'g', -1, 64) + "]"
			if percent {
				where += " in percent"
			}
			checkTickLabels(t, where, "<g>"+b.String()+"</g>", tickLabelPx(lay.Name), lay.width())
			checkTicksInWindow(t, where, g.XTicks, x0, x1, dens)
		}
		for _, lay := range plotLayouts {
			g := newPlot("p", lay, x0, x1, 0, 1, "x", "y", nil)
			checkTicksInWindow(t, lay.Name+" study plot", g.XTicks, x0, x1, g.f)
			for _, tk := range g.XTicks {
				x, _ := strconv.ParseFloat(tk.LabelX, 64)
				tw := drawnLabelWidth(tk.Label, tickLabelPx(lay.Name))
				if lo, hi := x-tw/2, x+tw/2; lo < -1 || hi > lay.width()+1 {
					t.Errorf("%s study plot over [%g, %g]: tick label %q at %v leaves the picture's 0 to %v", lay.Name, x0, x1, tk.Label, x, lay.width())
				}
			}
		}
		if t.Failed() {
			return
		}
	}
}

// checkTicksInWindow fails when a tick lies outside the window [x0, x1],
// its gridline off the plot f, or its label does not read as its value.
func checkTicksInWindow(t *testing.T, where string, ts []tickGeom, x0, x1 float64, f frame) {
	t.Helper()
	if len(ts) < 2 {
		t.Errorf("%s over [%g, %g]: %d ticks", where, x0, x1, len(ts))
	}
	for _, tk := range ts {
		pos, _ := strconv.ParseFloat(tk.Pos, 64)
		v, err := strconv.ParseFloat(tk.Value, 64)
		if err != nil || pos < f.Left-0.01 || pos > f.right()+0.01 {
			t.Errorf("%s over [%g, %g]: tick %q at %v, off the plot from %v to %v", where, x0, x1, tk.Value, pos, f.Left, f.right())
			continue
		}
		if math.Abs(f.px(v)-pos) > 0.01 {
			t.Errorf("%s over [%g, %g]: the tick labelled %q stands at %v, where %g is %v", where, x0, x1, tk.Value, pos, v, f.px(v))
		}
	}
}

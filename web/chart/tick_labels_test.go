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

	"github.com/parley-elicit/parley/elicit"
)

// drawnLabelWidth estimates a tick label's drawn width at size from
// DejaVu Sans's own advance widths (labelEm; the widest font the pictures
// meet); the browser tests measure the real fonts. An even 0.58 em a
// character, as textWidth counts, takes "-30.0" for 2.9 em; DejaVu Sans
// draws it 2.6 em wide.
func drawnLabelWidth(label string, size float64) float64 {
	return labelEm(strings.TrimSpace(label), false) * size
}

// checkTickLabels fails when an x tick label of the SVG fragment svg,
// drawn size high, leaves [0, width], or comes too close to its
// neighbour (checkLabelsApart).
func checkTickLabels(t *testing.T, where, svg string, size, width float64) {
	t.Helper()
	var labels []tickGeom
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
		labels = append(labels, tickGeom{LabelX: n.Attr["x"], Label: n.Text})
	}
	checkLabelsApart(t, where, labels, size)
}

// checkTickGeoms is checkTickLabels for ticks as laid out, before they
// are drawn.
func checkTickGeoms(t *testing.T, where string, ts []tickGeom, size, width float64) {
	t.Helper()
	for _, tk := range ts {
		if tk.Label == "" {
			continue
		}
		x, _ := strconv.ParseFloat(tk.LabelX, 64)
		tw := drawnLabelWidth(tk.Label, size)
		if lo, hi := x-tw/2, x+tw/2; lo < -1 || hi > width+1 {
			t.Errorf("%s: tick label %q at %v leaves the picture's 0 to %v", where, tk.Label, x, width)
		}
	}
	checkLabelsApart(t, where, ts, size)
}

// labelGapEm is the least clear room the tests ask between two
// neighbouring x tick labels: about a space (DejaVu Sans's is 0.318 em,
// testdata/fonts/dejavu_advance_widths.txt).
const labelGapEm = 0.3

// checkLabelsApart fails when two neighbouring x tick labels of ts
// drawn size high, each as wide as labelEm estimates, leave less
// than labelGapEm between them, or when no label is written at all.
func checkLabelsApart(t *testing.T, where string, ts []tickGeom, size float64) {
	t.Helper()
	var prev *tickGeom
	labelled := 0
	for i := range ts {
		tk := &ts[i]
		if tk.Label == "" {
			continue
		}
		labelled++
		if prev != nil {
			x, _ := strconv.ParseFloat(prev.LabelX, 64)
			y, _ := strconv.ParseFloat(tk.LabelX, 64)
			room := (y - labelEm(tk.Label, false)*size/2) - (x + labelEm(prev.Label, false)*size/2)
			if room < labelGapEm*size {
				t.Errorf("%s: tick labels %q at %v and %q at %v leave %.1f units between them, under %.1f", where, prev.Label, x, tk.Label, y, room, labelGapEm*size)
			}
		}
		prev = tk
	}
	if labelled == 0 && len(ts) > 0 {
		t.Errorf("%s: %d ticks and not one labelled", where, len(ts))
	}
}

// TestTickLabelsStayInsideThePicture: no x tick label leaves its
// picture's box, in either layout, for any window, and no two
// neighbouring labels overlap. A rare event's prior,
// Beta(3, 19997.4) on 0 to 1, drew its last label "0.0006" centred on
// the compact plot's right edge, half of it beyond the 18-unit margin:
// a phone cut it. A narrow window far from zero, [0.40271609,
// 0.40271885], wrote "0.4027165" and "0.402717" 50 units apart on the
// phone, each about 76 wide. The windows run from a billionth of the
// bounds' width to all of it, on scales from 1e-7 to 1e7, in plain
// numbers and, on 0 to 1, in percentages; the study's plots, the median
// strip and the steadiness picture are held to the same (the steadiness
// picture centred every label on its tick, and its compact plot starts
// 10 units from the picture's edge).
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

	type window struct {
		lower, upper, x0, x1 float64
		percent              bool
	}
	windows := []window{
		{0, 1, 0.40271609, 0.40271885, false},
		{0, 1, 0.40271609, 0.40271885, true},
		{1000, 2000, 1234.5671, 1234.5679, false},
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
		windows = append(windows, window{lower, upper, x0, x1, i%4 == 0 && r.IntN(2) == 0})
	}
	for _, w := range windows {
		lower, upper, x0, x1, percent := w.lower, w.upper, w.x0, w.x1, w.percent
		over := " over [" + strconv.FormatFloat(x0, 'g', -1, 64) + ", " + strconv.FormatFloat(x1, 'g', -1, 64) + "]"
		// The room view draws both layouts' tick labels at 15px.
		room := make([]layout, 0, 2*len(layouts))
		for _, lay := range layouts {
			room = append(room, lay)
			lay.TickPx = roomTickPx
			room = append(room, lay)
		}
		for _, lay := range room {
			k := frameKey{layout: lay, tickPx: lay.tickPx(), quantity: "q", lower: lower, upper: upper, x0: x0, x1: x1, top: 1, percent: percent}
			dens := frame{Left: lay.Left, Top: lay.Top, Width: lay.PlotW, Height: lay.DensityH, X0: x0, X1: x1, Y0: 0, Y1: 1}
			cumul := frame{Left: lay.Left, Top: lay.Top + lay.DensityH + lay.Gap, Width: lay.PlotW, Height: lay.CDFH, X0: x0, X1: x1, Y0: 0, Y1: 1}
			g := newTwinFrame(lay, k, dens, cumul)
			var b bytes.Buffer
			if err := twinAxesSVG(g).Render(context.Background(), &b); err != nil {
				t.Fatal(err)
			}
			where := lay.Name + " twin" + over
			if lay.TickPx > 0 {
				where = lay.Name + " twin in the room" + over
			}
			if percent {
				where += " in percent"
			}
			checkTickLabels(t, where, "<g>"+b.String()+"</g>", lay.tickPx(), lay.width())
			checkTicksInWindow(t, where, g.XTicks, x0, x1, dens)
		}
		for _, lay := range plotLayouts {
			g := newPlot("p", lay, x0, x1, 0, 1, "x", "y", nil)
			where := lay.Name + " study plot" + over
			checkTicksInWindow(t, where, g.XTicks, x0, x1, g.f)
			checkTickGeoms(t, where, g.XTicks, tickLabelPx(lay.Name), lay.width())
		}
		for _, lay := range steadyLayouts {
			target := SteadinessTarget{Title: "q", Lower: lower, Upper: upper, Full: [3]float64{x0, (x0 + x1) / 2, x1}}
			d := newSteadyDrawing(lay, target, x0, x1)
			var b bytes.Buffer
			if err := steadyDrawingSVG(steadyPanel{ID: "s", Title: "q"}, d).Render(context.Background(), &b); err != nil {
				t.Fatal(err)
			}
			where := lay.Name + " steadiness" + over
			checkTickLabels(t, where, b.String(), tickLabelPx(lay.Name), lay.width())
			checkTicksInWindow(t, where, d.XTicks, x0, x1, frame{Left: lay.Left, Width: lay.PlotW, X0: x0, X1: x1})
		}
		if !percent {
			v := MedianStripView{ID: "m", Quantity: "q", Lower: lower, Upper: upper,
				Labels: []string{"Expert A", "Expert B"}, Medians: []float64{x0, x1}}
			sp, err := elicit.SpreadOfMedians(v.Medians)
			if err != nil {
				t.Fatal(err)
			}
			for _, lay := range layouts {
				px := tickLabelPx(lay.Name)
				if lay.Name == wideLayout.Name {
					px = medianTickPx
				}
				d := medianDrawingFor(lay, v, sp, x0, x1, FormatValue)
				checkTickGeoms(t, lay.Name+" median strip"+over, d.Ticks, px, lay.width())
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

// TestSteadinessTickLabelsStayInside: the steadiness picture's compact
// plot runs from 10 units to 350 of 360, and it centred each label on its
// tick, so a question on 1000 to 2000 hours drew "1000" and "2000",
// each about 36 units wide, centred on the plot's ends: some 8 units of
// each lay beyond the picture's edge, and a phone cut both.
func TestSteadinessTickLabelsStayInside(t *testing.T) {
	v := SteadinessView{Targets: []SteadinessTarget{{
		Title: "Q4 invented time to first repair", Lower: 1000, Upper: 2000, Full: [3]float64{1000, 1400, 2000},
		Rows: []SteadinessRow{{Label: "without Q2", Pool: &[3]float64{1000, 1450, 2000}, Shift: 0.05}},
	}}}
	for _, lay := range steadyLayouts {
		html := renderLayout(t, Steadiness(v), lay.Name)
		pic := regexp.MustCompile(`(?s)<svg class="chart-svg[^"]*chart-` + lay.Name + `".*?</svg>`).FindString(html)
		if pic == "" {
			t.Fatalf("no %s drawing", lay.Name)
		}
		checkTickLabels(t, "steadiness on 1000 to 2000, "+lay.Name, pic, tickLabelPx(lay.Name), lay.width())
		if !strings.Contains(pic, ">1000</text>") || !strings.Contains(pic, ">2000</text>") {
			t.Errorf("%s: the ends of the axis are not labelled", lay.Name)
		}
	}
}

// TestXTicksTakeACoarserStep: where the labels of the nice step would
// collide, xTicks takes the next coarser step of the same sequence, and
// where even two ticks' labels collide it writes fewer labels; a window
// whose labels fit keeps the ticks it always had.
func TestXTicksTakeACoarserStep(t *testing.T) {
	lay := compactLayout
	px := tickLabelPx(lay.Name)
	at := func(x0, x1 float64) func(float64) float64 {
		return frame{Left: lay.Left, Width: lay.PlotW, X0: x0, X1: x1}.px
	}
	labels := func(gs []tickGeom) []string {
		var out []string
		for _, g := range gs {
			out = append(out, g.Value+"="+g.Label)
		}
		return out
	}
	cases := []struct {
		x0, x1 float64
		want   []string
	}{
		// The nice step for four ticks is 5e-7: five labels of seven
		// decimals, 50 units apart and about 76 wide. The next, 1e-6,
		// leaves two.
		{0.40271609, 0.40271885, []string{"0.402717=0.402717", "0.402718=0.402718"}},
		// The nice step, 2e-4, draws four labels about 76 wide 70 units
		// apart; the next, 5e-4, has one tick in the window. So the four
		// ticks stay and every other one is labelled.
		{1234.5671, 1234.5679, []string{"1234.5672=1234.5672", "1234.5674=", "1234.5676=1234.5676", "1234.5678="}},
		// The coarsest step with two ticks, 5e-12, sets them 108 units
		// apart with labels about 120 wide: the second keeps its gridline
		// without a label.
		{1.9915661239373412e-06, 1.9915789545674797e-06, []string{"0.000001991570=0.000001991570", "0.000001991575="}},
		// Short labels: the ticks as the nice step draws them.
		{0, 1, []string{"0=0", "0.2=0.2", "0.4=0.4", "0.6=0.6", "0.8=0.8", "1.0=1.0"}},
	}
	for _, c := range cases {
		got := labels(xTicks(c.x0, c.x1, lay.XTicks, at(c.x0, c.x1), nil, px, lay.width()))
		if strings.Join(got, " ") != strings.Join(c.want, " ") {
			t.Errorf("compact ticks over [%v, %v]: %q, want %q", c.x0, c.x1, got, c.want)
		}
	}
}

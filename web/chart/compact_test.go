package chart

import (
	"context"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/a-h/templ"
	"github.com/parley-elicit/parley/elicit"
)

// textWidth estimates a text's drawn width in SVG units at the font size
// the stylesheet gives its class: about 0.58 of the size a character in
// the system sans-serif fonts (common practice for layout estimates, no
// source), the compact layout's sizes from chart.css.
func textWidth(n node) float64 {
	size := 14.0
	switch {
	case n.hasClass("axis-title"):
		size = 15
	case n.hasClass("legend-label"):
		size = 15
	case n.hasClass("percentile-label"), n.hasClass("chart-note"):
		size = 13
	}
	return 0.58 * size * float64(len([]rune(strings.TrimSpace(n.Text))))
}

// TestCompactDrawingsStayInsideTheirBox: every picture's compact drawing,
// the one a phone shows, keeps each label and marker inside its SVG's
// box, so a phone never cuts one (issue 12). The browser tests measure
// the same on real pages.
func TestCompactDrawingsStayInsideTheirBox(t *testing.T) {
	pool := func(ds ...elicit.ScaledBeta) Curve {
		comps := make([]elicit.Component, len(ds))
		ws := make([]float64, len(ds))
		for i, d := range ds {
			comps[i] = elicit.Component{Weight: 1 / float64(len(ds)), Dist: d}
			ws[i] = 1
		}
		p, err := elicit.LinearPool(ds, ws)
		if err != nil {
			t.Fatal(err)
		}
		return Curve{Label: "Equal-weight pool", Role: RolePool, Dist: Pool{p}}
	}
	others := []elicit.ScaledBeta{sbeta(4.2, 17.9, 0, 1), sbeta(2, 30, 0, 1), sbeta(8, 12, 0, 1)}
	var many []elicit.ScaledBeta
	for i := 0; i < 40; i++ {
		many = append(many, sbeta(2+float64(i)/4, 20+float64(i), 0, 1))
	}
	cases := []struct {
		name string
		c    templ.Component
	}{
		{"fit near a bound", Fit(fitViewOf(sbeta(0.7, 30, 0, 1), Point{0.001, 0.05}, Point{0.02, 0.5}, Point{0.09, 0.95}))},
		{"fit in the middle", Fit(fitViewOf(sbeta(4.2, 17.9, 0, 1), Point{0.06, 0.05}, Point{0.18, 0.5}, Point{0.36, 0.95}))},
		{"fit near the upper bound", Fit(fitViewOf(sbeta(40, 0.8, 0, 1), Point{0.9, 0.05}, Point{0.98, 0.5}, Point{0.999, 0.95}))},
		{"fit on a wide scale", Fit(fitViewOf(sbeta(3, 5, 10, 5000), Point{600, 0.1}, Point{1800, 0.5}, Point{3200, 0.9}))},
		{"panel", Panel(PanelView{ID: "p", Quantity: "first-year failure proportion, HX-40", Units: "proportion of units", Lower: 0, Upper: 1,
			Curves: []Curve{{Label: "You", Role: RoleExpert, Dist: others[0]}, {Label: "Expert B", Role: RoleExpert, Dist: others[1]},
				{Label: "Expert C", Role: RoleExpert, Dist: others[2]}, pool(others...)}})},
		{"spread", Spread(SpreadView{ID: "s", Quantity: "share", Lower: 0, Upper: 1, Curves: []Curve{pool(many...)}, Others: many})},
		{"median strip", MedianStrip(MedianStripView{ID: "m", Quantity: "share", Lower: 0, Upper: 1,
			Labels: []string{"Expert A", "Expert B", "Expert C"}, Medians: []float64{0.03, 0.0405, 0.05}, Truth: ptr(0.0413)})},
		{"steadiness", Steadiness(SteadinessView{Targets: []SteadinessTarget{{
			Title: "Q12 first-year failure proportion of the invented HX-40 pump seal", Lower: 0, Upper: 1, Full: [3]float64{0.0088, 0.0405, 0.1098},
			Rows: []SteadinessRow{
				{Label: "without Q2", Pool: &[3]float64{0.011, 0.045, 0.105}, Shift: 0.004407},
				{Label: "without an invented expert whose name is long", Pool: &[3]float64{0.02, 0.05, 0.099}, Shift: 0.01113, NewGroup: true},
				{Label: "without Q3", Note: "no expert with weight left"},
			}}}})},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			html := renderLayout(t, c.c, "compact")
			checkFinite(t, html)
			pictures := regexp.MustCompile(`(?s)<svg class="chart-svg[^"]*chart-compact".*?</svg>`).FindAllString(html, -1)
			if len(pictures) == 0 {
				t.Fatal("no compact drawing")
			}
			for _, pic := range pictures {
				ns := parse(t, pic)
				svg := find(ns, "svg", "chart-compact")[0]
				f := strings.Fields(svg.Attr["viewBox"])
				w, _ := strconv.ParseFloat(f[2], 64)
				h, _ := strconv.ParseFloat(f[3], 64)
				if w > 362 {
					t.Errorf("compact drawing %v units wide, want about a phone's 360", w)
				}
				for _, n := range find(ns, "text", "") {
					if n.Attr["transform"] != "" {
						continue // the rotated y titles sit in the left margin by construction
					}
					if strings.TrimSpace(n.Text) == "" {
						continue // a picture without a y title writes an empty one
					}
					x, y := n.num(t, "x"), n.num(t, "y")
					tw := textWidth(n)
					lo, hi := x-tw/2, x+tw/2
					switch n.Attr["text-anchor"] {
					case "start", "":
						lo, hi = x, x+tw
					case "end":
						lo, hi = x-tw, x
					}
					if lo < -1 || hi > w+1 || y < 8 || y > h+1 {
						t.Errorf("text %q at (%v, %v), about %.0f wide, leaves the %v×%v box", n.Text, x, y, tw, w, h)
					}
				}
				for _, n := range find(ns, "circle", "") {
					cx, cy := n.num(t, "cx"), n.num(t, "cy")
					if cx < 0 || cx > w || cy < 0 || cy > h {
						t.Errorf("marker at (%v, %v) leaves the %v×%v box", cx, cy, w, h)
					}
				}
			}
		})
	}
}

func ptr(v float64) *float64 { return &v }

// The true value's label stays inside the strip at the largest size a
// stylesheet gives it (16px on the wide strip; 17px allowed), even when
// the true value is the lowest or the highest number on the axis: the
// projector's view cut it to "rue value 0.0413" when it was centred on
// its line with room measured for 13px.
func TestTruthLabelStaysInsideTheStrip(t *testing.T) {
	for _, truth := range []float64{0.0413, 0.3, 0.17} {
		c := MedianStrip(MedianStripView{ID: "m", Quantity: "share", Lower: 0, Upper: 1,
			Labels: []string{"Expert A", "Expert B", "Expert C"}, Medians: []float64{0.0413, 0.2, 0.3}, Truth: ptr(truth)})
		for _, lay := range []string{"wide", "compact"} {
			html := renderLayout(t, c, lay)
			pic := regexp.MustCompile(`(?s)<svg class="chart-svg[^"]*chart-` + lay + `".*?</svg>`).FindString(html)
			ns := parse(t, pic)
			w, _ := strconv.ParseFloat(strings.Fields(find(ns, "svg", "chart-"+lay)[0].Attr["viewBox"])[2], 64)
			label := find(ns, "text", "truth-label")[0]
			x, _ := strconv.ParseFloat(label.Attr["x"], 64)
			width := labelEm(label.Text, true) * truthLabelPx
			left := map[string]float64{"start": x, "middle": x - width/2, "end": x - width}[label.Attr["text-anchor"]]
			if left < 0 || left+width > w {
				t.Errorf("truth %v, %s: label %q from %.1f to %.1f in a strip %.0f wide", truth, lay, label.Text, left, left+width, w)
			}
		}
	}
}

// The median strip's numbers are actual experts' medians (nearest rank).
// With fewer than five experts it shows no quartile box or rows, which
// would be the extremes or next to them; with an even count its middle is
// named for what it is, the lower of the two middle ones.
func TestMedianStripForASmallPanel(t *testing.T) {
	render := func(ms ...float64) (string, medianStripModel) {
		labels := make([]string, len(ms))
		for i := range ms {
			labels[i] = "Expert " + strconv.Itoa(i+1)
		}
		v := MedianStripView{ID: "m", Quantity: "share", Lower: 0, Upper: 1, Labels: labels, Medians: ms}
		var b strings.Builder
		if err := MedianStrip(v).Render(context.Background(), &b); err != nil {
			t.Fatal(err)
		}
		return b.String(), newMedianStrip(v)
	}
	html, m := render(0.045, 0.08)
	if strings.Contains(html, "median-box") || len(m.Rows) != 3 || m.Rows[1].Name != "middle expert's median (the lower of the two middle ones)" || m.Rows[1].Value != "0.045" {
		t.Errorf("two experts: box %v, rows %+v", strings.Contains(html, "median-box"), m.Rows)
	}
	html, m = render(0.03, 0.04, 0.05)
	if strings.Contains(html, "median-box") || len(m.Rows) != 3 || m.Rows[1].Name != "median of the medians" || m.Rows[1].Value != "0.04" {
		t.Errorf("three experts: box %v, rows %+v", strings.Contains(html, "median-box"), m.Rows)
	}
	html, m = render(0.01, 0.02, 0.03, 0.04, 0.05)
	if !strings.Contains(html, "median-box") || len(m.Rows) != 5 || m.Rows[1].Name != "lower quartile" || m.Rows[1].Value != "0.02" {
		t.Errorf("five experts: box %v, rows %+v", strings.Contains(html, "median-box"), m.Rows)
	}
}

// A rare event's medians read as the table of each curve's percentiles
// writes them (FormatWithin), in plain decimals: the room's table of the
// medians' spread wrote "5.055e-5" beside a panel that wrote "0.00005055",
// and the strip's caption and true value likewise.
func TestMedianStripWritesARareEventsMediansInPlainDecimals(t *testing.T) {
	truth := 0.00004
	v := MedianStripView{ID: "m", Quantity: "share", Lower: 0, Upper: 1, Labels: []string{"Expert A", "Expert B", "Expert C"},
		Medians: []float64{0.00005055, 0.0001004, 0.0001518}, Truth: &truth}
	m := newMedianStrip(v)
	var got []string
	for _, r := range m.Rows {
		got = append(got, r.Value)
	}
	if want := []string{"0.00005055", "0.0001004", "0.0001518"}; strings.Join(got, " ") != strings.Join(want, " ") {
		t.Errorf("the table writes the medians %q, want %q", got, want)
	}
	if !strings.Contains(m.Desc, "Expert A 0.00005055") || !strings.Contains(m.Desc, "is 0.00004.") {
		t.Errorf("the caption reads %q", m.Desc)
	}
	var b strings.Builder
	if err := MedianStrip(v).Render(context.Background(), &b); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(b.String(), ">true value 0.00004<") || regexp.MustCompile(`>[^<]*\de-\d`).MatchString(b.String()) {
		t.Errorf("the strip writes an exponent:\n%s", b.String())
	}
}

package chart

import (
	"github.com/parley-elicit/parley/web/chart/charttest"
	"math/rand/v2"
	"regexp"
	"sort"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

// spreadInputs are n other experts with varied Betas on [0, 1], in no
// particular order, the asking expert and the pool of them all.
func spreadInputs(n int) (SpreadView, []elicit.ScaledBeta) {
	rng := rand.New(rand.NewPCG(7, 11))
	others := make([]elicit.ScaledBeta, n)
	for i := range others {
		others[i] = sbeta(1+9*rng.Float64(), 1+9*rng.Float64(), 0, 1)
	}
	own := sbeta(3, 5, 0, 1)
	pool, err := elicit.LinearPool(append([]elicit.ScaledBeta{own}, others...), nil)
	if err != nil {
		panic(err)
	}
	v := SpreadView{ID: "s", Quantity: "Response rate", Lower: 0, Upper: 1, Others: others, Curves: []Curve{
		{Label: "You", Role: RoleExpert, Dist: own},
		{Label: "Equal-weight pool", Role: RolePool, Dist: Pool{pool}},
	}}
	return v, others
}

func TestSpreadStructure(t *testing.T) {
	v, others := spreadInputs(200)
	html := render(t, Spread(v))
	checkFinite(t, html)
	rows := charttest.SpreadRows(html)
	if len(rows) != len(others) {
		t.Fatalf("%d intervals, want one per other expert (%d)", len(rows), len(others))
	}
	num := func(s string) float64 {
		f, err := strconv.ParseFloat(s, 64)
		if err != nil {
			t.Fatalf("coordinate %q: %v", s, err)
		}
		return f
	}
	prevDot, prevY := -1.0, -1.0
	for i, r := range rows {
		x1, x2, y, dot, cy := num(r[0]), num(r[1]), num(r[2]), num(r[3]), num(r[4])
		for _, x := range []float64{x1, x2, dot} {
			if x < wideLayout.Left || x > wideLayout.Left+wideLayout.PlotW {
				t.Errorf("row %d: x %v outside the plot [%v, %v]", i, x, wideLayout.Left, wideLayout.Left+wideLayout.PlotW)
			}
		}
		if !(x1 <= dot && dot <= x2) {
			t.Errorf("row %d: median dot %v not within its interval [%v, %v]", i, dot, x1, x2)
		}
		if dot < prevDot {
			t.Errorf("row %d: median %v left of the row above's %v; rows must be sorted by median", i, dot, prevDot)
		}
		if y <= prevY || cy != y {
			t.Errorf("row %d: y %v (dot %v) not below the row above (%v)", i, y, cy, prevY)
		}
		prevDot, prevY = dot, y
	}
	// Only the pool and the own curve are drawn as curves.
	if n := strings.Count(html, "curve-cdf curve-"); n != 2 {
		t.Errorf("%d CDF curves, want 2 (you and the pool)", n)
	}
	if strings.Contains(html, "Expert 1") {
		t.Error("the strip labels its rows")
	}
}

// TestSpreadCaptionQuartiles checks the caption's and the table's numbers
// against the nearest-rank quartiles of the inputs' medians, computed here
// from the Betas themselves.
func TestSpreadCaptionQuartiles(t *testing.T) {
	v, others := spreadInputs(199)
	med := make([]float64, len(others))
	for i, d := range others {
		med[i] = d.Quantile(0.5)
	}
	sort.Float64s(med)
	// n = 199: ⌈0.25·199⌉ = 50, ⌈0.75·199⌉ = 150, ⌈0.5·199⌉ = 100.
	lo, q1, q2, q3, hi := med[0], med[49], med[99], med[149], med[198]
	html := render(t, Spread(v))
	want := "The other 199 experts&#39; medians run from " + FormatValue(lo) + " to " + FormatValue(hi) +
		"; half of them lie between " + FormatValue(q1) + " and " + FormatValue(q3) + "."
	if !strings.Contains(html, want) {
		t.Errorf("caption lacks %q", want)
	}
	for _, row := range []struct{ name, value string }{
		{"lowest", FormatValue(lo)}, {"lower quartile", FormatValue(q1)}, {"median", FormatValue(q2)},
		{"upper quartile", FormatValue(q3)}, {"highest", FormatValue(hi)},
	} {
		if cell := `<th scope="row">` + row.name + `</th><td>` + row.value + `</td>`; !strings.Contains(html, cell) {
			t.Errorf("table lacks %s", cell)
		}
	}
	if n := strings.Count(html, "<tr>"); n > 12 {
		t.Errorf("%d table rows; the table should hold quartiles, not one row per expert", n)
	}
}

func TestSpreadInvalidOthersDrawNoNaN(t *testing.T) {
	v, _ := spreadInputs(3)
	v.Others = append(v.Others, elicit.ScaledBeta{}, sbeta(-1, 2, 0, 1))
	html := render(t, Spread(v))
	checkFinite(t, html)
	if n := len(charttest.SpreadRows(html)); n != 3 {
		t.Errorf("%d intervals, want 3 (the invalid Betas left out)", n)
	}
	v.Others, v.Curves = nil, nil
	checkFinite(t, render(t, Spread(v)))
}

// A spread for an expert who types percentages writes the other experts'
// medians, the curves' percentiles and the x axis in percentages; the
// same spread in proportions writes none.
func TestSpreadInPercentages(t *testing.T) {
	v, _ := spreadInputs(40)
	m := newSpreadModel(v)
	for _, q := range m.Quartiles {
		if strings.HasSuffix(q.Value, "%") {
			t.Errorf("proportions: the %s median reads %q", q.Name, q.Value)
		}
	}
	v.Percent = true
	m = newSpreadModel(v)
	for _, q := range m.Quartiles {
		if !strings.HasSuffix(q.Value, "%") {
			t.Errorf("percentages: the %s median reads %q", q.Name, q.Value)
		}
	}
	for _, l := range m.Panel.Legend {
		if !strings.HasSuffix(l.P50, "%") {
			t.Errorf("percentages: %s's median reads %q", l.Label, l.P50)
		}
	}
	for _, tk := range m.Strips[0].XTicks {
		if !strings.HasSuffix(tk.Label, "%") {
			t.Errorf("percentages: x tick %q", tk.Label)
		}
	}
}

// TestSpreadRowsReadApartInASmallPanel: a strip of 20 experts drew its
// intervals 2 units apart, 46 units high in all, about 50 px on a phone,
// where no one line could be told from the next. A smaller panel's rows
// share about as much height as a plot, up to 6 units each, with strokes
// to match; 200 experts keep their 2 units a row, and the room, whose
// picture is fitted to the projector under the curves, keeps the least.
func TestSpreadRowsReadApartInASmallPanel(t *testing.T) {
	step := func(v SpreadView) (float64, string) {
		t.Helper()
		html := render(t, Spread(v))
		rows := charttest.SpreadRows(html)
		if len(rows) < 2 {
			t.Fatalf("%d rows", len(rows))
		}
		y0, _ := strconv.ParseFloat(rows[0][2], 64)
		y1, _ := strconv.ParseFloat(rows[1][2], 64)
		w := regexp.MustCompile(`class="spread-medians" d="[^"]*" stroke="#1B1B1B" stroke-width="([^"]+)"`).FindStringSubmatch(html)
		if w == nil {
			t.Fatal("no median dots' stroke width")
		}
		return y1 - y0, w[1]
	}
	v, _ := spreadInputs(20)
	if d, w := step(v); d < 5.9 || w != "4.4" {
		t.Errorf("20 experts: rows %v apart, dots %s wide; want 6 apart and 4.4 wide", d, w)
	}
	v.Room = true
	if d, w := step(v); d != 2 || w != "2.2" {
		t.Errorf("20 experts in the room: rows %v apart, dots %s wide; want the least, 2 and 2.2", d, w)
	}
	v, _ = spreadInputs(200)
	if d, w := step(v); d != 2 || w != "2.2" {
		t.Errorf("200 experts: rows %v apart, dots %s wide; want 2 and 2.2", d, w)
	}
}

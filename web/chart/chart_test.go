package chart

import (
	"context"
	"fmt"
	"math"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

func sbeta(a, b, lo, hi float64) elicit.ScaledBeta {
	return elicit.ScaledBeta{Beta: elicit.Beta{Alpha: a, Beta: b}, Lower: lo, Upper: hi}
}

func fitViewOf(d elicit.ScaledBeta, pts ...Point) FitView {
	return FitView{
		ID: "t", Quantity: "Failure rate", Units: "per demand", Lower: d.Lower, Upper: d.Upper, Dist: d,
		Points:      pts,
		Percentiles: [3]float64{d.Quantile(0.05), d.Quantile(0.5), d.Quantile(0.95)},
	}
}

func TestNiceStep(t *testing.T) {
	// Expected steps worked by hand from Heckbert's rule (Graphics Gems,
	// 1990): the raw step span/n rounded to 1, 2 or 5 times a power of ten.
	cases := []struct {
		span float64
		n    int
		want float64
	}{
		{1, 5, 0.2},
		{1, 6, 0.2},
		{0.0066, 6, 0.001},
		{537, 6, 100},
		{0.5282, 6, 0.1},
		{40, 4, 10},
		{3e-5, 3, 1e-5},
	}
	for _, c := range cases {
		if got := niceStep(c.span, c.n); math.Abs(got-c.want) > 1e-12*c.want {
			t.Errorf("niceStep(%v, %d) = %v, want %v", c.span, c.n, got, c.want)
		}
	}
}

func TestTicksAreNiceAndInRange(t *testing.T) {
	ranges := [][2]float64{{0, 1}, {0, 0.5282}, {0.03559, 0.04143}, {10, 500}, {0, 16.5}, {1e-6, 3e-5}, {-2, 3}}
	for _, r := range ranges {
		ts := ticks(r[0], r[1], 6)
		if len(ts) < 2 {
			t.Errorf("ticks(%v, %v): only %d ticks", r[0], r[1], len(ts))
			continue
		}
		step := ts[1].Value - ts[0].Value
		mant := step / math.Pow(10, math.Floor(math.Log10(step)+1e-9))
		if !(near(mant, 1) || near(mant, 2) || near(mant, 5)) {
			t.Errorf("ticks(%v, %v): step %v is not 1, 2 or 5 × 10^k", r[0], r[1], step)
		}
		for i, tk := range ts {
			if tk.Value < r[0]-1e-12 || tk.Value > r[1]+1e-12 {
				t.Errorf("ticks(%v, %v): tick %v outside the range", r[0], r[1], tk.Value)
			}
			if i > 0 && !near((tk.Value-ts[i-1].Value)/step, 1) {
				t.Errorf("ticks(%v, %v): uneven step at %v", r[0], r[1], tk.Value)
			}
			if v, err := strconv.ParseFloat(tk.Label, 64); err != nil || !near(v+1, tk.Value+1) {
				t.Errorf("ticks(%v, %v): label %q does not read as %v", r[0], r[1], tk.Label, tk.Value)
			}
			if strings.Contains(tk.Label, "0000000") || strings.Contains(tk.Label, "9999999") || strings.HasPrefix(tk.Label, "-0") && tk.Value == 0 {
				t.Errorf("ticks(%v, %v): label %q has float noise", r[0], r[1], tk.Label)
			}
		}
	}
}

func near(a, b float64) bool { return math.Abs(a-b) < 1e-9*math.Max(1, math.Abs(b)) }

func TestFormatValue(t *testing.T) {
	cases := []struct {
		in   float64
		want string
	}{
		{0.012, "0.012"},
		{0.1 + 0.2, "0.3"},
		{4.24999, "4.25"},
		{125000, "125000"},
		{1.23456e-7, "1.235e-7"},
		{0, "0"},
		{-0.05, "-0.05"},
		{math.NaN(), "not available"},
		{math.Inf(1), "not available"},
	}
	for _, c := range cases {
		if got := FormatValue(c.in); got != c.want {
			t.Errorf("FormatValue(%v) = %q, want %q", c.in, got, c.want)
		}
	}
	if got := FormatPercent(0.025); got != "2.5%" {
		t.Errorf("FormatPercent(0.025) = %q, want 2.5%%", got)
	}
}

// TestFitPointsAtTheirPixels checks the stated points sit where the axes'
// own tick labels say they should.
func TestFitPointsAtTheirPixels(t *testing.T) {
	cases := []struct {
		d   elicit.ScaledBeta
		pts []Point
	}{
		{sbeta(4.2, 17.9, 0, 1), []Point{{0.06, 0.05}, {0.18, 0.5}, {0.36, 0.95}}},
		{sbeta(3, 5, 10, 500), []Point{{60, 0.1}, {180, 0.5}, {320, 0.9}}},  // a count on [10, 500]
		{sbeta(2000, 50000, 0, 1), []Point{{0.0375, 0.25}, {0.0388, 0.75}}}, // zoomed far in
	}
	for _, c := range cases {
		checkFitPoints(t, c.d, c.pts)
	}
}

func checkFitPoints(t *testing.T, d elicit.ScaledBeta, pts []Point) {
	t.Helper()
	ns := parse(t, render(t, Fit(fitViewOf(d, pts...))))
	var xgrid, pgrid []node
	for _, n := range find(ns, "line", "grid-x") {
		if !n.hasClass("grid") {
			continue
		}
		xgrid = append(xgrid, n)
	}
	for _, n := range find(ns, "line", "grid-y") {
		if strings.HasSuffix(n.Attr["data-value"], "%") {
			pgrid = append(pgrid, n)
		}
	}
	// Each x tick is drawn in both plots; the first half are the density's.
	px := axisMap(t, xgrid[:len(xgrid)/2], "x1", parseNumber)
	py := axisMap(t, pgrid, "y1", parsePercent)
	circles := find(ns, "circle", "stated")
	if len(circles) != len(pts) {
		t.Fatalf("%d stated points drawn, want %d", len(circles), len(pts))
	}
	for i, c := range circles {
		if got, want := c.num(t, "cx"), px(pts[i].X); math.Abs(got-want) > 0.02 {
			t.Errorf("point %d: cx = %v, want %v from the x ticks", i, got, want)
		}
		if got, want := c.num(t, "cy"), py(pts[i].P); math.Abs(got-want) > 0.02 {
			t.Errorf("point %d: cy = %v, want %v from the probability ticks", i, got, want)
		}
		if c.num(t, "data-x") != pts[i].X || c.num(t, "data-p") != pts[i].P {
			t.Errorf("point %d: data-x/data-p = %s/%s, want %v/%v", i, c.Attr["data-x"], c.Attr["data-p"], pts[i].X, pts[i].P)
		}
	}
	// The percentile marks sit at the fitted percentiles.
	marks := find(ns, "line", "percentile")
	if len(marks) != 3 {
		t.Fatalf("%d percentile marks, want 3", len(marks))
	}
	for i, m := range marks {
		want := px(fitViewOf(d).Percentiles[i])
		if got := m.num(t, "x1"); math.Abs(got-want) > 0.02 {
			t.Errorf("percentile mark %d at x %v, want %v", i, got, want)
		}
	}
}

// TestFitCDFPassesThroughMedian checks the drawn CDF against the Beta's
// median, Beta(2, 2) being symmetric about 0.5 (Johnson, Kotz &
// Balakrishnan 1995, ch. 25): the path crosses 50% at x = 0.5.
func TestFitCDFPassesThroughMedian(t *testing.T) {
	d := sbeta(2, 2, 0, 1)
	ns := parse(t, render(t, Fit(fitViewOf(d))))
	var xgrid, pgrid []node
	xgrid = find(ns, "line", "grid-x")
	for _, n := range find(ns, "line", "grid-y") {
		if strings.HasSuffix(n.Attr["data-value"], "%") {
			pgrid = append(pgrid, n)
		}
	}
	px := axisMap(t, xgrid[:len(xgrid)/2], "x1", parseNumber)
	py := axisMap(t, pgrid, "y1", parsePercent)
	cdf := find(ns, "path", "curve-cdf")
	if len(cdf) != 1 {
		t.Fatalf("%d CDF paths, want 1", len(cdf))
	}
	wx, wy := px(0.5), py(0.5)
	best := math.Inf(1)
	for _, pt := range pathSamples(t, cdf[0].Attr["d"], 64) {
		if x, y := pt[0], pt[1]; math.Abs(x-wx) < 0.5 {
			best = math.Min(best, math.Abs(y-wy))
		}
	}
	if best > 1 {
		t.Errorf("CDF path passes %v px from (0.5, 50%%)", best)
	}
}

func TestFitCaptionSaysTheNumbers(t *testing.T) {
	d := sbeta(4.2, 17.9, 0, 1)
	v := fitViewOf(d, Point{0.06, 0.05}, Point{0.18, 0.5})
	ns := parse(t, render(t, Fit(v)))
	caps := find(ns, "figcaption", "")
	descs := find(ns, "desc", "")
	if len(caps) != 1 || len(descs) != 1 {
		t.Fatalf("%d figcaptions and %d desc, want 1 each", len(caps), len(descs))
	}
	for _, want := range []string{
		FormatValue(v.Percentiles[0]), FormatValue(v.Percentiles[1]), FormatValue(v.Percentiles[2]),
		"Failure rate (per demand)", "Beta(α = 4.2, β = 17.9)", "a chance of 5% below 0.06, the curve", "; 50% below 0.18, the curve",
	} {
		if !strings.Contains(caps[0].Text, want) {
			t.Errorf("caption lacks %q: %s", want, caps[0].Text)
		}
		if !strings.Contains(descs[0].Text, want) {
			t.Errorf("desc lacks %q", want)
		}
	}
	svg := find(ns, "svg", "chart-svg")[0]
	if svg.Attr["role"] != "img" || svg.Attr["aria-labelledby"] != "t-title t-desc" {
		t.Errorf("svg role/aria-labelledby = %q/%q", svg.Attr["role"], svg.Attr["aria-labelledby"])
	}
	if len(find(ns, "title", "")) != 1 || find(ns, "title", "")[0].Attr["id"] != "t-title" {
		t.Error("svg has no <title id=t-title>")
	}
	// The table holds the stated and fitted numbers.
	var cells []string
	for _, td := range find(ns, "td", "") {
		cells = append(cells, td.Text)
	}
	joined := strings.Join(cells, "|")
	for _, want := range []string{"0.06", "0.18", FormatValue(d.Quantile(0.05)), FormatPercent(d.CDF(0.06))} {
		if !strings.Contains(joined, want) {
			t.Errorf("table lacks %q: %s", want, joined)
		}
	}
}

func TestExtremeShapesStayFinite(t *testing.T) {
	cases := []struct {
		name string
		d    elicit.ScaledBeta
		cut  bool // the density is infinite at a bound, so the caption says it is cut
		zoom string
	}{
		{"U-shaped", sbeta(0.3, 0.3, 0, 1), true, ""},
		{"J-shaped", sbeta(0.5, 40, 0, 1), true, "stops at"},
		{"very narrow", sbeta(2000, 50000, 0, 1), false, "runs from"},
		{"scaled bounds", sbeta(0.5, 40, 10, 500), true, "stops at"},
		{"uniform", sbeta(1, 1, 0, 1), false, ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d := c.d
			html := render(t, Fit(fitViewOf(d, Point{d.Quantile(0.25), 0.25}, Point{d.Quantile(0.75), 0.75})))
			checkFinite(t, html)
			cap := find(parse(t, html), "figcaption", "")[0].Text
			if got := strings.Contains(cap, "below the curve's peak"); got != c.cut {
				t.Errorf("caption says density cut = %v, want %v: %s", got, c.cut, cap)
			}
			if c.zoom == "" && strings.Contains(cap, "Zoomed") || c.zoom != "" && !strings.Contains(cap, c.zoom) {
				t.Errorf("caption's zoom note, want %q: %s", c.zoom, cap)
			}
			pool, err := elicit.LinearPool([]elicit.ScaledBeta{d, sbeta(3, 9, d.Lower, d.Upper)}, nil)
			if err != nil {
				t.Fatal(err)
			}
			panel := render(t, Panel(PanelView{ID: "p", Quantity: "q", Lower: d.Lower, Upper: d.Upper, Curves: []Curve{
				{Label: "Expert 1", Dist: d},
				{Label: "Expert 2", Dist: sbeta(3, 9, d.Lower, d.Upper)},
				{Label: "Pool", Role: RolePool, Dist: Pool{pool}},
			}}))
			checkFinite(t, panel)
		})
	}
}

func TestInvalidDistributionIsSaidNotDrawn(t *testing.T) {
	html := render(t, Fit(FitView{ID: "x", Lower: 0, Upper: 1, Dist: sbeta(math.NaN(), 2, 0, 1)}))
	if strings.Contains(html, "<svg") || !strings.Contains(html, "not valid") {
		t.Errorf("invalid fit: %s", html)
	}
	if strings.Contains(html, "NaN") {
		t.Errorf("invalid fit writes NaN: %s", html)
	}
}

func TestPanelLineStylesDiffer(t *testing.T) {
	var cs []Curve
	for i := range 6 {
		cs = append(cs, Curve{Label: fmt.Sprintf("Expert %d", i+1), Role: RoleExpert, Dist: sbeta(2+float64(i), 8, 0, 1)})
	}
	cs = append(cs,
		Curve{Label: "Pool", Role: RolePool, Dist: sbeta(4, 8, 0, 1)},
		Curve{Label: "Agreed prior", Role: RoleAgreed, Dist: sbeta(4, 9, 0, 1)},
		Curve{Label: "Consensus", Role: RoleConsensus, Dist: sbeta(4, 10, 0, 1)})
	html := render(t, Panel(PanelView{ID: "p", Quantity: "Response rate", Lower: 0, Upper: 1, Curves: cs}))
	checkFinite(t, html)
	ns := parse(t, html)
	paths := find(ns, "path", "curve-cdf")
	if len(paths) != len(cs) {
		t.Fatalf("%d CDF paths, want %d", len(paths), len(cs))
	}
	seenStyle := map[string]string{}
	seenDash := map[string]int{}
	for i, p := range paths {
		style := p.Attr["stroke"] + " " + p.Attr["stroke-dasharray"] + " " + p.Attr["stroke-width"]
		if other, dup := seenStyle[style]; dup {
			t.Errorf("%s and %s share the style %s", other, p.Attr["data-label"], style)
		}
		seenStyle[style] = p.Attr["data-label"]
		seenDash[p.Attr["stroke-dasharray"]]++
		// Neighbouring experts differ in dash pattern, not only hue.
		if i > 0 && i < 6 && p.Attr["stroke-dasharray"] == paths[i-1].Attr["stroke-dasharray"] {
			t.Errorf("experts %d and %d share a dash pattern", i, i+1)
		}
	}
	if len(seenDash) < 5 {
		t.Errorf("only %d dash patterns among %d curves", len(seenDash), len(cs))
	}
	ew, _ := strconv.ParseFloat(paths[0].Attr["stroke-width"], 64)
	pw, _ := strconv.ParseFloat(paths[6].Attr["stroke-width"], 64)
	if !(pw > ew) {
		t.Errorf("pool width %v not thicker than expert %v", pw, ew)
	}
	// A legend sample per curve, with its label, and a table row per curve.
	samples := find(ns, "line", "legend-sample")
	labels := find(ns, "text", "legend-label")
	if len(samples) != len(cs) || len(labels) != len(cs) {
		t.Fatalf("legend has %d samples and %d labels, want %d", len(samples), len(labels), len(cs))
	}
	for i, c := range cs {
		if labels[i].Text != c.Label || samples[i].Attr["stroke-dasharray"] != paths[i].Attr["stroke-dasharray"] {
			t.Errorf("legend row %d: %q %q, want %q %q", i, labels[i].Text, samples[i].Attr["stroke-dasharray"], c.Label, paths[i].Attr["stroke-dasharray"])
		}
	}
	if rows := find(ns, "tr", ""); len(rows) != len(cs)+1 {
		t.Errorf("table has %d rows, want %d", len(rows), len(cs)+1)
	}
}

// TestPanelMixtureQuantiles checks the table's median of a pool, drawn
// with and without its components, against the closed form: an equal
// mixture of Beta(1, 1) and Beta(2, 1) has CDF (x + x²)/2, whose median
// solves x² + x − 1 = 0, x = (√5 − 1)/2 ≈ 0.618.
func TestPanelMixtureQuantiles(t *testing.T) {
	pool, err := elicit.LinearPool([]elicit.ScaledBeta{sbeta(1, 1, 0, 1), sbeta(2, 1, 0, 1)}, nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, d := range []Distribution{pool, Pool{pool}} {
		m := newPanelModel(PanelView{Lower: 0, Upper: 1, Curves: []Curve{{Label: "Pool", Role: RolePool, Dist: d}}})
		if got, want := m.Legend[0].P50, FormatValue((math.Sqrt(5)-1)/2); got != want {
			t.Errorf("%T: mixture median = %s, want %s", d, got, want)
		}
	}
}

func TestDensityCap(t *testing.T) {
	cases := []struct {
		name    string
		samples []float64
		top     float64
		capped  bool
	}{
		{"bell", []float64{0, 1, 3, 5, 3, 1, 0}, 5, false},
		{"infinite at the bound", []float64{math.Inf(1), 3, 2, 1.5, 1, 0.8, 0.5, 0.2}, 3, true},
		// Upper quartile of the eight samples is 3; 400 > 3·3, so the top is 9.
		{"spike", []float64{400, 3, 2, 1.5, 1, 0.8, 0.5, 0.2}, 9, true},
		{"all zero", []float64{0, 0}, 1, false},
	}
	for _, c := range cases {
		top, capped := densityCap(c.samples)
		if !near(top, c.top) || capped != c.capped {
			t.Errorf("%s: densityCap = %v, %v; want %v, %v", c.name, top, capped, c.top, c.capped)
		}
	}
}

func TestPercentileLabelsDoNotOverlap(t *testing.T) {
	ds := []elicit.ScaledBeta{sbeta(1.5, 6.65, 0, 1), sbeta(0.5, 40, 0, 1), sbeta(0.3, 0.3, 0, 1), sbeta(4.2, 17.9, 0, 1)}
	// And a grid of shapes, U, J and bell, narrow and broad, with labels
	// of four figures and more (common practice, no source: a spread of
	// the shapes experts give).
	shapes := []float64{0.3, 0.5, 1, 2, 5, 20, 100, 3000}
	for _, a := range shapes {
		for _, b := range shapes {
			ds = append(ds, sbeta(a, b, 0, 1), sbeta(a, b, 0, 1000))
		}
	}
	for _, d := range ds {
		m := newFitModel(fitViewOf(d))
		type span struct{ lo, hi float64 }
		for _, dr := range m.Drawings {
			rows := map[string][]span{}
			for _, k := range dr.Marks {
				x, _ := strconv.ParseFloat(k.LabelX, 64)
				w := labelEm(k.Label, true) * percentileLabelPx(dr.Twin.Layout.Name)
				var sp span
				switch k.Anchor {
				case "start":
					sp = span{x, x + w}
				case "end":
					sp = span{x - w, x}
				default:
					sp = span{x - w/2, x + w/2}
				}
				if sp.lo < 0 || sp.hi > dr.Twin.Layout.width() {
					t.Errorf("Beta(%v, %v), %s: label %q runs off the picture", d.Alpha, d.Beta.Beta, dr.Twin.Layout.Name, k.Label)
				}
				for _, o := range rows[k.LabelY] {
					if sp.lo < o.hi && o.lo < sp.hi {
						t.Errorf("Beta(%v, %v): label %q overlaps another on its row", d.Alpha, d.Beta.Beta, k.Label)
					}
				}
				rows[k.LabelY] = append(rows[k.LabelY], sp)
			}
		}
	}
}

// TestShapeAtTheFloorDrawsNoNaN: a Beta with a shape at the floor
// elicit.MinShape (a quick prior of 1e-6 successes in 1 trial) has its
// upper 99.9% point underflow to the smallest double; the picture is then
// drawn on the whole range, with ticks, and no NaN (found in review).
func TestShapeAtTheFloorDrawsNoNaN(t *testing.T) {
	for _, d := range []elicit.ScaledBeta{sbeta(1e-6, 0.999999, 0, 1), sbeta(0.999999, 1e-6, 0, 1), sbeta(1e-6, 1e-6, 0, 1), sbeta(1e-6, 2, 10, 50)} {
		html := render(t, Panel(PanelView{ID: "p", Quantity: "q", Lower: d.Lower, Upper: d.Upper, Curves: []Curve{{Label: "floor", Role: RoleAgreed, Dist: d}}}))
		checkFinite(t, html)
		if !strings.Contains(html, "tick-label") {
			t.Errorf("Beta(%g, %g): no tick labels", d.Alpha, d.Beta.Beta)
		}
		fit := render(t, Fit(FitView{ID: "f", Quantity: "q", Lower: d.Lower, Upper: d.Upper, Dist: d}))
		checkFinite(t, fit)
	}
}

// TestPredictiveBarsAreBounded: a million planned trials draw at most
// maxPredictiveBars bars per layout, each the total probability of its
// group of outcomes, and say so (found in review: a 34 MB page of
// 376,336 bars).
func TestPredictiveBarsAreBounded(t *testing.T) {
	const n = 1_000_000
	pmf, err := elicit.PriorPredictive(elicit.Beta{Alpha: 3, Beta: 57}, n)
	if err != nil {
		t.Fatal(err)
	}
	m := newPredictiveModel(PredictiveView{ID: "p", Trials: n, PMF: pmf, Success: true, SuccessFrom: 0, SuccessTo: 40000})
	if m.Invalid != "" {
		t.Fatal(m.Invalid)
	}
	for _, d := range m.Drawings {
		if len(d.Bars) > maxPredictiveBars || len(d.Bars) < maxPredictiveBars/2 {
			t.Errorf("%d bars, want between %d and %d", len(d.Bars), maxPredictiveBars/2, maxPredictiveBars)
		}
	}
	if !strings.Contains(m.Desc, "Each bar groups") {
		t.Errorf("the description does not say the outcomes are grouped: %q", m.Desc)
	}
	html := render(t, Predictive(PredictiveView{ID: "p", Trials: n, PMF: pmf}))
	checkFinite(t, html)
	if len(html) > 200_000 {
		t.Errorf("the picture is %d bytes", len(html))
	}
	// A small study keeps one bar per outcome.
	small, _ := elicit.PriorPredictive(elicit.Beta{Alpha: 3, Beta: 57}, 50)
	if m := newPredictiveModel(PredictiveView{ID: "s", Trials: 50, PMF: small}); len(m.Drawings[0].Bars) > 51 || strings.Contains(m.Desc, "groups") {
		t.Errorf("50 trials: %d bars, %q", len(m.Drawings[0].Bars), m.Desc)
	}
}

// An expert who typed percentages sees the fit's table, its percentile
// labels and its caption in percentages too, as the read-backs speak;
// the facilitator entering someone's judgement sees it named as theirs.
func TestFitSpeaksInTheExpertsUnitAndPerson(t *testing.T) {
	d := sbeta(4.2, 17.9, 0, 1)
	v := fitViewOf(d, Point{0.06, 0.05}, Point{0.18, 0.5}, Point{0.36, 0.95})
	v.Quantity, v.Units = "failure share", ""
	render := func(v FitView) string {
		var b strings.Builder
		if err := Fit(v).Render(context.Background(), &b); err != nil {
			t.Fatal(err)
		}
		return b.String()
	}
	plain := render(v)
	if !hasCell(plain, "0.06") {
		t.Error("decimals: lacks a cell 0.06")
	}
	for _, want := range []string{"median " + FormatWithin(d.Quantile(0.5), 0, 1, false) + "<", "your answers", "you said", "the curve&#39;s chance below yours", "best matches your answers", "you gave a chance of"} {
		if !strings.Contains(plain, want) {
			t.Errorf("decimals: lacks %q", want)
		}
	}
	v.Percent = true
	pct := render(v)
	for _, want := range []string{"6%", "36%"} {
		if !hasCell(pct, want) {
			t.Errorf("percent: lacks a cell %q", want)
		}
	}
	for _, want := range []string{"median " + FormatWithin(d.Quantile(0.5), 0, 1, true) + "<", ">" + FormatWithin(d.Quantile(0.95), 0, 1, true) + "</td>", "a chance of 5% below 6%"} {
		if !strings.Contains(pct, want) {
			t.Errorf("percent: lacks %q", want)
		}
	}
	if hasCell(pct, "0.06") {
		t.Error("percent: the table still says 0.06")
	}
	// The axis too: its ticks and the note under it.
	if !strings.Contains(plain, "short of the upper bound 1.") || !strings.Contains(pct, "short of the upper bound 100%.") {
		t.Error("the zoom note does not follow the expert's unit")
	}
	if !regexp.MustCompile(`class="tick-label"[^>]*>20%</text>`).MatchString(pct) || regexp.MustCompile(`class="tick-label"[^>]*>0\.2</text>`).MatchString(pct) {
		t.Error("percent: the x axis's ticks are not percentages")
	}
	v.Whose = "Priya Raman"
	named := render(v)
	for _, want := range []string{"Priya Raman&#39;s answers", "Priya Raman said", "the curve&#39;s chance below that", "best matches Priya Raman&#39;s answers", "Priya Raman gave a chance of", "Priya Raman thinks"} {
		if !strings.Contains(named, want) {
			t.Errorf("on behalf: lacks %q", want)
		}
	}
	for _, you := range []string{"your ", "you said", "Your ", "yours", "you think", "you gave"} {
		if strings.Contains(named, you) {
			t.Errorf("on behalf: still says %q", you)
		}
	}
}

// The panel's caption names its plots by their axis titles ("density",
// "chance below"), as an expert reads them on their own page, not as
// "cumulative probabilities".
func TestPanelCaptionUsesTheAxesWords(t *testing.T) {
	html := render(t, Panel(PanelView{ID: "p", Quantity: "Response rate", Lower: 0, Upper: 1,
		Curves: []Curve{{Label: "Expert A", Role: RoleExpert, Dist: sbeta(2, 8, 0, 1)}}}))
	if !strings.Contains(html, "Density (upper plot) and chance below each value (lower plot) of Response rate") ||
		strings.Contains(html, "cumulative") || !strings.Contains(html, ">chance below<") {
		t.Errorf("the caption does not name the plots as their axes do:\n%s", html)
	}
}

// A percentile's label on the picture gives the number its table row
// gives, to the same figures, in each layout: it said "median 0.198"
// beside the table's 0.1979.
func TestPercentileLabelsMatchTheTable(t *testing.T) {
	for _, d := range []elicit.ScaledBeta{sbeta(2.75, 10.16, 0, 1), sbeta(1.5, 6.65, 0, 1), sbeta(40, 3, 0, 1), sbeta(4.2, 17.9, 0, 100)} {
		m := newFitModel(fitViewOf(d))
		for _, dr := range m.Drawings {
			if len(dr.Marks) != 3 {
				t.Fatalf("Beta(%v, %v), %s: %d percentile marks", d.Alpha, d.Beta.Beta, dr.Twin.Layout.Name, len(dr.Marks))
			}
			for i, k := range dr.Marks {
				if want := [3]string{"5%", "median", "95%"}[i] + " " + m.Pcts[i]; k.Label != want {
					t.Errorf("Beta(%v, %v), %s: label %q, the table gives %q", d.Alpha, d.Beta.Beta, dr.Twin.Layout.Name, k.Label, want)
				}
			}
		}
	}
}

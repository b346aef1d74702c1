package chart

import (
	"math"
	"regexp"
	"strings"
	"testing"
)

// The predictive picture draws one bar per outcome in its window, taller
// for likelier outcomes, the successful ones darker; outcomes whose tails
// hold under predictiveTail are left out and the caption says so.
func TestPredictiveBars(t *testing.T) {
	// A symmetric pmf over 0…20 with tiny tails at both ends.
	pmf := make([]float64, 21)
	total := 0.0
	for x := range pmf {
		pmf[x] = math.Exp(-0.5 * math.Pow(float64(x-10)/2.5, 2))
		total += pmf[x]
	}
	for x := range pmf {
		pmf[x] /= total
	}
	html := render(t, Predictive(PredictiveView{ID: "p", Trials: 20, PMF: pmf, Success: true, SuccessFrom: 0, SuccessTo: 8}))
	checkFinite(t, html)
	ns := parse(t, html)
	bars := find(ns, "rect", "bar")
	dark := find(ns, "rect", "bar-success")
	if len(bars) < 11 || len(bars) > 21 || len(bars)%2 == 0 {
		t.Fatalf("%d bars for a symmetric window about 10", len(bars))
	}
	lo := 10 - len(bars)/2
	if want := 8 - lo + 1; len(dark) != want {
		t.Errorf("%d dark bars, want %d (outcomes %d to 8)", len(dark), want, lo)
	}
	// The tallest bar is the middle one, at 10.
	mid := bars[len(bars)/2]
	for _, b := range bars {
		if b.num(t, "height") > mid.num(t, "height")+1e-9 {
			t.Errorf("a bar taller than the mode's")
		}
	}
	if lo > 0 && !strings.Contains(html, "Outcomes from") {
		t.Error("the caption does not say which outcomes are drawn")
	}
	if got := render(t, Predictive(PredictiveView{ID: "p"})); !strings.Contains(got, "chart-invalid") {
		t.Error("an empty distribution is drawn")
	}
}

// The assurance curve has a dot per number of trials, at its height, and
// the planned number marked.
func TestAssuranceCurve(t *testing.T) {
	v := AssuranceView{ID: "a", Trials: []int{10, 20, 30, 40}, Assurance: []float64{0, 0.25, 0.5, 1}, Planned: 40}
	html := render(t, Assurance(v))
	checkFinite(t, html)
	ns := parse(t, html)
	dots := find(ns, "circle", "assurance-dot")
	if len(dots) != 4 {
		t.Fatalf("%d dots", len(dots))
	}
	// Heights are linear in assurance: the 0.5 dot halfway between 0 and 1.
	y0, y5, y1 := dots[0].num(t, "cy"), dots[2].num(t, "cy"), dots[3].num(t, "cy")
	if math.Abs((y0+y1)/2-y5) > 0.02 {
		t.Errorf("dots at %v, %v, %v", y0, y5, y1)
	}
	if len(find(ns, "line", "planned-mark")) != 1 || !strings.Contains(html, "planned: 40") {
		t.Error("the planned trials are not marked")
	}
	if got := render(t, Assurance(AssuranceView{ID: "a", Trials: []int{1}})); !strings.Contains(got, "chart-invalid") {
		t.Error("a curve without values is drawn")
	}
}

// Intervals draws a row per prior, its line from the interval's low to
// high end and a dot at its mean; the emphasised row heavier.
func TestIntervalsRows(t *testing.T) {
	v := IntervalsView{ID: "i", XTitle: "posterior proportion", Rows: []IntervalRow{
		{Label: "A", Mean: 0.2, Lo: 0.1, Hi: 0.3},
		{Label: "A very long name that must be shortened", Mean: 0.25, Lo: 0.2, Hi: 0.35},
		{Label: "Agreed prior", Mean: 0.22, Lo: 0.15, Hi: 0.3, Emphasis: true},
	}}
	for _, lay := range []string{"wide", "compact"} {
		html := renderLayout(t, Intervals(v), lay)
		checkFinite(t, html)
		ns := parse(t, html)
		lines, means := find(ns, "line", "interval-line"), find(ns, "circle", "interval-mean")
		if len(lines) != 3 || len(means) != 3 {
			t.Fatalf("%s: %d lines, %d means", lay, len(lines), len(means))
		}
		for i, l := range lines {
			x1, x2, m := l.num(t, "x1"), l.num(t, "x2"), means[i].num(t, "cx")
			if !(x1 < m && m < x2) {
				t.Errorf("%s row %d: mean at %v outside %v–%v", lay, i, m, x1, x2)
			}
		}
		if lines[2].Attr["stroke-width"] != "4" {
			t.Errorf("%s: the agreed prior is not drawn heavier", lay)
		}
		// Wide: the label beside the line, on two lines; compact (a
		// phone): the whole label on its own line above the interval.
		switch {
		case lay == "wide" && !regexp.MustCompile(`>A very long name that</tspan><tspan [^>]*>must be shortened</tspan>`).MatchString(html):
			t.Errorf("%s: the long label is not on two lines", lay)
		case lay == "compact" && !strings.Contains(html, "A very long name that must be shortened</text>"):
			t.Errorf("%s: the long label is cut on a phone", lay)
		}
	}
}

// The assurance curve's description counts its first number of trials in
// the singular when it is 1 (every plan of at most 40 trials starts there).
func TestAssuranceDescriptionSingularTrial(t *testing.T) {
	v := AssuranceView{ID: "a", Trials: []int{1, 2, 3}, Assurance: []float64{0, 0.2, 0.4}, Planned: 3}
	html := render(t, Assurance(v))
	if !strings.Contains(html, "0% at 1 trial and 40% at 3") || strings.Contains(html, "1 trials") {
		t.Error("the description says \"1 trials\"")
	}
}

// A label too long for the intervals' wide column breaks before its
// bracket, or else at its last space that fits, never inside a word; one
// that fits, or has no such space, stays one line.
func TestSplitLabel(t *testing.T) {
	for _, c := range []struct {
		in            string
		first, second string
		ok            bool
	}{
		{"Performance-weight pool (suggested)", "Performance-weight pool", "(suggested)", true},
		{"Equal-weight pool", "Equal-weight pool", "", false},
		{"Custom-weight pool (in force)", "Custom-weight pool", "(in force)", true},
		{"Anneliese Oberhauser-Lindqvist", "Anneliese", "Oberhauser-Lindqvist", true},
		{"Anneliese-Katharina-Oberhauser", "Anneliese-Katharina-Oberhauser", "", false},
	} {
		f, s, ok := splitLabel(c.in, 24)
		if f != c.first || s != c.second || ok != c.ok {
			t.Errorf("splitLabel(%q) = %q, %q, %v; want %q, %q, %v", c.in, f, s, ok, c.first, c.second, c.ok)
		}
	}
}

// Two labels on two lines one above the other ("Custom-weight pool (in
// force)" and "Performance-weight pool (suggested)" beside each other
// when custom weights are in force) read as two: each label's second
// line lies nearer its own first line than the next label's first line.
func TestTwoLineLabelsReadAsTheirRows(t *testing.T) {
	v := IntervalsView{ID: "i", XTitle: "posterior proportion", Rows: []IntervalRow{
		{Label: "Equal-weight pool", Mean: 0.04, Lo: 0.02, Hi: 0.07},
		{Label: "Custom-weight pool (in force)", Mean: 0.045, Lo: 0.02, Hi: 0.08},
		{Label: "Performance-weight pool (suggested)", Mean: 0.042, Lo: 0.016, Hi: 0.08},
		{Label: "Agreed prior", Mean: 0.044, Lo: 0.018, Hi: 0.08, Emphasis: true},
	}}
	html := render(t, Intervals(v))
	var lines []float64 // the baseline of every line of every label, in order
	var firsts []int    // the index in lines of each label's first line
	for _, m := range regexp.MustCompile(`(?s)<text class="interval-label[^"]*"[^>]* y="([0-9.]+)"[^>]*>(.*?)</text>`).FindAllStringSubmatch(html, -1) {
		firsts = append(firsts, len(lines))
		spans := regexp.MustCompile(`<tspan [^>]*y="([0-9.]+)"`).FindAllStringSubmatch(m[2], -1)
		if len(spans) == 0 {
			lines = append(lines, parseNumber(m[1]))
		}
		for _, s := range spans {
			lines = append(lines, parseNumber(s[1]))
		}
	}
	if len(firsts) != 4 || len(lines) != 6 {
		t.Fatalf("%d labels in %d lines, want 4 in 6", len(firsts), len(lines))
	}
	for _, k := range []int{1, 2} {
		i := firsts[k]
		within, apart := lines[i+1]-lines[i], lines[firsts[k+1]]-lines[i+1]
		if !(apart > within+6) {
			t.Errorf("%q: its lines %.0f apart, its second line %.0f from the next label", v.Rows[k].Label, within, apart)
		}
	}
}

// A predictive distribution on one outcome (all of it on 10 successes in
// 10 trials, as under Beta(1e7, 1)) draws one bar in a window of one
// outcome, whose axis is ticked in tenths: the one whole tick kept is
// labelled as the count it is, "10", not "10.0".
func TestPredictiveOneBarIsLabelledAsACount(t *testing.T) {
	pmf := make([]float64, 11)
	pmf[10] = 1
	html := render(t, Predictive(PredictiveView{ID: "p", Trials: 10, PMF: pmf}))
	labels := regexp.MustCompile(`class="tick-label" [^>]*>([^<]*)<`).FindAllStringSubmatch(html, -1) // the x axis's
	if len(labels) == 0 {
		t.Fatal("the one bar's axis has no tick labels")
	}
	for _, l := range labels {
		if l[1] != "10" {
			t.Errorf("tick labelled %q on a count axis of one outcome, 10", l[1])
		}
	}
}

package chart

import (
	stdhtml "html"
	"math"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// TestWeightMapPlacesExperts checks the weight map's geometry against its
// own tick labels: calibration across on a log scale, information up on
// a linear one, disc area in proportion to weight, the cut-off at α with
// the region below it shaded.
func TestWeightMapPlacesExperts(t *testing.T) {
	v := ScoresView{Alpha: 0.1, Rows: []ScoreRow{
		{Expert: "Expert A", Calibration: 1, Information: 2, Weight: 0.5},
		{Expert: "Expert B", Calibration: 0.1, Information: 1, Weight: 0.125},
		{Expert: "Expert C", Calibration: 0.01, Information: 0.5, Weight: 0},
	}, Pooled: &ScoreRow{Calibration: 0.5, Information: 1.5}}
	html := render(t, Scores(v))
	checkFinite(t, html)
	ns := parse(t, html)
	xt := find(ns, "line", "grid-x")
	x := axisMap(t, xt, "x1", func(s string) float64 { return math.Log10(parseNumber(s)) })
	y := axisMap(t, find(ns, "line", "grid-y"), "y1", parseNumber)
	discs := find(ns, "circle", "map-expert")
	if len(discs) != 3 {
		t.Fatalf("%d discs, want 3", len(discs))
	}
	radius := map[string]float64{}
	for i, d := range discs {
		cal, info := parseNumber(d.Attr["data-calibration"]), parseNumber(d.Attr["data-information"])
		if got, want := d.num(t, "cx"), x(math.Log10(cal)); math.Abs(got-want) > 0.02 {
			t.Errorf("disc %d: cx %v, want %v for calibration %v", i, got, want, cal)
		}
		if got, want := d.num(t, "cy"), y(info); math.Abs(got-want) > 0.02 {
			t.Errorf("disc %d: cy %v, want %v for information %v", i, got, want, info)
		}
		radius[d.Attr["data-weight"]] = d.num(t, "r")
		if w := parseNumber(d.Attr["data-weight"]); (w > 0) != d.hasClass("map-weighted") {
			t.Errorf("disc %d with weight %v has class %q", i, w, d.Attr["class"])
		}
	}
	// Area ∝ weight: a quarter of the weight, half the radius.
	if r1, r2 := radius["0.5"], radius["0.125"]; math.Abs(r1/r2-2) > 0.01 {
		t.Errorf("radii %v and %v for weights 0.5 and 0.125, want 2:1", r1, r2)
	}
	cut := find(ns, "line", "map-cut")
	if len(cut) != 1 || math.Abs(cut[0].num(t, "x1")-x(-1)) > 0.02 {
		t.Fatalf("cut-off line %+v, want at x(0.1) = %v", cut, x(-1))
	}
	shade := find(ns, "rect", "map-below-cut")
	area := find(ns, "rect", "plot-area")
	if len(shade) != 1 || math.Abs(shade[0].num(t, "x")+shade[0].num(t, "width")-x(-1)) > 0.02 || shade[0].num(t, "x") != area[0].num(t, "x") {
		t.Errorf("shade %+v does not run from the plot's left edge to the cut-off", shade)
	}
	if len(find(ns, "path", "map-pool")) != 1 {
		t.Error("no diamond for the weighted pool")
	}
	for _, want := range []string{"Expert A · 50%", "Expert B · 12.5%", "Expert C · 0%", "cut-off α = 0.1", "weighted pool",
		"Experts left of the cut-off α = 0.1 get weight 0", "calibration 0.5, information 1.5"} {
		if !strings.Contains(html, want) {
			t.Errorf("weight map lacks %q", want)
		}
	}
}

// labelBoxes estimates the boxes of the map's labels from their anchor
// and length, at the widest the CSS draws them.
func labelBoxes(t *testing.T, ns []node) []labelBox {
	var out []labelBox
	for _, n := range ns {
		if n.Name != "text" || !(n.hasClass("map-label") || n.hasClass("map-cut-label")) {
			continue
		}
		// As static/chart.css draws them: the experts' labels at 15px on
		// a phone, the pool's bold, the cut-off's at 14px bold.
		w := labelEm(n.Text, n.hasClass("map-label-pool")) * 15
		if n.hasClass("map-cut-label") {
			w = labelEm(n.Text, true) * 14
		}
		x, y := n.num(t, "x"), n.num(t, "y")
		b := labelBox{y0: y - 14, y1: y + 4}
		switch n.Attr["text-anchor"] {
		case "end":
			b.x0, b.x1 = x-w, x
		case "middle":
			b.x0, b.x1 = x-w/2, x+w/2
		default:
			b.x0, b.x1 = x, x+w
		}
		out = append(out, b)
	}
	return out
}

// TestWeightMapLabelsDoNotCollide: experts with the same scores (a
// common case on few calibration questions) get labels that neither
// overlap nor leave the picture.
func TestWeightMapLabelsDoNotCollide(t *testing.T) {
	var rows []ScoreRow
	for i := 0; i < 8; i++ {
		rows = append(rows, ScoreRow{Expert: "Invented expert " + strconv.Itoa(i+1), Calibration: 0.8, Information: 0.2, Weight: 0.125})
	}
	rows = append(rows, ScoreRow{Expert: "Far right", Calibration: 1, Information: 0.21, Weight: 0})
	html := render(t, Scores(ScoresView{Alpha: 0.5, Rows: rows, Pooled: &ScoreRow{Calibration: 0.8, Information: 0.2}}))
	checkFinite(t, html)
	ns := parse(t, html)
	boxes := labelBoxes(t, ns)
	if len(boxes) != len(rows)+2 {
		t.Fatalf("%d labels, want %d", len(boxes), len(rows)+2)
	}
	width := mapLeft + mapWidth + mapRight
	for i, a := range boxes {
		if a.x0 < 0 || a.x1 > width || a.y0 < 0 {
			t.Errorf("label %d at [%v, %v] × [%v, %v] leaves the picture", i, a.x0, a.x1, a.y0, a.y1)
		}
		for j, b := range boxes[:i] {
			if a.overlaps(b) {
				t.Errorf("labels %d and %d overlap", j, i)
			}
		}
	}
	if n := len(find(ns, "line", "map-leader")); n == 0 {
		t.Error("labels moved away from their discs without a leader line")
	}
}

func TestWeightMapRefusesBrokenNumbers(t *testing.T) {
	html := render(t, Scores(ScoresView{Alpha: math.NaN(), Rows: []ScoreRow{
		{Expert: "Broken", Calibration: math.NaN(), Information: math.Inf(1), Weight: 2},
		{Expert: "Fine", Calibration: 1e-30, Information: 1, Weight: 1},
	}, Pooled: &ScoreRow{Calibration: math.Inf(1)}}))
	checkFinite(t, html)
	if strings.Contains(html, "Broken") {
		t.Error("an expert with broken scores was drawn")
	}
	// A score below the lowest decade drawn sits on the left edge and
	// says its value.
	if !strings.Contains(html, "Fine · 100% (calibration 1e-30)") || !strings.Contains(html, `data-clipped="true"`) {
		t.Error("a tiny calibration score is not marked")
	}
	if strings.Contains(html, "map-pool") {
		t.Error("a pool with broken scores was drawn")
	}
	if !strings.Contains(render(t, Scores(ScoresView{})), "No calibration scores yet") {
		t.Error("an empty map does not say so")
	}
}

func TestSteadinessDrawsEachRerun(t *testing.T) {
	v := SteadinessView{Targets: []SteadinessTarget{{
		Title: "Q1 invented failure share", Lower: 0, Upper: 1, Full: [3]float64{0.02, 0.05, 0.12},
		Rows: []SteadinessRow{
			{Label: "without Q2", Pool: &[3]float64{0.03, 0.06, 0.15}, Shift: 0.03},
			{Label: "without an expert whose name is long", Pool: &[3]float64{0.01, 0.04, 0.10}, Shift: 0.02},
			{Label: "without Q3", Note: "no expert with weight left"},
		},
	}}}
	html := render(t, Steadiness(v))
	checkFinite(t, html)
	ns := parse(t, html)
	x := axisMap(t, find(ns, "line", "grid-x"), "x1", parseNumber)
	lines := find(ns, "line", "steady-interval")
	if len(lines) != 3 {
		t.Fatalf("%d intervals, want the whole panel's and two reruns'", len(lines))
	}
	for i, l := range lines {
		if math.Abs(l.num(t, "x1")-x(parseNumber(l.Attr["data-p05"]))) > 0.02 || math.Abs(l.num(t, "x2")-x(parseNumber(l.Attr["data-p95"]))) > 0.02 {
			t.Errorf("interval %d at %v–%v, not at its percentiles", i, l.Attr["x1"], l.Attr["x2"])
		}
	}
	band := find(ns, "rect", "steady-band")
	if len(band) != 1 || math.Abs(band[0].num(t, "x")-x(0.02)) > 0.02 || math.Abs(band[0].num(t, "x")+band[0].num(t, "width")-x(0.12)) > 0.02 {
		t.Errorf("band %+v, want the whole panel's 0.02 to 0.12", band)
	}
	for _, want := range []string{"whole panel", "no expert with weight left", "0.03", "The largest is 0.03, without Q2.", "without an expert whose…"} {
		if !strings.Contains(html, want) {
			t.Errorf("steadiness lacks %q", want)
		}
	}
	if !strings.Contains(render(t, Steadiness(SteadinessView{Targets: []SteadinessTarget{{Title: "Q9", Lower: 0, Upper: 1, Full: [3]float64{math.NaN(), 0, 0}}}})),
		"no performance-weighted pool on Q9") {
		t.Error("a target without a pool is not said")
	}
}

// A cut-off fixed at a score as the page writes it (0.1878 for 0.187753)
// lies above that score, and the picture's words must keep the score
// below it: "cut-off α = 0.1878" beside "calibration 0.1878, weight 0%"
// would contradict itself (elicit.SideDigits). The words write the
// table's four figures (TestWeightMapWritesTheTablesScores in web).
func TestWeightMapWordsKeepScoresBelowTheCutOff(t *testing.T) {
	v := ScoresView{Alpha: 0.1878, Rows: []ScoreRow{
		{Expert: "Expert A", Calibration: 0.8392, Information: 0.2, Weight: 1},
		{Expert: "Expert B", Calibration: 0.187753, Information: 0.15, Weight: 0},
	}}
	html := render(t, Scores(v))
	for _, want := range []string{"α = 0.1878 get weight 0", "Expert B: calibration 0.18775, information 0.15, weight 0%", "Expert A: calibration 0.8392,"} {
		if !strings.Contains(html, want) {
			t.Errorf("the weight map's words lack %q", want)
		}
	}
	// The cut-off too takes the figures that keep it above the score
	// below it: 0.18744 and 0.18741 both read 0.1874 to four figures; the
	// cut-off is 0.18744, the score 0.1874.
	v.Alpha, v.Rows[1].Calibration = 0.18744, 0.18741
	html = render(t, Scores(v))
	for _, want := range []string{"cut-off α = 0.18744", "α = 0.18744 get weight 0", "Expert B: calibration 0.1874,"} {
		if !strings.Contains(html, want) {
			t.Errorf("the weight map's words lack %q", want)
		}
	}
}

// TestWeightMapLabelsKeepOffTheDiscs: the invented demo's map wrote
// "weighted pool" over Priya Raman's disc (calibration 0.1878,
// information 0.1573), which sits just left of the pool's diamond: a
// label kept off the other labels but not off the discs. Every label now
// keeps off every disc and the diamond.
func TestWeightMapLabelsKeepOffTheDiscs(t *testing.T) {
	v := ScoresView{Alpha: 0.8392, Rows: []ScoreRow{ // the demo's scores, as the page gives them
		{Expert: "Ines Varga", Calibration: 0.8392, Information: 0.2078, Weight: 1},
		{Expert: "Tomas Lindqvist", Calibration: 0.808, Information: 0.168},
		{Expert: "Priya Raman", Calibration: 0.1878, Information: 0.1573},
		{Expert: "Ole Brandt", Calibration: 0.0003602, Information: 2.656},
	}, Pooled: &ScoreRow{Calibration: 0.8392, Information: 0.2078}}
	ns := parse(t, render(t, Scores(v)))
	var marks []labelBox
	for _, c := range find(ns, "circle", "map-expert") {
		x, y, r := c.num(t, "cx"), c.num(t, "cy"), c.num(t, "r")
		marks = append(marks, labelBox{x0: x - r, x1: x + r, y0: y - r, y1: y + r})
	}
	if len(marks) != 4 {
		t.Fatalf("%d discs, want 4", len(marks))
	}
	for _, l := range labelBoxes(t, ns) {
		for i, m := range marks {
			if l.overlaps(m) {
				t.Errorf("a label at [%.0f, %.0f] × [%.0f, %.0f] lies over %s's disc", l.x0, l.x1, l.y0, l.y1, v.Rows[i].Expert)
			}
		}
	}
}

// TestWeightMapKeepsNearlyAgreeingDiscsApart: two experts whose scores
// nearly agree drew one disc over the other; both labels were reached by
// leader lines, but one disc was hidden. Each disc's centre now lies
// outside every other disc as drawn (stroke and all), the discs moved up
// or down only (across, each stays at its calibration score, on its own
// side of the cut-off), in the order of their information scores, by no
// more than the caption states, and the caption's scores stay exact. The
// rows are invented.
func TestWeightMapKeepsNearlyAgreeingDiscsApart(t *testing.T) {
	for _, c := range []struct {
		name string
		rows []ScoreRow
	}{
		{"two weighted", []ScoreRow{
			{Expert: "Invented A", Calibration: 0.5, Information: 1.2, Weight: 0.5},
			{Expert: "Invented B", Calibration: 0.5001, Information: 1.201, Weight: 0.49},
			{Expert: "Invented C", Calibration: 0.05, Information: 0.4, Weight: 0},
		}},
		{"two left out, on the axis", []ScoreRow{
			{Expert: "Invented A", Calibration: 0.9, Information: 1.5, Weight: 1},
			{Expert: "Invented B", Calibration: 0.01, Information: 0, Weight: 0},
			{Expert: "Invented C", Calibration: 0.0101, Information: 0.001, Weight: 0},
		}},
		{"four alike", []ScoreRow{
			{Expert: "Invented A", Calibration: 0.8, Information: 0.2, Weight: 0.25},
			{Expert: "Invented B", Calibration: 0.8, Information: 0.2, Weight: 0.25},
			{Expert: "Invented C", Calibration: 0.8, Information: 0.2, Weight: 0.25},
			{Expert: "Invented D", Calibration: 0.8, Information: 0.2, Weight: 0.25},
			{Expert: "Invented E", Calibration: 0.02, Information: 1.1, Weight: 0},
		}},
		{"two left out, beside a weighted one", []ScoreRow{
			{Expert: "Invented A", Calibration: 0.7, Information: 0.8, Weight: 1},
			{Expert: "Invented B", Calibration: 0.69, Information: 0.79, Weight: 0},
			{Expert: "Invented C", Calibration: 0.695, Information: 0.8, Weight: 0},
		}},
	} {
		html := render(t, Scores(ScoresView{Alpha: 0.1, Rows: c.rows}))
		checkFinite(t, html)
		ns := parse(t, html)
		x := axisMap(t, find(ns, "line", "grid-x"), "x1", func(s string) float64 { return math.Log10(parseNumber(s)) })
		y := axisMap(t, find(ns, "line", "grid-y"), "y1", parseNumber)
		discs := find(ns, "circle", "map-expert")
		if len(discs) != len(c.rows) {
			t.Fatalf("%s: %d discs, want %d", c.name, len(discs), len(c.rows))
		}
		// The largest move, in information score, that the caption states.
		m := regexp.MustCompile(`drawn apart, up or down only, by at most ([0-9.e-]+) in information score`).FindStringSubmatch(html)
		stated := 0.0
		if m == nil {
			t.Errorf("%s: the caption does not say the discs were moved apart", c.name)
		} else {
			stated = parseNumber(m[1])
		}
		pxPerInfo := math.Abs(y(0) - y(1))
		for i, a := range discs {
			cal, info := parseNumber(a.Attr["data-calibration"]), parseNumber(a.Attr["data-information"])
			if got, want := a.num(t, "cx"), x(math.Log10(cal)); math.Abs(got-want) > 0.02 {
				t.Errorf("%s: disc %d moved across: cx %v, want %v", c.name, i, got, want)
			}
			if moved := math.Abs(a.num(t, "cy") - y(info)); moved > stated*pxPerInfo+0.02 {
				t.Errorf("%s: disc %d moved %v in information score, the caption says at most %v", c.name, i, moved/pxPerInfo, stated)
			}
			for j, b := range discs[:i] {
				if !(b.num(t, "r") > 0.6*a.num(t, "r") && a.num(t, "r") > 0.6*b.num(t, "r")) {
					// Only discs of like size hide each other; a small one
					// is drawn on top of a large one (below).
					continue
				}
				if bi := parseNumber(b.Attr["data-information"]); (bi > info && b.num(t, "cy") > a.num(t, "cy")) || (bi < info && b.num(t, "cy") < a.num(t, "cy")) {
					t.Errorf("%s: discs %d and %d are drawn in the other order up the plot from their information scores", c.name, j, i)
				}
				d := math.Hypot(a.num(t, "cx")-b.num(t, "cx"), a.num(t, "cy")-b.num(t, "cy"))
				drawn := func(n node) float64 { return n.num(t, "r") + n.num(t, "stroke-width")/2 }
				if d <= drawn(a) || d <= drawn(b) {
					t.Errorf("%s: disc %d's centre and disc %d's are %.1f apart, inside a disc of radius %.1f or %.1f as drawn",
						c.name, j, i, d, drawn(b), drawn(a))
				}
			}
		}
		// Nor does the shaded region's "weight 0" lie over a disc moved up.
		for _, n := range find(ns, "text", "map-note") {
			note := labelBox{x0: n.num(t, "x"), x1: n.num(t, "x") + labelEm(n.Text, false)*13, y0: n.num(t, "y") - 14, y1: n.num(t, "y") + 4}
			for i, d := range discs {
				x, y, r := d.num(t, "cx"), d.num(t, "cy"), d.num(t, "r")
				if note.overlaps(labelBox{x0: x - r, x1: x + r, y0: y - r, y1: y + r}) {
					t.Errorf("%s: %q lies over disc %d", c.name, n.Text, i)
				}
			}
		}
		for _, r := range c.rows {
			if want := r.Expert + ": calibration " + formatScore(r.Calibration) + ", information " + formatSig(r.Information, scoreFigures); !strings.Contains(html, want) {
				t.Errorf("%s: the caption lacks %q", c.name, want)
			}
		}
	}
	// A small disc on a large one (the invented demo's weight-0 ring on
	// the disc with all the weight) is drawn on top of it, at its own
	// place: it shows whole there, and moving it would misstate its
	// information score.
	html := render(t, Scores(ScoresView{Alpha: 0.1, Rows: []ScoreRow{
		{Expert: "Invented A", Calibration: 0.84, Information: 0.21, Weight: 1},
		{Expert: "Invented B", Calibration: 0.835, Information: 0.205, Weight: 0},
	}}))
	ns := parse(t, html)
	y := axisMap(t, find(ns, "line", "grid-y"), "y1", parseNumber)
	discs := find(ns, "circle", "map-expert")
	if len(discs) != 2 || discs[0].num(t, "r") <= discs[1].num(t, "r") {
		t.Fatalf("small on large: %d discs, want the large one drawn first", len(discs))
	}
	for i, d := range discs {
		if got, want := d.num(t, "cy"), y(parseNumber(d.Attr["data-information"])); math.Abs(got-want) > 0.02 {
			t.Errorf("small on large: disc %d drawn at %v, its score puts it at %v", i, got, want)
		}
	}
	if strings.Contains(html, "drawn apart") {
		t.Error("small on large: the caption says discs were moved")
	}

	// Experts far apart are drawn where their scores put them, and the
	// caption says nothing of moving them.
	html = render(t, Scores(ScoresView{Alpha: 0.1, Rows: []ScoreRow{
		{Expert: "Invented A", Calibration: 0.9, Information: 1.5, Weight: 0.6},
		{Expert: "Invented B", Calibration: 0.2, Information: 0.3, Weight: 0.4},
	}}))
	if strings.Contains(html, "drawn apart") {
		t.Error("discs far apart are said to be moved")
	}
}

// TestWeightMapLabelsFitAsDrawn: the map placed its labels at an even
// 8.6 units a character, which DejaVu Sans at 15px (a phone) exceeds for
// digits (9.6), the percent sign (14.4) and capitals (up to 14.9): a
// name of wide capitals with its weight, placed to the right of a disc
// where that estimate said it fitted, ran off the picture's right edge,
// and two such labels one above the other ran into each other. Every
// label is now measured as labelBoxes measures it (labelEm).
func TestWeightMapLabelsFitAsDrawn(t *testing.T) {
	width := mapLeft + mapWidth + mapRight
	for k := 0; k <= 60; k++ {
		c := math.Pow(10, -12+12*float64(k)/60)
		rows := []ScoreRow{
			{Expert: "WMW MWMW-WMWM", Calibration: c, Information: 0.5, Weight: 0.5},
			{Expert: "MWM WMWM-MWMW", Calibration: c, Information: 0.52, Weight: 0.5},
		}
		ns := parse(t, render(t, Scores(ScoresView{Alpha: 1e-13, Rows: rows})))
		boxes := labelBoxes(t, ns)
		for i, a := range boxes {
			if a.x0 < 0 || a.x1 > width {
				t.Errorf("calibration %.3g: label %d at [%.1f, %.1f] leaves the picture [0, %v]", c, i, a.x0, a.x1, width)
			}
			for j, b := range boxes[:i] {
				if a.overlaps(b) {
					t.Errorf("calibration %.3g: labels %d and %d overlap", c, j, i)
				}
			}
		}
	}
}

// TestWeightMapOpensWhereItsCutOffIs: on a phone the map is wider than
// the screen and opens at its right end, where the experts who earn
// weight stand; only a cut-off whose label the left end shows, and the
// right end does not, opens it at its left end. The hint above it says
// which way the rest lies, and a cut-off of 0 (no one left out) is not
// brought into view. The scores are the demo's; the cut-offs are those
// a facilitator may fix.
func TestWeightMapOpensWhereItsCutOffIs(t *testing.T) {
	rows := []ScoreRow{
		{Expert: "Ines Varga", Calibration: 0.8392, Information: 0.2078, Weight: 0.5},
		{Expert: "Tomas Lindqvist", Calibration: 0.808, Information: 0.168, Weight: 0.4},
		{Expert: "Priya Raman", Calibration: 0.1878, Information: 0.1573, Weight: 0.1},
		{Expert: "Ole Brandt", Calibration: 0.0003602, Information: 2.656},
	}
	for _, c := range []struct {
		alpha         float64
		left, showCut bool
		hint          string
	}{
		{0.8392, false, true, "← More of the map lies to the left: lower calibration scores and the information score's scale. It opens at the cut-off"},
		{0.003, false, true, "← More of the map lies to the left"}, // neither end shows it: page.js brings it in
		{0.001, true, true, "More of the map lies to the right →: higher calibration scores. It opens at the cut-off"},
		{0, false, false, "← More of the map lies to the left: lower calibration scores and the information score's scale. Swipe it sideways"},
	} {
		html := render(t, Scores(ScoresView{Alpha: c.alpha, Rows: rows}))
		fig := regexp.MustCompile(`<figure class="([^"]*)"`).FindStringSubmatch(html)
		if fig == nil {
			t.Fatalf("α = %g: no figure", c.alpha)
		}
		if got := strings.Contains(fig[1], "map-opens-left"); got != c.left {
			t.Errorf("α = %g: the map opens at its left end: %v, want %v (figure class %q)", c.alpha, got, c.left, fig[1])
		}
		if got := strings.Contains(html, `class="map-scroll" data-show-cut`); got != c.showCut {
			t.Errorf("α = %g: the cut-off is brought into view: %v, want %v", c.alpha, got, c.showCut)
		}
		hint := regexp.MustCompile(`<p class="map-scroll-hint[^"]*"[^>]*>([^<]*)</p>`).FindStringSubmatch(html)
		if hint == nil || !strings.HasPrefix(stdhtml.UnescapeString(hint[1]), c.hint) {
			t.Errorf("α = %g: the hint above the map reads %q, want it to begin %q", c.alpha, hint, c.hint)
		}
	}
}

// TestMapOpensLeftAtAPhonesWidth checks mapOpensLeft against the phone's
// geometry by hand: the map's 632 units drawn 544 px wide in a 308 px
// box show 357.8 units from either end, less the 17.6 px (20.4 units)
// shadow at the edge with more beyond it.
func TestMapOpensLeftAtAPhonesWidth(t *testing.T) {
	const w = 632.0
	for _, c := range []struct {
		x0, x1 float64
		want   bool
	}{
		{300, 450, false}, // in view from the right end (from 294.6)
		{200, 330, true},  // in view only from the left end (to 337.4)
		{280, 330, true},  // from the left only: it begins left of 294.6
		{200, 350, false}, // from neither end: the right end, and the page's script
		{300, 330, false}, // from both: the right end
	} {
		if got := mapOpensLeft(c.x0, c.x1, w); got != c.want {
			t.Errorf("mapOpensLeft(%g, %g) = %v, want %v", c.x0, c.x1, got, c.want)
		}
	}
}

package chart

import (
	"regexp"
	"strings"
	"testing"
)

// The words on and under an expert's picture of their fit are written for
// an expert in the subject, not a statistician: it led with "Beta(α =
// 4.2, β = 17.9) fitted to your judgement", gave "fitted percentiles" and
// "your stated points", titled the upper plot "density" and keyed the
// curve as "fitted Beta". Now the caption (the SVG's desc alike) says
// what the curves are, the curve's 5%, middle and 95% points and how
// close it comes to each answer; the Beta's parameters come last, and in
// the table's caption, for the facilitator who reads the same picture.
func TestFitSpeaksToTheExpert(t *testing.T) {
	d := sbeta(4.2, 17.9, 0, 1)
	v := fitViewOf(d, Point{0.06, 0.05}, Point{0.18, 0.5}, Point{0.36, 0.95})
	m := newFitModel(v)
	// The words the statistician's picture used; the Beta's own sentence
	// aside.
	jargon := []string{"fitted", "Fitted", "percentile", "judgement", "stated", "density", "Density", "Beta", "distribution"}
	plain := func(what, text, params string) {
		t.Helper()
		text = strings.TrimSuffix(text, " In statistical terms the curve is "+params+".")
		for _, w := range jargon {
			if strings.Contains(text, w) {
				t.Errorf("%s says %q: %s", what, w, text)
			}
		}
	}
	for _, layout := range []string{"wide", "compact"} {
		ns := parse(t, renderLayout(t, Fit(v), layout))
		title, desc, caption := find(ns, "title", ""), find(ns, "desc", ""), find(ns, "figcaption", "")
		if len(title) != 1 || len(desc) != 1 || len(caption) != 1 {
			t.Fatalf("%s: %d titles, %d descs, %d figcaptions", layout, len(title), len(desc), len(caption))
		}
		// What a screen reader hears is what a sighted reader reads.
		if desc[0].Text != caption[0].Text {
			t.Errorf("%s: the desc %q is not the caption %q", layout, desc[0].Text, caption[0].Text)
		}
		plain(layout+": the title", title[0].Text, m.Params)
		if want := "Your answers on Failure rate (per demand) and the curve that best matches them"; title[0].Text != want {
			t.Errorf("%s: title %q, want %q", layout, title[0].Text, want)
		}
		var axes []string
		for _, a := range find(ns, "text", "axis-title-y") {
			axes = append(axes, a.Text)
		}
		if strings.Join(axes, "|") != "how likely|chance below" {
			t.Errorf("%s: the upright titles read %q, want how likely and chance below", layout, axes)
		}
		var key []string
		for _, k := range find(ns, "span", "key-item") {
			key = append(key, k.Text)
		}
		if want := "your answers|the curve's 5%, median and 95% points|the best-matching curve"; strings.Join(key, "|") != want {
			t.Errorf("%s: the key reads %q, want %q", layout, key, want)
		}
		if c := find(ns, "caption", ""); len(c) != 1 || c[0].Text != "Your answers and the curve, "+m.Params {
			t.Errorf("%s: the table's caption %v does not name the Beta after the answers", layout, c)
		}
	}
	plain("the caption", m.Desc, m.Params)
	for _, want := range []string{
		"The picture shows the smooth curve that best matches your answers on Failure rate (per demand), between the bounds 0 and 1.",
		"The upper curve is higher where you think the value more likely; the lower one gives the chance of a value below each point.",
		"The curve's 5% point is " + m.Pcts[0] + ", its middle (the median) " + m.Pcts[1] + " and its 95% point " + m.Pcts[2] + ".",
		"How close the curve comes to your answers (the circles on the lower curve): you gave a chance of 5% below 0.06, the curve " + m.Rows[0].FittedChance +
			"; 50% below 0.18, the curve " + m.Rows[1].FittedChance + "; 95% below 0.36, the curve " + m.Rows[2].FittedChance + ".",
	} {
		if !strings.Contains(m.Desc, want) {
			t.Errorf("the caption lacks %q:\n%s", want, m.Desc)
		}
	}
	if !strings.HasSuffix(m.Desc, "In statistical terms the curve is Beta(α = 4.2, β = 17.9).") {
		t.Errorf("the caption does not end with the Beta: %s", m.Desc)
	}

	// A curve that rises without end at a bound is cut, and the note says
	// so in the picture's words.
	j := newFitModel(fitViewOf(sbeta(0.5, 40, 0, 1), Point{0.001, 0.5}))
	plain("a J-shaped fit's caption", j.Desc, j.Params)
	if !strings.Contains(j.Desc, "The upper plot stops below the curve's peak near a bound.") {
		t.Errorf("a J-shaped fit's caption does not say the curve is cut: %s", j.Desc)
	}
}

// howLikelyLabels are the numbers written on the upper plots' axes of the
// SVG fragment html, and how many gridlines those axes draw.
func howLikelyLabels(t *testing.T, html string) (labels []string, grid int) {
	t.Helper()
	ns := parse(t, html)
	for _, n := range find(ns, "text", "tick-y") {
		// The chance axis's labels are percentages.
		if !strings.HasSuffix(n.Text, "%") {
			labels = append(labels, n.Text)
		}
	}
	for _, n := range find(ns, "line", "grid-y") {
		if !strings.HasSuffix(n.Attr["data-value"], "%") {
			grid++
		}
	}
	return labels, grid
}

// The upper plot of an expert's own fit, and of the other experts' curves
// on their page, is titled "how likely" and draws its gridlines without
// numbers: its numbers (0, 10, 20, 30) were the height of a density,
// which means nothing to an expert; higher is more likely, as the title
// and the caption say. A curve cut at the top is said without the number
// it is cut at. The facilitator's pictures keep the numbers, the
// expert's fit on the entry page too.
func TestExpertsHowLikelyAxisHasNoNumbers(t *testing.T) {
	jShaped := fitViewOf(sbeta(0.5, 40, 0, 1), Point{0.001, 0.5})
	named := jShaped
	named.Whose = "Priya Raman"
	curves := []Curve{
		{Label: "You", Role: RoleExpert, Dist: sbeta(0.6, 8, 0, 1)},
		{Label: "Expert B", Role: RoleExpert, Dist: sbeta(0.7, 9, 0, 1)},
	}
	spread, _ := spreadInputs(20)
	spread.ForExpert = true
	numberedCut := regexp.MustCompile(`upper plot stops at \d|cut at \d`)
	for _, c := range []struct {
		name     string
		html     string
		desc     string
		numbered bool
	}{
		{"the expert's fit", renderLayout(t, Fit(jShaped), "wide") + renderLayout(t, Fit(jShaped), "compact"), newFitModel(jShaped).Desc, false},
		{"the expert's fit on the entry page", renderLayout(t, Fit(named), "wide"), newFitModel(named).Desc, true},
		{"the other experts on the expert's page", renderLayout(t, Panel(PanelView{ID: "p", Lower: 0, Upper: 1, Curves: curves, ForExpert: true}), "compact"),
			newPanelModel(PanelView{Lower: 0, Upper: 1, Curves: curves, ForExpert: true}).Desc, false},
		{"a large panel on the expert's page", renderLayout(t, Spread(spread), "wide"), "", false},
		{"the facilitator's panel", renderLayout(t, Panel(PanelView{ID: "p", Lower: 0, Upper: 1, Curves: curves}), "wide"),
			newPanelModel(PanelView{Lower: 0, Upper: 1, Curves: curves}).Desc, true},
	} {
		labels, grid := howLikelyLabels(t, c.html)
		if grid < 3 {
			t.Errorf("%s: the upper plot draws %d gridlines", c.name, grid)
		}
		if c.numbered && len(labels) < 2 {
			t.Errorf("%s: the upper plot's axis is numbered %q, want its numbers", c.name, labels)
		}
		if !c.numbered && len(labels) > 0 {
			t.Errorf("%s: the upper plot's axis is numbered %q", c.name, labels)
		}
		if cut := numberedCut.MatchString(c.desc); cut != c.numbered && c.desc != "" {
			t.Errorf("%s: the caption names the number the plot is cut at: %v, want %v:\n%s", c.name, cut, c.numbered, c.desc)
		}
	}
}

// The panel an expert sees under their own fit speaks as the fit does
// ("how likely" over "chance below", in its caption too), where it said
// "density" beside the fit's "how likely"; the facilitator's panels keep
// the statistician's "density".
func TestExpertsPanelSpeaksAsTheirFit(t *testing.T) {
	curves := []Curve{
		{Label: "You", Role: RoleExpert, Dist: sbeta(0.6, 8, 0, 1)},
		{Label: "Expert B", Role: RoleExpert, Dist: sbeta(0.7, 9, 0, 1)},
	}
	for _, c := range []struct {
		forExpert     bool
		upper, starts string
		cut           string
	}{
		{true, "how likely", "How likely each value of Response rate is (upper plot, higher where more likely) and the chance of a value below each point (lower plot), between the bounds 0 and 1.",
			"The upper plot stops below the peak of You and Expert B."},
		{false, "density", "Density (upper plot) and chance below each value (lower plot) of Response rate, between the bounds 0 and 1.",
			"The density rises above the top of the chart (cut at 7) for You and Expert B."},
	} {
		v := PanelView{ID: "p", Quantity: "Response rate", Lower: 0, Upper: 1, Curves: curves, ForExpert: c.forExpert}
		for _, layout := range []string{"wide", "compact"} {
			ns := parse(t, renderLayout(t, Panel(v), layout))
			var axes []string
			for _, a := range find(ns, "text", "axis-title-y") {
				axes = append(axes, a.Text)
			}
			if want := c.upper + "|chance below"; strings.Join(axes, "|") != want {
				t.Errorf("for the expert %v, %s: the upright titles read %q, want %q", c.forExpert, layout, axes, want)
			}
		}
		m := newPanelModel(v)
		if !strings.HasPrefix(m.Desc, c.starts) || !strings.Contains(m.Desc, c.cut) {
			t.Errorf("for the expert %v: the caption reads\n%s\nwant it to start %q and say %q", c.forExpert, m.Desc, c.starts, c.cut)
		}
		if notes := PanelNotes(v); len(notes) == 0 || !strings.HasPrefix(notes[len(notes)-1], c.cut) {
			t.Errorf("for the expert %v: the notes %q do not end %q", c.forExpert, notes, c.cut)
		}
	}
}

// The table under the panel an expert sees names what it holds in the
// words of their fit's own table ("The curve's 5%, middle (median) and
// 95% points"), where it read "Percentiles of each curve"; the
// facilitator's panels keep the statistician's caption. Nor does the
// expert's table write each curve's Beta(α, β) under its name, as the
// facilitator's does.
func TestExpertsPanelTableSpeaksAsTheirFit(t *testing.T) {
	curves := []Curve{
		{Label: "You", Role: RoleExpert, Dist: sbeta(2, 8, 0, 1)},
		{Label: "Expert B", Role: RoleExpert, Dist: sbeta(3, 9, 0, 1)},
	}
	for _, c := range []struct {
		forExpert bool
		want      string
	}{
		{true, "Each curve's 5%, middle (median) and 95% points"},
		{false, "Percentiles of each curve"},
	} {
		v := PanelView{ID: "p", Quantity: "Response rate", Lower: 0, Upper: 1, Curves: curves, ForExpert: c.forExpert}
		ns := parse(t, renderLayout(t, Panel(v), "wide"))
		if got := find(ns, "caption", ""); len(got) != 1 || got[0].Text != c.want {
			t.Errorf("for the expert %v: the table's caption is %v, want %q", c.forExpert, got, c.want)
		}
		var params []string
		for _, n := range find(ns, "span", "chart-params") {
			params = append(params, n.Text)
		}
		if want := []string{"Beta(2, 8)", "Beta(3, 9)"}; c.forExpert && len(params) > 0 {
			t.Errorf("the expert's table names the curves' Betas %q", params)
		} else if !c.forExpert && strings.Join(params, "|") != strings.Join(want, "|") {
			t.Errorf("the facilitator's table names the curves' Betas %q, want %q", params, want)
		}
	}
	// Nor does a large panel's table of its curves.
	v, _ := spreadInputs(20)
	v.ForExpert = true
	if params := find(parse(t, renderLayout(t, Spread(v), "wide")), "span", "chart-params"); len(params) > 0 {
		t.Errorf("the expert's spread names a curve's Beta: %q", params[0].Text)
	}
}

// A large panel an expert sees under their fit, drawn as a spread, speaks
// as their fit does: its curves' plots are titled "how likely" over
// "chance below", their table is captioned in the fit's words, and each
// other expert's line is said as running from their curve's 5% point to
// its 95% point with a dot at its middle, where it said "from their 5th
// to their 95th percentile". The strip's title says the same, where it
// read "The other 20 experts' 90% intervals", and the table of their
// medians says, as the caption above it does, how many lie below each
// value, where it named quartiles. The facilitator's spread keeps the
// statistician's words.
func TestExpertsSpreadSpeaksAsTheirFit(t *testing.T) {
	for _, c := range []struct {
		forExpert                    bool
		upper, caption, lines, title string
		medians                      string // the medians' table: its caption, headers and rows' names
	}{
		{true, "how likely", "Each curve's 5%, middle (median) and 95% points",
			"One line per other expert, from the 5% point to the 95% point of their curve, with a dot at its middle (the median), the lowest middle at the top.",
			"The other 20 experts' curves from the 5% point to the 95% point, for Response rate",
			"The middles (medians) of the other experts' curves|which|value|lowest|a quarter lie below|half lie below|three quarters lie below|highest"},
		{false, "density", "Percentiles of each curve",
			"One line per other expert, from their 5th to their 95th percentile, with a dot at their median, sorted by median.",
			"The other 20 experts' 90% intervals for Response rate",
			"The other experts' medians|which|median|lowest|lower quartile|median|upper quartile|highest"},
	} {
		v, _ := spreadInputs(20)
		v.ForExpert = c.forExpert
		ns := parse(t, renderLayout(t, Spread(v), "wide"))
		var axes []string
		for _, a := range find(ns, "text", "axis-title-y") {
			axes = append(axes, a.Text)
		}
		if want := c.upper + "|chance below|experts"; strings.Join(axes, "|") != want {
			t.Errorf("for the expert %v: the upright titles read %q, want %q", c.forExpert, axes, want)
		}
		var captions []string
		for _, n := range find(ns, "caption", "") {
			captions = append(captions, n.Text)
		}
		if len(captions) != 2 || captions[0] != c.caption {
			t.Fatalf("for the expert %v: the tables' captions are %q, want the curves' %q first, then the medians'", c.forExpert, captions, c.caption)
		}
		// The medians' table is the last: its two headers and five rows.
		medians := []string{captions[1]}
		ths := find(ns, "th", "")
		for _, th := range ths[max(0, len(ths)-7):] {
			medians = append(medians, th.Text)
		}
		if got := strings.Join(medians, "|"); got != c.medians {
			t.Errorf("for the expert %v: the medians' table reads %q, want %q", c.forExpert, got, c.medians)
		}
		if m := newSpreadModel(v); !strings.HasPrefix(m.Desc, c.lines) {
			t.Errorf("for the expert %v: the strip's caption reads\n%s\nwant it to start %q", c.forExpert, m.Desc, c.lines)
		}
		// The strip's own title, as a screen reader names the picture.
		var titles []string
		for _, n := range find(ns, "title", "") {
			if strings.HasSuffix(n.Attr["id"], "-strip-title") {
				titles = append(titles, n.Text)
			}
		}
		if len(titles) != 1 || titles[0] != c.title {
			t.Errorf("for the expert %v: the strip is titled %q, want %q", c.forExpert, titles, c.title)
		}
		if c.forExpert {
			for _, n := range find(ns, "title", "") {
				if strings.Contains(n.Text, "interval") {
					t.Errorf("the expert's spread has a title of intervals: %q", n.Text)
				}
			}
		}
	}
}

// An expert who placed chips typed no chances: the picture says what
// their chips put below each edge of the board ("your chips put 4.17%
// below 0.125"), where it said "you gave a chance of 4.17% below 0.125",
// and its key and table name the chips and the edges, where they said
// "your answers" and "you said 0.125". On the facilitator's entry page
// the chips are the expert's by name.
func TestFitSpeaksOfChips(t *testing.T) {
	d := sbeta(2.2, 9, 0, 1)
	v := fitViewOf(d, Point{0.125, 1.0 / 24}, Point{0.25, 0.5}, Point{0.5, 23.0 / 24})
	v.Chips = true
	for _, c := range []struct {
		whose                          string
		chips, below, said, key, title string
	}{
		{"", "your chips", "your chips below", "bin edge", "your chips below each edge", "Your chips on Failure rate (per demand) and the curve that best matches them"},
		{"Priya Raman", "Priya Raman's chips", "Priya Raman's chips below", "bin edge", "Priya Raman's chips below each edge",
			"Priya Raman's chips on Failure rate (per demand) and the curve that best matches them"},
	} {
		v.Whose = c.whose
		m := newFitModel(v)
		want := "How close the curve comes to " + c.chips + " (the circles on the lower curve): " + c.chips + " put 4.17% below 0.125, the curve " + m.Rows[0].FittedChance +
			"; 50% below 0.25, the curve " + m.Rows[1].FittedChance + "; " + m.Rows[2].Chance + " below 0.5, the curve " + m.Rows[2].FittedChance + "."
		if !strings.Contains(m.Desc, want) || strings.Contains(m.Desc, "gave") {
			t.Errorf("%q: the caption reads\n%s\nwant it to say %q", c.whose, m.Desc, want)
		}
		ns := parse(t, renderLayout(t, Fit(v), "wide"))
		var key, heads []string
		for _, k := range find(ns, "span", "key-item") {
			key = append(key, k.Text)
		}
		for _, h := range find(ns, "th", "") {
			heads = append(heads, h.Text)
		}
		if len(key) == 0 || key[0] != c.key {
			t.Errorf("%q: the key reads %q, want %q first", c.whose, key, c.key)
		}
		if len(heads) < 4 || heads[0] != c.below || heads[1] != c.said || heads[3] != "the curve's chance below it" {
			t.Errorf("%q: the table's headers read %q", c.whose, heads)
		}
		if title := find(ns, "title", ""); len(title) != 1 || title[0].Text != c.title {
			t.Errorf("%q: the title is %v, want %q", c.whose, title, c.title)
		}
	}
	// Typed answers keep their words.
	v.Chips, v.Whose = false, ""
	if m := newFitModel(v); !strings.Contains(m.Desc, "you gave a chance of 4.17% below 0.125") {
		t.Errorf("typed answers: the caption reads\n%s", m.Desc)
	}
}

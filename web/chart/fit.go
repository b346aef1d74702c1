package chart

import (
	"errors"
	"fmt"
	"strconv"
	"strings"

	"github.com/a-h/templ"

	"github.com/parley-elicit/parley/elicit"
)

// FitView is one expert's fitted Beta for one question, with the points
// they stated. Percentiles are the fit's 5th, 50th and 95th percentiles.
type FitView struct {
	ID          string // unique on the page; prefixes the SVG's aria ids
	Quantity    string
	Units       string
	Lower       float64
	Upper       float64
	Dist        elicit.ScaledBeta
	Points      []Point
	Percentiles [3]float64
	// Fitted and FittedProbs, when they have one entry per point, are
	// what the fit already computed (elicit.Fit's Fitted and Probs plus
	// ProbErrors): the fitted quantile at each point's P and the fitted
	// CDF at its X. The table then reuses them; otherwise it computes
	// them.
	Fitted      []float64
	FittedProbs []float64
	// Percent says the expert typed percentages: the table, the
	// percentile labels and the caption then write values as
	// percentages, as the read-backs do (the axis keeps its scale).
	Percent bool
	// Whose is the expert's name when the picture shows someone else's
	// judgement (the facilitator entering it for them); "" on the
	// expert's own page, which speaks to "you".
	Whose string
	// Chips says the answer is chips placed on a board, not chances
	// typed: each point is a bin's edge and the share of the chips below
	// it, and the words say "your chips put 4.17% below 0.125" where
	// typed values read "you gave a chance of 5% below 0.01".
	Chips bool
}

// answers names what the expert gave: their "answers", or the "chips"
// they placed.
func (v FitView) answers() string {
	if v.Chips {
		return "chips"
	}
	return "answers"
}

// value writes a value of the quantity as the expert typed it.
func (v FitView) value(x float64) string {
	return FormatWithin(x, v.Lower, v.Upper, v.Percent)
}

// whose is "your" on the expert's own page, else the expert's name with
// "'s".
func (v FitView) whose(capital bool) string {
	switch {
	case v.Whose != "":
		return v.Whose + "'s"
	case capital:
		return "Your"
	}
	return "your"
}

// who is "you" on the expert's own page, else the expert's name.
func (v FitView) who() string {
	if v.Whose != "" {
		return v.Whose
	}
	return "you"
}

// thinks is "you think" on the expert's own page, else "<name> thinks".
func (v FitView) thinks() string {
	if v.Whose != "" {
		return v.Whose + " thinks"
	}
	return "you think"
}

// fitWords are the words of the expert's own picture, written for an
// expert in the subject rather than in statistics: the upper plot shows
// how likely each value is, and a curve rises above its top only at a
// bound, where the expert's answers put the most likely values.
var fitWords = twinWords{Upper: "how likely", Lower: "chance below", Unnumbered: true, Cut: func(_, _ string) string {
	return "The upper plot stops below the curve's peak near a bound."
}}

// fitWordsNumbered are fitWords with the upper plot's numbers, for the
// facilitator who reads an expert's picture on the entry page
// (FitView.Whose).
var fitWordsNumbered = twinWords{Upper: fitWords.Upper, Lower: fitWords.Lower, Cut: func(top, _ string) string {
	return "The upper plot stops at " + top + ", below the curve's peak near a bound."
}}

// boundWords names the bound a fitted value is, where a point's chance
// below is 0 or 1 (a chips board's edges below or above every chip): a
// Beta reaches 0% and 100% only at the bounds, so the curve "says" the
// bound itself, and "you said 0.2, the curve says 1" read as a wide miss
// where the chance below 0.2 was close (98.5%).
func boundWords(x, p, lower, upper float64) string {
	switch {
	case p == 0 && x == lower:
		return ", the lower bound"
	case p == 1 && x == upper:
		return ", the upper bound"
	}
	return ""
}

// percentileProbs are the probabilities of FitView.Percentiles.
var percentileProbs = [3]float64{0.05, 0.5, 0.95}

type pointGeom struct {
	CX, CY string
	X, P   string // data values, full precision
}

type markGeom struct {
	X      string // pixel column
	LabelX string
	Anchor string
	Top    string
	Bottom string
	LabelY string
	Label  string
	Value  string
}

type fitRow struct {
	Chance, Stated, Fitted, FittedChance string
}

// fitDrawing is one layout of a Fit picture.
type fitDrawing struct {
	ID     string // prefixes the SVG's aria ids
	Twin   twinGeom
	Points []pointGeom
	Marks  []markGeom
}

type fitModel struct {
	ID       string
	Drawings []fitDrawing // wide, then compact
	Title    string
	Desc     string
	Rows     []fitRow
	Pcts     [3]string
	Params   string
	// Caption is the table's caption, which names the Beta.
	Caption string
	// The words that name whose answers they are: the key's, and the
	// table's headers.
	KeyStated, BelowHeader, SaidHeader, ChanceHeader string
	Units                                            string
	Invalid                                          string // non-empty when the view cannot be drawn
}

// Fit draws the density and CDF of one expert's fitted Beta with their
// stated points on the CDF, the fitted 5/50/95 percentiles marked, and a
// table of stated against fitted numbers. Its words (fitWords, the key,
// the caption and the table) are the expert's, not a statistician's: the
// curve that best matches their answers, how close it comes to each, and
// its 5%, middle and 95% points; the Beta's parameters come last, for the
// facilitator who reads the same picture.
func Fit(v FitView) templ.Component {
	return fitFigure(newFitModel(v))
}

func newFitModel(v FitView) fitModel {
	m := fitModel{ID: v.ID, Units: v.Units}
	if m.ID == "" {
		m.ID = "fit"
	}
	if err := v.Dist.Validate(); err != nil {
		m.Invalid = "No picture: the fitted distribution is not valid."
		var ie *elicit.InputError
		if errors.As(err, &ie) {
			// The rule without the offending value, which may be NaN.
			m.Invalid = "No picture: the fitted distribution is not valid (" + ie.Field + " " + string(ie.Rule) + ")."
		}
		return m
	}
	var xs []float64
	for _, p := range v.Points {
		xs = append(xs, p.X)
	}
	c := Curve{Label: "the best-matching curve", Role: RoleExpert, Dist: v.Dist, Percentiles: &v.Percentiles}
	// The percentiles are one range, written to figures that keep them
	// apart, in the caption, the table and the labels alike.
	copy(m.Pcts[:], FormatRangeWithin(v.Percentiles[:], v.Lower, v.Upper, v.Percent))
	words := fitWords
	if v.Whose != "" {
		words = fitWordsNumbered
	}
	for i, lay := range layouts {
		d := fitDrawing{ID: m.ID, Twin: newTwinIn(lay, words, v.Quantity, v.Units, v.Lower, v.Upper, []Curve{c}, xs, true, v.Percent)}
		if i > 0 {
			d.ID += "-" + lay.Name
		}
		d.Points = fitPoints(v, d.Twin)
		d.Marks = fitMarks(v, d.Twin, m.Pcts)
		m.Drawings = append(m.Drawings, d)
	}
	g := m.Drawings[0].Twin
	var stated, fitted, probs []float64
	for i, p := range v.Points {
		if !isFinite(p.X) || !isFinite(p.P) || p.X < g.X0 || p.X > g.X1 || p.P < 0 || p.P > 1 {
			continue
		}
		var x, chance float64
		if len(v.Fitted) == len(v.Points) && len(v.FittedProbs) == len(v.Points) {
			x, chance = v.Fitted[i], v.FittedProbs[i]
		} else {
			x, chance = v.Dist.Quantile(p.P), v.Dist.CDF(p.X)
		}
		stated, fitted, probs = append(stated, p.X), append(fitted, x), append(probs, p.P)
		m.Rows = append(m.Rows, fitRow{Chance: FormatPercent(p.P), FittedChance: fittedChance(chance, p.X, v)})
	}
	// Each column is one range: values typed apart, and the fitted values
	// at the probabilities asked, read apart.
	for i, text := range FormatRangeWithin(stated, v.Lower, v.Upper, v.Percent) {
		m.Rows[i].Stated = text
	}
	for i, text := range FormatRangeWithin(fitted, v.Lower, v.Upper, v.Percent) {
		m.Rows[i].Fitted = text + boundWords(fitted[i], probs[i], v.Lower, v.Upper)
	}
	m.BelowHeader = "chance below"
	m.KeyStated, m.SaidHeader, m.ChanceHeader = "your answers", "you said", "the curve's chance below yours"
	if v.Whose != "" {
		m.KeyStated, m.SaidHeader, m.ChanceHeader = v.Whose+"'s answers", v.Whose+" said", "the curve's chance below that"
	}
	if v.Chips {
		// Nobody said the edges or typed the chances: the chips put a
		// share below each edge of the board.
		m.KeyStated = v.whose(false) + " chips below each edge"
		m.BelowHeader, m.SaidHeader, m.ChanceHeader = v.whose(false)+" chips below", "bin edge", "the curve's chance below it"
	}

	m.Params = fmt.Sprintf("Beta(α = %s, β = %s)", FormatShape(v.Dist.Alpha), FormatShape(v.Dist.Beta.Beta))
	m.Caption = fmt.Sprintf("%s %s and the curve, %s", v.whose(true), v.answers(), m.Params)
	m.Title = fmt.Sprintf("%s %s on %s and the curve that best matches them", v.whose(true), v.answers(), axisTitle(v.Quantity, v.Units))
	m.Desc = fitDescription(v, m, g)
	return m
}

// fittedChance writes the fitted chance below a stated value x for the
// fit's table, which an expert reads: as FormatChance does for a value
// strictly inside the bounds, as FormatPercent does at a bound, where the
// chance below is exactly 0 or 1.
func fittedChance(p, x float64, v FitView) string {
	if x > v.Lower && x < v.Upper {
		return FormatChance(p)
	}
	return FormatPercent(p)
}

// fitPoints places the stated points on the cumulative plot of g.
func fitPoints(v FitView, g twinGeom) []pointGeom {
	var out []pointGeom
	for _, p := range v.Points {
		if !isFinite(p.X) || !isFinite(p.P) || p.X < g.X0 || p.X > g.X1 || p.P < 0 || p.P > 1 {
			continue
		}
		out = append(out, pointGeom{
			CX: coord(g.cumul.px(p.X)), CY: coord(g.cumul.py(p.P)),
			X: strconv.FormatFloat(p.X, 'g', -1, 64), P: strconv.FormatFloat(p.P, 'g', -1, 64),
		})
	}
	return out
}

// fitMarks places the fitted 5%, median and 95% lines and their labels.
// Labels sit on one of two rows above the plot, each centred on its line,
// or starting or ending at it, whichever first clears the labels before
// it on a row (the lower row first) and stays inside the picture. A label
// that fits nowhere by its line goes on the row it overlaps least, and
// that row's labels are then pushed apart, inside the picture, so that
// none covers another (three labels crowded at one end, as for a Beta
// piled against a bound). pcts are the percentiles as the table writes
// them.
func fitMarks(v FitView, g twinGeom, pcts [3]string) []markGeom {
	type label struct {
		i      int // index into out
		anchor string
		left   float64
		w      float64
		px     float64
	}
	var (
		out   []markGeom
		rows  [2][]label
		names = [3]string{"5%", "median", "95%"}
		width = g.Layout.width()
	)
	rowEnd := func(r int) float64 {
		if n := len(rows[r]); n > 0 {
			return rows[r][n-1].left + rows[r][n-1].w
		}
		return -1e9
	}
	for i, x := range v.Percentiles {
		if !isFinite(x) || x < g.X0 || x > g.X1 {
			continue
		}
		px := g.dens.px(x)
		// The number the table, the caption and the read-back give, to the
		// same figures: a label of 0.198 beside a table's 0.1979 read as
		// two answers.
		text := names[i] + " " + pcts[i]
		w := labelEm(text, true) * percentileLabelPx(g.Layout.Name)
		places := []label{{anchor: "middle", left: px - w/2}, {anchor: "start", left: px - 4}, {anchor: "end", left: px + 4 - w}}
		inside := func(l label) bool { return l.left >= 2 && l.left+w <= width-2 }
		row, at, found := 0, label{}, false
		for r := 0; r < 2 && !found; r++ {
			for _, p := range places {
				if inside(p) && p.left >= rowEnd(r)+6 {
					row, at, found = r, p, true
					break
				}
			}
		}
		if !found {
			// The nearest place inside the picture, on the row it overlaps
			// least; the row is pushed apart below.
			at = places[0]
			if !inside(at) {
				at = label{anchor: "start", left: min(max(2, at.left), width-2-w)}
			}
			if rowEnd(1)-at.left < rowEnd(0)-at.left {
				row = 1
			}
		}
		at.i, at.w, at.px = len(out), w, px
		rows[row] = append(rows[row], at)
		out = append(out, markGeom{
			X: coord(px), Top: coord(g.dens.Top), Bottom: coord(g.cumul.bottom()),
			LabelY: coord(g.dens.Top - 8 - 15*float64(row)), Label: text, Value: strconv.FormatFloat(x, 'g', -1, 64),
		})
	}
	for _, row := range rows {
		// Push apart: rightwards from the first, then leftwards from the
		// last to keep inside the right edge, then inside the left.
		for j := 1; j < len(row); j++ {
			row[j].left = max(row[j].left, row[j-1].left+row[j-1].w+6)
		}
		for j := len(row) - 1; j >= 0; j-- {
			limit := width - 2
			if j+1 < len(row) {
				limit = row[j+1].left - 6
			}
			row[j].left = min(row[j].left, limit-row[j].w)
		}
		for j := range row {
			if j == 0 {
				row[j].left = max(row[j].left, 2)
			} else {
				row[j].left = max(row[j].left, row[j-1].left+row[j-1].w+6)
			}
		}
		for _, l := range row {
			m := &out[l.i]
			switch {
			case l.anchor == "middle" && l.left == l.px-l.w/2:
				m.Anchor, m.LabelX = "middle", coord(l.px)
			case l.anchor == "end" && l.left == l.px+4-l.w:
				m.Anchor, m.LabelX = "end", coord(l.left+l.w)
			default:
				m.Anchor, m.LabelX = "start", coord(l.left)
			}
		}
	}
	return out
}

// fitDescription says in words what the picture shows, for the caption and
// screen readers: what the two curves are, their 5%, middle and 95%
// points, how close the curve comes to each answer, the notes on the
// axes, and last the Beta's parameters.
func fitDescription(v FitView, m fitModel, g twinGeom) string {
	var b strings.Builder
	fmt.Fprintf(&b, "The picture shows the smooth curve that best matches %s %s on %s, between the bounds %s and %s. ",
		v.whose(false), v.answers(), axisTitle(v.Quantity, v.Units), v.value(v.Lower), v.value(v.Upper))
	fmt.Fprintf(&b, "The upper curve is higher where %s the value more likely; the lower one gives the chance of a value below each point. ", v.thinks())
	fmt.Fprintf(&b, "The curve's 5%% point is %s, its middle (the median) %s and its 95%% point %s. ",
		m.Pcts[0], m.Pcts[1], m.Pcts[2])
	if len(m.Rows) > 0 {
		parts := make([]string, len(m.Rows))
		for i, r := range m.Rows {
			parts[i] = fmt.Sprintf("%s below %s, the curve %s", r.Chance, r.Stated, r.FittedChance)
		}
		// Chips are placed, not typed: their share below an edge is no
		// chance the expert gave.
		gave := v.who() + " gave a chance of"
		if v.Chips {
			gave = v.whose(false) + " chips put"
		}
		fmt.Fprintf(&b, "How close the curve comes to %s %s (the circles on the lower curve): %s %s. ",
			v.whose(false), v.answers(), gave, strings.Join(parts, "; "))
	}
	for _, n := range g.Notes {
		b.WriteString(n + " ")
	}
	fmt.Fprintf(&b, "In statistical terms the curve is %s.", m.Params)
	return b.String()
}

// percentileLabelPx is the fit's percentile labels' font size in a
// layout, as static/chart.css sets it (weight 600, so bold: labelEm).
func percentileLabelPx(layout string) float64 {
	if layout == compactLayout.Name {
		return 13
	}
	return 12
}

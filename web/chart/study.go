package chart

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/a-h/templ"
)

// The study's pictures: the prior predictive distribution of a planned
// study's successes as bars (Predictive), the assurance over the number
// of trials (Assurance) and the posterior interval under each of several
// priors (Intervals). Each is one plot drawn, like the curve pictures, in
// a wide and a compact layout (plotLayouts), with a caption in words; the
// page carries the table of numbers beside it.

// plotLayout is one drawing size of a single-plot picture.
type plotLayout struct {
	Name                    string
	Left, PlotW, Right, Top float64
	PlotH, Below            float64
	XTicks, YTicks          int
}

func (l plotLayout) width() float64 { return l.Left + l.PlotW + l.Right }

var plotLayouts = [...]plotLayout{
	{Name: "wide", Left: 70, PlotW: 540, Right: 30, Top: 20, PlotH: 220, Below: 58, XTicks: 8, YTicks: 4},
	{Name: "compact", Left: 64, PlotW: 278, Right: 18, Top: 20, PlotH: 180, Below: 62, XTicks: 4, YTicks: 4},
}

// plotGeom is one plot area with its ticks, in one layout.
type plotGeom struct {
	ID, Layout, ViewBox string
	Axes                axesGeom
	XTicks              []tickGeom
	XLabelY             string
	XTitle              string
	XTitleX, XTitleY    string
	f                   frame
}

// newPlot lays out one plot over [x0, x1] × [y0, y1] in lay, with the
// y axis labelled by yLabel (nil: the tick's own label).
func newPlot(id string, lay plotLayout, x0, x1, y0, y1 float64, xTitle, yTitle string, yLabel func(float64) string) plotGeom {
	f := frame{Left: lay.Left, Top: lay.Top, Width: lay.PlotW, Height: lay.PlotH, X0: x0, X1: x1, Y0: y0, Y1: y1}
	g := plotGeom{ID: id, Layout: lay.Name, f: f, XTitle: xTitle}
	height := lay.Top + lay.PlotH + lay.Below
	g.ViewBox = "0 0 " + coord(lay.width()) + " " + coord(height)
	g.Axes = axesGeom{X: coord(f.Left), Y: coord(f.Top), W: coord(f.Width), H: coord(f.Height),
		Right: coord(f.right()), Bottom: coord(f.bottom()), YTitle: yTitle, Class: "plot-study"}
	for _, t := range ticks(y0, y1, lay.YTicks) {
		label := t.Label
		if yLabel != nil {
			label = yLabel(t.Value)
		}
		g.Axes.YTicks = append(g.Axes.YTicks, tickGeom{Pos: coord(f.py(t.Value)), Label: label, Value: t.Label})
	}
	tx, ty := f.Left-lay.Left*5/7, f.Top+f.Height/2
	if lay.Name == "compact" {
		tx = 15
	}
	g.Axes.YTitleX, g.Axes.YTitleY = coord(tx), coord(ty)
	g.Axes.YTitleRotation = "rotate(-90 " + coord(tx) + " " + coord(ty) + ")"
	g.XTicks = xTicks(x0, x1, lay.XTicks, f.px, nil, tickLabelPx(lay.Name), lay.width())
	g.XLabelY = coord(f.bottom() + 18)
	g.XTitleX, g.XTitleY = coord(f.Left+f.Width/2), coord(f.bottom()+42)
	return g
}

// wholeTicks drops the ticks of a count axis that are not whole numbers,
// and writes the ones it keeps as counts: a window of one outcome (all
// the predictive probability on 10 of 10 trials) is ticked in tenths,
// and its one whole tick was labelled "10.0".
func (g *plotGeom) wholeTicks() {
	var kept []tickGeom
	for _, t := range g.XTicks {
		if v, err := strconv.ParseFloat(t.Value, 64); err == nil && v == math.Trunc(v) {
			if t.Label != "" {
				t.Label = strconv.FormatFloat(v, 'f', -1, 64)
			}
			kept = append(kept, t)
		}
	}
	g.XTicks = kept
}

// PredictiveView is the prior predictive distribution of the number of
// successes in Trials trials, P(X = x) for x = 0…Trials; outcomes from
// SuccessFrom to SuccessTo (when Success is set) are the ones that meet
// the study's success criterion and are drawn darker.
type PredictiveView struct {
	ID                     string
	Trials                 int
	PMF                    []float64
	Success                bool
	SuccessFrom, SuccessTo int
	// FollowUp: the study is planned under the posterior after data
	// already recorded, so its outcomes are predicted before its own data,
	// not before any.
	FollowUp bool
}

type barGeom struct {
	X, Y, W, H string
	Success    bool
}

type predictiveDrawing struct {
	Plot plotGeom
	Bars []barGeom
}

type predictiveModel struct {
	ID, Title, Desc string
	Drawings        []predictiveDrawing
	Invalid         string
}

// predictiveTail is the predictive probability left out of the picture
// at each end: outcomes further out are drawn as nothing at this scale.
const predictiveTail = 5e-4

// PredictiveListed is the predictive probability from which an outcome
// is listed in the table beside the picture; the picture draws every
// outcome so listed, even one in a tail it would leave out.
const PredictiveListed = 1e-4

// Predictive draws the prior predictive distribution as bars.
func Predictive(v PredictiveView) templ.Component { return predictiveFigure(newPredictiveModel(v)) }

// maxPredictiveBars is the most bars the predictive picture draws; more
// outcomes than this are grouped.
const maxPredictiveBars = 240

func newPredictiveModel(v PredictiveView) predictiveModel {
	m := predictiveModel{ID: v.ID}
	if len(v.PMF) == 0 {
		m.Invalid = "No predictive distribution to draw."
		return m
	}
	// The window: from the outcome below which lies predictiveTail to the
	// one above which lies as much.
	lo, hi, cum, top := 0, len(v.PMF)-1, 0.0, 0.0
	for x, p := range v.PMF {
		cum += p
		if cum <= predictiveTail {
			lo = x + 1
		}
		top = math.Max(top, p)
	}
	cum = 0
	for x := len(v.PMF) - 1; x >= 0; x-- {
		cum += v.PMF[x]
		if cum <= predictiveTail {
			hi = x - 1
		}
	}
	if hi < lo {
		lo, hi = 0, len(v.PMF)-1
	}
	// The tails' rule alone stopped the picture one outcome short of the
	// table's last row (an outcome of probability 2e-4 at the end of a
	// tail holding 5e-4 in all): the window takes in every listed outcome.
	for x, p := range v.PMF {
		if p >= PredictiveListed {
			lo, hi = min(lo, x), max(hi, x)
		}
	}
	// Beyond maxPredictiveBars outcomes, consecutive outcomes are grouped
	// into bins of width w and each bar is the bin's total probability:
	// a million planned trials must not draw a million bars.
	w := 1
	if n := hi - lo + 1; n > maxPredictiveBars {
		w = (n + maxPredictiveBars - 1) / maxPredictiveBars
	}
	type bin struct {
		from, to int
		p        float64
		success  bool
	}
	var bins []bin
	top = 0
	for x := lo; x <= hi; x += w {
		b := bin{from: x, to: min(x+w-1, hi), success: v.Success}
		for k := b.from; k <= b.to; k++ {
			b.p += v.PMF[k]
			b.success = b.success && k >= v.SuccessFrom && k <= v.SuccessTo
		}
		top = math.Max(top, b.p)
		bins = append(bins, b)
	}
	yTitle := "probability"
	if w > 1 {
		yTitle = fmt.Sprintf("probability per %d outcomes", w)
	}
	for i, lay := range plotLayouts {
		id := m.ID
		if i > 0 {
			id += "-" + lay.Name
		}
		g := newPlot(id, lay, float64(lo)-0.5, float64(hi)+0.5, 0, top*1.08,
			"number of successes in "+trialCount(v.Trials), yTitle, nil)
		g.wholeTicks()
		d := predictiveDrawing{Plot: g}
		bw := g.f.Width / float64(hi-lo+1)
		gap := math.Min(1, bw*float64(w)*0.15)
		for _, b := range bins {
			y := g.f.py(b.p)
			x0, x1 := g.f.px(float64(b.from)-0.5), g.f.px(float64(b.to)+0.5)
			d.Bars = append(d.Bars, barGeom{X: coord(x0 + gap/2), Y: coord(y), W: coord(math.Max(x1-x0-gap, 0.3)),
				H: coord(g.f.bottom() - y), Success: b.success})
		}
		m.Drawings = append(m.Drawings, d)
	}
	m.Title = "Prior predictive distribution of the successes in " + trialCount(v.Trials)
	var b strings.Builder
	fmt.Fprintf(&b, "Bars: the probability of each number of successes in %s %s. ", trialCount(v.Trials), beforeData(v.FollowUp))
	if lo > 0 || hi < len(v.PMF)-1 {
		fmt.Fprintf(&b, "Outcomes from %d to %d are drawn; the rest together have probability under %s. ", lo, hi, FormatPercent(2*predictiveTail))
	}
	if w > 1 {
		fmt.Fprintf(&b, "Each bar groups %d consecutive outcomes and shows their total probability; a bar is dark only when all its outcomes meet the criterion. ", w)
	}
	if v.Success {
		if v.SuccessFrom > v.SuccessTo {
			b.WriteString("No outcome meets the success criterion.")
		} else {
			fmt.Fprintf(&b, "Dark bars: the outcomes that meet the success criterion (%d to %d successes).", v.SuccessFrom, v.SuccessTo)
		}
	}
	m.Desc = strings.TrimSpace(b.String())
	return m
}

// AssuranceView is the assurance (the prior predictive probability that
// the study meets its success criterion) at each number of trials in
// Trials, with the planned number Planned marked.
type AssuranceView struct {
	ID        string
	Trials    []int
	Assurance []float64
	Planned   int
	FollowUp  bool // as PredictiveView's
}

type assuranceDrawing struct {
	Plot             plotGeom
	Path             string
	Dots             []dotGeom
	MarkX, MarkLabel string
	MarkLabelX       string
	MarkAnchor       string
}

type dotGeom struct{ X, Y, Value string }

type assuranceModel struct {
	ID, Title, Desc string
	Drawings        []assuranceDrawing
	Invalid         string
}

// Assurance draws the assurance curve over the number of trials.
func Assurance(v AssuranceView) templ.Component { return assuranceFigure(newAssuranceModel(v)) }

func newAssuranceModel(v AssuranceView) assuranceModel {
	m := assuranceModel{ID: v.ID}
	if len(v.Trials) == 0 || len(v.Trials) != len(v.Assurance) {
		m.Invalid = "No assurance curve to draw."
		return m
	}
	last := float64(v.Trials[len(v.Trials)-1])
	for i, lay := range plotLayouts {
		id := m.ID
		if i > 0 {
			id += "-" + lay.Name
		}
		g := newPlot(id, lay, 0, last, 0, 1, "number of trials in the study", "assurance", func(y float64) string { return FormatPercent(y) })
		g.wholeTicks()
		d := assuranceDrawing{Plot: g}
		xs, ys := make([]float64, len(v.Trials)), v.Assurance
		for k, n := range v.Trials {
			xs[k] = float64(n)
			d.Dots = append(d.Dots, dotGeom{X: coord(g.f.px(xs[k])), Y: coord(g.f.py(ys[k])), Value: FormatValue(ys[k])})
		}
		d.Path, _ = g.f.linePath(xs, ys)
		if v.Planned > 0 {
			x := g.f.px(float64(v.Planned))
			d.MarkX, d.MarkLabel = coord(x), fmt.Sprintf("planned: %d", v.Planned)
			d.MarkLabelX, d.MarkAnchor = coord(x-4), "end"
			if x < g.f.Left+g.f.Width/2 {
				d.MarkLabelX, d.MarkAnchor = coord(x+4), "start"
			}
		}
		m.Drawings = append(m.Drawings, d)
	}
	m.Title = "Assurance over the number of trials"
	first, end := v.Assurance[0], v.Assurance[len(v.Assurance)-1]
	m.Desc = fmt.Sprintf("The probability, %s, that the study meets its success criterion, at %d numbers of trials from %d to %d: %s at %s and %s at %d. The curve has steps because the number of successes is a whole number.",
		beforeData(v.FollowUp), len(v.Trials), v.Trials[0], v.Trials[len(v.Trials)-1], FormatPercent(first), trialCount(v.Trials[0]), FormatPercent(end), v.Trials[len(v.Trials)-1])
	return m
}

// trialCount is "1 trial" or "n trials".
func trialCount(n int) string {
	if n == 1 {
		return "1 trial"
	}
	return strconv.Itoa(n) + " trials"
}

// IntervalsView is one posterior interval per prior, side by side: the
// row's label, its mean and its interval.
type IntervalsView struct {
	ID     string
	Title  string
	XTitle string
	// Interval names the interval each line is, for the description,
	// e.g. "95% equal-tailed interval"; "interval" when empty.
	Interval string
	Rows     []IntervalRow
}

// IntervalRow is one prior's posterior summary, of a proportion on
// [0, 1]; Emphasis draws it heavier (the agreed prior).
type IntervalRow struct {
	Label    string
	Mean     float64
	Lo, Hi   float64
	Emphasis bool
}

type intervalGeom struct {
	Label, LabelY   string
	Label2, Label2Y string // a second line of the label, "" for none
	Y, X1, X2, Mean string
	Emphasis        bool
}

type intervalsDrawing struct {
	Plot        plotGeom
	LabelX      string
	LabelAnchor string // "end" beside the line, "start" above it
	Rows        []intervalGeom
}

type intervalsModel struct {
	ID, Title, Desc string
	Drawings        []intervalsDrawing
	Invalid         string
}

// Intervals draws each row's interval as a line with a dot at its mean,
// labelled on the left, one row under the other.
func Intervals(v IntervalsView) templ.Component { return intervalsFigure(newIntervalsModel(v)) }

// intervalRowH is the height of one row of Intervals, in SVG units;
// intervalRowTwoLinesH of one where some label takes two lines;
// intervalRowAboveH of one with its label above the line.
const (
	intervalRowH         = 30.0
	intervalRowTwoLinesH = 40.0
	intervalRowAboveH    = 44.0
)

func newIntervalsModel(v IntervalsView) intervalsModel {
	m := intervalsModel{ID: v.ID, Title: v.Title}
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, r := range v.Rows {
		if isFinite(r.Lo) && isFinite(r.Hi) {
			lo, hi = math.Min(lo, r.Lo), math.Max(hi, r.Hi)
		}
	}
	if len(v.Rows) == 0 || !(hi > lo) {
		m.Invalid = "No intervals to draw."
		return m
	}
	pad := (hi - lo) * 0.06
	x0, x1 := math.Max(0, lo-pad), math.Min(1, hi+pad)
	for i, base := range plotLayouts {
		lay := base
		// Wide: room on the left for the labels, the plot is what is left.
		// Compact (a phone): each label on its own line above its interval,
		// so names are not cut short.
		labelW, chars, rowH := 190.0, 24, intervalRowH
		above := lay.Name == "compact"
		if above {
			chars, rowH = 40, intervalRowAboveH
		} else {
			// A label on two lines (below) needs room to read as one
			// row's: at 30 units its second line sat as near the next
			// row's label as its own first line.
			for _, r := range v.Rows {
				if _, _, ok := splitLabel(r.Label, chars); ok {
					rowH = intervalRowTwoLinesH
				}
			}
			lay.PlotW = lay.PlotW + lay.Left - labelW - 8
			lay.Left = labelW + 8
		}
		lay.PlotH = rowH * float64(len(v.Rows))
		lay.XTicks = 5
		if lay.Name == "compact" {
			lay.XTicks = 3
		}
		id := m.ID
		if i > 0 {
			id += "-" + lay.Name
		}
		g := newPlot(id, lay, x0, x1, 0, float64(len(v.Rows)), v.XTitle, "", func(float64) string { return "" })
		g.Axes.YTicks = nil
		d := intervalsDrawing{Plot: g, LabelX: coord(labelW), LabelAnchor: "end"}
		if above {
			d.LabelX, d.LabelAnchor = coord(8), "start"
		}
		for k, r := range v.Rows {
			top := g.f.Top + rowH*float64(k)
			y, labelY := top+rowH*0.5, top+rowH*0.5+5
			if above {
				y, labelY = top+rowH*0.7, top+rowH*0.35
			}
			row := intervalGeom{Label: clipLabel(r.Label, chars), LabelY: coord(labelY), Y: coord(y),
				X1: coord(g.f.px(r.Lo)), X2: coord(g.f.px(r.Hi)), Mean: coord(g.f.px(r.Mean)), Emphasis: r.Emphasis}
			// Beside the line, a label too long for its column takes two
			// lines rather than losing its end: the demo's
			// "Performance-weight pool (suggested)" read
			// "Performance-weight pool…", as if another pool.
			if first, second, ok := splitLabel(r.Label, chars); !above && ok {
				row.Label, row.LabelY = first, coord(y-3)
				row.Label2, row.Label2Y = clipLabel(second, chars), coord(y+11)
			}
			d.Rows = append(d.Rows, row)
		}
		m.Drawings = append(m.Drawings, d)
	}
	var words []string
	for _, r := range v.Rows {
		// The table beside the picture writes these as points of the
		// proportion (FormatWithin on [0, 1]); so do its words.
		// Each row's mean and ends are one range, written apart.
		p := FormatRangeWithin([]float64{r.Mean, r.Lo, r.Hi}, 0, 1, false)
		words = append(words, fmt.Sprintf("%s: mean %s, from %s to %s", r.Label, p[0], p[1], p[2]))
	}
	interval := v.Interval
	if interval == "" {
		interval = "interval"
	}
	m.Desc = "Each line is the posterior's " + interval + " under one prior, the dot its mean. " + strings.Join(words, "; ") + "."
	return m
}

// clipLabel shortens a label to n characters with an ellipsis; the table
// beside the picture has the full name.
func clipLabel(s string, n int) string {
	r := []rune(s)
	if len(r) <= n {
		return s
	}
	return string(r[:n-1]) + "…"
}

// splitLabel breaks a label longer than n characters for two lines:
// before its bracket ("Custom-weight pool" over "(in force)") when that
// lies within the first n, else at its last space there; ok is false
// when it is short enough for one, or has no such space.
func splitLabel(s string, n int) (first, second string, ok bool) {
	r := []rune(s)
	if len(r) <= n {
		return s, "", false
	}
	if i := strings.LastIndex(s, " ("); i > 0 && len([]rune(s[:i])) <= n {
		return s[:i], s[i+1:], true
	}
	for i := n; i > 0; i-- {
		if r[i] == ' ' {
			return string(r[:i]), string(r[i+1:]), true
		}
	}
	return s, "", false
}

// beforeData says when and under what a planned study's outcomes are
// predicted: before any data under the prior, or, for a follow-up to data
// already recorded, before its own data under the posterior after them.
func beforeData(followUp bool) string {
	if followUp {
		return "before the follow-up study's own data, under the posterior after the data already recorded"
	}
	return "before any data, under the prior"
}

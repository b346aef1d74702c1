package chart

import (
	"math"
	"strings"

	"github.com/a-h/templ"

	"github.com/parley-elicit/parley/elicit"
)

// MedianStripView is the spread of a panel's medians for the room: each
// expert's median as a dot under their anonymous label, the box of the
// quartiles of the medians (elicit.SpreadOfMedians) with the median of
// the medians, and, once revealed, the true value. Its one caller, the
// room view, draws it only from two medians (the room's
// roomLeastAnswers): one answer alone is shown nowhere.
type MedianStripView struct {
	ID       string
	Quantity string
	Units    string
	Lower    float64
	Upper    float64
	Labels   []string  // one per median, in panel order
	Medians  []float64 // the experts' medians
	Truth    *float64  // the revealed true value, nil until revealed
}

// Rows is how many rows the strip's medians are stacked in on its
// compact drawing (the room's up to 1600 px, and the taller of the two).
func (v MedianStripView) Rows() int {
	m := newMedianStrip(v)
	if m.Empty {
		return 0
	}
	ys := map[string]bool{}
	for _, p := range m.Drawings[len(m.Drawings)-1].Dots {
		ys[p.Y] = true
	}
	return len(ys)
}

// value writes a median or the true value as the panel's table writes
// the curves' points (FormatWithin): a rare event's median is
// "0.00005055", as in the table of each curve's percentiles, not
// "5.055e-5".
func (v MedianStripView) value(x float64) string {
	return FormatWithin(x, v.Lower, v.Upper, false)
}

type stripDot struct {
	X, Y, LabelY, Label, Value string
}

// medianDrawing is the strip in one layout.
type medianDrawing struct {
	ID, Layout, ViewBox    string
	AxisY, AxisX1, AxisX2  string
	Ticks                  []tickGeom
	TickY                  string
	BoxX, BoxW, BoxY, BoxH string
	MidX                   string
	// MidSegs are the pieces of the upright mark at the middle expert's
	// median: it stops short of the letters that stand on it (midSegments).
	MidSegs          []midSegment
	Dots             []stripDot
	Truth            *stripDot
	NoBox            bool   // too few medians for quartiles (minBoxMedians)
	TruthAnchor      string // the label's text-anchor: start, middle or end
	TruthY1, TruthY2 string
	// The legend under the axis names the upright mark at the middle
	// expert's median, which the projector otherwise left unexplained.
	LegendX, LegendY           string
	LegendMarkX                string
	LegendMarkY1, LegendMarkY2 string
	// The box is named beside the mark, or on a line of its own where the
	// strip is too narrow for both: a sample of the box and boxLegend.
	BoxLegendX, BoxLegendY                         string
	BoxSampleX, BoxSampleY, BoxSampleW, BoxSampleH string
}

// midLegend is the legend's words for the upright mark at the middle
// expert's median (sp.Median, by nearest rank: with an even count the
// lower of the two middle ones, as the table beside says).
const midLegend = "middle expert's median"

// boxLegend is the legend's words for the box, from the lower to the
// upper quartile of the medians: the middle half of them.
const boxLegend = "middle half of the medians"

// legendPx is the font size the legend is laid out for: the largest a
// stylesheet gives it (.chart-medians .chart-wide .legend-label).
const legendPx = 17

type medianStripModel struct {
	ID, Title, Desc string
	Drawings        []medianDrawing // wide, then compact
	Empty           bool
	Rows            []spreadQuartile
}

// minBoxMedians is the fewest medians whose quartiles the strip shows
// (the box and the quartile rows): with four or fewer, nearest-rank
// quartiles are the lowest and highest medians or their neighbours, and
// a box from them reads as a spread it is not.
const minBoxMedians = 5

// truthLabelPx is the font size the true value's label is kept inside
// the strip at: a unit above the largest the stylesheet sets, 16px bold
// on the wide strip (.chart-medians .chart-wide .truth-label).
const truthLabelPx = 17

// Layout of the median strip, in viewBox units; its width is the
// layout's.
const (
	stripSide   = 30.0
	stripRowH   = 22.0
	stripTop    = 30.0
	stripBottom = 40.0
	stripLegend = 26.0 // the legend's line under the tick labels
	// A compact strip of more than crowdedRows rows (a large panel whose
	// medians converged) stacks them crowdedPitch apart, not 35.2: a
	// letter (at most 15 units' capitals, its baseline 10 over its dot)
	// then clears the dot of the row above by 2 units. The wide strip's
	// letters are 17 units, which would touch the dot above; it is drawn
	// in a column with room for its rows (above 1600 px) and keeps 35.2. The room shrinks a strip
	// taller than its side column to fit, and 14 rows of a panel of 30
	// wrote their letters there at 10.4 px on a 1280×720 projector.
	crowdedRows  = 4
	crowdedPitch = 29.0
)

// MedianStrip draws v.
func MedianStrip(v MedianStripView) templ.Component { return medianStripFigure(newMedianStrip(v)) }

func newMedianStrip(v MedianStripView) medianStripModel {
	m := medianStripModel{ID: v.ID}
	sp, err := elicit.SpreadOfMedians(v.Medians)
	if err != nil || len(v.Labels) != len(v.Medians) {
		m.Empty = true
		return m
	}
	lo, hi := sp.Lowest, sp.Highest
	if v.Truth != nil {
		lo, hi = math.Min(lo, *v.Truth), math.Max(hi, *v.Truth)
	}
	pad := (hi - lo) * 0.08
	if !(pad > 0) {
		pad = math.Max(math.Abs(lo)*0.1, (v.Upper-v.Lower)*0.01)
	}
	lo, hi = math.Max(v.Lower, lo-pad), math.Min(v.Upper, hi+pad)
	// The medians and the true value are one range, written apart: every
	// number of the strip is one of them (the quartiles are medians by
	// nearest rank).
	xs := append([]float64(nil), v.Medians...)
	if v.Truth != nil {
		xs = append(xs, *v.Truth)
	}
	texts := map[float64]string{}
	for i, t := range FormatRangeWithin(xs, v.Lower, v.Upper, false) {
		texts[xs[i]] = t
	}
	value := func(x float64) string {
		if t, ok := texts[x]; ok {
			return t
		}
		return v.value(x)
	}
	for i, lay := range layouts {
		d := medianDrawingFor(lay, v, sp, lo, hi, value)
		d.ID = m.ID
		if i > 0 {
			d.ID += "-" + lay.Name
		}
		m.Drawings = append(m.Drawings, d)
	}
	q := v.Quantity
	if v.Units != "" {
		q += " (" + v.Units + ")"
	}
	m.Title = "The panel's medians of " + q
	parts := make([]string, len(v.Medians))
	for i := range v.Medians {
		parts[i] = v.Labels[i] + " " + value(v.Medians[i])
	}
	// Every number is an actual expert's median (nearest rank). Below
	// minBoxMedians the quartiles are the extremes or next to them, so
	// neither the box nor the quartile rows are shown; and with an even
	// count the middle is said to be the lower of the two middle ones.
	mid := "median of the medians"
	if len(v.Medians)%2 == 0 {
		mid = "middle expert's median (the lower of the two middle ones)"
	}
	if len(v.Medians) < minBoxMedians {
		m.Desc = "Each expert's median: " + strings.Join(parts, ", ") + ". The " + mid + " is " + value(sp.Median) + "."
		for i := range m.Drawings {
			m.Drawings[i].NoBox = true
		}
	} else {
		m.Desc = "Each expert's median: " + strings.Join(parts, ", ") + ". Half of the medians lie between " +
			value(sp.LowerQuartile) + " and " + value(sp.UpperQuartile) + " (the box), and the " + mid + " is " + value(sp.Median) + "."
	}
	if v.Truth != nil {
		m.Desc += " The true value, now revealed, is " + value(*v.Truth) + "."
	}
	m.Rows = []spreadQuartile{
		{"lowest", value(sp.Lowest)}, {"lower quartile", value(sp.LowerQuartile)}, {mid, value(sp.Median)},
		{"upper quartile", value(sp.UpperQuartile)}, {"highest", value(sp.Highest)},
	}
	if len(v.Medians) < minBoxMedians {
		m.Rows = []spreadQuartile{{"lowest", value(sp.Lowest)}, {mid, value(sp.Median)}, {"highest", value(sp.Highest)}}
	}
	return m
}

// medianDrawingFor lays the strip out over [lo, hi] in lay's width;
// value writes its numbers.
func medianDrawingFor(lay layout, v MedianStripView, sp elicit.MedianSpread, lo, hi float64, value func(float64) string) medianDrawing {
	d := medianDrawing{Layout: lay.Name}
	w := lay.width()
	f := frame{Left: stripSide, Width: w - 2*stripSide, X0: lo, X1: hi, Y0: 0, Y1: 1}
	rows, rowCount := stripRows(lay, v.Labels, v.Medians, f.px)
	// The box's legend follows the mark's on its line if it fits there,
	// else it takes a line of its own.
	noBox := len(v.Medians) < minBoxMedians
	d.NoBox = noBox
	boxX := f.Left + 12 + labelEm(midLegend, false)*legendPx + 24
	ownLine := !noBox && boxX+22+labelEm(boxLegend, false)*legendPx > w-2
	legendH := stripLegend
	if ownLine {
		legendH += stripLegend
	}
	pitch := stripRowH * 1.6
	if rowCount > crowdedRows && lay.Name == compactLayout.Name {
		pitch = crowdedPitch
	}
	h := stripTop + float64(rowCount)*pitch + stripBottom + legendH
	axisY := h - stripBottom - legendH
	d.ViewBox = "0 0 " + coord(w) + " " + coord(h)
	d.AxisY, d.AxisX1, d.AxisX2 = coord(axisY), coord(f.Left), coord(f.right())
	d.TickY = coord(axisY + 20)
	px := tickLabelPx(lay.Name)
	if lay.Name == wideLayout.Name {
		px = medianTickPx
	}
	d.Ticks = xTicks(lo, hi, lay.XTicks-1, f.px, nil, px, w)
	boxTop := stripTop - 14
	d.BoxX, d.BoxW = coord(f.px(sp.LowerQuartile)), coord(math.Max(2, f.px(sp.UpperQuartile)-f.px(sp.LowerQuartile)))
	d.BoxY, d.BoxH = coord(boxTop), coord(axisY-boxTop)
	d.MidX = coord(f.px(sp.Median))
	legendY := axisY + stripBottom + stripLegend/2
	d.LegendMarkX, d.LegendMarkY1, d.LegendMarkY2 = coord(f.Left+2), coord(legendY-13), coord(legendY+3)
	d.LegendX, d.LegendY = coord(f.Left+12), coord(legendY)
	if !noBox {
		boxY := legendY
		if ownLine {
			boxX, boxY = f.Left, legendY+stripLegend
		}
		d.BoxSampleX, d.BoxSampleY, d.BoxSampleW, d.BoxSampleH = coord(boxX), coord(boxY-13), "16", "16"
		d.BoxLegendX, d.BoxLegendY = coord(boxX+22), coord(boxY)
	}
	for i, med := range v.Medians {
		y := axisY - 12 - float64(rows[i])*pitch
		d.Dots = append(d.Dots, stripDot{X: coord(f.px(med)), Y: coord(y), LabelY: coord(y - 10),
			Label: strings.TrimPrefix(v.Labels[i], "Expert "), Value: value(med)})
	}
	d.MidSegs = midSegments(lay, v, rows, pitch, axisY, boxTop, f.px(sp.Median), f.px)
	if v.Truth != nil {
		tx := f.px(*v.Truth)
		label := "true value " + value(*v.Truth)
		// Kept inside the picture (16px bold on the wide strip; 17px is
		// allowed).
		lx, anchor := truthLabelAt(tx, label, w)
		d.TruthAnchor = anchor
		d.Truth = &stripDot{X: coord(tx), Label: label, LabelY: coord(stripTop - 18), Value: coord(lx)}
		d.TruthY1, d.TruthY2 = coord(stripTop-12), coord(axisY)
	}
	return d
}

// sortByValue sorts the indices idx by vals[idx], ties by index.
func sortByValue(idx []int, vals []float64) {
	for i := 1; i < len(idx); i++ {
		for j := i; j > 0 && (vals[idx[j]] < vals[idx[j-1]] || (vals[idx[j]] == vals[idx[j-1]] && idx[j] < idx[j-1])); j-- {
			idx[j], idx[j-1] = idx[j-1], idx[j]
		}
	}
}

// stripLabelPx is the largest size a layout's letters are set in
// (chart.css: 17px on the wide strip, 15px on the compact one), and
// stripLabelPad the room kept between two letters, or dots, of a row.
func stripLabelPx(lay layout) float64 {
	if lay.Name == wideLayout.Name {
		return 17
	}
	return 15
}

const stripLabelPad = 5

// stripRows stacks the dots that would overlap in rows, the one whose
// letters start furthest left first, each in the lowest row where it
// stands clear of the last dot there: a dot takes the width of its
// letters (bold, at stripLabelPx), or of the dot itself (12 units) if
// wider. Taken by their left edges, as intervals are, the rows are as
// few as the most dots that overlap at one place (interval partitioning:
// Kleinberg & Tardos, "Algorithm Design", 2006, §4.1); taken by their
// medians, a wide "W" after a narrow "I" could open a row of its own,
// and a panel of 30 in the room drew one row more for some orders of its
// letters, its letters then 11.4 px on a 1280×720 projector. Kept a fixed 64 units apart
// (whatever the letters), a panel of 30 whose medians had converged
// stacked 9 rows high and ran the room's side column off the screen.
// It returns each dot's row and the number of rows.
func stripRows(lay layout, labels []string, medians []float64, px func(float64) float64) ([]int, int) {
	order := make([]int, len(medians))
	for i := range order {
		order[i] = i
	}
	half := func(i int) float64 {
		return math.Max(12, labelEm(strings.TrimPrefix(labels[i], "Expert "), true)*stripLabelPx(lay)) / 2
	}
	left := make([]float64, len(medians))
	for i := range left {
		left[i] = px(medians[i]) - half(i)
	}
	sortByValue(order, left)
	var rowEnd []float64 // each row's right edge so far
	rows := make([]int, len(medians))
	for _, i := range order {
		x := px(medians[i])
		r := 0
		for r < len(rowEnd) && x-half(i)-stripLabelPad < rowEnd[r] {
			r++
		}
		if r == len(rowEnd) {
			rowEnd = append(rowEnd, math.Inf(-1))
		}
		rowEnd[r] = x + half(i)
		rows[i] = r
	}
	return rows, len(rowEnd)
}

// midSegment is a piece of the median strip's upright mark, from Y1 down
// to Y2.
type midSegment struct{ Y1, Y2 string }

// midSegments is the upright mark at the middle expert's median (at
// midX) from top to axisY, without the stretches where a letter stands
// across it: the middle expert's own letter always does, and the mark
// ran through it, and through the letters of medians equal or close to
// it, on every screen. The gap runs from a unit above a capital's height
// (0.76 of the letters' largest size) to the dot, which is drawn over the
// mark.
func midSegments(lay layout, v MedianStripView, rows []int, pitch, axisY, top, midX float64, px func(float64) float64) []midSegment {
	size := stripLabelPx(lay)
	type gap struct{ from, to float64 }
	var gaps []gap
	for i, med := range v.Medians {
		half := labelEm(strings.TrimPrefix(v.Labels[i], "Expert "), true) * size / 2
		if math.Abs(px(med)-midX) > half+1.5 { // the mark is 3 units wide
			continue
		}
		baseline := axisY - 12 - float64(rows[i])*pitch - 10
		gaps = append(gaps, gap{baseline - 0.76*size - 1, baseline + 4})
	}
	for i := 1; i < len(gaps); i++ {
		for j := i; j > 0 && gaps[j].from < gaps[j-1].from; j-- {
			gaps[j], gaps[j-1] = gaps[j-1], gaps[j]
		}
	}
	var segs []midSegment
	y := top
	for _, g := range gaps {
		if g.from > y {
			segs = append(segs, midSegment{coord(y), coord(g.from)})
		}
		y = math.Max(y, g.to)
	}
	if y < axisY {
		segs = append(segs, midSegment{coord(y), coord(axisY)})
	}
	return segs
}

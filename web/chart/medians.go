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
// the medians, and, once revealed, the true value.
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

type stripDot struct {
	X, Y, LabelY, Label, Value string
}

type medianStripModel struct {
	ID, ViewBox, Title, Desc string
	AxisY, AxisX1, AxisX2    string
	Ticks                    []tickGeom
	TickY                    string
	BoxX, BoxW, BoxY, BoxH   string
	MidX                     string
	Dots                     []stripDot
	Truth                    *stripDot
	TruthY1, TruthY2         string
	Empty                    bool
	Rows                     []spreadQuartile
}

// Layout of the median strip, in viewBox units.
const (
	stripW      = 640.0
	stripLeft   = 30.0
	stripRight  = 30.0
	stripRowH   = 22.0
	stripTop    = 30.0
	stripBottom = 40.0
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
	ts := ticks(lo, hi, 5)
	if len(ts) >= 2 {
		lo, hi = math.Min(lo, ts[0].Value), math.Max(hi, ts[len(ts)-1].Value)
	}
	// Dots that would overlap are stacked in rows, lowest median first.
	order := make([]int, len(v.Medians))
	for i := range order {
		order[i] = i
	}
	sortByValue(order, v.Medians)
	f := frame{Left: stripLeft, Width: stripW - stripLeft - stripRight, X0: lo, X1: hi, Y0: 0, Y1: 1}
	rowEnd := []float64{}
	rows := make([]int, len(v.Medians))
	for _, i := range order {
		x := f.px(v.Medians[i])
		r := 0
		for r < len(rowEnd) && x-rowEnd[r] < 64 {
			r++
		}
		if r == len(rowEnd) {
			rowEnd = append(rowEnd, math.Inf(-1))
		}
		rowEnd[r] = x
		rows[i] = r
	}
	h := stripTop + float64(len(rowEnd))*stripRowH*1.6 + stripBottom
	axisY := h - stripBottom
	m.ViewBox = "0 0 " + coord(stripW) + " " + coord(h)
	m.AxisY, m.AxisX1, m.AxisX2 = coord(axisY), coord(f.Left), coord(f.right())
	m.TickY = coord(axisY + 20)
	for _, t := range ts {
		m.Ticks = append(m.Ticks, tickGeom{Pos: coord(f.px(t.Value)), Label: t.Label, Value: t.Label})
	}
	boxTop := stripTop - 14
	m.BoxX, m.BoxW = coord(f.px(sp.LowerQuartile)), coord(math.Max(2, f.px(sp.UpperQuartile)-f.px(sp.LowerQuartile)))
	m.BoxY, m.BoxH = coord(boxTop), coord(axisY-boxTop)
	m.MidX = coord(f.px(sp.Median))
	for i, med := range v.Medians {
		y := axisY - 12 - float64(rows[i])*stripRowH*1.6
		m.Dots = append(m.Dots, stripDot{X: coord(f.px(med)), Y: coord(y), LabelY: coord(y - 10),
			Label: strings.TrimPrefix(v.Labels[i], "Expert "), Value: FormatValue(med)})
	}
	if v.Truth != nil {
		m.Truth = &stripDot{X: coord(f.px(*v.Truth)), Label: "true value " + FormatValue(*v.Truth), LabelY: coord(stripTop - 18)}
		m.TruthY1, m.TruthY2 = coord(stripTop-12), coord(axisY)
	}
	q := v.Quantity
	if v.Units != "" {
		q += " (" + v.Units + ")"
	}
	m.Title = "The panel's medians of " + q
	parts := make([]string, len(v.Medians))
	for i := range v.Medians {
		parts[i] = v.Labels[i] + " " + FormatValue(v.Medians[i])
	}
	m.Desc = "Each expert's median: " + strings.Join(parts, ", ") + ". Half of the medians lie between " +
		FormatValue(sp.LowerQuartile) + " and " + FormatValue(sp.UpperQuartile) + " (the box), and their median is " + FormatValue(sp.Median) + "."
	if v.Truth != nil {
		m.Desc += " The true value, now revealed, is " + FormatValue(*v.Truth) + "."
	}
	m.Rows = []spreadQuartile{
		{"lowest", FormatValue(sp.Lowest)}, {"lower quartile", FormatValue(sp.LowerQuartile)}, {"median of the medians", FormatValue(sp.Median)},
		{"upper quartile", FormatValue(sp.UpperQuartile)}, {"highest", FormatValue(sp.Highest)},
	}
	return m
}

// sortByValue sorts the indices idx by vals[idx], ties by index.
func sortByValue(idx []int, vals []float64) {
	for i := 1; i < len(idx); i++ {
		for j := i; j > 0 && (vals[idx[j]] < vals[idx[j-1]] || (vals[idx[j]] == vals[idx[j-1]] && idx[j] < idx[j-1])); j-- {
			idx[j], idx[j-1] = idx[j-1], idx[j]
		}
	}
}

package chart

import (
	"fmt"
	"math"
	"strconv"

	"github.com/a-h/templ"
)

// SteadinessView pictures how the performance-weighted pool of each
// watched question moves when the classical model is rerun without one
// calibration question or one expert at a time (the robustness analysis
// of Cooke's classical model): for each question, one row per rerun with
// the pool's 90% interval and median, over a band showing the whole
// panel's.
type SteadinessView struct {
	ID      string
	Targets []SteadinessTarget
}

// SteadinessTarget is one watched question: its title, its bounds, the
// whole panel's pooled 5th, 50th and 95th percentiles, and the reruns.
type SteadinessTarget struct {
	Title        string
	Lower, Upper float64
	Full         [3]float64
	Rows         []SteadinessRow
}

// SteadinessRow is one rerun. Pool is nil when the rerun has no pool on
// the question (Note says why). Shift is its largest move of the three
// percentiles as a fraction of the question's range. NewGroup draws a
// rule above the row, between reruns of different kinds.
type SteadinessRow struct {
	Label    string
	Pool     *[3]float64
	Note     string
	Shift    float64
	NewGroup bool
}

// Layout of a steadiness panel, in SVG units (see scores.go for the text
// sizes).
const (
	steadyLabelW = 215.0
	steadyPlotW  = 320.0
	steadyShiftW = 100.0
	steadyRowH   = 27.0
	steadyTop    = 50.0
	steadyBelow  = 56.0
	// steadyLabelChars is the longest row label drawn; the table after
	// the picture has the full names.
	steadyLabelChars = 24
)

type steadyRowGeom struct {
	Y, LabelY         string
	Label, FullLabel  string
	X1, X2, Mid       string
	Drawn             bool
	Note, NoteX       string
	Shift, ShiftValue string
	First             bool
	Rule              string // y of a rule above the row, "" for none
	RuleX1, RuleX2    string
	P05, P50, P95     string // data values
}

type steadyPanel struct {
	ID        string
	Title     string
	Desc      string
	ViewBox   string
	Axis      axesGeom
	XTicks    []tickGeom
	XLabelY   string
	BandX     string
	BandW     string
	BandTop   string
	BandH     string
	MidX      string
	ShiftX    string
	ShiftHead string
	HeadY     string
	TitleY    string
	Rows      []steadyRowGeom
	Invalid   string
}

// Steadiness draws one panel per watched question, each with a caption.
func Steadiness(v SteadinessView) templ.Component {
	id := v.ID
	if id == "" {
		id = "steadiness"
	}
	var ps []steadyPanel
	for i, t := range v.Targets {
		ps = append(ps, newSteadyPanel(id+"-"+strconv.Itoa(i+1), t))
	}
	return steadinessFigure(id, ps)
}

func validTriple(p [3]float64) bool {
	return isFinite(p[0]) && isFinite(p[1]) && isFinite(p[2]) && p[0] <= p[1] && p[1] <= p[2]
}

func newSteadyPanel(id string, t SteadinessTarget) steadyPanel {
	m := steadyPanel{ID: id, Title: t.Title}
	if !validTriple(t.Full) || !isFinite(t.Lower) || !isFinite(t.Upper) || !(t.Upper > t.Lower) {
		m.Invalid = "The whole panel has no performance-weighted pool on " + t.Title + ", so there is nothing to compare the reruns with."
		return m
	}
	lo, hi := t.Full[0], t.Full[2]
	for _, r := range t.Rows {
		if r.Pool != nil && validTriple(*r.Pool) {
			lo, hi = math.Min(lo, r.Pool[0]), math.Max(hi, r.Pool[2])
		}
	}
	span := hi - lo
	if !(span > 0) {
		span = 0.05 * (t.Upper - t.Lower)
	}
	x0, x1 := math.Max(t.Lower, lo-0.08*span), math.Min(t.Upper, hi+0.08*span)
	if !(x1 > x0) {
		x0, x1 = t.Lower, t.Upper
	}
	n := len(t.Rows) + 1
	f := frame{Left: steadyLabelW, Top: steadyTop, Width: steadyPlotW, Height: float64(n) * steadyRowH, X0: x0, X1: x1, Y0: 0, Y1: 1}
	clamp := func(x float64) float64 { return f.px(math.Max(x0, math.Min(x1, x))) }
	m.ViewBox = "0 0 " + coord(steadyLabelW+steadyPlotW+steadyShiftW) + " " + coord(f.bottom()+steadyBelow)
	m.Axis = axesGeom{X: coord(f.Left), Y: coord(f.Top), W: coord(f.Width), H: coord(f.Height), Right: coord(f.right()), Bottom: coord(f.bottom()), Class: "plot-steadiness"}
	for _, tk := range ticks(x0, x1, 4) {
		m.XTicks = append(m.XTicks, tickGeom{Pos: coord(f.px(tk.Value)), Label: tk.Label, Value: fmt.Sprint(tk.Value)})
	}
	m.XLabelY = coord(f.bottom() + 20)
	m.BandX, m.BandW = coord(clamp(t.Full[0])), coord(clamp(t.Full[2])-clamp(t.Full[0]))
	m.BandTop, m.BandH = coord(f.Top), coord(f.Height)
	m.MidX = coord(clamp(t.Full[1]))
	m.ShiftX = coord(steadyLabelW + steadyPlotW + steadyShiftW - 6)
	m.ShiftHead, m.HeadY, m.TitleY = "largest shift", coord(steadyTop-10), coord(20)

	row := func(i int, label string, pool *[3]float64, note string, shift string, shiftValue string) steadyRowGeom {
		y := f.Top + (float64(i)+0.5)*steadyRowH
		g := steadyRowGeom{Y: coord(y), LabelY: coord(y + 5), Label: shortLabel(label), FullLabel: label, First: i == 0,
			Shift: shift, ShiftValue: shiftValue, Note: note, NoteX: coord(f.Left + 8)}
		if pool != nil && validTriple(*pool) {
			g.Drawn = true
			g.X1, g.Mid, g.X2 = coord(clamp(pool[0])), coord(clamp(pool[1])), coord(clamp(pool[2]))
			g.P05, g.P50, g.P95 = fmt.Sprint(pool[0]), fmt.Sprint(pool[1]), fmt.Sprint(pool[2])
		} else if g.Note == "" {
			g.Note = "no pool"
		}
		return g
	}
	full := t.Full
	m.Rows = append(m.Rows, row(0, "whole panel", &full, "", "", ""))
	largest, which := -1.0, ""
	for i, r := range t.Rows {
		shift, value := "", ""
		if r.Pool != nil && isFinite(r.Shift) {
			// The table's figures: at two, three rows of the demo read
			// 0.011 beside a table of 0.01113 and others.
			shift, value = FormatValue(r.Shift), fmt.Sprint(r.Shift)
			if r.Shift > largest {
				largest, which = r.Shift, r.Label
			}
		}
		g := row(i+1, r.Label, r.Pool, r.Note, shift, value)
		if r.NewGroup {
			g.Rule, g.RuleX1, g.RuleX2 = coord(f.Top+float64(i+1)*steadyRowH), coord(4), coord(steadyLabelW+steadyPlotW+steadyShiftW-4)
		}
		m.Rows = append(m.Rows, g)
	}
	m.Desc = fmt.Sprintf("The performance-weighted pool on %s, rerun without one calibration question or one expert at a time. "+
		"Each line runs from the pool's 5th to its 95th percentile with a dot at its median; the shaded band and the dashed line are the whole panel's "+
		"(%s to %s, median %s). At the right, the largest move of any of the three points, as a fraction of the question's range.",
		t.Title, FormatValue(t.Full[0]), FormatValue(t.Full[2]), FormatValue(t.Full[1]))
	if largest >= 0 {
		m.Desc += fmt.Sprintf(" The largest is %s, %s.", FormatValue(largest), which)
	}
	return m
}

// shortLabel cuts a row label to steadyLabelChars characters.
func shortLabel(s string) string {
	r := []rune(s)
	if len(r) <= steadyLabelChars {
		return s
	}
	return string(r[:steadyLabelChars-1]) + "…"
}

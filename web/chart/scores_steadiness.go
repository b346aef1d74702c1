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
// sizes). Wide: the row labels on the left, the plot, the largest shifts
// on the right. Compact (a phone, 360 units across, drawn at about its
// own size as the other pictures' compact drawings are): each row's label
// on its own line above its interval, its largest shift at the end of
// that line, so that nothing is cut or scrolled.
type steadyLayout struct {
	Name                string
	Left, PlotW, ShiftW float64
	RowH                float64
	Above               bool // the label above the interval
	LabelChars          int  // the longest row label drawn
}

var steadyLayouts = [...]steadyLayout{
	{Name: "wide", Left: 215, PlotW: 320, ShiftW: 100, RowH: 27, LabelChars: 24},
	{Name: "compact", Left: 10, PlotW: 340, ShiftW: 10, RowH: 44, Above: true, LabelChars: 32},
}

func (l steadyLayout) width() float64 { return l.Left + l.PlotW + l.ShiftW }

const (
	steadyTop   = 50.0
	steadyBelow = 56.0
	// steadyTitleChars is the longest title the compact drawing writes;
	// the caption names the question in full.
	steadyTitleChars = 40
)

type steadyRowGeom struct {
	Y, LabelY         string
	Label, FullLabel  string
	X1, X2, Mid       string
	Drawn             bool
	Note, NoteX       string
	NoteY             string
	Shift, ShiftValue string
	First             bool
	Rule              string // y of a rule above the row, "" for none
	RuleX1, RuleX2    string
	P05, P50, P95     string // data values
}

// steadyDrawing is one panel drawn in one layout.
type steadyDrawing struct {
	Layout    string
	Title     string
	ViewBox   string
	Axis      axesGeom
	XTicks    []tickGeom
	XLabelY   string
	BandX     string
	BandW     string
	BandTop   string
	BandH     string
	MidX      string
	LabelX    string
	ShiftX    string
	ShiftHead string
	HeadY     string
	TitleY    string
	Rows      []steadyRowGeom
}

type steadyPanel struct {
	ID       string
	Title    string
	Desc     string
	Drawings []steadyDrawing // wide, then compact
	Invalid  string
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
	for _, lay := range steadyLayouts {
		m.Drawings = append(m.Drawings, newSteadyDrawing(lay, t, x0, x1))
	}
	largest, which := -1.0, ""
	for _, r := range t.Rows {
		if r.Pool != nil && isFinite(r.Shift) && r.Shift > largest {
			largest, which = r.Shift, r.Label
		}
	}
	// The whole panel's points are one range, written as the table below
	// the pictures writes them (FormatWithin on the question's bounds),
	// apart: a window around 0.4027 read "0.4027 to 0.4027, median 0.4027".
	full := FormatRangeWithin(t.Full[:], t.Lower, t.Upper, false)
	m.Desc = fmt.Sprintf("The performance-weighted pool on %s, rerun without one calibration question or one expert at a time. "+
		"Each line runs from the pool's 5th to its 95th percentile with a dot at its median; the shaded band and the dashed line are the whole panel's "+
		"(%s to %s, median %s). At the right, the largest move of any of the three points, as a fraction of the question's range.",
		t.Title, full[0], full[2], full[1])
	if largest >= 0 {
		m.Desc += fmt.Sprintf(" The largest is %s, %s.", FormatSpread(largest), which)
	}
	return m
}

// newSteadyDrawing lays out one panel in lay over the window [x0, x1].
func newSteadyDrawing(lay steadyLayout, t SteadinessTarget, x0, x1 float64) steadyDrawing {
	d := steadyDrawing{Layout: lay.Name, Title: t.Title}
	if lay.Above {
		d.Title = clipLabel(t.Title, steadyTitleChars)
	}
	n := len(t.Rows) + 1
	f := frame{Left: lay.Left, Top: steadyTop, Width: lay.PlotW, Height: float64(n) * lay.RowH, X0: x0, X1: x1, Y0: 0, Y1: 1}
	clamp := func(x float64) float64 { return f.px(math.Max(x0, math.Min(x1, x))) }
	d.ViewBox = "0 0 " + coord(lay.width()) + " " + coord(f.bottom()+steadyBelow)
	d.Axis = axesGeom{X: coord(f.Left), Y: coord(f.Top), W: coord(f.Width), H: coord(f.Height), Right: coord(f.right()), Bottom: coord(f.bottom()), Class: "plot-steadiness"}
	d.XTicks = xTicks(x0, x1, 4, f.px, nil, tickLabelPx(lay.Name), lay.width())
	d.XLabelY = coord(f.bottom() + 20)
	d.BandX, d.BandW = coord(clamp(t.Full[0])), coord(clamp(t.Full[2])-clamp(t.Full[0]))
	d.BandTop, d.BandH = coord(f.Top), coord(f.Height)
	d.MidX = coord(clamp(t.Full[1]))
	d.ShiftX = coord(lay.width() - 6)
	d.LabelX = coord(6)
	if lay.Above {
		d.LabelX, d.ShiftX = coord(f.Left+4), coord(f.right()-6)
	}
	d.ShiftHead, d.HeadY, d.TitleY = "largest shift", coord(steadyTop-10), coord(20)

	row := func(i int, label string, pool *[3]float64, note string, shift string, shiftValue string) steadyRowGeom {
		top := f.Top + float64(i)*lay.RowH
		y, labelY := top+lay.RowH/2, top+lay.RowH/2+5
		if lay.Above {
			y, labelY = top+lay.RowH*0.72, top+lay.RowH*0.38
		}
		g := steadyRowGeom{Y: coord(y), LabelY: coord(labelY), Label: clipLabel(label, lay.LabelChars), FullLabel: label, First: i == 0,
			Shift: shift, ShiftValue: shiftValue, Note: note, NoteX: coord(f.Left + 8), NoteY: coord(y + 5)}
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
	d.Rows = append(d.Rows, row(0, "whole panel", &full, "", "", ""))
	for i, r := range t.Rows {
		shift, value := "", ""
		if r.Pool != nil && isFinite(r.Shift) {
			// The table's figures: at two, three rows of the demo read
			// 0.011 beside a table of 0.01113 and others. In plain
			// decimals, as the page writes its values: a shift of 1e-7
			// is "0.0000001", not "1e-7".
			shift, value = FormatSpread(r.Shift), fmt.Sprint(r.Shift)
		}
		g := row(i+1, r.Label, r.Pool, r.Note, shift, value)
		if r.NewGroup {
			g.Rule, g.RuleX1, g.RuleX2 = coord(f.Top+float64(i+1)*lay.RowH), coord(4), coord(lay.width()-4)
		}
		d.Rows = append(d.Rows, g)
	}
	return d
}

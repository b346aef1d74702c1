package chart

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"github.com/a-h/templ"
	"github.com/parley-elicit/parley/elicit"
)

// SpreadView is a large panel drawn compactly: the curves in Curves (the
// asking expert's own and the pool) overlaid as in Panel, and under them
// a strip with one thin line per other expert from their 5th to their
// 95th percentile, a dot at their median, sorted by median and unlabelled.
type SpreadView struct {
	ID       string
	Quantity string
	Units    string
	Lower    float64
	Upper    float64
	Curves   []Curve
	Others   []elicit.ScaledBeta
	// WholePanel says the strip holds every pooled expert (the
	// facilitator's panel and the report), not the others of the expert
	// who is looking; it changes only the words.
	WholePanel bool
	// Percent writes the quantity's values as percentages (PanelView's
	// Percent).
	Percent bool
	// Truth is a calibration question's true value once revealed to the
	// room, nil before (PanelView's Truth): a labelled upright line through
	// the curves, continued through the strip, and said in both captions.
	Truth *float64
	// Room lays the curves out for the room view (PanelView's Room); the
	// page writes their notes (SpreadNotes).
	Room bool
	// Tall adds to the room's picture its tall drawings (PanelView's
	// Tall): the curves' plots grown so that the curves and the strip
	// under them together take each of roomTallShapes.
	Tall bool
	// ForExpert writes the picture in the words of the expert's own fit,
	// as PanelView's ForExpert does, and says each line's ends and dot as
	// the fit names them: the curve's 5% and 95% points and its middle.
	ForExpert bool
}

// curvesView is the view of the curves drawn above the strip.
func (v SpreadView) curvesView(id string) PanelView {
	return PanelView{ID: id, Quantity: v.Quantity, Units: v.Units, Lower: v.Lower, Upper: v.Upper, Curves: v.Curves, Percent: v.Percent, Truth: v.Truth, Room: v.Room, ForExpert: v.ForExpert}
}

// SpreadNotes are the notes Spread writes under its wide picture of the
// curves (PanelNotes), for the room view, which writes them itself.
func SpreadNotes(v SpreadView) []string { return PanelNotes(v.curvesView("")) }

// spreadQuartile is one row of the table of the other experts' medians.
type spreadQuartile struct {
	Name, Value string
}

// spreadStrip is the strip in one layout.
type spreadStrip struct {
	ID      string
	Layout  string
	ViewBox string
	// Intervals and Medians are SVG path data: for each expert in turn a
	// segment "Mx1 yHx2" from their 5th to their 95th percentile, and a
	// zero-length segment "Mx yh0" at their median, drawn as a dot by the
	// round line cap. Two paths instead of two elements per expert keep a
	// strip of 200 experts to a few kilobytes.
	Intervals string
	Medians   string
	// IntervalW and MedianW are the intervals' and the median dots'
	// stroke widths, in step with the rows' height (stripRowStep).
	IntervalW, MedianW string
	Axis               axesGeom
	XTicks             []tickGeom
	XLabelY            string
	Truth              *truthGeom // the revealed true value's line, nil without one
	Height             float64    // of the viewBox
}

// spreadJoin is the room's one picture of the curves over the strip, in
// one layout: the curves' drawing, its frame made as tall as both, and
// the strip shifted under it.
type spreadJoin struct {
	Curves panelDrawing
	Twin   twinGeom
	Strip  spreadStrip
	Shift  string
}

type spreadModel struct {
	Panel   panelModel
	ID      string
	Strips  []spreadStrip // wide, then compact
	Title   string
	Desc    string
	Caption string // of the medians' table
	// ValueHeader heads the medians' table's column of values: "median",
	// or on an expert's page "value", as its rows say what they are.
	ValueHeader string
	Quartiles   []spreadQuartile
	Joined      []spreadJoin // the room's pictures (SpreadView.Room), wide, compact, then the tall ones (SpreadView.Tall)
}

// Strip layout: each row is spreadRowH units high, so 200 experts make a
// strip about as tall as the density plot. A smaller panel's rows share
// spreadStripH, up to spreadRowMax units each (stripRowStep): at the
// least step, 20 experts' intervals stood 2 units apart in a strip 46
// units high, about 50 px on a phone, where no one line could be told
// from the next. The room keeps the least step, its picture fitted to
// the projector with the curves above taking the height.
const (
	spreadRowH   = 1.0
	spreadRowMax = 6.0
	spreadStripH = 120.0
	spreadPad    = 6.0
	// stripTruthRoom is the room above the strip for the true value's
	// label, where no picture of the curves stands above it.
	stripTruthRoom = 24.0
)

// Spread draws the panel's pool and own curve, the strip of the other
// experts' intervals, a caption in words and a table of the quartiles of
// the other experts' medians.
func Spread(v SpreadView) templ.Component {
	return spreadFigure(newSpreadModel(v))
}

func newSpreadModel(v SpreadView) spreadModel {
	m := spreadModel{ID: v.ID}
	if m.ID == "" {
		m.ID = "spread"
	}
	type interval struct{ p5, p50, p95 float64 }
	var iv []interval
	for _, d := range v.Others {
		if d.Validate() != nil {
			continue
		}
		// The span holds the Beta's 5th, 50th and 95th percentiles and is
		// remembered, so a page view does not invert every CDF again.
		p := Curve{Dist: d}.span(v.Lower, v.Upper).percentile
		r := interval{p[0], p[1], p[2]}
		if isFinite(r.p5) && isFinite(r.p50) && isFinite(r.p95) {
			iv = append(iv, r)
		}
	}
	cv := v.curvesView(m.ID + "-curves")
	if v.Room && v.Tall && len(iv) > 0 {
		cv.Tall, cv.below = true, stripHeight(spreadPad, len(iv), stripRowStep(len(iv), true))
	}
	m.Panel = newPanelModel(cv)
	if len(iv) == 0 {
		return m
	}
	sort.SliceStable(iv, func(i, j int) bool { return iv[i].p50 < iv[j].p50 })
	at := func(k int) (float64, float64, float64) { return iv[k].p5, iv[k].p50, iv[k].p95 }
	for i, lay := range layouts {
		var curves *twinGeom
		if m.Panel.Invalid == "" {
			curves = &m.Panel.Drawings[i].Twin
		}
		st, ok := newStrip(lay, v, curves, len(iv), at)
		if !ok {
			return m
		}
		st.ID = m.ID
		if i > 0 {
			st.ID += "-" + lay.Name
		}
		m.Strips = append(m.Strips, st)
	}
	medians := make([]float64, len(iv))
	for i, r := range iv {
		medians[i] = r.p50
	}
	// The medians are finite (checked above), so the summary cannot fail.
	ms, err := elicit.SpreadOfMedians(medians)
	if err != nil {
		return m
	}
	// The five are one range, written apart.
	q := PanelView{Lower: v.Lower, Upper: v.Upper, Percent: v.Percent}.values(ms.Lowest, ms.LowerQuartile, ms.Median, ms.UpperQuartile, ms.Highest)
	m.Quartiles = []spreadQuartile{
		{"lowest", q[0]},
		{"lower quartile", q[1]},
		{"median", q[2]},
		{"upper quartile", q[3]},
		{"highest", q[4]},
	}
	what, other, line := "experts'", "other ", "One line per other expert"
	if len(iv) == 1 {
		what = "expert's"
	}
	if v.WholePanel {
		other, line = "", "One line per expert"
	}
	m.Caption = "The " + other + "experts' medians"
	m.ValueHeader = "median"
	m.Title = fmt.Sprintf("The %s%d %s 90%% intervals for %s", other, len(iv), what, axisTitle(v.Quantity, v.Units))
	each := "from their 5th to their 95th percentile, with a dot at their median, sorted by median"
	if v.ForExpert {
		// The title in the words of the caption under it and of the
		// expert's own fit: the curve's 5% and 95% points, not "90%
		// intervals".
		curves := "curves"
		if len(iv) == 1 {
			curves = "curve"
		}
		m.Title = fmt.Sprintf("The %s%d %s %s from the 5%% point to the 95%% point, for %s", other, len(iv), what, curves, axisTitle(v.Quantity, v.Units))
		each = "from the 5% point to the 95% point of their curve, with a dot at its middle (the median), the lowest middle at the top"
		// The medians' table as the caption above it says them: "half
		// of them lie between", not quartiles.
		m.Caption = "The middles (medians) of the " + other + "experts' curves"
		m.ValueHeader = "value"
		for i, name := range []string{"lowest", "a quarter lie below", "half lie below", "three quarters lie below", "highest"} {
			m.Quartiles[i].Name = name
		}
	}
	m.Desc = fmt.Sprintf("%s, %s. "+
		"The %s%d %s medians run from %s to %s; half of them lie between %s and %s.",
		line, each, other, len(iv), what, m.Quartiles[0].Value, m.Quartiles[4].Value, m.Quartiles[1].Value, m.Quartiles[3].Value)
	if t := v.curvesView("").truth(); t != nil {
		m.Desc += " " + truthWords(v.curvesView("").value(*t))
	}
	if v.Room && m.Panel.Invalid == "" {
		for i, d := range m.Panel.Drawings {
			var st spreadStrip
			if i < len(m.Strips) {
				st = m.Strips[i]
			} else {
				// A tall drawing's strip, under its curves (PanelView.Tall).
				st, _ = newStrip(d.Twin.Layout, v, &d.Twin, len(iv), at)
				st.ID = d.ID
			}
			j := spreadJoin{Curves: d, Twin: d.Twin, Strip: st, Shift: coord(d.Twin.Height)}
			j.Twin.Height += j.Strip.Height
			y := d.top(true)
			j.Twin.ViewBox = "0 " + coord(y) + " " + coord(j.Twin.Layout.width()) + " " + coord(j.Twin.Height-y)
			m.Joined = append(m.Joined, j)
		}
	}
	return m
}

// stripHeight is the height of a strip of n rows step units apart under
// top units of room: its frame, padded, and its tick labels under it.
func stripHeight(top float64, n int, step float64) float64 {
	return top + float64(n)*step + spreadPad + 26
}

// stripRowStep is the height of each of n rows of a strip: they share
// spreadStripH, between 2·spreadRowH and spreadRowMax each; in the room
// (room) always the least.
func stripRowStep(n int, room bool) float64 {
	least := 2 * spreadRowH
	if room || n <= 0 {
		return least
	}
	return max(least, min(spreadRowMax, spreadStripH/float64(n)))
}

// newStrip lays out n intervals (the k-th's 5th, 50th and 95th
// percentiles from at) under the curves' plots in lay, sharing their x
// axis (same left edge, width and window) so the ticks fall in the same
// columns. A revealed true value's line runs through the strip too, in
// the curves' column; it is labelled here only when there is no picture
// of the curves above to label it.
func newStrip(lay layout, v SpreadView, curves *twinGeom, n int, at func(k int) (p5, p50, p95 float64)) (spreadStrip, bool) {
	x0, x1, w := v.Lower, v.Upper, lay.width()
	if curves != nil {
		// As wide as the curves' picture, which a legend beside its plots
		// widens (sideLegend), so that both draw the axis at one scale.
		x0, x1, w = curves.X0, curves.X1, curves.Layout.width()
	}
	if !(x1 > x0) {
		x0, x1 = v.Lower, v.Upper
	}
	if !(x1 > x0) {
		return spreadStrip{}, false
	}
	st := spreadStrip{Layout: lay.Name}
	truth, label, top := v.curvesView("").truth(), "", spreadPad
	if truth != nil && curves == nil {
		label = "true value " + v.curvesView("").value(*truth)
		top += stripTruthRoom
	}
	left, plotW := lay.Left, lay.PlotW
	if curves != nil {
		// The curves' plots, which wide labels beside them may have
		// narrowed (newTwinIn), set the strip's left edge and width too.
		left, plotW = curves.Layout.Left, curves.Layout.PlotW
	}
	step := stripRowStep(n, v.Room)
	st.IntervalW, st.MedianW = coord(min(1.6, 0.4*step)), coord(min(4.4, 1.1*step))
	f := frame{Left: left, Top: top, Width: plotW, Height: float64(n)*step + spreadPad, X0: x0, X1: x1, Y0: 0, Y1: 1}
	clampX := func(x float64) string { return coord(f.px(math.Max(x0, math.Min(x1, x)))) }
	var iv, md strings.Builder
	for k := 0; k < n; k++ {
		p5, p50, p95 := at(k)
		y := coord(f.Top + spreadPad/2 + (float64(k)+0.5)*step - spreadRowH)
		iv.WriteString("M" + clampX(p5) + " " + y + "H" + clampX(p95))
		md.WriteString("M" + clampX(p50) + " " + y + "h0")
	}
	st.Intervals, st.Medians = iv.String(), md.String()
	st.Axis = axesGeom{X: coord(f.Left), Y: coord(f.Top), W: coord(f.Width), H: coord(f.Height), Right: coord(f.right()), Bottom: coord(f.bottom()), Class: "plot-spread", YTitle: "experts"}
	tx, ty := lay.Left*5/7, f.Top+f.Height/2
	st.Axis.YTitleX, st.Axis.YTitleY = coord(tx), coord(ty)
	st.Axis.YTitleRotation = "rotate(-90 " + coord(tx) + " " + coord(ty) + ")"
	if curves != nil {
		st.XTicks = curves.XTicks
	}
	if truth != nil {
		st.Truth = truthMark(f, *truth, f.Top-4, f.bottom(), w, label)
	}
	st.XLabelY = coord(f.bottom() + 16)
	st.Height = stripHeight(top, n, step)
	st.ViewBox = "0 0 " + coord(w) + " " + coord(st.Height)
	return st, true
}

package chart

import (
	"fmt"
	"math"
	"sort"

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
}

// spreadRow is one other expert's interval in pixels.
type spreadRow struct {
	X1, X2, Y, Dot string
}

// spreadQuartile is one row of the table of the other experts' medians.
type spreadQuartile struct {
	Name, Value string
}

type spreadModel struct {
	Panel     panelModel
	ID        string
	ViewBox   string
	Title     string
	Desc      string
	Rows      []spreadRow
	Axis      axesGeom
	XTicks    []tickGeom
	XLabelY   string
	Quartiles []spreadQuartile
}

// Strip layout: each row is spreadRowH units high, so 200 experts make a
// strip about as tall as the density plot.
const (
	spreadRowH = 1.0
	spreadPad  = 6.0
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
	m.Panel = newPanelModel(PanelView{ID: m.ID + "-curves", Quantity: v.Quantity, Units: v.Units, Lower: v.Lower, Upper: v.Upper, Curves: v.Curves})
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
	if len(iv) == 0 {
		return m
	}
	sort.SliceStable(iv, func(i, j int) bool { return iv[i].p50 < iv[j].p50 })
	x0, x1 := v.Lower, v.Upper
	if m.Panel.Invalid == "" {
		x0, x1 = m.Panel.Twin.X0, m.Panel.Twin.X1
	}
	if !(x1 > x0) {
		x0, x1 = v.Lower, v.Upper
	}
	if !(x1 > x0) {
		return m
	}
	f := frame{Left: twinLeft, Top: spreadPad, Width: twinPlotW, Height: float64(len(iv))*spreadRowH*2 + spreadPad, X0: x0, X1: x1, Y0: 0, Y1: 1}
	clampX := func(x float64) string { return coord(f.px(math.Max(x0, math.Min(x1, x)))) }
	for i, r := range iv {
		y := f.Top + spreadPad/2 + float64(i)*spreadRowH*2
		m.Rows = append(m.Rows, spreadRow{X1: clampX(r.p5), X2: clampX(r.p95), Y: coord(y), Dot: clampX(r.p50)})
	}
	m.Axis = axesGeom{X: coord(f.Left), Y: coord(f.Top), W: coord(f.Width), H: coord(f.Height), Right: coord(f.right()), Bottom: coord(f.bottom()), Class: "plot-spread", YTitle: "experts"}
	tx, ty := twinLeft-20, f.Top+f.Height/2
	m.Axis.YTitleX, m.Axis.YTitleY = coord(tx), coord(ty)
	m.Axis.YTitleRotation = "rotate(-90 " + coord(tx) + " " + coord(ty) + ")"
	// The strip shares the curves' x axis (same left edge, width and
	// window), so their ticks fall in the same columns.
	m.XTicks = m.Panel.Twin.XTicks
	m.XLabelY = coord(f.bottom() + 16)
	m.ViewBox = "0 0 " + coord(twinLeft+twinPlotW+30) + " " + coord(f.bottom()+26)
	medians := make([]float64, len(iv))
	for i, r := range iv {
		medians[i] = r.p50
	}
	// The medians are finite (checked above), so the summary cannot fail.
	ms, err := elicit.SpreadOfMedians(medians)
	if err != nil {
		return m
	}
	m.Quartiles = []spreadQuartile{
		{"lowest", FormatValue(ms.Lowest)},
		{"lower quartile", FormatValue(ms.LowerQuartile)},
		{"median", FormatValue(ms.Median)},
		{"upper quartile", FormatValue(ms.UpperQuartile)},
		{"highest", FormatValue(ms.Highest)},
	}
	what := "experts'"
	if len(iv) == 1 {
		what = "expert's"
	}
	m.Title = fmt.Sprintf("The other %d %s 90%% intervals for %s", len(iv), what, axisTitle(v.Quantity, v.Units))
	m.Desc = fmt.Sprintf("One line per other expert, from their 5th to their 95th percentile, with a dot at their median, sorted by median. "+
		"The other %d %s medians run from %s to %s; half of them lie between %s and %s.",
		len(iv), what, m.Quartiles[0].Value, m.Quartiles[4].Value, m.Quartiles[1].Value, m.Quartiles[3].Value)
	return m
}

package chart

import (
	"context"
	"fmt"
	"math"
	"sort"
	"strings"

	"github.com/a-h/templ"

	"github.com/parley-elicit/parley/elicit"
)

// A twin is the layout every curve picture shares: a density plot above a
// cumulative plot on one x axis. Fit and Panel both draw through it, so
// there is one way curves become pixels.

// A twin is drawn in two layouts, each an SVG of its own, and the page's
// stylesheet shows the one that suits the screen: wide for a laptop or a
// projector, compact for a phone, where the SVG is drawn at about its own
// size so that its text stays at least 11 px without the picture being
// cut or scrolled. Both share the samples (they are remembered by curve
// and window), so the second costs only its path strings.
type layout struct {
	Name                                                string // "wide" or "compact": the SVG's class is "chart-" + Name
	Left, PlotW, Right, Top, DensityH, Gap, CDFH, Below float64
	XTicks                                              int     // about this many x ticks
	LegendCols                                          int     // legend columns under a panel
	NoteChars                                           int     // characters per line of a note before it wraps
	NoteLine                                            float64 // a note line's height
	NoteX                                               float64 // where notes start
	TitleChars                                          int     // characters per line of the x axis's title
	// YTitleX is where the plots' upright titles stand, both at one x,
	// unless labels level with either push them left (yTitleX).
	YTitleX float64
	// TickPx is the tick labels' font size (the x axis's, and the y
	// axes' where they stand level with an upright title) where a page's
	// stylesheet draws them larger than the layout's own (tickLabelPx,
	// yTickPx): the room view's (roomTickPx). 0 is the layout's own.
	TickPx float64
}

// tickPx is the x tick labels' font size the ticks are spaced for.
func (l layout) tickPx() float64 {
	if l.TickPx > 0 {
		return l.TickPx
	}
	return tickLabelPx(l.Name)
}

// roomTickPx is the largest font size the room view draws its tick
// labels in: 15px (style.css, .room-chart .chart-svg .tick-label), and
// 19px on a projector up to 70rem wide (room.css), where the picture is
// drawn at three quarters of its size and 15px read at 11 px on a
// 1024×768 screen. The ticks are spaced and kept inside the picture for
// it, and the plots' upright titles kept clear of it: ticks spaced for
// 13px could run into one another at 15px.
const roomTickPx = 19

// roomPhoneTickPx is the room's tick labels' font size on its compact
// drawing, shown on a phone only (chart.css), where style.css's 15px
// stands: spaced for roomTickPx, its plots gave the labels beside them
// room they do not take.
const roomPhoneTickPx = 15

// width is the layout's viewBox width.
func (l layout) width() float64 { return l.Left + l.PlotW + l.Right }

var (
	// wideLayout is the picture at a desk or on a projector.
	wideLayout = layout{Name: "wide", Left: 70, PlotW: 540, Right: 30, Top: 34, DensityH: 140, Gap: 36, CDFH: 170, Below: 60,
		XTicks: 6, LegendCols: 2, NoteChars: 92, NoteLine: 15, NoteX: 70, TitleChars: 72, YTitleX: 20}
	// compactLayout is 360 units wide, about a phone's width, with fewer
	// ticks, the legend in one column and notes wrapped.
	compactLayout = layout{Name: "compact", Left: 64, PlotW: 278, Right: 18, Top: 44, DensityH: 108, Gap: 30, CDFH: 128, Below: 62,
		XTicks: 4, LegendCols: 1, NoteChars: 44, NoteLine: 17, NoteX: 8, TitleChars: 36, YTitleX: 15}
	// layouts are both, in the order the page carries them.
	layouts = [...]layout{wideLayout, compactLayout}
)

const (
	// gridPoints is the number of straight pieces a curve that is not a
	// smooth Beta (smooth.go) is drawn with across the plot's 540 units
	// (2.7 units each): a pool, or a Beta with a shape below 2. A lone curve's
	// window spans its 0.1–99.9% range plus margins, about 8 standard
	// deviations for a bell-shaped Beta, so a piece is about 0.04 σ wide,
	// and a chord strays from the curve by at most h²/8·|f″| (the error
	// of linear interpolation), with |f″| ≤ 0.4/σ³ near a normal-like
	// peak: under 0.03% of the peak's height, far below a pixel. A narrow
	// curve in a panel 40 σ wide strays under 1%. Each point costs one
	// incomplete-beta evaluation, the bulk of drawing such a curve.
	gridPoints    = 200
	densityTicksN = 4
)

// tickGeom is one tick at a pixel position.
type tickGeom struct {
	Pos    string // pixel x (x ticks) or y (y ticks)
	LabelX string // an x tick's label's centre, kept inside the picture (tickLabelCentre)
	Label  string // "" for an x tick drawn without a label (xTicks)
	Value  string // the data value, for tests and assistive tools
}

// axesGeom is one plot area with its gridlines and y axis.
type axesGeom struct {
	X, Y, W, H     string
	Right, Bottom  string
	YTicks         []tickGeom
	YTitle         string
	YTitleRotation string // transform attribute for the rotated y title
	YTitleX        string
	YTitleY        string
	Class          string
}

// lineGeom is one curve in both plots.
type lineGeom struct {
	Label    string
	Role     string
	Density  string // path d
	Cumul    string // path d
	Area     string // path d of the shaded density, Fit only
	Stroke   string
	Width    string
	Dash     string
	DashName string
}

type twinGeom struct {
	twinFrame
	Layout layout
	// Shape is a room's tall drawing's class for its shape
	// (roomTallShapes), "" for any other drawing.
	Shape       string
	Lines       []lineGeom
	ClippedBy   []string // labels of curves cut at the density axis's top
	DensityTop  float64
	X0, X1      float64
	percentiles [][3]float64 // each drawn line's 5th, 50th and 95th percentiles
}

// twinFrame is what a twin draws around its curves: the plot areas, their
// ticks and titles, and the notes under them. It depends on nothing but
// its frameKey, and is remembered with its SVG rendered once (AxesSVG,
// NotesSVG), so a draft that leaves the axes where they were costs only
// its curves; windows and the density axis's top are snapped to round
// steps so that they do stay put under small changes.
type twinFrame struct {
	ViewBox     string
	Height      float64
	Density     axesGeom
	Cumul       axesGeom
	XTicks      []tickGeom
	XLabelY     string
	XTitle      string
	XTitleLines []noteLine // the x title, wrapped to the layout's width
	XTitleX     string
	XTitleY     string
	NoteX       string
	Notes       []string   // what the axes leave out, in words
	NoteLines   []noteLine // the notes as drawn, wrapped to the layout's width
	NoteY       string
	dens, cumul frame
	// AxesSVG and NotesSVG are twinAxesSVG and twinNotesSVG rendered,
	// or empty when rendering failed and twinSVG renders them itself.
	AxesSVG, NotesSVG string
}

// frameKey is everything a twinFrame depends on.
type frameKey struct {
	// layout is the whole layout, not its name: the room's wide drawing
	// draws its plots taller than the page's (roomWide).
	layout          layout
	tickPx          float64 // the x tick labels' font size (layout.tickPx)
	quantity, units string
	lower, upper    float64
	x0, x1, top     float64
	upperTitle      string // the plots' upright titles (twinWords)
	lowerTitle      string
	cut             string // the note on curves cut at the top, "" when none is
	percent         bool   // the x axis's numbers as percentages
	unnumbered      bool   // the upper plot's axis without its numbers (twinWords)
}

// axisTitle is "quantity (units)" or just the quantity.
func axisTitle(quantity, units string) string {
	q := strings.TrimSpace(quantity)
	if q == "" {
		q = "value"
	}
	if u := strings.TrimSpace(units); u != "" {
		return q + " (" + u + ")"
	}
	return q
}

// twinWords are the words a twin writes for its reader: the plots'
// upright titles, and the note under a picture whose curves are cut at
// the upper plot's top.
type twinWords struct {
	Upper, Lower string
	// Cut writes the note on curves cut at top (written as a number):
	// names lists them.
	Cut func(top, names string) string
	// Unnumbered leaves the numbers off the upper plot's axis, keeping
	// its gridlines: for an expert, to whom the height of a density (0,
	// 10, 20, 30) means nothing; what the plot says is that higher is more
	// likely, which its title and caption say. Cut then names no number
	// either.
	Unnumbered bool
}

// densityWords are the statistician's words, for the facilitator's
// pictures of several curves.
var densityWords = twinWords{Upper: "density", Lower: "chance below", Cut: func(top, names string) string {
	return fmt.Sprintf("The density rises above the top of the chart (cut at %s) for %s.", top, names)
}}

// noteLine is one drawn line of the notes under a twin.
type noteLine struct {
	Text, Y string
}

// newTwin lays out curves over [lower, upper] in layout lay, in
// densityWords. Extra x values (stated points) are kept inside the
// window.
func newTwin(lay layout, quantity, units string, lower, upper float64, curves []Curve, extra []float64, area bool) twinGeom {
	return newTwinIn(lay, densityWords, quantity, units, lower, upper, curves, extra, area, false)
}

// newTwinIn is newTwin in the words w, with the x axis's numbers (its
// ticks and the notes under it) written as percentages when percent is
// set: for an expert who typed their judgement of a proportion in
// percentages.
func newTwinIn(lay layout, w twinWords, quantity, units string, lower, upper float64, curves []Curve, extra []float64, area, percent bool) twinGeom {
	sp := make([]curveSpan, len(curves))
	valid := make([]bool, len(curves))
	var tails [][2]float64
	for i, c := range curves {
		if valid[i] = c.valid(); valid[i] {
			sp[i] = c.span(lower, upper)
			tails = append(tails, [2]float64{sp[i].lo, sp[i].hi})
		}
	}
	x0, x1 := window(lower, upper, tails, extra)
	x0, x1 = snapWindow(x0, x1, lower, upper)
	if !(x0 >= lower) || !(x1 <= upper) || !(x1 > x0) {
		x0, x1 = lower, upper
	}
	g := twinGeom{Layout: lay, X0: x0, X1: x1}
	dens := frame{Left: lay.Left, Top: lay.Top, Width: lay.PlotW, Height: lay.DensityH, X0: x0, X1: x1, Y0: 0, Y1: 1}
	cumul := frame{Left: lay.Left, Top: lay.Top + lay.DensityH + lay.Gap, Width: lay.PlotW, Height: lay.CDFH, X0: x0, X1: x1, Y0: 0, Y1: 1}
	ys := make([]sampled, len(curves))
	smooth := make([]bool, len(curves))
	var xs []float64 // the grid, when a curve is sampled on it
	for i, c := range curves {
		if !valid[i] {
			continue
		}
		if b, ok := c.beta(); ok && smoothShape(b) {
			smooth[i] = true
			continue
		}
		if xs == nil {
			xs = dens.grid(gridPoints)
		}
		ys[i] = c.sample(xs, x0, x1)
	}

	// The density axis's top: the tallest curve's own top, each sampled
	// over its own window, so a narrow expert is neither flattened by a
	// wide one nor mistaken for a spike; only a density that rises towards
	// a bound is cut. A mixture's own window lies inside the picture's, so
	// its top is read from its samples there.
	top := 0.0
	tops := make([]float64, len(curves))
	for i, c := range curves {
		if !valid[i] {
			continue
		}
		t := sp[i].top
		if !sp[i].topKnown {
			t = ownTop(c, lower, upper, xs, ys[i])
		}
		tops[i] = t
		top = math.Max(top, t)
	}
	top = spikeCap(curves, valid, tops, top)
	if !(top > 0) || !isFinite(top) {
		top = 1
	}
	top = snapTop(top * 1.08)
	dens.Y1 = top
	g.DensityTop = top
	// Labels too wide to stand beside the upright titles (a density of
	// 0.0010 an hour on [0, 10000], 15000 for a rare event; "100%" on a
	// phone) take their room from the plots, as the study's picture does
	// for its labels; the picture keeps its width. The room depends on the
	// layout and top alone, which key the remembered frames and paths.
	if need := yTitleRoom - min(yLabelsLeft(dens, densityTicks(top, w.Unnumbered), w.Upper, lay),
		yLabelsLeft(cumul, chanceTicks(), w.Lower, lay)); need > 0 {
		need = math.Ceil(need)
		lay.Left += need
		lay.PlotW -= need
		g.Layout = lay
		dens.Left, dens.Width = lay.Left, lay.PlotW
		cumul.Left, cumul.Width = lay.Left, lay.PlotW
	}

	for i, c := range curves {
		if !valid[i] {
			continue
		}
		st := styleFor(c.Role, expertIndex(curves, i))
		draw := func() paths {
			var p paths
			// A smooth curve cut at the axis's top (spikeCap) is drawn
			// as the clipped polyline below: cubic pieces would leave
			// the plot.
			if smooth[i] && !(tops[i] > top) {
				b, _ := c.beta()
				ks := remembered.knots.Get(gridKey{b, x0, x1}, func() []knot {
					ks, _ := smoothKnots(b, x0, x1, sp[i])
					return ks
				})
				if ks != nil {
					w := b.Upper - b.Lower
					p.density = dens.bezierPath(ks, b.Lower, w, true)
					p.cumul = cumul.bezierPath(ks, b.Lower, w, false)
					if area {
						p.area = dens.closeArea(p.density, dens.px(x0), dens.px(x1))
					}
					return p
				}
				// Too narrow for cubic pieces at the picture's scale:
				// the polyline, clipped to the plot.
				if xs == nil {
					xs = dens.grid(gridPoints)
				}
				ys[i] = c.sample(xs, x0, x1)
			} else if smooth[i] {
				if xs == nil {
					xs = dens.grid(gridPoints)
				}
				ys[i] = c.sample(xs, x0, x1)
			}
			lxs, lys := xs, ys[i]
			if b, ok := c.beta(); ok {
				lxs, lys = withMode(b, xs, ys[i])
			}
			p.density, p.clipped = dens.linePath(lxs, lys.pdf)
			p.cumul, _ = cumul.linePath(lxs, lys.cdf)
			if area {
				p.area = dens.areaPath(lxs, lys.pdf)
			}
			return p
		}
		var p paths
		if b, ok := c.beta(); ok {
			p = remembered.drawn.Get(pathKey{b, x0, x1, top, area, lay}, draw)
		} else {
			p = draw()
		}
		l := lineGeom{Label: c.Label, Role: c.Role.String(), Density: p.density, Cumul: p.cumul, Area: p.area,
			Stroke: st.Stroke, Width: st.Width, Dash: st.Dash, DashName: st.Name}
		g.Lines = append(g.Lines, l)
		g.percentiles = append(g.percentiles, sp[i].percentile)
		if p.clipped {
			g.ClippedBy = append(g.ClippedBy, c.proseName())
		}
	}

	key := frameKey{layout: lay, tickPx: lay.tickPx(), quantity: quantity, units: units, lower: lower, upper: upper,
		x0: x0, x1: x1, top: top, upperTitle: w.Upper, lowerTitle: w.Lower, percent: percent, unnumbered: w.Unnumbered}
	if len(g.ClippedBy) > 0 {
		key.cut = w.Cut(formatSig(top, 3), proseList(g.ClippedBy))
	}
	g.twinFrame = remembered.frames.Get(key, func() twinFrame { return newTwinFrame(lay, key, dens, cumul) })
	return g
}

// withMode adds a Beta's interior mode to its samples on the grid xs
// when it falls between two of them, so that the polyline reaches the
// density's top: for a shape just above 1 the top lies within a pixel of
// the bound (Beta(1.000001, 70) peaks at 1.4e-8), where the grid steps
// over it and the line stopped a tenth short. The grid and the
// remembered samples are left as they are.
func withMode(b elicit.ScaledBeta, xs []float64, s sampled) ([]float64, sampled) {
	m, ok := b.Mode()
	k := sort.SearchFloat64s(xs, m) // the first grid point at or after m
	if !ok || k == 0 || k == len(xs) || !(xs[k-1] < m && m < xs[k]) || len(s.pdf) != len(xs) || len(s.cdf) != len(xs) {
		return xs, s
	}
	insert := func(v []float64, at float64) []float64 {
		out := make([]float64, 0, len(v)+1)
		return append(append(append(out, v[:k]...), at), v[k:]...)
	}
	return insert(xs, m), sampled{pdf: insert(s.pdf, b.PDF(m)), cdf: insert(s.cdf, b.CDF(m))}
}

// spikeRatio is how many times the experts' median density top the axis
// may reach in a panel (spikeCap).
const spikeRatio = 4

// spikeCap is the density axis's top for curves whose own tops are tops
// (the tallest is top). One very sure expert's spike, many times taller
// than the others', would flatten every other curve into the baseline,
// on the projector as on a phone. With at least two experts the axis
// stops at spikeRatio times the experts' median top, but never below the
// top of a curve that is not an expert's (a pool, as its own window
// measures it, densityCap): taller curves are cut there, drawn as the
// clipped polyline, and the note under the picture names them. A single
// curve, or a panel without such a spike, keeps the tallest top.
func spikeCap(curves []Curve, valid []bool, tops []float64, top float64) float64 {
	var experts []float64
	keep := 0.0
	for i, c := range curves {
		switch {
		case !valid[i] || !isFinite(tops[i]):
		case c.Role == RoleExpert:
			experts = append(experts, tops[i])
		default:
			keep = math.Max(keep, tops[i])
		}
	}
	if len(experts) < 2 {
		return top
	}
	sort.Float64s(experts)
	n := len(experts)
	med := experts[n/2]
	if n%2 == 0 {
		med = (experts[n/2-1] + experts[n/2]) / 2
	}
	if c := math.Max(keep, spikeRatio*med); c > 0 && c < top {
		return c
	}
	return top
}

// newTwinFrame lays out and renders the frame of a twin whose plots are
// dens and cumul.
func newTwinFrame(lay layout, k frameKey, dens, cumul frame) twinFrame {
	var g twinFrame
	x0, x1, top, lower, upper := k.x0, k.x1, k.top, k.lower, k.upper
	// The notes write the window's ends as the fit's values are written.
	xv := func(x float64) string { return FormatWithin(x, lower, upper, k.percent) }
	var percent func(tick) string
	if k.percent {
		percent = func(t tick) string { return FormatPercent(t.Value) }
	}
	g.XTicks = xTicks(x0, x1, lay.XTicks, dens.px, percent, lay.tickPx(), lay.width())
	dt, ct := densityTicks(top, k.unnumbered), chanceTicks()
	// One x for both upright titles, clear of the labels level with
	// either (newTwinIn leaves the room).
	tx := min(lay.YTitleX, yLabelsLeft(dens, dt, k.upperTitle, lay)-yTitleGap-yDescent*yTitlePx,
		yLabelsLeft(cumul, ct, k.lowerTitle, lay)-yTitleGap-yDescent*yTitlePx)
	g.Density = yAxes(dens, dt, k.upperTitle, "chart-density", tx)
	g.Cumul = yAxes(cumul, ct, k.lowerTitle, "chart-cdf", tx)
	g.XLabelY = coord(cumul.bottom() + 18)
	g.XTitle = axisTitle(k.quantity, k.units)
	g.XTitleX = coord(cumul.Left + cumul.Width/2)
	g.XTitleY = coord(cumul.bottom() + 42)
	titleLines := wrapWords(g.XTitle, lay.TitleChars)
	for i, line := range titleLines {
		g.XTitleLines = append(g.XTitleLines, noteLine{Text: line, Y: coord(cumul.bottom() + 42 + 17*float64(i))})
	}
	if len(titleLines) > 1 || lay.Name == compactLayout.Name {
		// Under a narrow plot the title is centred on the whole picture,
		// which gives it the left margin's room too.
		g.XTitleX = coord(lay.width() / 2)
	}
	extraTitle := 17 * float64(max(0, len(titleLines)-1))
	g.NoteY = coord(cumul.bottom() + 64 + extraTitle)
	g.NoteX = coord(lay.NoteX)
	g.dens, g.cumul = dens, cumul

	switch {
	case x0 > lower && x1 < upper:
		// The window's ends are one range: a narrow window far from zero,
		// [1229.5, 1230.5], ran "from 1230 to 1230".
		ends := FormatRangeWithin([]float64{x0, x1}, lower, upper, k.percent)
		g.Notes = append(g.Notes, fmt.Sprintf("Zoomed in: the axis runs from %s to %s, inside the bounds %s and %s.",
			ends[0], ends[1], xv(lower), xv(upper)))
	case x0 > lower:
		g.Notes = append(g.Notes, fmt.Sprintf("Zoomed in: the axis starts at %s, not at the lower bound %s.",
			xv(x0), xv(lower)))
	case x1 < upper:
		g.Notes = append(g.Notes, fmt.Sprintf("Zoomed in: the axis stops at %s, short of the upper bound %s.",
			xv(x1), xv(upper)))
	}
	if k.cut != "" {
		g.Notes = append(g.Notes, k.cut)
	}
	y := cumul.bottom() + 64 + extraTitle
	for _, n := range g.Notes {
		for _, line := range wrapWords(n, lay.NoteChars) {
			g.NoteLines = append(g.NoteLines, noteLine{Text: line, Y: coord(y)})
			y += lay.NoteLine
		}
	}
	g.Height = cumul.bottom() + lay.Below + extraTitle + lay.NoteLine*float64(len(g.NoteLines))
	g.ViewBox = "0 0 " + coord(lay.width()) + " " + coord(g.Height)
	g.AxesSVG, g.NotesSVG = renderString(twinAxesSVG(g)), renderString(twinNotesSVG(g))
	return g
}

// withoutNotes leaves the notes out of g, and the room they took under
// the x axis's title, for a page that writes them itself (PanelNotes).
// The remembered frame is shared, so g's copy of it is changed, not the
// frame.
func (g *twinGeom) withoutNotes() {
	g.Height -= g.Layout.NoteLine * float64(len(g.NoteLines))
	g.NoteLines, g.NotesSVG = nil, ""
	g.ViewBox = "0 0 " + coord(g.Layout.width()) + " " + coord(g.Height)
}

// renderString renders a component to a string, or "" if it fails.
func renderString(c templ.Component) string {
	var b strings.Builder
	if err := c.Render(context.Background(), &b); err != nil {
		return ""
	}
	return b.String()
}

// snapTop rounds a density axis's top up to a multiple of a round step
// of about a sixteenth of it, so that drafts whose density's top moves a
// little share their axis; the peak still fills over 85% of the plot.
func snapTop(top float64) float64 {
	if !(top > 0) || !isFinite(top) {
		return top
	}
	step := niceStep(top, 16)
	if t := math.Ceil(top/step) * step; isFinite(t) && t >= top {
		return t
	}
	return top
}

// wrapWords breaks s into lines of at most n characters at spaces; a word
// longer than n has a line of its own.
func wrapWords(s string, n int) []string {
	var lines []string
	line := ""
	for _, w := range strings.Fields(s) {
		switch {
		case line == "":
			line = w
		case len([]rune(line))+1+len([]rune(w)) <= n:
			line += " " + w
		default:
			lines = append(lines, line)
			line = w
		}
	}
	if line != "" {
		lines = append(lines, line)
	}
	return lines
}

// snapWindow widens [x0, x1] outward to whole multiples of a round step
// of about a sixteenth of its width, within [lower, upper]. Every twin's
// window is snapped. An expert's draft that changes their fit a little
// keeps its axes, so the curve is seen to move against a frame that stays
// put, and the frame is remembered rather than drawn again. A pool is
// drawn beside each expert's own curve, whose tails move the window a
// little for each expert, and sampling a pool of many experts afresh for
// every window costs each component's CDF at every point. Snapped, nearby
// windows fall together, the experts' pages share a few windows, and the
// pool's samples for each are remembered. The window grows by less than a
// step on each side.
func snapWindow(x0, x1, lower, upper float64) (float64, float64) {
	if !isFinite(x0) || !isFinite(x1) || !(x1 > x0) {
		return x0, x1
	}
	step := niceStep(x1-x0, 16)
	s0, s1 := math.Floor(x0/step)*step, math.Ceil(x1/step)*step
	return math.Max(lower, s0), math.Min(upper, s1)
}

// ownTop is the density cap of a mixture over its own window: the
// window of its 0.1% and 99.9% points, read off its sampled CDF by linear
// interpolation between grid points, using its samples on the picture's
// grid inside that window; with too few of them it samples the window
// itself.
func ownTop(c Curve, lower, upper float64, xs []float64, ys sampled) float64 {
	lo, hi := crossing(xs, ys.cdf, tailLow), crossing(xs, ys.cdf, tailHigh)
	x0, x1 := window(lower, upper, [][2]float64{{lo, hi}}, nil)
	var in []float64
	for k, x := range xs {
		if x >= x0 && x <= x1 {
			in = append(in, ys.pdf[k])
		}
	}
	if len(in) < gridPoints/4 {
		own := frame{X0: x0, X1: x1}
		in = evaluate(c, own.grid(gridPoints)).pdf
	}
	t, _ := densityCap(in)
	return t
}

// crossing is where the sampled increasing cdf first reaches p, by linear
// interpolation; the grid's ends when it starts above p or never gets there.
func crossing(xs, cdf []float64, p float64) float64 {
	for k := range xs {
		if cdf[k] >= p {
			if k == 0 || !(cdf[k] > cdf[k-1]) {
				return xs[k]
			}
			return xs[k-1] + (xs[k]-xs[k-1])*(p-cdf[k-1])/(cdf[k]-cdf[k-1])
		}
	}
	return xs[len(xs)-1]
}

// expertIndex counts the experts before curve i, so the k-th expert gets
// the k-th style whatever other roles are interleaved; a curve with a
// Slot takes that style.
func expertIndex(curves []Curve, i int) int {
	if s := curves[i].Slot; s > 0 && curves[i].Role == RoleExpert {
		return s - 1
	}
	n := 0
	for _, c := range curves[:i] {
		if c.Role == curves[i].Role {
			n++
		}
	}
	return n
}

// yAxes lays out the plot area f with its y ticks ts and its upright
// title at x = tx.
func yAxes(f frame, ts []tick, title, class string, tx float64) axesGeom {
	a := axesGeom{
		X: coord(f.Left), Y: coord(f.Top), W: coord(f.Width), H: coord(f.Height),
		Right: coord(f.right()), Bottom: coord(f.bottom()),
		YTitle: title, Class: class,
	}
	for _, t := range ts {
		a.YTicks = append(a.YTicks, tickGeom{Pos: coord(f.py(t.Value)), Label: t.Label, Value: t.Label})
	}
	ty := f.Top + f.Height/2
	a.YTitleX, a.YTitleY = coord(tx), coord(ty)
	a.YTitleRotation = "rotate(-90 " + coord(tx) + " " + coord(ty) + ")"
	return a
}

// densityTicks are the density axis's ticks up to top, without their
// labels when unnumbered (twinWords.Unnumbered): the gridlines stay.
func densityTicks(top float64, unnumbered bool) []tick {
	ts := ticks(0, top, densityTicksN)
	if unnumbered {
		for i := range ts {
			ts[i].Label = ""
		}
	}
	return ts
}

// chanceTicks are the chance axis's ticks, every 25%.
func chanceTicks() []tick {
	var pt []tick
	for _, p := range []float64{0, 0.25, 0.5, 0.75, 1} {
		pt = append(pt, tick{Value: p, Label: FormatPercent(p)})
	}
	return pt
}

// The y axes' labels and title at the largest sizes a stylesheet draws
// them: the room view's tick labels at up to roomTickPx (its layouts'
// TickPx), 15px on the wide drawing elsewhere, a phone's 14px tick labels
// on the compact (static/chart.css), and the
// title's 15px in both, bold. An upright title's glyphs reach yAscent of
// its size to the left of its baseline and yDescent to the right.
const (
	yTitlePx  = 15
	yAscent   = 0.76
	yDescent  = 0.24
	yTitleGap = 3 // between the title and its tick labels
	// yTitleRoom is the least x at which the labels level with a title
	// may begin: the title, its gap and a unit at the picture's edge.
	yTitleRoom = 1 + (yAscent+yDescent)*yTitlePx + yTitleGap
)

func yTickPx(l layout) float64 {
	if l.TickPx > 0 {
		return l.TickPx
	}
	if l.Name == compactLayout.Name {
		return 14
	}
	return 15
}

// yLabelsLeft is where the widest of ts's labels on f's y axis that lie
// level with its upright title (centred on the plot's height) begins:
// f.Left when none does. A label is drawn 6 units left of the axis and
// 4 below its tick.
func yLabelsLeft(f frame, ts []tick, title string, lay layout) float64 {
	px := yTickPx(lay)
	half := labelEm(title, true) * yTitlePx / 2
	mid := f.Top + f.Height/2
	left := f.Left
	for _, t := range ts {
		y := f.py(t.Value) + 4
		if y-yAscent*px < mid+half && y+yDescent*px > mid-half {
			left = min(left, f.Left-6-labelEm(t.Label, false)*px)
		}
	}
	return left
}

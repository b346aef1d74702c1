package chart

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/a-h/templ"

	"github.com/parley-elicit/parley/elicit"
)

// PanelView is several curves for one question overlaid: experts, the
// pool, the agreed prior. Labels are the caller's choice; for experts'
// own pages they are anonymous ("Expert 1").
type PanelView struct {
	ID       string
	Quantity string
	Units    string
	Lower    float64
	Upper    float64
	Curves   []Curve
	// Percent writes the quantity's values (the x axis, the notes under
	// it, the percentiles and the caption) as percentages: for an expert
	// who types their judgement of a proportion in percentages, so that
	// the panel speaks as their own fit does.
	Percent bool
	// Truth is a calibration question's true value once it is revealed to
	// the room (the condition MedianStripView.Truth is set on), nil
	// before: drawn as a labelled upright line through both plots and
	// said in the caption.
	Truth *float64
	// ForExpert writes the picture in the words of the expert's own fit
	// (fitWords), "how likely" over "chance below", for the panel an
	// expert sees on their question's page under their fit; the
	// facilitator's pages keep the statistician's "density".
	ForExpert bool
	// Room lays the picture out for the room view, whose page writes the
	// notes under it in its own type (PanelNotes): the picture leaves them
	// out, with the room they took between the axis's title and the
	// legend, and its wide drawing stands the legend beside the plots,
	// where a projector's wide screen has room, rather than under them.
	Room bool
	// Marked marks the first curve's median and its 90% interval (from
	// its 5% to its 95% point) on the picture: a shaded band over both
	// plots between the interval's ends and a solid upright line at the
	// median, each named with its values in the legend and the caption.
	// The room's display of the agreed prior marks its one curve so: a
	// room reads the prior's median and interval off the screen, which
	// the curve alone leaves to the eye. In the room (Room) the legend
	// leaves the marks to the page, which names them in its own type
	// beside samples drawn as the marks are (MarkSample).
	Marked bool
	// Tall adds to the room's picture (Room) its tall drawings, the wide
	// one with taller plots, drawn to the shapes of roomTallShapes, for a
	// picture's column taller for its width than the wide drawing (a 4:3
	// or 5:4 projector; room.css shows the one that fits there in place of
	// the wide one). There the picture's width binds: the wide drawing, as
	// tall as its column's width draws it, left some 90 px blank under the
	// notes at 1024×768 and some 200 px at 1280×1024.
	Tall bool
	// below is the height a picture draws under this one's drawing, in
	// its units (a large panel's strip, SpreadView), which a tall
	// drawing's shape counts.
	below float64
}

// marksGeom is the marked curve's median and 90% interval as a Panel
// drawing lays them out (PanelView.Marked).
type marksGeom struct {
	BandX, BandW     string // the interval's band, over both plots
	DensY, DensH     string
	CumulY, CumulH   string
	LowX, HighX      string // the interval's ends
	MedX, Y1, Y2     string // the median's line, through both plots
	Stroke           string
	Median, Interval markLegend
}

// markLegend is a mark's entry in the legend: its sample (a line, or the
// band's swatch) from X1 to X2 on row Y, and its words.
type markLegend struct {
	X1, X2, Y, TextX, TextY string
	SwatchY, SwatchW        string
	Label                   string
}

// markWords are the legend's words for the marked curve's points p
// (5%, median, 95%), written by values as the curves' table writes them.
func markWords(p [3]float64, values func(xs ...float64) []string) (median, interval string) {
	ps := values(p[0], p[1], p[2])
	return "median " + ps[1], "90% interval " + ps[0] + " to " + ps[2]
}

// expertPanelWords are fitWords for a picture of several curves, whose
// note names the curves cut at the top.
var expertPanelWords = twinWords{Upper: fitWords.Upper, Lower: fitWords.Lower, Unnumbered: true, Cut: func(_, names string) string {
	return fmt.Sprintf("The upper plot stops below the peak of %s.", names)
}}

// words are the view's twinWords.
func (v PanelView) words() twinWords {
	if v.ForExpert {
		return expertPanelWords
	}
	return densityWords
}

// truth is the view's true value to draw, or nil.
func (v PanelView) truth() *float64 {
	if v.Truth == nil || !isFinite(*v.Truth) || *v.Truth < v.Lower || *v.Truth > v.Upper {
		return nil
	}
	return v.Truth
}

// extra are the values the picture's window keeps inside it: the true
// value, once revealed.
func (v PanelView) extra() []float64 {
	if t := v.truth(); t != nil {
		return []float64{*t}
	}
	return nil
}

// value writes a value of the quantity as the view's reader typed it.
func (v PanelView) value(x float64) string {
	return FormatWithin(x, v.Lower, v.Upper, v.Percent)
}

// values writes the values of one range of the quantity as value does,
// apart (FormatRangeWithin).
func (v PanelView) values(xs ...float64) []string {
	return FormatRangeWithin(xs, v.Lower, v.Upper, v.Percent)
}

type legendGeom struct {
	Y, TextY string
	X1, X2   string
	TextX    string
	Label    string
	Role     string
	Stroke   string
	Width    string
	Dash     string
	DashName string
	P5, P50  string
	P95      string
	Params   string
}

// panelDrawing is one layout of a Panel picture.
type panelDrawing struct {
	ID     string
	Twin   twinGeom
	Legend []legendGeom
	Truth  *truthGeom // the revealed true value's line, nil without one
	Marks  *marksGeom // PanelView.Marked's marks, nil without
}

// truthGeom is the true value's upright line and, where the picture
// names it, its label above the line.
type truthGeom struct {
	X, Y1, Y2              string
	LabelX, LabelY, Anchor string
	Label                  string // "" for a line named elsewhere
}

// truthMark lays out the line of the true value x on the x axis of f, from
// row y1 down to row y2 of a picture w units wide, labelled just above y1
// when label is not empty, or nil when x lies outside f's window. The
// label is kept inside the picture as the median strip keeps its own
// (truthLabelAt). Every picture of the curves draws its true value here:
// the panel's, and the spread's curves and strip.
func truthMark(f frame, x, y1, y2, w float64, label string) *truthGeom {
	if !(x >= f.X0 && x <= f.X1) {
		return nil
	}
	tx := f.px(x)
	t := &truthGeom{X: coord(tx), Y1: coord(y1), Y2: coord(y2)}
	if label != "" {
		lx, anchor := truthLabelAt(tx, label, w)
		t.LabelX, t.LabelY, t.Anchor, t.Label = coord(lx), coord(y1-6), anchor, label
	}
	return t
}

// panelTruth lays out the line of the true value x through both plots of
// g, labelled above the density plot, or nil when x lies outside the
// window.
func panelTruth(g twinGeom, x float64, label string) *truthGeom {
	return truthMark(g.dens, x, g.dens.Top-4, g.cumul.bottom(), g.Layout.width(), label)
}

// truthWords says in a picture's caption where its revealed true value,
// written value, is drawn.
func truthWords(value string) string {
	return "The true value, now revealed, is " + value + ": the red dashed upright line."
}

type panelModel struct {
	ID       string
	Drawings []panelDrawing // wide, then compact, then the room's tall ones (PanelView.Tall)
	Title    string
	Desc     string
	Legend   []legendGeom // the wide drawing's, for the table
	// TableCaption is the table's caption: the statistician's
	// "Percentiles of each curve", or on an expert's page the words of
	// their fit's table, "each curve's 5%, middle (median) and 95%
	// points".
	TableCaption string
	Units        string
	Invalid      string
}

// Panel draws every curve's density and CDF on shared axes, each in its
// own hue, dash pattern and width, with a legend of line samples and a
// table of each curve's 5th, 50th and 95th percentiles.
func Panel(v PanelView) templ.Component {
	return panelFigure(newPanelModel(v))
}

// PanelNotes are the notes Panel writes under its wide picture (the
// axis zoomed in, a density cut at the top), for a page that shows them
// in its own larger type: the projector's room view, where the picture's
// 12-unit notes read at under 10 px on a 1366×768 screen.
func PanelNotes(v PanelView) []string {
	var curves []Curve
	for _, c := range v.Curves {
		if c.valid() {
			curves = append(curves, c)
		}
	}
	if len(curves) == 0 {
		return nil
	}
	return newTwinIn(wideLayout, v.words(), v.Quantity, v.Units, v.Lower, v.Upper, curves, v.extra(), false, v.Percent).Notes
}

// roomTopMargin is what the room's drawings keep above their plots where
// no true value's label stands there: the top tick label's upper half and
// a little air. The layouts' room above the plots (44 units compact, 34
// wide) keeps room for that label, and the room's picture stood under a
// blank band: some 40 px on a phone, some 30 on a 1920×1080 projector.
const roomTopMargin = 12

// top is where d's picture starts: roomTopMargin above its plots for the
// room's compact drawing with no true value's label above them, else at
// 0. A large panel's room picture (SpreadView.Room) starts there too.
// The room's wide drawing gives that room to its plots instead
// (roomWide), and starts at 0.
func (d panelDrawing) top(room bool) float64 {
	if room && d.Twin.Layout.Name == compactLayout.Name && d.Truth == nil {
		return d.Twin.Layout.Top - roomTopMargin
	}
	return 0
}

// roomWide is the wide layout l in the room with no true value's label
// above the plots: the room kept for that label, but roomTopMargin, goes
// to the plots, shared as their heights are. On a projector the picture's
// width sets its size (it stands beside the median strip), so a picture
// started lower down its band kept the same height and left the band
// empty under the notes instead; its plots now take it.
func roomWide(l layout) layout {
	spare := l.Top - roomTopMargin
	dens := math.Round(spare * l.DensityH / (l.DensityH + l.CDFH))
	l.Top, l.DensityH, l.CDFH = roomTopMargin, l.DensityH+dens, l.CDFH+spare-dens
	return l
}

// roomTallShapes are the shapes, width over height, the room's tall
// drawings are drawn to (PanelView.Tall), from the least tall, each with
// a class of its own ("chart-tall-" and its place, 1 to 5): room.css
// shows the tallest whose shape the picture's column holds with its notes
// under it, the picture shrunk by at most a twentieth, so that the
// picture takes the column's height on a projector taller for its width
// than 16:9 (4:3, 5:4, 16:10) under a header of any length. The first is
// the shape the invented demo's picture needed at 1024×768 (its wide
// drawing's plots 1.3 times as tall, 821.76 by 530 units); the fourth
// what it needed at 1280×1024, where the first left some 200 px blank
// under its notes; a large panel's picture, whose header is shorter,
// needed about the third at 1024×768 and the fifth at 1280×1024. Each
// is 1.12 times as tall as the one before, so the column is left at most
// about a ninth of the picture's height blank.
var roomTallShapes = [...]float64{1.55, 1.38, 1.235, 1.1, 0.985}

// roomTallLeast is the least growth, in units, worth a tall drawing: a
// picture already about as tall as a shape (a large panel's, whose strip
// of many rows stands under its curves) draws no drawing for it.
const roomTallLeast = 24

// roomTall is the room's wide layout l (roomWide) with its plots grown by
// grow units, shared as their heights are.
func roomTall(l layout, grow float64) layout {
	dens := math.Round(grow * l.DensityH / (l.DensityH + l.CDFH))
	l.DensityH, l.CDFH = l.DensityH+dens, l.CDFH+math.Round(grow)-dens
	return l
}

func newPanelModel(v PanelView) panelModel {
	m := panelModel{ID: v.ID, Units: v.Units}
	if m.ID == "" {
		m.ID = "panel"
	}
	var curves []Curve
	for _, c := range v.Curves {
		if c.valid() {
			curves = append(curves, c)
		}
	}
	if len(curves) == 0 {
		m.Invalid = "No curves to draw yet."
		return m
	}
	var wideIn layout // the wide drawing's layout as drawn from
	for i, lay := range layouts {
		if v.Room && lay.Name == wideLayout.Name && v.truth() == nil {
			lay = roomWide(lay)
		}
		id := m.ID
		if i > 0 {
			id += "-" + lay.Name
		}
		if i == 0 {
			wideIn = lay
		}
		m.Drawings = append(m.Drawings, v.drawing(lay, id, curves))
	}
	if v.Room && v.Tall {
		// Each shape's height for the wide drawing's width, less what the
		// picture draws under the plots' drawing (a large panel's strip).
		wide := m.Drawings[0].Twin
		for i, aspect := range roomTallShapes {
			grow := wide.Layout.width()/aspect - wide.Height - v.below
			if grow < roomTallLeast {
				continue
			}
			shape := "tall-" + strconv.Itoa(i+1)
			d := v.drawing(roomTall(wideIn, grow), m.ID+"-"+shape, curves)
			d.Twin.Shape = "chart-" + shape
			m.Drawings = append(m.Drawings, d)
		}
	}
	g := m.Drawings[0].Twin
	m.Legend = m.Drawings[0].Legend
	if v.ForExpert {
		// The table names each curve by its points; its Beta(α, β) is the
		// facilitator's, whose pages keep it.
		m.Legend = append([]legendGeom(nil), m.Legend...)
		for i := range m.Legend {
			m.Legend[i].Params = ""
		}
	}
	var words []string
	for i, c := range curves {
		lg := m.Legend[i]
		words = append(words, fmt.Sprintf("%s (%s line): median %s, 90%% between %s and %s",
			c.Label, g.Lines[i].DashName, lg.P50, lg.P5, lg.P95))
	}
	m.Title = fmt.Sprintf("%d curves for %s", len(curves), axisTitle(v.Quantity, v.Units))
	m.TableCaption = "Percentiles of each curve"
	if v.ForExpert {
		m.TableCaption = "Each curve's 5%, middle (median) and 95% points"
	}
	var b strings.Builder
	// The plots' own axis titles, "density" (or "how likely") and
	// "chance below", not the statistician's "cumulative probability".
	if v.ForExpert {
		fmt.Fprintf(&b, "How likely each value of %s is (upper plot, higher where more likely) and the chance of a value below each point (lower plot), between the bounds %s and %s. ",
			axisTitle(v.Quantity, v.Units), v.value(v.Lower), v.value(v.Upper))
	} else {
		fmt.Fprintf(&b, "Density (upper plot) and chance below each value (lower plot) of %s, between the bounds %s and %s. ",
			axisTitle(v.Quantity, v.Units), v.value(v.Lower), v.value(v.Upper))
	}
	b.WriteString(strings.Join(words, "; ") + ". ")
	for _, same := range sameCurves(curves) {
		b.WriteString(same + " ")
	}
	if t := v.truth(); t != nil {
		b.WriteString(truthWords(v.value(*t)) + " ")
	}
	if v.Marked {
		med, iv := markWords(g.percentiles[0], v.values)
		fmt.Fprintf(&b, "The shaded band is the %s of %s, and the solid upright line its %s. ", iv, curves[0].proseName(), med)
	}
	for _, n := range g.Notes {
		b.WriteString(n + " ")
	}
	m.Desc = strings.TrimSpace(b.String())
	return m
}

// drawing is one drawing of v's curves in layout lay, with its id.
func (v PanelView) drawing(lay layout, id string, curves []Curve) panelDrawing {
	if v.Room {
		lay.TickPx = roomTickPx
		if lay.Name == compactLayout.Name {
			lay.TickPx = roomPhoneTickPx
		}
	}
	d := panelDrawing{ID: id, Twin: newTwinIn(lay, v.words(), v.Quantity, v.Units, v.Lower, v.Upper, curves, v.extra(), false, v.Percent)}
	if t := v.truth(); t != nil {
		d.Truth = panelTruth(d.Twin, *t, "true value "+v.value(*t))
	}
	// The marks are named in the legend, except in the room, whose
	// page names them beside the picture in its own type (the
	// picture's legend read at 11 px on a 1024×768 projector).
	var marks []string
	if v.Marked && !v.Room {
		med, iv := markWords(d.Twin.percentiles[0], v.values)
		marks = []string{med, iv}
	}
	var slots []legendSlot
	switch {
	case v.Room && lay.Name == wideLayout.Name:
		d.Twin.withoutNotes()
		d.Legend, slots = sideLegend(&d.Twin, curves, marks, v.values)
	case v.Room:
		d.Twin.withoutNotes()
		d.Legend, slots = panelLegend(&d.Twin, curves, marks, v.values)
	default:
		d.Legend, slots = panelLegend(&d.Twin, curves, marks, v.values)
	}
	if v.Marked {
		d.Marks = newMarks(d.Twin, marks, slots)
	}
	if y := d.top(v.Room); y > 0 {
		d.Twin.ViewBox = "0 " + coord(y) + " " + coord(lay.width()) + " " + coord(d.Twin.Height-y)
	}
	return d
}

// asBeta is the one Beta a curve is: a Beta's own, or a mixture's whose
// components with weight all have the same Beta (a pool that gives one
// expert all the weight, or a panel of one). ok is false for any other.
func asBeta(c Curve) (elicit.ScaledBeta, bool) {
	if b, ok := c.beta(); ok {
		return b, true
	}
	cs := c.components()
	if p, ok := c.Dist.(elicit.Pool); ok {
		cs = p.Components
	}
	var one elicit.ScaledBeta
	found := false
	for _, comp := range cs {
		switch {
		case !(comp.Weight > 0):
		case !found:
			one, found = comp.Dist, true
		case comp.Dist != one:
			return elicit.ScaledBeta{}, false
		}
	}
	return one, found
}

// sameCurves says which curves are one and the same distribution, so
// that the last drawn of them lies over the others and one line shows
// them all: an expert given all the weight and the pool, or two experts
// with the same fitted Beta. The legend had named a curve the picture
// seemed not to draw. One sentence for each such group, in the order the
// curves are drawn.
func sameCurves(curves []Curve) []string {
	var out []string
	done := make([]bool, len(curves))
	for i := range curves {
		bi, ok := asBeta(curves[i])
		if done[i] || !ok {
			continue
		}
		names := []string{curves[i].proseName()}
		for j := i + 1; j < len(curves); j++ {
			if bj, ok := asBeta(curves[j]); ok && !done[j] && bj == bi {
				done[j] = true
				names = append(names, curves[j].proseName())
			}
		}
		if len(names) > 1 {
			out = append(out, proseList(names)+" are the same curve, drawn as one line.")
		}
	}
	return out
}

// panelLegend lays the legend out under g's plots, in the layout's
// columns, and makes room for it: the picture keeps the plots' width and
// its text stays legible when a phone shrinks it. values writes a curve's
// percentiles, one range. The marks' entries (PanelView.Marked) follow
// the curves', one to a row, at the slots returned.
func panelLegend(g *twinGeom, curves []Curve, marks []string, values func(xs ...float64) []string) ([]legendGeom, []legendSlot) {
	lay := g.Layout
	top := g.Height + 4
	cols := lay.LegendCols
	colW := lay.width() / float64(cols)
	var out []legendGeom
	for i, c := range curves {
		x := lay.Left/2 + float64(i%cols)*colW
		y := top + float64(i/cols)*24
		out = append(out, legendEntry(g, i, c, x, y, 38, values))
	}
	rows := (len(curves) + cols - 1) / cols
	var slots []legendSlot
	for i := range marks {
		slots = append(slots, legendSlot{X: lay.Left / 2, Y: top + float64(rows+i)*24, Sample: 38})
	}
	g.Height = top + float64(rows+len(marks))*24 + 8
	g.ViewBox = "0 0 " + coord(lay.width()) + " " + coord(g.Height)
	return out, slots
}

// legendSlot is where a legend entry that is not a curve's stands: its
// sample from X on row Y, Sample units long, its words after it.
type legendSlot struct{ X, Y, Sample float64 }

// sideLegendPx is the font size a legend beside the plots is laid out
// for: a unit above the room's 16px (.room-chart .chart-svg
// .legend-label).
const sideLegendPx = 17

// sideLegend lays the legend out in one column beside g's plots, from the
// density plot's top, and widens the picture for it: on a projector's
// wide screen the picture then grows with the screen's height instead of
// stopping at a legend under it. The column starts past the x axis's
// last tick label where it would reach down to the labels. Its samples
// are shorter than under the plots, and the picture ends just under the
// x axis's title: on a 1280×720 projector the picture's width is what
// sets the size of its text.
func sideLegend(g *twinGeom, curves []Curve, marks []string, values func(xs ...float64) []string) ([]legendGeom, []legendSlot) {
	const sample = 30
	lay := g.Layout
	top := g.dens.Top + 8
	x := lay.Left + lay.PlotW + 12
	rows := len(curves) + len(marks)
	if top+float64(rows)*24 > g.cumul.bottom() {
		x = lay.width()
	}
	widest := 0.0
	var out []legendGeom
	for i, c := range curves {
		out = append(out, legendEntry(g, i, c, x, top+float64(i)*24, sample, values))
		widest = math.Max(widest, labelEm(c.Label, false)*sideLegendPx)
	}
	var slots []legendSlot
	for i, m := range marks {
		slots = append(slots, legendSlot{X: x, Y: top + float64(len(curves)+i)*24, Sample: sample})
		widest = math.Max(widest, labelEm(m, false)*sideLegendPx)
	}
	// The layout's right margin takes the column, so a picture drawn to
	// share this one's x axis (the spread's strip) is as wide.
	g.Layout.Right = math.Max(lay.Right, x+sample+8+widest+4-lay.Left-lay.PlotW)
	title := g.cumul.bottom() + 42 + 17*float64(max(0, len(g.XTitleLines)-1))
	g.Height = math.Max(title+8, top+float64(rows)*24)
	g.ViewBox = "0 0 " + coord(g.Layout.width()) + " " + coord(g.Height)
	return out, slots
}

// newMarks lays out the first curve's median and 90% interval over g's
// plots (PanelView.Marked), named by words (the median's, the
// interval's) at the legend's slots.
func newMarks(g twinGeom, words []string, slots []legendSlot) *marksGeom {
	p := g.percentiles[0]
	lo, med, hi := g.dens.px(p[0]), g.dens.px(p[1]), g.dens.px(p[2])
	m := &marksGeom{
		BandX: coord(lo), BandW: coord(math.Max(1, hi-lo)),
		DensY: coord(g.dens.Top), DensH: coord(g.dens.Height),
		CumulY: coord(g.cumul.Top), CumulH: coord(g.cumul.Height),
		LowX: coord(lo), HighX: coord(hi),
		MedX: coord(med), Y1: coord(g.dens.Top), Y2: coord(g.cumul.bottom()),
		Stroke: g.Lines[0].Stroke,
	}
	entry := func(s legendSlot, label string) markLegend {
		return markLegend{X1: coord(s.X), X2: coord(s.X + s.Sample), Y: coord(s.Y), TextX: coord(s.X + s.Sample + 8), TextY: coord(s.Y + 5),
			SwatchY: coord(s.Y - 7), SwatchW: coord(s.Sample), Label: label}
	}
	if len(slots) == 2 {
		m.Median, m.Interval = entry(slots[0], words[0]), entry(slots[1], words[1])
	}
	return m
}

// legendEntry is the i-th curve's legend entry: a sample sample units
// long from x on row y, and the curve's label after it.
func legendEntry(g *twinGeom, i int, c Curve, x, y, sample float64, values func(xs ...float64) []string) legendGeom {
	l := g.Lines[i]
	lg := legendGeom{
		Y: coord(y), TextY: coord(y + 5), X1: coord(x), X2: coord(x + sample),
		TextX: coord(x + sample + 8), Label: c.Label, Role: l.Role,
		Stroke: l.Stroke, Width: l.Width, Dash: l.Dash, DashName: l.DashName,
	}
	p := g.percentiles[i]
	ps := values(p[0], p[1], p[2])
	lg.P5, lg.P50, lg.P95 = ps[0], ps[1], ps[2]
	if b, ok := c.beta(); ok {
		lg.Params = fmt.Sprintf("Beta(%s, %s)", FormatShape(b.Alpha), FormatShape(b.Beta.Beta))
	}
	return lg
}

// truthLabelAt places a true value's bold label for its line at column tx
// of a picture w units wide: centred on the line, unless at truthLabelPx
// (the largest size a stylesheet gives it, and the projector's view
// scales the whole picture, not the label alone) it would leave the
// picture; then anchored to the nearer edge. It returns the label's x and
// its text-anchor. The median strip and the picture of the curves both
// place theirs here.
func truthLabelAt(tx float64, label string, w float64) (float64, string) {
	half := labelEm(label, true) * truthLabelPx / 2
	switch {
	case tx-half < 2:
		return 2, "start"
	case tx+half > w-2:
		return w - 2, "end"
	}
	return tx, "middle"
}

package chart

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"github.com/a-h/templ"

	"github.com/parley-elicit/parley/elicit"
)

// ScoreRow is one expert's result on the calibration questions: the
// calibration score (a p-value in [0, 1]), the information score (≥ 0)
// and the share of the weight they earn (in [0, 1]).
type ScoreRow struct {
	Expert      string
	Calibration float64
	// LogCalibration is ln Calibration, which holds a score below the
	// smallest double (Calibration 0); such a score is written from it.
	LogCalibration float64
	Information    float64
	Weight         float64
}

// ScoresView is the picture of who earns weight under Cooke's classical
// model and why: each expert placed by calibration score (across, on a
// log scale) against information score (up), with the cut-off α drawn,
// the region below it shaded, and each expert's weight shown by the area
// of their disc and in their label. Pooled, when set, is the
// performance-weighted pool scored like an expert (its Weight unused).
type ScoresView struct {
	ID    string
	Rows  []ScoreRow
	Alpha float64
	// LogAlpha is ln α when α is a score below the smallest double, so
	// that Alpha reads 0 though experts are left out.
	LogAlpha *float64
	Pooled   *ScoreRow
}

// Layout of the weight map, in SVG units. Text is sized so that at the
// narrowest the figure is drawn (34rem on a phone, see chart.css) it is
// at least 11 px.
const (
	mapLeft   = 78.0
	mapTop    = 40.0
	mapWidth  = 530.0
	mapHeight = 290.0
	mapRight  = 24.0
	mapBelow  = 70.0
	// mapMaxR is the radius of a disc holding all the weight; area is
	// proportional to weight, so a disc of half the weight has radius
	// mapMaxR/√2.
	mapMaxR = 19.0
	mapMinR = 5.0
	// Labels are placed with their widths as DejaVu Sans draws them
	// (labelEm) at the sizes static/chart.css sets, the larger where it
	// sets two, so they cannot overlap: the experts' and the pool's
	// (bold) at 14px, 15px on a phone, the cut-off's at 14px bold, the
	// shaded region's note at 13px; and with this line height.
	mapLabelPx = 15.0
	mapCutPx   = 14.0
	mapNotePx  = 13.0
	mapLineH   = 19.0
	// mapLowest is the smallest decade drawn; lower scores sit on the
	// left edge and their labels say so.
	mapLowest = -12.0
	// On a phone the map is drawn mapPhonePx wide (34rem, chart.css) in a
	// box as narrow as mapPhoneBoxPx (a 360 px phone's), and scrolls; a
	// shadow mapEdgePx wide (1.1rem) marks an edge with more beyond it.
	mapPhonePx    = 544.0
	mapPhoneBoxPx = 308.0
	mapEdgePx     = 17.6
)

// mapOpensLeft says whether a phone opens the weight map at its left
// end: only when the cut-off's label (x0 to x1 in SVG units, the map w
// units wide) is in view from there and not from the right end. The
// right end holds the experts who earn weight and, for most cut-offs,
// the cut-off; for a cut-off far to the left it holds neither.
func mapOpensLeft(x0, x1, w float64) bool {
	unit := w / mapPhonePx // SVG units to a pixel
	shown, edge := mapPhoneBoxPx*unit, mapEdgePx*unit
	return x1 <= shown-edge && x0 < w-shown+edge
}

// Hints above the weight map on a phone, where it is wider than the
// screen: which way the rest of it lies and what is there.
const (
	mapHintLeft      = "← More of the map lies to the left: lower calibration scores and the information score's scale. It opens at the cut-off; swipe it sideways to see the rest."
	mapHintLeftNoCut = "← More of the map lies to the left: lower calibration scores and the information score's scale. Swipe it sideways to see the rest."
	mapHintRight     = "More of the map lies to the right →: higher calibration scores. It opens at the cut-off; swipe it sideways to see the rest."
)

type mapPoint struct {
	X, Y, R              string
	Weighted             bool
	LabelX, LabelY       string
	Anchor               string
	Label                string
	Leader               bool
	LeadX1, LeadY1       string
	LeadX2, LeadY2       string
	Calibration, Weight  string // data values, for tests and assistive tools
	Information, Clipped string
	// Nudge is how far the disc is drawn below (or, negative, above) its
	// place, in SVG units, to keep it apart from another (discsApart).
	Nudge string
}

type mapCut struct {
	X, Top, Bottom, Left string
	ShadeW, ShadeH       string
	Shade                bool
	Label                string
	LabelX, LabelY       string
	Anchor               string
	ShadeLabel           string
	ShadeLabelX          string
	ShadeLabelY          string
	Value                string
}

type mapDiamond struct {
	Path, LabelX, LabelY, Anchor string
	Label                        string
}

type scoresModel struct {
	ID      string
	Empty   bool
	ViewBox string
	Title   string
	Desc    string
	Axis    axesGeom
	XTicks  []tickGeom
	XLabelY string
	XTitle  string
	XTitleX string
	XTitleY string
	Cut     mapCut
	Points  []mapPoint
	Pool    *mapDiamond
	// OpensLeft: on a phone the map opens at its left end, the only one
	// from which its cut-off's label is in view (mapOpensLeft); Hint
	// says which way the rest of it lies. ShowCut: a cut-off that leaves
	// experts out, which a phone brings into view (page.js); a cut-off
	// of 0 does not, and the map opens at its right end.
	OpensLeft bool
	ShowCut   bool
	Hint      string
}

// Scores draws the weight map with its caption.
func Scores(v ScoresView) templ.Component {
	return scoresFigure(newScoresModel(v))
}

func finiteIn(v, lo, hi float64) bool { return isFinite(v) && v >= lo && v <= hi }

func newScoresModel(v ScoresView) scoresModel {
	m := scoresModel{ID: v.ID}
	if m.ID == "" {
		m.ID = "weight-map"
	}
	var rows []ScoreRow
	for _, r := range v.Rows {
		if finiteIn(r.Calibration, 0, 1) && isFinite(r.Information) && r.Information >= 0 && finiteIn(r.Weight, 0, 1) {
			rows = append(rows, r)
		}
	}
	if len(rows) == 0 {
		m.Empty = true
		return m
	}
	pooled := v.Pooled
	if pooled != nil && !(finiteIn(pooled.Calibration, 0, 1) && isFinite(pooled.Information) && pooled.Information >= 0) {
		pooled = nil
	}
	alpha := v.Alpha
	if !finiteIn(alpha, 0, 1) {
		alpha = 0
	}

	// Across: log10 of the calibration score, from the decade at or below
	// the smallest positive score shown (never above 0.1, never below
	// 1e-12) to 1, with a little room on both sides for the discs.
	lo := -1.0
	consider := func(c float64) {
		if c > 0 {
			lo = math.Min(lo, math.Floor(math.Log10(c)))
		}
	}
	for _, r := range rows {
		consider(r.Calibration)
	}
	if pooled != nil {
		consider(pooled.Calibration)
	}
	consider(alpha)
	lo = math.Max(lo, mapLowest)
	pad := 0.06 * -lo
	// Up: information from 0 to a round number above the largest score.
	top := 0.0
	for _, r := range rows {
		top = math.Max(top, r.Information)
	}
	if pooled != nil {
		top = math.Max(top, pooled.Information)
	}
	if !(top > 0) {
		top = 1
	}
	yTicks := ticks(0, top*1.15, 4)
	yTop := top * 1.15
	if n := len(yTicks); n > 0 && yTicks[n-1].Value > yTop {
		yTop = yTicks[n-1].Value
	}
	f := frame{Left: mapLeft, Top: mapTop, Width: mapWidth, Height: mapHeight, X0: lo - pad, X1: pad, Y0: 0, Y1: yTop}
	xOf := func(c float64) (float64, bool) {
		if c <= 0 || math.Log10(c) < lo {
			return f.px(lo), true
		}
		return f.px(math.Log10(c)), false
	}

	m.ViewBox = "0 0 " + coord(mapLeft+mapWidth+mapRight) + " " + coord(mapTop+mapHeight+mapBelow)
	m.Axis = axesGeom{X: coord(f.Left), Y: coord(f.Top), W: coord(f.Width), H: coord(f.Height), Right: coord(f.right()), Bottom: coord(f.bottom()),
		Class: "plot-weight-map", YTitle: "information score ↑"}
	for _, t := range yTicks {
		m.Axis.YTicks = append(m.Axis.YTicks, tickGeom{Pos: coord(f.py(t.Value)), Label: t.Label, Value: fmt.Sprint(t.Value)})
	}
	tx, ty := mapLeft-52, f.Top+f.Height/2
	m.Axis.YTitleX, m.Axis.YTitleY = coord(tx), coord(ty)
	m.Axis.YTitleRotation = "rotate(-90 " + coord(tx) + " " + coord(ty) + ")"
	stride := math.Max(1, math.Ceil(-lo/5))
	for e := 0.0; e >= lo; e -= stride {
		m.XTicks = append(m.XTicks, tickGeom{Pos: coord(f.px(e)), Label: decadeLabel(e), Value: fmt.Sprint(math.Pow(10, e))})
	}
	m.XLabelY = coord(f.bottom() + 20)
	m.XTitle, m.XTitleX, m.XTitleY = "calibration score (log scale) → better calibrated", coord(f.Left+f.Width/2), coord(f.bottom()+50)

	// The cut-off and the scores below it are written with the figures
	// that keep each on its own side of the other: a cut-off fixed at a
	// score as the page shows it (0.1878 for 0.187753) lies above it.
	alphaDigits := scoreFigures
	for _, r := range rows {
		if r.Calibration < alpha {
			alphaDigits = max(alphaDigits, elicit.SideDigits(alpha, r.Calibration, scoreFigures))
		}
	}
	alphaText := formatSig(alpha, alphaDigits)
	cutting := alpha > 0
	if v.LogAlpha != nil {
		alphaText, cutting = elicit.FormatExp(*v.LogAlpha, scoreFigures), true
	}
	scoreText := func(r ScoreRow) string {
		if elicit.BelowDouble(r.Calibration, r.LogCalibration) {
			return elicit.FormatExp(r.LogCalibration, scoreFigures)
		}
		c := r.Calibration
		if c < alpha {
			return formatSig(c, elicit.SideDigits(c, alpha, scoreFigures))
		}
		return formatScore(c)
	}

	// The cut-off: experts left of it get weight 0.
	cx, _ := xOf(alpha)
	m.Cut = mapCut{X: coord(cx), Top: coord(f.Top), Bottom: coord(f.bottom()), Left: coord(f.Left), ShadeW: coord(cx - f.Left), ShadeH: coord(f.Height),
		Shade: alpha > 0 && cx > f.Left, Value: fmt.Sprint(alpha), LabelY: coord(f.Top - 10)}
	if cutting {
		m.Cut.Label = "cut-off α = " + alphaText
	} else {
		m.Cut.Label = "cut-off α = 0: no expert is left out"
	}
	m.Cut.LabelX, m.Cut.Anchor = coord(cx), "middle"
	cutW := labelEm(m.Cut.Label, true) * mapCutPx
	half := cutW / 2
	switch {
	case cx-half < 4:
		m.Cut.LabelX, m.Cut.Anchor = coord(math.Max(cx, 4)), "start"
	case cx+half > mapLeft+mapWidth+mapRight-4:
		m.Cut.LabelX, m.Cut.Anchor = coord(cx), "end"
	}

	// Discs, largest first so small ones stay visible on top.
	order := make([]int, len(rows))
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(a, b int) bool { return rows[order[a]].Weight > rows[order[b]].Weight })
	// The cut-off's label and the shaded region's are placed first.
	cutBox := labelBox{x0: cx - cutW/2, x1: cx + cutW/2, y0: f.Top - 10 - mapLineH + 4, y1: f.Top - 6}
	switch m.Cut.Anchor {
	case "start":
		cutBox.x0, cutBox.x1 = math.Max(cx, 4), math.Max(cx, 4)+cutW
	case "end":
		cutBox.x0, cutBox.x1 = cx-cutW, cx
	}
	placed := []labelBox{cutBox}
	m.ShowCut = cutting
	m.OpensLeft = cutting && mapOpensLeft(cutBox.x0, cutBox.x1, mapLeft+mapWidth+mapRight)
	switch {
	case m.OpensLeft:
		m.Hint = mapHintRight
	case cutting:
		m.Hint = mapHintLeft
	default:
		m.Hint = mapHintLeftNoCut
	}
	// Every disc, and the pool's diamond, is in place before any label:
	// a label kept off the other labels but not off the discs, and the
	// demo's "weighted pool" was written over Priya Raman's disc.
	discs := make([]disc, len(rows))
	for i, r := range rows {
		x, clipped := xOf(r.Calibration)
		rad := mapMinR
		if r.Weight > 0 {
			rad = math.Max(mapMinR+1, mapMaxR*math.Sqrt(r.Weight))
		}
		discs[i] = disc{x: x, y: f.py(r.Information), rad: rad, clipped: clipped}
	}
	// Experts whose scores nearly agree would draw one disc over another:
	// such discs are drawn apart, up or down only (spreadApart), never
	// across, since the calibration score decides which side of the
	// cut-off a disc is on. The caption states the largest move; its
	// scores, and the table's, are exact.
	nudge := spreadApart(discs, order, f)
	// The shaded region's "weight 0" goes in its lower left corner, or its
	// upper left where a disc lies under the lower, or nowhere (the key
	// names the shading too).
	const shadeText = "weight 0"
	shadeW := labelEm(shadeText, false) * mapNotePx
	if m.Cut.Shade && cx-f.Left > shadeW+12 {
		for _, baseline := range []float64{f.bottom() - 10, f.Top + mapLineH} {
			box := labelBox{x0: f.Left + 8, x1: f.Left + 8 + shadeW, y0: baseline - mapLineH + 4, y1: baseline + 10}
			clear := true
			for _, d := range discs {
				clear = clear && !box.overlaps(labelBox{x0: d.x - d.rad, x1: d.x + d.rad, y0: d.y - d.rad, y1: d.y + d.rad})
			}
			if clear {
				m.Cut.ShadeLabel, m.Cut.ShadeLabelX, m.Cut.ShadeLabelY = shadeText, coord(f.Left+8), coord(baseline)
				placed = append(placed, box)
				break
			}
		}
	}
	for _, d := range discs {
		placed = append(placed, labelBox{x0: d.x - d.rad, x1: d.x + d.rad, y0: d.y - d.rad, y1: d.y + d.rad})
	}
	if pooled != nil {
		x, _ := xOf(pooled.Calibration)
		y := f.py(pooled.Information)
		const s = 9.0
		d := &mapDiamond{
			Path:  "M" + coord(x) + "," + coord(y-s) + " L" + coord(x+s) + "," + coord(y) + " L" + coord(x) + "," + coord(y+s) + " L" + coord(x-s) + "," + coord(y) + " Z",
			Label: "weighted pool",
		}
		// The pool often sits on the disc of the expert it follows: its
		// label starts clear of that disc, not inside it.
		clear := s
		for _, c := range discs {
			if math.Hypot(c.x-x, c.y-y) < c.rad {
				clear = math.Max(clear, c.rad+math.Hypot(c.x-x, c.y-y))
			}
		}
		b := placeLabel(d.Label, true, x, y, clear, f, placed)
		placed = append(placed, b)
		d.LabelX, d.LabelY, d.Anchor = coord(b.textX), coord(b.baseline), b.anchor
		m.Pool = d
	}
	for _, i := range order {
		r := rows[i]
		x, y, rad, clipped := discs[i].x, discs[i].y, discs[i].rad, discs[i].clipped
		label := r.Expert + " · " + FormatPercent(r.Weight)
		if clipped {
			label += " (calibration " + scoreText(r) + ")"
		}
		b := placeLabel(label, false, x, y, rad, f, placed)
		placed = append(placed, b)
		p := mapPoint{X: coord(x), Y: coord(y), R: coord(rad), Weighted: r.Weight > 0, Label: label, Nudge: coord(y - f.py(r.Information)),
			LabelX: coord(b.textX), LabelY: coord(b.baseline), Anchor: b.anchor,
			Calibration: fmt.Sprint(r.Calibration), Information: fmt.Sprint(r.Information), Weight: fmt.Sprint(r.Weight)}
		if clipped {
			p.Clipped = "true"
		}
		if b.moved {
			p.Leader = true
			p.LeadX1, p.LeadY1 = coord(b.leadX), coord(y)
			p.LeadX2, p.LeadY2 = coord(b.leadX2), coord(b.baseline-5)
		}
		m.Points = append(m.Points, p)
	}

	var words []string
	for _, r := range rows {
		words = append(words, fmt.Sprintf("%s: calibration %s, information %s, weight %s", r.Expert,
			scoreText(r), formatSig(r.Information, scoreFigures), FormatPercent(r.Weight)))
	}
	m.Title = "Who earns weight: calibration against information"
	cut := fmt.Sprintf("Experts left of the cut-off α = %s get weight 0", alphaText)
	if !cutting {
		cut = "The cut-off is 0, so no expert is left out"
	}
	m.Desc = "Each disc is an expert: further right means better calibrated (the true values fell where their quantiles said they would), " +
		"higher means more informative (narrower ranges than the panel's). " + cut + "; the others share the weight in proportion to " +
		"calibration × information, shown by the disc's area. " + strings.Join(words, "; ") + "."
	if nudge > 0.005 {
		m.Desc += " Discs of experts whose scores nearly agree are drawn apart, up or down only, by at most " +
			roundedUp(nudge*(f.Y1-f.Y0)/f.Height) + " in information score, so that each shows; the scores written here are exact."
	}
	if pooled != nil {
		poolText := formatScore(pooled.Calibration)
		if elicit.BelowDouble(pooled.Calibration, pooled.LogCalibration) {
			poolText = elicit.FormatExp(pooled.LogCalibration, scoreFigures)
		}
		m.Desc += fmt.Sprintf(" The diamond is the performance-weighted pool scored as if it were an expert: calibration %s, information %s.",
			poolText, formatSig(pooled.Information, scoreFigures))
	}
	return m
}

// disc is an expert's disc on the weight map, in SVG units.
type disc struct {
	x, y, rad float64
	clipped   bool
}

// discsApart is how far apart two discs' centres must be for both to
// show: each centre outside the other disc, stroke and all, by a margin
// of half the smaller radius, so that two discs read as two and not as
// one disc with a rim.
func discsApart(a, b disc) float64 {
	return math.Max(a.rad, b.rad) + math.Min(a.rad, b.rad)/2 + 2
}

// hides says whether disc a or b, drawn on the other, would hide it: only
// discs of like size do. A disc well smaller than the other (at most
// 0.6 of its radius: a weight-0 ring on a disc with a fifth of the
// weight or more) is drawn after it, on top (discs go largest first),
// and shows there whole at its own place, so it is not moved: a move
// would misstate its information score to show what already shows.
func hides(a, b disc) bool {
	return math.Min(a.rad, b.rad) > 0.6*math.Max(a.rad, b.rad)
}

// spreadApart moves discs of like size (hides) that are closer than
// discsApart up and down,
// the smaller of a pair the more, until every pair is apart, keeping each
// centre inside the plot and the order up the plot of the discs it
// moves apart: of two such, the one of the higher information score
// stays higher (on a tie, the one earlier in order, the larger). It
// returns the largest move, in SVG units.
func spreadApart(ds []disc, order []int, f frame) float64 {
	orig := make([]float64, len(ds))
	rank := make([]int, len(ds))
	for i, d := range ds {
		orig[i] = d.y
	}
	for k, i := range order {
		rank[i] = k
	}
	// above says disc i belongs above disc j (a smaller y on the screen).
	above := func(i, j int) bool { return orig[i] < orig[j] || (orig[i] == orig[j] && rank[i] < rank[j]) }
	clamp := func(y float64) float64 { return math.Min(math.Max(y, f.Top), f.bottom()) }
	for range 400 {
		moved := false
		for i := range ds {
			for j := range i {
				need := discsApart(ds[i], ds[j])
				dx := math.Abs(ds[i].x - ds[j].x)
				if dx >= need || !hides(ds[i], ds[j]) {
					continue
				}
				up, down := i, j
				if above(j, i) {
					up, down = j, i
				}
				gap := math.Sqrt(need*need - dx*dx)
				short := gap - (ds[down].y - ds[up].y)
				if short <= 1e-6 {
					continue
				}
				// The smaller disc moves the more (in inverse proportion
				// to area; two alike move half each), so an expert with
				// most of the weight stays nearly in place; each takes
				// the other's share where the other is held by the
				// plot's edge.
				au, ad := ds[up].rad*ds[up].rad, ds[down].rad*ds[down].rad
				ds[up].y = clamp(ds[up].y - short*ad/(au+ad))
				ds[down].y = clamp(ds[up].y + gap)
				ds[up].y = clamp(ds[down].y - gap)
				moved = true
			}
		}
		if !moved {
			break
		}
	}
	var most float64
	for i, d := range ds {
		most = math.Max(most, math.Abs(d.y-orig[i]))
	}
	return most
}

// roundedUp writes v > 0 to two significant figures, rounded up, so that
// "at most" before it holds.
func roundedUp(v float64) string {
	unit := math.Pow(10, math.Floor(math.Log10(v))-1)
	return formatSig(math.Ceil(v/unit-1e-9)*unit, 2)
}

// labelBox is a placed label: its box for overlap tests, where its text
// starts and which way it runs, and a leader line when it had to move
// away from its disc.
type labelBox struct {
	x0, x1, y0, y1  float64
	textX, baseline float64
	anchor          string
	moved           bool
	leadX, leadX2   float64
}

func (a labelBox) overlaps(b labelBox) bool {
	return a.x0 < b.x1 && b.x0 < a.x1 && a.y0 < b.y1 && b.y0 < a.y1
}

// placeLabel puts a label beside the disc at (x, y) of radius r, to the
// right when it fits inside the picture and to the left otherwise, moved
// down (or up) in steps until it overlaps no label already placed; bold
// is the pool's label, drawn at weight 600.
func placeLabel(text string, bold bool, x, y, r float64, f frame, placed []labelBox) labelBox {
	w := labelEm(text, bold) * mapLabelPx
	edge := mapLeft + mapWidth + mapRight - 2
	right := x+r+6+w <= edge || (x-r-6-w < 2 && edge-x > x)
	mk := func(dy float64) labelBox {
		b := labelBox{y0: y - mapLineH/2 + dy, y1: y + mapLineH/2 + dy, baseline: y + 5 + dy}
		if right {
			b.textX, b.anchor = x+r+6, "start"
			b.x0, b.x1 = b.textX, b.textX+w
			b.leadX, b.leadX2 = x+r, b.textX-2
		} else {
			b.textX, b.anchor = x-r-6, "end"
			b.x0, b.x1 = b.textX-w, b.textX
			b.leadX, b.leadX2 = x-r, b.textX+2
		}
		return b
	}
	free := func(b labelBox) bool {
		if b.y0 < f.Top-mapLineH || b.y1 > f.bottom() {
			return false
		}
		for _, p := range placed {
			if b.overlaps(p) {
				return false
			}
		}
		return true
	}
	for step := 0.0; step < 40; step++ {
		for _, dy := range []float64{step * 4, -step * 4} {
			if b := mk(dy); free(b) {
				b.moved = math.Abs(dy) > r
				return b
			}
		}
	}
	return mk(0)
}

// decadeLabel writes 10^e for a whole e ≤ 0 as the pages write numbers,
// in plain decimals down to 1e-9 (FormatSpread's rule: 0.0001, not
// "1e-4", beside a score of 0.0003602), then 1e-10.
func decadeLabel(e float64) string {
	return formatSigFixedFrom(math.Pow(10, e), 4, -9)
}

// scoreFigures is the significant figures of the map's scores and
// cut-off: the page's table and sentences under the map write them with
// four (FormatValue), and a caption of "calibration 0.839" over a table
// of 0.8392 gave one score two values.
const scoreFigures = 4

// formatScore writes a calibration score, which may be tiny.
func formatScore(v float64) string { return formatSig(v, scoreFigures) }

package chart

import (
	"fmt"
	"math"
	"strings"

	"github.com/a-h/templ"
)

// ScoreRow is one expert's result on the calibration questions: the
// calibration score (a p-value in [0, 1]), the information score (≥ 0)
// and the weight they earn in the pool (in [0, 1]).
type ScoreRow struct {
	Expert      string
	Calibration float64
	Information float64
	Weight      float64
}

// Layout of the scores chart.
const (
	scoreLabelW = 120.0
	scorePanelW = 190.0
	scorePanelG = 26.0
	scoreTop    = 40.0
	scoreRowH   = 28.0
	scoreBarH   = 16.0
	scoreBelow  = 44.0
)

type barGeom struct {
	X, Y, W, H   string
	ValueX       string
	TextY        string
	Value        string
	Missing      bool
	Fill         string
	DataValue    string
	Anchor       string
	ExpertLabelY string
}

type scorePanel struct {
	Title   string
	Note    string
	X, W    string
	Top     string
	Bottom  string
	TitleX  string
	Ticks   []tickGeom
	TickY   string
	Bars    []barGeom
	Class   string
	LogAxis bool
}

type scoresModel struct {
	ViewBox string
	Desc    string
	Labels  []barGeom // expert labels, one per row
	Panels  []scorePanel
	Rows    []scoreTableRow
	Empty   bool
}

type scoreTableRow struct {
	Expert, Calibration, Information, Weight string
}

// Scores draws each expert's calibration score (on a log scale, since
// scores span orders of magnitude), information score and weight as bars
// side by side, with a table of the same numbers.
func Scores(rows []ScoreRow) templ.Component {
	return scoresFigure(newScoresModel(rows))
}

func newScoresModel(rows []ScoreRow) scoresModel {
	var m scoresModel
	if len(rows) == 0 {
		m.Empty = true
		return m
	}
	bottom := scoreTop + float64(len(rows))*scoreRowH
	width := scoreLabelW + 3*scorePanelW + 2*scorePanelG + 20
	m.ViewBox = "0 0 " + coord(width) + " " + coord(bottom+scoreBelow)
	for i, r := range rows {
		y := scoreTop + float64(i)*scoreRowH + scoreRowH/2
		m.Labels = append(m.Labels, barGeom{ExpertLabelY: coord(y + 4.5), Value: r.Expert})
		m.Rows = append(m.Rows, scoreTableRow{
			Expert: r.Expert, Calibration: formatScore(r.Calibration),
			Information: formatSig(r.Information, 3), Weight: formatSig(r.Weight, 3),
		})
	}

	// Calibration: log axis from the decade below the smallest positive
	// score (at most 1e-12) to 1.
	minPos := 1.0
	for _, r := range rows {
		if isFinite(r.Calibration) && r.Calibration > 0 && r.Calibration < minPos {
			minPos = r.Calibration
		}
	}
	lo := math.Max(-12, math.Floor(math.Log10(minPos)))
	if lo > -1 {
		lo = -1
	}
	cal := frame{Left: scoreLabelW, Top: scoreTop, Width: scorePanelW, Height: bottom - scoreTop, X0: lo, X1: 0, Y0: 0, Y1: 1}
	var calTicks []tick
	stride := math.Max(1, math.Ceil(-lo/4))
	for e := 0.0; e >= lo; e -= stride {
		calTicks = append(calTicks, tick{Value: e, Label: decadeLabel(e)})
	}
	m.Panels = append(m.Panels, newScorePanel("calibration (log scale)", "calibration", cal, calTicks, rows,
		func(r ScoreRow) (float64, bool) {
			if !isFinite(r.Calibration) || r.Calibration < 0 || r.Calibration > 1 {
				return 0, false
			}
			if r.Calibration == 0 {
				return lo, true // an empty bar; the label reads 0
			}
			return math.Max(lo, math.Log10(r.Calibration)), true
		}, func(r ScoreRow) string { return formatScore(r.Calibration) }, "#0072B2"))

	maxInfo := 0.0
	for _, r := range rows {
		if isFinite(r.Information) && r.Information > maxInfo {
			maxInfo = r.Information
		}
	}
	if !(maxInfo > 0) {
		maxInfo = 1
	}
	infoTicks := ticks(0, maxInfo*1.1, 3)
	infoTop := maxInfo * 1.1
	if n := len(infoTicks); n > 0 && infoTicks[n-1].Value > infoTop {
		infoTop = infoTicks[n-1].Value
	}
	info := frame{Left: scoreLabelW + scorePanelW + scorePanelG, Top: scoreTop, Width: scorePanelW, Height: bottom - scoreTop, X0: 0, X1: infoTop, Y0: 0, Y1: 1}
	m.Panels = append(m.Panels, newScorePanel("information", "information", info, infoTicks, rows,
		func(r ScoreRow) (float64, bool) {
			return r.Information, isFinite(r.Information) && r.Information >= 0
		}, func(r ScoreRow) string { return formatSig(r.Information, 3) }, "#E69F00"))

	wt := frame{Left: scoreLabelW + 2*(scorePanelW+scorePanelG), Top: scoreTop, Width: scorePanelW, Height: bottom - scoreTop, X0: 0, X1: 1, Y0: 0, Y1: 1}
	m.Panels = append(m.Panels, newScorePanel("weight", "weight", wt, ticks(0, 1, 4), rows,
		func(r ScoreRow) (float64, bool) {
			return r.Weight, isFinite(r.Weight) && r.Weight >= 0 && r.Weight <= 1
		}, func(r ScoreRow) string { return formatSig(r.Weight, 3) }, "#009E73"))

	var words []string
	for _, r := range m.Rows {
		words = append(words, fmt.Sprintf("%s: calibration %s, information %s, weight %s", r.Expert, r.Calibration, r.Information, r.Weight))
	}
	m.Desc = "Calibration scores (log scale), information scores and weights of each expert. " + strings.Join(words, "; ") + "."
	return m
}

func newScorePanel(title, class string, f frame, ts []tick, rows []ScoreRow,
	value func(ScoreRow) (float64, bool), label func(ScoreRow) string, fill string) scorePanel {
	p := scorePanel{
		Title: title, Class: class, X: coord(f.Left), W: coord(f.Width),
		Top: coord(f.Top), Bottom: coord(f.bottom()), TitleX: coord(f.Left),
		TickY: coord(f.bottom() + 16),
	}
	for _, t := range ts {
		p.Ticks = append(p.Ticks, tickGeom{Pos: coord(f.px(t.Value)), Label: t.Label, Value: fmt.Sprint(t.Value)})
	}
	for i, r := range rows {
		y := f.Top + float64(i)*scoreRowH + (scoreRowH-scoreBarH)/2
		b := barGeom{Y: coord(y), H: coord(scoreBarH), TextY: coord(y + scoreBarH - 3.5), Fill: fill, X: coord(f.Left)}
		v, ok := value(r)
		if !ok {
			b.Missing, b.W, b.Value = true, "0", "not available"
			b.ValueX, b.Anchor = coord(f.Left+4), "start"
			p.Bars = append(p.Bars, b)
			continue
		}
		w := math.Max(0, math.Min(f.Width, f.px(v)-f.Left))
		b.W, b.Value, b.DataValue = coord(w), label(r), fmt.Sprint(v)
		// Put the number inside long bars and after short ones.
		if w > f.Width*0.6 {
			b.ValueX, b.Anchor = coord(f.Left+w-4), "end"
		} else {
			b.ValueX, b.Anchor = coord(f.Left+w+4), "start"
		}
		p.Bars = append(p.Bars, b)
	}
	return p
}

// decadeLabel writes 10^e for a whole e ≤ 0: 1, 0.1, 0.01, 0.001, then 1e-4.
func decadeLabel(e float64) string {
	if e >= -3 {
		return FormatValue(math.Pow(10, e))
	}
	return fmt.Sprintf("1e%d", int(e))
}

// formatScore writes a calibration score, which may be tiny.
func formatScore(v float64) string { return formatSig(v, 3) }

func barTextClass(b barGeom) string {
	if b.Anchor == "end" && !b.Missing {
		return "bar-label bar-label-inside"
	}
	return "bar-label"
}

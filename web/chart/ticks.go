package chart

import (
	"math"
	"strconv"
)

// tick is one labelled position on an axis, in data units.
type tick struct {
	Value float64
	Label string
}

// niceStep returns a step of the form {1, 2, 5} × 10^k close to span/n,
// the usual choice for readable axes (Heckbert 1990, "Nice numbers for
// graph labels", Graphics Gems).
func niceStep(span float64, n int) float64 {
	if !(span > 0) || math.IsInf(span, 0) || n < 1 {
		return 1
	}
	raw := span / float64(n)
	mag := math.Pow(10, math.Floor(math.Log10(raw)))
	switch f := raw / mag; {
	case f < 1.5:
		return mag
	case f < 3.5:
		return 2 * mag
	case f < 7.5:
		return 5 * mag
	}
	return 10 * mag
}

// stepDecimals is the number of decimals that shows every multiple of
// step exactly, so labels carry no floating-point noise. The noise is
// judged relative to the step: an absolute 1e-9 took a step of 5e-10 for
// a whole number, and every tick of a window under about 4e-9 wide read
// "0" and stood at 0, far outside the plot.
func stepDecimals(step float64) int {
	d := 0
	for s := step; d < 40 && math.Abs(s-math.Round(s)) > 1e-6*s; s *= 10 {
		d++
	}
	return d
}

// coarserStep is the next step after step in the sequence niceStep
// draws from: 1 → 2 → 5 → 10 × 10^k.
func coarserStep(step float64) float64 {
	// The nudge keeps a power of ten whose logarithm falls a hair short
	// of a whole number (1e-7: −7.000…01) on its own decade.
	mag := math.Pow(10, math.Floor(math.Log10(step)+1e-9))
	switch f := step / mag; {
	case f < 1.5:
		return 2 * mag
	case f < 3.5:
		return 5 * mag
	}
	return 10 * mag
}

// ticks returns the multiples of a nice step inside [lo, hi], about n of
// them, labelled without floating-point noise.
func ticks(lo, hi float64, n int) []tick {
	if !(hi > lo) || math.IsInf(lo, 0) || math.IsInf(hi, 0) {
		return nil
	}
	return ticksOf(lo, hi, niceStep(hi-lo, n), 4*n+4)
}

// ticksOf returns the multiples of step inside [lo, hi], at most most+1
// of them, labelled without floating-point noise.
func ticksOf(lo, hi, step float64, most int) []tick {
	dec := stepDecimals(step)
	eps := step * 1e-9
	var ts []tick
	for k := math.Ceil((lo - eps) / step); ; k++ {
		v := k * step
		if v > hi+eps {
			break
		}
		// Round to the step's decimals so 0.30000000000000004 reads 0.3.
		v, _ = strconv.ParseFloat(strconv.FormatFloat(v, 'f', dec, 64), 64)
		if v == 0 {
			v = 0 // no "-0"
		}
		label := strconv.FormatFloat(v, 'f', dec, 64)
		if v == 0 {
			label = "0"
		}
		ts = append(ts, tick{Value: v, Label: label})
		if len(ts) > most {
			break
		}
	}
	return ts
}

// tickLabelPx is the x tick labels' font size in a layout, as
// static/chart.css sets it (the median strip's wide drawing sets its
// own, medianTickPx).
func tickLabelPx(layout string) float64 {
	if layout == compactLayout.Name {
		return 14
	}
	return 13
}

// medianTickPx is the median strip's wide tick labels' font size
// (.chart-medians .chart-wide .tick-label), drawn in a narrow column.
const medianTickPx = 17

// tickLabelGapEm is the least clear room between two neighbouring x tick
// labels, in ems of their font: 0.4 em, a little more than a space
// (common practice, no source), so that two numbers never read as one.
const tickLabelGapEm = 0.4

// xTicks chooses and lays out the x ticks of an axis over [lo, hi]: about
// n of them on a nice step (niceStep), each at column px(value) of a
// picture width units wide, written label(t) (nil: the tick's own label)
// in a font fontPx high, the label placed by tickLabelCentre. Where two
// neighbouring labels (as wide as labelEm says) would come closer than
// tickLabelGapEm (a narrow window far from zero: "0.4027165",
// "0.4027170", … 50 units apart on a phone, each about 76 wide), it takes
// the next coarser step of the same sequence (1, 2, 5 × 10^k), so fewer
// ticks with shorter labels, but never fewer than two ticks. If the
// coarsest step with two ticks still crowds them, its ticks keep their
// gridlines and a label is written only where it clears the last one
// written, from the left. The curve pictures, the study's plots, the
// median strip and the steadiness picture take their x ticks from here.
func xTicks(lo, hi float64, n int, px func(float64) float64, label func(tick) string, fontPx, width float64) []tickGeom {
	if !(hi > lo) || math.IsInf(lo, 0) || math.IsInf(hi, 0) {
		return nil
	}
	var (
		gs      []tickGeom
		centres []float64
	)
	for step := niceStep(hi-lo, n); step < math.Inf(1); step = coarserStep(step) {
		ts := ticksOf(lo, hi, step, 4*n+4)
		if len(ts) < 2 && gs != nil {
			break // the step before was the coarsest with two ticks
		}
		gs, centres = make([]tickGeom, len(ts)), make([]float64, len(ts))
		for i, t := range ts {
			text := t.Label
			if label != nil {
				text = label(t)
			}
			pos := px(t.Value)
			centres[i] = tickLabelCentre(pos, text, fontPx, width)
			gs[i] = tickGeom{Pos: coord(pos), LabelX: coord(centres[i]), Label: text, Value: t.Label}
		}
		if len(ts) < 2 || tickLabelsApart(gs, centres, fontPx) {
			return gs
		}
	}
	last := -1
	for i := range gs {
		if last >= 0 && !tickLabelsClear(gs[last].Label, centres[last], gs[i].Label, centres[i], fontPx) {
			gs[i].Label = ""
			continue
		}
		last = i
	}
	return gs
}

// tickLabelsApart reports whether every two neighbouring labels of gs,
// centred at centres, clear each other.
func tickLabelsApart(gs []tickGeom, centres []float64, fontPx float64) bool {
	for i := 1; i < len(gs); i++ {
		if !tickLabelsClear(gs[i-1].Label, centres[i-1], gs[i].Label, centres[i], fontPx) {
			return false
		}
	}
	return true
}

// tickLabelsClear reports whether label a centred at x and label b
// centred at y further right leave tickLabelGapEm between them.
func tickLabelsClear(a string, x float64, b string, y float64, fontPx float64) bool {
	return y-x >= (labelEm(a, false)+labelEm(b, false))*fontPx/2+tickLabelGapEm*fontPx
}

// tickLabelHalf is half a tick label's width at fontPx, and a unit.
func tickLabelHalf(label string, fontPx float64) float64 {
	return labelEm(label, false)*fontPx/2 + 1
}

// tickLabelCentre is where a label fontPx high for a tick at column pos
// of a picture width units wide is centred: under its tick unless that
// would take it out of the picture; then it is moved in until it fits, a
// unit from the edge. A tick on the plot's right edge stood half its
// label beyond the compact picture's narrow right margin ("0.0006" for a
// rare event's prior, cut on a phone).
func tickLabelCentre(pos float64, label string, fontPx, width float64) float64 {
	half := tickLabelHalf(label, fontPx)
	at := pos
	if at+half > width {
		at = width - half
	}
	if at-half < 0 {
		at = half
	}
	return at
}

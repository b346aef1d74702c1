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

// ticks returns the multiples of a nice step inside [lo, hi], about n of
// them, labelled without floating-point noise.
func ticks(lo, hi float64, n int) []tick {
	if !(hi > lo) || math.IsInf(lo, 0) || math.IsInf(hi, 0) {
		return nil
	}
	step := niceStep(hi-lo, n)
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
		if len(ts) > 4*n+4 {
			break
		}
	}
	return ts
}

// tickLabelEm is a tick label's advance width in ems, a character at a
// time, at about the widest the pictures' fonts draw it (DejaVu Sans,
// Debian's default sans-serif: digits 0.636 em, the point 0.318 em, the
// percent sign 0.95 em); narrower fonts leave a little room to spare.
func tickLabelEm(label string) float64 {
	w := 0.0
	for _, r := range label {
		switch {
		case r >= '0' && r <= '9':
			w += 0.64
		case r == '.' || r == ',' || r == ' ':
			w += 0.33
		case r == '-':
			w += 0.37
		case r == '%':
			w += 0.95
		default:
			w += 0.85
		}
	}
	return w
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

// xTick is an x tick at column pos of a picture width units wide, its
// label fontPx high, with the label centred under it unless that would
// take the label out of the picture: then the label is moved in until it
// fits, a unit from the edge. A tick on the plot's right edge stood half
// its label beyond the compact picture's narrow right margin ("0.0006"
// for a rare event's prior, cut on a phone).
func xTick(pos float64, label, value string, fontPx, width float64) tickGeom {
	half := tickLabelEm(label)*fontPx/2 + 1
	at := pos
	if at+half > width {
		at = width - half
	}
	if at-half < 0 {
		at = half
	}
	return tickGeom{Pos: coord(pos), LabelX: coord(at), Label: label, Value: value}
}

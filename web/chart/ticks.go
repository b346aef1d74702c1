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
// step exactly, so labels carry no floating-point noise.
func stepDecimals(step float64) int {
	d := 0
	for s := step; d < 15 && math.Abs(s-math.Round(s)) > 1e-9*math.Max(1, s); s *= 10 {
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

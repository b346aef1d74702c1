package chart

import (
	"math"
	"strconv"
)

// frame is one plot area: a data window mapped onto a pixel rectangle.
type frame struct {
	Left, Top, Width, Height float64 // pixels
	X0, X1                   float64 // data window, X0 < X1
	Y0, Y1                   float64 // data window, Y0 < Y1
}

func (f frame) right() float64  { return f.Left + f.Width }
func (f frame) bottom() float64 { return f.Top + f.Height }

// px maps a data x to a pixel column.
func (f frame) px(x float64) float64 { return f.Left + (x-f.X0)/(f.X1-f.X0)*f.Width }

// py maps a data y to a pixel row; larger y is higher on the page.
func (f frame) py(y float64) float64 { return f.bottom() - (y-f.Y0)/(f.Y1-f.Y0)*f.Height }

// pyClip maps y to a row inside the plot area. Values above the window
// (including +Inf, a density at a bound) sit on the top edge; ok is false
// for NaN, which breaks the line.
func (f frame) pyClip(y float64) (row float64, clipped, ok bool) {
	switch {
	case math.IsNaN(y):
		return 0, false, false
	case y > f.Y1:
		return f.Top, true, true
	case y < f.Y0:
		return f.bottom(), true, true
	}
	return f.py(y), false, true
}

// grid returns n+1 evenly spaced points over the data window.
func (f frame) grid(n int) []float64 {
	xs := make([]float64, n+1)
	for i := range xs {
		xs[i] = f.X0 + (f.X1-f.X0)*float64(i)/float64(n)
	}
	xs[n] = f.X1
	return xs
}

// linePath draws ys[k] at xs[k] as an SVG path, clipped to the plot
// area. It reports whether any part was cut at the top or bottom.
func (f frame) linePath(xs, ys []float64) (d string, clipped bool) {
	b := make([]byte, 0, 16*len(xs))
	pen := false
	for k, x := range xs {
		row, c, ok := f.pyClip(ys[k])
		if !ok {
			pen = false
			continue
		}
		clipped = clipped || c
		if pen {
			b = append(b, " L"...)
		} else {
			if len(b) > 0 {
				b = append(b, ' ')
			}
			b = append(b, 'M')
		}
		b = appendCoord(b, f.px(x))
		b = append(b, ',')
		b = appendCoord(b, row)
		pen = true
	}
	return string(b), clipped
}

// areaPath closes linePath down to the baseline, for a shaded density.
func (f frame) areaPath(xs, ys []float64) string {
	b := make([]byte, 0, 16*len(xs)+32)
	b = append(b, 'M')
	b = appendCoord(b, f.px(xs[0]))
	b = append(b, ',')
	b = appendCoord(b, f.bottom())
	for k, x := range xs {
		row, _, ok := f.pyClip(ys[k])
		if !ok {
			row = f.bottom()
		}
		b = append(b, " L"...)
		b = appendCoord(b, f.px(x))
		b = append(b, ',')
		b = appendCoord(b, row)
	}
	b = append(b, " L"...)
	b = appendCoord(b, f.px(xs[len(xs)-1]))
	b = append(b, ',')
	b = appendCoord(b, f.bottom())
	b = append(b, " Z"...)
	return string(b)
}

// coordShift adds d pixels to a coordinate written by coord.
func coordShift(c string, d float64) string {
	v, err := strconv.ParseFloat(c, 64)
	if err != nil {
		return c
	}
	return coord(v + d)
}

// dashAttr is the stroke-dasharray value; "none" draws a solid line.
func dashAttr(d string) string {
	if d == "" {
		return "none"
	}
	return d
}

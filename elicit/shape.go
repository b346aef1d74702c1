package elicit

import "strconv"

// shapeNoise is how far below 1 a shape parameter must lie to count as
// below 1 for the shape warnings: closer than this it is 1 in all but
// float64 rounding (the method of moments on the uniform's own mean and
// SD, 0.5 and 1/√12, gives 1 − 4e-16), and its density differs from the
// one at 1 by a factor of at most x^(−1e-9), nowhere visible.
const shapeNoise = 1e-9

// shapeBelowOne says a shape parameter is below 1 beyond rounding: the
// density then rises without limit at that bound.
func shapeBelowOne(x float64) bool { return x < 1-shapeNoise }

// shapeText writes a shape parameter to three significant figures, or as
// many more as it takes to read on its own side of 1 (0.99977 is
// "0.9998" and 1.000001 is "1.000001", not "1").
func shapeText(x float64) string {
	for digits := 3; digits < 17; digits++ {
		s := strconv.FormatFloat(x, 'g', digits, 64)
		if v, err := strconv.ParseFloat(s, 64); err == nil && (v < 1) == (x < 1) && (v > 1) == (x > 1) {
			return s
		}
	}
	return strconv.FormatFloat(x, 'g', -1, 64)
}

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

// ShapeText writes a shape parameter to three significant figures, or as
// many more as it takes to read on its own side of 1 (ShapeDigits):
// 0.99977 is "0.9998", not "1".
func ShapeText(x float64) string {
	return strconv.FormatFloat(x, 'g', ShapeDigits(x, 3), 64)
}

// ShapeDigits is the number of significant figures, at least min, that a
// shape parameter x takes to read on its own side of 1 when rounded:
// whether α or β is below, at or above 1 decides the density's shape at
// a bound (J- or U-shaped, or zero there), so a Beta written for people
// must not put 0.99997 as "1" beside a warning that it is below 1, nor
// 1.000001 as "1". It is min for most shapes, and at most 17, which
// reads back as x itself.
func ShapeDigits(x float64, min int) int { return SideDigits(x, 1, min) }

// SideDigits is the number of significant figures, at least min, that x
// takes to read on its own side of ref (below, at or above it) when
// rounded: a criterion's value written beside its goal, "0.0400004" and
// not "0.04" beside "the goal of 0.04 is not met"; a shape beside 1
// (ShapeDigits). At most 17, which reads back as x itself.
func SideDigits(x, ref float64, min int) int {
	for digits := min; digits < 17; digits++ {
		v, err := strconv.ParseFloat(strconv.FormatFloat(x, 'e', digits-1, 64), 64)
		if err == nil && (v < ref) == (x < ref) && (v > ref) == (x > ref) {
			return digits
		}
	}
	return 17
}

// ProbabilityText writes a computed probability p to figures significant
// figures, or as many more as it takes to stay short of 1 when p is short
// of 1 (ShapeDigits): an assurance of 0.9999872 is "0.99999", not "1",
// which would say the study cannot fail.
func ProbabilityText(p float64, figures int) string {
	if p < 1 {
		figures = ShapeDigits(p, figures)
	}
	return strconv.FormatFloat(p, 'g', figures, 64)
}

// PercentText is ProbabilityText as a percentage, without the % sign: a
// moment match that holds 0.99998657 of the prior is "99.999", not
// "100", which reads as all of it; a share of 0.99996 is "99.996".
func PercentText(p float64, figures int) string {
	if p < 1 {
		figures = ShapeDigits(p, figures)
	}
	return strconv.FormatFloat(100*p, 'g', figures, 64)
}

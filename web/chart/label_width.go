package chart

// advanceWidths are a font's advance widths in ems, for the characters
// the pictures' labels write.
type advanceWidths struct {
	digit, point, space, hyphen, percent float64
	lower                                [26]float64 // a to z
	other                                float64     // capitals and the rest, about a wide capital
}

// dejaVuSans and dejaVuSansBold are DejaVu Sans's widths, regular and
// bold: the fonts' own advance widths rounded up to the hundredth, read
// from Debian's fonts-dejavu-core 2.37 by testdata/fonts/advance_widths.py
// (its output, dejavu_advance_widths.txt, beside it). Digits are 0.6362
// em regular and 0.6958 bold, the point 0.3179 and 0.3799, the space
// 0.3179 and 0.3481, the percent sign 0.9502 and 1.002. Capitals, which
// the labels do not write, average 0.67 and 0.75 em, the widest (W)
// 0.99 and 1.10.
var (
	dejaVuSans = advanceWidths{digit: 0.64, point: 0.32, space: 0.32, hyphen: 0.37, percent: 0.96,
		lower: [26]float64{0.62, 0.64, 0.55, 0.64, 0.62, 0.36, 0.64, 0.64, 0.28, 0.28, 0.58, 0.28, 0.98,
			0.64, 0.62, 0.64, 0.64, 0.42, 0.53, 0.40, 0.64, 0.60, 0.82, 0.60, 0.60, 0.53},
		other: 0.85}
	dejaVuSansBold = advanceWidths{digit: 0.70, point: 0.38, space: 0.35, hyphen: 0.42, percent: 1.01,
		lower: [26]float64{0.68, 0.72, 0.60, 0.72, 0.68, 0.44, 0.72, 0.72, 0.35, 0.35, 0.67, 0.35, 1.05,
			0.72, 0.69, 0.72, 0.72, 0.50, 0.60, 0.48, 0.72, 0.66, 0.93, 0.65, 0.66, 0.59},
		other: 0.95}
)

// labelEm is a label's advance width in ems, a character at a time, as
// DejaVu Sans draws it; bold is DejaVu Sans Bold, which the stylesheet's
// weights of 600 and 700 (the fit's percentile labels, the true value's
// label) take, having nothing between. Every label's width in the
// pictures is estimated here, times its font size. DejaVu Sans is what
// system-ui and sans-serif are on Debian, and the widest of the fonts the
// stylesheet names (Segoe UI's and Roboto's digits are about 0.56 em,
// from memory), so other fonts leave a little room to spare.
func labelEm(label string, bold bool) float64 {
	a := &dejaVuSans
	if bold {
		a = &dejaVuSansBold
	}
	w := 0.0
	for _, r := range label {
		switch {
		case r >= '0' && r <= '9':
			w += a.digit
		case r == '.' || r == ',':
			w += a.point
		case r == ' ':
			w += a.space
		case r == '-':
			w += a.hyphen
		case r == '%':
			w += a.percent
		case r >= 'a' && r <= 'z':
			w += a.lower[r-'a']
		default:
			w += a.other
		}
	}
	return w
}

// TextEm is text's advance width in ems as DejaVu Sans (bold: DejaVu Sans
// Bold) draws it, for a page that lays out running text by its width (the
// room's reasons, web/room_reasons.go): labelEm's widths, with the
// narrow punctuation of running text at its own width, where labelEm
// counts it as a wide capital, 0.85 (DejaVu Sans's apostrophe 0.2749 em,
// colon, semicolon and slash 0.3369, parentheses 0.3901, exclamation mark
// 0.4009, question mark 0.5308; bold at most 0.07 wider: 0.3062, 0.3999,
// 0.3652, 0.457, 0.4561, 0.5801; read by the same script, its output at
// the end of dejavu_advance_widths.txt, rounded up); the two capitals
// wider than 0.85, M and W (0.8628 and 0.9888, bold 0.9951 and 1.103); and a
// character of the wide scripts (CJK, Hangul, full-width forms) counted
// as 1 em and a pictograph as 1.2, where 0.85 would undercount a line of
// them.
func TextEm(text string, bold bool) float64 {
	a := &dejaVuSans
	extra := 0.0
	if bold {
		a, extra = &dejaVuSansBold, 0.07
	}
	w := labelEm(text, bold)
	for _, r := range text {
		switch {
		case r == '\'':
			w += 0.28 + extra - a.other
		case r == ':' || r == ';' || r == '/':
			w += 0.34 + extra - a.other
		case r == '(' || r == ')':
			w += 0.40 + extra - a.other
		case r == 'M':
			w += 0.87 + 2*extra - a.other
		case r == 'W':
			w += 0.99 + 2*extra - a.other
		case r == '!':
			w += 0.41 + extra - a.other
		case r == '?':
			w += 0.54 + extra - a.other
		case r >= 0x1F000:
			w += max(0, 1.2-a.other)
		case r >= 0x2E80:
			w += max(0, 1-a.other)
		}
	}
	return w
}

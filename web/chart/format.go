package chart

import (
	"math"
	"strconv"
	"strings"

	"github.com/parley-elicit/parley/elicit"
)

// FormatValue writes v with four significant figures and no
// floating-point noise: 0.012, 4.2, 17.93, 125000. Very small or very large
// magnitudes use exponent notation (1.2e-07). Non-finite values read
// "not available" so that no NaN reaches a page.
func FormatValue(v float64) string {
	return formatSig(v, 4)
}

// FormatValueBeside writes v as FormatValue does, with as many more
// figures as it takes to read on its own side of other
// (elicit.SideDigits): a sample size's expected width of 0.0400004
// beside its goal of 0.04 is "0.0400004", not "0.04" beside "the goal is
// not met".
func FormatValueBeside(v, other float64) string {
	return formatSig(v, elicit.SideDigits(v, other, 4))
}

// FormatShape writes a Beta's α or β as FormatValue does, with as many
// more figures as it takes to read on its own side of 1
// (elicit.ShapeDigits): 0.99997 is "0.99997", not "1", beside a warning
// that the density is J-shaped.
func FormatShape(v float64) string {
	return formatSig(v, elicit.ShapeDigits(v, 4))
}

// FormatProbability writes a probability as FormatValue does, with as
// many more figures as it takes to stay short of 1 when it is short of 1
// (elicit.ShapeDigits, the rule FormatShape applies on either side of 1):
// a cumulative probability of 0.99996 is "0.99996", not "1", which reads
// as certainty.
func FormatProbability(p float64) string {
	return formatSig(p, elicit.ShapeDigits(p, 4))
}

// formatSig writes v rounded to sig significant figures (1 ≤ sig ≤ 17)
// as the shortest decimal of the rounded value: fixed notation from 1e-4
// up to 1e7, exponent notation (without "+" or leading zeros) outside.
// One fixed-precision conversion gives the rounded digits and exponent;
// they are placed by hand. (A decimal of at most 17 significant figures
// is the shortest that reads back as its own nearest double, so this
// writes what formatting that double by the shortest rule would; the
// test keeps that three-conversion form as its oracle. Subnormals, which
// hold fewer digits, take that form.)
func formatSig(v float64, sig int) string { return formatSigFixedFrom(v, sig, -4) }

// formatSigFixedFrom is formatSig with fixed notation from 10^minExp
// (minExp ≤ -4) instead of 1e-4.
func formatSigFixedFrom(v float64, sig, minExp int) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "not available"
	}
	if v == 0 {
		return "0"
	}
	var buf [32]byte
	e := strconv.AppendFloat(buf[:0], v, 'e', sig-1, 64) // [-]d.ddde±XX
	if math.Abs(v) < 0x1p-1022 {
		// A subnormal carries fewer digits than the rounding may give,
		// so the rounded value is read back and written shortest.
		r, _ := strconv.ParseFloat(string(e), 64)
		e = strconv.AppendFloat(buf[:0], r, 'e', -1, 64)
	}
	neg := e[0] == '-'
	if neg {
		e = e[1:]
	}
	i := 0
	for i < len(e) && e[i] != 'e' {
		i++
	}
	mant, expPart := e[:i], e[i+1:]
	exp := 0
	for _, c := range expPart[1:] {
		exp = 10*exp + int(c-'0')
	}
	if expPart[0] == '-' {
		exp = -exp
	}
	// The significant digits, trailing zeros dropped.
	var digits [24]byte
	n := 0
	for _, c := range mant {
		if c != '.' {
			digits[n] = c
			n++
		}
	}
	for n > 1 && digits[n-1] == '0' {
		n--
	}
	out := make([]byte, 0, n+12)
	if neg {
		out = append(out, '-')
	}
	switch {
	case exp >= minExp && exp < 0:
		out = append(out, '0', '.')
		for k := -1; k > exp; k-- {
			out = append(out, '0')
		}
		out = append(out, digits[:n]...)
	case exp >= 0 && exp < 7:
		if n <= exp+1 {
			out = append(out, digits[:n]...)
			for k := n; k <= exp; k++ {
				out = append(out, '0')
			}
		} else {
			out = append(out, digits[:exp+1]...)
			out = append(out, '.')
			out = append(out, digits[exp+1:n]...)
		}
	default:
		out = append(out, digits[0])
		if n > 1 {
			out = append(out, '.')
			out = append(out, digits[1:n]...)
		}
		out = append(out, 'e')
		if exp < 0 {
			out = append(out, '-')
			exp = -exp
		}
		out = strconv.AppendInt(out, int64(exp), 10)
	}
	return string(out)
}

// FormatWithin writes x, a value of a quantity that lies between lower
// and upper, for the person who gives or reads a judgement of it: with
// FormatValue's four significant figures, or as many more as it takes to
// stay on its own side of each bound (elicit.SideDigits), since a value
// the question allows only strictly inside its bounds must not read as a
// bound (0.99996 on [0, 1] is "0.99996", not "1"); in plain decimals down
// to 1e-9 (a rare event's 0.00001, not "1e-5"); and, when percent, as a
// percentage with the same figures (a typed 12.35% stays "12.35%", where
// FormatPercent's three figures for chances wrote "12.3%").
func FormatWithin(x, lower, upper float64, percent bool) string {
	return formatWithin(x, lower, upper, percent, 4)
}

// formatWithin is FormatWithin with at least min significant figures.
func formatWithin(x, lower, upper float64, percent bool, min int) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return "not available"
	}
	sig := max(elicit.SideDigits(x, lower, min), elicit.SideDigits(x, upper, min))
	if percent {
		return formatSigFixedFrom(x*100, sig, -9) + "%"
	}
	return formatSigFixedFrom(x, sig, -9)
}

// FormatRangeWithin writes the values xs of one range of a quantity on
// [lower, upper] (an axis window's ends, a fit's 5th, 50th and 95th
// percentiles, a pool's interval) as FormatWithin does, each with the
// figures FormatWithin gives it and, where that is not enough, as many
// more as it takes for values that differ to read apart (distinctFigures):
// a fit on [1000, 2000] as narrow as the accuracy envelope allows wrote
// its percentiles 1229.78, 1230.00 and 1230.22 all as "1230", one value.
// Two values count as one when they differ by no more than rangeNoise of
// the nearer one's distance to its nearer bound: computed values carry
// that much rounding (a two-point fit's median, 0.04000000000000003,
// beside the true value 0.04 was written to 17 figures on the projector's
// median strip), while typed values, which the rules keep a millionth of
// that distance apart (elicit.RuleValuesTooClose), always read apart.
func FormatRangeWithin(xs []float64, lower, upper float64, percent bool) []string {
	same := func(a, b float64) bool {
		d := math.Min(math.Min(a-lower, upper-a), math.Min(b-lower, upper-b))
		return a == b || d > 0 && math.Abs(a-b) <= rangeNoise*d
	}
	return distinctFigures(xs, func(x float64, min int) string { return formatWithin(x, lower, upper, percent, min) }, same)
}

// rangeNoise is the share of a value's distance to its nearer bound
// within which FormatRangeWithin takes two values for one: a thousandth
// of the least gap the rules allow between typed values (a millionth),
// and about the accuracy DEVELOPERS.md's envelope gives a well-conditioned
// Beta quantile (1e-9 relative, in its smaller tail).
const rangeNoise = 1e-9

// FormatRange writes the values xs of one range as FormatValue does, with
// as many more figures as it takes for values that differ to read apart
// (distinctFigures).
func FormatRange(xs []float64) []string {
	return distinctFigures(xs, formatSig, func(a, b float64) bool { return a == b })
}

// distinctFigures writes xs by write(x, min), min the least number of
// significant figures, from four up until values that differ are written
// differently (at most 17, where every double reads as itself); same says
// which values count as one. The figures are the same for the whole
// range, so equal values stay written alike; the check is on the text as
// written, so a value that takes more figures of its own (to keep off a
// bound) is held to it too.
func distinctFigures(xs []float64, write func(x float64, min int) string, same func(a, b float64) bool) []string {
	out := make([]string, len(xs))
	for min := 4; ; min++ {
		for i, x := range xs {
			out[i] = write(x, min)
		}
		if min >= 17 || readApart(xs, out, same) {
			return out
		}
	}
}

// readApart says whether texts, the values xs as written, give every two
// values that differ (not the same, by same) texts that differ.
func readApart(xs []float64, texts []string, same func(a, b float64) bool) bool {
	for i := range xs {
		for j := i + 1; j < len(xs); j++ {
			if texts[i] == texts[j] && !same(xs[i], xs[j]) && !math.IsNaN(xs[i]) && !math.IsNaN(xs[j]) {
				return false
			}
		}
	}
	return true
}

// FormatSpread writes a standard deviation, or another amount written on
// the line or in the table of values FormatWithin writes (a count's mean
// and SD, say), in their style: FormatValue's four significant figures,
// in plain decimals down to 1e-9. A rare event's SD beside its 5% point
// of 0.00004089 is "0.00008658", not "8.658e-5".
func FormatSpread(v float64) string { return formatSigFixedFrom(v, 4, -9) }

// FormatExact writes v with every figure it holds (the shortest
// decimal that reads back as v), for a value that must not be rounded: a
// number put back into a form, so that sending it unchanged changes
// nothing, or an expert's value a hair from its neighbour or a bound,
// which rounded would read as equal to it. Plain decimals from 1e-9 up to
// 1e15, as the pages write numbers; outside, the exponent notation of
// FormatValue ("9.999999999999999e299", no "+"), since a plain decimal
// would run to hundreds of digits and past what a form's box takes.
func FormatExact(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "not available"
	}
	if a := math.Abs(v); v == 0 || a >= 1e-9 && a < 1e15 {
		return strconv.FormatFloat(v, 'f', -1, 64)
	}
	e := strconv.FormatFloat(v, 'e', -1, 64) // [-]d[.ddd]e±XX
	n := strings.IndexByte(e, 'e') - strings.Count(e[:strings.IndexByte(e, 'e')], ".") - strings.Count(e[:1], "-")
	return formatSigFixedFrom(v, n, -9)
}

// FormatPercent writes a probability as a percentage without noise:
// 0.05 → "5%", 0.025 → "2.5%", 0.33333 → "33.3%". A probability that four
// figures write exactly keeps them, so a probability a question asks is
// read as it was typed: 0.1025 → "10.25%", where three figures wrote
// "10.2%", as for 0.1015 (both in binary a hair off the tie, on opposite
// sides). A probability short of 1 keeps as many more figures as
// it takes to stay short of 100% (elicit.ShapeDigits): a fitted chance of
// 0.99977 below an expert's 95% value is "99.98%", not "100%", which reads
// as certainty.
func FormatPercent(p float64) string {
	if math.IsNaN(p) || math.IsInf(p, 0) {
		return "not available"
	}
	sig := 3
	if p > 0.99 && p < 1 {
		sig = elicit.ShapeDigits(p, 3)
	}
	if sig < 4 {
		if four := formatSig(p*100, 4); exactPercent(four, p) {
			return four + "%"
		}
	}
	return formatSig(p*100, sig) + "%"
}

// FormatChance writes a chance the app computed for a value strictly
// inside a question's bounds (a fitted curve's chance below a stated
// value), which lies strictly between 0 and 1 however near either it
// comes: as FormatPercent does, except that a chance above 1 − 1e-6 is
// "more than 99.9999%" and one below 1e-6 "less than 0.0001%", true
// bounds an expert can read, where FormatPercent, to stay short of 100%,
// wrote a far upper tail with up to fourteen figures ("99.999999999997%")
// and double rounding could give "100%" or "0%". A probability a question
// asks is not computed and keeps FormatPercent's writing.
func FormatChance(p float64) string {
	switch {
	case p > 1-1e-6 && p <= 1:
		return "more than 99.9999%"
	case p < 1e-6 && p >= 0:
		return "less than 0.0001%"
	}
	return FormatPercent(p)
}

// exactPercent reports whether the percentage s reads back as p, within
// the rounding of the reading.
func exactPercent(s string, p float64) bool {
	v, err := strconv.ParseFloat(s, 64)
	return err == nil && math.Abs(v/100-p) <= 1e-12*math.Max(1, math.Abs(p))
}

// coord writes an SVG coordinate with two decimals. Callers guard against
// non-finite values first; this is the last line of defence and writes 0
// rather than NaN.
func coord(v float64) string {
	var buf [24]byte
	return string(appendCoord(buf[:0], v))
}

// appendCoord appends coord(v) to b. Pixel coordinates are written many
// thousand times a page, so those below 1e12 take an integer path that
// writes the same digits as strconv.FormatFloat(math.Round(v*100)/100,
// 'f', -1, 64): the shortest decimal of a hundredth is the hundredth
// itself, zeros trimmed.
func appendCoord(b []byte, v float64) []byte {
	r := math.Round(v * 100)
	if r > 0 && r < 1e6 {
		// A pixel coordinate: no sign, at most four integer digits.
		return appendHundredths(b, int64(r))
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return append(b, '0')
	}
	if math.Abs(r) >= 1e14 || (r == 0 && math.Signbit(r)) {
		return strconv.AppendFloat(b, r/100, 'f', -1, 64)
	}
	n := int64(r)
	if n < 0 {
		b = append(b, '-')
		n = -n
	}
	return appendHundredths(b, n)
}

// appendHundredths writes n/100 for n ≥ 0 with at most two decimals,
// zeros trimmed.
func appendHundredths(b []byte, n int64) []byte {
	if ip := n / 100; ip < 10000 {
		// Pixel coordinates: up to four digits by hand, several times
		// faster than the general conversion.
		switch {
		case ip >= 1000:
			b = append(b, byte('0'+ip/1000), byte('0'+ip/100%10), byte('0'+ip/10%10), byte('0'+ip%10))
		case ip >= 100:
			b = append(b, byte('0'+ip/100), byte('0'+ip/10%10), byte('0'+ip%10))
		case ip >= 10:
			b = append(b, byte('0'+ip/10), byte('0'+ip%10))
		default:
			b = append(b, byte('0'+ip))
		}
	} else {
		b = strconv.AppendInt(b, ip, 10)
	}
	switch frac := n % 100; {
	case frac == 0:
	case frac%10 == 0:
		b = append(b, '.', byte('0'+frac/10))
	default:
		b = append(b, '.', byte('0'+frac/10), byte('0'+frac%10))
	}
	return b
}

// proseList writes labels as prose lists them, "A", "A and B", "A, B and
// C": a note that the density rose above the chart "for Expert A,
// Equal-weight pool" read as one curve's name.
func proseList(labels []string) string {
	if len(labels) < 2 {
		return strings.Join(labels, "")
	}
	return strings.Join(labels[:len(labels)-1], ", ") + " and " + labels[len(labels)-1]
}

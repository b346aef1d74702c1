package chart

import (
	"math"
	"strconv"
	"strings"
)

// FormatValue writes v with four significant figures and no
// floating-point noise: 0.012, 4.2, 17.93, 125000. Very small or very large
// magnitudes use exponent notation (1.2e-07). Non-finite values read
// "not available" so that no NaN reaches a page.
func FormatValue(v float64) string {
	return formatSig(v, 4)
}

func formatSig(v float64, sig int) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "not available"
	}
	if v == 0 {
		return "0"
	}
	r, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'g', sig, 64), 64)
	if a := math.Abs(r); a >= 1e-4 && a < 1e7 {
		return strconv.FormatFloat(r, 'f', -1, 64)
	}
	s := strconv.FormatFloat(r, 'e', -1, 64)
	// 1.2e-07 → 1.2e-7: shorter for a reader.
	if i := strings.Index(s, "e"); i >= 0 {
		mant, exp := s[:i], s[i+1:]
		sign := ""
		if exp[0] == '-' || exp[0] == '+' {
			if exp[0] == '-' {
				sign = "-"
			}
			exp = exp[1:]
		}
		exp = strings.TrimLeft(exp, "0")
		s = mant + "e" + sign + exp
	}
	return s
}

// FormatPercent writes a probability as a percentage without noise:
// 0.05 → "5%", 0.025 → "2.5%", 0.3333 → "33.3%".
func FormatPercent(p float64) string {
	if math.IsNaN(p) || math.IsInf(p, 0) {
		return "not available"
	}
	return formatSig(p*100, 3) + "%"
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

package chart

import (
	"math"
	"math/rand/v2"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

// formatSigByParse is formatSig as first written, three conversions: round
// to sig figures, read the rounded decimal back, and write that double by
// the shortest rule. It is the oracle the hand placement must match.
func formatSigByParse(v float64, sig int) string {
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

func TestFormatSigMatchesShortestOfRounded(t *testing.T) {
	vals := []float64{1, -1, 0.5, 9.9995, 9.99949, 99999.95, 9999999.5, 9999999.4, 1e7, 1e-4, 0.000099995,
		0.00009999, 1.5e-300, 5e-324, math.MaxFloat64, -math.SmallestNonzeroFloat64, 123456789, 0.1 + 0.2,
		1e22, 1e23, 2.5e-5, 12.5, 100, 1000000, 1234567, 7e6, 6.99995e6}
	r := rand.New(rand.NewPCG(7, 11))
	for range 20000 {
		// Magnitudes over the whole range, with round and ragged mantissas.
		m := r.Float64() * 10
		if r.IntN(4) == 0 {
			m = math.Round(m*1000) / 1000
		}
		v := m * math.Pow(10, float64(r.IntN(40)-20))
		if r.IntN(2) == 0 {
			v = -v
		}
		vals = append(vals, v, math.Float64frombits(r.Uint64()))
	}
	for _, v := range vals {
		for sig := 1; sig <= 6; sig++ {
			got, want := formatSig(v, sig), formatSigByParse(v, sig)
			if strings.Contains(want, "Inf") {
				// The rounded decimal overflows (1.8e308 to one figure is
				// 2e308): the oracle would write "+Inf"; formatSig writes
				// the rounded decimal.
				if _, err := strconv.ParseFloat(got, 64); strings.Contains(got, "Inf") || err == nil {
					t.Fatalf("formatSig(%v, %d) = %q", v, sig, got)
				}
				continue
			}
			if got != want {
				t.Fatalf("formatSig(%v, %d) = %q, the shortest decimal of the rounded value is %q", v, sig, got, want)
			}
		}
	}
}

func BenchmarkFormatValueByParse(b *testing.B) {
	for b.Loop() {
		_ = formatSigByParse(0.0123456, 4)
		_ = formatSigByParse(1234.5678, 4)
		_ = formatSigByParse(5, 3)
	}
}

func BenchmarkFormatValue(b *testing.B) {
	for b.Loop() {
		_ = FormatValue(0.0123456)
		_ = FormatValue(1234.5678)
		_ = FormatPercent(0.05)
	}
}

// A Beta's shapes are written on their own side of 1, however close: the
// fit's table and the panel's legend must not write α = 0.99997 as "1"
// beside a warning that the density is J-shaped (worked by hand).
func TestFormatShapeKeepsTheSideOfOne(t *testing.T) {
	for v, want := range map[float64]string{
		0.99997:  "0.99997",
		1.000001: "1.000001",
		1:        "1",
		2.02244:  "2.022",
		40.5924:  "40.59",
		3e-6:     "3e-6",
	} {
		if got := FormatShape(v); got != want {
			t.Errorf("FormatShape(%v) = %q, want %q", v, got, want)
		}
	}
	v := FitView{ID: "shape", Quantity: "share", Lower: 0, Upper: 1,
		Dist: elicit.ScaledBeta{Beta: elicit.Beta{Alpha: 0.99997, Beta: 7}, Lower: 0, Upper: 1}}
	var b strings.Builder
	if err := Fit(v).Render(t.Context(), &b); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(b.String(), "Beta(α = 0.99997, β = 7)") {
		t.Errorf("the fit's table does not write α = 0.99997 as such:\n%s", b.String())
	}
}

// A chance short of certainty is never written as 100%: the fit's table
// once gave "100%" as the fitted chance below an expert's 95% value where
// the curve leaves 1 in 4000 above it (worked by hand).
func TestFormatPercentStaysShortOfCertainty(t *testing.T) {
	for p, want := range map[float64]string{
		0.05:               "5%",
		0.025:              "2.5%",
		1.0 / 3:            "33.3%",
		0.994:              "99.4%",
		0.9996:             "99.96%",
		0.99977:            "99.98%",
		0.99999:            "99.999%",
		1:                  "100%",
		0:                  "0%",
		0.9999999999999999: "99.99999999999999%",
	} {
		if got := FormatPercent(p); got != want {
			t.Errorf("FormatPercent(%v) = %q, want %q", p, got, want)
		}
	}
	v := FitView{ID: "tail", Quantity: "share", Lower: 0, Upper: 1,
		Dist:        elicit.ScaledBeta{Beta: elicit.Beta{Alpha: 4.396, Beta: 77.6}, Lower: 0, Upper: 1},
		Points:      []Point{{X: 0.02, P: 0.05}, {X: 0.05, P: 0.5}, {X: 0.2, P: 0.95}},
		Percentiles: [3]float64{0.01997, 0.05, 0.09955}}
	var b strings.Builder
	if err := Fit(v).Render(t.Context(), &b); err != nil {
		t.Fatal(err)
	}
	if hasCell(b.String(), "100%") || strings.Contains(b.String(), "fitted curve: 100%") {
		t.Errorf("the fit's table writes a chance short of 1 as 100%%:\n%s", b.String())
	}
}

// The fit's table never writes a chance with an exponent: a fitted curve
// that leaves almost nothing below an expert's 5% value says "less than
// 0.0001%" (Beta(40, 2) gives about 4e-20 below 0.3; by hand, I_0.3(40, 2)
// ≈ 41·0.3⁴⁰).
func TestFitTableSaysATinyChanceInWords(t *testing.T) {
	v := FitView{ID: "tiny", Quantity: "share", Lower: 0, Upper: 1,
		Dist:        elicit.ScaledBeta{Beta: elicit.Beta{Alpha: 40, Beta: 2}, Lower: 0, Upper: 1},
		Points:      []Point{{X: 0.3, P: 0.05}, {X: 0.95, P: 0.5}, {X: 0.99, P: 0.95}},
		Percentiles: [3]float64{0.89, 0.96, 0.99}}
	var b strings.Builder
	if err := Fit(v).Render(t.Context(), &b); err != nil {
		t.Fatal(err)
	}
	if !hasCell(b.String(), "less than 0.0001%") || regexp.MustCompile(`e-\d+%`).MatchString(b.String()) {
		t.Errorf("the fit's table writes a tiny chance with an exponent:\n%s", b.String())
	}
}

func TestFormatValueBeside(t *testing.T) {
	for _, c := range []struct {
		v, other float64
		want     string
	}{
		{0.0400004, 0.04, "0.0400004"},
		{0.03997, 0.04, "0.03997"},
		{0.04, 0.04, "0.04"},
		{0.9499996, 0.95, "0.9499996"},
		{1234.6, 1, "1235"},
	} {
		if got := FormatValueBeside(c.v, c.other); got != c.want {
			t.Errorf("FormatValueBeside(%v, %v) = %q, want %q", c.v, c.other, got, c.want)
		}
	}
}

// A value of a judgement is written with four figures whether the expert
// typed it as a proportion or a percentage, never rounded onto a bound
// the question does not allow, and in plain decimals down to 1e-9.
// FormatSpread writes an SD as FormatWithin writes the points beside it:
// four significant figures, plain decimals down to 1e-9 (the values
// worked by hand, common practice, no source).
func TestFormatSpread(t *testing.T) {
	for _, c := range []struct {
		v    float64
		want string
	}{
		{8.658e-5, "0.00008658"}, // FormatValue writes 8.658e-5
		{0.0001224, "0.0001224"},
		{0.12345678, "0.1235"},
		{42.5, "42.5"},
		{1.5e-9, "0.0000000015"},
		{3e-12, "3e-12"},
		{0, "0"},
		{math.NaN(), "not available"},
	} {
		if got := FormatSpread(c.v); got != c.want {
			t.Errorf("FormatSpread(%v) = %q, want %q", c.v, got, c.want)
		}
	}
	// Away from the bounds it is FormatWithin's writing on [0, 1].
	for _, v := range []float64{8.658e-5, 3.3e-7, 0.04089, 0.5} {
		if got, want := FormatSpread(v), FormatWithin(v, 0, 1, false); got != want {
			t.Errorf("FormatSpread(%v) = %q, FormatWithin writes %q", v, got, want)
		}
	}
}

func TestFormatWithin(t *testing.T) {
	for _, c := range []struct {
		x, lo, hi float64
		percent   bool
		want      string
	}{
		{0.1235, 0, 1, false, "0.1235"},
		{0.1235, 0, 1, true, "12.35%"}, // FormatPercent wrote 12.3%
		{0.02345, 0, 1, true, "2.345%"},
		{0.07, 0, 1, true, "7%"},
		{0.99996, 0, 1, false, "0.99996"}, // FormatValue wrote 1, the bound
		{0.99996, 0, 1, true, "99.996%"},
		{29.99996, 0, 30, false, "29.99996"},
		{10.00004, 10, 20, false, "10.00004"},
		{0.00001, 0, 1, false, "0.00001"}, // FormatValue wrote 1e-5
		{9.684e-6, 0, 1, false, "0.000009684"},
		{0.00001, 0, 1, true, "0.001%"},
		{3e-12, 0, 1, false, "3e-12"},
		{0.8, 0, 1, true, "80%"},
		{0.999999999998, 0, 1, true, "99.9999999998%"},
	} {
		if got := FormatWithin(c.x, c.lo, c.hi, c.percent); got != c.want {
			t.Errorf("FormatWithin(%v, %v, %v, %v) = %q, want %q", c.x, c.lo, c.hi, c.percent, got, c.want)
		}
	}
	// Whatever the value, what is written reads back strictly inside the
	// bounds, as a proportion and as a percentage.
	r := rand.New(rand.NewPCG(12, 390))
	for range 20000 {
		lo := math.Round(r.NormFloat64()*100) / 4
		hi := lo + math.Pow(10, r.Float64()*6-2)
		x := lo + (hi-lo)*math.Pow(r.Float64(), 8)
		if r.IntN(2) == 0 {
			x = hi - (hi-lo)*math.Pow(r.Float64(), 8)
		}
		if !(x > lo && x < hi) {
			continue
		}
		for _, percent := range []bool{false, true} {
			s := FormatWithin(x, lo, hi, percent)
			v, err := strconv.ParseFloat(strings.TrimSuffix(s, "%"), 64)
			if percent {
				v /= 100
			}
			if err != nil || !(v > lo && v < hi) && !(percent && math.Abs(v-x) <= 1e-15*math.Abs(x)) {
				t.Fatalf("FormatWithin(%v, %v, %v, %v) = %q reads as %v, not inside the bounds", x, lo, hi, percent, s, v)
			}
		}
	}
}

// Values of one range that differ by rounding alone read as one: a
// two-point fit's median, 0.04000000000000003, beside the true value 0.04
// on the median strip was written to 17 figures; typed values the rules
// keep apart (a millionth of their distance to the nearer bound) still
// read apart, and bounds, written by FormatRange, are compared exactly
// (worked by hand).
func TestRangeRoundingReadsAsOne(t *testing.T) {
	for _, c := range []struct {
		xs   []float64
		want []string
	}{
		{[]float64{0.04, 0.04000000000000003}, []string{"0.04", "0.04"}},
		{[]float64{1230, 1230 + 1e-7}, []string{"1230", "1230"}},
		// 1e-13 apart, a millionth of the distance to 1 is 1e-13.
		{[]float64{0.9999999, 0.9999999 + 1.1e-13}, []string{"0.9999999", "0.9999999000001"}},
		{[]float64{1e-8, 1.000001e-8}, []string{"0.00000001", "0.00000001000001"}},
		// A chips board's fitted values: its rows at 100% are the bound
		// itself, equal, and were taken for values to read apart, which
		// wrote 0.1002 "0.10020633281790578".
		{[]float64{0, 0.10020633281790578, 0.1491886580362857, 1, 1, 1, 1}, []string{"0", "0.1002", "0.1492", "1", "1", "1", "1"}},
	} {
		lower, upper := 0.0, 1.0
		if c.xs[0] > 1 {
			lower, upper = 1000, 2000
		}
		got := FormatRangeWithin(c.xs, lower, upper, false)
		if strings.Join(got, " ") != strings.Join(c.want, " ") {
			t.Errorf("FormatRangeWithin(%v) = %q, want %q", c.xs, got, c.want)
		}
	}
	if got := FormatRange([]float64{1, 1 + 1e-12}); got[0] == got[1] {
		t.Errorf("bounds 1 and 1+1e-12 written alike: %q", got)
	}
	v := MedianStripView{ID: "m", Quantity: "share", Lower: 0, Upper: 1, Medians: []float64{0.04000000000000003, 0.05, 0.07}, Labels: []string{"A", "B", "C"}}
	truth := 0.04
	v.Truth = &truth
	if d := newMedianStrip(v).Desc; strings.Contains(d, "0.0400000") || !strings.Contains(d, "A 0.04,") {
		t.Errorf("median strip: %s", d)
	}
}

// A computed chance in a far tail is a true bound an expert can read;
// nearer in it is written as FormatPercent writes it (worked by hand).
func TestFormatChanceBoundsAFarTail(t *testing.T) {
	for p, want := range map[float64]string{
		0.99999999999997: "more than 99.9999%", // FormatPercent: "99.999999999997%"
		0.9999999:        "more than 99.9999%",
		1:                "more than 99.9999%", // a value strictly inside: 1 only by rounding
		0.999999:         "99.9999%",
		0.99977:          "99.98%",
		0.5:              "50%",
		0.00000312:       "0.000312%",
		0.0000009:        "less than 0.0001%",
		0:                "less than 0.0001%",
	} {
		if got := FormatChance(p); got != want {
			t.Errorf("FormatChance(%v) = %q, want %q", p, got, want)
		}
	}
	// A probability a question asks keeps its figures.
	if got := FormatPercent(0.9999999); got != "99.99999%" {
		t.Errorf("FormatPercent(0.9999999) = %q, want 99.99999%%", got)
	}
}

// TestFormatExactReadsBackAndReadsPlain: FormatExact keeps every figure
// (strconv.ParseFloat reads each text back as the very double, the
// round-trip property of the shortest decimal), writes plain decimals from
// 1e-9 to 1e15 and elsewhere the pages' exponent form without "+"; %g
// wrote 1e-07 and 9.999999999999999e+299.
func TestFormatExactReadsBackAndReadsPlain(t *testing.T) {
	for _, c := range []struct {
		v    float64
		want string
	}{
		{0, "0"}, {1e-7, "0.0000001"}, {-2.5e-9, "-0.0000000025"}, {12345678, "12345678"},
		{0.1, "0.1"}, {1e14, "100000000000000"}, {1e300, "1e300"}, {-1.5e-12, "-1.5e-12"},
		{math.Nextafter(1e300, 0), "9.999999999999999e299"}, {5e-324, "5e-324"},
		{math.Nextafter(0.04, 1), "0.04000000000000001"},
	} {
		if got := FormatExact(c.v); got != c.want {
			t.Errorf("FormatExact(%v) = %q, want %q", c.v, got, c.want)
		}
	}
	r := rand.New(rand.NewPCG(7, 11))
	for range 20000 {
		v := math.Float64frombits(r.Uint64())
		if math.IsNaN(v) || math.IsInf(v, 0) {
			continue
		}
		s := FormatExact(v)
		back, err := strconv.ParseFloat(s, 64)
		if err != nil || back != v {
			t.Fatalf("FormatExact(%v) = %q reads back as %v (%v)", v, s, back, err)
		}
		if strings.Contains(s, "+") || (math.Abs(v) >= 1e-9 && math.Abs(v) < 1e15 && strings.Contains(s, "e")) {
			t.Fatalf("FormatExact(%v) = %q: not the pages' form", v, s)
		}
	}
}

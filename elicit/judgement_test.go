package elicit

import (
	"errors"
	"math"
	"strconv"
	"testing"
)

// checkRule fails unless err is an *InputError with the given field and rule.
func checkRule(t *testing.T, err error, field string, rule Rule) {
	t.Helper()
	var ie *InputError
	if !errors.As(err, &ie) {
		t.Errorf("want InputError %s/%q, got %v", field, rule, err)
		return
	}
	if ie.Field != field || ie.Rule != rule {
		t.Errorf("got %s/%q, want %s/%q (%v)", ie.Field, ie.Rule, field, rule, err)
	}
}

func TestJudgementValidate(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	for _, ok := range []Judgement{
		{Probs: []float64{0.05, 0.5, 0.95}, Values: []float64{0.01, 0.04, 0.12}, Lower: 0, Upper: 1},
		// At the limits of the rules: 1e-10 of the range from a bound,
		// values a millionth of their distance to the bound apart, and
		// probabilities 1e-12 from 0 and 1.
		{Probs: []float64{1e-12, 0.5, 1 - 1e-12}, Values: []float64{1e-10, 1e-10 * (1 + 1.01e-6), 0.5}, Lower: 0, Upper: 1},
	} {
		if err := ok.Validate(); err != nil {
			t.Fatalf("valid judgement %v rejected: %v", ok, err)
		}
	}
	cases := []struct {
		name  string
		j     Judgement
		field string
		rule  Rule
	}{
		{"lower NaN", Judgement{[]float64{0.5, 0.9}, []float64{0.1, 0.2}, nan, 1}, "lower", RuleFinite},
		{"upper Inf", Judgement{[]float64{0.5, 0.9}, []float64{0.1, 0.2}, 0, inf}, "upper", RuleFinite},
		{"bounds order", Judgement{[]float64{0.5, 0.9}, []float64{0.1, 0.2}, 1, 0}, "lower", RuleBoundsOrder},
		{"lower overflows a width", Judgement{[]float64{0.5, 0.9}, []float64{0.1, 0.2}, -1e308, 1e308}, "lower", RuleBoundsRange},
		{"upper too large", Judgement{[]float64{0.5, 0.9}, []float64{0.1, 0.2}, 0, 1e301}, "upper", RuleBoundsRange},
		{"width below the size", Judgement{[]float64{0.5, 0.9}, []float64{1e6 + 1e-8, 1e6 + 2e-8}, 1e6, 1e6 + 1e-7}, "upper", RuleBoundsWidth},
		{"width subnormal", Judgement{[]float64{0.5, 0.9}, []float64{1e-321, 2e-321}, 0, 1e-320}, "upper", RuleBoundsWidth},
		{"length", Judgement{[]float64{0.5, 0.9}, []float64{0.1}, 0, 1}, "values", RuleLengthMatch},
		{"too few", Judgement{[]float64{0.5}, []float64{0.1}, 0, 1}, "probs", RuleCount},
		{"too many", Judgement{make([]float64, 10), make([]float64, 10), 0, 1}, "probs", RuleCount},
		{"prob NaN", Judgement{[]float64{0.5, nan}, []float64{0.1, 0.2}, 0, 1}, "probs[1]", RuleFinite},
		{"prob 0", Judgement{[]float64{0, 0.5}, []float64{0.1, 0.2}, 0, 1}, "probs[0]", RuleProbOpen},
		{"prob 1", Judgement{[]float64{0.5, 1}, []float64{0.1, 0.2}, 0, 1}, "probs[1]", RuleProbOpen},
		{"prob order", Judgement{[]float64{0.5, 0.5}, []float64{0.1, 0.2}, 0, 1}, "probs[1]", RuleProbIncreasing},
		{"value Inf", Judgement{[]float64{0.5, 0.9}, []float64{0.1, inf}, 0, 1}, "values[1]", RuleFinite},
		{"value at bound", Judgement{[]float64{0.5, 0.9}, []float64{0, 0.2}, 0, 1}, "values[0]", RuleValueInBounds},
		{"value above", Judgement{[]float64{0.5, 0.9}, []float64{0.1, 1.2}, 0, 1}, "values[1]", RuleValueInBounds},
		{"value order", Judgement{[]float64{0.5, 0.9}, []float64{0.2, 0.2}, 0, 1}, "values[1]", RuleValueIncreasing},
		// Issue 11's degenerate judgement: subnormal values on [0, 1].
		{"value subnormal", Judgement{[]float64{0.05, 0.5, 0.95}, []float64{4.9e-324, 1e-323, 1.5e-323}, 0, 1}, "values[0]", RuleValueNearBound},
		{"value near upper", Judgement{[]float64{0.5, 0.9}, []float64{0.5, 1 - 1e-11}, 0, 1}, "values[1]", RuleValueNearBound},
		{"value near bound, scaled", Judgement{[]float64{0.5, 0.9}, []float64{10 + 1e-10, 20}, 10, 110}, "values[0]", RuleValueNearBound},
		{"values too close", Judgement{[]float64{0.5, 0.9}, []float64{0.5, 0.5000001}, 0, 1}, "values[1]", RuleValuesTooClose},
		{"rare values too close", Judgement{[]float64{0.5, 0.9}, []float64{1e-8, 1e-8 + 1e-15}, 0, 1}, "values[1]", RuleValuesTooClose},
		{"prob subnormal", Judgement{[]float64{1e-320, 0.5}, []float64{0.1, 0.2}, 0, 1}, "probs[0]", RuleProbRange},
		{"prob near 1", Judgement{[]float64{0.5, 1 - 1e-13}, []float64{0.1, 0.2}, 0, 1}, "probs[1]", RuleProbRange},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			checkRule(t, c.j.Validate(), c.field, c.rule)
			_, err := FitQuantiles(c.j)
			checkRule(t, err, c.field, c.rule)
		})
	}
}

// A value typed exactly at a stated limit is taken, whatever float64
// makes of the decimal: 1e-10 of the range from a bound, and a millionth
// of the distance to the nearer bound after the value before. The bare
// comparison refused 30 of these 98 bound gaps and 7 of these 10 value
// gaps, by a unit in the last place. A value 5% inside the bound's limit
// (a thousandth inside the value gap's) is refused, as are neighbours one
// float64 apart.
func TestValuesAtTheStatedLimitsAreTaken(t *testing.T) {
	typed := func(v float64) float64 {
		x, err := strconv.ParseFloat(strconv.FormatFloat(v, 'g', 15, 64), 64)
		if err != nil {
			t.Fatal(err)
		}
		return x
	}
	for _, lo := range []float64{0, 1, 3, 7, 10, 0.3, 1000} {
		for _, w := range []float64{1, 3, 7, 0.3, 100, 1e6, 0.7} {
			up := typed(lo + w)
			at := typed(lo + MinBoundGap*w)
			if err := checkValues("values", []float64{at, lo + w/2}, lo, up, 0); err != nil {
				t.Errorf("[%v, %v]: %v, 1e-10 of the range from the lower bound, refused: %v", lo, up, at, err)
			}
			if err := checkValues("values", []float64{lo + w/2, typed(up - MinBoundGap*w)}, lo, up, 0); err != nil {
				t.Errorf("[%v, %v]: 1e-10 of the range from the upper bound refused: %v", lo, up, err)
			}
			under := lo + MinBoundGap*w*0.95
			checkRule(t, checkValues("values", []float64{under, lo + w/2}, lo, up, 0), "values[0]", RuleValueNearBound)
		}
	}
	for _, prev := range []float64{0.1, 0.2, 0.3, 0.15, 0.25, 0.01, 0.05, 0.07, 0.35, 0.45} {
		x := typed(prev * (1 + MinValueGap))
		if err := checkValues("values", []float64{prev, x}, 0, 1, 0); err != nil {
			t.Errorf("%v after %v, a millionth of %v apart, refused: %v", x, prev, prev, err)
		}
		checkRule(t, checkValues("values", []float64{prev, prev * (1 + MinValueGap*(1-1e-3))}, 0, 1, 0), "values[1]", RuleValuesTooClose)
		checkRule(t, checkValues("values", []float64{prev, math.Nextafter(prev, 1)}, 0, 1, 0), "values[1]", RuleValuesTooClose)
	}
}

// The counts of a length mismatch are written as counts: "1 probability,
// 3 values", where it said "1 probabilities" (review, 2026-12-05).
func TestLengthMismatchCountsInWords(t *testing.T) {
	for _, c := range []struct {
		j    Judgement
		want string
	}{
		{Judgement{[]float64{0.5}, []float64{0.01, 0.04, 0.12}, 0, 1}, "1 probability, 3 values"},
		{Judgement{[]float64{0.05, 0.5, 0.95}, []float64{0.04}, 0, 1}, "3 probabilities, 1 value"},
	} {
		var ie *InputError
		if err := c.j.Validate(); !errors.As(err, &ie) || ie.Rule != RuleLengthMatch || ie.Detail != c.want {
			t.Errorf("%v: %v; want %q", c.j, err, c.want)
		}
	}
}

package elicit

import (
	"errors"
	"math"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// A shape warning never says "α = 1 … below 1". Worked by hand (method of
// moments, α + β = m(1 − m)/v − 1): mean 0.5 with sd 0.2887 (the uniform's
// 1/√12 = 0.288675…, rounded up) gives α = β = 0.5·(0.25/0.2887² − 1) =
// 0.99977…, which %.3g writes as "1"; mean 0.5 with sd 1/√12 in float64
// gives α = β = 1 − 4e-16, float noise around the uniform, not a U shape.
func TestShapeWarningsReadBelowOne(t *testing.T) {
	shown := regexp.MustCompile(`[αβ] = ([0-9.e+-]+)`)
	cases := []struct {
		in   ConstructionInput
		want []WarningCode
	}{
		{ConstructionInput{Method: MethodMeanSD, Mean: 0.5, SD: 0.2887, Upper: 1}, []WarningCode{WarnUShaped}},
		{ConstructionInput{Method: MethodMeanSD, Mean: 0.5, SD: 1 / math.Sqrt(12), Upper: 1}, nil},
	}
	for _, c := range cases {
		got, err := Construct(c.in)
		if err != nil {
			t.Fatal(err)
		}
		if len(got.Warnings) != len(c.want) {
			t.Errorf("sd %v, %v: warnings %+v, want %v", c.in.SD, got.Dist.Beta, got.Warnings, c.want)
			continue
		}
		for _, w := range got.Warnings {
			for _, m := range shown.FindAllStringSubmatch(w.Message, -1) {
				if v, err := strconv.ParseFloat(m[1], 64); err != nil || v >= 1 {
					t.Errorf("sd %v: %q writes a shape below 1 as %s", c.in.SD, w.Message, m[1])
				}
			}
		}
	}
	// The fit's rules, directly: α = 0.9996 reads as below 1; 1 − 1e-12 is 1.
	for _, c := range []struct {
		a, b float64
		want []WarningCode
	}{
		{0.9996, 3, []WarningCode{WarnJShaped}},
		{3, 0.9996, []WarningCode{WarnJShaped}},
		{1 - 1e-12, 1 - 1e-12, nil},
		{1 - 1e-12, 3, nil},
	} {
		w := fitWarnings(Beta{c.a, c.b}, 0, true)
		if len(w) != len(c.want) {
			t.Errorf("Beta(%v, %v): %+v, want %v", c.a, c.b, w, c.want)
			continue
		}
		for _, x := range w {
			for _, m := range shown.FindAllStringSubmatch(x.Message, -1) {
				if v, err := strconv.ParseFloat(m[1], 64); err != nil || v >= 1 {
					t.Errorf("Beta(%v, %v): %q writes a shape below 1 as %s", c.a, c.b, x.Message, m[1])
				}
			}
		}
	}
}

// A refused interval on bounds other than [0, 1] is named in the person's
// own numbers: [10, 10.0001] hours on [2, 50] at 90% is far too narrow for
// any Beta within the limits (its width is 2e-6 of the range), and the
// message said "[0.16666666666666666, 0.16666875]" and "too close to 0
// or 1", numbers the person never typed.
func TestIntervalRefusalNamesTheTypedInterval(t *testing.T) {
	for _, m := range []ConstructionMethod{MethodIntervalQuantiles, MethodIntervalMoments} {
		_, err := Construct(ConstructionInput{Method: m, Low: 10, High: 10.0001, Coverage: 0.9, Lower: 2, Upper: 50})
		var ie *InputError
		if !errors.As(err, &ie) {
			t.Fatalf("%s: %v, want an input error", m, err)
		}
		if !strings.Contains(ie.Detail, "[10, 10.0001] on [2, 50]") || strings.Contains(ie.Detail, "0 or 1") {
			t.Errorf("%s: %q does not name the typed interval and its bounds", m, ie.Detail)
		}
	}
}

// ShapeDigits keeps a shape on its own side of 1 when it is rounded for
// people, and asks for no more figures than that (worked by hand).
func TestShapeDigitsKeepTheSideOfOne(t *testing.T) {
	for _, c := range []struct {
		x    float64
		min  int
		want int
	}{
		{2.5, 3, 3},
		{1, 4, 4},
		{0.99977, 3, 4},      // 0.9998, not 1.00
		{1.000001, 4, 7},     // 1.000001, not 1.000
		{1.000001, 6, 7},     // as parley update prints it
		{0.9999999, 6, 7},    // 0.9999999
		{1 + 0x1p-52, 3, 17}, // 16 figures read as 1: 1.0000000000000002
		{3.2e-5, 4, 4},       // far from 1
		{1.23456789e6, 4, 4}, // far from 1
		{1 - 0x1p-53, 3, 16}, // the largest float64 below 1
	} {
		got := ShapeDigits(c.x, c.min)
		if got != c.want {
			t.Errorf("ShapeDigits(%v, %d) = %d, want %d", c.x, c.min, got, c.want)
		}
		s := strconv.FormatFloat(c.x, 'g', got, 64)
		if v, _ := strconv.ParseFloat(s, 64); (v < 1) != (c.x < 1) || (v > 1) != (c.x > 1) {
			t.Errorf("%v written as %s", c.x, s)
		}
	}
}

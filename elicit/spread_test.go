package elicit

import (
	"errors"
	"math"
	"testing"
)

// Worked by hand from the nearest-rank definition (Hyndman and Fan 1996,
// definition 1; R's quantile(type = 1) gives the same: for n = 4 and
// p = 0.5, j = ⌊np⌋ = 2 with no remainder, so x₍₂₎). R 4.2.2's
// quantile(x, c(0.25, 0.5, 0.75), type = 1) prints 0.2 0.3 0.4 for the
// five medians below, 1 2 3 for the four and 50 100 150 for 1..200.
func TestSpreadOfMedians(t *testing.T) {
	for _, tt := range []struct {
		in   []float64
		want MedianSpread
	}{
		// n = 5: ⌈1.25⌉ = 2, ⌈2.5⌉ = 3, ⌈3.75⌉ = 4.
		{[]float64{0.3, 0.1, 0.2, 0.5, 0.4}, MedianSpread{0.1, 0.2, 0.3, 0.4, 0.5}},
		// n = 4: ⌈1⌉ = 1, ⌈2⌉ = 2, ⌈3⌉ = 3.
		{[]float64{4, 1, 3, 2}, MedianSpread{1, 1, 2, 3, 4}},
		// n = 1: every summary is the one median.
		{[]float64{0.07}, MedianSpread{0.07, 0.07, 0.07, 0.07, 0.07}},
		// n = 200, medians 1..200: ⌈50⌉ = 50, ⌈100⌉ = 100, ⌈150⌉ = 150.
		{seq(200), MedianSpread{1, 50, 100, 150, 200}},
	} {
		got, err := SpreadOfMedians(tt.in)
		if err != nil || got != tt.want {
			t.Errorf("SpreadOfMedians(%v) = %+v, %v; want %+v", tt.in[:min(5, len(tt.in))], got, err, tt.want)
		}
	}
	in := []float64{3, 1, 2}
	if _, _ = SpreadOfMedians(in); in[0] != 3 {
		t.Error("SpreadOfMedians sorted its argument")
	}
	var ie *InputError
	if _, err := SpreadOfMedians(nil); !errors.As(err, &ie) || ie.Field != "medians" {
		t.Errorf("no medians: %v", err)
	}
	if _, err := SpreadOfMedians([]float64{0.1, math.NaN()}); !errors.As(err, &ie) || ie.Field != "medians[1]" {
		t.Errorf("NaN median: %v", err)
	}
}

func seq(n int) []float64 {
	out := make([]float64, n)
	for i := range out {
		out[i] = float64(n - i) // descending, so sorting matters
	}
	return out
}

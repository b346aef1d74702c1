package elicit

import (
	"errors"
	"math"
	"testing"
)

// FuzzFromIntervalQuantiles: for any interval inside (0, 1) and coverage,
// the exact quantile match either refuses with a named input rule or
// returns a Beta within the shape limits whose two tails are (1 − c)/2 to
// matchTol; it never fails to converge and never panics.
func FuzzFromIntervalQuantiles(f *testing.F) {
	f.Add(0.03, 0.12, 0.9)
	f.Add(0.001, 0.999, 0.5)
	f.Add(0.4999, 0.5001, 0.95)
	f.Add(1e-12, 1e-9, 0.9)
	f.Add(0.5, 0.9999999, 0.99)
	f.Add(1e-200, 0.999, 1e-4)
	f.Fuzz(func(t *testing.T, low, high, coverage float64) {
		d, err := FromIntervalQuantiles(low, high, coverage)
		var ie *InputError
		switch {
		case errors.As(err, &ie):
			return
		case err != nil:
			t.Fatalf("[%v, %v] at %v: %v", low, high, coverage, err)
		}
		if d.Alpha < MinPriorShape || d.Alpha > MaxPriorShape || d.Beta < MinPriorShape || d.Beta > MaxPriorShape {
			t.Fatalf("[%v, %v] at %v: Beta(%v, %v) outside the limits", low, high, coverage, d.Alpha, d.Beta)
		}
		tail := (1 - coverage) / 2
		tol := matchTol(d.ESS())
		if e := math.Abs(d.CDF(low)/tail - 1); !(e <= tol) {
			t.Fatalf("[%v, %v] at %v: Beta(%v, %v) lower tail off by %v", low, high, coverage, d.Alpha, d.Beta, e)
		}
	})
}

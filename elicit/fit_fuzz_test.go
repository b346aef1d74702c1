package elicit

import (
	"errors"
	"math"
	"testing"
)

// FuzzFitQuantiles feeds arbitrary judgements to the validator and the
// fitter: neither may panic; an error is an *InputError (for a judgement
// that passes Validate, RuleFitRange: no Beta within the envelope fits);
// a fit has no NaN or infinity anywhere in it.
func FuzzFitQuantiles(f *testing.F) {
	f.Add(uint8(3), 0.05, 0.5, 0.95, 0.0, 0.0, 0.01, 0.04, 0.12, 0.0, 0.0, 0.0, 1.0)
	f.Add(uint8(2), 0.5, 0.95, 0.0, 0.0, 0.0, 1e-5, 1e-4, 0.0, 0.0, 0.0, 0.0, 1.0)
	f.Add(uint8(5), 0.1, 0.25, 0.5, 0.75, 0.9, 20.0, 30.0, 40.0, 50.0, 65.0, 0.0, 100.0)
	f.Add(uint8(3), 0.05, 0.5, 0.95, 0.0, 0.0, 0.97, 0.985, 0.995, 0.0, 0.0, 0.0, 1.0)
	f.Add(uint8(3), 0.25, 0.5, 0.75, 0.0, 0.0, 0.1, 0.11, 0.9, 0.0, 0.0, 0.0, 1.0)
	f.Add(uint8(4), 0.1, 0.2, 0.3, 0.4, 0.0, -5.0, -4.0, 1e3, 1e4, 0.0, -10.0, 1e5)
	// Tails beyond pairTail, where the fit also starts from two-pair matches.
	f.Add(uint8(3), 1e-8, 0.5, 1-1e-8, 0.0, 0.0, 3.2616276475626326e-06, 0.5, 0.99999673837235244, 0.0, 0.0, 0.0, 1.0)
	f.Add(uint8(5), 1e-12, 0.25, 0.5, 0.75, 1-1e-12, 0.1, 0.11, 0.12, 0.9, 0.95, 0.0, 1.0)
	f.Fuzz(func(t *testing.T, n uint8, p0, p1, p2, p3, p4, v0, v1, v2, v3, v4, lower, upper float64) {
		k := int(n % 7)
		ps := []float64{p0, p1, p2, p3, p4}
		vs := []float64{v0, v1, v2, v3, v4}
		if k > 5 {
			k = 5
		}
		j := Judgement{Probs: ps[:k], Values: vs[:k], Lower: lower, Upper: upper}
		verr := j.Validate()
		fit, err := FitQuantiles(j)
		if verr != nil {
			var ie *InputError
			if !errors.As(err, &ie) {
				t.Fatalf("Validate: %v, but FitQuantiles: %v", verr, err)
			}
			return
		}
		if err != nil {
			if !isFitRange(err) {
				t.Fatalf("valid judgement %+v: unexpected error %v", j, err)
			}
			return
		}
		nums := []float64{fit.Dist.Alpha, fit.Dist.Beta.Beta, fit.SSE, fit.MaxProbError}
		nums = append(nums, fit.Fitted...)
		nums = append(nums, fit.ProbErrors...)
		nums = append(nums, fit.Percentiles[:]...)
		for _, x := range nums {
			if math.IsNaN(x) || math.IsInf(x, 0) {
				t.Fatalf("judgement %+v: non-finite number in fit %+v", j, fit)
			}
		}
		if fit.Dist.Validate() != nil {
			t.Fatalf("judgement %+v: invalid fitted distribution %+v", j, fit.Dist)
		}
		if k == 2 && !(fit.MaxProbError <= 1e-9) {
			t.Fatalf("two pairs %+v not matched exactly: %g", j, fit.MaxProbError)
		}
	})
}

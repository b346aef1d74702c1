package elicit

import (
	"fmt"
	"math"
	"strconv"
)

// MinPairs and MaxPairs bound the number of (probability, value) pairs in
// one judgement.
const (
	MinPairs = 2
	MaxPairs = 9
)

// Limits that keep a judgement within what a fit can mean (the input-rule
// table in DEVELOPERS.md).
const (
	// MinProb is the smallest probability Parley reads, and 1 − MinProb
	// the largest: the accuracy envelope of quantiles reaches down to
	// tail probabilities of 1e-12.
	MinProb = 1e-12
	// MinBoundGap is the least distance of a stated value from either
	// bound, as a share of upper − lower. A Beta with α, β ≥ MinShape and
	// ≤ MaxShape puts its bulk no closer to a bound than about 1e-10 of
	// the range for the probabilities an expert states, and 4.9e-324 on
	// [0, 1] says nothing a fit can use.
	MinBoundGap = 1e-10
	// MinValueGap is the least relative gap between consecutive values:
	// values[i] − values[i−1] must be at least MinValueGap times the
	// smaller of their distances to the nearer bound. Closer values
	// cannot be told apart by a Beta within the envelope.
	MinValueGap = 1e-6
)

// Judgement is one expert's quantile judgements on one bounded quantity:
// P(X ≤ Values[i]) = Probs[i], with X in (Lower, Upper). For a proportion
// Lower is 0 and Upper is 1.
type Judgement struct {
	Probs  []float64 `json:"probs"`
	Values []float64 `json:"values"`
	Lower  float64   `json:"lower"`
	Upper  float64   `json:"upper"`
}

// Validate applies every rule for a judgement and returns the first
// broken one as an *InputError naming the field and the rule. This is the
// one place where judgements are checked.
func (j Judgement) Validate() error {
	if err := CheckBounds(j.Lower, j.Upper); err != nil {
		return err
	}
	if len(j.Probs) != len(j.Values) {
		return inputErr("values", RuleLengthMatch, "%s, %s", countedAs(strconv.Itoa(len(j.Probs)), "probability", "probabilities"), countedAs(strconv.Itoa(len(j.Values)), "value", "values"))
	}
	n := len(j.Probs)
	if n < MinPairs || n > MaxPairs {
		return inputErr("probs", RuleCount, "need %d to %d pairs, got %d", MinPairs, MaxPairs, n)
	}
	if err := CheckProbs("probs", j.Probs); err != nil {
		return err
	}
	return checkValues("values", j.Values, j.Lower, j.Upper, 0)
}

// checkValues checks stated values (or the inner edges of bins) on
// (lower, upper): finite, strictly inside, strictly increasing, at least
// MinBoundGap of the range from each bound and at least MinValueGap
// apart (relative). It is the one place values are checked. Errors name
// field[i + offset].
func checkValues(field string, xs []float64, lower, upper float64, offset int) error {
	w := upper - lower
	for i, x := range xs {
		if valueOK(xs, i, lower, upper, w) {
			continue // the common case: no field name written
		}
		f := fmt.Sprintf("%s[%d]", field, i+offset)
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return inputErr(f, RuleFinite, "got %v", x)
		}
		if !(x > lower && x < upper) {
			return inputErr(f, RuleValueInBounds, "%v not inside (%v, %v)", x, lower, upper)
		}
		if i > 0 && !(x > xs[i-1]) {
			return inputErr(f, RuleValueIncreasing, "%v after %v", x, xs[i-1])
		}
		if shortOf(x-lower, MinBoundGap*w, x, lower) || shortOf(upper-x, MinBoundGap*w, x, upper) {
			return inputErr(f, RuleValueNearBound, "%v on (%v, %v)", x, lower, upper)
		}
		if i > 0 {
			prev := xs[i-1]
			near := math.Min(math.Min(prev-lower, upper-prev), math.Min(x-lower, upper-x))
			if shortOf(x-prev, MinValueGap*near, x, prev) {
				return inputErr(f, RuleValuesTooClose, "%v after %v", x, prev)
			}
		}
	}
	return nil
}

// valueOK reports whether xs[i] passes every rule of checkValues, which
// writes the field's name only for a value that does not: the names had
// cost a twentieth of a fit.
func valueOK(xs []float64, i int, lower, upper, w float64) bool {
	x := xs[i]
	if math.IsNaN(x) || math.IsInf(x, 0) || !(x > lower && x < upper) || (i > 0 && !(x > xs[i-1])) ||
		shortOf(x-lower, MinBoundGap*w, x, lower) || shortOf(upper-x, MinBoundGap*w, x, upper) {
		return false
	}
	if i > 0 {
		prev := xs[i-1]
		near := math.Min(math.Min(prev-lower, upper-prev), math.Min(x-lower, upper-x))
		if shortOf(x-prev, MinValueGap*near, x, prev) {
			return false
		}
	}
	return true
}

// shortOf reports whether gap, the float64 difference of a and b, falls
// short of limit by more than the rounding of a and b themselves (half a
// unit in the last place each, so two machine epsilons of the larger;
// at most half the limit). A value
// typed exactly at a stated limit (0.1000001 after 0.1, a millionth of
// 0.1 apart; 1.00000001 on [1, 101], 1e-10 of the range from 1) is a
// float64 a unit or so either side of it, and was refused about half the
// time by the bare comparison.
func shortOf(gap, limit, a, b float64) bool {
	slack := math.Min(2*floatEps*math.Max(math.Abs(a), math.Abs(b)), limit/2)
	return gap < limit-slack
}

// CheckProbs checks a list of probabilities: each finite, strictly inside
// (0, 1), within [MinProb, 1 − MinProb], strictly increasing. It is the
// one place probabilities are checked.
func CheckProbs(field string, ps []float64) error {
	for i, p := range ps {
		if checkProb("", p) == nil && (i == 0 || p > ps[i-1]) {
			continue // the common case: no field name written
		}
		f := fmt.Sprintf("%s[%d]", field, i)
		if err := checkProb(f, p); err != nil {
			return err
		}
		if i > 0 && !(p > ps[i-1]) {
			return inputErr(f, RuleProbIncreasing, "%v after %v", p, ps[i-1])
		}
	}
	return nil
}

// checkProb checks one probability: finite, strictly inside (0, 1) and
// within [MinProb, 1 − MinProb].
func checkProb(field string, p float64) error {
	if math.IsNaN(p) || math.IsInf(p, 0) {
		return inputErr(field, RuleFinite, "got %v", p)
	}
	if !(p > 0 && p < 1) {
		return inputErr(field, RuleProbOpen, "got %v", p)
	}
	if p < MinProb || p > 1-MinProb {
		return inputErr(field, RuleProbRange, "got %v", p)
	}
	return nil
}

// unit returns the judgement's values mapped to [0, 1].
func (j Judgement) unit() []float64 {
	u := make([]float64, len(j.Values))
	for i, x := range j.Values {
		u[i] = (x - j.Lower) / (j.Upper - j.Lower)
	}
	return u
}

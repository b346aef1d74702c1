package elicit

import (
	"fmt"
	"math"
)

// MinPairs and MaxPairs bound the number of (probability, value) pairs in
// one judgement.
const (
	MinPairs = 2
	MaxPairs = 9
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
	if err := checkBounds(j.Lower, j.Upper); err != nil {
		return err
	}
	if len(j.Probs) != len(j.Values) {
		return inputErr("values", RuleLengthMatch, "%d probabilities, %d values", len(j.Probs), len(j.Values))
	}
	n := len(j.Probs)
	if n < MinPairs || n > MaxPairs {
		return inputErr("probs", RuleCount, "need %d to %d pairs, got %d", MinPairs, MaxPairs, n)
	}
	if err := CheckProbs("probs", j.Probs); err != nil {
		return err
	}
	for i, x := range j.Values {
		f := fmt.Sprintf("values[%d]", i)
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return inputErr(f, RuleFinite, "got %v", x)
		}
		if !(x > j.Lower && x < j.Upper) {
			return inputErr(f, RuleValueInBounds, "%v not inside (%v, %v)", x, j.Lower, j.Upper)
		}
		if i > 0 && !(x > j.Values[i-1]) {
			return inputErr(f, RuleValueIncreasing, "%v after %v", x, j.Values[i-1])
		}
	}
	return nil
}

// CheckProbs checks a list of probabilities: each finite, strictly inside
// (0, 1), strictly increasing. It is the one place probabilities are checked.
func CheckProbs(field string, ps []float64) error {
	for i, p := range ps {
		f := fmt.Sprintf("%s[%d]", field, i)
		if math.IsNaN(p) || math.IsInf(p, 0) {
			return inputErr(f, RuleFinite, "got %v", p)
		}
		if !(p > 0 && p < 1) {
			return inputErr(f, RuleProbOpen, "got %v", p)
		}
		if i > 0 && !(p > ps[i-1]) {
			return inputErr(f, RuleProbIncreasing, "%v after %v", p, ps[i-1])
		}
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

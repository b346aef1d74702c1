package workshop

import (
	"fmt"
	"math"

	"github.com/parley-elicit/parley/elicit"
)

// RuleConfidenceForm is the rule for the four-value format's confidence,
// which is a probability strictly between 0 and 1.
const RuleConfidenceForm = elicit.RuleProbOpen

// Problems lists every rule an answer breaks for question q, field by
// field, in the order of the question's form: each value finite and
// strictly inside the bounds, values strictly increasing (a value is
// named when it is not above the value before it), the confidence
// strictly between 0 and 1, chips whole, none negative, not more than
// the question allows, in at least elicit.MinChipBins bins. It is what a form
// shows beside every field at once; Question.Fit refuses the first of
// them, then applies the rules only the fit can check. A question that
// breaks its own rules is reported as that one problem.
func (q Question) Problems(a Answer) []*elicit.InputError {
	if err := q.ValidateKept(); err != nil { // as Judgement reads the question
		if ie, ok := err.(*elicit.InputError); ok {
			return []*elicit.InputError{ie}
		}
		return []*elicit.InputError{{Field: "question", Rule: elicit.RuleUnknown, Detail: err.Error()}}
	}
	var out []*elicit.InputError
	add := func(field string, rule elicit.Rule, format string, args ...any) {
		out = append(out, inputErr(field, rule, format, args...))
	}
	// inBounds checks one value, reporting whether it may be compared.
	inBounds := func(field string, x float64) bool {
		switch {
		case math.IsNaN(x) || math.IsInf(x, 0):
			add(field, elicit.RuleFinite, "got %v", x)
			return false
		case !(x > q.Lower && x < q.Upper):
			add(field, elicit.RuleValueInBounds, "%v not inside (%v, %v)", x, q.Lower, q.Upper)
		}
		return true
	}
	switch q.Format {
	case FormatQuantiles:
		if len(a.Values) != len(q.Probs) {
			add("values", elicit.RuleLengthMatch, "%d %s, %d %s", len(q.Probs), plural(len(q.Probs), "probability", "probabilities"), len(a.Values), plural(len(a.Values), "value", "values"))
			return out
		}
		ok := make([]bool, len(a.Values))
		for i, x := range a.Values {
			ok[i] = inBounds(fmt.Sprintf("values[%d]", i), x)
		}
		for i := 1; i < len(a.Values); i++ {
			if ok[i] && ok[i-1] && !(a.Values[i] > a.Values[i-1]) {
				add(fmt.Sprintf("values[%d]", i), elicit.RuleValueIncreasing, "%v after %v", a.Values[i], a.Values[i-1])
			}
		}
	case FormatInterval:
		okLo := inBounds("lowest", a.Lowest)
		okBest := inBounds("best", a.Best)
		okHi := inBounds("highest", a.Highest)
		if okLo && okBest && !(a.Best > a.Lowest) {
			add("best", elicit.RuleValueIncreasing, "best %v not above lowest %v", a.Best, a.Lowest)
		}
		if okBest && okHi && !(a.Highest > a.Best) {
			add("highest", elicit.RuleValueIncreasing, "highest %v not above best %v", a.Highest, a.Best)
		} else if okLo && okHi && !okBest && !(a.Highest > a.Lowest) {
			add("highest", elicit.RuleValueIncreasing, "highest %v not above lowest %v", a.Highest, a.Lowest)
		}
		switch c := a.Confidence; {
		case math.IsNaN(c) || math.IsInf(c, 0):
			add("confidence", elicit.RuleFinite, "got %v", c)
		case !(c > 0 && c < 1):
			add("confidence", RuleConfidenceForm, "got %v", c)
		}
	case FormatChips:
		bins := len(q.BinEdges) - 1
		if len(a.Counts) != bins {
			add("counts", elicit.RuleLengthMatch, "%d bins, %d counts", bins, len(a.Counts))
			return out
		}
		total, used := 0, 0
		for i, c := range a.Counts {
			switch {
			case c < 0:
				add(fmt.Sprintf("counts[%d]", i), elicit.RuleNonNegative, "got %d", c)
			case c > q.Chips:
				add(fmt.Sprintf("counts[%d]", i), RuleChipsExceeded, "%d in one bin, %d in all", c, q.Chips)
			default:
				total += c
				if c > 0 {
					used++
				}
			}
		}
		switch {
		case total > q.Chips:
			add("counts", RuleChipsExceeded, "%d placed, %d allowed", total, q.Chips)
		case total == 0 && len(out) == 0:
			add("counts", elicit.RuleCountsNotAllZero, "")
		case used < elicit.MinChipBins && len(out) == 0:
			add("counts", elicit.RuleChipsSpread, "chips in %d bins", used)
		}
	}
	return out
}

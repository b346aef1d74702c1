package workshop

import (
	"strconv"
	"strings"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
)

// Reading an answer's typed values in the expert's own terms, the one
// set of rules for the expert's form and the answer sheet alike: a
// proportion question takes 0.05 or 5% (and, where the expert chose
// percentages, a plain 5 as 5%); the four-value confidence is a
// percentage, 80 or 80%.

// Rules of an answer's typed values.
const (
	// RulePercentHere refuses a % sign where the question's values are
	// not proportions.
	RulePercentHere elicit.Rule = "is not a percentage: this question's values are not proportions"
	// RuleConfidencePercent refuses a confidence typed as a fraction.
	RuleConfidencePercent elicit.Rule = "is a percentage"
)

// ConfidenceMaxPercent is the largest confidence the four-value format
// takes, in percent: elicit.MaxCentral, 1 − 2e-12 (elicit.RuleCentralTails).
const ConfidenceMaxPercent = "99.9999999998"

// ConfidenceMinPercent is the smallest, elicit.MinCentral, 1e-12
// (elicit.RuleCentralNarrow).
const ConfidenceMinPercent = "0.0000000001"

// ParseAnswerNumber reads one value of an answer: a plain number, or for
// a proportion question a percentage (5% → 0.05; a plain 5 too when
// asPercent). typedPercent reports that it was read as a percentage.
func ParseAnswerNumber(name, raw string, q Question, asPercent bool) (v float64, typedPercent bool, err error) {
	s := strings.TrimSpace(raw)
	if rest, ok := strings.CutSuffix(s, "%"); ok {
		if !q.IsProportion() {
			return 0, false, &elicit.InputError{Field: name, Rule: RulePercentHere}
		}
		v, err := input.Percent(name, rest)
		return v, true, err
	}
	if asPercent && q.IsProportion() {
		v, err = input.Percent(name, s)
		return v, err == nil, err
	}
	v, err = input.Number(name, s)
	return v, false, err
}

// ParseConfidence reads the four-value confidence: 80 or 80% for 80%. A
// value at or below 1 without a % sign is refused: 0.8 almost always
// means 80%, and reading it as 0.8% would give a nonsense curve. The
// refusal's Detail is the percentage it likely meant, to four figures
// ("80"), when there is a sensible one.
func ParseConfidence(raw string) (float64, error) {
	s := strings.TrimSpace(raw)
	rest, hadSign := strings.CutSuffix(s, "%")
	v, err := input.Number("confidence", rest)
	if err != nil {
		return 0, err
	}
	if !hadSign && v > 0 && v <= 1 {
		if v < 0.01 {
			// No sensible percentage to suggest (1e-320 would read
			// "did you mean 1e-318%?").
			return 0, &elicit.InputError{Field: "confidence", Rule: RuleConfidencePercent}
		}
		// v·100 lies in [1, 100], where 'g' writes plain decimals.
		return 0, &elicit.InputError{Field: "confidence", Rule: RuleConfidencePercent, Detail: strconv.FormatFloat(v*100, 'g', 4, 64)}
	}
	return input.Percent("confidence", rest)
}

// KeptInPercent says an answer is kept as typed in percent: a proportion
// whose every value (typed of count) carried a % sign or was read in the
// percent unit. Chips are counts.
func KeptInPercent(q Question, typed, count int) bool {
	return q.ValuesInPercent() && count > 0 && typed == count
}

// ValuesInPercent says the question's values may be typed, kept and shown
// in percent: a proportion's values, not a chips question's counts.
func (q Question) ValuesInPercent() bool {
	return q.IsProportion() && q.Format != FormatChips
}

// FieldIndex reads the index of an answer's field as Problems and Fit
// name it: 2 for "values[2]" or "counts[2]".
func FieldIndex(field string) (int, bool) {
	open, end := strings.IndexByte(field, '['), strings.IndexByte(field, ']')
	if open < 0 || end < open {
		return 0, false
	}
	i, err := strconv.Atoi(field[open+1 : end])
	return i, err == nil
}

package elicit

import (
	"fmt"
)

// Rule names one rule that input must satisfy. Each rule has its own
// value so callers can tell them apart with errors.As and a comparison,
// never by matching message text.
type Rule string

// The rules that inputs to this package are checked against.
const (
	RuleFinite            Rule = "must be a finite number"
	RulePositive          Rule = "must be greater than 0"
	RuleNonNegative       Rule = "must not be negative"
	RuleProbOpen          Rule = "must lie strictly between 0 and 1"
	RuleProbIncreasing    Rule = "probabilities must strictly increase"
	RuleValueIncreasing   Rule = "values must strictly increase"
	RuleValueInBounds     Rule = "values must lie strictly inside (lower, upper)"
	RuleBoundsOrder       Rule = "lower must be less than upper"
	RuleCount             Rule = "wrong number of entries"
	RuleLengthMatch       Rule = "lists must have the same length"
	RuleVarianceFeasible  Rule = "variance must be below m(1-m)"
	RuleWeightsNotAllZero Rule = "weights must not all be zero"
	RuleInteger           Rule = "must be a whole number"
	RuleCountRange        Rule = "count out of range"
	RuleLogPoolValid      Rule = "log pool parameters must be positive"
	RuleUnknown           Rule = "unknown value"
	RuleRequired          Rule = "is required"
	RuleValueNearBound    Rule = "must lie at least 1e-10 of the range away from the lower and upper bounds"
	RuleValuesTooClose    Rule = "is too close to the value before it to be told apart (they must differ by at least a millionth of their distance to the nearer bound)"
	RuleProbRange         Rule = "must lie between 1e-12 and 1 − 1e-12"
	RuleCentralTails      Rule = "must leave at least 1e-12 outside the interval on each side: at most 1 − 2e-12"
	RuleCentralNarrow     Rule = "must be at least 1e-12, the least probability Parley works with"
	RuleBoundsRange       Rule = "must lie between -1e300 and 1e300"
	RuleBoundsWidth       Rule = "upper must exceed lower by at least 1e-12 of their size"
	RulePosteriorRange    Rule = "the posterior's alpha and beta must not exceed 1e+07 (the accuracy envelope)"
	RuleRangeOverflow     Rule = "widens a question's range beyond the largest number"
	RuleFitRange          Rule = "lie too close together or too close to a bound: no Beta with alpha and beta between 1e-06 and 1e+07 fits them"
	RuleShapeRange        Rule = "must lie between 1e-06 and 1e+07 (the accuracy envelope)"
)

// InputError reports input that breaks one named rule for one field.
type InputError struct {
	Field  string // the input field, e.g. "probs[2]" or "weight"
	Rule   Rule
	Detail string // optional specifics, e.g. "0.5 after 0.75"
}

func (e *InputError) Error() string {
	if e.Detail == "" {
		return fmt.Sprintf("elicit: %s: %s", e.Field, e.Rule)
	}
	return fmt.Sprintf("elicit: %s: %s (%s)", e.Field, e.Rule, e.Detail)
}

func inputErr(field string, rule Rule, format string, args ...any) *InputError {
	return &InputError{Field: field, Rule: rule, Detail: fmt.Sprintf(format, args...)}
}

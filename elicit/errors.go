package elicit

import (
	"errors"
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
	RuleTooLong           Rule = "is too long"
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

// Sentinel errors of the workshop domain, returned (wrapped) by storage.
var (
	ErrNotFound    = errors.New("not found")
	ErrRoundClosed = errors.New("the round is closed")
	// ErrAnswersFrozen is returned when an answer is saved to a
	// calibration question whose true value has been revealed.
	ErrAnswersFrozen = errors.New("the true value has been revealed, so the answers to this question are final")
	// ErrRoundStillOpen is returned when a prior is agreed while the
	// round is open and the facilitator has not confirmed it.
	ErrRoundStillOpen = errors.New("the round is still open, so answers may still change")
	// ErrRevoked is returned when a revoked expert's answer is saved.
	ErrRevoked = errors.New("the expert's access has been revoked")
	// ErrRetired is returned when an answer is saved to a retired question.
	ErrRetired = errors.New("the question has been retired")
)

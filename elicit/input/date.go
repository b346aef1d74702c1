package input

import (
	"fmt"
	"strings"
	"time"

	"github.com/parley-elicit/parley/elicit"
)

// RuleDate is broken by a date that is not a calendar date written
// year-month-day.
const RuleDate elicit.Rule = "must be a date written as 2026-03-31 (year-month-day)"

// RuleDateAfterRecorded is broken by data said to be observed after the
// day they are recorded (a day's grace for time zones).
const RuleDateAfterRecorded elicit.Rule = "must not be later than the day the data are recorded"

// RuleDateTooEarly is broken by a day before EarliestObserved: a year
// such as 0026 or 0202 is a mistyped one, and data, never removed once
// recorded, would keep it for good.
const RuleDateTooEarly elicit.Rule = "must be in 1900 or later (an earlier year is likely mistyped)"

// EarliestObserved is the first day data may be said to be observed on.
const EarliestObserved = "1900-01-01"

// DateLayout is how dates are typed and stored: ISO 8601's calendar date.
const DateLayout = "2006-01-02"

// Date parses raw, trimmed, as a calendar date (DateLayout): required,
// and a real day (2026-02-30 is refused).
func Date(field, raw string) (string, error) {
	s := strings.TrimSpace(raw)
	return s, CheckDate(field, s)
}

// CheckDate checks a stored date by Date's rule.
func CheckDate(field, s string) error {
	if s == "" {
		return &elicit.InputError{Field: field, Rule: elicit.RuleRequired}
	}
	if len(s) != len(DateLayout) {
		return &elicit.InputError{Field: field, Rule: RuleDate, Detail: fmt.Sprintf("got %q", Clip(s, 24))}
	}
	if _, err := time.Parse(DateLayout, s); err != nil {
		return &elicit.InputError{Field: field, Rule: RuleDate, Detail: fmt.Sprintf("got %q", Clip(s, 24))}
	}
	return nil
}

// CheckObservedDate checks the day data were observed: a date by Date's
// rule, not before EarliestObserved (the layout sorts as text).
func CheckObservedDate(field, s string) error {
	if err := CheckDate(field, s); err != nil {
		return err
	}
	if s < EarliestObserved {
		return &elicit.InputError{Field: field, Rule: RuleDateTooEarly, Detail: fmt.Sprintf("got %s", s)}
	}
	return nil
}

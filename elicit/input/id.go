package input

import (
	"fmt"

	"github.com/parley-elicit/parley/elicit"
)

// MaxID is the largest id, position or other whole number of a record
// that Parley reads: 2⁵³ − 1, the largest integer every JSON reader holds
// exactly (I-JSON, RFC 7493 §2.2, which recommends integers within
// ±(2⁵³ − 1) for interoperability).
const MaxID = 1<<53 - 1

// CheckID checks that id is a whole number from 1 to MaxID: elicit.RulePositive
// below, elicit.RuleCountRange above.
func CheckID(field string, id int64) error {
	switch {
	case id < 1:
		return &elicit.InputError{Field: field, Rule: elicit.RulePositive, Detail: fmt.Sprintf("got %d", id)}
	case id > MaxID:
		return &elicit.InputError{Field: field, Rule: elicit.RuleCountRange, Detail: fmt.Sprintf("at most %d, got %d", int64(MaxID), id)}
	}
	return nil
}

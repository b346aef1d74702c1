package answersheet

import (
	"errors"
	"fmt"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// A store's refusal of revisions[i] is said at row i's line and column,
// by the sheet's rule; any other error is passed on as it is.
func TestRefusalAtRow(t *testing.T) {
	rows := []Row{
		{Line: 2, Expert: workshop.Expert{Name: "Ada Quell"}, Question: workshop.Question{Position: 1}},
		{Line: 5, Expert: workshop.Expert{Name: "Bruno Ferrante"}, Question: workshop.Question{Position: 3}},
	}
	for _, c := range []struct {
		cause  error
		field  string
		rule   elicit.Rule
		detail string
	}{
		{workshop.ErrRoundClosed, "row 5, column question", RuleRound, "round 2 is closed"},
		{workshop.ErrAnswersFrozen, "row 5, column question", RuleQuestion, "Q3's true value has been revealed, so its answers are final"},
		{workshop.ErrRetired, "row 5, column question", RuleQuestion, "Q3 is retired"},
		{workshop.ErrQuestionChanged, "row 5, column question", RuleChanged, "Q3"},
		{workshop.ErrRevoked, "row 5, column expert", RuleExpert, "Bruno Ferrante"},
		{workshop.ErrNotFound, "row 5, column expert", RuleExpert, "Bruno Ferrante"},
	} {
		err := RefusalAtRow(&workshop.RevisionRefused{Index: 1, Err: c.cause}, 2, rows)
		var ie *elicit.InputError
		if !errors.As(err, &ie) || ie.Field != c.field || ie.Rule != c.rule || ie.Detail != c.detail {
			t.Errorf("%v: %v, want %s: %s (%s)", c.cause, err, c.field, c.rule, c.detail)
		}
	}
	for _, err := range []error{
		nil,
		errors.New("disk I/O error"),
		&workshop.RevisionRefused{Index: 2, Err: workshop.ErrRetired}, // no such row
		&workshop.RevisionRefused{Index: 0, Err: errors.New("database is locked")},
		fmt.Errorf("revisions[1]: %w", workshop.ErrRetired), // words alike, not the store's refusal
	} {
		if got := RefusalAtRow(err, 2, rows); got != err {
			t.Errorf("%v came back as %v", err, got)
		}
	}
}

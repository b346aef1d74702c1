package workshop

import (
	"errors"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

// CheckReopenOf refuses to reopen a round other than the last closed
// one, as a page from before a later close would ask; the rules of
// CheckReopen come first.
func TestCheckReopenOf(t *testing.T) {
	for _, c := range []struct {
		w     Workshop
		round int
		rule  elicit.Rule // "" when allowed
	}{
		{Workshop{Round: 2}, 2, ""},
		{Workshop{Round: 2}, 1, RuleRoundSequence},
		{Workshop{Round: 2, Open: true}, 2, RuleRoundSequence},
		{Workshop{Round: 2, Archived: true}, 2, RuleArchived},
	} {
		err := c.w.CheckReopenOf(c.round)
		var ie *elicit.InputError
		switch {
		case c.rule == "" && err != nil:
			t.Errorf("%+v reopening round %d: %v", c.w, c.round, err)
		case c.rule != "" && (!errors.As(err, &ie) || ie.Rule != c.rule || ie.Field != "action"):
			t.Errorf("%+v reopening round %d: %v, want %q on action", c.w, c.round, err, c.rule)
		}
	}
}

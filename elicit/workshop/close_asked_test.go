package workshop

import (
	"errors"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

// A round closes only once a question is in use: one closed with none
// fed nothing back and left the record a round nobody could answer.
func TestCheckCloseAsked(t *testing.T) {
	w := Workshop{Round: 1, Open: true}
	var ie *elicit.InputError
	if err := w.CheckCloseAsked(0); !errors.As(err, &ie) || ie.Field != "round" || ie.Rule != RuleNothingAsked {
		t.Fatalf("closing with no question in use: %v, want %q on round", err, RuleNothingAsked)
	}
	if err := w.CheckCloseAsked(1); err != nil {
		t.Fatalf("closing with one question in use: %v", err)
	}
}

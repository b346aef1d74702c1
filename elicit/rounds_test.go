package elicit

import (
	"errors"
	"testing"
)

func TestCheckRoundChange(t *testing.T) {
	tests := []struct {
		name   string
		w      Workshop
		round  int
		open   bool
		wantOK bool
	}{
		{"close the open round", Workshop{Round: 1, Open: true}, 1, false, true},
		{"open the next round", Workshop{Round: 1, Open: false}, 2, true, true},
		{"close a closed round", Workshop{Round: 1, Open: false}, 1, false, false},
		{"close another round", Workshop{Round: 2, Open: true}, 1, false, false},
		{"open while open", Workshop{Round: 1, Open: true}, 2, true, false},
		{"skip a round", Workshop{Round: 1, Open: false}, 3, true, false},
		{"reopen the closed round", Workshop{Round: 2, Open: false}, 2, true, false},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			err := tt.w.CheckRoundChange(tt.round, tt.open)
			if tt.wantOK {
				if err != nil {
					t.Fatalf("got %v, want nil", err)
				}
				return
			}
			var ie *InputError
			if !errors.As(err, &ie) || ie.Field != "round" || ie.Rule != RuleRoundSequence {
				t.Fatalf("got %v, want an InputError on round breaking %q", err, RuleRoundSequence)
			}
		})
	}
}

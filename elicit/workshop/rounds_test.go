package workshop

import (
	"errors"
	"testing"

	"github.com/parley-elicit/parley/elicit"
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
			var ie *elicit.InputError
			if !errors.As(err, &ie) || ie.Field != "round" || ie.Rule != RuleRoundSequence {
				t.Fatalf("got %v, want an InputError on round breaking %q", err, RuleRoundSequence)
			}
		})
	}
}

// No round opens past MaxRounds, so a workshop's round never nears
// overflow and every workshop exports a record its import takes.
func TestRoundsStopAtMaxRounds(t *testing.T) {
	if err := (Workshop{Round: MaxRounds - 1}).CheckRoundChange(MaxRounds, true); err != nil {
		t.Fatalf("opening round %d: %v", MaxRounds, err)
	}
	var ie *elicit.InputError
	if err := (Workshop{Round: MaxRounds}).CheckRoundChange(MaxRounds+1, true); !errors.As(err, &ie) || ie.Field != "round" || ie.Rule != elicit.RuleCountRange {
		t.Fatalf("opening round %d: %v, want %q", MaxRounds+1, err, elicit.RuleCountRange)
	}
	if err := (Workshop{Round: MaxRounds, Open: true}).CheckRoundChange(MaxRounds, false); err != nil {
		t.Fatalf("closing the last round: %v", err)
	}
}

// Delphi feedback in round r is the panel as round r−1 closed (common
// practice of controlled feedback, no source for the exact rule).
func TestFeedbackRound(t *testing.T) {
	for _, tt := range []struct {
		round int
		open  bool
		want  int
	}{{1, true, 0}, {1, false, 0}, {2, true, 1}, {2, false, 1}, {3, true, 2}} {
		if got := (Workshop{Round: tt.round, Open: tt.open}).FeedbackRound(); got != tt.want {
			t.Errorf("round %d (open %v): FeedbackRound = %d, want %d", tt.round, tt.open, got, tt.want)
		}
	}
}

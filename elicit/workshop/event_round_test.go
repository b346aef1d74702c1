package workshop

import "testing"

// TestEventRound reads the round of the round events as the store writes
// their detail ({"round":N}, store/workshop.go), and no round of any
// other event or of a detail without one.
func TestEventRound(t *testing.T) {
	for _, c := range []struct {
		e    Event
		want int
		ok   bool
	}{
		{Event{Kind: EventRoundOpened, Detail: `{"round":2}`}, 2, true},
		{Event{Kind: EventRoundClosed, Detail: `{"round":1}`}, 1, true},
		{Event{Kind: EventRoundReopened, Detail: `{"round":3}`}, 3, true},
		{Event{Kind: EventWeightsSet, Detail: `{"round":2}`}, 0, false},
		{Event{Kind: EventRoundClosed, Detail: `{"round":0}`}, 0, false},
		{Event{Kind: EventRoundClosed, Detail: `not json`}, 0, false},
		{Event{Kind: EventRoundClosed}, 0, false},
	} {
		if got, ok := c.e.Round(); got != c.want || ok != c.ok {
			t.Errorf("%s %q: round %d, %v; want %d, %v", c.e.Kind, c.e.Detail, got, ok, c.want, c.ok)
		}
	}
}

package workshop

import "encoding/json"

// Round is the round a round event (round_opened, round_closed,
// round_reopened) is of, read from its detail ({"round": N}); ok is false
// for other events and for a detail that names no round of 1 or more.
// The fingerprint's chain, the record's round checks and the room view
// each read it; they had three copies of the reading.
func (e Event) Round() (round int, ok bool) {
	switch e.Kind {
	case EventRoundOpened, EventRoundClosed, EventRoundReopened:
	default:
		return 0, false
	}
	var d struct {
		Round int `json:"round"`
	}
	if json.Unmarshal([]byte(e.Detail), &d) != nil || d.Round < 1 {
		return 0, false
	}
	return d.Round, true
}

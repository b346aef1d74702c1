package record

import (
	"cmp"
	"encoding/json"
	"fmt"
	"slices"
	"time"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// RuleSavedInItsRound is broken by a revision of a round that comes, in
// the chain's order, after that round's close with no reopening of it
// between: Parley saves an answer only while its round is open (a save
// waiting while the round closes is refused), so such a revision was
// added to the record behind its back. Stamped after the close, it left
// every value noted at the close as it was, while the round's answers
// (and the next round's feedback, and the expert's current answer) were
// no longer the ones the room saw.
const RuleSavedInItsRound elicit.Rule = "must have been saved while its round was open (it comes after the close of its round in the chain, and the round was not reopened)"

// CheckRounds replays the round_closed and round_reopened events with the
// revisions in the chain's order (their time, a revision before an event
// of the same time, then id) and refuses a revision of a round closed, and
// not reopened, before it (RuleSavedInItsRound, at revisions[i].round). A
// revision may come before its round's opening: until the store stamped
// each write in the writer's turn, a save took its time as it started and
// could wait behind the writes that closed the round before and opened
// its own, which it then joined.
func (r Record) CheckRounds() error {
	type step struct {
		rev   int // index in r.Revisions; -1 for an event
		close bool
		round int
	}
	type item struct {
		at   time.Time
		rank int // revision 1, event 5, as the chain ranks them
		id   int64
		step step
	}
	var items []item
	for _, e := range r.Events {
		if e.Kind != workshop.EventRoundClosed && e.Kind != workshop.EventRoundReopened {
			continue
		}
		var d struct {
			Round int `json:"round"`
		}
		if json.Unmarshal([]byte(e.Detail), &d) != nil || d.Round < 1 {
			continue
		}
		items = append(items, item{at: e.At, rank: 5, id: e.ID,
			step: step{rev: -1, close: e.Kind == workshop.EventRoundClosed, round: d.Round}})
	}
	if len(items) == 0 {
		return nil
	}
	for i, rv := range r.Revisions {
		items = append(items, item{at: rv.At, rank: 1, id: rv.ID, step: step{rev: i, round: rv.Round}})
	}
	slices.SortStableFunc(items, func(a, b item) int {
		if c := a.at.Compare(b.at); c != 0 {
			return c
		}
		if a.rank != b.rank {
			return a.rank - b.rank
		}
		return cmp.Compare(a.id, b.id)
	})
	closed := map[int]int64{} // round → the event that closed it, while it stays closed
	for _, it := range items {
		s := it.step
		switch {
		case s.rev < 0 && s.close:
			closed[s.round] = it.id
		case s.rev < 0:
			delete(closed, s.round)
		default:
			if ev, ok := closed[s.round]; ok {
				rv := r.Revisions[s.rev]
				return inputErr(fmt.Sprintf("revisions[%d].round", s.rev), RuleSavedInItsRound,
					"revision %d of round %d at %s comes after event %d, which closed round %d",
					rv.ID, s.round, rv.At.UTC().Format("2006-01-02 15:04:05.999999 UTC"), ev, s.round)
			}
		}
	}
	return nil
}

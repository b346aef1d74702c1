package record

import (
	"cmp"
	"fmt"
	"slices"
	"time"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// RuleSavedInItsRound is broken by a revision of a round that comes, in
// the chain's order, after that round's final close (no reopening of it
// follows), or of a round no round_opened event opened: Parley saves an answer only while its round is open (a save
// waiting while the round closes is refused), so such a revision was
// added to the record behind its back. Stamped after the close, it left
// every value noted at the close as it was, while the round's answers
// (and the next round's feedback, and the expert's current answer) were
// no longer the ones the room saw.
const RuleSavedInItsRound elicit.Rule = "must have been saved while its round was open (by the events, its round had closed for good, or was never opened)"

// CheckRounds, for a record whose events close a round, refuses a
// revision of a round that no round_opened event opened (round 1 is open
// from the start), and replays the round_closed and round_reopened events
// with the revisions in the chain's order (their time, a revision before an event
// of the same time, then id) and refuses a revision of a round that comes
// after that round's final close, the one no reopening follows
// (RuleSavedInItsRound, at revisions[i].round). Until the store stamped
// each write in the writer's turn, a save took its time as it started and
// could wait behind the writes that changed the rounds, then join the
// round open when it wrote: so a revision may come before its round's
// opening, or between a close of its round and that round's reopening.
// Neither moves a value noted at a close the record still shows as final
// (one in a round reopened later comes before that round's next close,
// whose value it is in). A revision after the final close is one Parley
// never saves.
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
	opened := map[int]bool{1: true} // a workshop is created in round 1, open
	for _, e := range r.Events {
		round, ok := e.Round()
		if !ok {
			continue
		}
		if e.Kind == workshop.EventRoundOpened {
			opened[round] = true
			continue
		}
		items = append(items, item{at: e.At, rank: 5, id: e.ID,
			step: step{rev: -1, close: e.Kind == workshop.EventRoundClosed, round: round}})
	}
	if len(items) == 0 {
		return nil
	}
	// A round that no round_opened event opened has no answers: the
	// workshop's round, moved on in the database without the events, had
	// let them in.
	for i, rv := range r.Revisions {
		if !opened[rv.Round] {
			return inputErr(fmt.Sprintf("revisions[%d].round", i), RuleSavedInItsRound,
				"revision %d is of round %d, which no round_opened event opened", rv.ID, rv.Round)
		}
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
	// A round's final close: the close after which no reopening of it
	// comes, by its place in the chain's order.
	type final struct {
		at int   // index in items
		id int64 // the event
	}
	finals := map[int]final{}
	for i, it := range items {
		switch s := it.step; {
		case s.rev < 0 && s.close:
			finals[s.round] = final{i, it.id}
		case s.rev < 0:
			delete(finals, s.round)
		}
	}
	for i, it := range items {
		s := it.step
		if f, ok := finals[s.round]; s.rev >= 0 && ok && i > f.at {
			rv := r.Revisions[s.rev]
			return inputErr(fmt.Sprintf("revisions[%d].round", s.rev), RuleSavedInItsRound,
				"revision %d of round %d at %s comes after event %d, which closed round %d for good",
				rv.ID, s.round, rv.At.UTC().Format("2006-01-02 15:04:05.999999 UTC"), f.id, s.round)
		}
	}
	return nil
}

// RuleNotLogged is broken by a weight set, an agreed prior or a batch of
// study data without its entry in the decision log: Parley writes each
// with its event (weights_set, prior_agreed, study_data_recorded) in one
// transaction, at one time, so one without was added behind its back. A
// weight set or an agreed prior INSERTed into the database (the
// append-only triggers allow inserts) changed the weights in force or the
// record's headline prior while the decision log, which the facilitator
// and a reviewer read, said nothing of it.
const RuleNotLogged elicit.Rule = "must have its entry in the decision log, written with it (it was added without one)"

// CheckLogged refuses a weight set of weight_history, an agreement of a
// question's prior_history or a batch of study_data of a question in the
// record that has no event of its kind, question and time
// (RuleNotLogged), each event answering for one item. parley fingerprint
// runs it; Parse does not, since records written by hand for tests and
// examples carry decisions without their events.
func (r Record) CheckLogged() error {
	type key struct {
		kind     workshop.EventKind
		question int64
		at       string
	}
	stamp := func(t time.Time) string { return t.UTC().Format(time.RFC3339Nano) }
	logged := map[key]int{}
	for _, e := range r.Events {
		switch e.Kind {
		case workshop.EventWeightsSet, workshop.EventPriorAgreed, workshop.EventDataRecorded:
			logged[key{e.Kind, e.QuestionID, stamp(e.At)}]++
		}
	}
	take := func(path string, k key, what string, id int64) error {
		if logged[k] == 0 {
			return inputErr(path, RuleNotLogged, "%s %d at %s has no %s event of that time", what, id, k.at, k.kind)
		}
		logged[k]--
		return nil
	}
	for i, w := range r.WeightHistory {
		if err := take(fmt.Sprintf("weight_history[%d]", i), key{workshop.EventWeightsSet, 0, stamp(w.At)}, "weight set", w.ID); err != nil {
			return err
		}
	}
	questions := map[int64]bool{}
	for i, q := range r.Questions {
		questions[q.ID] = true
		for j, ap := range q.PriorHistory {
			if err := take(fmt.Sprintf("questions[%d].prior_history[%d]", i, j), key{workshop.EventPriorAgreed, q.ID, stamp(ap.At)}, "agreed prior", ap.ID); err != nil {
				return err
			}
		}
	}
	for i, d := range r.StudyData {
		if !questions[d.QuestionID] {
			continue // a record narrowed to one question by an earlier Parley kept every batch, and only that question's events
		}
		if err := take(fmt.Sprintf("study_data[%d]", i), key{workshop.EventDataRecorded, d.QuestionID, stamp(d.At)}, "batch of study data", d.ID); err != nil {
			return err
		}
	}
	return nil
}

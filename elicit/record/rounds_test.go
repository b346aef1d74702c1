package record

import (
	"errors"
	"slices"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// CheckRounds: a revision chained after its round's final close (no
// reopening follows) is refused at its path, and so is one of a round no
// event opened; one in a reopened round, one stamped before its own round
// opened or between a close and the reopening of its round (a save that
// waited behind those writes, as the store let one before it stamped
// writes in the writer's turn), and one in the very microsecond of the
// close (the chain puts a revision before an event of its time) are not.
func TestCheckRounds(t *testing.T) {
	t0 := time.Date(2026, 3, 2, 9, 0, 0, 0, time.UTC)
	at := func(min int) time.Time { return t0.Add(time.Duration(min) * time.Minute) }
	ev := func(id int64, kind workshop.EventKind, min int, detail string) workshop.Event {
		return workshop.Event{ID: id, WorkshopID: 1, Kind: kind, At: at(min), Detail: detail}
	}
	rev := func(id int64, round, min int) Revision {
		return Revision{Revision: workshop.Revision{ID: id, QuestionID: 1, ExpertID: 1, Round: round, At: at(min)}}
	}
	events := []workshop.Event{
		ev(1, workshop.EventWorkshopCreated, 0, ""),
		ev(2, workshop.EventRoundClosed, 10, `{"round":1}`),
		ev(3, workshop.EventRoundReopened, 20, `{"round":1}`),
		ev(4, workshop.EventRoundClosed, 30, `{"round":1}`),
		ev(5, workshop.EventRoundOpened, 40, `{"round":2}`),
		ev(6, workshop.EventRoundClosed, 50, `{"round":2}`),
	}
	for _, c := range []struct {
		name string
		revs []Revision
		bad  string // the path refused; "" for none
	}{
		{"each in its round", []Revision{rev(1, 1, 5), rev(2, 1, 25), rev(3, 2, 45)}, ""},
		{"in the microsecond of the close", []Revision{rev(1, 1, 10)}, ""},
		{"round 2 stamped before it opened", []Revision{rev(1, 1, 5), rev(2, 2, 35)}, ""},
		{"round 1 between its close and its reopening", []Revision{rev(1, 1, 5), rev(2, 1, 15)}, ""},
		{"round 1 after its second close", []Revision{rev(1, 1, 5), rev(2, 1, 35)}, "revisions[1].round"},
		{"round 1 in round 2", []Revision{rev(1, 2, 45), rev(2, 1, 46)}, "revisions[1].round"},
		{"round 2 after its close", []Revision{rev(1, 2, 45), rev(2, 2, 55)}, "revisions[1].round"},
		{"round 3, never opened", []Revision{rev(1, 2, 45), rev(2, 3, 55)}, "revisions[1].round"},
	} {
		r := Record{Events: events, Revisions: c.revs}
		err := r.CheckRounds()
		var ie *elicit.InputError
		switch {
		case c.bad == "" && err != nil:
			t.Errorf("%s: %v", c.name, err)
		case c.bad == "":
		case !errors.As(err, &ie) || ie.Field != c.bad || ie.Rule != RuleSavedInItsRound:
			t.Errorf("%s: %v, want %s: %s", c.name, err, c.bad, RuleSavedInItsRound)
		}
	}
	// A record without round events (narrowed, or made before them)
	// has nothing to replay.
	if err := (Record{Revisions: []Revision{rev(1, 3, 5)}}).CheckRounds(); err != nil {
		t.Errorf("no round events: %v", err)
	}
}

// CheckLogged: each weight set, agreement and batch of study data needs
// an event of its kind, question and time, one event for one item; a
// batch of a question the record does not hold (a narrowed record) is
// not asked for one.
func TestCheckLogged(t *testing.T) {
	t0 := time.Date(2026, 3, 2, 9, 0, 0, 0, time.UTC)
	at := func(min int) time.Time { return t0.Add(time.Duration(min) * time.Minute) }
	base := func() Record {
		return Record{
			WeightHistory: []workshop.Weights{{ID: 1, WorkshopID: 1, At: at(1)}},
			Questions: []Question{{Question: workshop.Question{ID: 5},
				PriorHistory: []workshop.AgreedPrior{{ID: 2, QuestionID: 5, At: at(2)}}}},
			StudyData: []workshop.StudyData{{ID: 3, QuestionID: 5, At: at(3)}, {ID: 4, QuestionID: 6, At: at(4)}},
			Events: []workshop.Event{
				{ID: 10, Kind: workshop.EventWeightsSet, At: at(1)},
				{ID: 11, QuestionID: 5, Kind: workshop.EventPriorAgreed, At: at(2)},
				{ID: 12, QuestionID: 5, Kind: workshop.EventDataRecorded, At: at(3)},
			},
		}
	}
	if err := base().CheckLogged(); err != nil {
		t.Fatalf("each with its event: %v", err)
	}
	for _, c := range []struct {
		name, bad string
		edit      func(r *Record)
	}{
		{"a second weight set at the first's time", "weight_history[1]", func(r *Record) {
			r.WeightHistory = append(r.WeightHistory, workshop.Weights{ID: 7, At: at(1)})
		}},
		{"an agreement at another time", "questions[0].prior_history[0]", func(r *Record) { r.Questions[0].PriorHistory[0].At = at(9) }},
		{"an agreement's event on another question", "questions[0].prior_history[0]", func(r *Record) { r.Events[1].QuestionID = 6 }},
		{"a batch without its event", "study_data[0]", func(r *Record) { r.Events = r.Events[:2] }},
	} {
		r := base()
		r.Questions = []Question{{Question: r.Questions[0].Question, PriorHistory: slices.Clone(r.Questions[0].PriorHistory)}}
		r.Events = slices.Clone(r.Events)
		c.edit(&r)
		var ie *elicit.InputError
		if err := r.CheckLogged(); !errors.As(err, &ie) || ie.Field != c.bad || ie.Rule != RuleNotLogged {
			t.Errorf("%s: %v, want %s: %s", c.name, err, c.bad, RuleNotLogged)
		}
	}
}

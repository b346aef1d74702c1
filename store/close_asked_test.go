package store

import (
	"context"
	"errors"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// The store closes a round only while a question is in use, checked in
// its own transaction: with no question, or every question retired,
// closing is refused and no round_closed event is written.
func TestRoundClosesOnlyWithAQuestionInUse(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	w := workshop.Workshop{Title: "Nothing asked yet (invented)"}
	must(t, db.CreateWorkshop(ctx, &w))
	closes := func() int { return eventCount(t, db, w.ID, workshop.EventRoundClosed) }
	refused := func(when string) {
		t.Helper()
		var ie *elicit.InputError
		if err := db.SetRound(ctx, w.ID, 1, false, ""); !errors.As(err, &ie) || ie.Rule != workshop.RuleNothingAsked {
			t.Fatalf("closing round 1 %s: %v, want %q", when, err, workshop.RuleNothingAsked)
		}
		if n := closes(); n != 0 {
			t.Fatalf("closing round 1 %s: %d closes recorded", when, n)
		}
	}
	refused("with no question")
	q := workshop.Question{WorkshopID: w.ID, Wording: "What share fail in a year?", Quantity: "failure share",
		Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95}}
	must(t, db.AddQuestion(ctx, &q))
	must(t, db.SetQuestionRetired(ctx, q.ID, true, "asked by mistake (invented)"))
	refused("with its one question retired")
	must(t, db.SetQuestionRetired(ctx, q.ID, false, "asked after all (invented)"))
	must(t, db.SetRound(ctx, w.ID, 1, false, ""))
	if n := closes(); n != 1 {
		t.Fatalf("%d closes recorded, want 1", n)
	}
}

// eventCount is how many events of the kind workshop wsID's decision log
// holds.
func eventCount(t *testing.T, db *DB, wsID int64, kind workshop.EventKind) int {
	t.Helper()
	evs, err := db.Events(context.Background(), wsID)
	must(t, err)
	n := 0
	for _, e := range evs {
		if e.Kind == kind {
			n++
		}
	}
	return n
}

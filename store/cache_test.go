package store

import (
	"context"
	"fmt"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// Rows read on every expert request are remembered, and every kind of
// write that can change them is seen at the next read; a saved revision
// keeps them.
func TestRememberedRowsFollowWrites(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	q := p.qs[0]
	e := p.experts[0]
	token := []byte(fmt.Sprintf("hash-%d-0", p.w.ID))

	w1, err := db.Workshop(ctx, p.w.ID)
	if err != nil || w1.Round != 1 || !w1.Open {
		t.Fatalf("Workshop = %+v, %v", w1, err)
	}
	if _, err := db.ExpertByToken(ctx, token); err != nil {
		t.Fatal(err)
	}
	got, err := db.Question(ctx, q.ID)
	if err != nil {
		t.Fatal(err)
	}
	// A caller changing its copy changes nobody else's.
	if len(got.Probs) > 0 {
		got.Probs[0] = 0.4242
	}
	if again, _ := db.Question(ctx, q.ID); len(again.Probs) > 0 && again.Probs[0] == 0.4242 {
		t.Error("a caller's change to a question reached the next reader")
	}

	gen := db.rows.gen.Load()
	rv := workshop.Revision{QuestionID: q.ID, ExpertID: e.ID, Answer: quantileAnswer(0.3)}
	if err := db.SaveRevision(ctx, &rv); err != nil {
		t.Fatal(err)
	}
	if db.rows.gen.Load() != gen {
		t.Error("a saved revision forgot the remembered rows")
	}

	if err := db.SetRound(ctx, p.w.ID, 1, false, "discussion"); err != nil {
		t.Fatal(err)
	}
	if w, _ := db.Workshop(ctx, p.w.ID); w.Open {
		t.Error("the closed round is still read as open")
	}
	w := w1
	w.Title = "Renamed (invented)"
	if err := db.UpdateWorkshop(ctx, w); err != nil {
		t.Fatal(err)
	}
	if w, _ := db.Workshop(ctx, p.w.ID); w.Title != "Renamed (invented)" {
		t.Errorf("title read as %q after the update", w.Title)
	}
	if err := db.SetTrueValue(ctx, p.qs[1].ID, 0.25, true, "revealed"); err != nil {
		t.Fatal(err)
	}
	if q1, _ := db.Question(ctx, p.qs[1].ID); q1.TrueValue == nil || *q1.TrueValue != 0.25 || !q1.Revealed {
		t.Errorf("revealed truth not read: %+v", q1)
	}
	if err := db.RevokeExpert(ctx, e.ID, "left"); err != nil {
		t.Fatal(err)
	}
	if _, err := db.ExpertByToken(ctx, token); err == nil {
		t.Error("a revoked expert's token still finds the expert")
	}
}

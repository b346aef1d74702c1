package store

import (
	"context"
	"encoding/json"
	"errors"
	"path/filepath"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// The first reveal stores its time and the question's last revision,
// and from then on no answer to the question is saved.
func TestRevealFreezesAnswers(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	q := p.qs[1] // the calibration question, in the four-value format
	a := workshop.Answer{Lowest: 0.1, Highest: 0.5, Best: 0.25, Confidence: 0.8}
	first := workshop.Revision{QuestionID: q.ID, ExpertID: p.experts[0].ID, Answer: a}
	must(t, db.SaveRevision(ctx, &first))
	other := workshop.Revision{QuestionID: p.qs[0].ID, ExpertID: p.experts[0].ID, Answer: quantileAnswer(0.3)}
	must(t, db.SaveRevision(ctx, &other))

	must(t, db.SetTrueValue(ctx, q.ID, 0.3, false, ""))
	got, _ := db.Question(ctx, q.ID)
	if got.Revealed || got.RevealedAt != nil || got.RevealedThrough != 0 || got.Frozen() {
		t.Fatalf("storing a hidden true value froze the question: %+v", got)
	}
	must(t, db.SetTrueValue(ctx, q.ID, 0.3, true, "shown to the room"))
	got, _ = db.Question(ctx, q.ID)
	if !got.Frozen() || got.RevealedAt == nil || got.RevealedThrough != first.ID {
		t.Fatalf("after the reveal: revealed %v at %v through %d, want through %d", got.Revealed, got.RevealedAt, got.RevealedThrough, first.ID)
	}
	revealedAt := *got.RevealedAt
	// The reveal's event carries the freeze as stored, for the record to
	// check the row against.
	if d := lastReveal(t, db, p.w.ID); d.RevealedAt == nil || !d.RevealedAt.Equal(revealedAt) ||
		d.RevealedThrough == nil || *d.RevealedThrough != first.ID || d.TrueValue != 0.3 {
		t.Fatalf("the reveal's event %+v, want the freeze at %v through %d", d, revealedAt, first.ID)
	}

	late := workshop.Revision{QuestionID: q.ID, ExpertID: p.experts[1].ID, Answer: a}
	if err := db.SaveRevision(ctx, &late); !errors.Is(err, workshop.ErrAnswersFrozen) {
		t.Fatalf("save after the reveal: %v, want ErrAnswersFrozen", err)
	}
	revs, _ := db.Revisions(ctx, p.w.ID)
	if len(revs) != 2 {
		t.Fatalf("%d revisions after a refused save, want 2", len(revs))
	}
	// Other questions still take answers.
	must(t, db.SaveRevision(ctx, &workshop.Revision{QuestionID: p.qs[0].ID, ExpertID: p.experts[1].ID, Answer: quantileAnswer(0.4)}))
	// Changing the revealed value is a new reveal event, but the freeze
	// keeps its first moment.
	must(t, db.SetTrueValue(ctx, q.ID, 0.31, true, "typo in the true value"))
	got, _ = db.Question(ctx, q.ID)
	if !got.RevealedAt.Equal(revealedAt) || got.RevealedThrough != first.ID {
		t.Fatalf("a second reveal moved the freeze: at %v through %d", got.RevealedAt, got.RevealedThrough)
	}
	if d := lastReveal(t, db, p.w.ID); d.RevealedAt != nil || d.RevealedThrough != nil || d.TrueValue != 0.31 {
		t.Fatalf("the second reveal's event %+v, want the new value and no freeze (it sets none)", d)
	}
}

// lastReveal is the detail of the workshop's last event, which must be a
// reveal.
func lastReveal(t *testing.T, db *DB, workshopID int64) workshop.Reveal {
	t.Helper()
	evs, err := db.Events(context.Background(), workshopID)
	if err != nil {
		t.Fatal(err)
	}
	last := evs[len(evs)-1]
	var d workshop.Reveal
	if last.Kind != workshop.EventTruthRevealed || json.Unmarshal([]byte(last.Detail), &d) != nil {
		t.Fatalf("last event %+v, want a reveal", last)
	}
	return d
}

// A database revealed under version 4, when saves after a reveal were
// still taken, gets its freeze from the first reveal event: answers saved
// later are kept in the record but not scored.
func TestMigrationFreezesEarlierReveals(t *testing.T) {
	ctx := context.Background()
	path := filepath.Join(t.TempDir(), "v4.db")
	old, err := open(path)
	if err != nil {
		t.Fatal(err)
	}
	must(t, old.MigrateTo(ctx, 4))
	for _, stmt := range []string{
		`INSERT INTO workshops (id, title, created) VALUES (1, 'Seeds (invented)', '2026-11-01T09:00:00Z')`,
		`INSERT INTO questions (id, workshop_id, position, wording, quantity, lower, upper, format, probs, calibration, true_value, revealed)
		 VALUES (1, 1, 1, 'Seed?', 'seed', 0, 1, 'quantiles', '[0.05,0.5,0.95]', 1, 0.34, 1)`,
		`INSERT INTO experts (id, workshop_id, name, created) VALUES (1, 1, 'Ada', '2026-11-01T09:00:00Z')`,
		`INSERT INTO revisions (id, question_id, expert_id, round, at, answer_values) VALUES (1, 1, 1, 1, '2026-11-01T10:00:00.5Z', '[0.1,0.2,0.5]')`,
		`INSERT INTO events (workshop_id, question_id, kind, at, reason) VALUES (1, 1, 'truth_revealed', '2026-11-01T10:30:00.25Z', 'shown')`,
		`INSERT INTO revisions (id, question_id, expert_id, round, at, answer_values) VALUES (2, 1, 1, 2, '2026-11-01T10:30:10.1Z', '[0.3,0.34,0.38]')`,
	} {
		if _, err := old.w.ExecContext(ctx, stmt); err != nil {
			t.Fatalf("%s: %v", stmt, err)
		}
	}
	old.Close()
	db, err := Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	q, err := db.Question(ctx, 1)
	if err != nil {
		t.Fatal(err)
	}
	if q.RevealedThrough != 1 || q.RevealedAt == nil || q.RevealedAt.Format("15:04:05.00") != "10:30:00.25" {
		t.Fatalf("migrated freeze: through %d at %v, want revision 1 at 10:30:00.25", q.RevealedThrough, q.RevealedAt)
	}
	qs, _ := db.Questions(ctx, 1)
	es, _ := db.Experts(ctx, 1)
	revs, _ := db.Revisions(ctx, 1)
	set := workshop.NewCalibrationSet(qs, es, revs, true)
	if len(set.Assessments) != 1 || set.Assessments[0].Quantiles[1] != 0.2 {
		t.Fatalf("scored %+v, want the answer standing at the reveal (median 0.2)", set.Assessments)
	}
}

// A revealed true value changed without asking for a reveal (a page read
// before the reveal) is recorded as a reveal with the new value: the
// event of a change to a scored value says what it became. It was a
// truth_entered event without the value.
func TestChangingARevealedValueIsAReveal(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	q := p.qs[1]
	must(t, db.SetTrueValue(ctx, q.ID, 0.3, true, "shown to the room"))
	must(t, db.SetTrueValue(ctx, q.ID, 0.35, false, "a second look"))
	got, _ := db.Question(ctx, q.ID)
	if !got.Revealed || got.TrueValue == nil || *got.TrueValue != 0.35 {
		t.Fatalf("after the change: revealed %v, value %v", got.Revealed, got.TrueValue)
	}
	evs, err := db.Events(ctx, p.w.ID)
	if err != nil {
		t.Fatal(err)
	}
	last := evs[len(evs)-1]
	if last.Kind != workshop.EventTruthRevealed || last.Detail != `{"true_value":0.35}` || last.Reason != "a second look" {
		t.Errorf("the change's event: %+v", last)
	}
}

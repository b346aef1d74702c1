package store

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
)

func lastEvent(t *testing.T, db *DB, workshopID int64) workshop.Event {
	t.Helper()
	evs, err := db.Events(context.Background(), workshopID)
	if err != nil || len(evs) == 0 {
		t.Fatalf("events: %v, %d", err, len(evs))
	}
	return evs[len(evs)-1]
}

func TestEditQuestionBeforeAndAfterAnswers(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	q := p.qs[0]

	// No answers yet: anything may change, and the event keeps the old text.
	next := q
	next.Wording = "What share of seals fail within their first year in service?"
	next.Upper = 0.5
	next.Probs = []float64{0.1, 0.5, 0.9}
	must(t, db.EditQuestion(ctx, next, "typo and a tighter range"))
	got, _ := db.Question(ctx, q.ID)
	if got.Wording != next.Wording || got.Upper != 0.5 || got.Probs[0] != 0.1 {
		t.Fatalf("edited question reads back as %+v", got)
	}
	ev := lastEvent(t, db, p.w.ID)
	var change questionChange
	if err := json.Unmarshal([]byte(ev.Detail), &change); err != nil {
		t.Fatal(err)
	}
	if ev.Kind != workshop.EventQuestionEdited || ev.Reason != "typo and a tighter range" || ev.QuestionID != q.ID ||
		strings.Join(change.Fields, ",") != "wording,upper,probs" ||
		!strings.Contains(string(change.Before), q.Wording) || !strings.Contains(string(change.After), next.Wording) {
		t.Fatalf("edit event %+v (detail %s)", ev, ev.Detail)
	}

	// Once answered, only the wording, quantity and units.
	must(t, db.SaveRevision(ctx, &workshop.Revision{QuestionID: q.ID, ExpertID: p.experts[0].ID,
		Answer: workshop.Answer{Values: []float64{0.05, 0.1, 0.2}}}))
	locked := got
	locked.Upper = 0.9
	var ie *elicit.InputError
	if err := db.EditQuestion(ctx, locked, "widen"); !errors.As(err, &ie) || ie.Field != "upper" || ie.Rule != workshop.RuleLockedAfterAnswers {
		t.Fatalf("changing the bounds after an answer: %v, want upper locked", err)
	}
	if again, _ := db.Question(ctx, q.ID); again.Upper != 0.5 {
		t.Fatalf("a refused correction changed the question: %+v", again)
	}
	text := got
	text.Quantity = "first-year seal failure share"
	text.Units = "share of seals"
	must(t, db.EditQuestion(ctx, text, "clearer name"))
	if again, _ := db.Question(ctx, q.ID); again.Quantity != text.Quantity || again.Units != text.Units {
		t.Fatalf("text correction after answers not saved: %+v", again)
	}
	if err := db.EditQuestion(ctx, text, "again"); !errors.As(err, &ie) || ie.Rule != workshop.RuleNothingChanged {
		t.Fatalf("an edit that changes nothing: %v", err)
	}
}

func TestRetireAndRestoreQuestion(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	q := p.qs[0]
	must(t, db.SetQuestionRetired(ctx, q.ID, true, "asked twice by mistake"))
	if got, _ := db.Question(ctx, q.ID); !got.Retired {
		t.Fatal("not retired")
	}
	if ev := lastEvent(t, db, p.w.ID); ev.Kind != workshop.EventQuestionRetired || ev.Reason != "asked twice by mistake" {
		t.Fatalf("retire event %+v", ev)
	}
	err := db.SaveRevision(ctx, &workshop.Revision{QuestionID: q.ID, ExpertID: p.experts[0].ID, Answer: quantileAnswer(0.3)})
	if !errors.Is(err, workshop.ErrRetired) {
		t.Fatalf("save to a retired question: %v", err)
	}
	must(t, db.SetQuestionRetired(ctx, q.ID, false, "needed after all"))
	if got, _ := db.Question(ctx, q.ID); got.Retired {
		t.Fatal("not restored")
	}
	if ev := lastEvent(t, db, p.w.ID); ev.Kind != workshop.EventQuestionRestored {
		t.Fatalf("restore event %+v", ev)
	}
}

func TestReopenRound(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	var ie *elicit.InputError
	if err := db.ReopenRound(ctx, p.w.ID, "x"); !errors.As(err, &ie) {
		t.Fatalf("reopening an open round: %v", err)
	}
	must(t, db.SetRound(ctx, p.w.ID, 1, false, "closed by mistake"))
	must(t, db.ReopenRound(ctx, p.w.ID, "two experts were still typing"))
	w, _ := db.Workshop(ctx, p.w.ID)
	if !w.Open || w.Round != 1 {
		t.Fatalf("after reopening: round %d open %v", w.Round, w.Open)
	}
	if ev := lastEvent(t, db, p.w.ID); ev.Kind != workshop.EventRoundReopened || ev.Detail != `{"round":1}` {
		t.Fatalf("reopen event %+v", ev)
	}
	must(t, db.SaveRevision(ctx, &workshop.Revision{QuestionID: p.qs[0].ID, ExpertID: p.experts[0].ID, Answer: quantileAnswer(0.3)}))
}

func TestArchiveAndDelete(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	must(t, db.SaveRevision(ctx, &workshop.Revision{QuestionID: p.qs[0].ID, ExpertID: p.experts[0].ID, Answer: quantileAnswer(0.3)}))
	must(t, db.SetWeights(ctx, &workshop.Weights{WorkshopID: p.w.ID, Scheme: workshop.WeightsEqual, Reason: "start"}))

	// A workshop with answers cannot be deleted.
	var ie *elicit.InputError
	if err := db.DeleteWorkshop(ctx, p.w.ID, "oops"); !errors.As(err, &ie) || ie.Rule != workshop.RuleHasAnswers {
		t.Fatalf("deleting a workshop with answers: %v", err)
	}
	// It is archived instead: the round closes, saves stop, rounds stay shut.
	must(t, db.SetArchived(ctx, p.w.ID, true, "workshop finished"))
	w, _ := db.Workshop(ctx, p.w.ID)
	if !w.Archived || w.Open {
		t.Fatalf("archived workshop: %+v", w)
	}
	err := db.SaveRevision(ctx, &workshop.Revision{QuestionID: p.qs[0].ID, ExpertID: p.experts[1].ID, Answer: quantileAnswer(0.3)})
	if !errors.Is(err, workshop.ErrRoundClosed) {
		t.Fatalf("save to an archived workshop: %v", err)
	}
	if err := db.SetRound(ctx, p.w.ID, 2, true, "more"); !errors.As(err, &ie) || ie.Rule != workshop.RuleArchived {
		t.Fatalf("opening a round of an archived workshop: %v", err)
	}
	if err := db.ReopenRound(ctx, p.w.ID, "more"); !errors.As(err, &ie) || ie.Rule != workshop.RuleArchived {
		t.Fatalf("reopening a round of an archived workshop: %v", err)
	}
	evs, _ := db.Events(ctx, p.w.ID)
	if n := len(evs); evs[n-2].Kind != workshop.EventRoundClosed || evs[n-1].Kind != workshop.EventWorkshopArchived {
		t.Fatalf("archive events: %+v", evs[n-2:])
	}
	must(t, db.SetArchived(ctx, p.w.ID, false, "one more question"))
	if w, _ := db.Workshop(ctx, p.w.ID); w.Archived || w.Open {
		t.Fatalf("restored workshop: %+v", w)
	}

	// A workshop with no answers is deleted outright, with its tombstone;
	// other workshops keep every row.
	empty := seed(t, db)
	must(t, db.SetWeights(ctx, &workshop.Weights{WorkshopID: empty.w.ID, Scheme: workshop.WeightsEqual, Reason: "start"}))
	token := []byte("hash-" + "x")
	e := workshop.Expert{WorkshopID: empty.w.ID, Name: "Late"}
	must(t, db.AddExpert(ctx, &e, token))
	before, _ := db.Events(ctx, p.w.ID)
	must(t, db.DeleteWorkshop(ctx, empty.w.ID, "created twice by mistake"))
	if _, err := db.Workshop(ctx, empty.w.ID); !errors.Is(err, workshop.ErrNotFound) {
		t.Fatalf("deleted workshop still read: %v", err)
	}
	if _, err := db.ExpertByToken(ctx, token); !errors.Is(err, workshop.ErrNotFound) {
		t.Fatalf("a deleted workshop's expert link still works: %v", err)
	}
	for _, table := range []string{"questions", "experts", "events", "weight_sets", "panel_salts"} {
		var n int
		if err := db.r.QueryRowContext(ctx, "SELECT COUNT(*) FROM "+table+" WHERE workshop_id = ?", empty.w.ID).Scan(&n); err != nil {
			t.Fatal(err)
		}
		if n != 0 {
			t.Errorf("%d rows left in %s", n, table)
		}
	}
	dels, err := db.DeletedWorkshops(ctx)
	if err != nil || len(dels) != 1 || dels[0].Title != empty.w.Title || dels[0].Reason != "created twice by mistake" {
		t.Fatalf("deleted workshops: %+v, %v", dels, err)
	}
	after, _ := db.Events(ctx, p.w.ID)
	if len(after) != len(before) {
		t.Fatalf("deleting one workshop changed another's events")
	}
	// The deleted workshop's id is not given again, by creation or by
	// import: it had the largest id, which SQLite would reuse.
	again := workshop.Workshop{Title: "Created after the deletion (invented)"}
	must(t, db.CreateWorkshop(ctx, &again))
	if again.ID <= empty.w.ID {
		t.Errorf("a new workshop took id %d; the deleted one had %d", again.ID, empty.w.ID)
	}
	rec, err := db.Record(ctx, p.w.ID, exportTime)
	must(t, err)
	must(t, db.DeleteWorkshop(ctx, again.ID, "also a mistake"))
	imported, err := db.Import(ctx, rec)
	must(t, err)
	if imported <= again.ID {
		t.Errorf("an imported workshop took id %d; a deleted one had %d", imported, again.ID)
	}
	// Outside a deletion the record stays append-only.
	if _, err := db.w.ExecContext(ctx, `DELETE FROM events WHERE workshop_id = ?`, p.w.ID); err == nil {
		t.Fatal("events of a workshop were deleted outside a deletion")
	}
	if _, err := db.w.ExecContext(ctx, `DELETE FROM weight_sets`); err == nil {
		t.Fatal("weight sets were deleted outside a deletion")
	}
}

func TestWithholdReason(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	rv := workshop.Revision{QuestionID: p.qs[0].ID, ExpertID: p.experts[0].ID, Answer: quantileAnswer(0.3),
		Reason: "As Dr Example at the plant told me privately (invented)"}
	must(t, db.SaveRevision(ctx, &rv))
	plain := workshop.Revision{QuestionID: p.qs[0].ID, ExpertID: p.experts[1].ID, Answer: quantileAnswer(0.3)}
	must(t, db.SaveRevision(ctx, &plain))
	var ie *elicit.InputError
	if err := db.SetReasonWithheld(ctx, rv.ID, true, ""); !errors.As(err, &ie) || ie.Field != "reason" {
		t.Fatalf("withholding without a reason: %v", err)
	}
	if err := db.SetReasonWithheld(ctx, plain.ID, true, "x"); !errors.As(err, &ie) {
		t.Fatalf("withholding an empty reason: %v", err)
	}
	must(t, db.SetReasonWithheld(ctx, rv.ID, true, "names a person"))
	revs, _ := db.LatestRevisions(ctx, p.qs[0].ID, 1)
	if !revs[0].ReasonWithheld || revs[0].Reason != rv.Reason || revs[1].ReasonWithheld {
		t.Fatalf("withheld state read back as %+v", revs)
	}
	if ev := lastEvent(t, db, p.w.ID); ev.Kind != workshop.EventReasonWithheld || ev.Detail != `{"revision_id":`+itoa(rv.ID)+`}` {
		t.Fatalf("withhold event %+v", ev)
	}
	must(t, db.SetReasonWithheld(ctx, rv.ID, false, "the person agreed to be named"))
	revs, _ = db.Revisions(ctx, p.w.ID)
	if revs[0].ReasonWithheld {
		t.Fatal("a released reason is still withheld")
	}
}

// Editing a workshop's details and entering a hidden true value are
// events too; the hidden value is not in the event.
func TestWorkshopEditAndHiddenTruthAreRecorded(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	w := p.w
	w.Title = "Pump seal failures, renamed (invented)"
	must(t, db.UpdateWorkshop(ctx, w))
	ev := lastEvent(t, db, p.w.ID)
	if ev.Kind != workshop.EventWorkshopEdited || !strings.Contains(ev.Detail, `"fields":["title"]`) ||
		!strings.Contains(ev.Detail, "Pump seal failures (invented)") {
		t.Fatalf("edit event %+v", ev)
	}
	n := len(mustEvents(t, db, p.w.ID))
	must(t, db.UpdateWorkshop(ctx, w))
	if len(mustEvents(t, db, p.w.ID)) != n {
		t.Fatal("an edit that changed nothing was recorded")
	}
	must(t, db.SetTrueValue(ctx, p.qs[1].ID, 0.2718, false, "from the audit"))
	ev = lastEvent(t, db, p.w.ID)
	if ev.Kind != workshop.EventTruthEntered || strings.Contains(ev.Detail+ev.Reason, "0.2718") {
		t.Fatalf("hidden truth event %+v", ev)
	}
}

func mustEvents(t *testing.T, db *DB, ws int64) []workshop.Event {
	t.Helper()
	evs, err := db.Events(context.Background(), ws)
	if err != nil {
		t.Fatal(err)
	}
	return evs
}

// A question may be corrected in every part until its first answer is
// saved, so a page can check an answer, and fit it, against the question
// as it stood before a correction. The save checks the answer against the
// question as it now stands, inside its transaction: an answer that
// breaks the corrected question's rules, or whose kept fit was made on
// the old bounds, probabilities or bins, is refused with
// ErrQuestionChanged and nothing is saved; a fresh check and fit of the
// same answer is then taken.
func TestSaveChecksTheQuestionAsItNowStands(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	quantiles := workshop.Question{WorkshopID: p.w.ID, Wording: "What share fails? (invented)", Quantity: "share", Lower: 0, Upper: 1,
		Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95}}
	chips := workshop.Question{WorkshopID: p.w.ID, Wording: "Place your chips (invented)", Quantity: "share", Lower: 0, Upper: 1,
		Format: workshop.FormatChips, BinEdges: []float64{0, 0.25, 0.5, 0.75, 1}, Chips: 20}
	for _, c := range []struct {
		name   string
		asked  workshop.Question // as the page showed it
		now    func(q workshop.Question) workshop.Question
		answer workshop.Answer
	}{
		{"bounds narrowed past the answer", quantiles, func(q workshop.Question) workshop.Question { q.Lower, q.Upper = 0.5, 100; return q },
			quantileAnswer(0.3)},
		{"bounds widened: the answer still lies inside, its fit does not", quantiles, func(q workshop.Question) workshop.Question { q.Upper = 2; return q },
			quantileAnswer(0.3)},
		{"probabilities changed", quantiles, func(q workshop.Question) workshop.Question { q.Probs = []float64{0.1, 0.5, 0.9}; return q },
			quantileAnswer(0.3)},
		{"bins moved", chips, func(q workshop.Question) workshop.Question { q.BinEdges = []float64{0, 0.2, 0.5, 0.8, 1}; return q },
			workshop.Answer{Counts: []int{3, 8, 6, 3}}},
	} {
		t.Run(c.name, func(t *testing.T) {
			asked := c.asked
			if err := db.AddQuestion(ctx, &asked); err != nil {
				t.Fatal(err)
			}
			fit, err := asked.Fit(c.answer)
			if err != nil {
				t.Fatal(err)
			}
			now := c.now(asked)
			if err := db.EditQuestion(ctx, now, "invented: a typo in the question"); err != nil {
				t.Fatal(err)
			}
			r := workshop.Revision{QuestionID: asked.ID, ExpertID: p.experts[0].ID, Answer: c.answer, Kept: &fit}
			if err := db.SaveRevision(ctx, &r); !errors.Is(err, workshop.ErrQuestionChanged) {
				t.Fatalf("a save checked against the question before its correction: %v, want ErrQuestionChanged", err)
			}
			sheet := []workshop.Revision{{QuestionID: asked.ID, ExpertID: p.experts[1].ID, Answer: c.answer, Kept: &fit}}
			if err := db.SaveRevisions(ctx, sheet); !errors.Is(err, workshop.ErrQuestionChanged) {
				t.Fatalf("a sheet's save checked against the question before its correction: %v, want ErrQuestionChanged", err)
			}
			rs, err := db.Revisions(ctx, p.w.ID)
			if err != nil {
				t.Fatal(err)
			}
			for _, rv := range rs {
				if rv.QuestionID == asked.ID {
					t.Fatalf("a refused save was kept: %+v", rv)
				}
			}
			// Checked and fitted afresh, the answer is taken where the
			// corrected question allows it.
			if fresh, err := now.Fit(c.answer); err == nil {
				r.Kept = &fresh
				if err := db.SaveRevision(ctx, &r); err != nil {
					t.Fatalf("the same answer fitted to the corrected question: %v", err)
				}
			}
		})
	}
}

// A question whose true value has been shown stays a calibration question
// with a true value: a correction (even before any answer) that unticks
// it or clears the value is refused, naming the field, and the record
// still reads. Before, the correction was taken and kept the reveal, and
// the workshop's record could no longer be read back ("only a calibration
// question whose true value is revealed has a reveal").
func TestCorrectionKeepsARevealedQuestionACalibrationQuestion(t *testing.T) {
	ctx := context.Background()
	db := newDB(t)
	w, cal := culvertWorkshop(t, db)
	must(t, db.AddQuestion(ctx, &cal))
	must(t, db.SetTrueValue(ctx, cal.ID, 420, true, "the inspection report"))
	shown, err := db.Question(ctx, cal.ID)
	must(t, err)
	for _, c := range []struct {
		field string
		rule  elicit.Rule
		edit  func(*workshop.Question)
	}{
		{"calibration", workshop.RuleRevealedCalibration, func(q *workshop.Question) { q.Calibration, q.TrueValue = false, nil }},
		{"true_value", workshop.RuleRevealedTruth, func(q *workshop.Question) { q.TrueValue = nil }},
	} {
		next := shown
		c.edit(&next)
		var ie *elicit.InputError
		if err := db.EditQuestion(ctx, next, "not a calibration question after all"); !errors.As(err, &ie) || ie.Field != c.field || ie.Rule != c.rule {
			t.Errorf("%s: %v, want %s refused with %q", c.field, err, c.field, c.rule)
		}
	}
	if again, _ := db.Question(ctx, cal.ID); !again.Calibration || again.TrueValue == nil {
		t.Fatalf("a refused correction changed the question: %+v", again)
	}
	// A new value shown through a correction is still taken.
	next := shown
	v := 430.0
	next.TrueValue = &v
	must(t, db.EditQuestion(ctx, next, "the report's corrected count"))
	if _, err := record.Parse(bytes.NewReader(exportJSON(t, db, w.ID))); err != nil {
		t.Fatalf("the record after the corrections: %v", err)
	}
}

// A new question comes unrevealed, in use and on the uniform background:
// one that comes with any of these set is refused, naming the field,
// and nothing is stored (before, a revealed one was stored revealed with
// no time, no freeze and no event, and the other two were dropped
// without a word).
func TestAddQuestionRefusesWhatIsSetLater(t *testing.T) {
	ctx := context.Background()
	db := newDB(t)
	w, cal := culvertWorkshop(t, db)
	for field, set := range map[string]func(*workshop.Question){
		"revealed":               func(q *workshop.Question) { q.Revealed = true },
		"retired":                func(q *workshop.Question) { q.Retired = true },
		"log_uniform_background": func(q *workshop.Question) { q.LogScale = true },
	} {
		q := cal
		x := 420.0
		q.TrueValue = &x
		set(&q)
		var ie *elicit.InputError
		if err := db.AddQuestion(ctx, &q); !errors.As(err, &ie) || ie.Field != field {
			t.Errorf("%s: %v, want %s refused", field, err, field)
		}
	}
	if qs, err := db.Questions(ctx, w.ID); err != nil || len(qs) != 0 {
		t.Fatalf("refused questions stored: %d, %v", len(qs), err)
	}
}

package store

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// A question changed through Parley (a correction, a background set, a
// true value revealed) reads back; one changed in the database without
// an event (its bounds, its background, its revealed true value) is
// refused by the record's reader, naming the field: the question's rows
// are not chained, its events are. So is an expert revoked or let back
// without an event (a revoked expert's answers leave the pool), and a
// question retired or brought back without one (a retired question
// leaves the pools and the scores), and an expert renamed (their
// answers would read as another's).
func TestQuestionChangedWithoutAnEventIsRefused(t *testing.T) {
	ctx := context.Background()
	db := newDB(t)
	w, cal := culvertWorkshop(t, db)
	target := workshop.Question{WorkshopID: w.ID, Wording: "Share of culverts blocked after a storm?", Quantity: "blocked share",
		Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95}}
	must(t, db.AddQuestion(ctx, &target))
	must(t, db.AddQuestion(ctx, &cal))
	edited := target
	edited.Wording = "Share of culverts blocked after a heavy storm?"
	must(t, db.EditQuestion(ctx, edited, "clearer wording"))
	must(t, db.SetLogScale(ctx, cal.ID, true, "counts span three decades"))
	must(t, db.SetTrueValue(ctx, cal.ID, 420, true, "the inspection report"))
	var experts []workshop.Expert
	for _, name := range []string{"Odile (invented)", "Piet (invented)"} {
		e := workshop.Expert{WorkshopID: w.ID, Name: name}
		must(t, db.AddExpert(ctx, &e, []byte("token-"+name)))
		experts = append(experts, e)
	}
	must(t, db.SetQuestionRetired(ctx, cal.ID, true, "the seed was found ambiguous"))
	must(t, db.SetQuestionRetired(ctx, cal.ID, false, "the ambiguity was settled"))
	must(t, db.RevokeExpert(ctx, experts[0].ID, "left the panel"))
	must(t, db.RevokeExpert(ctx, experts[1].ID, "lost their link"))
	must(t, db.ReissueToken(ctx, experts[1].ID, []byte("new token"), "lost their link"))
	w.Decision = "which culverts to clear first (invented)"
	must(t, db.UpdateWorkshop(ctx, w))
	parse := func() error {
		_, err := record.Parse(bytes.NewReader(exportJSON(t, db, w.ID)))
		return err
	}
	if err := parse(); err != nil {
		t.Fatalf("the record of questions changed through Parley: %v", err)
	}
	for _, c := range []struct{ update, field string }{
		{`UPDATE questions SET upper = 0.5 WHERE id = ?`, "questions[0].upper"},
		{`UPDATE questions SET log_uniform_background = 0 WHERE id = ?`, "questions[1].log_uniform_background"},
		{`UPDATE questions SET true_value = 400 WHERE id = ?`, "questions[1].true_value"},
		{`UPDATE questions SET probs = '[0.1,0.5,0.9]' WHERE id = ?`, "questions[0].probs"},
		{`UPDATE workshops SET title = 'Culvert clearing (invented)' WHERE id = ?`, "workshop.title"},
		{`UPDATE workshops SET decision = 'which roads to close' WHERE id = ?`, "workshop.decision"},
		{`UPDATE questions SET retired = 1 WHERE id = ?`, "questions[0].retired"},
		{`UPDATE questions SET retired = 1 WHERE id = ?`, "questions[1].retired"},
		{`UPDATE experts SET name = 'Piet (invented)' WHERE id = ?`, "experts[0].name"},
		{`UPDATE experts SET affiliation = 'Water board' WHERE id = ?`, "experts[1].affiliation"},
		{`UPDATE experts SET revoked = 0 WHERE id = ?`, "experts[0].revoked"},
		{`UPDATE experts SET revoked = 1 WHERE id = ?`, "experts[1].revoked"},
	} {
		row, col, _ := strings.Cut(c.field, ".")
		id := map[string]int64{"questions[0]": target.ID, "questions[1]": cal.ID, "experts[0]": experts[0].ID, "experts[1]": experts[1].ID, "workshop": w.ID}[row]
		table, _, _ := strings.Cut(row, "[")
		if table == "workshop" {
			table = "workshops"
		}
		tx, err := db.w.BeginTx(ctx, nil)
		must(t, err)
		var was any
		must(t, tx.QueryRowContext(ctx, `SELECT `+col+` FROM `+table+` WHERE id = ?`, id).Scan(&was))
		_, err = tx.ExecContext(ctx, c.update, id)
		must(t, err)
		must(t, tx.Commit())
		var ie *elicit.InputError
		if err := parse(); !errors.As(err, &ie) || ie.Field != c.field || ie.Rule != record.RuleDefinitionMismatch {
			t.Errorf("%s: the record reads with %v, want %s refused (%s)", c.update, err, c.field, record.RuleDefinitionMismatch)
		}
		_, err = db.w.ExecContext(ctx, `UPDATE `+table+` SET `+col+` = ? WHERE id = ?`, was, id)
		must(t, err)
		if err := parse(); err != nil {
			t.Fatalf("set back after %s: %v", c.update, err)
		}
	}
}

// A reveal's freeze (its time and the question's last revision then,
// after which no answer is scored) is bound to the reveal's event: moved
// in the database or in the exported file, the record is refused naming
// the field. A reveal recorded before its event carried the freeze is
// not checked for it, and its record still reads.
func TestRevealFreezeChangedWithoutAnEventIsRefused(t *testing.T) {
	ctx := context.Background()
	db := newDB(t)
	p := seed(t, db)
	q := p.qs[1] // the calibration question
	var revs []workshop.Revision
	for _, s := range []struct {
		expert int
		best   float64
	}{{0, 0.2}, {0, 0.25}, {1, 0.4}} {
		rv := workshop.Revision{QuestionID: q.ID, ExpertID: p.experts[s.expert].ID,
			Answer: workshop.Answer{Lowest: 0.1, Highest: 0.6, Best: s.best, Confidence: 0.8}}
		must(t, db.SaveRevision(ctx, &rv))
		revs = append(revs, rv)
	}
	must(t, db.SetTrueValue(ctx, q.ID, 0.3, true, "the audit report (invented)"))
	must(t, db.SetTrueValue(ctx, q.ID, 0.31, true, "a typo in the report (invented)"))
	parse := func(b []byte) error {
		_, err := record.Parse(bytes.NewReader(b))
		return err
	}
	refused := func(err error, field string) bool {
		var ie *elicit.InputError
		return errors.As(err, &ie) && ie.Field == field && ie.Rule == record.RuleDefinitionMismatch
	}
	first := exportJSON(t, db, p.w.ID)
	if err := parse(first); err != nil {
		t.Fatalf("the record of a reveal made through Parley: %v", err)
	}
	var stored struct {
		at      string
		through int64
	}
	must(t, db.r.QueryRowContext(ctx, `SELECT revealed_at, revealed_through FROM questions WHERE id = ?`, q.ID).
		Scan(&stored.at, &stored.through))
	if stored.through != revs[2].ID {
		t.Fatalf("frozen through %d, want the last revision %d", stored.through, revs[2].ID)
	}
	for _, c := range []struct {
		update string
		arg    any
		field  string
	}{
		// An earlier answer of the first expert scored, the second's not.
		{`UPDATE questions SET revealed_through = ? WHERE id = ?`, revs[0].ID, "questions[1].revealed_through"},
		// 0 scores every answer, whenever saved.
		{`UPDATE questions SET revealed_through = ? WHERE id = ?`, 0, "questions[1].revealed_through"},
		{`UPDATE questions SET revealed_at = ? WHERE id = ?`, "2026-01-01T00:00:00Z", "questions[1].revealed_at"},
	} {
		_, err := db.w.ExecContext(ctx, c.update, c.arg, q.ID)
		must(t, err)
		if err := parse(exportJSON(t, db, p.w.ID)); !refused(err, c.field) {
			t.Errorf("%s (%v): the record reads with %v, want %s refused (%s)", c.update, c.arg, err, c.field, record.RuleDefinitionMismatch)
		}
		_, err = db.w.ExecContext(ctx, `UPDATE questions SET revealed_at = ?, revealed_through = ? WHERE id = ?`, stored.at, stored.through, q.ID)
		must(t, err)
	}
	// The same change in the exported file.
	was := fmt.Sprintf(`"revealed_through": %d,`, revs[2].ID)
	if n := bytes.Count(first, []byte(was)); n != 1 {
		t.Fatalf("the record holds %s %d times, want once", was, n)
	}
	edited := bytes.Replace(first, []byte(was), []byte(fmt.Sprintf(`"revealed_through": %d,`, revs[1].ID)), 1)
	if err := parse(edited); !refused(err, "questions[1].revealed_through") {
		t.Errorf("revealed_through edited in the file: the record reads with %v, want it refused", err)
	}

	// A reveal recorded before the event carried the freeze: the record
	// reads, and its freeze is not checked.
	_, err := db.w.ExecContext(ctx, `DROP TRIGGER events_no_update`)
	must(t, err)
	_, err = db.w.ExecContext(ctx, `UPDATE events SET detail = '{"true_value":0.3}' WHERE question_id = ? AND kind = ? AND detail LIKE '%revealed_through%'`,
		q.ID, workshop.EventTruthRevealed)
	must(t, err)
	if err := parse(exportJSON(t, db, p.w.ID)); err != nil {
		t.Fatalf("a reveal without the freeze in its event: %v", err)
	}
	_, err = db.w.ExecContext(ctx, `UPDATE questions SET revealed_through = ? WHERE id = ?`, revs[0].ID, q.ID)
	must(t, err)
	if err := parse(exportJSON(t, db, p.w.ID)); err != nil {
		t.Fatalf("a reveal without the freeze in its event, its freeze moved: %v", err)
	}
	// Even then the freeze must name one of the question's own answers.
	_, err = db.w.ExecContext(ctx, `UPDATE questions SET revealed_through = ? WHERE id = ?`, revs[2].ID+1000, q.ID)
	must(t, err)
	var ie *elicit.InputError
	if err := parse(exportJSON(t, db, p.w.ID)); !errors.As(err, &ie) || ie.Field != "questions[1].revealed_through" {
		t.Errorf("a freeze naming no revision of the question: the record reads with %v, want questions[1].revealed_through refused", err)
	}
}

// culvertWorkshop creates an invented workshop and returns it with a
// calibration question for it, not yet added: culverts inspected last
// year, between 1 and 5000, asked at 5/50/95%.
func culvertWorkshop(t *testing.T, db *DB) (workshop.Workshop, workshop.Question) {
	t.Helper()
	w := workshop.Workshop{Title: "Culvert blockage (invented)", Invented: true}
	must(t, db.CreateWorkshop(context.Background(), &w))
	return w, workshop.Question{WorkshopID: w.ID, Wording: "Culverts inspected last year?", Quantity: "culverts",
		Lower: 1, Upper: 5000, Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95}, Calibration: true}
}

// A reason withheld from the feedback, or shown again, through Parley
// reads back; a withholding written into the database without its event
// (a reason_decisions row) is refused by the record's reader, naming the
// revision's field, and so is the record's flag edited in the file.
func TestReasonWithheldWithoutAnEventIsRefused(t *testing.T) {
	ctx := context.Background()
	db := newDB(t)
	p := seed(t, db)
	var revs []workshop.Revision
	for _, e := range p.experts[:2] {
		rv := workshop.Revision{QuestionID: p.qs[0].ID, ExpertID: e.ID, Reason: "Invented: field returns of " + e.Name,
			Answer: workshop.Answer{Values: []float64{0.1, 0.2, 0.4}}}
		must(t, db.SaveRevision(ctx, &rv))
		revs = append(revs, rv)
	}
	must(t, db.SetReasonWithheld(ctx, revs[0].ID, true, "names a client"))
	must(t, db.SetReasonWithheld(ctx, revs[0].ID, false, "the client agreed"))
	must(t, db.SetReasonWithheld(ctx, revs[1].ID, true, "names a client"))
	refused := func(doc []byte, field string) {
		t.Helper()
		var ie *elicit.InputError
		if _, err := record.Parse(bytes.NewReader(doc)); !errors.As(err, &ie) || ie.Field != field || ie.Rule != record.RuleDefinitionMismatch {
			t.Errorf("the record reads with %v, want %s refused (%s)", err, field, record.RuleDefinitionMismatch)
		}
	}
	doc := exportJSON(t, db, p.w.ID)
	if _, err := record.Parse(bytes.NewReader(doc)); err != nil {
		t.Fatalf("the record of reasons withheld through Parley: %v", err)
	}
	// The flag edited in the file: revision 2's withholding lifted.
	edited := bytes.Replace(doc, []byte(`"reason_withheld": true`), []byte(`"reason_withheld": false`), 1)
	if bytes.Equal(edited, doc) {
		t.Fatal("the export does not show revision 2's reason withheld")
	}
	refused(edited, "revisions[1].reason_withheld")
	// Revision 1's reason withheld again in the database, without an event.
	_, err := db.w.ExecContext(ctx, `INSERT INTO reason_decisions (revision_id, withheld, reason, at) VALUES (?, 1, 'quietly', ?)`,
		revs[0].ID, formatTime(now()))
	must(t, err)
	refused(exportJSON(t, db, p.w.ID), "revisions[0].reason_withheld")
}

// The events are replayed in the order they were recorded, by their ids,
// which the chain covers: the order of the record's list is not chained,
// so a record whose list was reordered is refused. Reordered, an expert's
// revocation and the new link that lifted it had replayed as a
// revocation still in force, and the expert could be marked revoked (their
// answers out of the pool) with the chain and every check intact.
func TestReorderedEventsAreRefused(t *testing.T) {
	ctx := context.Background()
	db := newDB(t)
	p := seed(t, db)
	e := p.experts[1]
	must(t, db.RevokeExpert(ctx, e.ID, "lost their link"))
	must(t, db.ReissueToken(ctx, e.ID, []byte("new token"), "lost their link"))
	var doc map[string]any
	must(t, json.Unmarshal(exportJSON(t, db, p.w.ID), &doc))
	events := doc["events"].([]any)
	var revoked, reissued int
	for i, ev := range events {
		switch ev.(map[string]any)["kind"] {
		case string(workshop.EventExpertRevoked):
			revoked = i
		case string(workshop.EventTokenReissued):
			reissued = i
		}
	}
	events[revoked], events[reissued] = events[reissued], events[revoked]
	for _, x := range doc["experts"].([]any) {
		if m := x.(map[string]any); m["id"] == float64(e.ID) {
			m["revoked"] = true
		}
	}
	b, rec := chainIntact(t, doc, "the reordered record", "the list's order is not chained")
	var ie *elicit.InputError
	if _, err := record.Parse(bytes.NewReader(b)); !errors.As(err, &ie) || ie.Field != fmt.Sprintf("events[%d].id", min(revoked, reissued)+1) {
		t.Errorf("the reordered record reads with %v, want events[%d].id refused", err, min(revoked, reissued)+1)
	}
	if err := rec.CheckDefinitions(); err == nil {
		t.Error("CheckDefinitions (parley fingerprint's check) takes the reordered record")
	}
}

// A record whose question's prior_history was reversed, its agreed_prior
// made the earlier agreement (as a record written before the later one
// shows it), is refused: the chain covers each agreement but not the
// history's order, and the record had read with its chain intact and the
// earlier prior as the question's current one.
func TestReorderedPriorHistoryIsRefused(t *testing.T) {
	ctx := context.Background()
	db := newDB(t)
	p := seed(t, db)
	q := p.qs[0]
	agree := func(a, b float64) []byte {
		must(t, db.AgreePrior(ctx, &workshop.AgreedPrior{QuestionID: q.ID, Source: workshop.PriorFromPool,
			Dist: elicit.Unit(elicit.Beta{Alpha: a, Beta: b}), Rationale: "the pool (invented)", RoundOpen: true}))
		return exportJSON(t, db, p.w.ID)
	}
	first, second := agree(4, 14), agree(5, 15)
	var was, doc map[string]any
	must(t, json.Unmarshal(first, &was))
	must(t, json.Unmarshal(second, &doc))
	rq := doc["questions"].([]any)[0].(map[string]any)
	h := rq["prior_history"].([]any)
	h[0], h[1] = h[1], h[0]
	rq["agreed_prior"] = was["questions"].([]any)[0].(map[string]any)["agreed_prior"]
	b, _ := chainIntact(t, doc, "the reordered record", "the history's order is not chained")
	var ie *elicit.InputError
	if _, err := record.Parse(bytes.NewReader(b)); !errors.As(err, &ie) || ie.Field != "questions[0].prior_history[1].id" || ie.Rule != record.RulePriorMismatch {
		t.Errorf("the reordered record reads with %v, want questions[0].prior_history[1].id refused", err)
	}
}

// The record's weights in force are a copy of weight_history's last set,
// which the chain covers: a record whose copy says other weights under
// the same set's id is refused.
func TestWeightsInForceAreTheHistorysLast(t *testing.T) {
	ctx := context.Background()
	db := newDB(t)
	p := seed(t, db)
	must(t, db.SetWeights(ctx, &workshop.Weights{WorkshopID: p.w.ID, Scheme: workshop.WeightsCustom, Reason: "Ada ran the audits (invented)",
		ByExpert: map[int64]float64{p.experts[0].ID: 3, p.experts[1].ID: 1, p.experts[2].ID: 1}}))
	var doc map[string]any
	must(t, json.Unmarshal(exportJSON(t, db, p.w.ID), &doc))
	doc["weights"].(map[string]any)["by_expert"] = map[string]any{strconv.FormatInt(p.experts[1].ID, 10): 5}
	b, rec := chainIntact(t, doc, "the changed record", "the copy in force is not chained")
	var ie *elicit.InputError
	if _, err := record.Parse(bytes.NewReader(b)); !errors.As(err, &ie) || ie.Field != "weights" {
		t.Errorf("the record reads with %v, want weights refused", err)
	}
	if err := rec.CheckInForce(); err == nil {
		t.Error("CheckInForce (parley fingerprint's check) takes the changed weights")
	}
}

// A record must list its revisions by ascending id: an expert's current
// answer is their revision with the highest id, and an import that
// numbers the rows anew numbers them in the list's order, which the chain
// does not cover. A record with an expert's two answers swapped in the
// list had read, and imported beside its own workshop (its ids taken),
// made the earlier answer the expert's current one.
func TestReorderedRevisionsAreRefused(t *testing.T) {
	ctx := context.Background()
	db := newDB(t)
	p := seed(t, db)
	for _, best := range []float64{0.2, 0.3} {
		rv := workshop.Revision{QuestionID: p.qs[0].ID, ExpertID: p.experts[0].ID,
			Answer: workshop.Answer{Values: []float64{best / 2, best, best + 0.3}}}
		must(t, db.SaveRevision(ctx, &rv))
	}
	var doc map[string]any
	must(t, json.Unmarshal(exportJSON(t, db, p.w.ID), &doc))
	revs := doc["revisions"].([]any)
	revs[0], revs[1] = revs[1], revs[0]
	b, rec := chainIntact(t, doc, "the reordered record", "the list's order is not chained")
	var ie *elicit.InputError
	if _, err := record.Parse(bytes.NewReader(b)); !errors.As(err, &ie) || ie.Field != "revisions[1].id" {
		t.Errorf("the reordered record reads with %v, want revisions[1].id refused", err)
	}
	if _, err := db.Import(ctx, rec); err == nil {
		t.Error("the reordered record was imported")
	}
}

// chainIntact is the record doc, changed where the chain does not reach,
// as JSON and decoded, with its chain checked intact: what remains to
// test is that the record's other checks refuse it. what names it and
// why names the part the chain leaves out, for the failure.
func chainIntact(t *testing.T, doc map[string]any, what, why string) ([]byte, record.Record) {
	t.Helper()
	b, err := json.Marshal(doc)
	must(t, err)
	rec, err := record.Decode(bytes.NewReader(b))
	must(t, err)
	if err := rec.CheckChain(); err != nil {
		t.Fatalf("%s's chain: %v (%s)", what, err, why)
	}
	return b, rec
}

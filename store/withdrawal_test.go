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

// countRows counts a table's rows and the workshop's events, to show a
// refusal saved nothing.
func countRows(t *testing.T, db *DB, workshopID int64) (withdrawals, events int) {
	t.Helper()
	must(t, db.r.QueryRow(`SELECT COUNT(*) FROM withdrawals`).Scan(&withdrawals))
	return withdrawals, len(mustEvents(t, db, workshopID))
}

// A withdrawn revision stays in the workshop's revisions, marked, and
// leaves the narrower reads: the expert's earlier answer is current
// again, and an expert with no other drops out of the question's latest
// answers. The withdrawal and its event are one write.
func TestWithdrawRevision(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	q := p.qs[0]
	save := func(e int, median float64) workshop.Revision {
		rv := workshop.Revision{QuestionID: q.ID, ExpertID: p.experts[e].ID, Answer: quantileAnswer(median)}
		must(t, db.SaveRevision(ctx, &rv))
		return rv
	}
	a1, a2, b1 := save(0, 0.3), save(0, 0.6), save(1, 0.4)

	must(t, db.WithdrawRevision(ctx, p.w.ID, a2.ID, "entered against Ada instead of Chidi"))
	latest, err := db.LatestRevisions(ctx, q.ID, 1)
	if err != nil || len(latest) != 2 || latest[0].ID != a1.ID || latest[1].ID != b1.ID {
		t.Fatalf("latest after the withdrawal: %+v, %v; want Ada's first answer and Bela's", latest, err)
	}
	own, _ := db.QuestionExpertRevisions(ctx, q.ID, p.experts[0].ID)
	if len(own) != 1 || own[0].ID != a1.ID {
		t.Fatalf("Ada's own revisions %+v, want only her first", own)
	}
	// The facilitator's read of one expert keeps it, marked.
	if hist, err := db.ExpertHistory(ctx, p.experts[0].ID); err != nil || len(hist) != 2 || hist[0].ID != a1.ID || hist[0].Withdrawn ||
		hist[1].ID != a2.ID || !hist[1].Withdrawn {
		t.Fatalf("Ada's history %+v, %v; want both, the second marked withdrawn", hist, err)
	}
	all, _ := db.Revisions(ctx, p.w.ID)
	if len(all) != 3 || all[0].Withdrawn || !all[1].Withdrawn || all[2].Withdrawn {
		t.Fatalf("the workshop's revisions %+v, want the second marked withdrawn", all)
	}
	if cur := workshop.Current(all, nil); cur[workshop.Key{Question: q.ID, Expert: p.experts[0].ID}].ID != a1.ID {
		t.Fatalf("Current from the store's revisions: %+v", cur)
	}
	ev := lastEvent(t, db, p.w.ID)
	var d workshop.Withdrawal
	must(t, json.Unmarshal([]byte(ev.Detail), &d))
	if ev.Kind != workshop.EventRevisionWithdrawn || ev.QuestionID != q.ID || ev.Reason != "entered against Ada instead of Chidi" ||
		d != (workshop.Withdrawal{RevisionID: a2.ID, ExpertID: p.experts[0].ID, Round: 1}) {
		t.Fatalf("withdrawal event %+v", ev)
	}

	must(t, db.WithdrawRevision(ctx, p.w.ID, b1.ID, "Bela asked to take it back"))
	if latest, _ := db.LatestRevisions(ctx, q.ID, 1); len(latest) != 1 || latest[0].ID != a1.ID {
		t.Fatalf("latest after Bela's only answer was withdrawn: %+v", latest)
	}
}

// Refused, each naming its field and rule and saving nothing: an empty
// reason, a revision withdrawn already, one of another workshop, one of
// a calibration question whose true value was shown, and any in an
// archived workshop.
func TestWithdrawalRefusals(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	other := seed(t, db)
	rv := workshop.Revision{QuestionID: p.qs[0].ID, ExpertID: p.experts[0].ID, Answer: quantileAnswer(0.3)}
	must(t, db.SaveRevision(ctx, &rv))
	seedAnswer := workshop.Revision{QuestionID: p.qs[1].ID, ExpertID: p.experts[0].ID,
		Answer: workshop.Answer{Lowest: 0.1, Highest: 0.5, Best: 0.25, Confidence: 0.8}}
	must(t, db.SaveRevision(ctx, &seedAnswer))
	must(t, db.SetTrueValue(ctx, p.qs[1].ID, 0.3, true, "shown to the room"))
	gone := workshop.Revision{QuestionID: p.qs[0].ID, ExpertID: p.experts[1].ID, Answer: quantileAnswer(0.4)}
	must(t, db.SaveRevision(ctx, &gone))
	must(t, db.WithdrawRevision(ctx, p.w.ID, gone.ID, "typed on the wrong row"))

	refused := func(name string, workshopID, revisionID int64, reason, field string, rule elicit.Rule) {
		t.Helper()
		rows, events := countRows(t, db, p.w.ID)
		err := db.WithdrawRevision(ctx, workshopID, revisionID, reason)
		var ie *elicit.InputError
		if rule == "" {
			if !errors.Is(err, workshop.ErrNotFound) {
				t.Errorf("%s: %v, want not found", name, err)
			}
		} else if !errors.As(err, &ie) || ie.Field != field || ie.Rule != rule {
			t.Errorf("%s: %v, want field %q, rule %q", name, err, field, rule)
		}
		if r2, e2 := countRows(t, db, p.w.ID); r2 != rows || e2 != events {
			t.Errorf("%s saved something: %d withdrawals, %d events, were %d, %d", name, r2, e2, rows, events)
		}
	}
	refused("no reason", p.w.ID, rv.ID, "", "reason", elicit.RuleRequired)
	refused("twice", p.w.ID, gone.ID, "again", "revision", workshop.RuleNothingChanged)
	refused("another workshop's", other.w.ID, rv.ID, "wrong workshop", "", "")
	refused("revealed", p.w.ID, seedAnswer.ID, "wrong expert", "revision", workshop.RuleScoredAtReveal)
	must(t, db.SetArchived(ctx, p.w.ID, true, "finished"))
	refused("archived", p.w.ID, rv.ID, "wrong expert", "action", workshop.RuleArchived)
}

// The withdrawals table is append-only: no row changed, removed or
// written over, and no second withdrawal of one revision.
func TestWithdrawalsAreAppendOnly(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	rv := workshop.Revision{QuestionID: p.qs[0].ID, ExpertID: p.experts[0].ID, Answer: quantileAnswer(0.3)}
	must(t, db.SaveRevision(ctx, &rv))
	must(t, db.WithdrawRevision(ctx, p.w.ID, rv.ID, "wrong expert"))
	for _, stmt := range []string{
		`UPDATE withdrawals SET reason = 'something else'`,
		`DELETE FROM withdrawals`,
		`REPLACE INTO withdrawals (id, revision_id, reason, at) SELECT id, revision_id, 'rewritten', at FROM withdrawals`,
		`INSERT INTO withdrawals (revision_id, reason, at) SELECT revision_id, 'again', at FROM withdrawals`,
		`INSERT INTO withdrawals (revision_id, reason, at) VALUES (` + itoa(rv.ID) + `, '', '2026-01-01T00:00:00Z')`,
	} {
		if _, err := db.w.ExecContext(ctx, stmt); err == nil {
			t.Errorf("%s: allowed", stmt)
		}
	}
	var reason string
	must(t, db.r.QueryRow(`SELECT reason FROM withdrawals`).Scan(&reason))
	if reason != "wrong expert" {
		t.Fatalf("the withdrawal's reason became %q", reason)
	}
}

// A withdrawal goes with the record: exported, imported into a new
// database and exported again, the record is the same, its fingerprint
// too, and the copy's revision is still withdrawn with its reason. A
// record whose withdrawn flag was removed, or whose withdrawal event was
// removed, is refused.
func TestWithdrawalRoundTrip(t *testing.T) {
	ctx := context.Background()
	src := newDB(t)
	p := seed(t, src)
	keep := workshop.Revision{QuestionID: p.qs[0].ID, ExpertID: p.experts[0].ID, Answer: quantileAnswer(0.3)}
	must(t, src.SaveRevision(ctx, &keep))
	wrong := workshop.Revision{QuestionID: p.qs[0].ID, ExpertID: p.experts[0].ID, Answer: quantileAnswer(0.6)}
	must(t, src.SaveRevision(ctx, &wrong))
	must(t, src.WithdrawRevision(ctx, p.w.ID, wrong.ID, "Chidi's answer, entered against Ada"))
	first, dst, id := exportImported(t, src, p.w.ID)
	if !bytes.Contains(first, []byte(`"withdrawn": true`)) {
		t.Fatalf("the export does not mark the withdrawn revision:\n%s", first)
	}
	rec, err := record.Parse(bytes.NewReader(first))
	if err != nil {
		t.Fatal(err)
	}
	latest, _ := dst.LatestRevisions(ctx, p.qs[0].ID, 1)
	if len(latest) != 1 || latest[0].ID != keep.ID {
		t.Fatalf("the copy's current answers %+v, want revision %d", latest, keep.ID)
	}
	var reason string
	must(t, dst.r.QueryRow(`SELECT reason FROM withdrawals WHERE revision_id = ?`, wrong.ID).Scan(&reason))
	if reason != "Chidi's answer, entered against Ada" {
		t.Fatalf("the copy's withdrawal reason %q", reason)
	}

	// Imported again beside the original, every row numbered anew: the
	// copy's withdrawal names the copy's own revision.
	again, err := src.Import(ctx, rec)
	if err != nil {
		t.Fatal(err)
	}
	copyRec, err := src.Record(ctx, again, exportTime)
	if err != nil {
		t.Fatal(err)
	}
	var copied []int64
	for _, rv := range copyRec.Revisions {
		if rv.Withdrawn {
			copied = append(copied, rv.ID)
		}
	}
	if len(copied) != 1 || copied[0] == wrong.ID {
		t.Fatalf("the renumbered copy's withdrawn revisions %v (the original's %d)", copied, wrong.ID)
	}
	if _, err := record.Parse(bytes.NewReader(exportJSON(t, src, again))); err != nil {
		t.Fatalf("the renumbered copy's record: %v", err)
	}
	copyLatest, _ := src.LatestRevisions(ctx, copyRec.Questions[0].ID, 1)
	if len(copyLatest) != 1 || copyLatest[0].ID == copied[0] {
		t.Fatalf("the renumbered copy's current answers %+v", copyLatest)
	}

	// The withdrawal's row removed in SQLite behind the triggers: the
	// export still carries its event, and is refused naming the flag.
	for _, stmt := range []string{`DROP TRIGGER withdrawals_no_delete`, `DELETE FROM withdrawals`} {
		if _, err := dst.w.ExecContext(ctx, stmt); err != nil {
			t.Fatal(err)
		}
	}
	if _, err := record.Parse(bytes.NewReader(exportJSON(t, dst, id))); err == nil || !strings.Contains(err.Error(), ".withdrawn") {
		t.Fatalf("a record exported after its withdrawal row was deleted: %v", err)
	}

	// The flag removed: the revision's events still withdraw it.
	unmarked := bytes.Replace(first, []byte(`"withdrawn": true`), []byte(`"withdrawn": false`), 1)
	if _, err := record.Parse(bytes.NewReader(unmarked)); err == nil || !strings.Contains(err.Error(), ".withdrawn") {
		t.Fatalf("a record with the withdrawn flag removed: %v", err)
	}
	// The event removed: the chain no longer matches.
	var raw map[string]any
	must(t, json.Unmarshal(first, &raw))
	evs := raw["events"].([]any)
	kept := evs[:0]
	for _, e := range evs {
		if e.(map[string]any)["kind"] != string(workshop.EventRevisionWithdrawn) {
			kept = append(kept, e)
		}
	}
	raw["events"] = kept
	for _, rv := range raw["revisions"].([]any) {
		delete(rv.(map[string]any), "withdrawn")
	}
	noEvent, _ := json.Marshal(raw)
	var ie *elicit.InputError
	if _, err := record.Parse(bytes.NewReader(noEvent)); !errors.As(err, &ie) || ie.Rule != record.RuleChainMismatch {
		t.Fatalf("a record with the withdrawal's event removed: %v, want the chain refused", err)
	}
}

package store

import (
	"context"
	"errors"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// A record written on a machine whose clock ran ahead (or imported on
// one whose clock is behind) has facts dated after the importing clock.
// Imported, they pinned every stamp of the workshop after them (stamp
// stamps after a workshop's latest fact), silently, until the clock
// caught up. Import refuses a fact dated more than record.MaxAhead after
// its clock, naming the fact, both times and the rule, and writes
// nothing; within the tolerance it imports.
func TestImportRefusesFactsDatedAheadOfTheClock(t *testing.T) {
	ctx := context.Background()
	src, err := Open(filepath.Join(t.TempDir(), "written.db"))
	must(t, err)
	defer src.Close()
	t0 := time.Date(2026, 6, 1, 9, 0, 0, 0, time.UTC)
	setClock(t, func() time.Time { return t0.Add(-72 * time.Hour) })
	p := seed(t, src)
	setClock(t, func() time.Time { return t0 })
	r := workshop.Revision{QuestionID: p.qs[0].ID, ExpertID: p.experts[0].ID, Answer: quantileAnswer(0.3)}
	must(t, src.SaveRevision(ctx, &r))
	rec, err := src.Record(ctx, p.w.ID, t0)
	must(t, err)

	into, err := Open(filepath.Join(t.TempDir(), "importing.db"))
	must(t, err)
	defer into.Close()
	// The importing clock reads two days before the save: the workshop's
	// creation, a day before that clock, passes; the save does not.
	behind := t0.Add(-48 * time.Hour)
	setClock(t, func() time.Time { return behind })
	_, err = into.Import(ctx, rec)
	var ie *elicit.InputError
	if !errors.As(err, &ie) || ie.Rule != record.RuleAheadOfClock || ie.Field != "revisions[0].at" {
		t.Fatalf("import of a save dated two days ahead: %v; want %q at revisions[0].at", err, record.RuleAheadOfClock)
	}
	for _, want := range []string{"revision 1, of question 1 in round 1", "2026-06-01 09:00:00 UTC", "48h0m0s", "2026-05-30 09:00:00 UTC"} {
		if !strings.Contains(err.Error(), want) {
			t.Errorf("the refusal %q does not say %q", err, want)
		}
	}
	if ws, err := into.Workshops(ctx); err != nil || len(ws) != 0 {
		t.Fatalf("a refused import left %d workshops (%v)", len(ws), err)
	}

	// An event (round closed) dated ahead is named by its kind and round.
	setClock(t, func() time.Time { return t0.Add(time.Hour) })
	must(t, src.SetRound(ctx, p.w.ID, 1, false, "end of round 1"))
	rec, err = src.Record(ctx, p.w.ID, t0)
	must(t, err)
	setClock(t, func() time.Time { return t0.Add(-23*time.Hour - time.Minute) })
	_, err = into.Import(ctx, rec)
	if !errors.As(err, &ie) || ie.Rule != record.RuleAheadOfClock || !strings.HasPrefix(ie.Field, "events[") ||
		!strings.Contains(ie.Detail, "round_closed of round 1") {
		t.Fatalf("import of a close dated 24 h 1 min ahead: %v; want %q naming the round_closed event", err, record.RuleAheadOfClock)
	}

	// Within the tolerance (a clock 23 hours behind) the record imports.
	setClock(t, func() time.Time { return t0.Add(-22 * time.Hour) })
	if _, err := into.Import(ctx, rec); err != nil {
		t.Fatalf("a record dated 23 hours ahead of the clock: %v", err)
	}
}

// The times a record keeps beside its facts obey the same rule: an
// expert's addition (experts[i].created) and a true value's reveal
// (questions[i].revealed_at), which the chain does not cover, are what a
// reader of the imported workshop takes as when the panel was formed and
// the truth shown. The record's generated_at, when it was written, is
// not: the import keeps nothing of it, and a record written on a
// machine whose clock then ran ahead is still a true record.
func TestImportRefusesAnAdditionOrARevealDatedAheadOfTheClock(t *testing.T) {
	ctx := context.Background()
	src, err := Open(filepath.Join(t.TempDir(), "written.db"))
	must(t, err)
	defer src.Close()
	t0 := time.Date(2026, 6, 1, 9, 0, 0, 0, time.UTC)
	setClock(t, func() time.Time { return t0 })
	p := seed(t, src)
	must(t, src.SetTrueValue(ctx, p.qs[1].ID, 0.3, true, "seed revealed"))
	rec, err := src.Record(ctx, p.w.ID, t0)
	must(t, err)
	into, err := Open(filepath.Join(t.TempDir(), "importing.db"))
	must(t, err)
	defer into.Close()
	ahead := t0.Add(72 * time.Hour)

	refused := func(r record.Record, field, what string) {
		t.Helper()
		_, err := into.Import(ctx, r)
		var ie *elicit.InputError
		if !errors.As(err, &ie) || ie.Rule != record.RuleAheadOfClock || ie.Field != field {
			t.Fatalf("import with %s three days ahead: %v; want %q at %s", field, err, record.RuleAheadOfClock, field)
		}
		for _, want := range []string{what + ": dated 2026-06-04 09:00:00 UTC", "72h0m0s after this machine's clock",
			"which reads 2026-06-01 09:00:00 UTC"} {
			if !strings.Contains(ie.Detail, want) {
				t.Errorf("the refusal %q does not say %q", ie.Detail, want)
			}
		}
		if ws, err := into.Workshops(ctx); err != nil || len(ws) != 0 {
			t.Fatalf("a refused import left %d workshops (%v)", len(ws), err)
		}
	}

	// An expert's created time, set ahead by hand or by a wrong clock;
	// the chain does not hash it.
	added := rec
	added.Experts = append([]workshop.Expert{}, rec.Experts...)
	added.Experts[1].Created = ahead
	refused(added, "experts[1].created", "expert 2's addition to the panel")

	// A reveal from a build before the reveal's event carried its time
	// (and before the chain): the question's revealed_at stands alone.
	revealed := rec
	revealed.Chain, revealed.Fingerprint = nil, ""
	revealed.Questions = append([]record.Question{}, rec.Questions...)
	revealed.Questions[1].RevealedAt = &ahead
	revealed.Events = append([]workshop.Event{}, rec.Events...)
	for i, e := range revealed.Events {
		if e.Kind == workshop.EventTruthRevealed {
			revealed.Events[i].Detail = `{"true_value":0.3}`
		}
	}
	refused(revealed, "questions[1].revealed_at", "the reveal of question 2's true value")

	// Written by a machine whose clock ran three days ahead when it wrote
	// the record, but not when the facts were written: it imports.
	late := rec
	late.Generated = ahead
	if _, err := into.Import(ctx, late); err != nil {
		t.Fatalf("a record with generated_at three days ahead of the clock: %v", err)
	}
}

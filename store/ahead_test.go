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

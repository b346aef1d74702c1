package store

import (
	"bytes"
	"context"
	"fmt"
	"log/slog"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/fingerprint"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// setClock makes the store's clock read what at returns until the test
// ends.
func setClock(t *testing.T, at func() time.Time) {
	t.Helper()
	clock = at
	t.Cleanup(func() { clock = time.Now })
}

// A server clock set back (by hand, or by a time service correcting it)
// stamped the facts written after it before those already written. The
// fingerprint's chain orders facts by time, so a save made in round 2
// was chained before round 1's close and the value the room had noted at
// that close changed; and the exported record's save fell before the
// round it was saved in, which record.CheckRounds, and so import,
// refused. A workshop's facts are now stamped after its latest one,
// whatever the clock says, also after the server is started again and
// for a workshop whose latest time is not yet kept (written before
// fact_clock).
func TestAClockSetBackStampsAfterTheLatestFact(t *testing.T) {
	ctx := context.Background()
	path := filepath.Join(t.TempDir(), "parley.db")
	db, err := Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer func() { db.Close() }()
	t0 := time.Now().UTC().Round(time.Microsecond)
	setClock(t, func() time.Time { return t0 })
	p := seed(t, db)
	q, ws := p.qs[0].ID, p.w.ID
	r1 := workshop.Revision{QuestionID: q, ExpertID: p.experts[0].ID, Answer: quantileAnswer(0.3)}
	must(t, db.SaveRevision(ctx, &r1))
	setClock(t, func() time.Time { return t0.Add(time.Second) })
	must(t, db.SetRound(ctx, ws, 1, false, "end of round 1"))
	closeValue := func() (fingerprint.Value, time.Time) {
		t.Helper()
		rec, err := db.Record(ctx, ws, time.Now())
		if err != nil {
			t.Fatal(err)
		}
		if err := rec.CheckRounds(); err != nil {
			t.Fatalf("the record's saves and rounds disagree: %v", err)
		}
		l, ok := fingerprint.Of(rec.Facts()).LastClose(1)
		if !ok {
			t.Fatal("no close of round 1 in the chain")
		}
		return l.Value, l.At
	}
	noted, closedAt := closeValue()

	// The clock goes back an hour; round 2 opens and an answer is saved.
	setClock(t, func() time.Time { return t0.Add(-time.Hour) })
	must(t, db.SetRound(ctx, ws, 2, true, "round 2"))
	r2 := workshop.Revision{QuestionID: q, ExpertID: p.experts[1].ID, Answer: quantileAnswer(0.4)}
	must(t, db.SaveRevision(ctx, &r2))
	if !r2.At.After(closedAt) {
		t.Fatalf("a save of round 2 stamped %v, not after round 1's close at %v", r2.At, closedAt)
	}
	if v, _ := closeValue(); v != noted {
		t.Fatalf("the value noted at round 1's close moved from %s to %s", noted.Short(), v.Short())
	}

	// Started again with the clock still behind: the kept latest holds.
	db.Close()
	if db, err = Open(path); err != nil {
		t.Fatal(err)
	}
	w := workshop.Weights{WorkshopID: ws, Scheme: workshop.WeightsEqual, Reason: "equal"}
	must(t, db.SetWeights(ctx, &w))
	if !w.At.After(r2.At) {
		t.Fatalf("weights set after a restart stamped %v, not after the save at %v", w.At, r2.At)
	}

	// A workshop whose latest time is not kept takes it from its facts.
	if _, err := db.w.ExecContext(ctx, `DELETE FROM fact_clock`); err != nil {
		t.Fatal(err)
	}
	ap := workshop.AgreedPrior{QuestionID: q, Source: workshop.PriorFromPool,
		Dist: elicit.Unit(elicit.Beta{Alpha: 4, Beta: 9}), Rationale: "the pool", RoundOpen: true}
	must(t, db.AgreePrior(ctx, &ap))
	if !ap.At.After(w.At) {
		t.Fatalf("a prior agreed with no kept latest stamped %v, not after the weights at %v", ap.At, w.At)
	}
	if v, _ := closeValue(); v != noted {
		t.Fatalf("the value noted at round 1's close moved from %s to %s", noted.Short(), v.Short())
	}

	// Once the clock passes the latest fact, facts carry its time again.
	later := t0.Add(time.Hour)
	setClock(t, func() time.Time { return later })
	r3 := workshop.Revision{QuestionID: q, ExpertID: p.experts[2].ID, Answer: quantileAnswer(0.35)}
	must(t, db.SaveRevision(ctx, &r3))
	if !r3.At.Equal(later) {
		t.Fatalf("with the clock ahead again a save is stamped %v, want the clock's %v", r3.At, later)
	}
}

// While the clock is behind a workshop's latest fact, its facts are
// stamped after that fact, not at the clock's time: silently, so a wrong
// clock (this one set back, or an imported record's ahead) went unseen.
// A stamp pushed more than a minute past the clock logs one warning for
// the workshop, naming it and both times; a push within the minute (a
// time service's step) logs none, nor does another workshop whose stamps
// keep to the clock; once the clock has caught up, falling behind again
// warns again.
func TestStampsAheadOfTheClockAreWarnedOfOncePerWorkshop(t *testing.T) {
	ctx := context.Background()
	db, err := Open(filepath.Join(t.TempDir(), "parley.db"))
	must(t, err)
	defer db.Close()
	var logs bytes.Buffer
	db.SetLogger(slog.New(slog.NewTextHandler(&logs, nil)))
	warnings := func() []string {
		var ws []string
		for _, l := range strings.Split(strings.TrimSpace(logs.String()), "\n") {
			if strings.Contains(l, "level=WARN") {
				ws = append(ws, l)
			}
		}
		return ws
	}
	t0 := time.Date(2026, 6, 1, 9, 0, 0, 0, time.UTC)
	at := t0
	setClock(t, func() time.Time { return at })
	p := seed(t, db)
	q, ws := p.qs[0].ID, p.w.ID
	save := func(expert int) workshop.Revision {
		t.Helper()
		r := workshop.Revision{QuestionID: q, ExpertID: p.experts[expert].ID, Answer: quantileAnswer(0.3)}
		must(t, db.SaveRevision(ctx, &r))
		return r
	}
	save(0)

	at = t0.Add(-30 * time.Second) // a time service's step back
	save(1)
	if w := warnings(); len(w) != 0 {
		t.Fatalf("stamps 30 s ahead of the clock warned: %q", w)
	}

	at = t0.Add(-2 * time.Hour) // the clock set back two hours
	save(2)
	save(0)
	must(t, db.SetWeights(ctx, &workshop.Weights{WorkshopID: ws, Scheme: workshop.WeightsEqual, Reason: "equal"}))
	other := seed(t, db) // a workshop of its own keeps to the clock
	r := workshop.Revision{QuestionID: other.qs[0].ID, ExpertID: other.experts[0].ID, Answer: quantileAnswer(0.3)}
	must(t, db.SaveRevision(ctx, &r))
	w := warnings()
	if len(w) != 1 {
		t.Fatalf("%d warnings after three writes two hours ahead of the clock, want 1:\n%s", len(w), logs.String())
	}
	for _, want := range []string{fmt.Sprintf("workshop=%d", ws), `title="Pump seal failures (invented)"`,
		"latest_fact=2026-06-01T09:00:00.0000", "clock=2026-06-01T07:00:00Z", "ahead=2h0m0s", "check this machine's clock"} {
		if !strings.Contains(w[0], want) {
			t.Errorf("the warning does not say %q:\n%s", want, w[0])
		}
	}

	at = t0.Add(time.Hour) // the clock caught up, then set back again
	save(1)
	at = t0
	save(2)
	if w := warnings(); len(w) != 2 || !strings.Contains(w[1], "latest_fact=2026-06-01T10:00:00Z") {
		t.Fatalf("falling behind again after catching up: %d warnings, want 2:\n%s", len(w), logs.String())
	}
}

// A database below the schema version that made fact_clock (only the
// migration tests write into one with today's code) is stamped by the
// clock alone, as it was at those versions; stamp told it by the error's
// text, "no such table: fact_clock", which a driver's wording may
// change, and which a fact_clock removed by hand from a database of the
// latest version gave too: that database's facts were then stamped by the
// clock alone, silently, before facts already written. The schema's
// version tells them apart: below fact_clock's, the clock stamps; once
// the same database is migrated, its facts are stamped after the latest;
// at that version without the table, the write fails and nothing is
// written.
func TestStampAtTheSchemaBeforeFactClock(t *testing.T) {
	ctx := context.Background()
	ms, err := loadMigrations()
	must(t, err)
	if n := ms[factClockVersion-1].name; n != "0015_fact_clock.sql" {
		t.Fatalf("migration %d is %s, not the one that makes fact_clock", factClockVersion, n)
	}
	path := filepath.Join(t.TempDir(), "old.db")
	db, err := open(path)
	must(t, err)
	defer func() { db.Close() }()
	must(t, db.MigrateTo(ctx, factClockVersion-1))
	t0 := time.Date(2026, 6, 1, 9, 0, 0, 0, time.UTC)
	setClock(t, func() time.Time { return t0 })
	w := workshop.Workshop{Title: "Written before fact_clock (invented)"}
	must(t, db.CreateWorkshop(ctx, &w))
	set := func() workshop.Weights {
		t.Helper()
		ws := workshop.Weights{WorkshopID: w.ID, Scheme: workshop.WeightsEqual, Reason: "equal"}
		must(t, db.SetWeights(ctx, &ws))
		return ws
	}
	set()
	setClock(t, func() time.Time { return t0.Add(-time.Hour) })
	if got := set(); !got.At.Equal(t0.Add(-time.Hour)) {
		t.Fatalf("below fact_clock's version weights are stamped %v, want the clock's %v", got.At, t0.Add(-time.Hour))
	}

	// The same database, migrated: stamped after its latest fact.
	must(t, db.Migrate(ctx))
	if got := set(); !got.At.Equal(t0.Add(time.Microsecond)) {
		t.Fatalf("after the upgrade weights are stamped %v, want just after the latest fact at %v", got.At, t0)
	}

	// fact_clock removed from a database of the latest version.
	n := len(mustWeights(t, db, w.ID))
	if _, err := db.w.ExecContext(ctx, `DROP TABLE fact_clock`); err != nil {
		t.Fatal(err)
	}
	for _, reopen := range []bool{false, true} {
		if reopen {
			db.Close()
			if db, err = Open(path); err != nil {
				t.Fatal(err)
			}
		}
		err := db.SetWeights(ctx, &workshop.Weights{WorkshopID: w.ID, Scheme: workshop.WeightsEqual, Reason: "equal"})
		if err == nil || !strings.Contains(err.Error(), "fact_clock") {
			t.Fatalf("a write without fact_clock at the latest version (reopened %v): %v; want it refused", reopen, err)
		}
		if got := len(mustWeights(t, db, w.ID)); got != n {
			t.Fatalf("a refused write left %d weight sets, want %d", got, n)
		}
	}
}

// mustWeights is workshop ws's history of weight sets.
func mustWeights(t *testing.T, db *DB, ws int64) []workshop.Weights {
	t.Helper()
	h, err := db.WeightHistory(context.Background(), ws)
	must(t, err)
	return h
}

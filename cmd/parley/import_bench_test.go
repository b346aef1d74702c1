package main

import (
	"context"
	"fmt"
	"path/filepath"
	"strconv"
	"syscall"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/store"
)

// BenchmarkImportCommand is `parley import` of a long workshop's record
// (40 experts × 30 questions × 4 rounds: 4,800 revisions with reasons)
// into a new database: reading, checking (a fresh fit of every
// revision, once) and writing it.
//
//	go test ./cmd/parley -run '^$' -bench ImportCommand -benchtime 3x
func BenchmarkImportCommand(b *testing.B) {
	dir := b.TempDir()
	src := filepath.Join(dir, "source.db")
	db, err := store.Open(src)
	if err != nil {
		b.Fatal(err)
	}
	ctx := context.Background()
	w := workshop.Workshop{Title: "Culvert blockages (invented)", Invented: true}
	bench(b, db.CreateWorkshop(ctx, &w))
	var qs []workshop.Question
	for i := range 30 {
		q := workshop.Question{WorkshopID: w.ID, Wording: fmt.Sprintf("Invented question %d: share blocked?", i+1),
			Quantity: "blocked share", Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95}}
		bench(b, db.AddQuestion(ctx, &q))
		qs = append(qs, q)
	}
	var es []workshop.Expert
	for i := range 40 {
		e := workshop.Expert{WorkshopID: w.ID, Name: fmt.Sprintf("Expert %d (invented)", i+1)}
		bench(b, db.AddExpert(ctx, &e, fmt.Appendf(nil, "token-%d", i)))
		es = append(es, e)
	}
	for round := 1; round <= 4; round++ {
		if round > 1 {
			bench(b, db.SetRound(ctx, w.ID, round, true, "Invented: the panel revises"))
		}
		var revs []workshop.Revision
		for ei, e := range es {
			for qi, q := range qs {
				m := 0.1 + 0.6*float64((ei*7+qi*3+round)%20)/20
				rv := workshop.Revision{QuestionID: q.ID, ExpertID: e.ID, Reason: "Invented: inspection logs and storm records.",
					Answer: workshop.Answer{Values: []float64{m * 0.5, m, m + (1-m)*0.4}}}
				f, err := q.Fit(rv.Answer)
				bench(b, err)
				rv.Kept = &f
				revs = append(revs, rv)
			}
		}
		bench(b, db.SaveRevisions(ctx, revs))
		bench(b, db.SetRound(ctx, w.ID, round, false, ""))
	}
	bench(b, db.Close())
	doc := filepath.Join(dir, "record.json")
	if code, _, errs := run("export", "--db", src, "--workshop", strconv.FormatInt(w.ID, 10), "--out", doc); code != 0 {
		b.Fatalf("export: %d %s", code, errs)
	}
	n := 0
	before := cpuTime()
	for b.Loop() {
		n++
		if code, _, errs := run("import", "--db", filepath.Join(dir, fmt.Sprintf("imported-%d.db", n)), "--in", doc); code != 0 {
			b.Fatalf("import: %d %s", code, errs)
		}
	}
	// The process's CPU per import: on a shared machine the wall time
	// also counts the other sessions' work.
	b.ReportMetric((cpuTime()-before).Seconds()/float64(n), "cpu-s/op")
}

// cpuTime is the CPU time (user and system) this process has used.
func cpuTime() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

func bench(b *testing.B, err error) {
	b.Helper()
	if err != nil {
		b.Fatal(err)
	}
}

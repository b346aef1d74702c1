package store

import (
	"context"
	"path/filepath"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

func benchPanel(b *testing.B) (*DB, panel) {
	db, err := Open(filepath.Join(b.TempDir(), "bench.db"))
	if err != nil {
		b.Fatal(err)
	}
	b.Cleanup(func() { db.Close() })
	return db, seed(b, db)
}

// BenchmarkSaveRevision is one acknowledged save: an IMMEDIATE transaction
// with its checks and a synchronous (FULL) commit.
func BenchmarkSaveRevision(b *testing.B) {
	db, p := benchPanel(b)
	ctx := context.Background()
	for b.Loop() {
		r := workshop.Revision{QuestionID: p.qs[0].ID, ExpertID: p.experts[0].ID, Answer: quantileAnswer(0.3)}
		if err := db.SaveRevision(ctx, &r); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkSaveRevisionParallel is saves from many goroutines queueing on
// the single writer.
func BenchmarkSaveRevisionParallel(b *testing.B) {
	db, p := benchPanel(b)
	ctx := context.Background()
	b.SetParallelism(8)
	b.RunParallel(func(pb *testing.PB) {
		for pb.Next() {
			r := workshop.Revision{QuestionID: p.qs[0].ID, ExpertID: p.experts[1].ID, Answer: quantileAnswer(0.3)}
			if err := db.SaveRevision(ctx, &r); err != nil {
				b.Error(err)
				return
			}
		}
	})
}

// BenchmarkRevisions reads a workshop's whole record of revisions.
func BenchmarkRevisions(b *testing.B) {
	db, p := benchPanel(b)
	ctx := context.Background()
	for range 500 {
		r := workshop.Revision{QuestionID: p.qs[0].ID, ExpertID: p.experts[2].ID, Answer: quantileAnswer(0.3)}
		if err := db.SaveRevision(ctx, &r); err != nil {
			b.Fatal(err)
		}
	}
	for b.Loop() {
		if _, err := db.Revisions(ctx, p.w.ID); err != nil {
			b.Fatal(err)
		}
	}
}

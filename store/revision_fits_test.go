package store

import (
	"context"
	"reflect"
	"strings"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// A revision's fit is kept with it when it is saved, read back exactly,
// and never changed; revisions saved without one are fitted once by
// KeepMissingFits, which keeps nothing twice (issue 16).
func TestKeptFits(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	q := p.qs[0]
	fit, err := q.Fit(quantileAnswer(0.3))
	if err != nil {
		t.Fatal(err)
	}
	with := workshop.Revision{QuestionID: q.ID, ExpertID: p.experts[0].ID, Answer: quantileAnswer(0.3), Kept: &fit}
	without := workshop.Revision{QuestionID: q.ID, ExpertID: p.experts[1].ID, Answer: quantileAnswer(0.25)}
	for _, r := range []*workshop.Revision{&with, &without} {
		if err := db.SaveRevision(ctx, r); err != nil {
			t.Fatal(err)
		}
	}
	rs, err := db.Revisions(ctx, p.w.ID)
	if err != nil || len(rs) != 2 {
		t.Fatalf("revisions %d, %v", len(rs), err)
	}
	if rs[0].Kept == nil || !reflect.DeepEqual(*rs[0].Kept, fit) {
		t.Fatalf("kept fit read back as %+v, want %+v", rs[0].Kept, fit)
	}
	if rs[1].Kept != nil {
		t.Fatalf("a revision saved without a fit reads back with one: %+v", rs[1].Kept)
	}
	// The narrower reads carry it too.
	if mine, _ := db.QuestionExpertRevisions(ctx, q.ID, p.experts[0].ID); len(mine) != 1 || mine[0].Kept == nil {
		t.Fatalf("QuestionExpertRevisions: %+v", mine)
	}

	calls := 0
	fitter := func(q workshop.Question, a workshop.Answer) (elicit.Fit, error) {
		calls++
		return q.Fit(a)
	}
	n, err := db.KeepMissingFits(ctx, fitter)
	if err != nil || n != 1 || calls != 1 {
		t.Fatalf("KeepMissingFits kept %d with %d fits, %v; want 1 and 1", n, calls, err)
	}
	rs, _ = db.Revisions(ctx, p.w.ID)
	want, _ := q.Fit(quantileAnswer(0.25))
	if rs[1].Kept == nil || !reflect.DeepEqual(*rs[1].Kept, want) {
		t.Fatalf("the missing fit was kept as %+v, want %+v", rs[1].Kept, want)
	}
	if n, err := db.KeepMissingFits(ctx, fitter); err != nil || n != 0 || calls != 1 {
		t.Fatalf("a second KeepMissingFits kept %d (%d fits), %v; want nothing", n, calls, err)
	}
	for _, stmt := range []string{`UPDATE revision_fits SET fit = '{}'`, `DELETE FROM revision_fits`} {
		if _, err := db.w.ExecContext(ctx, stmt); err == nil || !strings.Contains(err.Error(), "append-only") {
			t.Errorf("%s: %v, want the append-only trigger to abort it", stmt, err)
		}
	}
}

// An imported record's revisions keep their (checked) fits.
func TestImportKeepsFits(t *testing.T) {
	src := newDB(t)
	ctx := context.Background()
	p := seed(t, src)
	r := workshop.Revision{QuestionID: p.qs[0].ID, ExpertID: p.experts[0].ID, Answer: quantileAnswer(0.3)}
	if err := src.SaveRevision(ctx, &r); err != nil {
		t.Fatal(err)
	}
	rec, err := src.Record(ctx, p.w.ID, time.Now())
	if err != nil {
		t.Fatal(err)
	}
	dst := newDB(t)
	id, err := dst.Import(ctx, rec)
	if err != nil {
		t.Fatal(err)
	}
	rs, _ := dst.Revisions(ctx, id)
	want, _ := p.qs[0].Fit(r.Answer)
	if len(rs) != 1 || rs[0].Kept == nil || !reflect.DeepEqual(*rs[0].Kept, want) {
		t.Fatalf("imported revisions %+v, want the fit %+v kept", rs, want)
	}
}

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

// A fit kept by an earlier version lacks the warnings this version
// derives from the fit's own points: 0.4, 0.5 and 0.9 at 10.00001, 10.1
// and 16 days on [10, 20] fit a curve whose 5% point lies 5.0e-18 above
// 10 and is written 10 (elicit.TestFitPointsBeyondDoubleAreSaid, R 4.2.2),
// but a fit kept before beyond_double existed says nothing of it, and the
// pages and the record read kept fits. It is read back with the warning.
func TestKeptFitReadsWithTheWarningsOfThisVersion(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	q := workshop.Question{WorkshopID: p.w.ID, Wording: "How many days does a gasket swap take? (invented)", Quantity: "Swap time", Units: "days",
		Lower: 10, Upper: 20, Format: workshop.FormatQuantiles, Probs: []float64{0.4, 0.5, 0.9}}
	if err := db.AddQuestion(ctx, &q); err != nil {
		t.Fatal(err)
	}
	a := workshop.Answer{Values: []float64{10.00001, 10.1, 16}}
	fit, err := q.Fit(a)
	if err != nil {
		t.Fatal(err)
	}
	old := fit
	old.Warnings = nil
	for _, w := range fit.Warnings {
		if w.Code != elicit.WarnBeyondDouble {
			old.Warnings = append(old.Warnings, w)
		}
	}
	if len(old.Warnings) == len(fit.Warnings) {
		t.Fatalf("the fit no longer warns beyond_double: %v", fit.Warnings)
	}
	r := workshop.Revision{QuestionID: q.ID, ExpertID: p.experts[0].ID, Answer: a, Kept: &old}
	if err := db.SaveRevision(ctx, &r); err != nil {
		t.Fatal(err)
	}
	rs, err := db.QuestionExpertRevisions(ctx, q.ID, p.experts[0].ID)
	if err != nil || len(rs) != 1 || rs[0].Kept == nil {
		t.Fatalf("revisions %+v, %v", rs, err)
	}
	if !reflect.DeepEqual(rs[0].Kept.Warnings, fit.Warnings) {
		t.Errorf("the kept fit reads back with warnings %v, want %v", rs[0].Kept.Warnings, fit.Warnings)
	}
}

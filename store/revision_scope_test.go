package store

import (
	"cmp"
	"context"
	"reflect"
	"slices"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// The scoped reads must return exactly the revisions that filtering the
// whole workshop's revisions would, including across two workshops and
// an expert's several revisions of a question.
func TestScopedRevisionReads(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	a, b := seed(t, db), seed(t, db)
	save := func(p panel, q, e int, median float64) {
		t.Helper()
		rv := workshop.Revision{QuestionID: p.qs[q].ID, ExpertID: p.experts[e].ID, Answer: quantileAnswer(median)}
		if q == 1 {
			rv.Answer = workshop.Answer{Lowest: 0.1, Highest: 0.5, Best: median, Confidence: 0.8}
		}
		if err := db.SaveRevision(ctx, &rv); err != nil {
			t.Fatal(err)
		}
	}
	save(a, 0, 0, 0.3)
	save(b, 0, 0, 0.4)
	save(a, 0, 1, 0.35)
	save(a, 0, 0, 0.32) // Ada revises question 0
	save(a, 1, 0, 0.25)
	save(a, 0, 2, 0.3)
	save(a, 0, 1, 0.36) // Bela revises question 0
	all, err := db.Revisions(ctx, a.w.ID)
	if err != nil {
		t.Fatal(err)
	}
	filter := func(keep func(workshop.Revision) bool) []workshop.Revision {
		var out []workshop.Revision
		for _, r := range all {
			if keep(r) {
				out = append(out, r)
			}
		}
		return out
	}
	ada, q0 := a.experts[0].ID, a.qs[0].ID

	got, err := db.ExpertRevisions(ctx, ada)
	if err != nil {
		t.Fatal(err)
	}
	if want := filter(func(r workshop.Revision) bool { return r.ExpertID == ada }); len(want) != 3 || !reflect.DeepEqual(got, want) {
		t.Errorf("ExpertRevisions = %+v, want %+v", got, want)
	}

	got, err = db.QuestionExpertRevisions(ctx, q0, ada)
	if err != nil {
		t.Fatal(err)
	}
	if want := filter(func(r workshop.Revision) bool { return r.ExpertID == ada && r.QuestionID == q0 }); len(want) != 2 || !reflect.DeepEqual(got, want) {
		t.Errorf("QuestionExpertRevisions = %+v, want %+v", got, want)
	}

	got, err = db.LatestRevisions(ctx, q0, 1)
	if err != nil {
		t.Fatal(err)
	}
	latest := map[int64]int64{}
	for _, r := range all {
		if r.QuestionID == q0 {
			latest[r.ExpertID] = r.ID
		}
	}
	want := filter(func(r workshop.Revision) bool { return r.QuestionID == q0 && latest[r.ExpertID] == r.ID })
	if len(want) != 3 || !reflect.DeepEqual(got, want) {
		t.Errorf("LatestRevisions = %+v, want %+v", got, want)
	}
	if got[0].Answer.Values[1] != 0.32 || got[2].Answer.Values[1] != 0.36 {
		t.Errorf("LatestRevisions did not pick the revisions saved last: %+v", got)
	}

	none, err := db.LatestRevisions(ctx, a.qs[1].ID+1000, 1)
	if err != nil || len(none) != 0 {
		t.Errorf("LatestRevisions of an unknown question = %v, %v; want none", none, err)
	}

	// Round 2: Ada revises question 0 again. Read through round 1, the
	// panel stays as round 1 closed; through round 2 it has her revision.
	// Both reads equal workshop.Current over the question's revisions.
	if err := db.SetRound(ctx, a.w.ID, 1, false, "discussion"); err != nil {
		t.Fatal(err)
	}
	if err := db.SetRound(ctx, a.w.ID, 2, true, "second round"); err != nil {
		t.Fatal(err)
	}
	save(a, 0, 0, 0.28)
	if all, err = db.Revisions(ctx, a.w.ID); err != nil {
		t.Fatal(err)
	}
	ofQ0 := filter(func(r workshop.Revision) bool { return r.QuestionID == q0 })
	for through, adaMedian := range map[int]float64{1: 0.32, 2: 0.28} {
		got, err := db.LatestRevisions(ctx, q0, through)
		if err != nil {
			t.Fatal(err)
		}
		var want []workshop.Revision
		for _, r := range workshop.Current(ofQ0, workshop.Through(through)) {
			want = append(want, r)
		}
		slices.SortFunc(want, func(a, b workshop.Revision) int { return cmp.Compare(a.ID, b.ID) })
		if len(want) != 3 || !reflect.DeepEqual(got, want) {
			t.Errorf("LatestRevisions through round %d = %+v, want %+v", through, got, want)
		}
		for _, r := range got {
			if r.ExpertID == ada && r.Answer.Values[1] != adaMedian {
				t.Errorf("through round %d Ada's median is %v, want %v", through, r.Answer.Values[1], adaMedian)
			}
		}
	}
}

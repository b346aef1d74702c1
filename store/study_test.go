package store

import (
	"context"
	"errors"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

func TestRecordData(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	q := p.qs[0].ID
	batch := workshop.StudyData{QuestionID: q, Successes: 2, Trials: 40, Source: "pilot (invented)", ObservedOn: "2026-04-30"}
	// No agreed prior yet: nothing to update.
	if err := db.RecordData(ctx, &batch); !errors.Is(err, workshop.ErrNoAgreedPrior) {
		t.Fatalf("without an agreed prior: %v", err)
	}
	must(t, db.AgreePrior(ctx, &workshop.AgreedPrior{QuestionID: q, Source: workshop.PriorFromPool,
		Dist: elicit.Unit(elicit.Beta{Alpha: 2, Beta: 38}), Rationale: "pool", RoundOpen: true}))
	must(t, db.RecordData(ctx, &batch))
	second := workshop.StudyData{QuestionID: q, Successes: 1, Trials: 10, Source: "site B (invented)", ObservedOn: "2026-05-31"}
	must(t, db.RecordData(ctx, &second))
	for _, c := range []struct {
		d     workshop.StudyData
		field string
	}{
		{workshop.StudyData{QuestionID: q, Successes: 11, Trials: 10, Source: "x", ObservedOn: "2026-05-31"}, "successes"},
		{workshop.StudyData{QuestionID: q, Successes: 0, Trials: 0, Source: "x", ObservedOn: "2026-05-31"}, "trials"},
		{workshop.StudyData{QuestionID: q, Successes: 0, Trials: 1, Source: " ", ObservedOn: "2026-05-31"}, "source"},
		{workshop.StudyData{QuestionID: q, Successes: 0, Trials: 1, Source: "x", ObservedOn: "2026-13-01"}, "observed_on"},
		// 50 trials are recorded: at most 999,950 more.
		{workshop.StudyData{QuestionID: q, Successes: 0, Trials: 999_951, Source: "x", ObservedOn: "2026-05-31"}, "trials"},
	} {
		var ie *elicit.InputError
		if err := db.RecordData(ctx, &c.d); !errors.As(err, &ie) || ie.Field != c.field {
			t.Errorf("%+v: %v, want field %s", c.d, err, c.field)
		}
	}
	got, err := db.StudyData(ctx, p.w.ID)
	must(t, err)
	if len(got) != 2 || got[0].ID != batch.ID || got[1] != second || got[0].Source != "pilot (invented)" {
		t.Fatalf("study data %+v", got)
	}
	es, _ := db.Events(ctx, p.w.ID)
	if last := es[len(es)-1]; last.Kind != workshop.EventDataRecorded || last.Reason != second.Source || last.QuestionID != q {
		t.Errorf("last event %+v", last)
	}
	for _, stmt := range []string{`UPDATE study_data SET successes = 0`, `DELETE FROM study_data`} {
		if _, err := db.w.ExecContext(ctx, stmt); err == nil || !strings.Contains(err.Error(), "append-only") {
			t.Errorf("%s: %v, want the append-only trigger to abort it", stmt, err)
		}
	}
}

// A constructed prior must carry its construction and be its Beta.
func TestAgreeConstructedPrior(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	in := elicit.ConstructionInput{Method: elicit.MethodMeanSD, Mean: 0.1, SD: 0.05, Upper: 1}
	c, err := elicit.Construct(in)
	must(t, err)
	for _, bad := range []workshop.AgreedPrior{
		{Source: workshop.PriorFromConstruction, Dist: c.Dist},
		{Source: workshop.PriorFromConstruction, Dist: elicit.Unit(elicit.Beta{Alpha: 3, Beta: 30}), Construction: &in},
		{Source: workshop.PriorFromPool, Dist: c.Dist, Construction: &in},
	} {
		bad.QuestionID, bad.Rationale, bad.RoundOpen = p.qs[0].ID, "r", true
		if err := db.AgreePrior(ctx, &bad); err == nil {
			t.Errorf("%+v was agreed", bad)
		}
	}
	ok := workshop.AgreedPrior{QuestionID: p.qs[0].ID, Source: workshop.PriorFromConstruction, Dist: c.Dist,
		Construction: &in, Rationale: "mean 10%, sd 5%", RoundOpen: true}
	must(t, db.AgreePrior(ctx, &ok))
	ps, err := db.AgreedPriors(ctx, p.w.ID)
	must(t, err)
	if len(ps) != 1 || ps[0].Construction == nil || *ps[0].Construction != in || ps[0].Dist != c.Dist {
		t.Fatalf("stored %+v", ps)
	}
}

// A batch after which the agreed prior could not be updated is refused
// and not saved: Beta(9.5e6, 9.5e6) with 600,000 successes in 600,000
// trials would be Beta(1.01e7, 9.5e6), beyond elicit.MaxShape (1e7), and a
// batch is never removed, so the study page could not show the update
// again. The same batch with failures instead is kept only while β stays
// within the limit too.
func TestRecordDataKeepsTheUpdatePossible(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	q := p.qs[0].ID
	must(t, db.AgreePrior(ctx, &workshop.AgreedPrior{QuestionID: q, Source: workshop.PriorFromPool,
		Dist: elicit.Unit(elicit.Beta{Alpha: 9.5e6, Beta: 9.5e6}), Rationale: "near-certain (invented)", RoundOpen: true}))
	must(t, db.RecordData(ctx, &workshop.StudyData{QuestionID: q, Successes: 400_000, Trials: 400_000, Source: "first (invented)", ObservedOn: "2026-05-31"}))
	for _, c := range []struct {
		d     workshop.StudyData
		field string
	}{
		{workshop.StudyData{QuestionID: q, Successes: 200_000, Trials: 200_000, Source: "x", ObservedOn: "2026-05-31"}, "successes"},
		{workshop.StudyData{QuestionID: q, Successes: 0, Trials: 500_001, Source: "x", ObservedOn: "2026-05-31"}, "trials"},
	} {
		var ie *elicit.InputError
		if err := db.RecordData(ctx, &c.d); !errors.As(err, &ie) || ie.Field != c.field || ie.Rule != elicit.RulePosteriorRange {
			t.Errorf("%+v: %v, want field %s refused by %q", c.d, err, c.field, elicit.RulePosteriorRange)
		}
	}
	got, err := db.StudyData(ctx, p.w.ID)
	must(t, err)
	if len(got) != 1 {
		t.Fatalf("%d batches kept, want the first only", len(got))
	}
	var agreed []workshop.AgreedPrior
	agreed, err = db.AgreedPriors(ctx, p.w.ID)
	must(t, err)
	if _, err := workshop.StudyUpdate(p.qs[0], agreed[len(agreed)-1], got); err != nil {
		t.Errorf("the update of what was kept: %v", err)
	}
}

// A prior that the question's recorded data could not update is refused
// and not saved (workshop.CheckPriorUpdate), as a batch that would break
// the update is: Beta(9.5e6, 9.5e6) after 600,000 successes in 600,000
// trials would give Beta(1.01e7, 9.5e6), beyond elicit.MaxShape (1e7),
// and the data are never removed. A prior within the limit is taken.
func TestAgreeingAPriorTheDataCannotUpdate(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	q := p.qs[0].ID
	agree := func(a, b float64) error {
		return db.AgreePrior(ctx, &workshop.AgreedPrior{QuestionID: q, Source: workshop.PriorFromPool,
			Dist: elicit.Unit(elicit.Beta{Alpha: a, Beta: b}), Rationale: "invented", RoundOpen: true})
	}
	must(t, agree(2, 8))
	must(t, db.RecordData(ctx, &workshop.StudyData{QuestionID: q, Successes: 300_000, Trials: 300_000, Source: "first (invented)", ObservedOn: "2026-05-31"}))
	must(t, db.RecordData(ctx, &workshop.StudyData{QuestionID: q, Successes: 300_000, Trials: 300_000, Source: "second (invented)", ObservedOn: "2026-06-30"}))
	var ie *elicit.InputError
	if err := agree(9.5e6, 9.5e6); !errors.As(err, &ie) || ie.Field != "prior" || ie.Rule != elicit.RulePosteriorRange ||
		!strings.Contains(ie.Detail, "600000 successes in 600000 trials already recorded would be Beta(10100000, 9500000)") {
		t.Fatalf("a prior the data cannot update: %v, want prior refused by %q", err, elicit.RulePosteriorRange)
	}
	ps, err := db.AgreedPriors(ctx, p.w.ID)
	must(t, err)
	if len(ps) != 1 {
		t.Fatalf("%d priors kept, want the first only", len(ps))
	}
	must(t, agree(9e6, 9e6)) // Beta(9.6e6, 9e6) after the data
}

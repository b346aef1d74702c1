package store

import (
	"context"
	"errors"
	"fmt"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

func newDB(t *testing.T) *DB {
	t.Helper()
	db, err := Open(filepath.Join(t.TempDir(), "parley.db"))
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { db.Close() })
	return db
}

// panel is an invented workshop: two questions, three experts.
type panel struct {
	w       workshop.Workshop
	qs      []workshop.Question
	experts []workshop.Expert
}

func seed(t testing.TB, db *DB) panel {
	t.Helper()
	ctx := context.Background()
	p := panel{w: workshop.Workshop{
		Title: "Pump seal failures (invented)", Purpose: "prior for a seal failure rate",
		Decision: "spare-part stock", Notes: "facilitator only", Invented: true,
	}}
	if err := db.CreateWorkshop(ctx, &p.w); err != nil {
		t.Fatal(err)
	}
	truth := 0.3
	qs := []workshop.Question{
		{WorkshopID: p.w.ID, Wording: "What share of seals fail within a year?", Quantity: "failure share",
			Units: "proportion", Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95}},
		{WorkshopID: p.w.ID, Wording: "Share of audited pumps with leaks last year?", Quantity: "leak share",
			Lower: 0, Upper: 1, Format: workshop.FormatInterval, Calibration: true, TrueValue: &truth},
	}
	for i := range qs {
		if err := db.AddQuestion(ctx, &qs[i]); err != nil {
			t.Fatal(err)
		}
	}
	p.qs = qs
	for i, name := range []string{"Ada", "Bela", "Chidi"} {
		e := workshop.Expert{WorkshopID: p.w.ID, Name: name, Affiliation: "Plant " + name, Expertise: "seals"}
		if err := db.AddExpert(ctx, &e, []byte(fmt.Sprintf("hash-%d-%d", p.w.ID, i))); err != nil {
			t.Fatal(err)
		}
		p.experts = append(p.experts, e)
	}
	return p
}

func quantileAnswer(median float64) workshop.Answer {
	return workshop.Answer{Values: []float64{median - 0.1, median, median + 0.1}}
}

func TestWorkshopRoundTrip(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	if p.w.ID == 0 || p.w.Round != 1 || !p.w.Open || p.w.Created.IsZero() {
		t.Fatalf("CreateWorkshop set %+v", p.w)
	}
	got, err := db.Workshop(ctx, p.w.ID)
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(got, p.w) {
		t.Fatalf("read back %+v, want %+v", got, p.w)
	}
	p.w.Title, p.w.Purpose, p.w.Decision, p.w.Notes = "T2", "P2", "D2", "N2"
	if err := db.UpdateWorkshop(ctx, p.w); err != nil {
		t.Fatal(err)
	}
	ws, err := db.Workshops(ctx)
	if err != nil {
		t.Fatal(err)
	}
	if len(ws) != 1 || !reflect.DeepEqual(ws[0], p.w) {
		t.Fatalf("Workshops = %+v, want [%+v]", ws, p.w)
	}
	if err := db.UpdateWorkshop(ctx, workshop.Workshop{ID: 999, Title: "x"}); !errors.Is(err, workshop.ErrNotFound) {
		t.Fatalf("update of missing workshop: %v, want ErrNotFound", err)
	}
}

func TestSetRound(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	steps := []struct {
		round  int
		open   bool
		wantOK bool
	}{
		{2, true, false}, // round 1 still open
		{1, false, true},
		{1, false, false}, // already closed
		{3, true, false},  // skips round 2
		{2, true, true},
	}
	for _, s := range steps {
		err := db.SetRound(ctx, p.w.ID, s.round, s.open, fmt.Sprintf("to %d %v", s.round, s.open))
		var ie *elicit.InputError
		if s.wantOK && err != nil || !s.wantOK && !errors.As(err, &ie) {
			t.Fatalf("SetRound(%d, %v) = %v, want ok %v", s.round, s.open, err, s.wantOK)
		}
	}
	w, err := db.Workshop(ctx, p.w.ID)
	if err != nil {
		t.Fatal(err)
	}
	if w.Round != 2 || !w.Open {
		t.Fatalf("after close and open: round %d open %v, want 2 true", w.Round, w.Open)
	}
	evs, err := db.Events(ctx, p.w.ID)
	if err != nil {
		t.Fatal(err)
	}
	var kinds []string
	for _, e := range evs {
		if e.Kind == workshop.EventRoundClosed || e.Kind == workshop.EventRoundOpened {
			kinds = append(kinds, string(e.Kind)+":"+e.Reason)
		}
	}
	want := []string{"round_closed:to 1 false", "round_opened:to 2 true"}
	if !reflect.DeepEqual(kinds, want) {
		t.Fatalf("round events %v, want %v", kinds, want)
	}
	if err := db.SetRound(ctx, 999, 1, false, ""); !errors.Is(err, workshop.ErrNotFound) {
		t.Fatalf("SetRound on missing workshop: %v", err)
	}
}

func TestQuestionRoundTrip(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	chips := workshop.Question{WorkshopID: p.w.ID, Wording: "Place your chips", Lower: 0, Upper: 1,
		Format: workshop.FormatChips, BinEdges: []float64{0, 0.25, 0.5, 0.75, 1}, Chips: 20}
	if err := db.AddQuestion(ctx, &chips); err != nil {
		t.Fatal(err)
	}
	want := append(append([]workshop.Question{}, p.qs...), chips)
	for i, q := range want {
		if q.Position != i+1 {
			t.Fatalf("question %d has position %d, want %d", q.ID, q.Position, i+1)
		}
		got, err := db.Question(ctx, q.ID)
		if err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(got, q) {
			t.Fatalf("read back %+v, want %+v", got, q)
		}
	}
	got, err := db.Questions(ctx, p.w.ID)
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(got, want) {
		t.Fatalf("Questions = %+v, want %+v", got, want)
	}
	if err := db.AddQuestion(ctx, &workshop.Question{WorkshopID: 999, Lower: 0, Upper: 1}); !errors.Is(err, workshop.ErrNotFound) {
		t.Fatalf("question for missing workshop: %v", err)
	}
}

func TestSetTrueValue(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	cal := p.qs[1]
	if err := db.SetTrueValue(ctx, cal.ID, 0.25, false, ""); err != nil {
		t.Fatal(err)
	}
	q, _ := db.Question(ctx, cal.ID)
	if q.TrueValue == nil || *q.TrueValue != 0.25 || q.Revealed {
		t.Fatalf("stored hidden truth: %+v", q)
	}
	if err := db.SetTrueValue(ctx, cal.ID, 0.25, true, "after round 2"); err != nil {
		t.Fatal(err)
	}
	if q, _ = db.Question(ctx, cal.ID); !q.Revealed {
		t.Fatalf("truth not revealed: %+v", q)
	}
	evs, _ := db.Events(ctx, p.w.ID)
	last := evs[len(evs)-1]
	if last.Kind != workshop.EventTruthRevealed || last.QuestionID != cal.ID || last.Reason != "after round 2" {
		t.Fatalf("last event %+v, want truth_revealed", last)
	}
	bad := []struct {
		name  string
		id    int64
		value float64
		field string
	}{
		{"not a calibration question", p.qs[0].ID, 0.2, "true_value"},
		{"outside bounds", cal.ID, 1.5, "true_value"},
		// The question's own rule, within its bounds, as the question
		// editor and the import hold it.
		{"just below the lower bound", cal.ID, math.Nextafter(cal.Lower, math.Inf(-1)), "true_value"},
		{"just above the upper bound", cal.ID, math.Nextafter(cal.Upper, math.Inf(1)), "true_value"},
		{"not a number", cal.ID, math.NaN(), "true_value"},
	}
	for _, b := range bad {
		var ie *elicit.InputError
		if err := db.SetTrueValue(ctx, b.id, b.value, true, ""); !errors.As(err, &ie) || ie.Field != b.field {
			t.Errorf("%s: %v, want InputError on %s", b.name, err, b.field)
		}
	}
	if err := db.SetTrueValue(ctx, 999, 0.2, true, ""); !errors.Is(err, workshop.ErrNotFound) {
		t.Errorf("missing question: %v", err)
	}
}

func TestExpertTokens(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	es, err := db.Experts(ctx, p.w.ID)
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(es, p.experts) {
		t.Fatalf("Experts = %+v, want %+v", es, p.experts)
	}
	a := p.experts[0]
	got, err := db.ExpertByToken(ctx, []byte(fmt.Sprintf("hash-%d-0", p.w.ID)))
	if err != nil || got.ID != a.ID {
		t.Fatalf("ExpertByToken = %+v, %v; want expert %d", got, err, a.ID)
	}
	if err := db.RevokeExpert(ctx, a.ID, "left the panel"); err != nil {
		t.Fatal(err)
	}
	if _, err := db.ExpertByToken(ctx, []byte(fmt.Sprintf("hash-%d-0", p.w.ID))); !errors.Is(err, workshop.ErrNotFound) {
		t.Fatalf("revoked token: %v, want ErrNotFound", err)
	}
	if got, _ := db.Expert(ctx, a.ID); !got.Revoked {
		t.Fatalf("expert not marked revoked: %+v", got)
	}
	other := seed(t, db) // a second workshop's experts are never listed
	if err := db.RevokeExpert(ctx, other.experts[1].ID, "left"); err != nil {
		t.Fatal(err)
	}
	if ids, err := db.RevokedExperts(ctx, p.w.ID); err != nil || !reflect.DeepEqual(ids, []int64{a.ID}) {
		t.Fatalf("RevokedExperts = %v, %v; want [%d]", ids, err, a.ID)
	}
	if err := db.ReissueToken(ctx, a.ID, []byte("new-hash"), "rejoined"); err != nil {
		t.Fatal(err)
	}
	if _, err := db.ExpertByToken(ctx, []byte(fmt.Sprintf("hash-%d-0", p.w.ID))); !errors.Is(err, workshop.ErrNotFound) {
		t.Fatalf("old token after reissue: %v, want ErrNotFound", err)
	}
	if got, err := db.ExpertByToken(ctx, []byte("new-hash")); err != nil || got.ID != a.ID || got.Revoked {
		t.Fatalf("new token: %+v, %v", got, err)
	}
	if ids, err := db.RevokedExperts(ctx, p.w.ID); err != nil || len(ids) != 0 {
		t.Fatalf("RevokedExperts after the reissue = %v, %v; want none", ids, err)
	}
	evs, _ := db.Events(ctx, p.w.ID)
	var kinds []workshop.EventKind
	for _, e := range evs[len(evs)-2:] {
		kinds = append(kinds, e.Kind)
	}
	if !reflect.DeepEqual(kinds, []workshop.EventKind{workshop.EventExpertRevoked, workshop.EventTokenReissued}) {
		t.Fatalf("last events %v", kinds)
	}
	for name, err := range map[string]error{
		"Expert":       func() error { _, err := db.Expert(ctx, 999); return err }(),
		"RevokeExpert": db.RevokeExpert(ctx, 999, ""),
		"ReissueToken": db.ReissueToken(ctx, 999, []byte("x"), ""),
		"AddExpert":    db.AddExpert(ctx, &workshop.Expert{WorkshopID: 999, Name: "x"}, []byte("y")),
	} {
		if !errors.Is(err, workshop.ErrNotFound) {
			t.Errorf("%s of missing row: %v, want ErrNotFound", name, err)
		}
	}
}

func TestRevisionRoundTrip(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	want := []workshop.Revision{
		{QuestionID: p.qs[0].ID, ExpertID: p.experts[0].ID, Answer: quantileAnswer(0.3)},
		{QuestionID: p.qs[1].ID, ExpertID: p.experts[1].ID, Reason: "first go",
			Answer: workshop.Answer{Lowest: 0.1, Highest: 0.6, Best: 0.3, Confidence: 0.8}},
		{QuestionID: p.qs[0].ID, ExpertID: p.experts[0].ID, Reason: "narrower", Answer: quantileAnswer(0.25)},
	}
	for i := range want {
		if err := db.SaveRevision(ctx, &want[i]); err != nil {
			t.Fatal(err)
		}
		if want[i].ID == 0 || want[i].Round != 1 || want[i].At.IsZero() {
			t.Fatalf("SaveRevision set %+v", want[i])
		}
	}
	got, err := db.Revisions(ctx, p.w.ID)
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(got, want) {
		t.Fatalf("Revisions = %+v\nwant %+v", got, want)
	}
}

func TestSaveRevisionRules(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	other := seed(t, db)
	if err := db.RevokeExpert(ctx, p.experts[2].ID, "test"); err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name string
		r    workshop.Revision
		want error
	}{
		{"missing question", workshop.Revision{QuestionID: 999, ExpertID: p.experts[0].ID}, workshop.ErrNotFound},
		{"missing expert", workshop.Revision{QuestionID: p.qs[0].ID, ExpertID: 999}, workshop.ErrNotFound},
		{"expert of another workshop", workshop.Revision{QuestionID: p.qs[0].ID, ExpertID: other.experts[0].ID}, workshop.ErrNotFound},
		{"revoked expert", workshop.Revision{QuestionID: p.qs[0].ID, ExpertID: p.experts[2].ID}, ErrRevoked},
	}
	for _, tt := range tests {
		tt.r.Answer = quantileAnswer(0.3)
		if err := db.SaveRevision(ctx, &tt.r); !errors.Is(err, tt.want) {
			t.Errorf("%s: %v, want %v", tt.name, err, tt.want)
		}
	}
	if err := db.SetRound(ctx, p.w.ID, 1, false, "discussion"); err != nil {
		t.Fatal(err)
	}
	r := workshop.Revision{QuestionID: p.qs[0].ID, ExpertID: p.experts[0].ID, Answer: quantileAnswer(0.3)}
	if err := db.SaveRevision(ctx, &r); !errors.Is(err, workshop.ErrRoundClosed) {
		t.Fatalf("save in closed round: %v, want ErrRoundClosed", err)
	}
	if rs, _ := db.Revisions(ctx, p.w.ID); len(rs) != 0 {
		t.Fatalf("rejected saves left %d revisions", len(rs))
	}
	if err := db.SetRound(ctx, p.w.ID, 2, true, "round 2"); err != nil {
		t.Fatal(err)
	}
	if err := db.SaveRevision(ctx, &r); err != nil || r.Round != 2 {
		t.Fatalf("save in round 2: %v, round %d", err, r.Round)
	}
}

func TestAppendOnly(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	r := workshop.Revision{QuestionID: p.qs[0].ID, ExpertID: p.experts[0].ID, Answer: quantileAnswer(0.3)}
	if err := db.SaveRevision(ctx, &r); err != nil {
		t.Fatal(err)
	}
	prior := workshop.AgreedPrior{QuestionID: p.qs[0].ID, Source: workshop.PriorFromPool,
		Dist: elicit.Unit(elicit.Beta{Alpha: 3, Beta: 7}), Rationale: "pool", RoundOpen: true}
	if err := db.AgreePrior(ctx, &prior); err != nil {
		t.Fatal(err)
	}
	for _, stmt := range []string{
		`UPDATE revisions SET reason = 'changed'`,
		`DELETE FROM revisions`,
		`UPDATE events SET reason = 'changed'`,
		`DELETE FROM events`,
		`UPDATE agreed_priors SET rationale = 'changed'`,
		`DELETE FROM agreed_priors`,
	} {
		_, err := db.w.ExecContext(ctx, stmt)
		if err == nil || !strings.Contains(err.Error(), "append-only") {
			t.Errorf("%s: %v, want the append-only trigger to abort it", stmt, err)
		}
	}
	rs, _ := db.Revisions(ctx, p.w.ID)
	if len(rs) != 1 || rs[0].Reason != "" {
		t.Fatalf("revisions after attempts: %+v", rs)
	}
}

func TestForeignKeys(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	for _, stmt := range []string{
		fmt.Sprintf(`INSERT INTO revisions (question_id, expert_id, round, at) VALUES (%d, 999, 1, 'x')`, p.qs[0].ID),
		fmt.Sprintf(`INSERT INTO revisions (question_id, expert_id, round, at) VALUES (999, %d, 1, 'x')`, p.experts[0].ID),
		`INSERT INTO questions (workshop_id, position, wording, lower, upper, format) VALUES (999, 1, 'w', 0, 1, 'quantiles')`,
		`INSERT INTO experts (workshop_id, name, created) VALUES (999, 'x', 'x')`,
		`INSERT INTO events (workshop_id, kind, at) VALUES (999, 'x', 'x')`,
		fmt.Sprintf(`DELETE FROM workshops WHERE id = %d`, p.w.ID),
	} {
		_, err := db.w.ExecContext(ctx, stmt)
		if err == nil || !strings.Contains(err.Error(), "FOREIGN KEY") {
			t.Errorf("%s: %v, want a foreign key failure", stmt, err)
		}
	}
}

func TestConcurrentSaves(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	const writers, each = 32, 4
	var wg sync.WaitGroup
	errs := make(chan error, writers*each)
	for g := range writers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range each {
				a := quantileAnswer(0.3)
				if g%2 == 1 { // the four-value question
					a = workshop.Answer{Lowest: 0.1, Highest: 0.5, Best: 0.3, Confidence: 0.8}
				}
				r := workshop.Revision{
					QuestionID: p.qs[g%2].ID, ExpertID: p.experts[g%3].ID,
					Reason: fmt.Sprintf("g%d-%d", g, i), Answer: a,
				}
				if err := db.SaveRevision(ctx, &r); err != nil {
					errs <- err
				}
				if _, err := db.Revisions(ctx, p.w.ID); err != nil {
					errs <- err
				}
			}
		}()
	}
	wg.Wait()
	close(errs)
	for err := range errs {
		t.Error(err)
	}
	rs, err := db.Revisions(ctx, p.w.ID)
	if err != nil {
		t.Fatal(err)
	}
	seen := map[string]bool{}
	for _, r := range rs {
		seen[r.Reason] = true
	}
	if len(rs) != writers*each || len(seen) != writers*each {
		t.Fatalf("%d revisions (%d distinct), want %d", len(rs), len(seen), writers*each)
	}
}

func TestWeights(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	other := seed(t, db)
	w, err := db.Weights(ctx, p.w.ID)
	if err != nil || w.Scheme != workshop.WeightsEqual || w.ByExpert != nil {
		t.Fatalf("default weights %+v, %v; want equal", w, err)
	}
	set := workshop.Weights{WorkshopID: p.w.ID, Scheme: workshop.WeightsCustom, Reason: "Ada ran the audits",
		ByExpert: map[int64]float64{p.experts[0].ID: 2, p.experts[1].ID: 1, p.experts[2].ID: 0}}
	if err := db.SetWeights(ctx, &set); err != nil {
		t.Fatal(err)
	}
	got, err := db.Weights(ctx, p.w.ID)
	if err != nil || !reflect.DeepEqual(got, set) {
		t.Fatalf("Weights = %+v, %v; want %+v", got, err, set)
	}
	before, _ := db.Events(ctx, p.w.ID)
	bad := []struct {
		name string
		w    workshop.Weights
		want error
	}{
		{"negative", workshop.Weights{WorkshopID: p.w.ID, Scheme: workshop.WeightsCustom,
			ByExpert: map[int64]float64{p.experts[0].ID: -1}}, &elicit.InputError{}},
		{"all zero", workshop.Weights{WorkshopID: p.w.ID, Scheme: workshop.WeightsCustom,
			ByExpert: map[int64]float64{p.experts[0].ID: 0}}, &elicit.InputError{}},
		{"unknown scheme", workshop.Weights{WorkshopID: p.w.ID, Scheme: "secret"}, &elicit.InputError{}},
		{"expert of another workshop", workshop.Weights{WorkshopID: p.w.ID, Scheme: workshop.WeightsCustom,
			ByExpert: map[int64]float64{other.experts[0].ID: 1}}, workshop.ErrNotFound},
		{"missing workshop", workshop.Weights{WorkshopID: 999, Scheme: workshop.WeightsEqual}, workshop.ErrNotFound},
	}
	for _, b := range bad {
		err := db.SetWeights(ctx, &b.w)
		var ie *elicit.InputError
		if _, isInput := b.want.(*elicit.InputError); isInput && !errors.As(err, &ie) ||
			!isInput && !errors.Is(err, b.want) {
			t.Errorf("%s: %v, want %T %v", b.name, err, b.want, b.want)
		}
	}
	after, _ := db.Events(ctx, p.w.ID)
	if len(after) != len(before) {
		t.Fatalf("rejected weights wrote %d events", len(after)-len(before))
	}
	last := after[len(after)-1]
	if last.Kind != workshop.EventWeightsSet || last.Reason != set.Reason || !strings.Contains(last.Detail, `"custom"`) {
		t.Fatalf("weights event %+v", last)
	}
	if _, err := db.Weights(ctx, 999); !errors.Is(err, workshop.ErrNotFound) {
		t.Fatalf("weights of missing workshop: %v", err)
	}
}

func TestAgreedPriors(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	consensus := quantileAnswer(0.3)
	want := []workshop.AgreedPrior{
		{QuestionID: p.qs[0].ID, Source: workshop.PriorFromPool, Dist: elicit.Unit(elicit.Beta{Alpha: 4.2, Beta: 17.9}),
			Rationale: "the pool", RoundOpen: true},
		{QuestionID: p.qs[0].ID, Source: workshop.PriorFromConsensus, Dist: elicit.Unit(elicit.Beta{Alpha: 5, Beta: 12}),
			Consensus: &consensus, Rationale: "agreed after discussion"},
	}
	// The round is open: a prior not confirmed as agreed while open is
	// refused, and nothing is written.
	if err := db.AgreePrior(ctx, &workshop.AgreedPrior{QuestionID: p.qs[0].ID, Source: workshop.PriorFromPool,
		Dist: want[0].Dist, Rationale: "too early"}); !errors.Is(err, workshop.ErrRoundStillOpen) {
		t.Fatalf("prior while the round is open, unconfirmed: %v, want ErrRoundStillOpen", err)
	}
	if got, _ := db.AgreedPriors(ctx, p.w.ID); len(got) != 0 {
		t.Fatalf("a refused prior was stored: %+v", got)
	}
	for i := range want {
		if i == 1 {
			// Agreed after the round closed: stored as not open, whatever
			// the caller says.
			must(t, db.SetRound(ctx, p.w.ID, 1, false, ""))
			want[i].RoundOpen = true
		}
		if err := db.AgreePrior(ctx, &want[i]); err != nil {
			t.Fatal(err)
		}
	}
	want[1].RoundOpen = false
	got, err := db.AgreedPriors(ctx, p.w.ID)
	if err != nil || !reflect.DeepEqual(got, want) {
		t.Fatalf("AgreedPriors = %+v, %v\nwant %+v", got, err, want)
	}
	evs, _ := db.Events(ctx, p.w.ID)
	last := evs[len(evs)-1]
	if last.Kind != workshop.EventPriorAgreed || last.QuestionID != p.qs[0].ID || !strings.Contains(last.Detail, `"alpha":5`) ||
		strings.Contains(last.Detail, "while_round_open") {
		t.Fatalf("prior event %+v", last)
	}
	var openEvent workshop.Event
	for _, e := range evs {
		if e.Kind == workshop.EventPriorAgreed {
			openEvent = e
			break
		}
	}
	if !strings.Contains(openEvent.Detail, `"while_round_open":true`) {
		t.Fatalf("the prior agreed while the round was open is not noted in its event: %+v", openEvent)
	}
	bad := workshop.AgreedPrior{QuestionID: p.qs[0].ID, Source: workshop.PriorFromPool, Dist: elicit.Unit(elicit.Beta{Alpha: -1, Beta: 2})}
	var ie *elicit.InputError
	if err := db.AgreePrior(ctx, &bad); !errors.As(err, &ie) || ie.Field != "alpha" {
		t.Fatalf("bad prior: %v, want InputError on alpha", err)
	}
	missing := want[0]
	if err := db.AgreePrior(ctx, &workshop.AgreedPrior{QuestionID: 999, Source: missing.Source, Dist: missing.Dist}); !errors.Is(err, workshop.ErrNotFound) {
		t.Fatalf("prior for missing question: %v", err)
	}
}

func TestFacilitatorSessions(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	if h, err := db.FacilitatorHash(ctx); h != nil || err != nil {
		t.Fatalf("new database hash %q, %v; want nil, nil", h, err)
	}
	if err := db.SetFacilitatorHash(ctx, []byte("h1")); err != nil {
		t.Fatal(err)
	}
	if h, _ := db.FacilitatorHash(ctx); string(h) != "h1" {
		t.Fatalf("hash %q, want h1", h)
	}
	t0 := time.Date(2026, 3, 1, 9, 0, 0, 0, time.UTC)
	if err := db.CreateSession(ctx, []byte("s1"), t0.Add(time.Hour)); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		token string
		at    time.Time
		want  bool
	}{
		{"s1", t0, true},
		{"s1", t0.Add(time.Hour), false},
		{"s2", t0, false},
	} {
		if got, err := db.SessionValid(ctx, []byte(c.token), c.at); got != c.want || err != nil {
			t.Errorf("SessionValid(%s, %v) = %v, %v; want %v", c.token, c.at, got, err, c.want)
		}
	}
	// Ending one session leaves the others; ending an unknown one is fine.
	if err := db.CreateSession(ctx, []byte("s3"), t0.Add(time.Hour)); err != nil {
		t.Fatal(err)
	}
	if err := db.EndSession(ctx, []byte("s3")); err != nil {
		t.Fatal(err)
	}
	if err := db.EndSession(ctx, []byte("never")); err != nil {
		t.Errorf("ending an unknown session: %v", err)
	}
	if ok, _ := db.SessionValid(ctx, []byte("s3"), t0); ok {
		t.Error("an ended session is still valid")
	}
	if ok, _ := db.SessionValid(ctx, []byte("s1"), t0); !ok {
		t.Error("ending one session ended another")
	}
	if err := db.SetFacilitatorHash(ctx, []byte("h2")); err != nil {
		t.Fatal(err)
	}
	if h, _ := db.FacilitatorHash(ctx); string(h) != "h2" {
		t.Fatalf("hash %q, want h2", h)
	}
	if ok, _ := db.SessionValid(ctx, []byte("s1"), t0); ok {
		t.Fatal("session survived a new facilitator secret")
	}
}

// A copy's name is a file's name, never an SQLite URI. VACUUM INTO
// reads a name starting with "file:" as a URI, so `parley backup --out
// file:copy.db` wrote the copy to copy.db, and the command's integrity
// check then opened "file:copy.db", a new empty database, and reported
// the backup sound.
func TestBackupToANameLikeAURI(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	t.Chdir(t.TempDir())
	if err := db.Backup(ctx, "file:copy.db"); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat("copy.db"); !errors.Is(err, fs.ErrNotExist) {
		t.Fatalf("the copy went to copy.db (%v)", err)
	}
	if _, err := os.Stat("file:copy.db"); err != nil {
		t.Fatalf("no copy under the name given: %v", err)
	}
	cp, err := Open("file:copy.db")
	if err != nil {
		t.Fatal(err)
	}
	defer cp.Close()
	if ws, err := cp.Workshops(ctx); err != nil || len(ws) != 1 || ws[0].ID != p.w.ID {
		t.Fatalf("the copy holds %+v, %v; want the workshop", ws, err)
	}
}

func TestBackup(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	r := workshop.Revision{QuestionID: p.qs[0].ID, ExpertID: p.experts[0].ID, Answer: quantileAnswer(0.3)}
	if err := db.SaveRevision(ctx, &r); err != nil {
		t.Fatal(err)
	}
	dest := filepath.Join(t.TempDir(), "copy.db")
	if err := db.Backup(ctx, dest); err != nil {
		t.Fatal(err)
	}
	if err := db.Backup(ctx, dest); err == nil {
		t.Fatal("backup over an existing file succeeded")
	}
	cp, err := Open(dest)
	if err != nil {
		t.Fatal(err)
	}
	defer cp.Close()
	if v, err := cp.IntegrityCheck(ctx); v != "ok" || err != nil {
		t.Fatalf("integrity_check = %q, %v", v, err)
	}
	rs, err := cp.Revisions(ctx, p.w.ID)
	if err != nil || len(rs) != 1 || !reflect.DeepEqual(rs[0], r) {
		t.Fatalf("backup revisions %+v, %v; want [%+v]", rs, err, r)
	}
}

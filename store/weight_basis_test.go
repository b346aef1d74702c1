package store

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// scoredWorkshop is the seed panel with two calibration questions at
// 5/50/95 that every expert answered, their true values revealed, and
// performance weights applied with their basis, then a prior agreed
// from the pool.
func scoredWorkshop(t *testing.T, db *DB) (panel, workshop.Weights) {
	t.Helper()
	ctx := context.Background()
	p := seed(t, db)
	answers := [][]float64{{0.2, 0.3, 0.45}, {0.6, 0.62, 0.64}, {0.1, 0.35, 0.7}}
	for i, truth := range []float64{0.33, 0.41} {
		q := workshop.Question{WorkshopID: p.w.ID, Wording: "Seed (invented)", Quantity: "seed share", Lower: 0, Upper: 1,
			Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95}, Calibration: true, TrueValue: &truth}
		must(t, db.AddQuestion(ctx, &q))
		for j, e := range p.experts {
			a := append([]float64(nil), answers[j]...)
			a[1] += 0.01 * float64(i)
			must(t, db.SaveRevision(ctx, &workshop.Revision{QuestionID: q.ID, ExpertID: e.ID, Answer: workshop.Answer{Values: a}}))
		}
		must(t, db.SetTrueValue(ctx, q.ID, truth, true, "revealed (invented)"))
		p.qs = append(p.qs, q)
	}
	for _, e := range p.experts {
		must(t, db.SaveRevision(ctx, &workshop.Revision{QuestionID: p.qs[0].ID, ExpertID: e.ID, Answer: quantileAnswer(0.3)}))
	}
	qs, _ := db.Questions(ctx, p.w.ID)
	es, _ := db.Experts(ctx, p.w.ID)
	rs, _ := db.Revisions(ctx, p.w.ID)
	set := workshop.NewCalibrationSet(qs, es, rs, true)
	perf, err := workshop.ScorePerformance(set, nil)
	if err != nil {
		t.Fatal(err)
	}
	b := workshop.NewWeightBasis(set, perf)
	w := workshop.Weights{WorkshopID: p.w.ID, Scheme: workshop.WeightsPerformance, ByExpert: perf.WeightsByExpert(), Reason: "scored", Basis: &b}
	must(t, db.SetWeights(ctx, &w))
	must(t, db.AgreePrior(ctx, &workshop.AgreedPrior{QuestionID: p.qs[0].ID, Source: workshop.PriorFromPool,
		Dist: elicit.Unit(elicit.Beta{Alpha: 6, Beta: 11}), Rationale: "weighted pool", RoundOpen: true}))
	return p, w
}

func TestWeightSetKeepsItsBasis(t *testing.T) {
	ctx := context.Background()
	db := newDB(t)
	p, w := scoredWorkshop(t, db)
	if w.ID == 0 {
		t.Fatal("SetWeights did not set the ID")
	}
	got, err := db.Weights(ctx, p.w.ID)
	if err != nil {
		t.Fatal(err)
	}
	if got.ID != w.ID || got.Basis == nil || !reflect.DeepEqual(*got.Basis, *w.Basis) {
		t.Fatalf("read back %+v\nwant basis %+v", got, w.Basis)
	}
	if len(got.Basis.CalibrationAnswers) != 6 || len(got.Basis.Questions) != 2 || *got.Basis.Questions[1].TrueValue != 0.41 {
		t.Fatalf("basis %+v", got.Basis)
	}
	// Custom weights are kept as typed, without a basis; a basis on them
	// is refused and nothing is written.
	custom := workshop.Weights{WorkshopID: p.w.ID, Scheme: workshop.WeightsCustom, Reason: "as typed",
		ByExpert: map[int64]float64{p.experts[0].ID: 2.5, p.experts[1].ID: 0.5}}
	bad := custom
	bad.Basis = w.Basis
	var ie *elicit.InputError
	if err := db.SetWeights(ctx, &bad); !errors.As(err, &ie) || ie.Field != "basis" {
		t.Fatalf("basis on custom weights: %v", err)
	}
	must(t, db.SetWeights(ctx, &custom))
	hist, err := db.WeightHistory(ctx, p.w.ID)
	if err != nil {
		t.Fatal(err)
	}
	if len(hist) != 2 || hist[0].ID != w.ID || hist[0].Basis == nil || hist[1].ID != custom.ID || hist[1].Basis != nil ||
		hist[1].ByExpert[p.experts[0].ID] != 2.5 || hist[1].ByExpert[p.experts[1].ID] != 0.5 {
		t.Fatalf("history %+v", hist)
	}
	// The prior agreed while set w was in force names it; one agreed now
	// names the custom set.
	must(t, db.AgreePrior(ctx, &workshop.AgreedPrior{QuestionID: p.qs[0].ID, Source: workshop.PriorFromPool,
		Dist: elicit.Unit(elicit.Beta{Alpha: 5, Beta: 9}), Rationale: "custom pool", RoundOpen: true}))
	ps, _ := db.AgreedPriors(ctx, p.w.ID)
	if len(ps) != 2 || ps[0].WeightSetID != w.ID || ps[1].WeightSetID != custom.ID {
		t.Fatalf("priors name sets %d and %d, want %d and %d", ps[0].WeightSetID, ps[1].WeightSetID, w.ID, custom.ID)
	}
	// A workshop that never set weights: the prior names no set.
	other := seed(t, db)
	must(t, db.AgreePrior(ctx, &workshop.AgreedPrior{QuestionID: other.qs[0].ID, Source: workshop.PriorFromPool,
		Dist: elicit.Unit(elicit.Beta{Alpha: 2, Beta: 3}), Rationale: "equal", RoundOpen: true}))
	if ps, _ := db.AgreedPriors(ctx, other.w.ID); len(ps) != 1 || ps[0].WeightSetID != 0 {
		t.Fatalf("prior under never-set weights: %+v", ps)
	}
	if h, err := db.WeightHistory(ctx, other.w.ID); err != nil || len(h) != 0 {
		t.Fatalf("history of a workshop without sets: %v, %v", h, err)
	}
	if _, err := db.WeightHistory(ctx, 9999); !errors.Is(err, workshop.ErrNotFound) {
		t.Fatalf("history of a missing workshop: %v", err)
	}
	// Sets stay append-only, basis and all.
	if _, err := db.w.ExecContext(ctx, `UPDATE weight_sets SET basis = NULL`); err == nil {
		t.Fatal("a weight set's basis was changed")
	}
	if _, err := db.w.ExecContext(ctx, `UPDATE agreed_priors SET weight_set_id = NULL`); err == nil {
		t.Fatal("an agreed prior's weight set was changed")
	}
}

// TestImportKeepsWeightHistory: the record's weight sets come back in
// order with their bases and the agreed priors' links, all on new IDs,
// and export identically.
func TestImportKeepsWeightHistory(t *testing.T) {
	ctx := context.Background()
	src := newDB(t)
	seed(t, src) // so the source's IDs differ from the copy's
	p, _ := scoredWorkshop(t, src)
	must(t, src.SetWeights(ctx, &workshop.Weights{WorkshopID: p.w.ID, Scheme: workshop.WeightsEqual, Reason: "back to equal"}))
	first := exportJSON(t, src, p.w.ID)
	rec, err := record.Parse(bytes.NewReader(first))
	if err != nil {
		t.Fatal(err)
	}
	if len(rec.WeightHistory) != 2 || rec.WeightHistory[0].Basis == nil {
		t.Fatalf("exported history %+v", rec.WeightHistory)
	}
	// The copy's database already uses the record's ids (a new one
	// would keep them), so the import gives new ones.
	dst := newDB(t)
	seed(t, dst)
	seed(t, dst)
	id, err := dst.Import(ctx, rec)
	if err != nil {
		t.Fatal(err)
	}
	hist, _ := dst.WeightHistory(ctx, id)
	es, _ := dst.Experts(ctx, id)
	rs, _ := dst.Revisions(ctx, id)
	if len(hist) != 2 || hist[0].Basis == nil || hist[1].Scheme != workshop.WeightsEqual {
		t.Fatalf("imported history %+v", hist)
	}
	experts := map[int64]bool{}
	for _, e := range es {
		experts[e.ID] = true
	}
	revs := map[int64]workshop.Revision{}
	for _, rv := range rs {
		revs[rv.ID] = rv
	}
	for _, a := range hist[0].Basis.CalibrationAnswers {
		if rv, ok := revs[a.RevisionID]; !ok || rv.ExpertID != a.ExpertID || rv.QuestionID != a.QuestionID || !experts[a.ExpertID] {
			t.Fatalf("imported basis answer %+v does not point at its revision (%+v)", a, rv)
		}
	}
	for id := range hist[0].ByExpert {
		if !experts[id] {
			t.Fatalf("imported set weights expert %d of another workshop", id)
		}
	}
	ps, _ := dst.AgreedPriors(ctx, id)
	if len(ps) != 1 || ps[0].WeightSetID != hist[0].ID {
		t.Fatalf("imported prior names set %d, want %d", ps[0].WeightSetID, hist[0].ID)
	}
	// Exported again from the copy, the documents agree but for the IDs,
	// which differ.
	if again := exportJSON(t, dst, id); bytes.Equal(first, again) {
		t.Fatal("IDs were not remapped")
	}
	other := newDB(t)
	seed(t, other)
	id2, err := other.Import(ctx, rec)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := other.Record(ctx, id2, exportTime); err != nil {
		t.Fatal(err)
	}
}

// TestImportOlderRecordWithoutBasis: a record from before the basis and
// the history (no weight_history, no ids, no basis, no weight_set_id)
// still imports, with its weights in force.
func TestImportOlderRecordWithoutBasis(t *testing.T) {
	ctx := context.Background()
	src := newDB(t)
	p, _ := scoredWorkshop(t, src)
	var doc map[string]any
	if err := json.Unmarshal(exportJSON(t, src, p.w.ID), &doc); err != nil {
		t.Fatal(err)
	}
	delete(doc, "weight_history")
	delete(doc, "fingerprint") // older than the chain too
	delete(doc, "chain")
	wt := doc["weights"].(map[string]any)
	delete(wt, "basis")
	delete(wt, "id")
	for _, q := range doc["questions"].([]any) {
		qm := q.(map[string]any)
		for _, key := range []string{"prior_history"} {
			for _, ap := range qm[key].([]any) {
				delete(ap.(map[string]any), "weight_set_id")
			}
		}
		if ap, ok := qm["agreed_prior"].(map[string]any); ok {
			delete(ap, "weight_set_id")
		}
	}
	old, _ := json.Marshal(doc)
	if strings.Contains(string(old), "basis") || strings.Contains(string(old), "weight_set_id") {
		t.Fatal("the older record still has the new keys")
	}
	rec, err := record.Parse(bytes.NewReader(old))
	if err != nil {
		t.Fatalf("older record refused: %v", err)
	}
	dst := newDB(t)
	id, err := dst.Import(ctx, rec)
	if err != nil {
		t.Fatal(err)
	}
	got, _ := dst.Weights(ctx, id)
	if got.Scheme != workshop.WeightsPerformance || got.Basis != nil || len(got.ByExpert) != 3 {
		t.Fatalf("imported weights %+v", got)
	}
	if ps, _ := dst.AgreedPriors(ctx, id); len(ps) != 1 || ps[0].WeightSetID != 0 {
		t.Fatalf("imported prior %+v", ps)
	}
}

// TestMigrationLinksEarlierPriors: a database at the version before the
// basis, with weight sets and priors agreed between them, is upgraded;
// each earlier prior names the set that was in force when it was agreed.
func TestMigrationLinksEarlierPriors(t *testing.T) {
	ctx := context.Background()
	path := filepath.Join(t.TempDir(), "old.db")
	old, err := open(path)
	if err != nil {
		t.Fatal(err)
	}
	var before int
	for _, m := range mustMigrations(t) {
		if strings.HasSuffix(m.name, "_weight_basis.sql") {
			before = m.version - 1
		}
	}
	if before == 0 {
		t.Fatal("no weight basis migration")
	}
	must(t, old.MigrateTo(ctx, before))
	p := seed(t, old)
	exec := func(q string, args ...any) int64 {
		t.Helper()
		res, err := old.w.ExecContext(ctx, q, args...)
		if err != nil {
			t.Fatal(err)
		}
		id, _ := res.LastInsertId()
		return id
	}
	prior := func(at string) int64 {
		return exec(`INSERT INTO agreed_priors (question_id, source, alpha, beta, lower, upper, rationale, round, at)
			VALUES (?, 'pool', 2, 3, 0, 1, 'old', 1, ?)`, p.qs[0].ID, at)
	}
	p0 := prior("2026-01-01T09:00:00.5Z")
	s1 := exec(`INSERT INTO weight_sets (workshop_id, scheme, by_expert, reason, at) VALUES (?, 'equal', '{}', 'a', '2026-01-01T10:00:00Z')`, p.w.ID)
	p1 := prior("2026-01-01T10:00:00.25Z")
	s2 := exec(`INSERT INTO weight_sets (workshop_id, scheme, by_expert, reason, at) VALUES (?, 'equal', '{}', 'b', '2026-01-01T11:00:00.123456789Z')`, p.w.ID)
	p2 := prior("2026-01-01T12:00:00Z")
	old.Close()

	db, err := Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	ps, err := db.AgreedPriors(ctx, p.w.ID)
	if err != nil {
		t.Fatal(err)
	}
	want := map[int64]int64{p0: 0, p1: s1, p2: s2}
	for _, ap := range ps {
		if ap.WeightSetID != want[ap.ID] {
			t.Errorf("prior %d names set %d, want %d", ap.ID, ap.WeightSetID, want[ap.ID])
		}
	}
	if _, err := db.w.ExecContext(ctx, `UPDATE agreed_priors SET rationale = 'changed'`); err == nil {
		t.Fatal("agreed priors are no longer append-only after the migration")
	}
}

func mustMigrations(t *testing.T) []migration {
	t.Helper()
	ms, err := loadMigrations()
	if err != nil {
		t.Fatal(err)
	}
	return ms
}

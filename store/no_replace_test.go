package store

import (
	"context"
	"fmt"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// TestAppendOnlyRefusesReplace: REPLACE deletes the row it conflicts with
// without firing the delete triggers, so before migration 0011 an
// INSERT OR REPLACE naming a revision's id rewrote its answer and reason in
// place, though UPDATE and DELETE were refused. Every append-only table
// now refuses it, and nothing changes.
func TestAppendOnlyRefusesReplace(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	q := p.qs[0]
	fit, err := q.Fit(quantileAnswer(0.3))
	if err != nil {
		t.Fatal(err)
	}
	r := workshop.Revision{QuestionID: q.ID, ExpertID: p.experts[0].ID, Answer: quantileAnswer(0.3), Reason: "as typed", Kept: &fit}
	must(t, db.SaveRevision(ctx, &r))
	must(t, db.SetReasonWithheld(ctx, r.ID, true, "names a colleague (invented)"))
	must(t, db.SetWeights(ctx, &workshop.Weights{WorkshopID: p.w.ID, Scheme: workshop.WeightsCustom,
		ByExpert: map[int64]float64{p.experts[0].ID: 1}, Reason: "invented"}))
	must(t, db.AgreePrior(ctx, &workshop.AgreedPrior{QuestionID: q.ID, Source: workshop.PriorFromPool,
		Dist: elicit.Unit(elicit.Beta{Alpha: 3, Beta: 7}), Rationale: "pool", RoundOpen: true}))
	must(t, db.RecordData(ctx, &workshop.StudyData{QuestionID: q.ID, Successes: 1, Trials: 20, Source: "pilot (invented)", ObservedOn: "2026-04-30"}))

	// The attack on a revision, spelled out: same id, another reason.
	attack := fmt.Sprintf(`REPLACE INTO revisions (id, question_id, expert_id, round, at, reason) VALUES (%d, %d, %d, 1, 'x', 'rewritten')`,
		r.ID, q.ID, p.experts[0].ID)
	statements := []string{attack}
	for _, table := range []string{"revisions", "revision_fits", "events", "weight_sets", "agreed_priors", "reason_decisions", "study_data", "panel_salts"} {
		var n int
		if err := db.w.QueryRowContext(ctx, `SELECT COUNT(*) FROM `+table).Scan(&n); err != nil || n == 0 {
			t.Fatalf("%s: %d rows, %v; the test needs one", table, n, err)
		}
		statements = append(statements, `INSERT OR REPLACE INTO `+table+` SELECT * FROM `+table)
	}
	for _, stmt := range statements {
		_, err := db.w.ExecContext(ctx, stmt)
		if err == nil || !(strings.Contains(err.Error(), "append-only") || strings.Contains(err.Error(), "never change")) {
			t.Errorf("%s: %v, want a trigger to abort it", stmt, err)
		}
	}
	rs, err := db.Revisions(ctx, p.w.ID)
	if err != nil || len(rs) != 1 || rs[0].Reason != "as typed" || rs[0].Kept == nil {
		t.Fatalf("revisions after the attempts: %+v, %v", rs, err)
	}
}

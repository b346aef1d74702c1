package store

import (
	"context"
	"errors"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// Revoking an expert whose access is already revoked changes nothing and
// is refused, as retiring a retired question is; a second tab's revoke
// recorded the revocation twice in the decision log. A new link lifts
// the revocation, and the expert can then be revoked again.
func TestRevokeTwiceIsRefused(t *testing.T) {
	db := newDB(t)
	p := seed(t, db)
	ctx := context.Background()
	e := p.experts[0]
	count := func() int { return eventCount(t, db, p.w.ID, workshop.EventExpertRevoked) }
	must(t, db.RevokeExpert(ctx, e.ID, "left the panel"))
	err := db.RevokeExpert(ctx, e.ID, "left, said again")
	var ie *elicit.InputError
	if !errors.As(err, &ie) || ie.Rule != workshop.RuleNothingChanged || ie.Field != "action" {
		t.Fatalf("revoking a revoked expert: %v, want %q on action", err, workshop.RuleNothingChanged)
	}
	if n := count(); n != 1 {
		t.Fatalf("%d revocations recorded, want 1", n)
	}
	must(t, db.ReissueToken(ctx, e.ID, []byte("another token hash"), "back"))
	must(t, db.RevokeExpert(ctx, e.ID, "left again"))
	if n := count(); n != 2 {
		t.Fatalf("%d revocations recorded after a new link and a revoke, want 2", n)
	}
}

// A retired question takes no agreed prior (workshop.CheckTakesPrior),
// checked in the agreement's transaction; brought back, it takes one.
func TestRetiredQuestionTakesNoPrior(t *testing.T) {
	db := newDB(t)
	p := seed(t, db)
	ctx := context.Background()
	q := p.qs[0]
	must(t, db.SetQuestionRetired(ctx, q.ID, true, "asked twice"))
	prior := workshop.AgreedPrior{QuestionID: q.ID, Source: workshop.PriorFromConsensus, Rationale: "agreed",
		Dist: elicit.Unit(elicit.Beta{Alpha: 2, Beta: 20}), RoundOpen: true}
	err := db.AgreePrior(ctx, &prior)
	var ie *elicit.InputError
	if !errors.As(err, &ie) || ie.Rule != workshop.RuleRetiredNoPrior {
		t.Fatalf("agreeing a retired question's prior: %v, want %q", err, workshop.RuleRetiredNoPrior)
	}
	if ps, _ := db.AgreedPriors(ctx, p.w.ID); len(ps) != 0 {
		t.Fatalf("%d priors recorded", len(ps))
	}
	must(t, db.SetQuestionRetired(ctx, q.ID, false, "needed after all"))
	must(t, db.AgreePrior(ctx, &prior))
}

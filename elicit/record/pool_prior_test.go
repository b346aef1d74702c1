package record

import (
	"errors"
	"strings"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/elicit/workshop/workshoptest"
)

// A prior agreed from the pool that names the revisions it pooled must be
// the single Beta of their pool under its weight set: a record whose
// pooled prior was edited by hand, or that names other weights, is
// refused at the prior's path. A pooled prior from before Parley kept
// its revisions names none and is not checked.
func TestPooledPriorIsItsPoolsSingleBeta(t *testing.T) {
	src := workshoptest.PumpSeals()
	src.Weights.ID = 5
	src.WeightHistory = []workshop.Weights{src.Weights}
	// The panel pooled Ada's round-2 revision (35) and Bela's (32) at 3:1;
	// Chidi is revoked. The pool and its single Beta are formed here
	// from the revisions' fits, as the panel forms them.
	var dists []elicit.ScaledBeta
	for _, id := range []int64{35, 32} {
		for _, rv := range src.Revisions {
			if rv.ID == id {
				f, err := src.Questions[0].Fit(rv.Answer)
				if err != nil {
					t.Fatal(err)
				}
				dists = append(dists, f.Dist)
			}
		}
	}
	pool, err := elicit.LinearPool(dists, []float64{3, 1})
	if err != nil {
		t.Fatal(err)
	}
	rep, err := pool.BestBeta()
	if err != nil {
		t.Fatal(err)
	}
	pooled := workshop.AgreedPrior{ID: 43, QuestionID: 11, Source: workshop.PriorFromPool, Dist: rep.Dist,
		Rationale: "the weighted pool", Round: 2, WeightSetID: 5, Pooled: []int64{35, 32}, At: t0.Add(20 * time.Minute)}
	build := func(ap workshop.AgreedPrior) error {
		t.Helper()
		s := src
		s.Priors = append(append([]workshop.AgreedPrior{}, src.Priors...), ap)
		r, err := Build(s, t0.Add(time.Hour))
		if err != nil {
			t.Fatal(err)
		}
		return r.Validate()
	}
	if err := build(pooled); err != nil {
		t.Fatalf("the pool's own single Beta: %v", err)
	}
	const path = "questions[0].prior_history[2].dist"
	refused := func(what string, ap workshop.AgreedPrior) {
		t.Helper()
		err := build(ap)
		var ie *elicit.InputError
		if !errors.As(err, &ie) || ie.Field != path || ie.Rule != RulePoolMismatch || !strings.Contains(err.Error(), "the pool of the revisions it names (2) gives Beta(") {
			t.Errorf("%s: %v, want %s refused", what, err, path)
		}
	}
	edited := pooled
	edited.Dist.Alpha *= 1.001
	refused("α edited by 0.1%", edited)
	edited = pooled
	edited.Dist.Beta.Beta *= 0.999
	refused("β edited by 0.1%", edited)
	equal := pooled
	equal.WeightSetID = 0 // equal weights: another pool
	refused("the pool under equal weights", equal)
	fewer := pooled
	fewer.Pooled = []int64{35}
	if err := build(fewer); err == nil || !strings.Contains(err.Error(), "the pool of the revisions it names (1)") {
		t.Errorf("one revision left out: %v", err)
	}
	older := pooled
	older.Dist, older.Pooled = elicit.Unit(elicit.Beta{Alpha: 3, Beta: 12}), nil
	if err := build(older); err != nil {
		t.Errorf("a pooled prior that names no revisions: %v", err)
	}
}

package record

import (
	"errors"
	"reflect"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop/workshoptest"
)

// Build reads each revision's kept fit instead of fitting it again: a
// revision whose kept fit is (deliberately) not its answer's shows the
// kept one, and the others show what a fresh fit gives (issue 16).
func TestBuildReadsKeptFits(t *testing.T) {
	src := workshoptest.PumpSeals()
	marker := elicit.Fit{Dist: elicit.Unit(elicit.Beta{Alpha: 7, Beta: 7}), Percentiles: [3]float64{0.3, 0.5, 0.7}}
	src.Revisions[0].Kept = &marker
	r, err := Build(src, time.Date(2026, 12, 2, 9, 0, 0, 0, time.UTC))
	if err != nil {
		t.Fatal(err)
	}
	if got := r.Revisions[0].Fit; got == nil || got.Dist != marker.Dist {
		t.Fatalf("revision 0's fit %+v, want the kept Beta(7, 7)", got)
	}
	for i, rv := range r.Revisions[1:] {
		q := src.Questions[0]
		for _, cand := range src.Questions {
			if cand.ID == rv.QuestionID {
				q = cand
			}
		}
		f, err := q.Fit(rv.Answer)
		if err != nil {
			continue
		}
		if rv.Fit == nil || !reflect.DeepEqual(*rv.Fit, *FitOf(f)) {
			t.Errorf("revision %d: fit %+v, want a fresh fit's %+v", i+1, rv.Fit, FitOf(f))
		}
	}
}

// The import checks each revision's fit against a fresh one: a record
// whose fit was changed after export is refused at that revision's fit,
// and ValidateFits returns the fresh fits that the import keeps.
func TestValidateFitsChecksTheKeptFit(t *testing.T) {
	r, err := Build(workshoptest.PumpSeals(), time.Date(2026, 12, 2, 9, 0, 0, 0, time.UTC))
	if err != nil {
		t.Fatal(err)
	}
	fits, err := r.ValidateFits()
	if err != nil {
		t.Fatal(err)
	}
	for i, rv := range r.Revisions {
		if rv.Fit != nil && !reflect.DeepEqual(*FitOf(fits[i]), *rv.Fit) {
			t.Errorf("revision %d: fresh fit %+v, record's %+v", i, FitOf(fits[i]), rv.Fit)
		}
	}
	// Within the agreement (1e-6 relative) a kept fit passes; beyond, it
	// is refused with the path.
	for _, c := range []struct {
		scale float64
		ok    bool
	}{{1 + 1e-8, true}, {1 + 1e-4, false}} {
		bad := r
		bad.Revisions = append([]Revision(nil), r.Revisions...)
		f := *bad.Revisions[2].Fit
		f.Dist.Alpha *= c.scale
		bad.Revisions[2].Fit = &f
		_, err := bad.ValidateFits()
		var ie *elicit.InputError
		switch {
		case c.ok && err != nil:
			t.Errorf("α × %g: refused: %v", c.scale, err)
		case !c.ok && (!errors.As(err, &ie) || ie.Field != "revisions[2].fit" || ie.Rule != RuleFitMismatch):
			t.Errorf("α × %g: %v, want revisions[2].fit refused by %q", c.scale, err, RuleFitMismatch)
		}
	}
}

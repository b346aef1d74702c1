package record

import (
	"errors"
	"os"
	"strings"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// An answer an earlier build saved under looser rules is kept unfitted,
// and no prior from the pool may name it: its fit in the record is
// checked by nothing (a record whose tiny answer's fit was made
// Beta(999, 1) by hand read as sound), and the import keeps no fit of it,
// so the imported workshop's record would not import again (found by
// review). A prior naming it, even one that matches the record's fit of
// it, is refused at its pooled_revisions.
func TestAPoolCannotNameAnAnswerKeptUnfitted(t *testing.T) {
	b, err := os.ReadFile("../../testdata/records/demo_7c8c05c_tiny.json")
	if err != nil {
		t.Fatal(err)
	}
	r, err := Parse(strings.NewReader(string(b)))
	if err != nil {
		t.Fatalf("the record of an earlier build: %v", err)
	}
	tiny := -1
	for i, rv := range r.Revisions {
		if len(rv.Answer.Values) > 0 && rv.Answer.Values[0] < 1e-300 {
			tiny = i
		}
	}
	if tiny < 0 {
		t.Fatal("the record has no tiny answer")
	}
	q := -1
	for i, qq := range r.Questions {
		if qq.ID == r.Revisions[tiny].QuestionID {
			q = i
		}
	}
	if len(r.Questions[q].PriorHistory) > 0 {
		t.Fatal("the tiny answer's question already has a prior; the test needs one of its own")
	}
	rv := r.Revisions[tiny]
	if rv.Fit == nil {
		t.Fatal("the earlier build's record keeps no fit of the tiny answer")
	}
	// The pool of that one fit is the fit itself: the prior matches the
	// record's fit, which nothing checks.
	ap := workshop.AgreedPrior{ID: 1, QuestionID: rv.QuestionID, Source: workshop.PriorFromPool,
		Dist: rv.Fit.Dist, Rationale: "the pool (invented)", Round: rv.Round,
		RoundOpen: true, Pooled: []int64{rv.ID}, At: rv.At.Add(time.Second)}
	r.Questions[q].PriorHistory = append(r.Questions[q].PriorHistory, ap)
	_, err = r.ValidateFits()
	var ie *elicit.InputError
	if !errors.As(err, &ie) || !strings.HasSuffix(ie.Field, ".pooled_revisions[0]") || !strings.Contains(err.Error(), "looser rules") {
		t.Fatalf("a prior pooling the unfitted answer: %v, want it refused at its pooled_revisions", err)
	}
}

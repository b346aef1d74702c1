package workshop

import (
	"errors"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

// TestCorrectionLockedByAnswersOrPrior: answers, or an agreed prior on a
// question nobody answered, fix its bounds, format and probabilities; the
// refusal names the field and what fixed it, and the wording may still
// change. With neither, the bound may change.
func TestCorrectionLockedByAnswersOrPrior(t *testing.T) {
	q := Question{ID: 1, WorkshopID: 1, Position: 1, Wording: "(Invented.) What share of pumps fail in year one?",
		Quantity: "pump failure share", Lower: 0, Upper: 1, Format: FormatQuantiles, Probs: ProbsDefault}
	wider := q
	wider.Upper = 0.5
	reworded := q
	reworded.Wording = "(Invented.) What share of pumps fail in their first year?"
	for _, c := range []struct {
		rec  Recorded
		rule elicit.Rule
	}{
		{Recorded{}, ""},
		{Recorded{Answers: 2}, RuleLockedAfterAnswers},
		{Recorded{Priors: 1}, RuleLockedAfterPrior},
		{Recorded{Answers: 1, Priors: 1}, RuleLockedAfterAnswers},
	} {
		err := q.CheckCorrection(wider, c.rec)
		var ie *elicit.InputError
		switch {
		case c.rule == "" && err != nil:
			t.Errorf("%+v: the bound refused: %v", c.rec, err)
		case c.rule != "" && (!errors.As(err, &ie) || ie.Field != "upper" || ie.Rule != c.rule):
			t.Errorf("%+v: got %v, want upper refused with %q", c.rec, err, c.rule)
		}
		if err := q.CheckCorrection(reworded, c.rec); err != nil {
			t.Errorf("%+v: the wording refused: %v", c.rec, err)
		}
	}
}

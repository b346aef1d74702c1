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

// A withdrawal needs a reason, an unarchived workshop, a revision not yet
// withdrawn, and a question whose answers no reveal has frozen; one of an
// earlier round, or of a calibration question not yet revealed, is
// allowed.
func TestCheckWithdrawal(t *testing.T) {
	w := Workshop{ID: 1, Round: 2, Open: true}
	q := Question{ID: 5, WorkshopID: 1}
	rv := Revision{ID: 9, QuestionID: 5, ExpertID: 3, Round: 1}
	calib := Question{ID: 5, WorkshopID: 1, Calibration: true}
	revealed := Question{ID: 5, WorkshopID: 1, Calibration: true, Revealed: true}
	archived := w
	archived.Archived, archived.Open = true, false
	gone := rv
	gone.Withdrawn = true
	for _, c := range []struct {
		name   string
		w      Workshop
		q      Question
		rv     Revision
		reason string
		field  string
		rule   elicit.Rule
	}{
		{"allowed", w, q, rv, "entered against the wrong expert", "", ""},
		{"calibration not yet revealed", w, calib, rv, "typed on the wrong row", "", ""},
		{"no reason", w, q, rv, "  ", "reason", elicit.RuleRequired},
		{"archived", archived, q, rv, "why", "action", RuleArchived},
		{"already withdrawn", w, q, gone, "why", "revision", RuleNothingChanged},
		{"revealed", w, revealed, rv, "why", "revision", RuleScoredAtReveal},
	} {
		err := CheckWithdrawal(c.w, c.q, c.rv, c.reason)
		if c.rule == "" {
			if err != nil {
				t.Errorf("%s: %v", c.name, err)
			}
			continue
		}
		var ie *elicit.InputError
		if !errors.As(err, &ie) || ie.Field != c.field || ie.Rule != c.rule {
			t.Errorf("%s: got %v, want field %q rule %q", c.name, err, c.field, c.rule)
		}
	}
}

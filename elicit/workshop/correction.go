package workshop

import (
	"fmt"
	"slices"
	"strings"

	"github.com/parley-elicit/parley/elicit"
)

// Rules for corrections made after a workshop has started.
const (
	RuleLockedAfterAnswers elicit.Rule = "cannot change once experts have answered the question"
	// RuleLockedAfterPrior fixes the same fields of a question nobody
	// answered once a prior has been agreed for it (a quick prior, or a
	// consensus judgement read at its probabilities): the prior is on
	// the question's bounds, and a consensus means what it meant at the
	// probabilities it was given at. Study data, recorded only against
	// an agreed prior, are held by it too.
	RuleLockedAfterPrior elicit.Rule = "cannot change once a prior has been agreed for the question"
	RuleNothingChanged   elicit.Rule = "nothing to change"
	RuleArchived         elicit.Rule = "the workshop is archived"
	RuleHasAnswers       elicit.Rule = "the workshop has answers or agreed priors: archive it instead"
	// RuleRevealedCalibration and RuleRevealedTruth keep a question whose
	// true value has been shown to the experts a calibration question
	// with a true value: its reveal, the time and the answers it froze,
	// belongs to one (and the record refuses a reveal on any other).
	RuleRevealedCalibration elicit.Rule = "must stay ticked once the question's true value has been shown to the experts"
	RuleRevealedTruth       elicit.Rule = "must stay set once it has been shown to the experts (a new value can be shown from the calibration page)"
	// RuleScoredAtReveal keeps the answers a calibration question's reveal
	// froze: Cooke's classical model scored them as they stood then.
	RuleScoredAtReveal elicit.Rule = "cannot be withdrawn once the question's true value has been shown: the scores are fixed at the reveal"
)

// CheckWithdrawal reports whether revision rv, an answer to question q of
// workshop w (the caller has found it there), may be withdrawn with the
// given reason: the reason is required, the workshop must not be
// archived, the revision not already withdrawn, and the question not a
// calibration question whose true value has been shown (its answers were
// scored as they stood at the reveal). A revision of an earlier round may
// be withdrawn: the panel that round's feedback shows is corrected from
// then on.
func CheckWithdrawal(w Workshop, q Question, rv Revision, reason string) error {
	switch {
	case strings.TrimSpace(reason) == "":
		return inputErr("reason", elicit.RuleRequired, "")
	case w.Archived:
		return inputErr("action", RuleArchived, "bring the workshop back before withdrawing a judgement")
	case rv.Withdrawn:
		return inputErr("revision", RuleNothingChanged, "the judgement is already withdrawn")
	case q.Frozen():
		return inputErr("revision", RuleScoredAtReveal, "")
	}
	return nil
}

// CheckCorrection reports whether q may become next. Before any expert
// has answered, any part of a question may be corrected, within
// Question.Validate's rules. Once experts have answered, an answer means
// what it meant when it was given only if the bounds, the format, the
// probabilities, the bins and the chips stay as they were, and a
// calibration question stays one (or not); so then only the wording, the
// quantity and the units may change, and the first locked field that
// differs is named with RuleLockedAfterAnswers. Once its true value has
// been shown, a question stays a calibration question with a true value
// (RuleRevealedCalibration, RuleRevealedTruth). The ID, workshop,
// position and reveal state are not the correction's to change.
//
// An agreed prior fixes the same fields as answers do, named with
// RuleLockedAfterPrior (Recorded.Lock): a
// correction of the bounds under a prior left the prior on the old
// bounds and the workshop's exported record unreadable (found in
// review).
func (q Question) CheckCorrection(next Question, rec Recorded) error {
	check := next.Validate
	if slices.Equal(next.Probs, q.Probs) {
		// Probabilities asked before MinProbGap, kept as they were, do
		// not stop a correction of the wording.
		check = next.ValidateKept
	}
	if err := check(); err != nil {
		return err
	}
	if q.Frozen() {
		if !next.Calibration {
			return inputErr("calibration", RuleRevealedCalibration, "")
		}
		if next.TrueValue == nil {
			return inputErr("true_value", RuleRevealedTruth, "")
		}
	}
	if rule := rec.Lock(); rule != "" {
		locked := []struct {
			field   string
			changed bool
		}{
			{"lower", next.Lower != q.Lower},
			{"upper", next.Upper != q.Upper},
			{"format", next.Format != q.Format},
			{"probs", !slices.Equal(next.Probs, q.Probs)},
			{"bin_edges", !slices.Equal(next.BinEdges, q.BinEdges)},
			{"chips", next.Chips != q.Chips},
			{"calibration", next.Calibration != q.Calibration},
			{"true_value", !sameTruth(next.TrueValue, q.TrueValue)},
		}
		for _, l := range locked {
			if l.changed {
				return inputErr(l.field, rule, "")
			}
		}
	}
	if q.Corrected(next) == nil {
		return inputErr("wording", RuleNothingChanged, "the corrected question is the same as the question")
	}
	return nil
}

// Recorded is what the record holds against a question that fixes its
// scale: the experts' answers (revisions) and the priors agreed for it
// (study data are recorded only against an agreed prior).
type Recorded struct {
	Answers, Priors int
}

// Lock is the rule that fixes the question's bounds, format,
// probabilities, bins, chips and calibration: answers', or an agreed
// prior's where nobody answered; "" when it has neither and any part of
// it may be corrected.
func (r Recorded) Lock() elicit.Rule {
	switch {
	case r.Answers > 0:
		return RuleLockedAfterAnswers
	case r.Priors > 0:
		return RuleLockedAfterPrior
	}
	return ""
}

// Corrected lists the names of the fields in which next differs from q,
// in the order of the question form; nil when none does.
func (q Question) Corrected(next Question) []string {
	var out []string
	for _, f := range []struct {
		name    string
		changed bool
	}{
		{"wording", strings.TrimSpace(next.Wording) != strings.TrimSpace(q.Wording)},
		{"quantity", next.Quantity != q.Quantity},
		{"units", next.Units != q.Units},
		{"lower", next.Lower != q.Lower},
		{"upper", next.Upper != q.Upper},
		{"format", next.Format != q.Format},
		{"probs", !slices.Equal(next.Probs, q.Probs)},
		{"bin_edges", !slices.Equal(next.BinEdges, q.BinEdges)},
		{"chips", next.Chips != q.Chips},
		{"calibration", next.Calibration != q.Calibration},
		{"true_value", !sameTruth(next.TrueValue, q.TrueValue)},
	} {
		if f.changed {
			out = append(out, f.name)
		}
	}
	return out
}

func sameTruth(a, b *float64) bool {
	if a == nil || b == nil {
		return a == nil && b == nil
	}
	return *a == *b
}

// CheckReopen reports whether w's last closed round may be opened again:
// the round must be closed and the workshop not archived. Reopening keeps
// the round's number, so the experts' feedback stays that of the round
// before it.
func (w Workshop) CheckReopen() error {
	switch {
	case w.Archived:
		return inputErr("action", RuleArchived, "bring the workshop back before reopening a round")
	case w.Open:
		return inputErr("action", RuleRoundSequence, "round %d is open, so there is no closed round to reopen", w.Round)
	}
	return nil
}

// CheckReopenOf is CheckReopen for the round a page named: reopening
// round `round` is refused when w's last closed round is another, as a
// page from before a later round's close would ask.
func (w Workshop) CheckReopenOf(round int) error {
	if err := w.CheckReopen(); err != nil {
		return err
	}
	if round != w.Round {
		return inputErr("action", RuleRoundSequence, "the last closed round is %d, not %d", w.Round, round)
	}
	return nil
}

// StillAnswers checks, when an answer is saved, that a and its kept fit
// (nil when none is kept) answer q as q now stands. A question may be
// corrected in every part until its first answer is saved, so an answer
// checked, and fitted, against the question as a page showed it may meet
// a question corrected meanwhile. It is refused with ErrQuestionChanged
// when it breaks one of q's rules (the error carries the first, as an
// *elicit.InputError) or when its kept fit was not made on q's bounds,
// probabilities or bins: the points and probabilities the fit used must
// be those q and a state now, exactly, as Question.Fit makes them.
func (q Question) StillAnswers(a Answer, kept *elicit.Fit) error {
	if ps := q.Problems(a); len(ps) > 0 {
		return fmt.Errorf("%w: %w", ErrQuestionChanged, ps[0])
	}
	if kept == nil {
		return nil
	}
	var probs, points []float64
	switch q.Format {
	case FormatChips:
		points, probs = elicit.ChipsPoints(q.BinEdges, a.Counts)
	default:
		j, err := q.Judgement(a)
		if err != nil {
			return fmt.Errorf("%w: %w", ErrQuestionChanged, err)
		}
		probs, points = j.Probs, j.Values
	}
	if kept.Dist.Lower != q.Lower || kept.Dist.Upper != q.Upper || !slices.Equal(kept.Probs, probs) || !slices.Equal(kept.Stated, points) {
		return fmt.Errorf("%w: the kept fit is on [%v, %v] at other points or probabilities than the question's [%v, %v]",
			ErrQuestionChanged, kept.Dist.Lower, kept.Dist.Upper, q.Lower, q.Upper)
	}
	return nil
}

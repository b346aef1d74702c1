package workshop

import (
	"github.com/parley-elicit/parley/elicit"
)

// RuleRoundSequence is the rule for Delphi rounds: the open round is
// closed before the next one, numbered one higher, is opened.
const RuleRoundSequence elicit.Rule = "rounds run in sequence: close the open round, then open the next"

// MaxRounds is the most Delphi rounds a workshop may run. Delphi studies
// settle in two to four rounds (common practice, no source); the limit
// keeps a round number far from overflow, in the store and in a record.
const MaxRounds = 100

// CheckRoundChange reports whether w may move to round with the given open
// state: closing needs the current round open and round equal to it;
// opening needs the current round closed, round one past it and at most
// MaxRounds.
func (w Workshop) CheckRoundChange(round int, open bool) error {
	switch {
	case open && w.Round >= MaxRounds:
		return inputErr("round", elicit.RuleCountRange, "a workshop runs at most %d rounds", MaxRounds)
	case open && w.Archived:
		return inputErr("round", RuleArchived, "bring the workshop back before opening a round")
	case open && w.Open:
		return inputErr("round", RuleRoundSequence, "round %d is still open", w.Round)
	case open && round != w.Round+1:
		return inputErr("round", RuleRoundSequence, "the next round is %d, not %d", w.Round+1, round)
	case !open && !w.Open:
		return inputErr("round", RuleRoundSequence, "round %d is already closed", w.Round)
	case !open && round != w.Round:
		return inputErr("round", RuleRoundSequence, "the open round is %d, not %d", w.Round, round)
	}
	return nil
}

// RuleNothingAsked is the rule that a round closes only once it has asked
// something: a round closed with no question in use fed nothing back,
// and left the record a round nobody could answer.
const RuleNothingAsked elicit.Rule = "a round closes only once a question is in use"

// CheckCloseAsked reports whether the open round may close while the
// workshop has inUse questions in use (not retired).
func (w Workshop) CheckCloseAsked(inUse int) error {
	if inUse < 1 {
		return inputErr("round", RuleNothingAsked, "round %d has no question in use to answer: add one, or bring back a retired one, before closing it", w.Round)
	}
	return nil
}

// FeedbackRound is the round whose judgements are fed back to the panel
// during w's current round, or 0 when there is none (round 1). Delphi
// feedback is controlled: through round r every expert sees the panel as
// it stood when round r−1 closed, the same for all and fixed for the
// whole round, so no expert's view depends on who happened to revise
// first within the round.
func (w Workshop) FeedbackRound() int {
	if w.Round < 2 {
		return 0
	}
	return w.Round - 1
}

package elicit

// RuleRoundSequence is the rule for Delphi rounds: the open round is
// closed before the next one, numbered one higher, is opened.
const RuleRoundSequence Rule = "rounds run in sequence: close the open round, then open the next"

// CheckRoundChange reports whether w may move to round with the given open
// state: closing needs the current round open and round equal to it;
// opening needs the current round closed and round one past it.
func (w Workshop) CheckRoundChange(round int, open bool) error {
	switch {
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

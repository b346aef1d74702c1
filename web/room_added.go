package web

import (
	"strconv"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// addedAfterClose reports whether question qID was added to the workshop
// after round `round` last closed (its question_added event follows that
// round's last round_closed event in evs, oldest first), so that nobody
// could have answered it by that close. A question added mid-workshop
// had the room say "Nobody had answered this question when round 1
// closed." of a question that did not exist then, and count its first
// answers in round 2 as experts who had "revised" it.
func addedAfterClose(evs []workshop.Event, qID int64, round int) bool {
	closed, added := -1, -1
	for i, e := range evs {
		switch e.Kind {
		case workshop.EventRoundClosed:
			if r, ok := e.Round(); ok && r == round {
				closed = i
			}
		case workshop.EventQuestionAdded:
			if e.QuestionID == qID {
				added = i
			}
		}
	}
	return closed >= 0 && added > closed
}

// addedAfterNote is the room's note over a question added after round
// `round` closed, which nobody answered in that round or before.
func addedAfterNote(round int) string {
	r := strconv.Itoa(round)
	return "This question was added after round " + r + " closed, so nobody had answered it then. " +
		"The panel's answers appear here when round " + strconv.Itoa(round+1) + " closes."
}

// addedAfterExpertNote is the same account on an expert's question page,
// in the place of the other experts' answers from round `round`: "No
// other expert had answered this question when round 1 closed" read as
// if the others had passed over a question they were never asked. No
// next round is promised once the workshop is closed.
func addedAfterExpertNote(round int, archived bool) string {
	note := "This question was added after round " + strconv.Itoa(round) + " closed, so nobody had answered it then and there is nothing from the other experts to show"
	if archived {
		return note + "."
	}
	return note + " yet. Their round " + strconv.Itoa(round+1) + " answers can be shown here, without their names, if the facilitator opens round " + strconv.Itoa(round+2) + "."
}

package answersheet

import (
	"fmt"
	"slices"
	"strconv"
	"strings"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// RuleSameAsCurrent refuses a row that repeats the expert's current
// answer of the open round, values and reasoning alike.
const RuleSameAsCurrent elicit.Rule = "repeats the expert's current answer of this round, values and reasoning alike, so it would save nothing new: take the row out of the sheet"

// SameAsCurrent refuses rows that repeat, in the open round, the answer
// their expert already has to their question (cur, by workshop.Current),
// values and reasoning alike, naming the first and listing the others.
// The same sheet imported twice (a command run again, a file chosen
// again), or imported whole again after one row was put right, saved
// every row a second time: each expert's record then showed a judgement
// given twice that was given once, each saved again as the facilitator's.
// An answer of an earlier round repeated is a judgement of this round
// and is saved; so is a row whose reasoning differs.
func SameAsCurrent(rows []Row, cur map[workshop.Key]workshop.Revision, round int) error {
	var same []Row
	for _, row := range rows {
		rv, ok := cur[workshop.Key{Question: row.Question.ID, Expert: row.Expert.ID}]
		if ok && rv.Round == round && sameAnswer(rv.Answer, row.Answer) && strings.TrimSpace(rv.Reason) == row.Reason {
			same = append(same, row)
		}
	}
	if len(same) == 0 {
		return nil
	}
	first := same[0]
	rv := cur[workshop.Key{Question: first.Question.ID, Expert: first.Expert.ID}]
	who := "they saved it themselves"
	if rv.EnteredBy == workshop.ByFacilitator {
		who = "you entered it"
	}
	detail := fmt.Sprintf("%s's answer to Q%d is already this one: %s at %s", first.Expert.Name, first.Question.Position, who, rv.At.UTC().Format("2006-01-02 15:04 UTC"))
	if len(same) > 1 {
		lines := make([]string, len(same)-1)
		for i, r := range same[1:] {
			lines[i] = strconv.Itoa(r.Line)
		}
		if len(lines) == 1 {
			detail += "; row " + lines[0] + " repeats a current answer too"
		} else {
			detail += "; rows " + listed(lines) + " repeat current answers too"
		}
	}
	return rowErr(first.Line, "question", RuleSameAsCurrent, "%s", detail)
}

// sameAnswer says two answers hold the same judgement, however its
// values were typed (5% or 0.05).
func sameAnswer(a, b workshop.Answer) bool {
	return slices.Equal(a.Values, b.Values) && slices.Equal(a.Counts, b.Counts) &&
		a.Lowest == b.Lowest && a.Highest == b.Highest && a.Best == b.Best && a.Confidence == b.Confidence
}

// listed writes "3", "3 and 5", "3, 5 and 8".
func listed(s []string) string {
	if len(s) == 1 {
		return s[0]
	}
	return strings.Join(s[:len(s)-1], ", ") + " and " + s[len(s)-1]
}

package answersheet

import (
	"slices"
	"strings"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// Changes are a sheet's rows read against the experts' current answers
// of the open round: the rows to save, and the rows that repeat their
// expert's current answer, values and reasoning alike, which are left
// out. Both keep the sheet's order.
type Changes struct {
	Save      []Row
	Unchanged []Row
}

// Against sorts rows into Changes by the answer their expert already has
// to their question (cur, by workshop.Current) in round. A sheet imported
// again after one row was put right was refused as a whole, naming every
// row that repeated its current answer, so the facilitator had to take 39
// rows out of a 40-row sheet to save one; saved, such rows would have
// recorded a judgement given once as given twice. An answer of an earlier
// round repeated is a judgement of this round and is saved; so is a row
// whose reasoning differs.
//
// A row whose reason cell is empty keeps the reasoning saved with the
// expert's current answer of the round, as the facilitator's entry form
// does: a row correcting a mistyped value left the expert's current
// answer, the one the feedback, the reasons page and the room show,
// without its reasoning. A reasoning withheld from the feedback is not
// carried (saved again, it would be shown), nor one of an earlier round,
// which the expert has not restated. A row whose clear_reason cell says
// yes (Row.ReasonCleared) keeps nothing: it is saved without reasoning,
// as an entry whose box the facilitator emptied.
func Against(rows []Row, cur map[workshop.Key]workshop.Revision, round int) Changes {
	var c Changes
	for _, row := range rows {
		rv, ok := cur[workshop.Key{Question: row.Question.ID, Expert: row.Expert.ID}]
		if ok && rv.Round == round && row.Reason == "" && !row.ReasonCleared && strings.TrimSpace(rv.Reason) != "" {
			if rv.ReasonWithheld {
				row.ReasonNotCarried = true
			} else {
				row.Reason, row.ReasonCarried = rv.Reason, true
			}
		}
		if ok && rv.Round == round && sameAnswer(rv.Answer, row.Answer) && strings.TrimSpace(rv.Reason) == strings.TrimSpace(row.Reason) {
			c.Unchanged = append(c.Unchanged, row)
			continue
		}
		c.Save = append(c.Save, row)
	}
	return c
}

// sameAnswer says two answers hold the same judgement, however its
// values were typed (5% or 0.05).
func sameAnswer(a, b workshop.Answer) bool {
	return slices.Equal(a.Values, b.Values) && slices.Equal(a.Counts, b.Counts) &&
		a.Lowest == b.Lowest && a.Highest == b.Highest && a.Best == b.Best && a.Confidence == b.Confidence
}

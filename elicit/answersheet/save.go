package answersheet

import (
	"errors"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// Saving a sheet is the store's (SaveImportedRevisions, all rows in one
// transaction or none); what it saves, and what its refusal means for the
// facilitator, are here.

// Revisions are the rows as revisions the facilitator entered from the
// given channel, each keeping the fit its row was read with.
func Revisions(rows []Row, channel workshop.Channel) []workshop.Revision {
	out := make([]workshop.Revision, len(rows))
	for i, r := range rows {
		out[i] = workshop.Revision{QuestionID: r.Question.ID, ExpertID: r.Expert.ID, Reason: r.Reason, Answer: r.Answer,
			EnteredBy: workshop.ByFacilitator, Channel: channel, Kept: &rows[i].Fit}
	}
	return out
}

// Import is the decision log's account of saving rows from file: the
// sheet's SHA-256 and name, and each revision's row.
func Import(rows []Row, channel workshop.Channel, file File) workshop.SheetImport {
	imp := workshop.SheetImport{SHA256: file.SHA256(), Name: file.Name, Rows: make([]int, len(rows)), Channel: channel}
	for i, r := range rows {
		imp.Rows[i] = r.Line
	}
	return imp
}

// RoundClosed refuses rows because the workshop's round is closed, at the
// first row (rows is not empty: Read returns at least one).
func RoundClosed(round int, rows []Row) error {
	return rowErr(rows[0].Line, "question", RuleRound, "round %d is closed", round)
}

// RefusalAtRow names the row a store's refusal of the rows' revisions
// concerns (the round closed, a question revealed, retired or corrected,
// an expert revoked since the sheet was read): the store returns a
// *workshop.RevisionRefused naming the revision, which wraps the
// workshop's sentinel error. Any other error, and nil, come back as they
// are; round is the workshop's.
func RefusalAtRow(err error, round int, rows []Row) error {
	var rr *workshop.RevisionRefused
	if !errors.As(err, &rr) || rr.Index < 0 || rr.Index >= len(rows) {
		return err
	}
	i := rr.Index
	line := rows[i].Line
	switch {
	case errors.Is(err, workshop.ErrRoundClosed):
		return rowErr(line, "question", RuleRound, "round %d is closed", round)
	case errors.Is(err, workshop.ErrAnswersFrozen):
		return rowErr(line, "question", RuleQuestion, "Q%d's true value has been revealed, so its answers are final", rows[i].Question.Position)
	case errors.Is(err, workshop.ErrRetired):
		return rowErr(line, "question", RuleQuestion, "Q%d is retired", rows[i].Question.Position)
	case errors.Is(err, workshop.ErrQuestionChanged):
		return rowErr(line, "question", RuleChanged, "Q%d", rows[i].Question.Position)
	case errors.Is(err, workshop.ErrRevoked), errors.Is(err, workshop.ErrNotFound):
		return rowErr(line, "expert", RuleExpert, "%s", rows[i].Expert.Name)
	}
	return err
}

package web

import (
	"context"

	"github.com/parley-elicit/parley/elicit/answersheet"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// SaveSheet saves the rows of an answer sheet (answersheet.Read) as revisions
// the facilitator entered from channel, all in one transaction or none.
// A refusal by the store (the round closed, a question revealed or
// retired, an expert revoked since the sheet was read) comes back naming
// the row it concerns (answersheet.RefusalAtRow).
func SaveSheet(ctx context.Context, st Store, ws workshop.Workshop, rows []answersheet.Row, channel workshop.Channel, from answersheet.File) error {
	if !ws.Open && len(rows) > 0 {
		return answersheet.RoundClosed(ws.Round, rows)
	}
	err := st.SaveImportedRevisions(ctx, ws.ID, answersheet.Revisions(rows, channel), answersheet.Import(rows, channel, from))
	return answersheet.RefusalAtRow(err, ws.Round, rows)
}

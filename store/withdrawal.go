package store

import (
	"context"
	"database/sql"
	"encoding/json"
	"errors"
	"fmt"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// WithdrawRevision withdraws revision revisionID of workshop workshopID
// under workshop.CheckWithdrawal, with its revision_withdrawn event, in
// one transaction: the revision stays, marked, and is nobody's current
// answer from then on. A revision of another workshop is not found.
func (db *DB) WithdrawRevision(ctx context.Context, workshopID, revisionID int64, reason string) error {
	return db.write(ctx, func(tx *sql.Tx) error {
		var questionID, expertID int64
		var round int
		var withdrawn bool
		err := tx.QueryRowContext(ctx,
			`SELECT r.question_id, r.expert_id, r.round, EXISTS (SELECT 1 FROM withdrawals x WHERE x.revision_id = r.id)
			 FROM revisions r JOIN questions q ON q.id = r.question_id
			 WHERE r.id = ? AND q.workshop_id = ?`, revisionID, workshopID).Scan(&questionID, &expertID, &round, &withdrawn)
		if errors.Is(err, sql.ErrNoRows) {
			return notFound("revision", revisionID)
		}
		if err != nil {
			return fmt.Errorf("store: withdraw revision: %w", err)
		}
		w, err := scanWorkshop(tx.QueryRowContext(ctx, `SELECT `+workshopColumns+` FROM workshops WHERE id = ?`, workshopID))
		if err != nil {
			return fmt.Errorf("store: withdraw revision: %w", err)
		}
		q, err := questionInTx(ctx, tx, questionID)
		if err != nil {
			return err
		}
		rv := workshop.Revision{ID: revisionID, QuestionID: questionID, ExpertID: expertID, Round: round, Withdrawn: withdrawn}
		if err := workshop.CheckWithdrawal(w, q, rv, reason); err != nil {
			return err
		}
		at, err := db.stamp(ctx, tx, workshopID)
		if err != nil {
			return err
		}
		if _, err := tx.ExecContext(ctx, `INSERT INTO withdrawals (revision_id, reason, at) VALUES (?, ?, ?)`,
			revisionID, reason, formatTime(at)); err != nil {
			return fmt.Errorf("store: withdraw revision: %w", err)
		}
		detail, err := json.Marshal(workshop.Withdrawal{RevisionID: revisionID, ExpertID: expertID, Round: round})
		if err != nil {
			return fmt.Errorf("store: withdraw revision: %w", err)
		}
		return insertEvent(ctx, tx, workshop.Event{
			WorkshopID: workshopID, QuestionID: questionID, Kind: workshop.EventRevisionWithdrawn, At: at, Reason: reason,
			Detail: string(detail),
		})
	})
}

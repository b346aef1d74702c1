package store

import (
	"context"
	"database/sql"
	"encoding/json"
	"errors"
	"fmt"
	"slices"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// Corrections a facilitator makes after a workshop has started. Each is
// one transaction that changes the row and records its event with the
// reason, so the record keeps what was there before.

// Recorded returns what the record holds against the question that
// fixes its scale: the experts' revisions and the agreed priors
// (workshop.Recorded.Lock).
func (db *DB) Recorded(ctx context.Context, questionID int64) (workshop.Recorded, error) {
	return recordedFor(ctx, db.r, questionID)
}

// recordedFor counts a question's answers and agreed priors.
func recordedFor(ctx context.Context, q querier, questionID int64) (workshop.Recorded, error) {
	var r workshop.Recorded
	err := q.QueryRowContext(ctx, `SELECT
		(SELECT COUNT(*) FROM revisions WHERE question_id = ?1),
		(SELECT COUNT(*) FROM agreed_priors WHERE question_id = ?1)`, questionID).Scan(&r.Answers, &r.Priors)
	if err != nil {
		return r, fmt.Errorf("store: what is recorded for question %d: %w", questionID, err)
	}
	return r, nil
}

// questionChange is an EventQuestionEdited's detail: the changed fields
// as they were and as they became (a true value not yet revealed is
// named in Fields only).
type questionChange struct {
	Fields []string        `json:"fields"`
	Before json.RawMessage `json:"before"`
	After  json.RawMessage `json:"after"`
}

// EditQuestion corrects question q.ID to q's definition, under
// workshop.Question.CheckCorrection: with no answers any part may change;
// once answered only the wording, quantity and units. The answered check
// and the update are one transaction, so an answer cannot slip in between.
// The event keeps the changed fields before and after.
func (db *DB) EditQuestion(ctx context.Context, q workshop.Question, reason string) error {
	probs, err := marshalList(q.Probs)
	if err != nil {
		return err
	}
	edges, err := marshalList(q.BinEdges)
	if err != nil {
		return err
	}
	return db.write(ctx, func(tx *sql.Tx) error {
		old, err := questionInTx(ctx, tx, q.ID)
		if err != nil {
			return err
		}
		rec, err := recordedFor(ctx, tx, q.ID)
		if err != nil {
			return err
		}
		// What the correction may not touch comes from the stored row.
		// The scale is set on the calibration page (SetLogScale); a
		// correction keeps it and is held to it.
		q.WorkshopID, q.Position, q.Revealed, q.RevealedAt, q.RevealedThrough, q.Retired, q.LogScale =
			old.WorkshopID, old.Position, old.Revealed, old.RevealedAt, old.RevealedThrough, old.Retired, old.LogScale
		if err := old.CheckCorrection(q, rec); err != nil {
			return err
		}
		if _, err := tx.ExecContext(ctx,
			`UPDATE questions SET wording = ?, quantity = ?, units = ?, lower = ?, upper = ?, format = ?,
			 probs = ?, bin_edges = ?, chips = ?, calibration = ?, true_value = ? WHERE id = ?`,
			q.Wording, q.Quantity, q.Units, q.Lower, q.Upper, string(q.Format),
			probs, edges, q.Chips, boolInt(q.Calibration), nullFloat(q.TrueValue), q.ID); err != nil {
			return fmt.Errorf("store: edit question: %w", err)
		}
		fields := old.Corrected(q)
		// A true value not yet revealed stays out of the record, as it
		// does when entered on its own (EventTruthEntered): the event
		// names the field but not its values.
		shown := fields
		if !old.Revealed {
			shown = slices.DeleteFunc(slices.Clone(fields), func(f string) bool { return f == "true_value" })
		}
		detail, err := json.Marshal(questionChange{Fields: fields, Before: old.Fields(shown), After: q.Fields(shown)})
		if err != nil {
			return fmt.Errorf("store: edit question: %w", err)
		}
		at, err := db.stamp(ctx, tx, old.WorkshopID)
		if err != nil {
			return err
		}
		return insertEvent(ctx, tx, workshop.Event{
			WorkshopID: old.WorkshopID, QuestionID: q.ID, Kind: workshop.EventQuestionEdited,
			At: at, Reason: reason, Detail: string(detail),
		})
	})
}

// SetQuestionRetired retires a question (hidden from experts, left out of
// pools and scores, kept in the record) or brings it back, with its event.
func (db *DB) SetQuestionRetired(ctx context.Context, questionID int64, retired bool, reason string) error {
	return db.write(ctx, func(tx *sql.Tx) error {
		q, err := questionInTx(ctx, tx, questionID)
		if err != nil {
			return err
		}
		if q.Retired == retired {
			state := "in use"
			if retired {
				state = "retired"
			}
			return &elicit.InputError{Field: "action", Rule: workshop.RuleNothingChanged, Detail: "the question is already " + state}
		}
		if _, err := tx.ExecContext(ctx, `UPDATE questions SET retired = ? WHERE id = ?`, boolInt(retired), questionID); err != nil {
			return fmt.Errorf("store: retire question: %w", err)
		}
		kind := workshop.EventQuestionRestored
		if retired {
			kind = workshop.EventQuestionRetired
		}
		at, err := db.stamp(ctx, tx, q.WorkshopID)
		if err != nil {
			return err
		}
		return insertEvent(ctx, tx, workshop.Event{WorkshopID: q.WorkshopID, QuestionID: questionID, Kind: kind, At: at, Reason: reason})
	})
}

// ReopenRound opens the workshop's last closed round again (the same
// round number), under workshop.Workshop.CheckReopen, with its event.
func (db *DB) ReopenRound(ctx context.Context, workshopID int64, reason string) error {
	return db.write(ctx, func(tx *sql.Tx) error {
		w, err := scanWorkshop(tx.QueryRowContext(ctx, `SELECT `+workshopColumns+` FROM workshops WHERE id = ?`, workshopID))
		if errors.Is(err, sql.ErrNoRows) {
			return notFound("workshop", workshopID)
		}
		if err != nil {
			return err
		}
		if err := w.CheckReopen(); err != nil {
			return err
		}
		if _, err := tx.ExecContext(ctx, `UPDATE workshops SET round_open = 1 WHERE id = ?`, workshopID); err != nil {
			return fmt.Errorf("store: reopen round: %w", err)
		}
		at, err := db.stamp(ctx, tx, workshopID)
		if err != nil {
			return err
		}
		return insertEvent(ctx, tx, workshop.Event{
			WorkshopID: workshopID, Kind: workshop.EventRoundReopened, At: at, Reason: reason,
			Detail: fmt.Sprintf(`{"round":%d}`, w.Round),
		})
	})
}

// SetArchived archives a workshop (closing its open round first, with
// that event too) or brings it back with its round closed.
func (db *DB) SetArchived(ctx context.Context, workshopID int64, archived bool, reason string) error {
	return db.write(ctx, func(tx *sql.Tx) error {
		w, err := scanWorkshop(tx.QueryRowContext(ctx, `SELECT `+workshopColumns+` FROM workshops WHERE id = ?`, workshopID))
		if errors.Is(err, sql.ErrNoRows) {
			return notFound("workshop", workshopID)
		}
		if err != nil {
			return err
		}
		if w.Archived == archived {
			state := "in use"
			if archived {
				state = "archived"
			}
			return &elicit.InputError{Field: "action", Rule: workshop.RuleNothingChanged, Detail: "the workshop is already " + state}
		}
		at, err := db.stamp(ctx, tx, workshopID)
		if err != nil {
			return err
		}
		if archived && w.Open {
			if _, err := tx.ExecContext(ctx, `UPDATE workshops SET round_open = 0 WHERE id = ?`, workshopID); err != nil {
				return fmt.Errorf("store: archive: %w", err)
			}
			if err := insertEvent(ctx, tx, workshop.Event{
				WorkshopID: workshopID, Kind: workshop.EventRoundClosed, At: at, Reason: "closed to archive the workshop",
				Detail: fmt.Sprintf(`{"round":%d}`, w.Round),
			}); err != nil {
				return err
			}
		}
		if _, err := tx.ExecContext(ctx, `UPDATE workshops SET archived = ? WHERE id = ?`, boolInt(archived), workshopID); err != nil {
			return fmt.Errorf("store: archive: %w", err)
		}
		kind := workshop.EventWorkshopRestored
		if archived {
			kind = workshop.EventWorkshopArchived
		}
		return insertEvent(ctx, tx, workshop.Event{WorkshopID: workshopID, Kind: kind, At: at, Reason: reason})
	})
}

// DeleteWorkshop removes a workshop that has no answers and no agreed
// priors, with its questions, panel, events and weight sets, leaving a
// row in workshop_deletions with its title, time and reason. A workshop
// with answers or agreed priors is refused (workshop.RuleHasAnswers): it is
// archived instead, since its record must stay whole. The append-only
// triggers let a workshop's events and weight sets go only while its
// deletion row is pending, inside this transaction.
func (db *DB) DeleteWorkshop(ctx context.Context, workshopID int64, reason string) error {
	return db.write(ctx, func(tx *sql.Tx) error {
		w, err := scanWorkshop(tx.QueryRowContext(ctx, `SELECT `+workshopColumns+` FROM workshops WHERE id = ?`, workshopID))
		if errors.Is(err, sql.ErrNoRows) {
			return notFound("workshop", workshopID)
		}
		if err != nil {
			return err
		}
		var answers, priors int
		if err := tx.QueryRowContext(ctx,
			`SELECT (SELECT COUNT(*) FROM revisions r JOIN questions q ON q.id = r.question_id WHERE q.workshop_id = ?),
			        (SELECT COUNT(*) FROM agreed_priors p JOIN questions q ON q.id = p.question_id WHERE q.workshop_id = ?)`,
			workshopID, workshopID).Scan(&answers, &priors); err != nil {
			return fmt.Errorf("store: delete workshop: %w", err)
		}
		if answers > 0 || priors > 0 {
			return &elicit.InputError{Field: "action", Rule: workshop.RuleHasAnswers,
				Detail: fmt.Sprintf("%d answers, %d agreed priors", answers, priors)}
		}
		res, err := tx.ExecContext(ctx,
			`INSERT INTO workshop_deletions (workshop_id, title, reason, at, pending) VALUES (?, ?, ?, ?, 1)`,
			workshopID, w.Title, reason, formatTime(now()))
		if err != nil {
			return fmt.Errorf("store: delete workshop: %w", err)
		}
		mark, _ := res.LastInsertId()
		for _, stmt := range []string{
			`DELETE FROM events WHERE workshop_id = ?`,
			`DELETE FROM weight_sets WHERE workshop_id = ?`,
			`DELETE FROM questions WHERE workshop_id = ?`,
			`DELETE FROM experts WHERE workshop_id = ?`,
			`DELETE FROM panel_salts WHERE workshop_id = ?`,
			`DELETE FROM fact_clock WHERE workshop_id = ?`,
			`DELETE FROM workshops WHERE id = ?`,
		} {
			if _, err := tx.ExecContext(ctx, stmt, workshopID); err != nil {
				return fmt.Errorf("store: delete workshop: %w", err)
			}
		}
		if _, err := tx.ExecContext(ctx, `UPDATE workshop_deletions SET pending = 0 WHERE id = ?`, mark); err != nil {
			return fmt.Errorf("store: delete workshop: %w", err)
		}
		return nil
	})
}

// DeletedWorkshops lists the workshops deleted from this database, oldest
// first.
func (db *DB) DeletedWorkshops(ctx context.Context) ([]workshop.DeletedWorkshop, error) {
	rows, err := db.r.QueryContext(ctx,
		`SELECT workshop_id, title, reason, at FROM workshop_deletions WHERE pending = 0 ORDER BY id`)
	if err != nil {
		return nil, fmt.Errorf("store: deleted workshops: %w", err)
	}
	defer rows.Close()
	var out []workshop.DeletedWorkshop
	for rows.Next() {
		var (
			d  workshop.DeletedWorkshop
			at string
		)
		if err := rows.Scan(&d.WorkshopID, &d.Title, &d.Reason, &at); err != nil {
			return nil, fmt.Errorf("store: deleted workshops: %w", err)
		}
		if d.At, err = parseTime(at); err != nil {
			return nil, err
		}
		out = append(out, d)
	}
	return out, rows.Err()
}

// SetReasonWithheld withholds a revision's reason from the experts' round
// feedback (and the room view), or shows it again, with its event. The
// reason itself stays in the record.
func (db *DB) SetReasonWithheld(ctx context.Context, revisionID int64, withheld bool, reason string) error {
	if reason == "" {
		return &elicit.InputError{Field: "reason", Rule: elicit.RuleRequired}
	}
	return db.write(ctx, func(tx *sql.Tx) error {
		var (
			workshopID, questionID int64
			text                   string
			current                int
		)
		err := tx.QueryRowContext(ctx,
			`SELECT q.workshop_id, r.question_id, r.reason,
			        COALESCE((SELECT d.withheld FROM reason_decisions d WHERE d.revision_id = r.id ORDER BY d.id DESC LIMIT 1), 0)
			 FROM revisions r JOIN questions q ON q.id = r.question_id WHERE r.id = ?`, revisionID).
			Scan(&workshopID, &questionID, &text, &current)
		if errors.Is(err, sql.ErrNoRows) {
			return notFound("revision", revisionID)
		}
		if err != nil {
			return fmt.Errorf("store: withhold reason: %w", err)
		}
		if text == "" {
			return &elicit.InputError{Field: "revision", Rule: workshop.RuleNothingChanged, Detail: "the revision has no reason"}
		}
		if (current == 1) == withheld {
			return &elicit.InputError{Field: "action", Rule: workshop.RuleNothingChanged, Detail: "the reason is already " + map[bool]string{true: "withheld", false: "shown"}[withheld]}
		}
		at, err := db.stamp(ctx, tx, workshopID)
		if err != nil {
			return err
		}
		if _, err := tx.ExecContext(ctx, `INSERT INTO reason_decisions (revision_id, withheld, reason, at) VALUES (?, ?, ?, ?)`,
			revisionID, boolInt(withheld), reason, formatTime(at)); err != nil {
			return fmt.Errorf("store: withhold reason: %w", err)
		}
		kind := workshop.EventReasonReleased
		if withheld {
			kind = workshop.EventReasonWithheld
		}
		return insertEvent(ctx, tx, workshop.Event{
			WorkshopID: workshopID, QuestionID: questionID, Kind: kind, At: at, Reason: reason,
			Detail: fmt.Sprintf(`{"revision_id":%d}`, revisionID),
		})
	})
}

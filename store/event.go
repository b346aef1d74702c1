package store

import (
	"context"
	"database/sql"
	"fmt"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// insertEvent writes one event inside the transaction of the decision it
// records.
func insertEvent(ctx context.Context, tx *sql.Tx, e workshop.Event) error {
	return insertEventAs(ctx, tx, e, 0)
}

// insertEventAs writes one event with the given id (an import keeping
// the record's ids), or numbered by SQLite when id is 0.
func insertEventAs(ctx context.Context, tx *sql.Tx, e workshop.Event, id int64) error {
	var question any
	if e.QuestionID != 0 {
		question = e.QuestionID
	}
	q, args := withID(`INSERT INTO events (workshop_id, question_id, kind, at, reason, detail) VALUES (?, ?, ?, ?, ?, ?)`, id,
		e.WorkshopID, question, string(e.Kind), formatTime(e.At), e.Reason, e.Detail)
	_, err := tx.ExecContext(ctx, q, args...)
	if err != nil {
		return fmt.Errorf("store: record %s: %w", e.Kind, err)
	}
	return nil
}

// Events returns a workshop's events, oldest first.
func (db *DB) Events(ctx context.Context, workshopID int64) ([]workshop.Event, error) {
	return readEvents(ctx, db.r, workshopID)
}

func readEvents(ctx context.Context, db querier, workshopID int64) ([]workshop.Event, error) {
	rows, err := db.QueryContext(ctx,
		`SELECT id, workshop_id, question_id, kind, at, reason, detail FROM events
		 WHERE workshop_id = ? ORDER BY id`, workshopID)
	if err != nil {
		return nil, fmt.Errorf("store: events: %w", err)
	}
	defer rows.Close()
	var es []workshop.Event
	for rows.Next() {
		var (
			e        workshop.Event
			question sql.NullInt64
			kind, at string
		)
		if err := rows.Scan(&e.ID, &e.WorkshopID, &question, &kind, &at, &e.Reason, &e.Detail); err != nil {
			return nil, fmt.Errorf("store: read event: %w", err)
		}
		e.QuestionID, e.Kind = question.Int64, workshop.EventKind(kind)
		if e.At, err = parseTime(at); err != nil {
			return nil, err
		}
		es = append(es, e)
	}
	return es, rows.Err()
}

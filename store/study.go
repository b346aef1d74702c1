package store

import (
	"context"
	"database/sql"
	"encoding/json"
	"errors"
	"fmt"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// RecordData adds one batch of observed data to a question with an agreed
// prior, with EventDataRecorded, in one transaction. The batch must keep
// workshop.StudyData's rules, and the question's batches together at most
// elicit.MaxUpdateTrials trials (workshop.CheckDataTotal); a question
// without an agreed prior is refused with an error wrapping
// workshop.ErrNoAgreedPrior, and so is a batch after which the current
// agreed prior could not be updated (workshop.CheckDataUpdate). It sets
// d's ID and At.
func (db *DB) RecordData(ctx context.Context, d *workshop.StudyData) error {
	if err := d.Validate(); err != nil {
		return err
	}
	return db.write(ctx, func(tx *sql.Tx) error {
		workshopID, err := questionWorkshop(ctx, tx, d.QuestionID)
		if err != nil {
			return err
		}
		at, err := db.stamp(ctx, tx, workshopID) // in the writer's turn (SaveRevision)
		if err != nil {
			return err
		}
		if err := d.CheckObservedBy(at); err != nil {
			return err
		}
		// The current agreed prior is the question's latest (questionState.current).
		var prior elicit.Beta
		err = tx.QueryRowContext(ctx, `SELECT alpha, beta FROM agreed_priors WHERE question_id = ? ORDER BY id DESC LIMIT 1`, d.QuestionID).
			Scan(&prior.Alpha, &prior.Beta)
		if errors.Is(err, sql.ErrNoRows) {
			return fmt.Errorf("store: record data for question %d: %w", d.QuestionID, workshop.ErrNoAgreedPrior)
		}
		if err != nil {
			return fmt.Errorf("store: record data: %w", err)
		}
		var successes, recorded int
		if err := tx.QueryRowContext(ctx, `SELECT COALESCE(SUM(successes), 0), COALESCE(SUM(trials), 0) FROM study_data WHERE question_id = ?`, d.QuestionID).
			Scan(&successes, &recorded); err != nil {
			return fmt.Errorf("store: record data: %w", err)
		}
		if err := workshop.CheckDataTotal(recorded, *d); err != nil {
			return err
		}
		if err := workshop.CheckDataUpdate(prior, successes, recorded, *d); err != nil {
			return err
		}
		stored := *d
		stored.At = at
		id, err := insertData(ctx, tx, stored, 0)
		if err != nil {
			return err
		}
		detail, _ := json.Marshal(struct {
			Successes  int    `json:"successes"`
			Trials     int    `json:"trials"`
			ObservedOn string `json:"observed_on"`
		}{d.Successes, d.Trials, d.ObservedOn})
		if err := insertEvent(ctx, tx, workshop.Event{
			WorkshopID: workshopID, QuestionID: d.QuestionID, Kind: workshop.EventDataRecorded,
			At: at, Reason: d.Source, Detail: string(detail),
		}); err != nil {
			return err
		}
		d.ID, d.At = id, at
		return nil
	})
}

func insertData(ctx context.Context, tx *sql.Tx, d workshop.StudyData, id int64) (int64, error) {
	q, args := withID(`INSERT INTO study_data (question_id, successes, trials, source, observed_on, at) VALUES (?, ?, ?, ?, ?, ?)`, id,
		d.QuestionID, d.Successes, d.Trials, d.Source, d.ObservedOn, formatTime(d.At))
	res, err := tx.ExecContext(ctx, q, args...)
	if err != nil {
		return 0, fmt.Errorf("store: record data: %w", err)
	}
	return res.LastInsertId()
}

// StudyData returns every batch of data recorded on a workshop's
// questions, oldest first.
func (db *DB) StudyData(ctx context.Context, workshopID int64) ([]workshop.StudyData, error) {
	return readStudyData(ctx, db.r, workshopID)
}

func readStudyData(ctx context.Context, db querier, workshopID int64) ([]workshop.StudyData, error) {
	rows, err := db.QueryContext(ctx,
		`SELECT d.id, d.question_id, d.successes, d.trials, d.source, d.observed_on, d.at
		 FROM study_data d JOIN questions q ON q.id = d.question_id
		 WHERE q.workshop_id = ? ORDER BY d.id`, workshopID)
	if err != nil {
		return nil, fmt.Errorf("store: study data: %w", err)
	}
	defer rows.Close()
	var out []workshop.StudyData
	for rows.Next() {
		var (
			d  workshop.StudyData
			at string
		)
		if err := rows.Scan(&d.ID, &d.QuestionID, &d.Successes, &d.Trials, &d.Source, &d.ObservedOn, &at); err != nil {
			return nil, fmt.Errorf("store: read study data: %w", err)
		}
		if d.At, err = parseTime(at); err != nil {
			return nil, err
		}
		out = append(out, d)
	}
	return out, rows.Err()
}

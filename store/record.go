package store

import (
	"context"
	"fmt"
	"time"

	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// Source reads everything a record of the workshop is built from, in one
// read transaction, so the parts agree with each other even while experts
// are saving.
func (db *DB) Source(ctx context.Context, workshopID int64) (workshop.Snapshot, error) {
	var src workshop.Snapshot
	tx, err := db.r.BeginTx(ctx, nil)
	if err != nil {
		return src, fmt.Errorf("store: begin read: %w", err)
	}
	defer tx.Rollback() // read-only: nothing to commit
	if src.Workshop, err = readWorkshop(ctx, tx, workshopID); err != nil {
		return src, err
	}
	if src.Questions, err = readQuestions(ctx, tx, workshopID); err != nil {
		return src, err
	}
	if src.Experts, err = readExperts(ctx, tx, workshopID); err != nil {
		return src, err
	}
	if src.Revisions, err = readRevisions(ctx, tx, workshopID); err != nil {
		return src, err
	}
	if src.Weights, err = readWeights(ctx, tx, workshopID); err != nil {
		return src, err
	}
	if src.WeightHistory, err = readWeightHistory(ctx, tx, workshopID); err != nil {
		return src, err
	}
	if src.Priors, err = readPriors(ctx, tx, workshopID); err != nil {
		return src, err
	}
	if src.Data, err = readStudyData(ctx, tx, workshopID); err != nil {
		return src, err
	}
	src.Events, err = readEvents(ctx, tx, workshopID)
	return src, err
}

// Record builds the workshop's export document as of now.
func (db *DB) Record(ctx context.Context, workshopID int64, now time.Time) (record.Record, error) {
	src, err := db.Source(ctx, workshopID)
	if err != nil {
		return record.Record{}, err
	}
	return record.Build(src, now)
}

// RecordHistory builds the workshop's record without the panels
// (record.BuildHistory), for the revision and priors CSVs.
func (db *DB) RecordHistory(ctx context.Context, workshopID int64, now time.Time) (record.Record, error) {
	src, err := db.Source(ctx, workshopID)
	if err != nil {
		return record.Record{}, err
	}
	return record.BuildHistory(src, now)
}

package store

import (
	"context"
	"database/sql"
	"errors"
	"fmt"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

const expertColumns = `id, workshop_id, name, affiliation, expertise, revoked, created`

// AddExpert adds e to its workshop's panel with the hash of their access
// token, recording EventExpertAdded. It sets e's ID and Created.
func (db *DB) AddExpert(ctx context.Context, e *workshop.Expert, tokenHash []byte) error {
	if len(tokenHash) == 0 {
		return &elicit.InputError{Field: "token_hash", Rule: elicit.RuleRequired}
	}
	return db.write(ctx, func(tx *sql.Tx) error {
		if err := workshopExists(ctx, tx, e.WorkshopID); err != nil {
			return err
		}
		created, err := db.stamp(ctx, tx, e.WorkshopID) // in the writer's turn (SaveRevision)
		if err != nil {
			return err
		}
		res, err := tx.ExecContext(ctx,
			`INSERT INTO experts (workshop_id, name, affiliation, expertise, token_hash, revoked, created)
			 VALUES (?, ?, ?, ?, ?, 0, ?)`,
			e.WorkshopID, e.Name, e.Affiliation, e.Expertise, tokenHash, formatTime(created))
		if err != nil {
			return fmt.Errorf("store: add expert: %w", err)
		}
		id, err := res.LastInsertId()
		if err != nil {
			return fmt.Errorf("store: add expert: %w", err)
		}
		added := *e
		added.ID = id
		if err := insertEvent(ctx, tx, workshop.Event{
			WorkshopID: e.WorkshopID, Kind: workshop.EventExpertAdded, At: created,
			Detail: added.AddedDetail(),
		}); err != nil {
			return err
		}
		e.ID, e.Created, e.Revoked = id, created, false
		return nil
	})
}

// Expert returns the expert with the given ID, revoked or not.
func (db *DB) Expert(ctx context.Context, id int64) (workshop.Expert, error) {
	e, err := scanExpert(db.r.QueryRowContext(ctx, `SELECT `+expertColumns+` FROM experts WHERE id = ?`, id))
	if errors.Is(err, sql.ErrNoRows) {
		return e, notFound("expert", id)
	}
	return e, err
}

// Experts returns a workshop's panel in the order they were added.
func (db *DB) Experts(ctx context.Context, workshopID int64) ([]workshop.Expert, error) {
	return readExperts(ctx, db.r, workshopID)
}

func readExperts(ctx context.Context, db querier, workshopID int64) ([]workshop.Expert, error) {
	rows, err := db.QueryContext(ctx,
		`SELECT `+expertColumns+` FROM experts WHERE workshop_id = ? ORDER BY id`, workshopID)
	if err != nil {
		return nil, fmt.Errorf("store: experts: %w", err)
	}
	defer rows.Close()
	var es []workshop.Expert
	for rows.Next() {
		e, err := scanExpert(rows)
		if err != nil {
			return nil, err
		}
		es = append(es, e)
	}
	return es, rows.Err()
}

// RevokedExperts returns the ids of a workshop's experts whose access is
// revoked, in order: usually none, so reading them is cheap enough for
// every page that leaves revoked experts out.
func (db *DB) RevokedExperts(ctx context.Context, workshopID int64) ([]int64, error) {
	rows, err := db.r.QueryContext(ctx, `SELECT id FROM experts WHERE workshop_id = ? AND revoked = 1 ORDER BY id`, workshopID)
	if err != nil {
		return nil, fmt.Errorf("store: revoked experts: %w", err)
	}
	defer rows.Close()
	var ids []int64
	for rows.Next() {
		var id int64
		if err := rows.Scan(&id); err != nil {
			return nil, fmt.Errorf("store: revoked experts: %w", err)
		}
		ids = append(ids, id)
	}
	return ids, rows.Err()
}

// ExpertByToken returns the unrevoked expert whose token hashes to
// tokenHash.
func (db *DB) ExpertByToken(ctx context.Context, tokenHash []byte) (workshop.Expert, error) {
	if len(tokenHash) == 0 {
		return workshop.Expert{}, fmt.Errorf("store: expert by token: %w", workshop.ErrNotFound)
	}
	return remembered(db.rows, db.rows.byToken, string(tokenHash), func() (workshop.Expert, error) {
		e, err := scanExpert(db.r.QueryRowContext(ctx,
			`SELECT `+expertColumns+` FROM experts WHERE token_hash = ? AND revoked = 0`, tokenHash))
		if errors.Is(err, sql.ErrNoRows) {
			return e, fmt.Errorf("store: expert by token: %w", workshop.ErrNotFound)
		}
		return e, err
	})
}

// ReissueToken gives an expert a new access token, which also lifts a
// revocation, and records EventTokenReissued. The old token stops working.
func (db *DB) ReissueToken(ctx context.Context, expertID int64, tokenHash []byte, reason string) error {
	if len(tokenHash) == 0 {
		return &elicit.InputError{Field: "token_hash", Rule: elicit.RuleRequired}
	}
	return db.expertDecision(ctx, expertID, workshop.EventTokenReissued, reason, nil,
		`UPDATE experts SET token_hash = ?, revoked = 0 WHERE id = ?`, tokenHash, expertID)
}

// RevokeExpert stops an expert's access token from working and records
// EventExpertRevoked. Their revisions stay in the record. An expert whose
// access is already revoked is refused (workshop.RuleNothingChanged, on
// the field "action"), as a question already retired or a workshop
// already archived is: a second tab's revoke recorded the revocation
// twice in the decision log, the second with its own reason.
func (db *DB) RevokeExpert(ctx context.Context, expertID int64, reason string) error {
	already := func(revoked bool) error {
		if revoked {
			return &elicit.InputError{Field: "action", Rule: workshop.RuleNothingChanged, Detail: "the expert's access is already revoked"}
		}
		return nil
	}
	return db.expertDecision(ctx, expertID, workshop.EventExpertRevoked, reason, already,
		`UPDATE experts SET revoked = 1 WHERE id = ?`, expertID)
}

// expertDecision runs one UPDATE of an expert together with its event,
// after check (when not nil) has accepted the expert's revoked state as
// it stands in the transaction.
func (db *DB) expertDecision(ctx context.Context, expertID int64, kind workshop.EventKind, reason string,
	check func(revoked bool) error, update string, args ...any) error {
	return db.write(ctx, func(tx *sql.Tx) error {
		var workshopID int64
		var revoked int
		err := tx.QueryRowContext(ctx, `SELECT workshop_id, revoked FROM experts WHERE id = ?`, expertID).Scan(&workshopID, &revoked)
		if errors.Is(err, sql.ErrNoRows) {
			return notFound("expert", expertID)
		}
		if err != nil {
			return fmt.Errorf("store: expert %d: %w", expertID, err)
		}
		if check != nil {
			if err := check(revoked == 1); err != nil {
				return err
			}
		}
		if _, err := tx.ExecContext(ctx, update, args...); err != nil {
			return fmt.Errorf("store: expert %d: %s: %w", expertID, kind, err)
		}
		at, err := db.stamp(ctx, tx, workshopID)
		if err != nil {
			return err
		}
		return insertEvent(ctx, tx, workshop.Event{
			WorkshopID: workshopID, Kind: kind, At: at, Reason: reason,
			Detail: fmt.Sprintf(`{"expert_id":%d}`, expertID),
		})
	})
}

func scanExpert(s scanner) (workshop.Expert, error) {
	var (
		e       workshop.Expert
		revoked int
		created string
	)
	err := s.Scan(&e.ID, &e.WorkshopID, &e.Name, &e.Affiliation, &e.Expertise, &revoked, &created)
	if errors.Is(err, sql.ErrNoRows) {
		return e, err
	}
	if err != nil {
		return e, fmt.Errorf("store: read expert: %w", err)
	}
	e.Revoked = revoked == 1
	e.Created, err = parseTime(created)
	return e, err
}

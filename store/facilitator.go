package store

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"time"

	"github.com/parley-elicit/parley/elicit"
)

// FacilitatorHash returns the stored hash of the facilitator's secret, or
// nil and no error when none has been set.
func (db *DB) FacilitatorHash(ctx context.Context) ([]byte, error) {
	var h []byte
	err := db.r.QueryRowContext(ctx, `SELECT hash FROM facilitator WHERE id = 1`).Scan(&h)
	if errors.Is(err, sql.ErrNoRows) {
		return nil, nil
	}
	if err != nil {
		return nil, fmt.Errorf("store: facilitator hash: %w", err)
	}
	return h, nil
}

// SetFacilitatorHash replaces the facilitator's secret hash. Sessions
// opened with the old secret are ended.
func (db *DB) SetFacilitatorHash(ctx context.Context, hash []byte) error {
	if len(hash) == 0 {
		return &elicit.InputError{Field: "hash", Rule: elicit.RuleRequired}
	}
	return db.write(ctx, func(tx *sql.Tx) error {
		if _, err := tx.ExecContext(ctx,
			`INSERT INTO facilitator (id, hash, at) VALUES (1, ?, ?)
			 ON CONFLICT (id) DO UPDATE SET hash = excluded.hash, at = excluded.at`,
			hash, formatTime(now())); err != nil {
			return fmt.Errorf("store: set facilitator hash: %w", err)
		}
		if _, err := tx.ExecContext(ctx, `DELETE FROM sessions`); err != nil {
			return fmt.Errorf("store: end sessions: %w", err)
		}
		return nil
	})
}

// CreateSession stores a facilitator session by its token's hash.
func (db *DB) CreateSession(ctx context.Context, tokenHash []byte, expires time.Time) error {
	if len(tokenHash) == 0 {
		return &elicit.InputError{Field: "token_hash", Rule: elicit.RuleRequired}
	}
	return db.write(ctx, func(tx *sql.Tx) error {
		if _, err := tx.ExecContext(ctx,
			`INSERT INTO sessions (token_hash, expires) VALUES (?, ?)`, tokenHash, formatTime(expires)); err != nil {
			return fmt.Errorf("store: create session: %w", err)
		}
		return nil
	})
}

// EndSession deletes the facilitator session with this token hash (a
// sign-out), so the token stops working at once. Deleting one that does
// not exist is not an error.
func (db *DB) EndSession(ctx context.Context, tokenHash []byte) error {
	return db.write(ctx, func(tx *sql.Tx) error {
		if _, err := tx.ExecContext(ctx, `DELETE FROM sessions WHERE token_hash = ?`, tokenHash); err != nil {
			return fmt.Errorf("store: end session: %w", err)
		}
		return nil
	})
}

// SessionValid reports whether a session with this token hash exists and
// expires after now.
func (db *DB) SessionValid(ctx context.Context, tokenHash []byte, now time.Time) (bool, error) {
	var expires string
	err := db.r.QueryRowContext(ctx, `SELECT expires FROM sessions WHERE token_hash = ?`, tokenHash).Scan(&expires)
	if errors.Is(err, sql.ErrNoRows) {
		return false, nil
	}
	if err != nil {
		return false, fmt.Errorf("store: session: %w", err)
	}
	t, err := parseTime(expires)
	if err != nil {
		return false, err
	}
	return now.Before(t), nil
}

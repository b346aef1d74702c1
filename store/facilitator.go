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
	return db.setFacilitatorHash(ctx, hash, true)
}

// IssueFacilitatorHash replaces the facilitator's secret hash and leaves
// open sessions open: a new sign-in address for another browser, or
// after the last one was used.
func (db *DB) IssueFacilitatorHash(ctx context.Context, hash []byte) error {
	return db.setFacilitatorHash(ctx, hash, false)
}

func (db *DB) setFacilitatorHash(ctx context.Context, hash []byte, endSessions bool) error {
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
		if !endSessions {
			return nil
		}
		if _, err := tx.ExecContext(ctx, `DELETE FROM sessions`); err != nil {
			return fmt.Errorf("store: end sessions: %w", err)
		}
		return nil
	})
}

// UseFacilitatorHash spends the facilitator's secret: when hash is still
// the stored one, it deletes it and stores a session by its token's hash
// in the same transaction, and reports true. A secret signs in once; of
// two sign-ins racing with it, one wins. Expired sessions are deleted on
// the way (at now).
func (db *DB) UseFacilitatorHash(ctx context.Context, hash, sessionHash []byte, expires, now time.Time) (bool, error) {
	if len(hash) == 0 || len(sessionHash) == 0 {
		return false, &elicit.InputError{Field: "hash", Rule: elicit.RuleRequired}
	}
	used := false
	err := db.write(ctx, func(tx *sql.Tx) error {
		res, err := tx.ExecContext(ctx, `DELETE FROM facilitator WHERE id = 1 AND hash = ?`, hash)
		if err != nil {
			return fmt.Errorf("store: use facilitator hash: %w", err)
		}
		if n, err := res.RowsAffected(); err != nil || n != 1 {
			return err
		}
		if err := purgeSessions(ctx, tx, now); err != nil {
			return err
		}
		if _, err := tx.ExecContext(ctx,
			`INSERT INTO sessions (token_hash, expires) VALUES (?, ?)`, sessionHash, formatTime(expires)); err != nil {
			return fmt.Errorf("store: create session: %w", err)
		}
		used = true
		return nil
	})
	return used && err == nil, err
}

// CreateSession stores a facilitator session by its token's hash. A
// sign-in goes through UseFacilitatorHash instead.
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

// PurgeSessions deletes the sessions expired at now and returns how many
// there were. The server calls it at start; every sign-in does too.
func (db *DB) PurgeSessions(ctx context.Context, now time.Time) (int, error) {
	n := 0
	err := db.write(ctx, func(tx *sql.Tx) error {
		before, err := countSessions(ctx, tx)
		if err != nil {
			return err
		}
		if err := purgeSessions(ctx, tx, now); err != nil {
			return err
		}
		after, err := countSessions(ctx, tx)
		n = before - after
		return err
	})
	return n, err
}

// Sessions is the number of stored facilitator sessions, expired or not.
func (db *DB) Sessions(ctx context.Context) (int, error) {
	var n int
	if err := db.r.QueryRowContext(ctx, `SELECT COUNT(*) FROM sessions`).Scan(&n); err != nil {
		return 0, fmt.Errorf("store: sessions: %w", err)
	}
	return n, nil
}

func countSessions(ctx context.Context, tx *sql.Tx) (int, error) {
	var n int
	if err := tx.QueryRowContext(ctx, `SELECT COUNT(*) FROM sessions`).Scan(&n); err != nil {
		return 0, fmt.Errorf("store: sessions: %w", err)
	}
	return n, nil
}

// purgeSessions deletes the sessions whose expiry is not after now. The
// times are compared in Go: stored RFC 3339 text with trimmed
// nanoseconds does not sort as the times do.
func purgeSessions(ctx context.Context, tx *sql.Tx, now time.Time) error {
	rows, err := tx.QueryContext(ctx, `SELECT token_hash, expires FROM sessions`)
	if err != nil {
		return fmt.Errorf("store: purge sessions: %w", err)
	}
	var expired [][]byte
	for rows.Next() {
		var h []byte
		var at string
		if err := rows.Scan(&h, &at); err != nil {
			rows.Close()
			return fmt.Errorf("store: purge sessions: %w", err)
		}
		if t, err := parseTime(at); err != nil || !now.Before(t) {
			expired = append(expired, h)
		}
	}
	rows.Close()
	if err := rows.Err(); err != nil {
		return fmt.Errorf("store: purge sessions: %w", err)
	}
	for _, h := range expired {
		if _, err := tx.ExecContext(ctx, `DELETE FROM sessions WHERE token_hash = ?`, h); err != nil {
			return fmt.Errorf("store: purge sessions: %w", err)
		}
	}
	return nil
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

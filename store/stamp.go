package store

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"time"
)

// clock is the wall clock stamps start from; tests set it back.
var clock = time.Now

// now is the clock for stamps the store sets; rounded to microseconds so a
// stamp reads back exactly as it was handed out.
func now() time.Time { return clock().UTC().Round(time.Microsecond) }

// stamp is the time of the facts a transaction writes in workshop ws
// (every fact of one transaction shares it, and the chain orders them by
// kind): the clock's now, or one microsecond after the workshop's latest
// fact where the clock does not read later than that. The fingerprint's
// chain orders a workshop's facts by time, and record.CheckRounds checks
// each save against the rounds by time, so a fact stamped before one
// already written (a server clock set back, by hand or by a time
// service) moved a value the room had noted at a round's close and made
// an exported record that import refused. Stamps are strictly increasing
// within a workshop, so the chain's order is the commits' order; while
// the clock is behind, facts are stamped a microsecond apart just after
// the latest, and from when it passes the latest they carry its time
// again.
//
// The latest time is kept in fact_clock, in the database, so that every
// process writing to the file (the server and a command run beside it)
// stamps alike; a workshop without a row (one created or imported before
// the table) has it computed from its facts at its first write.
//
// A stamp more than aheadMargin past the clock means a clock that is
// wrong (this one behind, or one that ran ahead when the latest fact was
// written): stamp logs one warning for the workshop, naming it and both
// times, and another only after the clock has caught up and fallen
// behind again.
func (db *DB) stamp(ctx context.Context, tx *sql.Tx, ws int64) (time.Time, error) {
	last, kept, err := db.latestFact(ctx, tx, ws)
	if err != nil {
		return time.Time{}, err
	}
	clk := now()
	at := clk
	if !at.After(last) {
		at = last.Add(time.Microsecond)
	}
	if at.Sub(clk) > aheadMargin {
		db.warnAhead(ctx, tx, ws, last, clk)
	} else if at.Equal(clk) {
		db.ahead.Delete(ws)
	}
	if !kept {
		return at, nil
	}
	if _, err := tx.ExecContext(ctx,
		`INSERT INTO fact_clock (workshop_id, last) VALUES (?, ?)
		 ON CONFLICT (workshop_id) DO UPDATE SET last = excluded.last`, ws, formatTime(at)); err != nil {
		return time.Time{}, fmt.Errorf("store: stamp: %w", err)
	}
	return at, nil
}

// aheadMargin is how far past the clock stamp may set a stamp before it
// warns: past any clock step a time service makes to a clock kept right
// (they correct by seconds), and far below the hours by which a clock showing
// another zone's time is off.
const aheadMargin = time.Minute

// warnAhead logs, once for workshop ws until its stamps meet the clock
// again, that its facts are stamped after its latest one, at last,
// rather than at the clock's time clk.
func (db *DB) warnAhead(ctx context.Context, tx *sql.Tx, ws int64, last, clk time.Time) {
	if _, warned := db.ahead.LoadOrStore(ws, true); warned {
		return
	}
	var title string
	_ = tx.QueryRowContext(ctx, `SELECT title FROM workshops WHERE id = ?`, ws).Scan(&title)
	db.logger().Warn("store: a workshop's latest fact is dated after this machine's clock, so its new facts are stamped just after "+
		"that fact, not at the clock's time, until the clock passes it; check this machine's clock (or that of the machine "+
		"an imported record of it came from)",
		"workshop", ws, "title", title,
		"latest_fact", last.UTC().Format(time.RFC3339Nano), "clock", clk.UTC().Format(time.RFC3339Nano),
		"ahead", last.Sub(clk).Round(time.Second).String())
}

// latestFact is the time of workshop ws's latest fact, from fact_clock
// or, without a row, from the facts themselves (the zero time when there
// are none). Stored times are parsed, not compared as text: RFC 3339 with
// its trailing zeros dropped does not sort as text. kept is false in a
// database below the version that made fact_clock (keepsClock), which
// only the migration tests write into, with today's code: the clock alone
// stamps there, as it did at those versions.
func (db *DB) latestFact(ctx context.Context, tx *sql.Tx, ws int64) (last time.Time, kept bool, err error) {
	if kept, err = db.keepsClock(ctx, tx); err != nil || !kept {
		return time.Time{}, false, err
	}
	var s string
	err = tx.QueryRowContext(ctx, `SELECT last FROM fact_clock WHERE workshop_id = ?`, ws).Scan(&s)
	switch {
	case err == nil:
		last, err = parseTime(s)
		return last, true, err
	case !errors.Is(err, sql.ErrNoRows):
		return time.Time{}, false, fmt.Errorf("store: stamp: %w", err)
	}
	last, err = factsLatest(ctx, tx, ws)
	return last, true, err
}

// factClockVersion is the schema version whose migration made fact_clock
// (migrations/0015_fact_clock.sql).
const factClockVersion = 15

// keepsClock reports whether the database's schema has fact_clock, by its
// version (schema_migrations), not by an error's text: a database at that
// version or later must have it, so a fact_clock gone from one (removed
// by hand) fails the write rather than stamping by the clock alone. The
// version is read in tx until it has reached fact_clock's, and then
// remembered, since a schema only goes up: once for every database Open
// returns, which is at the latest.
func (db *DB) keepsClock(ctx context.Context, tx *sql.Tx) (bool, error) {
	if db.clockKept.Load() {
		return true, nil
	}
	var v sql.NullInt64
	if err := tx.QueryRowContext(ctx, `SELECT MAX(version) FROM schema_migrations`).Scan(&v); err != nil {
		return false, fmt.Errorf("store: stamp: schema version: %w", err)
	}
	if v.Int64 < factClockVersion {
		return false, nil
	}
	db.clockKept.Store(true)
	return true, nil
}

// factsLatest is the time of workshop ws's latest fact, read from the
// facts themselves.
func factsLatest(ctx context.Context, tx *sql.Tx, ws int64) (time.Time, error) {
	var s string
	rows, err := tx.QueryContext(ctx, `
		SELECT at FROM events WHERE workshop_id = ?1
		UNION ALL SELECT at FROM weight_sets WHERE workshop_id = ?1
		UNION ALL SELECT r.at FROM revisions r JOIN questions q ON q.id = r.question_id WHERE q.workshop_id = ?1
		UNION ALL SELECT p.at FROM agreed_priors p JOIN questions q ON q.id = p.question_id WHERE q.workshop_id = ?1
		UNION ALL SELECT d.at FROM study_data d JOIN questions q ON q.id = d.question_id WHERE q.workshop_id = ?1`, ws)
	if err != nil {
		return time.Time{}, fmt.Errorf("store: stamp: %w", err)
	}
	defer rows.Close()
	var last time.Time
	for rows.Next() {
		if err := rows.Scan(&s); err != nil {
			return time.Time{}, fmt.Errorf("store: stamp: %w", err)
		}
		t, err := parseTime(s)
		if err != nil {
			return time.Time{}, err
		}
		if t.After(last) {
			last = t
		}
	}
	return last, rows.Err()
}

// questionWorkshop is the workshop of question id, read in tx.
func questionWorkshop(ctx context.Context, tx *sql.Tx, id int64) (int64, error) {
	var ws int64
	err := tx.QueryRowContext(ctx, `SELECT workshop_id FROM questions WHERE id = ?`, id).Scan(&ws)
	if errors.Is(err, sql.ErrNoRows) {
		return 0, notFound("question", id)
	}
	if err != nil {
		return 0, fmt.Errorf("store: question %d: %w", id, err)
	}
	return ws, nil
}

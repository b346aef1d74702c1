package store

import (
	"context"
	"database/sql"
	"encoding/json"
	"errors"
	"fmt"

	"github.com/parley-elicit/parley/elicit/workshop"
)

const workshopColumns = `id, title, purpose, decision, notes, round, round_open, invented, archived, created`

// nextWorkshopID is a new workshop's id: past every workshop's and every
// deleted workshop's. SQLite's own choice (the largest id + 1) gave a new
// workshop the id of one just deleted, so the deleted workshops' list and
// a live workshop shared an id, and an old address /w/N or a file
// parley-workshop-N.json named another workshop.
const nextWorkshopID = `(SELECT MAX(n) + 1 FROM (SELECT COALESCE(MAX(id), 0) AS n FROM workshops
	UNION ALL SELECT COALESCE(MAX(workshop_id), 0) FROM workshop_deletions))`

// CreateWorkshop saves a new workshop in round 1, open, and records
// EventWorkshopCreated. It sets w's ID, Created, Round and Open.
func (db *DB) CreateWorkshop(ctx context.Context, w *workshop.Workshop) error {
	return db.write(ctx, func(tx *sql.Tx) error {
		created := now() // in the writer's turn (SaveRevision)
		res, err := tx.ExecContext(ctx,
			`INSERT INTO workshops (id, title, purpose, decision, notes, round, round_open, invented, created)
			 VALUES (`+nextWorkshopID+`, ?, ?, ?, ?, 1, 1, ?, ?)`,
			w.Title, w.Purpose, w.Decision, w.Notes, boolInt(w.Invented), formatTime(created))
		if err != nil {
			return fmt.Errorf("store: create workshop: %w", err)
		}
		id, err := res.LastInsertId()
		if err != nil {
			return fmt.Errorf("store: create workshop: %w", err)
		}
		if err := insertEvent(ctx, tx, workshop.Event{
			WorkshopID: id, Kind: workshop.EventWorkshopCreated, At: created, Detail: w.CreatedDetail(),
		}); err != nil {
			return err
		}
		w.ID, w.Created, w.Round, w.Open = id, created, 1, true
		return nil
	})
}

// UpdateWorkshop changes a workshop's title, purpose, decision and notes,
// recording EventWorkshopEdited with the changed fields before and after,
// so the record keeps what the panel read before. Nothing changed is
// nothing recorded.
func (db *DB) UpdateWorkshop(ctx context.Context, w workshop.Workshop) error {
	return db.write(ctx, func(tx *sql.Tx) error {
		old, err := scanWorkshop(tx.QueryRowContext(ctx, `SELECT `+workshopColumns+` FROM workshops WHERE id = ?`, w.ID))
		if errors.Is(err, sql.ErrNoRows) {
			return notFound("workshop", w.ID)
		}
		if err != nil {
			return err
		}
		before, after := map[string]string{}, map[string]string{}
		var fields []string
		for _, f := range []struct{ name, was, now string }{
			{"title", old.Title, w.Title}, {"purpose", old.Purpose, w.Purpose},
			{"decision", old.Decision, w.Decision}, {"notes", old.Notes, w.Notes},
		} {
			if f.was != f.now {
				fields = append(fields, f.name)
				before[f.name], after[f.name] = f.was, f.now
			}
		}
		if len(fields) == 0 {
			return nil
		}
		if _, err := tx.ExecContext(ctx,
			`UPDATE workshops SET title = ?, purpose = ?, decision = ?, notes = ? WHERE id = ?`,
			w.Title, w.Purpose, w.Decision, w.Notes, w.ID); err != nil {
			return fmt.Errorf("store: update workshop %d: %w", w.ID, err)
		}
		detail, err := json.Marshal(map[string]any{"fields": fields, "before": before, "after": after})
		if err != nil {
			return fmt.Errorf("store: update workshop %d: %w", w.ID, err)
		}
		at, err := db.stamp(ctx, tx, w.ID)
		if err != nil {
			return err
		}
		return insertEvent(ctx, tx, workshop.Event{WorkshopID: w.ID, Kind: workshop.EventWorkshopEdited, At: at, Detail: string(detail)})
	})
}

// Workshop returns the workshop with the given ID.
func (db *DB) Workshop(ctx context.Context, id int64) (workshop.Workshop, error) {
	return remembered(db.rows, db.rows.workshops, id, func() (workshop.Workshop, error) { return readWorkshop(ctx, db.r, id) })
}

func readWorkshop(ctx context.Context, db querier, id int64) (workshop.Workshop, error) {
	row := db.QueryRowContext(ctx, `SELECT `+workshopColumns+` FROM workshops WHERE id = ?`, id)
	w, err := scanWorkshop(row)
	if errors.Is(err, sql.ErrNoRows) {
		return workshop.Workshop{}, notFound("workshop", id)
	}
	return w, err
}

// PanelSalt returns the workshop's random 32-byte salt for the order of
// its anonymised round feedback; it is made with the workshop and never
// changes, and is never shown or exported.
func (db *DB) PanelSalt(ctx context.Context, workshopID int64) ([]byte, error) {
	var salt []byte
	err := db.r.QueryRowContext(ctx, `SELECT salt FROM panel_salts WHERE workshop_id = ?`, workshopID).Scan(&salt)
	if errors.Is(err, sql.ErrNoRows) {
		return nil, notFound("workshop", workshopID)
	}
	if err != nil {
		return nil, fmt.Errorf("store: panel salt: %w", err)
	}
	return salt, nil
}

// Workshops returns every workshop, oldest first.
func (db *DB) Workshops(ctx context.Context) ([]workshop.Workshop, error) {
	rows, err := db.r.QueryContext(ctx, `SELECT `+workshopColumns+` FROM workshops ORDER BY id`)
	if err != nil {
		return nil, fmt.Errorf("store: workshops: %w", err)
	}
	defer rows.Close()
	var ws []workshop.Workshop
	for rows.Next() {
		w, err := scanWorkshop(rows)
		if err != nil {
			return nil, err
		}
		ws = append(ws, w)
	}
	return ws, rows.Err()
}

// SetRound closes the current round (open false) or opens round n (open
// true, n the current round plus one), with its event, in one transaction.
// A round closes only while a question is in use (Workshop.CheckCloseAsked).
func (db *DB) SetRound(ctx context.Context, workshopID int64, round int, open bool, reason string) error {
	return db.write(ctx, func(tx *sql.Tx) error {
		w, err := scanWorkshop(tx.QueryRowContext(ctx,
			`SELECT `+workshopColumns+` FROM workshops WHERE id = ?`, workshopID))
		if errors.Is(err, sql.ErrNoRows) {
			return notFound("workshop", workshopID)
		}
		if err != nil {
			return err
		}
		if err := w.CheckRoundChange(round, open); err != nil {
			return err
		}
		if !open {
			var inUse int
			if err := tx.QueryRowContext(ctx, `SELECT COUNT(*) FROM questions WHERE workshop_id = ? AND retired = 0`,
				workshopID).Scan(&inUse); err != nil {
				return fmt.Errorf("store: count questions: %w", err)
			}
			if err := w.CheckCloseAsked(inUse); err != nil {
				return err
			}
		}
		kind := workshop.EventRoundClosed
		if open {
			kind = workshop.EventRoundOpened
		}
		if _, err := tx.ExecContext(ctx, `UPDATE workshops SET round = ?, round_open = ? WHERE id = ?`,
			round, boolInt(open), workshopID); err != nil {
			return fmt.Errorf("store: set round: %w", err)
		}
		at, err := db.stamp(ctx, tx, workshopID)
		if err != nil {
			return err
		}
		return insertEvent(ctx, tx, workshop.Event{
			WorkshopID: workshopID, Kind: kind, At: at, Reason: reason,
			Detail: fmt.Sprintf(`{"round":%d}`, round),
		})
	})
}

type scanner interface{ Scan(dest ...any) error }

func scanWorkshop(s scanner) (workshop.Workshop, error) {
	var (
		w                      workshop.Workshop
		open, invent, archived int
		created                string
	)
	if err := s.Scan(&w.ID, &w.Title, &w.Purpose, &w.Decision, &w.Notes, &w.Round, &open, &invent, &archived, &created); err != nil {
		if errors.Is(err, sql.ErrNoRows) {
			return w, err
		}
		return w, fmt.Errorf("store: read workshop: %w", err)
	}
	w.Open, w.Invented, w.Archived = open == 1, invent == 1, archived == 1
	t, err := parseTime(created)
	w.Created = t
	return w, err
}

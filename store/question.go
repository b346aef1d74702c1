package store

import (
	"context"
	"database/sql"
	"encoding/json"
	"errors"
	"fmt"
	"strconv"
	"time"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// ruleSetLater refuses a new question that comes already revealed,
// retired or on the log-uniform background.
const ruleSetLater elicit.Rule = "is set after the question is added, with its own event in the decision log"

const questionColumns = `id, workshop_id, position, wording, quantity, units, lower, upper, format,
	probs, bin_edges, chips, calibration, true_value, revealed, revealed_at, revealed_through, retired, log_uniform_background`

// AddQuestion appends q to its workshop's questions, recording
// EventQuestionAdded. It sets q's ID and Position. A question starts
// unrevealed, in use and on the uniform background: its reveal, its
// retirement and its background are set later, each with its own event
// (SetTrueValue, SetQuestionRetired, SetLogScale), and a question that
// comes with any of them set is refused, not stored without it.
func (db *DB) AddQuestion(ctx context.Context, q *workshop.Question) error {
	for _, later := range []struct {
		field string
		set   bool
	}{
		{"revealed", q.Revealed || q.RevealedAt != nil || q.RevealedThrough != 0},
		{"retired", q.Retired},
		{"log_uniform_background", q.LogScale},
	} {
		if later.set {
			return &elicit.InputError{Field: later.field, Rule: ruleSetLater, Detail: "a new question"}
		}
	}
	probs, err := marshalList(q.Probs)
	if err != nil {
		return err
	}
	edges, err := marshalList(q.BinEdges)
	if err != nil {
		return err
	}
	return db.write(ctx, func(tx *sql.Tx) error {
		if err := workshopExists(ctx, tx, q.WorkshopID); err != nil {
			return err
		}
		var pos int
		if err := tx.QueryRowContext(ctx,
			`SELECT COALESCE(MAX(position), 0) + 1 FROM questions WHERE workshop_id = ?`,
			q.WorkshopID).Scan(&pos); err != nil {
			return fmt.Errorf("store: add question: %w", err)
		}
		res, err := tx.ExecContext(ctx,
			`INSERT INTO questions (workshop_id, position, wording, quantity, units, lower, upper, format,
			 probs, bin_edges, chips, calibration, true_value)
			 VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
			q.WorkshopID, pos, q.Wording, q.Quantity, q.Units, q.Lower, q.Upper, string(q.Format),
			probs, edges, q.Chips, boolInt(q.Calibration), nullFloat(q.TrueValue))
		if err != nil {
			return fmt.Errorf("store: add question: %w", err)
		}
		id, err := res.LastInsertId()
		if err != nil {
			return fmt.Errorf("store: add question: %w", err)
		}
		at, err := db.stamp(ctx, tx, q.WorkshopID)
		if err != nil {
			return err
		}
		if err := insertEvent(ctx, tx, workshop.Event{
			WorkshopID: q.WorkshopID, QuestionID: id, Kind: workshop.EventQuestionAdded, At: at,
			Detail: string(q.Definition()),
		}); err != nil {
			return err
		}
		q.ID, q.Position = id, pos
		return nil
	})
}

// Question returns the question with the given ID.
func (db *DB) Question(ctx context.Context, id int64) (workshop.Question, error) {
	q, err := remembered(db.rows, db.rows.questions, id, func() (workshop.Question, error) {
		q, err := scanQuestion(db.r.QueryRowContext(ctx,
			`SELECT `+questionColumns+` FROM questions WHERE id = ?`, id))
		if errors.Is(err, sql.ErrNoRows) {
			return q, notFound("question", id)
		}
		return q, err
	})
	return copyQuestion(q), err
}

// Questions returns a workshop's questions in position order.
func (db *DB) Questions(ctx context.Context, workshopID int64) ([]workshop.Question, error) {
	return readQuestions(ctx, db.r, workshopID)
}

func readQuestions(ctx context.Context, db querier, workshopID int64) ([]workshop.Question, error) {
	rows, err := db.QueryContext(ctx,
		`SELECT `+questionColumns+` FROM questions WHERE workshop_id = ? ORDER BY position, id`, workshopID)
	if err != nil {
		return nil, fmt.Errorf("store: questions: %w", err)
	}
	defer rows.Close()
	var qs []workshop.Question
	for rows.Next() {
		q, err := scanQuestion(rows)
		if err != nil {
			return nil, err
		}
		qs = append(qs, q)
	}
	return qs, rows.Err()
}

// SetTrueValue stores a calibration question's true value; with reveal it
// also makes the value visible to experts and records EventTruthRevealed.
// A revealed value stays revealed, and a change to it is a reveal. The
// first reveal freezes the answers: it stores its time and the question's
// last revision id, and from then on SaveRevision refuses the question
// (workshop.ErrAnswersFrozen). Saves and the reveal go through the one
// writer, so no save slips in between. The first reveal's event carries
// the freeze as stored (workshop.Reveal), which the record checks the
// question's row against; a later one carries the new value only.
func (db *DB) SetTrueValue(ctx context.Context, questionID int64, value float64, reveal bool, reason string) error {
	return db.write(ctx, func(tx *sql.Tx) error {
		q, err := questionInTx(ctx, tx, questionID)
		if err != nil {
			return err
		}
		if !q.Calibration {
			return &elicit.InputError{Field: "true_value", Rule: elicit.RuleUnknown,
				Detail: fmt.Sprintf("question %d is not a calibration question", questionID)}
		}
		// The question's own rule: strictly inside its bounds, as the
		// question editor and the import hold it (this took the bounds
		// themselves).
		if err := q.CheckTrueValue(value); err != nil {
			return err
		}
		// A value the experts have seen is changed only in the open: as a
		// reveal, whose event carries the new value. A caller that read the
		// question before its reveal asks to store the value hidden, which
		// would record a change of the scored value without the value.
		reveal = reveal || q.Revealed
		// The value already shown, shown again, changes nothing: a second
		// tab's reveal was recorded as a second reveal, with its own
		// reason. (A hidden value entered again records only that it was
		// entered, which tells nothing of it.)
		if q.Revealed && q.TrueValue != nil && *q.TrueValue == value {
			return &elicit.InputError{Field: "true_value", Rule: workshop.RuleNothingChanged,
				Detail: "the true value shown to the experts is already " + strconv.FormatFloat(value, 'g', -1, 64)}
		}
		if _, err := tx.ExecContext(ctx, `UPDATE questions SET true_value = ?, revealed = ? WHERE id = ?`,
			value, boolInt(reveal), questionID); err != nil {
			return fmt.Errorf("store: set true value: %w", err)
		}
		at, err := db.stamp(ctx, tx, q.WorkshopID)
		if err != nil {
			return err
		}
		if !reveal {
			// The value stays hidden, from the record too until the reveal,
			// so the event says only that it was entered or changed.
			return insertEvent(ctx, tx, workshop.Event{
				WorkshopID: q.WorkshopID, QuestionID: questionID, Kind: workshop.EventTruthEntered, At: at, Reason: reason,
			})
		}
		shown := workshop.Reveal{TrueValue: value}
		if !q.Revealed {
			// The freeze is recorded in the event as set, so the record
			// can tell a row whose freeze was moved afterwards.
			var through int64
			if err := tx.QueryRowContext(ctx,
				`SELECT COALESCE(MAX(id), 0) FROM revisions WHERE question_id = ?`, questionID).Scan(&through); err != nil {
				return fmt.Errorf("store: reveal: %w", err)
			}
			if _, err := tx.ExecContext(ctx, `UPDATE questions SET revealed_at = ?, revealed_through = ? WHERE id = ?`,
				formatTime(at), through, questionID); err != nil {
				return fmt.Errorf("store: reveal: %w", err)
			}
			shown.RevealedAt, shown.RevealedThrough = &at, &through
		}
		detail, err := json.Marshal(shown)
		if err != nil {
			return fmt.Errorf("store: reveal: %w", err)
		}
		return insertEvent(ctx, tx, workshop.Event{
			WorkshopID: q.WorkshopID, QuestionID: questionID, Kind: workshop.EventTruthRevealed,
			At: at, Reason: reason, Detail: string(detail),
		})
	})
}

// SetLogScale sets whether a calibration question's information is
// scored against the log-uniform background (workshop.Question.LogScale),
// recording EventScaleSet with the required reason. The question must
// allow it (Question.CheckLogScale); setting what is already set records
// nothing.
func (db *DB) SetLogScale(ctx context.Context, questionID int64, on bool, reason string) error {
	return db.write(ctx, func(tx *sql.Tx) error {
		q, err := questionInTx(ctx, tx, questionID)
		if err != nil {
			return err
		}
		if on {
			if err := q.CheckLogScale(); err != nil {
				return err
			}
		} else if !q.Calibration {
			return &elicit.InputError{Field: "log_uniform_background", Rule: elicit.RuleUnknown,
				Detail: fmt.Sprintf("question %d is not a calibration question", questionID)}
		}
		if q.LogScale == on {
			return nil
		}
		if reason == "" {
			return &elicit.InputError{Field: "reason", Rule: elicit.RuleRequired, Detail: "a change of how a question is scored needs a reason"}
		}
		if _, err := tx.ExecContext(ctx, `UPDATE questions SET log_uniform_background = ? WHERE id = ?`, boolInt(on), questionID); err != nil {
			return fmt.Errorf("store: set log scale: %w", err)
		}
		detail, _ := json.Marshal(map[string]bool{"log_uniform_background": on})
		at, err := db.stamp(ctx, tx, q.WorkshopID)
		if err != nil {
			return err
		}
		return insertEvent(ctx, tx, workshop.Event{
			WorkshopID: q.WorkshopID, QuestionID: questionID, Kind: workshop.EventScaleSet,
			At: at, Reason: reason, Detail: string(detail),
		})
	})
}

// questionInTx reads question id inside tx, or the store's not-found
// error when there is none.
func questionInTx(ctx context.Context, tx *sql.Tx, id int64) (workshop.Question, error) {
	q, err := scanQuestion(tx.QueryRowContext(ctx, `SELECT `+questionColumns+` FROM questions WHERE id = ?`, id))
	if errors.Is(err, sql.ErrNoRows) {
		return q, notFound("question", id)
	}
	return q, err
}

func scanQuestion(s scanner) (workshop.Question, error) {
	var (
		q                        workshop.Question
		format, probs, edges     string
		calib, revealed, retired int
		logScale                 int
		truth                    sql.NullFloat64
		revealedAt               sql.NullString
	)
	err := s.Scan(&q.ID, &q.WorkshopID, &q.Position, &q.Wording, &q.Quantity, &q.Units, &q.Lower, &q.Upper,
		&format, &probs, &edges, &q.Chips, &calib, &truth, &revealed, &revealedAt, &q.RevealedThrough, &retired, &logScale)
	if errors.Is(err, sql.ErrNoRows) {
		return q, err
	}
	if err != nil {
		return q, fmt.Errorf("store: read question: %w", err)
	}
	q.Format = workshop.AnswerFormat(format)
	q.Calibration, q.Revealed, q.Retired, q.LogScale = calib == 1, revealed == 1, retired == 1, logScale == 1
	if revealedAt.Valid {
		t, err := parseTime(revealedAt.String)
		if err != nil {
			return q, err
		}
		q.RevealedAt = &t
	}
	if truth.Valid {
		v := truth.Float64
		q.TrueValue = &v
	}
	if err := unmarshalList(probs, &q.Probs); err != nil {
		return q, err
	}
	return q, unmarshalList(edges, &q.BinEdges)
}

func workshopExists(ctx context.Context, tx *sql.Tx, id int64) error {
	var n int
	if err := tx.QueryRowContext(ctx, `SELECT COUNT(*) FROM workshops WHERE id = ?`, id).Scan(&n); err != nil {
		return fmt.Errorf("store: workshop %d: %w", id, err)
	}
	if n == 0 {
		return notFound("workshop", id)
	}
	return nil
}

func nullTime(t *time.Time) any {
	if t == nil {
		return nil
	}
	return formatTime(*t)
}

func nullFloat(p *float64) any {
	if p == nil {
		return nil
	}
	return *p
}

package store

import (
	"context"
	"database/sql"
	"encoding/json"
	"errors"
	"fmt"
	"time"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// SaveRevision appends an expert's answer to a question. In the same
// transaction it checks that the question is not retired (workshop.ErrRetired)
// nor a calibration question whose true value has been revealed
// (workshop.ErrAnswersFrozen), that the question's workshop has an open round
// (else an error wrapping workshop.ErrRoundClosed) and that the expert
// exists, is not revoked and sits on that workshop's panel. It sets r's ID,
// Round and At. The answer's content is elicit's to check, before saving.
func (db *DB) SaveRevision(ctx context.Context, r *workshop.Revision) error {
	if r.EnteredBy == "" {
		r.EnteredBy = workshop.ByExpert
	}
	if err := r.CheckProvenance(); err != nil {
		return err
	}
	values, err := marshalList(r.Answer.Values)
	if err != nil {
		return err
	}
	counts, err := marshalList(r.Answer.Counts)
	if err != nil {
		return err
	}
	return db.writeRevision(ctx, func(tx *sql.Tx) error {
		// Stamped in the writer's turn, so that the record's time order
		// (the fingerprint's chain) is the order of the commits.
		ws, err := questionWorkshop(ctx, tx, r.QuestionID)
		if err != nil {
			return err
		}
		at, err := db.stamp(ctx, tx, ws)
		if err != nil {
			return err
		}
		return saveRevision(ctx, tx, r, values, counts, at)
	})
}

// saveRevision is SaveRevision's work inside tx.
func saveRevision(ctx context.Context, tx *sql.Tx, r *workshop.Revision, values, counts string, at time.Time) error {
	var (
		workshopID            int64
		round                 int
		open, frozen, retired int
	)
	err := tx.QueryRowContext(ctx,
		`SELECT w.id, w.round, w.round_open, q.calibration AND q.revealed, q.retired
		 FROM questions q JOIN workshops w ON w.id = q.workshop_id
		 WHERE q.id = ?`, r.QuestionID).Scan(&workshopID, &round, &open, &frozen, &retired)
	if errors.Is(err, sql.ErrNoRows) {
		return notFound("question", r.QuestionID)
	}
	if err != nil {
		return fmt.Errorf("store: save revision: %w", err)
	}
	var (
		expertWorkshop int64
		revoked        int
	)
	err = tx.QueryRowContext(ctx, `SELECT workshop_id, revoked FROM experts WHERE id = ?`,
		r.ExpertID).Scan(&expertWorkshop, &revoked)
	if errors.Is(err, sql.ErrNoRows) {
		return notFound("expert", r.ExpertID)
	}
	if err != nil {
		return fmt.Errorf("store: save revision: %w", err)
	}
	if expertWorkshop != workshopID {
		return fmt.Errorf("store: expert %d is not on the panel of workshop %d: %w",
			r.ExpertID, workshopID, workshop.ErrNotFound)
	}
	if revoked == 1 {
		return fmt.Errorf("store: expert %d: %w", r.ExpertID, ErrRevoked)
	}
	if retired == 1 {
		return fmt.Errorf("store: question %d: %w", r.QuestionID, workshop.ErrRetired)
	}
	if frozen == 1 {
		return fmt.Errorf("store: question %d: %w", r.QuestionID, workshop.ErrAnswersFrozen)
	}
	if open == 0 {
		return fmt.Errorf("store: workshop %d round %d: %w", workshopID, round, workshop.ErrRoundClosed)
	}
	// The answer was checked against the question as a page showed it;
	// until its first answer a question may be corrected in every part.
	q, err := scanQuestion(tx.QueryRowContext(ctx, `SELECT `+questionColumns+` FROM questions WHERE id = ?`, r.QuestionID))
	if err != nil {
		return fmt.Errorf("store: save revision: %w", err)
	}
	if err := q.StillAnswers(r.Answer, r.Kept); err != nil {
		return fmt.Errorf("store: question %d: %w", r.QuestionID, err)
	}
	id, err := insertRevision(ctx, tx, workshop.Revision{
		QuestionID: r.QuestionID, ExpertID: r.ExpertID, Round: round, At: at,
		Reason: r.Reason, Answer: r.Answer, EnteredBy: r.EnteredBy, Channel: r.Channel, Kept: r.Kept,
	}, values, counts, 0)
	if err != nil {
		return err
	}
	r.ID, r.Round, r.At = id, round, at
	return nil
}

// SaveRevisions appends several revisions in one transaction, each under
// SaveRevision's rules: all are saved, or none (the error names the
// first refused, a *workshop.RevisionRefused with its index). Every
// revision must be on a question of the first one's workshop: they are
// stamped by its clock (stamp). It is for judgements the facilitator
// imports from a file.
func (db *DB) SaveRevisions(ctx context.Context, rs []workshop.Revision) error {
	return db.saveRevisions(ctx, 0, rs, nil)
}

// saveRevisions saves rs, all on questions of workshop ws (0: of the
// first revision's workshop), in one transaction and then runs also,
// when given, in it with the revisions' time.
func (db *DB) saveRevisions(ctx context.Context, ws int64, rs []workshop.Revision, also func(context.Context, *sql.Tx, time.Time) error) error {
	type encoded struct{ values, counts string }
	enc := make([]encoded, len(rs))
	for i := range rs {
		if rs[i].EnteredBy == "" {
			rs[i].EnteredBy = workshop.ByExpert
		}
		if err := rs[i].CheckProvenance(); err != nil {
			return &workshop.RevisionRefused{Index: i, Err: err}
		}
		var err error
		if enc[i].values, err = marshalList(rs[i].Answer.Values); err != nil {
			return err
		}
		if enc[i].counts, err = marshalList(rs[i].Answer.Counts); err != nil {
			return err
		}
	}
	write := db.writeRevision
	if also != nil {
		write = db.write // an event is a row the cache may hold
	}
	return write(ctx, func(tx *sql.Tx) error {
		if len(rs) == 0 {
			return nil
		}
		if err := sameWorkshop(ctx, tx, &ws, rs); err != nil {
			return err
		}
		at, err := db.stamp(ctx, tx, ws) // in the writer's turn (SaveRevision)
		if err != nil {
			return err
		}
		for i := range rs {
			if err := saveRevision(ctx, tx, &rs[i], enc[i].values, enc[i].counts, at); err != nil {
				return &workshop.RevisionRefused{Index: i, Err: err}
			}
		}
		if also != nil {
			return also(ctx, tx, at)
		}
		return nil
	})
}

// sameWorkshop checks, in tx, that every revision of rs is on a question
// of workshop *ws, setting *ws to the first one's workshop where it is 0.
// The revisions are stamped by that workshop's clock, and an answer
// sheet's log entry is written to it: a revision on another workshop's
// question would be saved there at a time its facts do not order, and
// named by a log entry of a workshop it is not in.
func sameWorkshop(ctx context.Context, tx *sql.Tx, ws *int64, rs []workshop.Revision) error {
	for i, r := range rs {
		in, err := questionWorkshop(ctx, tx, r.QuestionID)
		if err != nil {
			return &workshop.RevisionRefused{Index: i, Err: err}
		}
		if *ws == 0 {
			*ws = in
		}
		if in != *ws {
			return &workshop.RevisionRefused{Index: i, Err: fmt.Errorf(
				"store: the answer of expert %d to question %d is of workshop %d, not of workshop %d, which the revisions are saved to; none was saved",
				r.ExpertID, r.QuestionID, in, *ws)}
		}
	}
	return nil
}

// SaveImportedRevisions is SaveRevisions for an answer sheet's rows: in
// the same transaction it records EventAnswersImported for the workshop,
// with imp as its detail and the revisions' time, so the record says
// which file, and which rows of it, the judgements came from. Every
// revision must be on a question of workshopID. All are saved, or none.
func (db *DB) SaveImportedRevisions(ctx context.Context, workshopID int64, rs []workshop.Revision, imp workshop.SheetImport) error {
	if len(imp.Rows) != len(rs) {
		return fmt.Errorf("store: %d revisions from %d rows of a sheet", len(rs), len(imp.Rows))
	}
	return db.saveRevisions(ctx, workshopID, rs, func(ctx context.Context, tx *sql.Tx, at time.Time) error {
		// The event names the judgements it saved, so each can say
		// which file and row it came from (workshop.SheetSources).
		imp.Revisions = make([]int64, len(rs))
		for i := range rs {
			imp.Revisions[i] = rs[i].ID
		}
		detail, err := json.Marshal(imp)
		if err != nil {
			return fmt.Errorf("store: answer sheet: %w", err)
		}
		return insertEvent(ctx, tx, workshop.Event{WorkshopID: workshopID, Kind: workshop.EventAnswersImported, At: at, Detail: string(detail)})
	})
}

// ErrRevoked is returned (wrapped) when a revoked expert tries to save;
// it is workshop.ErrRevoked.
var ErrRevoked = workshop.ErrRevoked

func insertRevision(ctx context.Context, tx *sql.Tx, r workshop.Revision, values, counts string, id int64) (int64, error) {
	a := r.Answer
	q, args := withID(`INSERT INTO revisions (question_id, expert_id, round, at, reason,
		 answer_values, lowest, highest, best, confidence, counts, percent, entered_by, channel)
		 VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`, id,
		r.QuestionID, r.ExpertID, r.Round, formatTime(r.At), r.Reason,
		values, a.Lowest, a.Highest, a.Best, a.Confidence, counts, boolInt(a.Percent), string(enteredBy(r.EnteredBy)), string(r.Channel))
	res, err := tx.ExecContext(ctx, q, args...)
	if err != nil {
		return 0, fmt.Errorf("store: save revision: %w", err)
	}
	id, err = res.LastInsertId()
	if err != nil {
		return 0, fmt.Errorf("store: save revision: %w", err)
	}
	if r.Kept != nil {
		if err := keepFit(ctx, tx, id, *r.Kept); err != nil {
			return 0, err
		}
	}
	return id, nil
}

// keepFit stores a revision's fit beside it (revision_fits).
func keepFit(ctx context.Context, tx *sql.Tx, revisionID int64, f elicit.Fit) error {
	b, err := json.Marshal(f)
	if err != nil {
		return fmt.Errorf("store: keep fit of revision %d: %w", revisionID, err)
	}
	if _, err := tx.ExecContext(ctx, `INSERT INTO revision_fits (revision_id, fit) VALUES (?, ?)`, revisionID, string(b)); err != nil {
		return fmt.Errorf("store: keep fit of revision %d: %w", revisionID, err)
	}
	return nil
}

// Revisions returns every revision on a workshop's questions, oldest
// first.
func (db *DB) Revisions(ctx context.Context, workshopID int64) ([]workshop.Revision, error) {
	return readRevisions(ctx, db.r, workshopID)
}

func readRevisions(ctx context.Context, db querier, workshopID int64) ([]workshop.Revision, error) {
	return scanRevisions(db.QueryContext(ctx,
		`SELECT `+revisionColumns+`
		 FROM revisions r JOIN questions q ON q.id = r.question_id
		 WHERE q.workshop_id = ? ORDER BY r.id`, workshopID))
}

// enteredBy reads an empty EnteredBy, as in older records, as the expert.
func enteredBy(b workshop.EnteredBy) workshop.EnteredBy {
	if b == "" {
		return workshop.ByExpert
	}
	return b
}

// KeepMissingFits fits every revision that has no kept fit (one saved
// before fits were kept, or by a caller that did not pass one) with fit,
// and keeps the fit beside it; a revision its question cannot fit keeps
// none. It returns how many fits it kept. `parley serve` calls it at
// start, so that afterwards every page and record reads kept fits.
func (db *DB) KeepMissingFits(ctx context.Context, fit func(workshop.Question, workshop.Answer) (elicit.Fit, error)) (int, error) {
	revs, err := scanRevisions(db.r.QueryContext(ctx,
		`SELECT `+revisionColumns+` FROM revisions r
		 WHERE NOT EXISTS (SELECT 1 FROM revision_fits f WHERE f.revision_id = r.id) ORDER BY r.id`))
	if err != nil {
		return 0, err
	}
	questions := map[int64]workshop.Question{}
	type kept struct {
		id  int64
		fit elicit.Fit
	}
	var fits []kept
	for _, rv := range revs {
		q, ok := questions[rv.QuestionID]
		if !ok {
			if q, err = db.Question(ctx, rv.QuestionID); err != nil {
				return 0, err
			}
			questions[q.ID] = q
		}
		if f, err := fit(q, rv.Answer); err == nil {
			fits = append(fits, kept{rv.ID, f})
		}
	}
	if len(fits) == 0 {
		return 0, nil
	}
	err = db.writeRevision(ctx, func(tx *sql.Tx) error {
		for _, k := range fits {
			b, err := json.Marshal(k.fit)
			if err != nil {
				return err
			}
			// A save in between may have kept one already.
			if _, err := tx.ExecContext(ctx, `INSERT OR IGNORE INTO revision_fits (revision_id, fit) VALUES (?, ?)`, k.id, string(b)); err != nil {
				return fmt.Errorf("store: keep fit of revision %d: %w", k.id, err)
			}
		}
		return nil
	})
	if err != nil {
		return 0, err
	}
	return len(fits), nil
}

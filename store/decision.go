package store

import (
	"context"
	"database/sql"
	"encoding/json"
	"errors"
	"fmt"
	"sort"
	"strings"
	"time"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// SetWeights records the facilitator's pool weights for a workshop with
// EventWeightsSet, in one transaction, with what performance weights were
// made from (w.Basis) kept beside them. Every weighted expert must be on
// the workshop's panel; weights must be finite, not negative and, unless
// the scheme is equal, not all zero; only performance weights have a
// basis. It sets w.ID and w.At.
func (db *DB) SetWeights(ctx context.Context, w *workshop.Weights) error {
	if err := checkWeights(*w); err != nil {
		return err
	}
	byExpert, err := json.Marshal(w.ByExpert)
	if err != nil {
		return fmt.Errorf("store: set weights: %w", err)
	}
	if len(w.ByExpert) == 0 {
		byExpert = []byte("{}")
	}
	basis, err := marshalBasis(w.Basis)
	if err != nil {
		return err
	}
	return db.write(ctx, func(tx *sql.Tx) error {
		if err := workshopExists(ctx, tx, w.WorkshopID); err != nil {
			return err
		}
		at, err := db.stamp(ctx, tx, w.WorkshopID) // in the writer's turn (SaveRevision)
		if err != nil {
			return err
		}
		for _, id := range sortedExperts(w.ByExpert) {
			var ws int64
			err := tx.QueryRowContext(ctx, `SELECT workshop_id FROM experts WHERE id = ?`, id).Scan(&ws)
			if errors.Is(err, sql.ErrNoRows) || (err == nil && ws != w.WorkshopID) {
				return fmt.Errorf("store: set weights: expert %d of workshop %d: %w", id, w.WorkshopID, workshop.ErrNotFound)
			}
			if err != nil {
				return fmt.Errorf("store: set weights: %w", err)
			}
		}
		id, err := insertWeights(ctx, tx, w.WorkshopID, string(w.Scheme), string(byExpert), w.Reason, at, basis, 0)
		if err != nil {
			return fmt.Errorf("store: set weights: %w", err)
		}
		detail := fmt.Sprintf(`{"scheme":%q,"by_expert":%s}`, w.Scheme, byExpert)
		if err := insertEvent(ctx, tx, workshop.Event{
			WorkshopID: w.WorkshopID, Kind: workshop.EventWeightsSet, At: at, Reason: w.Reason, Detail: detail,
		}); err != nil {
			return err
		}
		w.ID, w.At = id, at
		return nil
	})
}

// insertWeights writes one weight set. A set without a basis leaves the
// column out, so it can be written at a schema version before the basis
// (the migration test writes data at every version).
func insertWeights(ctx context.Context, tx *sql.Tx, workshopID int64, scheme, byExpert, reason string, at time.Time, basis any, id int64) (int64, error) {
	q := `INSERT INTO weight_sets (workshop_id, scheme, by_expert, reason, at) VALUES (?, ?, ?, ?, ?)`
	args := []any{workshopID, scheme, byExpert, reason, formatTime(at)}
	if basis != nil {
		q = `INSERT INTO weight_sets (workshop_id, scheme, by_expert, reason, at, basis) VALUES (?, ?, ?, ?, ?, ?)`
		args = append(args, basis)
	}
	q, args = withID(q, id, args...)
	res, err := tx.ExecContext(ctx, q, args...)
	if err != nil {
		return 0, err
	}
	return res.LastInsertId()
}

func marshalBasis(b *workshop.WeightBasis) (any, error) {
	if b == nil {
		return nil, nil
	}
	out, err := json.Marshal(b)
	if err != nil {
		return nil, fmt.Errorf("store: weight basis: %w", err)
	}
	return string(out), nil
}

// checkWeights checks a set by its rules (workshop.Weights.Check), naming
// an expert's weight "weights[ID]" and the whole set "weights", as the
// facilitator's form names them.
func checkWeights(w workshop.Weights) error {
	err := w.Check()
	var ie *elicit.InputError
	if errors.As(err, &ie) && strings.HasPrefix(ie.Field, "by_expert") {
		return &elicit.InputError{Field: "weights" + strings.TrimPrefix(ie.Field, "by_expert"), Rule: ie.Rule, Detail: ie.Detail}
	}
	return err
}

func sortedExperts(m map[int64]float64) []int64 {
	ids := make([]int64, 0, len(m))
	for id := range m {
		ids = append(ids, id)
	}
	sort.Slice(ids, func(i, j int) bool { return ids[i] < ids[j] })
	return ids
}

// Weights returns a workshop's current pool weights: the latest set, or
// equal weights (At zero) when none was ever set.
func (db *DB) Weights(ctx context.Context, workshopID int64) (workshop.Weights, error) {
	return readWeights(ctx, db.r, workshopID)
}

const weightColumns = `id, workshop_id, scheme, by_expert, reason, at, basis`

func readWeights(ctx context.Context, db querier, workshopID int64) (workshop.Weights, error) {
	row := db.QueryRowContext(ctx,
		`SELECT `+weightColumns+` FROM weight_sets WHERE workshop_id = ? ORDER BY id DESC LIMIT 1`, workshopID)
	w, err := scanWeights(row)
	if errors.Is(err, sql.ErrNoRows) {
		if _, err := readWorkshop(ctx, db, workshopID); err != nil {
			return workshop.Weights{}, err
		}
		return workshop.Weights{WorkshopID: workshopID, Scheme: workshop.WeightsEqual}, nil
	}
	return w, err
}

// WeightHistory returns every weight set applied to a workshop, oldest
// first, each with its basis; the last is in force. It is empty when no
// set was ever applied.
func (db *DB) WeightHistory(ctx context.Context, workshopID int64) ([]workshop.Weights, error) {
	return readWeightHistory(ctx, db.r, workshopID)
}

func readWeightHistory(ctx context.Context, db querier, workshopID int64) ([]workshop.Weights, error) {
	if _, err := readWorkshop(ctx, db, workshopID); err != nil {
		return nil, err
	}
	rows, err := db.QueryContext(ctx, `SELECT `+weightColumns+` FROM weight_sets WHERE workshop_id = ? ORDER BY id`, workshopID)
	if err != nil {
		return nil, fmt.Errorf("store: weight history: %w", err)
	}
	defer rows.Close()
	out := []workshop.Weights{}
	for rows.Next() {
		w, err := scanWeights(rows)
		if err != nil {
			return nil, err
		}
		out = append(out, w)
	}
	return out, rows.Err()
}

func scanWeights(row interface{ Scan(...any) error }) (workshop.Weights, error) {
	var (
		w                    workshop.Weights
		scheme, byExpert, at string
		basis                sql.NullString
	)
	err := row.Scan(&w.ID, &w.WorkshopID, &scheme, &byExpert, &w.Reason, &at, &basis)
	if errors.Is(err, sql.ErrNoRows) {
		return workshop.Weights{}, err
	}
	if err != nil {
		return workshop.Weights{}, fmt.Errorf("store: weights: %w", err)
	}
	w.Scheme = workshop.WeightScheme(scheme)
	if err := json.Unmarshal([]byte(byExpert), &w.ByExpert); err != nil {
		return workshop.Weights{}, fmt.Errorf("store: bad stored weights %q: %w", byExpert, err)
	}
	if len(w.ByExpert) == 0 {
		w.ByExpert = nil
	}
	if basis.Valid {
		w.Basis = new(workshop.WeightBasis)
		if err := json.Unmarshal([]byte(basis.String), w.Basis); err != nil {
			return workshop.Weights{}, fmt.Errorf("store: bad stored weight basis of set %d: %w", w.ID, err)
		}
	}
	w.At, err = parseTime(at)
	return w, err
}

// AgreePrior records the prior the panel agreed for a question, in the
// workshop's current round, with EventPriorAgreed, in one transaction. It
// sets p's ID, Round and At. While the round is open, answers can still
// change after the agreement, so the caller must say it knows
// (p.RoundOpen); otherwise the prior is refused with an error wrapping
// workshop.ErrRoundStillOpen. p.RoundOpen is stored as the round's real state.
// A prior the question's recorded data could not update is refused
// (workshop.CheckPriorUpdate).
func (db *DB) AgreePrior(ctx context.Context, p *workshop.AgreedPrior) error {
	if err := p.Dist.Validate(); err != nil {
		return err
	}
	if err := p.CheckSource(); err != nil {
		return err
	}
	consensus, err := marshalConsensus(p.Consensus)
	if err != nil {
		return err
	}
	construction, err := marshalConstruction(p.Construction)
	if err != nil {
		return err
	}
	return db.write(ctx, func(tx *sql.Tx) error {
		var (
			workshopID int64
			round      int
			open       int
		)
		err := tx.QueryRowContext(ctx,
			`SELECT w.id, w.round, w.round_open FROM questions q JOIN workshops w ON w.id = q.workshop_id WHERE q.id = ?`,
			p.QuestionID).Scan(&workshopID, &round, &open)
		if errors.Is(err, sql.ErrNoRows) {
			return notFound("question", p.QuestionID)
		}
		if err != nil {
			return fmt.Errorf("store: agree prior: %w", err)
		}
		at, err := db.stamp(ctx, tx, workshopID) // in the writer's turn (SaveRevision)
		if err != nil {
			return err
		}
		// Only a target question in use takes a prior.
		q, err := questionInTx(ctx, tx, p.QuestionID)
		if err != nil {
			return err
		}
		if err := q.CheckTakesPrior(); err != nil {
			return err
		}
		if open == 1 && !p.RoundOpen {
			return fmt.Errorf("store: agree prior in round %d: %w", round, workshop.ErrRoundStillOpen)
		}
		// A prior the question's recorded data could not update is
		// refused (the data are never removed).
		var successes, trials int
		if err := tx.QueryRowContext(ctx, `SELECT COALESCE(SUM(successes), 0), COALESCE(SUM(trials), 0) FROM study_data WHERE question_id = ?`, p.QuestionID).
			Scan(&successes, &trials); err != nil {
			return fmt.Errorf("store: agree prior: %w", err)
		}
		if err := workshop.CheckPriorUpdate(p.Dist.Beta, successes, trials); err != nil {
			return err
		}
		// The weights in force, so a prior from the pool can be traced to
		// the weights that made the pool.
		var set sql.NullInt64
		if err := tx.QueryRowContext(ctx, `SELECT MAX(id) FROM weight_sets WHERE workshop_id = ?`, workshopID).Scan(&set); err != nil {
			return fmt.Errorf("store: agree prior: %w", err)
		}
		stored := *p
		stored.Round, stored.At, stored.RoundOpen, stored.WeightSetID = round, at, open == 1, set.Int64
		id, err := insertPrior(ctx, tx, stored, consensus, construction, 0)
		if err != nil {
			return err
		}
		detail, _ := json.Marshal(struct {
			Source       workshop.PriorSource      `json:"source"`
			Dist         elicit.ScaledBeta         `json:"dist"`
			Construction *elicit.ConstructionInput `json:"construction,omitempty"`
			RoundOpen    bool                      `json:"while_round_open,omitempty"`
		}{p.Source, p.Dist, p.Construction, stored.RoundOpen})
		if err := insertEvent(ctx, tx, workshop.Event{
			WorkshopID: workshopID, QuestionID: p.QuestionID, Kind: workshop.EventPriorAgreed,
			At: at, Reason: p.Rationale, Detail: string(detail),
		}); err != nil {
			return err
		}
		p.ID, p.Round, p.At, p.RoundOpen, p.WeightSetID = id, round, at, stored.RoundOpen, stored.WeightSetID
		return nil
	})
}

func marshalConsensus(a *workshop.Answer) (any, error) {
	if a == nil {
		return nil, nil
	}
	b, err := json.Marshal(a)
	if err != nil {
		return nil, fmt.Errorf("store: consensus judgement: %w", err)
	}
	return string(b), nil
}

func marshalConstruction(c *elicit.ConstructionInput) (any, error) {
	if c == nil {
		return nil, nil
	}
	b, err := json.Marshal(c)
	if err != nil {
		return nil, fmt.Errorf("store: construction: %w", err)
	}
	return string(b), nil
}

// insertPrior writes one agreed prior. A prior without a construction
// leaves that column out, so it can be written at a schema version before
// it (the migration test writes data at every version).
func insertPrior(ctx context.Context, tx *sql.Tx, p workshop.AgreedPrior, consensus, construction any, id int64) (int64, error) {
	cols := `question_id, source, alpha, beta, lower, upper, consensus, rationale, round, round_open, weight_set_id, at`
	marks := `?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?`
	args := []any{p.QuestionID, string(p.Source), p.Dist.Alpha, p.Dist.Beta.Beta, p.Dist.Lower, p.Dist.Upper,
		consensus, p.Rationale, p.Round, boolInt(p.RoundOpen), nullID(p.WeightSetID), formatTime(p.At)}
	if construction != nil {
		cols += `, construction`
		marks += `, ?`
		args = append(args, construction)
	}
	if len(p.Pooled) > 0 {
		// Each pooled revision must be one of this question's.
		for _, id := range p.Pooled {
			var n int
			if err := tx.QueryRowContext(ctx, `SELECT COUNT(*) FROM revisions WHERE id = ? AND question_id = ?`, id, p.QuestionID).Scan(&n); err != nil {
				return 0, fmt.Errorf("store: agree prior: %w", err)
			}
			if n == 0 {
				return 0, &elicit.InputError{Field: "pooled_revisions", Rule: elicit.RuleUnknown,
					Detail: fmt.Sprintf("no revision %d on question %d", id, p.QuestionID)}
			}
		}
		pooled, err := json.Marshal(p.Pooled)
		if err != nil {
			return 0, fmt.Errorf("store: agree prior: %w", err)
		}
		cols += `, pooled_revisions`
		marks += `, ?`
		args = append(args, string(pooled))
	}
	q, args := withID(`INSERT INTO agreed_priors (`+cols+`) VALUES (`+marks+`)`, id, args...)
	res, err := tx.ExecContext(ctx, q, args...)
	if err != nil {
		return 0, fmt.Errorf("store: agree prior: %w", err)
	}
	id, err = res.LastInsertId()
	if err != nil {
		return 0, fmt.Errorf("store: agree prior: %w", err)
	}
	return id, nil
}

// AgreedPriors returns every prior agreed on a workshop's questions,
// oldest first; per question the latest is the current one.
func (db *DB) AgreedPriors(ctx context.Context, workshopID int64) ([]workshop.AgreedPrior, error) {
	return readPriors(ctx, db.r, workshopID)
}

func readPriors(ctx context.Context, db querier, workshopID int64) ([]workshop.AgreedPrior, error) {
	rows, err := db.QueryContext(ctx,
		`SELECT p.id, p.question_id, p.source, p.alpha, p.beta, p.lower, p.upper, p.consensus,
		        p.rationale, p.round, p.round_open, p.weight_set_id, p.at, p.construction, p.pooled_revisions
		 FROM agreed_priors p JOIN questions q ON q.id = p.question_id
		 WHERE q.workshop_id = ? ORDER BY p.id`, workshopID)
	if err != nil {
		return nil, fmt.Errorf("store: agreed priors: %w", err)
	}
	defer rows.Close()
	var ps []workshop.AgreedPrior
	for rows.Next() {
		var (
			p          workshop.AgreedPrior
			source, at string
			consensus  sql.NullString
			built      sql.NullString
			pooled     sql.NullString
			roundOpen  int
			set        sql.NullInt64
		)
		if err := rows.Scan(&p.ID, &p.QuestionID, &source, &p.Dist.Alpha, &p.Dist.Beta.Beta,
			&p.Dist.Lower, &p.Dist.Upper, &consensus, &p.Rationale, &p.Round, &roundOpen, &set, &at, &built, &pooled); err != nil {
			return nil, fmt.Errorf("store: read agreed prior: %w", err)
		}
		p.Source = workshop.PriorSource(source)
		p.RoundOpen, p.WeightSetID = roundOpen == 1, set.Int64
		if consensus.Valid {
			p.Consensus = new(workshop.Answer)
			if err := json.Unmarshal([]byte(consensus.String), p.Consensus); err != nil {
				return nil, fmt.Errorf("store: bad stored consensus %q: %w", consensus.String, err)
			}
		}
		if pooled.Valid {
			if err := json.Unmarshal([]byte(pooled.String), &p.Pooled); err != nil {
				return nil, fmt.Errorf("store: bad stored pooled revisions %q: %w", pooled.String, err)
			}
		}
		if built.Valid {
			p.Construction = new(elicit.ConstructionInput)
			if err := json.Unmarshal([]byte(built.String), p.Construction); err != nil {
				return nil, fmt.Errorf("store: bad stored construction %q: %w", built.String, err)
			}
		}
		if p.At, err = parseTime(at); err != nil {
			return nil, err
		}
		ps = append(ps, p)
	}
	return ps, rows.Err()
}

// nullID stores an optional reference: 0 means none.
func nullID(id int64) any {
	if id == 0 {
		return nil
	}
	return id
}

package store

import (
	"context"
	"database/sql"
	"encoding/json"
	"fmt"
	"strconv"
	"strings"

	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// Import adds the workshop in rec to the database as a new workshop and
// returns its ID. The record is validated in full first (rec.Validate);
// then everything is written in one transaction, so a bad record leaves
// the database as it was. Where the database has none of the record's
// IDs (a new database, or one holding only other workshops of the
// database the record came from), every row keeps its ID, so the
// record fingerprint's values stay the record's; otherwise every entity
// gets a new ID and every reference is remapped, including expert IDs
// inside event details. Experts are
// imported without access tokens: the facilitator issues new links.
// A record with a fact dated more than record.MaxAhead after this
// machine's clock is refused (record.RuleAheadOfClock).
// Each revision's fit is checked against a fresh fit of its answer
// (record.ValidateFits) and the fresh one kept with it; pools are not
// imported but recomputed from the judgements.
func (db *DB) Import(ctx context.Context, rec record.Record) (int64, error) {
	fits, err := rec.ValidateFits()
	if err != nil {
		return 0, err
	}
	return db.ImportChecked(ctx, record.Checked{Record: rec, Fits: fits})
}

// ImportChecked is Import of a record already validated, with the fresh
// fit of each revision its validation made (record.ParseChecked), so that
// a record read and checked before the database is opened is not fitted
// a second time.
func (db *DB) ImportChecked(ctx context.Context, c record.Checked) (int64, error) {
	rec, fits := c.Record, c.Fits
	if len(fits) != len(rec.Revisions) {
		return 0, fmt.Errorf("store: import: %d fits for %d revisions", len(fits), len(rec.Revisions))
	}
	// The workshop's next facts are stamped after its latest (stamp): a
	// fact dated ahead of this clock would pin them to its time.
	if err := rec.CheckNotAhead(now()); err != nil {
		return 0, err
	}
	var workshopID int64
	err := db.write(ctx, func(tx *sql.Tx) error {
		imp := importer{ctx: ctx, tx: tx, questions: map[int64]int64{}, experts: map[int64]int64{}, revisions: map[int64]int64{},
			weightSets: map[int64]int64{}}
		var err error
		// The record's own ids are kept when the database has none of
		// them, so the record fingerprint, whose facts carry their ids,
		// gives the same values as the record's (a restore into a new
		// database, or next to workshops of the database it came from).
		if imp.keep, err = idsFree(ctx, tx, rec); err != nil {
			return err
		}
		if workshopID, err = imp.workshop(rec.Workshop); err != nil {
			return err
		}
		for _, q := range rec.Questions {
			if err := imp.question(workshopID, q.Question); err != nil {
				return err
			}
		}
		for _, e := range rec.Experts {
			if err := imp.expert(workshopID, e); err != nil {
				return err
			}
		}
		for i, rv := range rec.Revisions {
			// The fresh fit, checked against the record's, is kept; an
			// answer an earlier build saved under looser rules has none
			// (record.EarlierRule) and is kept unfitted.
			if fits[i].Dist.Alpha != 0 {
				rv.Revision.Kept = &fits[i]
			}
			if err := imp.revision(rv.Revision); err != nil {
				return err
			}
		}
		for _, q := range rec.Questions {
			if err := imp.frozenThrough(q.Question, rec.Revisions); err != nil {
				return err
			}
		}
		// The whole history of weight sets with their bases; a record
		// made before Parley kept the history carries only the set in
		// force.
		history := rec.WeightHistory
		if len(history) == 0 {
			history = []workshop.Weights{rec.Weights}
		}
		for _, wt := range history {
			if err := imp.weights(workshopID, wt); err != nil {
				return err
			}
		}
		for _, q := range rec.Questions {
			for _, ap := range q.PriorHistory {
				if err := imp.prior(ap); err != nil {
					return err
				}
			}
		}
		for _, d := range rec.StudyData {
			d.QuestionID = imp.questions[d.QuestionID]
			if _, err := insertData(ctx, tx, d, imp.id(d.ID)); err != nil {
				return fmt.Errorf("study data %d: %w", d.ID, err)
			}
		}
		for _, e := range rec.Events {
			e.WorkshopID, e.QuestionID = workshopID, imp.questions[e.QuestionID]
			e.Detail = remapDetail(e.Detail, imp.experts, imp.revisions)
			if err := insertEventAs(ctx, tx, e, imp.id(e.ID)); err != nil {
				return err
			}
			if e.Kind == workshop.EventRevisionWithdrawn {
				if err := imp.withdrawal(e); err != nil {
					return err
				}
			}
		}
		return nil
	})
	if err != nil {
		return 0, fmt.Errorf("store: import: %w", err)
	}
	return workshopID, nil
}

// importer writes one record's rows and remembers old → new IDs.
type importer struct {
	ctx       context.Context
	tx        *sql.Tx
	questions map[int64]int64
	experts   map[int64]int64
	revisions map[int64]int64
	// weightSets maps a record's weight set IDs to the new ones.
	weightSets map[int64]int64
	// keep is whether the rows keep the record's ids (idsFree).
	keep bool
}

// id is the id a row of the record is written with: its own when the
// import keeps the record's ids, else 0 (SQLite numbers it).
func (imp importer) id(recordID int64) int64 {
	if imp.keep {
		return recordID
	}
	return 0
}

// withID makes an INSERT write the row's id when id > 0, instead of
// letting SQLite number it.
func withID(query string, id int64, args ...any) (string, []any) {
	if id <= 0 {
		return query, args
	}
	query = strings.Replace(query, " (", " (id, ", 1)
	query = strings.Replace(query, "VALUES (", "VALUES (?, ", 1)
	return query, append([]any{id}, args...)
}

// maxKeptID is the largest id an import keeps. The database numbers each
// new row after the largest id of its table, so a record's ids at the top
// of the range (input.MaxID; no Parley database numbers that far) had
// every later workshop, question, expert and event numbered past it,
// where the commands refuse them and a record of them no longer reads
// back. Ids up to half the range leave as much room again.
const maxKeptID = input.MaxID / 2

// idsFree is whether every id the record gives its workshop, questions,
// experts, revisions, weight sets, agreed priors, study data and events
// is positive, at most maxKeptID, unique in the record and unused in the
// database (the workshop's also by a deleted workshop, whose id is never
// given again).
func idsFree(ctx context.Context, tx *sql.Tx, rec record.Record) (bool, error) {
	ids := map[string][]int64{"workshops": {rec.Workshop.ID}}
	for _, q := range rec.Questions {
		ids["questions"] = append(ids["questions"], q.ID)
		for _, ap := range q.PriorHistory {
			ids["agreed_priors"] = append(ids["agreed_priors"], ap.ID)
		}
	}
	for _, e := range rec.Experts {
		ids["experts"] = append(ids["experts"], e.ID)
	}
	for _, rv := range rec.Revisions {
		ids["revisions"] = append(ids["revisions"], rv.ID)
	}
	for _, w := range rec.WeightHistory {
		ids["weight_sets"] = append(ids["weight_sets"], w.ID)
	}
	for _, d := range rec.StudyData {
		ids["study_data"] = append(ids["study_data"], d.ID)
	}
	for _, e := range rec.Events {
		ids["events"] = append(ids["events"], e.ID)
	}
	var n int
	err := tx.QueryRowContext(ctx, `SELECT COUNT(*) FROM workshop_deletions WHERE workshop_id = ?`, rec.Workshop.ID).Scan(&n)
	if err != nil || n > 0 {
		return false, err
	}
	for table, list := range ids {
		seen := make(map[int64]bool, len(list))
		for _, id := range list {
			if id <= 0 || id > maxKeptID || seen[id] {
				return false, nil
			}
			seen[id] = true
			if err := tx.QueryRowContext(ctx, `SELECT COUNT(*) FROM `+table+` WHERE id = ?`, id).Scan(&n); err != nil || n > 0 {
				return false, err
			}
		}
	}
	return true, nil
}

func (imp importer) insert(query string, args ...any) (int64, error) {
	return imp.insertArgs(query, args)
}

// insertArgs is insert of a query and its arguments as withID gives them.
func (imp importer) insertArgs(query string, args []any) (int64, error) {
	res, err := imp.tx.ExecContext(imp.ctx, query, args...)
	if err != nil {
		return 0, err
	}
	return res.LastInsertId()
}

func (imp importer) workshop(w workshop.Workshop) (int64, error) {
	next := nextWorkshopID
	if imp.keep {
		next = strconv.FormatInt(w.ID, 10)
	}
	return imp.insert(
		`INSERT INTO workshops (id, title, purpose, decision, notes, round, round_open, invented, archived, created)
		 VALUES (`+next+`, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
		w.Title, w.Purpose, w.Decision, w.Notes, w.Round, boolInt(w.Open), boolInt(w.Invented), boolInt(w.Archived), formatTime(w.Created))
}

func (imp importer) question(workshopID int64, q workshop.Question) error {
	probs, err := marshalList(q.Probs)
	if err != nil {
		return err
	}
	edges, err := marshalList(q.BinEdges)
	if err != nil {
		return err
	}
	id, err := imp.insertArgs(withID(
		`INSERT INTO questions (workshop_id, position, wording, quantity, units, lower, upper, format,
		 probs, bin_edges, chips, calibration, true_value, revealed, revealed_at, retired, log_uniform_background)
		 VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`, imp.id(q.ID),
		workshopID, q.Position, q.Wording, q.Quantity, q.Units, q.Lower, q.Upper, string(q.Format),
		probs, edges, q.Chips, boolInt(q.Calibration), nullFloat(q.TrueValue), boolInt(q.Revealed),
		nullTime(q.RevealedAt), boolInt(q.Retired), boolInt(q.LogScale)))
	if err != nil {
		return fmt.Errorf("question %d: %w", q.ID, err)
	}
	imp.questions[q.ID] = id
	return nil
}

func (imp importer) expert(workshopID int64, e workshop.Expert) error {
	id, err := imp.insertArgs(withID(
		`INSERT INTO experts (workshop_id, name, affiliation, expertise, token_hash, revoked, created)
		 VALUES (?, ?, ?, ?, NULL, ?, ?)`, imp.id(e.ID),
		workshopID, e.Name, e.Affiliation, e.Expertise, boolInt(e.Revoked), formatTime(e.Created)))
	if err != nil {
		return fmt.Errorf("expert %d: %w", e.ID, err)
	}
	imp.experts[e.ID] = id
	return nil
}

func (imp importer) revision(rv workshop.Revision) error {
	values, err := marshalList(rv.Answer.Values)
	if err != nil {
		return err
	}
	counts, err := marshalList(rv.Answer.Counts)
	if err != nil {
		return err
	}
	rv.QuestionID, rv.ExpertID = imp.questions[rv.QuestionID], imp.experts[rv.ExpertID]
	id, err := insertRevision(imp.ctx, imp.tx, rv, values, counts, imp.id(rv.ID))
	if err != nil {
		return fmt.Errorf("revision %d: %w", rv.ID, err)
	}
	imp.revisions[rv.ID] = id
	if rv.ReasonWithheld {
		if _, err := imp.insert(`INSERT INTO reason_decisions (revision_id, withheld, reason, at) VALUES (?, 1, ?, ?)`,
			id, "withheld in the imported record", formatTime(rv.At)); err != nil {
			return fmt.Errorf("revision %d: %w", rv.ID, err)
		}
	}
	return nil
}

// frozenThrough carries a revealed question's freeze over to the new IDs:
// the last imported revision of the question whose old ID was at most the
// old RevealedThrough.
func (imp importer) frozenThrough(q workshop.Question, revs []record.Revision) error {
	if q.RevealedThrough == 0 {
		return nil
	}
	var through int64
	for _, rv := range revs {
		if rv.QuestionID == q.ID && rv.ID <= q.RevealedThrough {
			through = max(through, imp.revisions[rv.ID])
		}
	}
	_, err := imp.tx.ExecContext(imp.ctx, `UPDATE questions SET revealed_through = ? WHERE id = ?`, through, imp.questions[q.ID])
	if err != nil {
		return fmt.Errorf("question %d: %w", q.ID, err)
	}
	return nil
}

// weights writes one weight set of the record, with its basis, unless it
// is the default (equal, never set).
func (imp importer) weights(workshopID int64, w workshop.Weights) error {
	if w.ID == 0 && w.At.IsZero() && w.Scheme == workshop.WeightsEqual && len(w.ByExpert) == 0 {
		return nil
	}
	byExpert := map[int64]float64{}
	for id, v := range w.ByExpert {
		byExpert[imp.experts[id]] = v
	}
	b, err := json.Marshal(byExpert)
	if err != nil {
		return fmt.Errorf("weights: %w", err)
	}
	basis, err := marshalBasis(imp.basis(w.Basis))
	if err != nil {
		return err
	}
	id, err := insertWeights(imp.ctx, imp.tx, workshopID, string(w.Scheme), string(b), w.Reason, w.At, basis, imp.id(w.ID))
	if err != nil {
		return fmt.Errorf("weight set %d: %w", w.ID, err)
	}
	if w.ID != 0 {
		imp.weightSets[w.ID] = id
	}
	return nil
}

// basis is a weight set's basis with the new IDs of its experts,
// questions and revisions.
func (imp importer) basis(b *workshop.WeightBasis) *workshop.WeightBasis {
	if b == nil {
		return nil
	}
	out := *b
	out.Questions = append([]workshop.BasisQuestion(nil), b.Questions...)
	for i := range out.Questions {
		out.Questions[i].QuestionID = imp.questions[out.Questions[i].QuestionID]
	}
	out.CalibrationAnswers = append([]workshop.BasisAnswer(nil), b.CalibrationAnswers...)
	for i := range out.CalibrationAnswers {
		a := &out.CalibrationAnswers[i]
		a.ExpertID, a.QuestionID, a.RevisionID = imp.experts[a.ExpertID], imp.questions[a.QuestionID], imp.revisions[a.RevisionID]
	}
	out.Skipped = append([]workshop.SkippedQuestion(nil), b.Skipped...)
	for i := range out.Skipped {
		out.Skipped[i].ID = imp.questions[out.Skipped[i].ID]
	}
	out.Experts = append([]workshop.PerformanceExpert(nil), b.Experts...)
	for i := range out.Experts {
		out.Experts[i].ExpertID = imp.experts[out.Experts[i].ExpertID]
	}
	return &out
}

func (imp importer) prior(ap workshop.AgreedPrior) error {
	consensus, err := marshalConsensus(ap.Consensus)
	if err != nil {
		return err
	}
	construction, err := marshalConstruction(ap.Construction)
	if err != nil {
		return err
	}
	ap.QuestionID, ap.WeightSetID = imp.questions[ap.QuestionID], imp.weightSets[ap.WeightSetID]
	if len(ap.Pooled) > 0 {
		pooled := make([]int64, len(ap.Pooled))
		for i, id := range ap.Pooled {
			pooled[i] = imp.revisions[id]
		}
		ap.Pooled = pooled
	}
	if _, err := insertPrior(imp.ctx, imp.tx, ap, consensus, construction, imp.id(ap.ID)); err != nil {
		return fmt.Errorf("agreed prior %d: %w", ap.ID, err)
	}
	return nil
}

// remapDetail rewrites the expert and revision IDs in an event's detail:
// an "expert_id" or "revision_id" number, a reveal's "revealed_through"
// (the revision frozenThrough maps the question's freeze to), the numbers
// of a "revisions" list and the keys of a "by_expert" object. A detail
// whose IDs do not change, or that is not a JSON object, is kept byte for
// byte.
func remapDetail(detail string, experts, revisions map[int64]int64) string {
	var m map[string]json.RawMessage
	if detail == "" || json.Unmarshal([]byte(detail), &m) != nil {
		return detail
	}
	changed := false
	for key, ids := range map[string]map[int64]int64{"expert_id": experts, "revision_id": revisions, "revealed_through": revisions} {
		raw, ok := m[key]
		if !ok {
			continue
		}
		var id int64
		if json.Unmarshal(raw, &id) == nil {
			if n, ok := ids[id]; ok && n != id {
				m[key] = json.RawMessage(strconv.FormatInt(n, 10))
				changed = true
			}
		}
	}
	if raw, ok := m["revisions"]; ok { // an answer sheet's (workshop.SheetImport)
		var list []int64
		if json.Unmarshal(raw, &list) == nil {
			for i, id := range list {
				if n, ok := revisions[id]; ok && n != id {
					list[i] = n
					changed = true
				}
			}
			b, _ := json.Marshal(list)
			m["revisions"] = b
		}
	}
	if raw, ok := m["by_expert"]; ok {
		var by map[int64]float64
		if json.Unmarshal(raw, &by) == nil {
			out := map[int64]float64{}
			for id, v := range by {
				if n, ok := experts[id]; ok && n != id {
					id = n
					changed = true
				}
				out[id] = v
			}
			b, _ := json.Marshal(out)
			m["by_expert"] = b
		}
	}
	if !changed {
		return detail
	}
	b, err := json.Marshal(m)
	if err != nil {
		return detail
	}
	return string(b)
}

// withdrawal restores the withdrawal a revision_withdrawn event records
// (its detail already remapped), with the event's reason and time: the
// record's withdrawn flags are its events' (record.CheckDefinitions).
func (imp importer) withdrawal(e workshop.Event) error {
	var d workshop.Withdrawal
	if err := json.Unmarshal([]byte(e.Detail), &d); err != nil {
		return fmt.Errorf("event %d: %w", e.ID, err)
	}
	if _, err := imp.tx.ExecContext(imp.ctx, `INSERT INTO withdrawals (revision_id, reason, at) VALUES (?, ?, ?)`,
		d.RevisionID, e.Reason, formatTime(e.At)); err != nil {
		return fmt.Errorf("event %d: withdrawal of revision %d: %w", e.ID, d.RevisionID, err)
	}
	return nil
}

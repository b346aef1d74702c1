package store

import (
	"context"
	"database/sql"
	"fmt"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// Reads of revisions narrower than a whole workshop, for the pages an
// expert opens many times a round: each reads only what the page shows,
// through the index on (question_id, expert_id, id).

// The last three columns are whether the facilitator's latest decision on
// the revision's reason withholds it from the feedback (reason_decisions),
// whether the revision was withdrawn (withdrawals), and the revision's
// kept fit (revision_fits), NULL when none was kept.
const revisionColumns = `r.id, r.question_id, r.expert_id, r.round, r.at, r.reason,
	r.answer_values, r.lowest, r.highest, r.best, r.confidence, r.counts, r.percent, r.entered_by, r.channel,
	COALESCE((SELECT d.withheld FROM reason_decisions d WHERE d.revision_id = r.id ORDER BY d.id DESC LIMIT 1), 0),
	EXISTS (SELECT 1 FROM withdrawals x WHERE x.revision_id = r.id),
	(SELECT f.fit FROM revision_fits f WHERE f.revision_id = r.id)`

// standing keeps the revisions not withdrawn, for the narrower reads: they
// serve the pages of one expert's own answers (the expert's pages) and
// the round feedback, where
// a withdrawn judgement is nobody's answer. The whole workshop's read
// (Revisions) keeps them, marked, for the question's history and the
// record, and so does ExpertHistory for the facilitator's pages of one
// expert.
const standing = `NOT EXISTS (SELECT 1 FROM withdrawals x WHERE x.revision_id = r.id)`

// ExpertRevisions returns one expert's revisions on every question of
// their workshop that were not withdrawn, oldest first.
func (db *DB) ExpertRevisions(ctx context.Context, expertID int64) ([]workshop.Revision, error) {
	return scanRevisions(db.r.QueryContext(ctx,
		`SELECT `+revisionColumns+` FROM revisions r WHERE r.expert_id = ? AND `+standing+` ORDER BY r.id`, expertID))
}

// ExpertHistory returns one expert's revisions on every question of
// their workshop, withdrawn ones too (Revision.Withdrawn), oldest first:
// the facilitator's pages of one expert list them, marked, beside the
// answers that stand.
func (db *DB) ExpertHistory(ctx context.Context, expertID int64) ([]workshop.Revision, error) {
	return scanRevisions(db.r.QueryContext(ctx,
		`SELECT `+revisionColumns+` FROM revisions r WHERE r.expert_id = ? ORDER BY r.id`, expertID))
}

// QuestionExpertRevisions returns one expert's revisions of one question
// that were not withdrawn, oldest first.
func (db *DB) QuestionExpertRevisions(ctx context.Context, questionID, expertID int64) ([]workshop.Revision, error) {
	return scanRevisions(db.r.QueryContext(ctx,
		`SELECT `+revisionColumns+` FROM revisions r
		 WHERE r.question_id = ? AND r.expert_id = ? AND `+standing+` ORDER BY r.id`, questionID, expertID))
}

// LatestRevisions returns each expert's latest revision of one question
// saved in round `through` or before and not withdrawn (the one with the
// highest id, revisions being append-only), ordered by revision id: what
// workshop.Current picks from all the question's revisions with
// workshop.Through(through), for a round through of 1 or more.
func (db *DB) LatestRevisions(ctx context.Context, questionID int64, through int) ([]workshop.Revision, error) {
	return scanRevisions(db.r.QueryContext(ctx,
		`SELECT `+revisionColumns+` FROM revisions r
		 WHERE r.id IN (SELECT MAX(id) FROM revisions r WHERE question_id = ? AND round <= ? AND `+standing+` GROUP BY expert_id)
		 ORDER BY r.id`, questionID, through))
}

// scanRevisions reads rows of revisionColumns.
func scanRevisions(rows *sql.Rows, err error) ([]workshop.Revision, error) {
	if err != nil {
		return nil, fmt.Errorf("store: revisions: %w", err)
	}
	defer rows.Close()
	var rs []workshop.Revision
	for rows.Next() {
		var (
			r                       workshop.Revision
			at, vs, counts, by, via string
			withheld, percent       int
			withdrawn               bool
			kept                    sql.NullString
		)
		if err := rows.Scan(&r.ID, &r.QuestionID, &r.ExpertID, &r.Round, &at, &r.Reason,
			&vs, &r.Answer.Lowest, &r.Answer.Highest, &r.Answer.Best, &r.Answer.Confidence, &counts, &percent, &by, &via, &withheld, &withdrawn, &kept); err != nil {
			return nil, fmt.Errorf("store: read revision: %w", err)
		}
		if kept.Valid {
			var f elicit.Fit
			if err := decodeJSON(kept.String, &f); err != nil {
				return nil, fmt.Errorf("store: revision %d: kept fit: %w", r.ID, err)
			}
			// A fit kept by an earlier version is read with the
			// warnings this version derives from its points.
			f = f.Refreshed()
			r.Kept = &f
		}
		r.ReasonWithheld, r.Answer.Percent, r.Withdrawn = withheld == 1, percent == 1, withdrawn
		r.EnteredBy, r.Channel = workshop.EnteredBy(by), workshop.Channel(via)
		if r.At, err = parseTime(at); err != nil {
			return nil, err
		}
		if err := unmarshalList(vs, &r.Answer.Values); err != nil {
			return nil, err
		}
		if err := unmarshalList(counts, &r.Answer.Counts); err != nil {
			return nil, err
		}
		rs = append(rs, r)
	}
	return rs, rows.Err()
}

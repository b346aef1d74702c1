package record

import "github.com/parley-elicit/parley/elicit/workshop"

// PoolChange reports how the pool under question q's agreed prior has
// moved since the prior was agreed from it (workshop.AgreedPrior's
// PoolChangeSince), read from the record alone: the pool now is each
// current revision on q (workshop.Current) that has a fit, of an expert
// whose access stands, as the panel pools them (Member.Fitted); the
// weight set in force then is found in WeightHistory (equal weights for
// a prior agreed before any set was applied). It reads the revisions,
// not q's CurrentFits, so a record built without panels (BuildHistory,
// the CSVs) answers as the whole record does. False when q's prior is
// not from the pool or cannot be compared. The report's note and the
// priors CSV's pool_changed column both read it.
func (r Record) PoolChange(q Question) (workshop.PoolChange, bool) {
	if q.AgreedPrior == nil {
		return workshop.PoolChange{}, false
	}
	revoked := make(map[int64]bool, len(r.Experts))
	for _, e := range r.Experts {
		revoked[e.ID] = e.Revoked
	}
	revs := make([]workshop.Revision, 0, len(r.Revisions))
	fitted := map[int64]bool{}
	expertOf := map[int64]int64{}
	withdrawn := map[int64]bool{}
	for _, rv := range r.Revisions {
		if rv.QuestionID == q.ID {
			revs = append(revs, rv.Revision)
			fitted[rv.ID] = rv.Fit != nil
			expertOf[rv.ID] = rv.ExpertID
			withdrawn[rv.ID] = rv.Withdrawn
		}
	}
	now := map[int64]int64{}
	for k, rv := range workshop.Current(revs, nil) {
		if fitted[rv.ID] && !revoked[k.Expert] {
			now[k.Expert] = rv.ID
		}
	}
	var then *workshop.Weights
	if q.AgreedPrior.WeightSetID == 0 {
		then = &workshop.Weights{Scheme: workshop.WeightsEqual}
	}
	for i := range r.WeightHistory {
		if r.WeightHistory[i].ID == q.AgreedPrior.WeightSetID && q.AgreedPrior.WeightSetID != 0 {
			then = &r.WeightHistory[i]
		}
	}
	return q.AgreedPrior.PoolChangeSince(now, r.Weights, then, expertOf, withdrawn)
}

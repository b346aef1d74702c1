package record

import (
	"fmt"
	"time"

	"github.com/parley-elicit/parley/elicit"
)

// MaxAhead is how far after the importing machine's clock a record's
// workshop creation and facts may be dated. Every fact was written before
// the record was exported, so a later date is a clock that was wrong on
// one of the two machines. A day passes the skew of two machines kept
// roughly right, and one whose clock shows local time as if it were UTC
// (up to 14 hours off); a fact further ahead is refused, because the
// store stamps each new fact of a workshop after its latest one
// (store.stamp), so an imported fact dated ahead would pin every stamp
// of the workshop to it until the clock caught up.
const MaxAhead = 24 * time.Hour

// RuleAheadOfClock is broken by a record with a fact (or its workshop's
// creation, an expert's addition or a true value's reveal) dated more
// than MaxAhead after the importing machine's clock.
const RuleAheadOfClock elicit.Rule = "must not be dated more than 24 hours after this machine's clock " +
	"(the record was written by a machine whose clock was ahead, or this machine's clock is behind: set the wrong one right and import again)"

// CheckNotAhead refuses a record with a time, of those the importing
// store keeps, dated more than MaxAhead after now, the importing
// machine's clock (RuleAheadOfClock, at the time's path, e.g.
// "events[4].at"): the workshop's creation, each expert's addition
// (experts[i].created), each question's reveal of its true value
// (questions[i].revealed_at) and every fact (revisions, weight sets,
// agreed priors, study data, events). The detail names the fact as the
// record does: its kind and id, with its question or round. The facts
// are what the store stamps new facts after; the other times a reader
// takes as when the panel was formed or a true value shown. A question's
// agreed_prior, the weights in force and the chain's facts repeat times
// checked here (Validate holds them equal), and a batch's observed_on
// is held to its at (workshop.StudyData.CheckObservedBy). generated_at,
// when the record was written, is not checked: the import keeps nothing
// of it, and a record written by a machine whose clock then ran ahead is
// as true as any (DEVELOPERS.md, "The record's fingerprint").
func (r Record) CheckNotAhead(now time.Time) error {
	limit := now.Add(MaxAhead)
	ahead := func(path, what string, at time.Time) error {
		if !at.After(limit) {
			return nil
		}
		return inputErr(path, RuleAheadOfClock, "%s: dated %s, %s after this machine's clock, which reads %s",
			what, stampText(at), at.Sub(now).Round(time.Second), stampText(now))
	}
	if err := ahead("workshop.created", fmt.Sprintf("workshop %d's creation", r.Workshop.ID), r.Workshop.Created); err != nil {
		return err
	}
	for i, e := range r.Experts {
		if err := ahead(fmt.Sprintf("experts[%d].created", i), fmt.Sprintf("expert %d's addition to the panel", e.ID), e.Created); err != nil {
			return err
		}
	}
	for i, q := range r.Questions {
		if q.RevealedAt == nil {
			continue
		}
		what := fmt.Sprintf("the reveal of question %d's true value", q.ID)
		if err := ahead(fmt.Sprintf("questions[%d].revealed_at", i), what, *q.RevealedAt); err != nil {
			return err
		}
	}
	for i, rv := range r.Revisions {
		what := fmt.Sprintf("revision %d, of question %d in round %d", rv.ID, rv.QuestionID, rv.Round)
		if err := ahead(fmt.Sprintf("revisions[%d].at", i), what, rv.At); err != nil {
			return err
		}
	}
	for i, w := range r.WeightHistory {
		if err := ahead(fmt.Sprintf("weight_history[%d].at", i), fmt.Sprintf("weight set %d", w.ID), w.At); err != nil {
			return err
		}
	}
	// A record made before the history carries only the set in force,
	// which the import keeps.
	if len(r.WeightHistory) == 0 {
		if err := ahead("weights.at", fmt.Sprintf("weight set %d", r.Weights.ID), r.Weights.At); err != nil {
			return err
		}
	}
	for i, q := range r.Questions {
		for j, ap := range q.PriorHistory {
			what := fmt.Sprintf("agreed prior %d, of question %d", ap.ID, ap.QuestionID)
			if err := ahead(fmt.Sprintf("questions[%d].prior_history[%d].at", i, j), what, ap.At); err != nil {
				return err
			}
		}
	}
	for i, d := range r.StudyData {
		what := fmt.Sprintf("study data %d, of question %d", d.ID, d.QuestionID)
		if err := ahead(fmt.Sprintf("study_data[%d].at", i), what, d.At); err != nil {
			return err
		}
	}
	for i, e := range r.Events {
		what := fmt.Sprintf("event %d, %s", e.ID, e.Kind)
		if round, ok := e.Round(); ok {
			what += fmt.Sprintf(" of round %d", round)
		} else if e.QuestionID != 0 {
			what += fmt.Sprintf(" of question %d", e.QuestionID)
		}
		if err := ahead(fmt.Sprintf("events[%d].at", i), what, e.At); err != nil {
			return err
		}
	}
	return nil
}

// stampText is a fact's time as the refusals write it, to the microsecond
// a stamp carries.
func stampText(t time.Time) string {
	return t.UTC().Format("2006-01-02 15:04:05.999999 UTC")
}

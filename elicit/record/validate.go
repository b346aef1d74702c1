package record

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// Limits on a record's free text, checked on import.
const (
	maxTitle = 200
	maxText  = 20000
)

// Validate checks a record as an import would receive it: the format
// marker, every field of every entity, and that every reference points at
// an entity of the record. Answers and consensus judgements are re-checked
// by fitting them. Derived numbers (fits, pools, snippets) are not trusted
// and not checked: an import drops them. The first broken rule is
// returned as an *InputError whose Field is the path into the document,
// e.g. "revisions[3].answer.values[1]".
func (r Record) Validate() error {
	if r.Format != Version {
		return inputErr("parley_record", elicit.RuleUnknown, "format %d; this version reads %d", r.Format, Version)
	}
	w := r.Workshop
	if err := checkWorkshop(w); err != nil {
		return err
	}
	experts := map[int64]bool{}
	for i, e := range r.Experts {
		p := fmt.Sprintf("experts[%d]", i)
		if err := checkID(p+".id", e.ID, experts); err != nil {
			return err
		}
		if e.WorkshopID != w.ID {
			return inputErr(p+".workshop_id", elicit.RuleUnknown, "%d is not the workshop's id %d", e.WorkshopID, w.ID)
		}
		if err := checkText(p+".name", e.Name, true, maxTitle); err != nil {
			return err
		}
		if err := checkText(p+".affiliation", e.Affiliation, false, maxTitle); err != nil {
			return err
		}
		if err := checkText(p+".expertise", e.Expertise, false, maxText); err != nil {
			return err
		}
		if e.Created.IsZero() {
			return inputErr(p+".created", elicit.RuleRequired, "")
		}
		experts[e.ID] = true
	}
	questions := map[int64]workshop.Question{}
	seenQ := map[int64]bool{}
	positions := map[int]bool{}
	for i, q := range r.Questions {
		p := fmt.Sprintf("questions[%d]", i)
		if err := checkID(p+".id", q.ID, seenQ); err != nil {
			return err
		}
		if q.WorkshopID != w.ID {
			return inputErr(p+".workshop_id", elicit.RuleUnknown, "%d is not the workshop's id %d", q.WorkshopID, w.ID)
		}
		if err := checkQuestion(p, q.Question); err != nil {
			return err
		}
		if positions[q.Position] {
			return inputErr(p+".position", elicit.RuleUnknown, "position %d appears twice", q.Position)
		}
		positions[q.Position] = true
		seenQ[q.ID] = true
		questions[q.ID] = q.Question
		for j, ap := range q.PriorHistory {
			if err := checkPrior(fmt.Sprintf("%s.prior_history[%d]", p, j), ap, q.Question, w); err != nil {
				return err
			}
		}
	}
	seenR := map[int64]bool{}
	for i, rv := range r.Revisions {
		p := fmt.Sprintf("revisions[%d]", i)
		if err := checkID(p+".id", rv.ID, seenR); err != nil {
			return err
		}
		seenR[rv.ID] = true
		q, ok := questions[rv.QuestionID]
		if !ok {
			return inputErr(p+".question_id", elicit.RuleUnknown, "no question %d in the record", rv.QuestionID)
		}
		if !experts[rv.ExpertID] {
			return inputErr(p+".expert_id", elicit.RuleUnknown, "no expert %d in the record", rv.ExpertID)
		}
		if err := checkRound(p+".round", rv.Round, w); err != nil {
			return err
		}
		if rv.At.IsZero() {
			return inputErr(p+".at", elicit.RuleRequired, "")
		}
		if err := checkText(p+".reason", rv.Reason, false, maxText); err != nil {
			return err
		}
		if err := rv.CheckProvenance(); err != nil {
			return under(p, err)
		}
		if _, err := q.Fit(rv.Answer); err != nil {
			return under(p+".answer", err)
		}
	}
	if err := r.checkWeightHistory(experts, questions); err != nil {
		return err
	}
	seenE := map[int64]bool{}
	for i, e := range r.Events {
		p := fmt.Sprintf("events[%d]", i)
		if err := checkID(p+".id", e.ID, seenE); err != nil {
			return err
		}
		seenE[e.ID] = true
		if e.WorkshopID != w.ID {
			return inputErr(p+".workshop_id", elicit.RuleUnknown, "%d is not the workshop's id %d", e.WorkshopID, w.ID)
		}
		if _, ok := questions[e.QuestionID]; e.QuestionID != 0 && !ok {
			return inputErr(p+".question_id", elicit.RuleUnknown, "no question %d in the record", e.QuestionID)
		}
		if !knownEvent(e.Kind) {
			return inputErr(p+".kind", elicit.RuleUnknown, "%q", e.Kind)
		}
		if e.At.IsZero() {
			return inputErr(p+".at", elicit.RuleRequired, "")
		}
		if err := checkText(p+".reason", e.Reason, false, maxText); err != nil {
			return err
		}
		if err := checkText(p+".detail", e.Detail, false, maxText); err != nil {
			return err
		}
	}
	return nil
}

func checkWorkshop(w workshop.Workshop) error {
	if w.ID <= 0 {
		return inputErr("workshop.id", elicit.RulePositive, "got %d", w.ID)
	}
	if err := checkText("workshop.title", w.Title, true, maxTitle); err != nil {
		return err
	}
	for _, f := range []struct{ name, v string }{
		{"workshop.purpose", w.Purpose}, {"workshop.decision", w.Decision}, {"workshop.notes", w.Notes},
	} {
		if err := checkText(f.name, f.v, false, maxText); err != nil {
			return err
		}
	}
	if w.Round < 1 {
		return inputErr("workshop.round", elicit.RulePositive, "got %d", w.Round)
	}
	if w.Created.IsZero() {
		return inputErr("workshop.created", elicit.RuleRequired, "")
	}
	return nil
}

func checkQuestion(p string, q workshop.Question) error {
	if q.Position < 1 {
		return inputErr(p+".position", elicit.RulePositive, "got %d", q.Position)
	}
	if q.TrueValue != nil && !q.Calibration {
		return inputErr(p+".true_value", elicit.RuleUnknown, "only a calibration question has a true value")
	}
	if q.RevealedThrough < 0 {
		return inputErr(p+".revealed_through", elicit.RuleNonNegative, "got %d", q.RevealedThrough)
	}
	if (q.RevealedAt != nil || q.RevealedThrough > 0) && !q.Frozen() {
		return inputErr(p+".revealed_at", elicit.RuleUnknown, "only a calibration question whose true value is revealed has a reveal")
	}
	return under(p, q.Validate())
}

func checkPrior(p string, ap workshop.AgreedPrior, q workshop.Question, w workshop.Workshop) error {
	if ap.ID <= 0 {
		return inputErr(p+".id", elicit.RulePositive, "got %d", ap.ID)
	}
	if ap.QuestionID != q.ID {
		return inputErr(p+".question_id", elicit.RuleUnknown, "%d is not the question's id %d", ap.QuestionID, q.ID)
	}
	switch ap.Source {
	case workshop.PriorFromPool, workshop.PriorFromConsensus:
	default:
		return inputErr(p+".source", elicit.RuleUnknown, "%q", ap.Source)
	}
	if err := ap.Dist.Validate(); err != nil {
		return under(p+".dist", err)
	}
	if ap.Consensus != nil {
		if _, err := q.Fit(*ap.Consensus); err != nil {
			return under(p+".consensus", err)
		}
	}
	if err := checkText(p+".rationale", ap.Rationale, false, maxText); err != nil {
		return err
	}
	if err := checkRound(p+".round", ap.Round, w); err != nil {
		return err
	}
	if ap.At.IsZero() {
		return inputErr(p+".at", elicit.RuleRequired, "")
	}
	return nil
}

// checkWeightHistory checks the weights in force, every set in the
// history with its basis, and that the history ends with the set in
// force. A record without a history (made before Parley kept one) must
// not name a set it does not carry.
func (r Record) checkWeightHistory(experts map[int64]bool, questions map[int64]workshop.Question) error {
	w := r.Workshop
	if err := checkRecordWeights("weights", r.Weights, w, experts); err != nil {
		return err
	}
	sets := map[int64]bool{}
	var last workshop.Weights
	for i, wt := range r.WeightHistory {
		p := fmt.Sprintf("weight_history[%d]", i)
		if err := checkRecordWeights(p, wt, w, experts); err != nil {
			return err
		}
		if wt.ID <= last.ID {
			return inputErr(p+".id", elicit.RuleUnknown, "set %d after set %d: the history runs oldest first", wt.ID, last.ID)
		}
		if wt.At.IsZero() {
			return inputErr(p+".at", elicit.RuleRequired, "")
		}
		if wt.Basis != nil {
			if err := checkBasis(p+".basis", *wt.Basis, wt, r, experts, questions); err != nil {
				return err
			}
		}
		sets[wt.ID], last = true, wt
	}
	switch {
	case len(r.WeightHistory) > 0 && r.Weights.ID != last.ID:
		return inputErr("weights.id", elicit.RuleUnknown, "set %d is in force, but the history ends with set %d", r.Weights.ID, last.ID)
	case len(r.WeightHistory) == 0 && r.Weights.ID != 0:
		return inputErr("weights.id", elicit.RuleUnknown, "set %d is not in weight_history", r.Weights.ID)
	case r.Weights.Basis != nil && len(r.WeightHistory) == 0:
		return inputErr("weights.basis", elicit.RuleUnknown, "a basis needs its set in weight_history")
	}
	for i, q := range r.Questions {
		for j, ap := range q.PriorHistory {
			if ap.WeightSetID != 0 && !sets[ap.WeightSetID] {
				return inputErr(fmt.Sprintf("questions[%d].prior_history[%d].weight_set_id", i, j), elicit.RuleUnknown,
					"no weight set %d in weight_history", ap.WeightSetID)
			}
		}
	}
	return nil
}

func checkRecordWeights(p string, wt workshop.Weights, w workshop.Workshop, experts map[int64]bool) error {
	if wt.ID < 0 {
		return inputErr(p+".id", elicit.RuleNonNegative, "got %d", wt.ID)
	}
	if wt.WorkshopID != w.ID {
		return inputErr(p+".workshop_id", elicit.RuleUnknown, "%d is not the workshop's id %d", wt.WorkshopID, w.ID)
	}
	switch wt.Scheme {
	case workshop.WeightsEqual, workshop.WeightsCustom, workshop.WeightsPerformance:
	default:
		return inputErr(p+".scheme", elicit.RuleUnknown, "%q", wt.Scheme)
	}
	ids := make([]int64, 0, len(wt.ByExpert))
	for id := range wt.ByExpert {
		ids = append(ids, id)
	}
	sort.Slice(ids, func(i, j int) bool { return ids[i] < ids[j] })
	total := 0.0
	for _, id := range ids {
		f := fmt.Sprintf("%s.by_expert[%d]", p, id)
		if !experts[id] {
			return inputErr(f, elicit.RuleUnknown, "no expert %d in the record", id)
		}
		v := wt.ByExpert[id]
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return inputErr(f, elicit.RuleFinite, "got %v", v)
		}
		if v < 0 {
			return inputErr(f, elicit.RuleNonNegative, "got %v", v)
		}
		total += v
	}
	if wt.Scheme != workshop.WeightsEqual && total == 0 {
		return inputErr(p+".by_expert", elicit.RuleWeightsNotAllZero, "")
	}
	return checkText(p+".reason", wt.Reason, false, maxText)
}

func checkRound(field string, round int, w workshop.Workshop) error {
	if round < 1 || round > w.Round {
		return inputErr(field, elicit.RuleCountRange, "round %d; the workshop has rounds 1 to %d", round, w.Round)
	}
	return nil
}

func checkID(field string, id int64, seen map[int64]bool) error {
	if id <= 0 {
		return inputErr(field, elicit.RulePositive, "got %d", id)
	}
	if seen[id] {
		return inputErr(field, elicit.RuleUnknown, "id %d appears twice", id)
	}
	return nil
}

func checkText(field, s string, required bool, max int) error {
	if required && strings.TrimSpace(s) == "" {
		return inputErr(field, elicit.RuleRequired, "")
	}
	if len(s) > max {
		return inputErr(field, input.RuleTooLong, "%d bytes, at most %d", len(s), max)
	}
	return nil
}

func knownEvent(k workshop.EventKind) bool {
	for _, known := range workshop.EventKinds {
		if k == known {
			return true
		}
	}
	return false
}

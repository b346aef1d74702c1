package record

import (
	"encoding/json"
	"fmt"
	"reflect"
	"slices"
	"time"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// RuleDefinitionMismatch is broken by a question whose definition (its
// bounds, format, probabilities, scoring, true value once revealed) is
// not the one its chained events give: its question_added event's
// definition with each later correction, change of background and reveal
// applied; by a question whose freeze (revealed_at, revealed_through:
// which answers are scored) is not the one its first reveal's event
// gives; by a workshop whose title, purpose, decision or notes are not
// the ones its workshop_created event and workshop_edited events give;
// by an expert whose name, affiliation or expertise is not the
// one their expert_added event gives (no correction changes them); by an
// expert whose revocation, which keeps their answers
// out of the pool, is not the one their expert_revoked and
// token_reissued events give; by a question whose retirement, which
// keeps it out of the pools and the scores, is not the one its
// question_retired and question_restored events give; or by a revision
// whose reason_withheld is not the one its reason_withheld and
// reason_released events give, or whose withdrawn is not the one its
// revision_withdrawn event gives.
const RuleDefinitionMismatch elicit.Rule = "must be what its events in the decision log give (it was changed without an event)"

// RuleOldestFirst is broken by a record whose events or revisions are
// not listed oldest first, by id: the order the decisions replay in, and
// the order an import that numbers rows anew gives them their ids (an
// expert's current answer is their revision with the highest id). The
// ids are chained; the lists' order is not.
const RuleOldestFirst elicit.Rule = "must be listed oldest first, in ascending id (the order they were recorded)"

// CheckDefinitions checks each expert's revocation and each question
// against their chained events, replayed in the order they were recorded:
// a record must list its events by ascending id (RuleOldestFirst), since
// the chain covers each event's id but not the list's order. An expert named by an expert_added event
// must be revoked as their expert_revoked and token_reissued events give.
// A
// question whose question_added event carries its definition
// (workshop.Question.Definition; events recorded before it did carry
// none and their questions are not checked) must have the definition
// that event, the question_edited events' "after" values, the
// calibration_background_set events and the truth_revealed events give,
// in the log's order. A question whose truth_revealed event carries the
// freeze it set (workshop.Reveal; reveals recorded before it did carry
// none and are not checked for it) must have that revealed_at and
// revealed_through. A question named by a question_added event must be
// retired as its question_retired and question_restored events give,
// and every revision's reason withheld as the reason_withheld and
// reason_released events naming it give (not withheld when none does),
// and withdrawn when a revision_withdrawn event names it, and only then.
// A revision_withdrawn event must carry its reason and name a revision of
// its question (RuleWithdrawalUnknown), at most once.
// The chain makes the events tamper-evident; this binds the questions'
// own rows, which are not chained, to them.
func (r Record) CheckDefinitions() error {
	// The events replay in the order they were recorded, their ids' (as
	// the store lists them): the ids are chained, the list's order is not.
	for i := 1; i < len(r.Events); i++ {
		if prev, e := r.Events[i-1], r.Events[i]; e.ID <= prev.ID {
			return inputErr(fmt.Sprintf("events[%d].id", i), RuleOldestFirst, "event %d after event %d", e.ID, prev.ID)
		}
	}
	if text, ok := r.replayWorkshopText(); ok {
		now := map[string]string{"title": r.Workshop.Title, "purpose": r.Workshop.Purpose, "decision": r.Workshop.Decision, "notes": r.Workshop.Notes}
		for _, f := range workshop.TextFields {
			if now[f] != text[f] {
				return inputErr("workshop."+f, RuleDefinitionMismatch, "the record has %s, its events give %s", jsonText(now[f]), jsonText(text[f]))
			}
		}
	}
	added, revocations := r.expertsAdded(), r.replayRevoked()
	for i, e := range r.Experts {
		if a, ok := added[e.ID]; ok {
			for _, f := range []struct{ name, got, want string }{
				{"name", e.Name, *a.Name}, {"affiliation", e.Affiliation, a.Affiliation}, {"expertise", e.Expertise, a.Expertise},
			} {
				if f.got != f.want {
					return inputErr(fmt.Sprintf("experts[%d].%s", i, f.name), RuleDefinitionMismatch,
						"the record has %s, the expert's expert_added event gives %s", jsonText(f.got), jsonText(f.want))
				}
			}
		}
		if revoked, ok := revocations[e.ID]; ok && revoked != e.Revoked {
			return inputErr(fmt.Sprintf("experts[%d].revoked", i), RuleDefinitionMismatch,
				"the record has %t, the expert's events give %t", e.Revoked, revoked)
		}
	}
	retired, withheld, withdrawn := r.replayStates()
	if err := r.checkWithdrawals(); err != nil {
		return err
	}
	for i, q := range r.Questions {
		if want, ok := retired[q.ID]; ok && want != q.Retired {
			return inputErr(fmt.Sprintf("questions[%d].retired", i), RuleDefinitionMismatch,
				"the record has %t, the question's events give %t", q.Retired, want)
		}
	}
	for i, rv := range r.Revisions {
		if want := withheld[rv.ID]; want != rv.ReasonWithheld {
			return inputErr(fmt.Sprintf("revisions[%d].reason_withheld", i), RuleDefinitionMismatch,
				"the record has %t, the events naming revision %d give %t", rv.ReasonWithheld, rv.ID, want)
		}
		if want := withdrawn[rv.ID]; want != rv.Withdrawn {
			return inputErr(fmt.Sprintf("revisions[%d].withdrawn", i), RuleDefinitionMismatch,
				"the record has %t, the events naming revision %d give %t", rv.Withdrawn, rv.ID, want)
		}
	}
	for i, q := range r.Questions {
		if err := r.checkFreeze(i, q.Question); err != nil {
			return err
		}
		state, fields, ok := r.replayDefinition(q.ID)
		if !ok {
			continue
		}
		var now map[string]any
		if json.Unmarshal(q.Question.Fields(fields), &now) != nil {
			continue
		}
		for _, f := range fields {
			if f == "true_value" && !q.Revealed {
				continue
			}
			if !reflect.DeepEqual(state[f], now[f]) {
				return inputErr(fmt.Sprintf("questions[%d].%s", i, f), RuleDefinitionMismatch,
					"the record has %s, its events give %s", jsonText(now[f]), jsonText(state[f]))
			}
		}
	}
	return nil
}

// replayDefinition is question id's definition as its events give it,
// the fields it covers, and ok false when its question_added event
// carries none.
func (r Record) replayDefinition(id int64) (map[string]any, []string, bool) {
	var state map[string]any
	var fields []string
	set := func(detail string, key string) {
		var d map[string]any
		if json.Unmarshal([]byte(detail), &d) != nil {
			return
		}
		if key != "" {
			if v, ok := d[key]; ok {
				d = map[string]any{key: v}
			} else {
				return
			}
		}
		for k, v := range d {
			state[k] = v
			if !slices.Contains(fields, k) {
				fields = append(fields, k)
			}
		}
	}
	for _, e := range r.Events {
		if e.QuestionID != id {
			continue
		}
		switch {
		case e.Kind == workshop.EventQuestionAdded:
			var d map[string]any
			if json.Unmarshal([]byte(e.Detail), &d) != nil || d["lower"] == nil {
				return nil, nil, false
			}
			state = map[string]any{}
			set(e.Detail, "")
		case state == nil:
		case e.Kind == workshop.EventQuestionEdited:
			var d struct {
				After json.RawMessage `json:"after"`
			}
			if json.Unmarshal([]byte(e.Detail), &d) == nil {
				set(string(d.After), "")
			}
		case e.Kind == workshop.EventScaleSet:
			set(e.Detail, "log_uniform_background")
		case e.Kind == workshop.EventTruthRevealed:
			set(e.Detail, "true_value")
		}
	}
	if state == nil {
		return nil, nil, false
	}
	// A background set off reads as the field left out.
	if v, ok := state["log_uniform_background"]; ok && v == false {
		state["log_uniform_background"] = nil
	}
	return state, fields, true
}

// checkFreeze checks question q, the record's i-th, against the freeze
// its first reveal recorded: the reveal's time and the question's last
// revision then, after which no answer is scored. Each part is checked
// when the reveal carries it; a later reveal (a change of the value
// shown) sets no freeze, so only the first that carries one counts.
func (r Record) checkFreeze(i int, q workshop.Question) error {
	var at *time.Time
	var through *int64
	for _, e := range r.Events {
		if e.QuestionID != q.ID || e.Kind != workshop.EventTruthRevealed {
			continue
		}
		var d workshop.Reveal
		if json.Unmarshal([]byte(e.Detail), &d) != nil {
			continue
		}
		if at == nil {
			at = d.RevealedAt
		}
		if through == nil {
			through = d.RevealedThrough
		}
	}
	if at != nil && (q.RevealedAt == nil || !q.RevealedAt.Equal(*at)) {
		return inputErr(fmt.Sprintf("questions[%d].revealed_at", i), RuleDefinitionMismatch,
			"the record has %s, its reveal gives %s", timeText(q.RevealedAt), timeText(at))
	}
	if through != nil && q.RevealedThrough != *through {
		return inputErr(fmt.Sprintf("questions[%d].revealed_through", i), RuleDefinitionMismatch,
			"the record has revision %d, its reveal gives revision %d", q.RevealedThrough, *through)
	}
	return nil
}

// revealCarriesFreeze is whether a reveal of question id in the record
// carries the freeze it set.
func (r Record) revealCarriesFreeze(id int64) bool {
	for _, e := range r.Events {
		var d workshop.Reveal
		if e.QuestionID == id && e.Kind == workshop.EventTruthRevealed &&
			json.Unmarshal([]byte(e.Detail), &d) == nil && d.RevealedThrough != nil {
			return true
		}
	}
	return false
}

func timeText(t *time.Time) string {
	if t == nil {
		return "none"
	}
	return t.UTC().Format(time.RFC3339Nano)
}

// replayWorkshopText is the workshop's text as its events give it: its
// workshop_created event's (workshop.Workshop.CreatedDetail) with each
// workshop_edited event's "after" applied; ok false when the
// workshop_created event carries no text.
func (r Record) replayWorkshopText() (map[string]string, bool) {
	var text map[string]string
	for _, e := range r.Events {
		switch e.Kind {
		case workshop.EventWorkshopCreated:
			var d map[string]string
			if json.Unmarshal([]byte(e.Detail), &d) != nil {
				return nil, false
			}
			if _, ok := d["title"]; !ok {
				return nil, false
			}
			text = d
		case workshop.EventWorkshopEdited:
			var d struct {
				After map[string]string `json:"after"`
			}
			if text != nil && json.Unmarshal([]byte(e.Detail), &d) == nil {
				for k, v := range d.After {
					text[k] = v
				}
			}
		}
	}
	return text, text != nil
}

// expertsAdded are the expert_added events that carry the name the
// expert was added with (workshop.ExpertAdded), by expert id.
func (r Record) expertsAdded() map[int64]workshop.ExpertAdded {
	out := map[int64]workshop.ExpertAdded{}
	for _, e := range r.Events {
		var d workshop.ExpertAdded
		if e.Kind == workshop.EventExpertAdded && json.Unmarshal([]byte(e.Detail), &d) == nil && d.Name != nil {
			out[d.ExpertID] = d
		}
	}
	return out
}

// replayStates replays the events, in the log's order, into each
// question's retirement (only for a question a question_added event
// names: added in use, retired by question_retired, brought back by
// question_restored) and each revision's withheld reason (withheld by a
// reason_withheld event naming it, shown again by reason_released), and
// the revisions a revision_withdrawn event names.
func (r Record) replayStates() (retired, withheld, withdrawn map[int64]bool) {
	retired, withheld, withdrawn = map[int64]bool{}, map[int64]bool{}, map[int64]bool{}
	for _, e := range r.Events {
		switch e.Kind {
		case workshop.EventQuestionAdded:
			if e.QuestionID != 0 {
				retired[e.QuestionID] = false
			}
		case workshop.EventQuestionRetired, workshop.EventQuestionRestored:
			if _, ok := retired[e.QuestionID]; ok {
				retired[e.QuestionID] = e.Kind == workshop.EventQuestionRetired
			}
		case workshop.EventReasonWithheld, workshop.EventReasonReleased:
			var d struct {
				RevisionID int64 `json:"revision_id"`
			}
			if json.Unmarshal([]byte(e.Detail), &d) == nil && d.RevisionID != 0 {
				withheld[d.RevisionID] = e.Kind == workshop.EventReasonWithheld
			}
		case workshop.EventRevisionWithdrawn:
			var d workshop.Withdrawal
			if json.Unmarshal([]byte(e.Detail), &d) == nil && d.RevisionID != 0 {
				withdrawn[d.RevisionID] = true
			}
		}
	}
	return retired, withheld, withdrawn
}

// RuleWithdrawalUnknown is broken by a revision_withdrawn event without
// its reason, or naming no revision of its question, or one another such
// event names already: Parley records a withdrawal once, with its reason,
// of a revision it holds.
const RuleWithdrawalUnknown elicit.Rule = "must carry its reason and name, once, a revision of its question"

// checkWithdrawals checks each revision_withdrawn event, in the log's
// order (RuleWithdrawalUnknown, at events[i]).
func (r Record) checkWithdrawals() error {
	of := make(map[int64]int64, len(r.Revisions))
	for _, rv := range r.Revisions {
		of[rv.ID] = rv.QuestionID
	}
	seen := map[int64]bool{}
	for i, e := range r.Events {
		if e.Kind != workshop.EventRevisionWithdrawn {
			continue
		}
		var d workshop.Withdrawal
		if err := json.Unmarshal([]byte(e.Detail), &d); err != nil {
			return inputErr(fmt.Sprintf("events[%d].detail", i), RuleWithdrawalUnknown, "%v", err)
		}
		switch q, ok := of[d.RevisionID]; {
		case !ok || q != e.QuestionID:
			return inputErr(fmt.Sprintf("events[%d].detail", i), RuleWithdrawalUnknown, "no revision %d of question %d", d.RevisionID, e.QuestionID)
		case seen[d.RevisionID]:
			return inputErr(fmt.Sprintf("events[%d].detail", i), RuleWithdrawalUnknown, "revision %d is withdrawn twice", d.RevisionID)
		case e.Reason == "":
			return inputErr(fmt.Sprintf("events[%d].reason", i), RuleWithdrawalUnknown, "the withdrawal of revision %d has no reason", d.RevisionID)
		}
		seen[d.RevisionID] = true
	}
	return nil
}

// replayRevoked is each expert's revocation as the events give it, in
// one pass over them: added (expert_added naming them) not revoked, each
// expert_revoked revoking and each token_reissued lifting it; an expert
// no expert_added event names is not in the map.
func (r Record) replayRevoked() map[int64]bool {
	out := map[int64]bool{}
	for _, e := range r.Events {
		switch e.Kind {
		case workshop.EventExpertAdded, workshop.EventExpertRevoked, workshop.EventTokenReissued:
		default:
			continue
		}
		var d struct {
			ExpertID int64 `json:"expert_id"`
		}
		if json.Unmarshal([]byte(e.Detail), &d) != nil {
			continue
		}
		_, added := out[d.ExpertID]
		switch {
		case e.Kind == workshop.EventExpertAdded:
			out[d.ExpertID] = false
		case !added:
		case e.Kind == workshop.EventExpertRevoked:
			out[d.ExpertID] = true
		case e.Kind == workshop.EventTokenReissued:
			out[d.ExpertID] = false
		}
	}
	return out
}

func jsonText(v any) string {
	b, _ := json.Marshal(v)
	return string(b)
}

package workshop

import (
	"encoding/json"
	"fmt"
	"math"
	"slices"
	"time"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
)

// AnswerFormat is how experts answer a question.
type AnswerFormat string

// The answer formats a question can ask for.
const (
	// FormatQuantiles asks for values at the question's probabilities
	// (5/50/95 by default; quartiles, tertiles or a custom set).
	FormatQuantiles AnswerFormat = "quantiles"
	// FormatInterval asks for four values: lowest, highest, best estimate,
	// and the expert's confidence that the truth lies between lowest and
	// highest. See elicit.FourValue.
	FormatInterval AnswerFormat = "interval"
	// FormatChips asks the expert to place chips in bins (trial roulette).
	FormatChips AnswerFormat = "chips"
)

// Workshop is one elicitation exercise: a panel of experts answering a set
// of questions over one or more Delphi rounds.
type Workshop struct {
	ID       int64  `json:"id"`
	Title    string `json:"title"`
	Purpose  string `json:"purpose"`
	Decision string `json:"decision"` // the decision the prior feeds
	Notes    string `json:"notes"`    // facilitator's notes, not shown to experts
	Round    int    `json:"round"`    // current round, from 1
	Open     bool   `json:"round_open"`
	Invented bool   `json:"invented"` // demo data of an invented scenario
	// Archived marks a finished workshop: listed apart, its round closed,
	// no answers taken until it is brought back.
	Archived bool      `json:"archived,omitempty"`
	Created  time.Time `json:"created"`
}

// Question is one uncertain quantity the panel is asked about.
type Question struct {
	ID         int64        `json:"id"`
	WorkshopID int64        `json:"workshop_id"`
	Position   int          `json:"position"`
	Wording    string       `json:"wording"` // what experts read
	Quantity   string       `json:"quantity"`
	Units      string       `json:"units"`
	Lower      float64      `json:"lower"`
	Upper      float64      `json:"upper"`
	Format     AnswerFormat `json:"format"`
	// Probs are the cumulative probabilities asked for in FormatQuantiles.
	Probs []float64 `json:"probs,omitempty"`
	// BinEdges are the chip bins' edges in FormatChips, from Lower to Upper.
	BinEdges []float64 `json:"bin_edges,omitempty"`
	// Chips is the number of chips each expert places in FormatChips.
	Chips int `json:"chips,omitempty"`
	// Calibration marks a seed question whose true value the facilitator
	// knows; TrueValue stays hidden from experts until Revealed.
	Calibration bool     `json:"calibration"`
	TrueValue   *float64 `json:"true_value,omitempty"`
	Revealed    bool     `json:"revealed"`
	// RevealedAt is when the true value was first revealed. The reveal
	// freezes the answers: no expert may save to the question afterwards,
	// and the scores use each expert's latest revision with an ID of at
	// most RevealedThrough, the question's last revision at the reveal
	// (0 when the reveal predates this rule and nothing is known).
	RevealedAt      *time.Time `json:"revealed_at,omitempty"`
	RevealedThrough int64      `json:"revealed_through,omitempty"`
	// Retired questions are hidden from experts and left out of pools and
	// scores, but kept in the record.
	Retired bool `json:"retired,omitempty"`
	// LogScale marks a calibration question whose information is scored
	// against the log-uniform background (elicit.ModelOptions.LogScale),
	// for a quantity spread over orders of magnitude; CheckLogScale holds
	// it to values above 0.
	LogScale bool `json:"log_uniform_background,omitempty"`
}

// Frozen reports whether the question takes no more answers: a
// calibration question whose true value has been revealed.
func (q Question) Frozen() bool { return q.Calibration && q.Revealed }

// PanelHeld reports whether the experts may not yet see each other's
// answers to the question: a calibration question whose true value has
// not been revealed. Cooke's classical model scores each expert's own
// judgement of the seed questions; an expert who had seen the panel's
// answers could move towards them, and the score would then measure
// agreement with the panel as much as calibration. The facilitator sees
// every answer throughout.
func (q Question) PanelHeld() bool { return q.Calibration && !q.Revealed }

// Expert is a panel member. Access tokens are a storage concern and are
// not part of this type.
type Expert struct {
	ID          int64     `json:"id"`
	WorkshopID  int64     `json:"workshop_id"`
	Name        string    `json:"name"`
	Affiliation string    `json:"affiliation,omitempty"`
	Expertise   string    `json:"expertise,omitempty"`
	Revoked     bool      `json:"revoked"`
	Created     time.Time `json:"created"`
}

// Answer is what an expert entered, in the question's format. Only the
// fields of that format are set.
type Answer struct {
	// Values at the question's Probs (FormatQuantiles).
	Values []float64 `json:"values,omitempty"`
	// Lowest, Highest, Best and Confidence (FormatInterval); Confidence is
	// a probability in (0, 1).
	Lowest     float64 `json:"lowest,omitempty"`
	Highest    float64 `json:"highest,omitempty"`
	Best       float64 `json:"best,omitempty"`
	Confidence float64 `json:"confidence,omitempty"`
	// Counts of chips per bin (FormatChips).
	Counts []int `json:"counts,omitempty"`
	// Percent records that the expert typed a proportion question's values
	// as percentages (5% for 0.05): the values above are proportions either
	// way, and pages and exports show them as they were typed.
	Percent bool `json:"percent,omitempty"`
}

// Revision is one saved answer. Revisions are never changed or deleted:
// an expert's current judgement on a question is their latest revision.
type Revision struct {
	ID         int64     `json:"id"`
	QuestionID int64     `json:"question_id"`
	ExpertID   int64     `json:"expert_id"`
	Round      int       `json:"round"`
	At         time.Time `json:"at"`
	Reason     string    `json:"reason,omitempty"`
	Answer     Answer    `json:"answer"`
	// EnteredBy says who typed the revision into Parley: the expert on
	// their own link, or the facilitator on their behalf (empty reads as
	// the expert, as in records older than this field). Channel says how a
	// facilitator's entry reached them.
	EnteredBy EnteredBy `json:"entered_by"`
	Channel   Channel   `json:"channel"`
	// ReasonWithheld is set when the facilitator has withheld the reason
	// from the round feedback: it stays in the record but no expert and no
	// room view is shown it.
	ReasonWithheld bool `json:"reason_withheld,omitempty"`
	// Withdrawn is set when the facilitator has withdrawn the revision (a
	// judgement entered against the wrong expert or question, or one the
	// expert took back): it stays in the record, marked, and is nobody's
	// answer (Current passes over it). Its reason and time are its
	// EventRevisionWithdrawn's.
	Withdrawn bool `json:"withdrawn,omitempty"`
	// Kept is the answer's fit as computed when the revision was saved or
	// imported (Question.Fit), kept with it so that pages and records do
	// not fit every revision again; nil for a revision saved before fits
	// were kept, or one its question could not fit. Use FitOf.
	Kept *elicit.Fit `json:"-"`
}

// FitOf is the revision's fit under q: the kept one when there is one,
// else a fresh q.Fit of its answer.
func (r Revision) FitOf(q Question) (elicit.Fit, error) {
	if r.Kept != nil {
		return *r.Kept, nil
	}
	return q.Fit(r.Answer)
}

// EnteredBy names who typed a revision into Parley.
type EnteredBy string

// Who can enter a revision.
const (
	ByExpert      EnteredBy = "expert"
	ByFacilitator EnteredBy = "facilitator"
)

// Channel is how a judgement entered by the facilitator reached them.
type Channel string

// The ways a judgement reaches the facilitator, in Parley's words.
const (
	ChannelInPerson  Channel = "in_person"  // said aloud in the session and typed by the facilitator
	ChannelPhone     Channel = "phone"      // given by telephone or a call
	ChannelPaperForm Channel = "paper_form" // written on a paper form
	ChannelMessage   Channel = "message"    // sent in an e-mail or other message
	ChannelFile      Channel = "file"       // sent in a spreadsheet file and imported
)

// Channels lists every channel, in the order a form offers them.
var Channels = []Channel{ChannelInPerson, ChannelPhone, ChannelPaperForm, ChannelMessage, ChannelFile}

// RuleProvenance is the rule for who entered a revision and how.
const RuleProvenance elicit.Rule = "a revision is entered by the expert (no channel) or by the facilitator (with one of the channels)"

// CheckProvenance checks a revision's EnteredBy and Channel: the expert's
// own entries carry no channel; the facilitator's carry a known one.
func (r Revision) CheckProvenance() error {
	switch r.EnteredBy {
	case "", ByExpert:
		if r.Channel != "" {
			return inputErr("channel", RuleProvenance, "the expert's own entry has no channel, got %q", r.Channel)
		}
	case ByFacilitator:
		for _, c := range Channels {
			if r.Channel == c {
				return nil
			}
		}
		return inputErr("channel", RuleProvenance, "%q is not one of %q", r.Channel, Channels)
	default:
		return inputErr("entered_by", RuleProvenance, "%q is neither %q nor %q", r.EnteredBy, ByExpert, ByFacilitator)
	}
	return nil
}

// EventKind names a facilitator decision.
type EventKind string

// The facilitator decisions that are recorded as events.
const (
	EventWorkshopCreated EventKind = "workshop_created"
	EventRoundClosed     EventKind = "round_closed"
	EventRoundOpened     EventKind = "round_opened"
	EventWeightsSet      EventKind = "weights_set"
	EventPriorAgreed     EventKind = "prior_agreed"
	EventTruthRevealed   EventKind = "truth_revealed"
	EventExpertAdded     EventKind = "expert_added"
	EventExpertRevoked   EventKind = "expert_revoked"
	EventTokenReissued   EventKind = "token_reissued"
	EventQuestionAdded   EventKind = "question_added"
	// Corrections, each with the facilitator's reason.
	EventQuestionEdited   EventKind = "question_edited"   // detail: the fields before and after
	EventQuestionRetired  EventKind = "question_retired"  // hidden from experts, kept in the record
	EventQuestionRestored EventKind = "question_restored" // a retired question brought back
	EventRoundReopened    EventKind = "round_reopened"    // the last closed round opened again
	EventWorkshopArchived EventKind = "workshop_archived"
	EventWorkshopRestored EventKind = "workshop_restored"   // an archived workshop brought back
	EventReasonWithheld   EventKind = "reason_withheld"     // a revision's reason kept from the feedback
	EventReasonReleased   EventKind = "reason_released"     // a withheld reason shown again
	EventWorkshopEdited   EventKind = "workshop_edited"     // detail: the fields before and after
	EventTruthEntered     EventKind = "truth_entered"       // a true value entered or changed, still hidden
	EventDataRecorded     EventKind = "study_data_recorded" // observed data recorded against a question's agreed prior
	// A calibration question's background measure set (uniform or log-uniform);
	// detail: {"log_uniform_background": bool}.
	EventScaleSet EventKind = "calibration_background_set"
	// An answer sheet's judgements saved together; detail: SheetImport.
	EventAnswersImported EventKind = "answers_imported"
	// A revision withdrawn by the facilitator; detail: Withdrawal.
	EventRevisionWithdrawn EventKind = "revision_withdrawn"
)

// Withdrawal is a revision_withdrawn event's detail: the revision the
// facilitator withdrew, whose answer it was and of which round. The
// event's reason says why.
type Withdrawal struct {
	RevisionID int64 `json:"revision_id"`
	ExpertID   int64 `json:"expert_id"`
	Round      int   `json:"round"`
}

// SheetImport is what the record keeps of an answer sheet whose rows the
// facilitator saved as judgements (an upload or parley import-answers):
// enough to tell which file they came from and which row is which
// (SheetSources).
type SheetImport struct {
	// SHA256 is the hex SHA-256 of the sheet's bytes as Parley received
	// them, so the file kept beside the record can be checked against it.
	SHA256 string `json:"sha256"`
	// Name is the file's name as given; empty for a sheet pasted into the
	// form or read from standard input.
	Name string `json:"name,omitempty"`
	// Rows are the sheet's row numbers (as a spreadsheet numbers them,
	// the header being row 1) of the judgements, in the order saved.
	Rows    []int   `json:"rows"`
	Channel Channel `json:"channel"`
	// Revisions are the IDs of the judgements saved, in the order of
	// Rows; absent in records older than this field, whose judgements
	// are the facilitator's revisions saved at the event's time.
	Revisions []int64 `json:"revisions,omitempty"`
}

// Reveal is a truth_revealed event's detail: the true value shown to the
// experts and, on the question's first reveal, the freeze that reveal set
// (Question.RevealedAt and RevealedThrough), which decides the answers
// Cooke's classical model scores. A later reveal (a change of the value
// already shown) sets no freeze and carries none; nor do reveals recorded
// before Parley wrote it, whose freeze the record cannot check.
type Reveal struct {
	TrueValue       float64    `json:"true_value"`
	RevealedAt      *time.Time `json:"revealed_at,omitempty"`
	RevealedThrough *int64     `json:"revealed_through,omitempty"`
}

// EventKinds lists every event kind, in the order they were introduced.
var EventKinds = []EventKind{
	EventWorkshopCreated, EventRoundClosed, EventRoundOpened, EventWeightsSet, EventPriorAgreed,
	EventTruthRevealed, EventExpertAdded, EventExpertRevoked, EventTokenReissued, EventQuestionAdded,
	EventQuestionEdited, EventQuestionRetired, EventQuestionRestored, EventRoundReopened,
	EventWorkshopArchived, EventWorkshopRestored, EventReasonWithheld, EventReasonReleased,
	EventWorkshopEdited, EventTruthEntered, EventDataRecorded, EventAnswersImported,
	EventScaleSet, EventRevisionWithdrawn,
}

// Event is one facilitator decision with its time and reason. Detail holds
// the decision's data as JSON (weights, the agreed Beta, ...).
type Event struct {
	ID         int64     `json:"id"`
	WorkshopID int64     `json:"workshop_id"`
	QuestionID int64     `json:"question_id,omitempty"` // 0 when workshop-wide
	Kind       EventKind `json:"kind"`
	At         time.Time `json:"at"`
	Reason     string    `json:"reason,omitempty"`
	Detail     string    `json:"detail,omitempty"`
}

// WeightScheme says where pool weights came from.
type WeightScheme string

// The weight schemes.
const (
	WeightsEqual       WeightScheme = "equal"
	WeightsCustom      WeightScheme = "custom"
	WeightsPerformance WeightScheme = "performance" // Cooke's classical model
)

// PoolName is the name of the linear pool under the scheme, the same on
// every page: "Equal-weight pool" (also before any weights are set),
// "Performance-weight pool" or "Custom-weight pool".
func (s WeightScheme) PoolName() string {
	switch s {
	case WeightsPerformance:
		return "Performance-weight pool"
	case WeightsCustom:
		return "Custom-weight pool"
	}
	return "Equal-weight pool"
}

// Weights are a set of pool weights the facilitator applied to a
// workshop; the latest set is in force. Sets are never changed.
type Weights struct {
	// ID identifies the stored set; 0 for the equal weights a workshop
	// has before any set is applied.
	ID         int64        `json:"id,omitempty"`
	WorkshopID int64        `json:"workshop_id"`
	Scheme     WeightScheme `json:"scheme"`
	// ByExpert are the weights as applied, unnormalised: for custom
	// weights the facilitator's own inputs as typed; empty for equal.
	ByExpert map[int64]float64 `json:"by_expert,omitempty"`
	Reason   string            `json:"reason,omitempty"`
	At       time.Time         `json:"at"`
	// Basis is what performance weights were made from (calibration_basis.go);
	// nil for equal and custom weights, and for performance weights set
	// before Parley kept it.
	Basis *WeightBasis `json:"basis,omitempty"`
}

// Check checks a weight set's own rules, the one place they live (the
// store checks a set before saving it, the record each set it carries):
// a known scheme; every weight finite and not negative; not all zero
// unless the scheme is equal; a basis only for performance weights.
// Errors are *elicit.InputError naming the set's keys as the record
// writes them: "scheme", "by_expert[ID]", "by_expert", "basis".
func (w Weights) Check() error {
	switch w.Scheme {
	case WeightsEqual, WeightsCustom, WeightsPerformance:
	default:
		return &elicit.InputError{Field: "scheme", Rule: elicit.RuleUnknown, Detail: fmt.Sprintf("%q", w.Scheme)}
	}
	ids := make([]int64, 0, len(w.ByExpert))
	for id := range w.ByExpert {
		ids = append(ids, id)
	}
	slices.Sort(ids)
	total := 0.0
	for _, id := range ids {
		v := w.ByExpert[id]
		f := fmt.Sprintf("by_expert[%d]", id)
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return &elicit.InputError{Field: f, Rule: elicit.RuleFinite, Detail: fmt.Sprintf("got %v", v)}
		}
		if v < 0 {
			return &elicit.InputError{Field: f, Rule: elicit.RuleNonNegative, Detail: fmt.Sprintf("got %v", v)}
		}
		total += v
	}
	if w.Scheme != WeightsEqual && total == 0 {
		return &elicit.InputError{Field: "by_expert", Rule: elicit.RuleWeightsNotAllZero}
	}
	if w.Basis != nil && w.Scheme != WeightsPerformance {
		return &elicit.InputError{Field: "basis", Rule: elicit.RuleUnknown, Detail: "only performance weights have a basis"}
	}
	return nil
}

// Of is the unnormalised pool weight of an expert: 1 under equal weights
// (or when none were ever set), otherwise the stored weight, 0 for an
// expert the weights do not name. It is the one place this rule lives.
func (w Weights) Of(expertID int64) float64 {
	if w.Scheme == WeightsEqual || w.Scheme == "" {
		return 1
	}
	return w.ByExpert[expertID]
}

// Unweighed lists the active experts of es that custom weights w do not
// name, in es's order: experts added to the panel, or given their access
// back, after w was set (the form that sets them names every active
// expert). Of gives them weight 0, so their judgements count for nothing
// in any pool, though nobody decided so; the pages say it, so that the
// facilitator sets the weights again. Nil under equal weights, and under
// performance weights, whose weight 0 is the classical model's verdict
// (the calibration page says when the weights in force are no longer the
// scores').
func (w Weights) Unweighed(es []Expert) []Expert {
	if w.Scheme != WeightsCustom {
		return nil
	}
	var out []Expert
	for _, e := range es {
		if _, ok := w.ByExpert[e.ID]; !ok && !e.Revoked {
			out = append(out, e)
		}
	}
	return out
}

// PriorSource says how an agreed prior was reached.
type PriorSource string

// The sources of an agreed prior.
const (
	// PriorFromPool is the single Beta that best represents the pool.
	PriorFromPool PriorSource = "pool"
	// PriorFromConsensus is a Beta fitted to a judgement the group agreed.
	PriorFromConsensus PriorSource = "consensus"
	// PriorFromConstruction is a Beta made by a quick construction
	// (elicit.Construct) from the inputs kept in AgreedPrior.Construction.
	PriorFromConstruction PriorSource = "construction"
)

// AgreedPrior is the prior the panel settled on for a question. Every
// agreement is kept; the latest is the current one.
type AgreedPrior struct {
	ID         int64             `json:"id"`
	QuestionID int64             `json:"question_id"`
	Source     PriorSource       `json:"source"`
	Dist       elicit.ScaledBeta `json:"dist"`
	Consensus  *Answer           `json:"consensus,omitempty"`
	// Construction is what a quick construction was given, for a prior
	// from PriorFromConstruction: elicit.Construct makes Dist from it.
	Construction *elicit.ConstructionInput `json:"construction,omitempty"`
	Rationale    string                    `json:"rationale"`
	Round        int                       `json:"round"`
	// RoundOpen is set when the prior was agreed while its round was
	// still open, after the facilitator confirmed it: answers could still
	// change after the agreement.
	RoundOpen bool `json:"while_round_open,omitempty"`
	// WeightSetID is the weight set in force when the prior was agreed
	// (Weights.ID), so a prior taken from the pool can be traced to the
	// weights that made the pool; 0 when no set had been applied (equal
	// weights) or the prior predates this link.
	WeightSetID int64 `json:"weight_set_id,omitempty"`
	// Pooled are the revisions whose fits made the pool, for a prior from
	// PriorFromPool: each active expert's current revision on the question
	// as the facilitator agreed it, in roster order, so a reviewer can
	// form the pool again from the record alone. Empty for other sources
	// and for a prior agreed before Parley kept them.
	Pooled []int64   `json:"pooled_revisions,omitempty"`
	At     time.Time `json:"at"`
}

// Snapshot is everything stored about one workshop, read at one moment:
// what its record is built from and what its pages are drawn from.
type Snapshot struct {
	Workshop  Workshop
	Questions []Question
	Experts   []Expert
	Revisions []Revision // oldest first
	Weights   Weights    // the current weights
	// WeightHistory is every weight set applied, oldest first; the last
	// is Weights.
	WeightHistory []Weights
	Priors        []AgreedPrior // oldest first
	// Data is every batch of observed data recorded against the
	// questions' agreed priors, oldest first.
	Data   []StudyData
	Events []Event // oldest first
}

// DeletedWorkshop is what is left of a workshop deleted before anyone
// answered: its title, when and why. A workshop with answers or agreed
// priors is archived instead, never deleted.
type DeletedWorkshop struct {
	WorkshopID int64     `json:"workshop_id"`
	Title      string    `json:"title"`
	Reason     string    `json:"reason"`
	At         time.Time `json:"at"`
}

// CheckText checks the workshop's text by the rules of the forms it is
// typed in (input.CheckText): a title of at most input.MaxShortText
// characters, a purpose, decision and notes of at most input.MaxLongText.
// Errors name the field by its JSON key.
func (w Workshop) CheckText() error {
	return checkTexts([]textField{
		{"title", w.Title, input.MaxShortText, true},
		{"purpose", w.Purpose, input.MaxLongText, false},
		{"decision", w.Decision, input.MaxLongText, false},
		{"notes", w.Notes, input.MaxLongText, false},
	})
}

// CheckText checks the expert's text by the rules of the roster form: a
// name and an affiliation of at most input.MaxShortText characters,
// expertise of at most input.MaxLongText.
func (e Expert) CheckText() error {
	return checkTexts([]textField{
		{"name", e.Name, input.MaxShortText, true},
		{"affiliation", e.Affiliation, input.MaxShortText, false},
		{"expertise", e.Expertise, input.MaxLongText, false},
	})
}

// textField is one text field with its limit in characters.
type textField struct {
	name, value string
	max         int
	required    bool
}

func checkTexts(fs []textField) error {
	for _, f := range fs {
		if err := input.CheckText(f.name, f.value, f.max, f.required); err != nil {
			return err
		}
	}
	return nil
}

// Withdrawals maps each revision a revision_withdrawn event of evs names
// to that event, which carries the withdrawal's time and reason.
func Withdrawals(evs []Event) map[int64]Event {
	out := map[int64]Event{}
	for _, e := range evs {
		if e.Kind != EventRevisionWithdrawn {
			continue
		}
		var d Withdrawal
		if json.Unmarshal([]byte(e.Detail), &d) == nil && d.RevisionID != 0 {
			out[d.RevisionID] = e
		}
	}
	return out
}

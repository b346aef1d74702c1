package web

import (
	"encoding/json"
	"net/http"
	"sort"
	"strconv"
	"strings"

	"github.com/a-h/templ"
	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/fingerprint"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// logView is the workshop's decision log: every facilitator decision with
// its time and reason, oldest first, each written as a sentence. The raw
// JSON of each decision travels only in the export.
type logView struct {
	Workshop workshop.Workshop
	Rows     []logRow
	// Fingerprint is the record's fingerprint now (fingerprint.Value.Short).
	Fingerprint string
}

// logRow is one decision as the log shows it. A round's close carries the
// record's fingerprint at that point, for the room to compare with what
// it noted.
type logRow struct {
	When, Decision, AppliesTo, Reason, Detail string
	Closed                                    int    // the round a round_closed entry closed
	Fingerprint                               string // the record's fingerprint after it
}

func (s *Server) eventLog(w http.ResponseWriter, r *http.Request) {
	ws, ok := s.loadWorkshop(w, r)
	if !ok {
		return
	}
	// One read of everything, so the log and its fingerprint agree.
	src, err := s.snapshot(r.Context(), ws)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	m := facilitatorMeta(ws, "Decision log", "log")
	// An agreement's entry writes the agreed Beta: the caution goes with it.
	m.Caution = len(src.Priors) > 0
	s.renderPage(w, r, http.StatusOK, m, logPage(newLogView(ws, src.Events, src.Questions, src.Experts, src.Priors, src.Revisions, src.WeightHistory, chainOf(src))))
}

// newLogView writes each event as a row of the log, and each judgement
// the facilitator entered on an expert's behalf (enteredOnBehalf) in its
// place among them, naming experts and questions instead of their ids;
// revs are the workshop's revisions; ps are its agreed priors,
// for what an agreement's event does not carry (a consensus judgement,
// the weights of the pool it came from, among the weight sets sets);
// c is the record's fingerprint chain.
func newLogView(ws workshop.Workshop, evs []workshop.Event, qs []workshop.Question, es []workshop.Expert, ps []workshop.AgreedPrior, revs []workshop.Revision, sets []workshop.Weights, c fingerprint.Chain) logView {
	w := eventWriter{questions: map[int64]workshop.Question{}, experts: es, revealed: map[int64]bool{}, revoked: map[int64]bool{}, inForce: &eventDetail{}, priors: ps, revisions: map[int64]workshop.Revision{}, weightSets: sets}
	for _, rv := range revs {
		w.revisions[rv.ID] = rv
	}
	for _, q := range qs {
		w.questions[q.ID] = q
	}
	closes := c.RoundCloses()
	sheets := workshop.SheetSources(evs, revs)
	w.sheetQuestions = sheetQuestions(sheets, w.revisions)
	entries := enteredOnBehalf(sheets, revs)
	v := logView{Workshop: ws, Rows: make([]logRow, 0, len(evs)+len(entries)), Fingerprint: c.Head().Short()}
	for _, e := range evs {
		// An entry before the event, or at its very time, comes first, as
		// the record's chain orders a revision before an event.
		for len(entries) > 0 && !entries[0].At.After(e.At) {
			v.Rows = append(v.Rows, w.entryRow(entries[0]))
			entries = entries[1:]
		}
		row := logRow{
			When:      e.At.UTC().Format("2006-01-02 15:04:05 UTC"),
			Decision:  eventLabel(e.Kind),
			AppliesTo: w.appliesTo(e),
			Reason:    orDash(e.Reason),
			Detail:    w.sentence(e),
		}
		for _, l := range closes {
			if l.ID == e.ID {
				row.Closed, row.Fingerprint = l.Closed, l.Value.Short()
			}
		}
		v.Rows = append(v.Rows, row)
	}
	for _, rv := range entries {
		v.Rows = append(v.Rows, w.entryRow(rv))
	}
	return v
}

// enteredOnBehalf are the judgements the facilitator entered one at a
// time on an expert's behalf, oldest first. Such an entry is a decision
// the store keeps in the revision itself (entered_by, channel), without
// an event of its own; the judgements of an answer sheet (sheets, by
// workshop.SheetSources) have their sheet's event and its one line
// instead.
func enteredOnBehalf(sheets map[int64]workshop.SheetSource, revs []workshop.Revision) []workshop.Revision {
	var out []workshop.Revision
	for _, rv := range revs {
		if _, fromSheet := sheets[rv.ID]; rv.EnteredBy == workshop.ByFacilitator && !fromSheet {
			out = append(out, rv)
		}
	}
	sort.SliceStable(out, func(i, j int) bool {
		if !out[i].At.Equal(out[j].At) {
			return out[i].At.Before(out[j].At)
		}
		return out[i].ID < out[j].ID
	})
	return out
}

// entryRow is the log's line for a judgement the facilitator entered on
// an expert's behalf: the question it answers, whose it is, the round,
// how it reached the facilitator, and the reason saved with it. That
// reason is the expert's reasoning, not the facilitator's for a decision
// as in the column's other lines, and says so.
func (w eventWriter) entryRow(rv workshop.Revision) logRow {
	reason := "—"
	if rv.Reason != "" {
		reason = w.expert(rv.ExpertID) + "'s reasoning, entered with the judgement: “" + rv.Reason + "”"
	}
	return logRow{
		When:      rv.At.UTC().Format("2006-01-02 15:04:05 UTC"),
		Decision:  "Judgement entered on an expert's behalf",
		AppliesTo: w.question(rv.QuestionID),
		Reason:    reason,
		Detail: w.expert(rv.ExpertID) + "'s judgement for round " + strconv.Itoa(rv.Round) +
			", entered by the facilitator " + channelRecorded(rv.Channel) + ".",
	}
}

// eventLabels are the log's plain words for each kind of decision.
var eventLabels = map[workshop.EventKind]string{
	workshop.EventWorkshopCreated:   "Workshop created",
	workshop.EventRoundClosed:       "Round closed",
	workshop.EventRoundOpened:       "Round opened",
	workshop.EventWeightsSet:        "Pool weights set",
	workshop.EventPriorAgreed:       "Prior agreed",
	workshop.EventTruthRevealed:     "True value revealed",
	workshop.EventExpertAdded:       "Expert added",
	workshop.EventExpertRevoked:     "Expert's access revoked",
	workshop.EventTokenReissued:     "Expert's link re-issued",
	workshop.EventQuestionAdded:     "Question added",
	workshop.EventQuestionEdited:    "Question corrected",
	workshop.EventQuestionRetired:   "Question retired",
	workshop.EventQuestionRestored:  "Question brought back",
	workshop.EventRoundReopened:     "Round reopened",
	workshop.EventWorkshopArchived:  "Workshop archived",
	workshop.EventWorkshopRestored:  "Workshop brought back",
	workshop.EventReasonWithheld:    "Reason withheld from the feedback",
	workshop.EventReasonReleased:    "Reason shown again in the feedback",
	workshop.EventWorkshopEdited:    "Workshop details changed",
	workshop.EventTruthEntered:      "True value entered (hidden)",
	workshop.EventDataRecorded:      "Observed data recorded",
	workshop.EventAnswersImported:   "Judgements imported from an answer sheet",
	workshop.EventScaleSet:          "Calibration scale set",
	workshop.EventRevisionWithdrawn: "Judgement withdrawn",
}

func eventLabel(k workshop.EventKind) string {
	if l, ok := eventLabels[k]; ok {
		return l
	}
	return string(k)
}

// eventDetail is the union of what the store writes into Event.Detail
// for each kind of decision.
type eventDetail struct {
	Round    int                   `json:"round"`
	ExpertID int64                 `json:"expert_id"`
	Scheme   workshop.WeightScheme `json:"scheme"`
	ByExpert map[string]float64    `json:"by_expert"`
	Source   workshop.PriorSource  `json:"source"`
	Dist     *elicit.ScaledBeta    `json:"dist"`
	// A quick construction's inputs, for a prior made by one.
	Construction *elicit.ConstructionInput `json:"construction"`
	TrueValue    *float64                  `json:"true_value"`
	RoundOpen    bool                      `json:"while_round_open"`
	// A correction's changed fields, before and after.
	Fields []string                   `json:"fields"`
	Before map[string]json.RawMessage `json:"before"`
	After  map[string]json.RawMessage `json:"after"`
	// The revision whose reason was withheld or shown again.
	RevisionID int64 `json:"revision_id"`
	// A batch of observed data.
	Successes  int    `json:"successes"`
	Trials     int    `json:"trials"`
	ObservedOn string `json:"observed_on"`
	// An answer sheet's judgements (workshop.SheetImport).
	SHA256  string           `json:"sha256"`
	Name    string           `json:"name"`
	Rows    []int            `json:"rows"`
	Channel workshop.Channel `json:"channel"`
	// A calibration question's scale (workshop.EventScaleSet).
	LogScale *bool `json:"log_uniform_background"`
}

// eventWriter turns events into sentences; it remembers which questions'
// true values were already revealed, so that a later reveal reads as a
// change.
type eventWriter struct {
	questions map[int64]workshop.Question
	experts   []workshop.Expert
	revealed  map[int64]bool
	// revoked remembers which experts' access a revocation earlier in the
	// log ended, so that a new link given to one reads as their access
	// given back, which it is: it said only that the old link "stopped
	// working", of a link stopped long before, and not that the expert's
	// judgements were back in every pool.
	revoked map[int64]bool
	// inForce is the weight set the log has reached (its scheme and
	// weights; equal when none): an expert given access back whom it
	// gives no weight (custom weights set while they were revoked) is
	// back on the panel but counts for nothing in the pools.
	inForce *eventDetail
	priors  []workshop.AgreedPrior
	// weightSets are the workshop's weight sets, oldest first, which name
	// the pool a prior from the pool came from.
	weightSets []workshop.Weights
	// revisions name the expert and round of a withheld reason, as the
	// panel's list does where it was withheld.
	revisions map[int64]workshop.Revision
	// sheetQuestions are the questions each answer sheet's judgements
	// answer, by the ID of the sheet's event.
	sheetQuestions map[int64][]int64
}

// sheetQuestions are the questions the judgements of each answer sheet
// answer, each once, by the ID of the sheet's event.
func sheetQuestions(sheets map[int64]workshop.SheetSource, revs map[int64]workshop.Revision) map[int64][]int64 {
	out := map[int64][]int64{}
	seen := map[[2]int64]bool{}
	for id, src := range sheets {
		rv, ok := revs[id]
		if key := [2]int64{src.Event, rv.QuestionID}; ok && !seen[key] {
			seen[key] = true
			out[src.Event] = append(out[src.Event], rv.QuestionID)
		}
	}
	return out
}

// prior is the agreed prior that event e recorded: the store writes the
// prior and its event in one transaction with one time stamp.
func (w eventWriter) prior(e workshop.Event) (workshop.AgreedPrior, bool) {
	for _, p := range w.priors {
		if p.QuestionID == e.QuestionID && p.At.Equal(e.At) {
			return p, true
		}
	}
	return workshop.AgreedPrior{}, false
}

// appliesTo is the question an event concerns, or the expert for the
// roster's events, the questions an answer sheet's judgements answer,
// else the whole workshop.
func (w eventWriter) appliesTo(e workshop.Event) string {
	if e.Kind == workshop.EventAnswersImported && e.QuestionID == 0 {
		return w.questionsOf(w.sheetQuestions[e.ID])
	}
	var d eventDetail
	if e.QuestionID == 0 && e.Detail != "" && json.Unmarshal([]byte(e.Detail), &d) == nil && d.ExpertID != 0 {
		return w.expert(d.ExpertID)
	}
	return w.question(e.QuestionID)
}

// questionsOf names one question as question does, and several by their
// numbers in order: "3 questions: Q1, Q2 and Q5".
func (w eventWriter) questionsOf(ids []int64) string {
	switch len(ids) {
	case 0:
		return "the questions its judgements answer"
	case 1:
		return w.question(ids[0])
	}
	qs := make([]workshop.Question, len(ids))
	for i, id := range ids {
		if q, ok := w.questions[id]; ok {
			qs[i] = q
		} else {
			qs[i] = workshop.Question{ID: id}
		}
	}
	sort.SliceStable(qs, func(i, j int) bool { return qs[i].Position < qs[j].Position })
	names := make([]string, len(qs))
	for i, q := range qs {
		names[i] = "Q" + strconv.Itoa(q.Position)
		if q.Position == 0 {
			names[i] = "question " + strconv.FormatInt(q.ID, 10)
		}
	}
	return strconv.Itoa(len(names)) + " questions: " + wordList(names)
}

func (w eventWriter) question(id int64) string {
	if id == 0 {
		return "whole workshop"
	}
	if q, ok := w.questions[id]; ok {
		return "Q" + strconv.Itoa(q.Position) + " " + q.Quantity
	}
	return "question " + strconv.FormatInt(id, 10)
}

func (w eventWriter) expert(id int64) string { return expertName(w.experts, id) }

// sentence is the event's detail in words; "—" when there is nothing to
// add to its label, or its detail cannot be read.
func (w eventWriter) sentence(e workshop.Event) string {
	var d eventDetail
	if e.Detail != "" && json.Unmarshal([]byte(e.Detail), &d) != nil {
		return "—"
	}
	switch e.Kind {
	case workshop.EventWorkshopCreated:
		return "Round 1 opened with the workshop."
	case workshop.EventRoundClosed:
		if d.Round > 0 {
			return "Round " + strconv.Itoa(d.Round) + " closed: experts can no longer save."
		}
	case workshop.EventRoundOpened:
		if d.Round > 0 {
			return "Round " + strconv.Itoa(d.Round) + " opened: experts see the panel without names and may revise."
		}
	case workshop.EventExpertAdded:
		if d.ExpertID != 0 {
			return w.expert(d.ExpertID) + " joined the panel and was given a private link."
		}
	case workshop.EventExpertRevoked:
		if d.ExpertID != 0 {
			if w.revoked != nil {
				w.revoked[d.ExpertID] = true
			}
			return w.expert(d.ExpertID) + "'s private link stopped working."
		}
	case workshop.EventTokenReissued:
		if d.ExpertID != 0 {
			if w.revoked[d.ExpertID] {
				// A new link lifts the revocation (store.ReissueToken):
				// every pool takes the expert's judgements again.
				w.revoked[d.ExpertID] = false
				if f := w.inForce; f != nil && (f.Scheme == workshop.WeightsCustom || f.Scheme == workshop.WeightsPerformance) &&
					f.ByExpert[strconv.FormatInt(d.ExpertID, 10)] == 0 {
					return w.expert(d.ExpertID) + " was given access back, with a new private link; the weights in force give them no share, " +
						"so their judgements count for nothing in the pools until the weights are set again."
				}
				return w.expert(d.ExpertID) + " was given access back, with a new private link; their judgements count in the pools again."
			}
			return w.expert(d.ExpertID) + " was given a new private link; the old one stopped working."
		}
	case workshop.EventQuestionAdded:
		if q, ok := w.questions[e.QuestionID]; ok {
			kind := "Target question"
			if q.Calibration {
				kind = "Calibration question"
			}
			how := workshop.FormatLabel(q)
			if q.Format == workshop.FormatInterval {
				how = "a " + how // "asked as a four-value interval", as a sentence says it
			}
			return kind + ", asked as " + how + "."
		}
	case workshop.EventWeightsSet:
		if w.inForce != nil {
			*w.inForce = eventDetail{Scheme: d.Scheme, ByExpert: d.ByExpert}
		}
		return w.weights(d)
	case workshop.EventPriorAgreed:
		if d.Dist != nil {
			s := betaLabel(*d.Dist) + ": the " + sourceLabel(d.Source) + "."
			if p, ok := w.prior(e); ok && p.Source == workshop.PriorFromConsensus && p.Consensus != nil {
				s = betaLabel(*d.Dist) + ": the " + priorOrigin(w.questions[e.QuestionID], p) + "."
			} else if ok && p.Source == workshop.PriorFromPool {
				// Named by its weights, as the panel and the report name it.
				if pool := pooledBy(p, w.weightSets, len(w.weightSets) == 0); pool != "" {
					s = betaLabel(*d.Dist) + ": the single Beta representing the " + pool + "."
				}
			}
			if d.Construction != nil {
				if c, err := elicit.Construct(*d.Construction); err == nil {
					s = betaLabel(*d.Dist) + ": a quick construction, " + constructionWords(c) + "."
				}
			}
			if d.RoundOpen {
				s += " Agreed while the round was still open, after the facilitator confirmed it."
			}
			return s
		}
	case workshop.EventQuestionEdited, workshop.EventWorkshopEdited:
		return correction(d)
	case workshop.EventDataRecorded:
		if d.Trials > 0 {
			return successesIn(d.Successes, d.Trials) + ", observed on " + d.ObservedOn + ", added to the data that update the agreed prior."
		}
	case workshop.EventAnswersImported:
		if d.SHA256 != "" && len(d.Rows) > 0 {
			sheet := "a sheet"
			if d.Name != "" {
				sheet = d.Name
			}
			n := strconv.Itoa(len(d.Rows)) + " " + plural(len(d.Rows), "judgement", "judgements")
			return n + ", " + plural(len(d.Rows), "row ", "rows ") + rowRanges(d.Rows) + " of " + sheet + " (SHA-256 " + d.SHA256 + "), entered by the facilitator " + channelRecorded(d.Channel) + "."
		}
	case workshop.EventScaleSet:
		if d.LogScale != nil {
			if *d.LogScale {
				return "Its information is scored on the log scale, for a quantity spread over orders of magnitude."
			}
			return "Its information is scored on the uniform scale."
		}
	case workshop.EventTruthEntered:
		return "Entered or changed, and kept hidden from the experts until it is revealed."
	case workshop.EventQuestionRetired:
		return "Hidden from experts and left out of the scores; kept in the record."
	case workshop.EventQuestionRestored:
		return "Shown to the experts again."
	case workshop.EventRoundReopened:
		if d.Round > 0 {
			return "Round " + strconv.Itoa(d.Round) + " opened again after it was closed: experts can save again."
		}
	case workshop.EventWorkshopArchived:
		return "Marked finished; nothing can be changed until it is brought back."
	case workshop.EventWorkshopRestored:
		return "Can be changed again; the round stays closed until the next opens."
	case workshop.EventRevisionWithdrawn:
		if rv, ok := w.revisions[d.RevisionID]; ok {
			what := w.expert(rv.ExpertID) + "'s judgement of round " + strconv.Itoa(rv.Round)
			if q, ok := w.questions[rv.QuestionID]; ok {
				what += " (" + answerSummary(q, rv.Answer) + ")"
			}
			return what + " is withdrawn: it stays in the record, marked, and is no longer their answer in the panel, the pools, the scores or the feedback."
		}
		return "One expert's judgement on this question is withdrawn: it stays in the record, marked, and is no longer their answer."
	case workshop.EventReasonWithheld:
		if rv, ok := w.revisions[d.RevisionID]; ok {
			return w.expert(rv.ExpertID) + "'s reason from round " + strconv.Itoa(rv.Round) + " is kept from the other experts' feedback and the room view; it stays in the record."
		}
		return "One expert's reason on this question is kept from the other experts' feedback and the room view; it stays in the record."
	case workshop.EventReasonReleased:
		if rv, ok := w.revisions[d.RevisionID]; ok {
			return w.expert(rv.ExpertID) + "'s reason from round " + strconv.Itoa(rv.Round) + " is shown in the feedback again."
		}
		return "A withheld reason is shown in the feedback again."
	case workshop.EventTruthRevealed:
		if d.TrueValue != nil {
			verb := "True value " + fv(*d.TrueValue) + " shown to the experts."
			if w.revealed[e.QuestionID] {
				verb = "True value changed to " + fv(*d.TrueValue) + " (already shown to the experts)."
			}
			w.revealed[e.QuestionID] = true
			return verb
		}
	}
	return "—"
}

// weights writes a weight set as each expert's share of the pool, in the
// roster's order.
func (w eventWriter) weights(d eventDetail) string {
	switch d.Scheme {
	case workshop.WeightsEqual:
		return "Equal weights for every active expert."
	case workshop.WeightsCustom, workshop.WeightsPerformance:
	default:
		return "—"
	}
	// The roster's experts first, in its order, then any others the set
	// names; each with its share from elicit.Shares.
	var ids []int64
	var raw []float64
	seen := map[string]bool{}
	add := func(key string, id int64) {
		if x, ok := d.ByExpert[key]; ok && !seen[key] {
			seen[key] = true
			ids, raw = append(ids, id), append(raw, x)
		}
	}
	for _, e := range w.experts {
		add(strconv.FormatInt(e.ID, 10), e.ID)
	}
	for key := range d.ByExpert {
		if id, err := strconv.ParseInt(key, 10, 64); err == nil {
			add(key, id)
		}
	}
	shares := elicit.Shares(raw)
	if shares == nil {
		return "—"
	}
	parts := make([]string, len(ids))
	for i, id := range ids {
		// As the panel's "Weight in pool" column writes them: two
		// decimals said 0.00 of a share the panel gives as 0.332%.
		parts[i] = w.expert(id) + " " + pct(shares[i])
	}
	scheme := "Weights set by the facilitator"
	if d.Scheme == workshop.WeightsPerformance {
		scheme = "Performance weights from the calibration questions"
	}
	return scheme + ", as shares of the pool: " + strings.Join(parts, ", ") + "."
}

// betaLabel writes a Beta with four significant figures, and its scale
// when that is not [0, 1].
func betaLabel(d elicit.ScaledBeta) string {
	s := "Beta(" + sv(d.Alpha) + ", " + sv(d.Beta.Beta) + ")"
	if d.Lower != 0 || d.Upper != 1 {
		s += " on [" + boundsText(d.Lower, d.Upper, ", ") + "]"
	}
	return s
}

// correction writes a question's correction as each changed field's old
// and new value.
func correction(d eventDetail) string {
	if len(d.Fields) == 0 {
		return "—"
	}
	parts := make([]string, 0, len(d.Fields))
	for _, f := range d.Fields {
		before, ok := d.Before[f]
		if _, after := d.After[f]; !ok && !after {
			// A true value not yet revealed: the store kept its values out.
			parts = append(parts, fieldWord(f)+" changed, and kept hidden until it is revealed")
			continue
		}
		parts = append(parts, fieldWord(f)+" was "+rawText(before)+", now "+rawText(d.After[f]))
	}
	return strings.Join(parts, "; ") + "."
}

// fieldWord names a question's field as the question form does.
func fieldWord(f string) string {
	switch f {
	case "probs":
		return "probabilities"
	case "bin_edges":
		return "bin edges"
	case "true_value":
		return "true value"
	}
	return f
}

// rawText writes a JSON value from a correction's detail for reading:
// strings quoted as “…”, numbers and lists as they are, null as "none".
func rawText(m json.RawMessage) string {
	var s string
	if json.Unmarshal(m, &s) == nil {
		return "“" + s + "”"
	}
	if t := string(m); t != "" && t != "null" {
		return t
	}
	return "none"
}

// wholeTerms are words a line must not break inside: "SHA-256" broke at
// its hyphen on a phone, "SHA-" over "256".
var wholeTerms = []string{"SHA-256"}

// keptWholeHTML is s as HTML text with each of wholeTerms in a span that
// does not wrap. The words stay as written, so a screen reader, a search
// and a copy read "SHA-256", as they would not a non-breaking hyphen.
func keptWholeHTML(s string) string {
	out := templ.EscapeString(s)
	for _, t := range wholeTerms {
		e := templ.EscapeString(t)
		out = strings.ReplaceAll(out, e, `<span class="nowrap">`+e+`</span>`)
	}
	return out
}

// rowRanges writes a sheet's row numbers with runs joined: "2–5, 7, 9–10".
func rowRanges(rows []int) string {
	var parts []string
	for i := 0; i < len(rows); {
		j := i
		for j+1 < len(rows) && rows[j+1] == rows[j]+1 {
			j++
		}
		if j == i {
			parts = append(parts, strconv.Itoa(rows[i]))
		} else {
			parts = append(parts, strconv.Itoa(rows[i])+"–"+strconv.Itoa(rows[j]))
		}
		i = j + 1
	}
	return strings.Join(parts, ", ")
}

package web

import (
	"context"
	"errors"
	"fmt"
	"net/http"
	"strconv"
	"strings"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/web/chart"
)

// expertFitRow is one expert's current judgement on a question and what
// elicit fitted to it.
type expertFitRow struct {
	Expert   workshop.Expert
	Revision *workshop.Revision // latest; nil when the expert has not answered
	Saves    int                // revisions on this question, all rounds
	Fit      *elicit.Fit
	FitError string  // why the saved answer could not be fitted
	Weight   float64 // as set, unnormalised (Weights.Of)
	Share    float64 // normalised weight in the pool (workshop.PanelState)
	Pooled   bool
}

// questionState is everything the panel and the report show for one
// question, computed by elicit from the stored judgements.
type questionState struct {
	Question  workshop.Question
	Rows      []expertFitRow
	Weights   workshop.Weights
	Pool      *elicit.Pool
	PoolQs    []elicit.PoolQuantile // the pool's 5%, 50% and 95% points
	PoolError string
	Rep       *elicit.Representation // the pool's single-Beta representation
	RepError  string
	Agreed    []workshop.AgreedPrior // oldest first; the last is current
	History   []workshop.Revision    // this question's revisions, oldest first
}

// poolSeen names the pool a page showed: the weight set in force and
// the revisions pooled, which fix the pool and its single Beta. The agree
// form sends it back (fieldPoolSeen), so that a prior from the pool is
// the one the facilitator saw: when an answer, a weight or a revocation
// changed the pool in between, the agreement is refused and the panel
// shows the new pool.
func (st questionState) poolSeen() string {
	var b strings.Builder
	b.WriteString("w")
	b.WriteString(strconv.FormatInt(st.Weights.ID, 10))
	b.WriteString(" r")
	sep := ""
	for _, row := range st.Rows {
		if row.Pooled && row.Revision != nil {
			b.WriteString(sep)
			b.WriteString(strconv.FormatInt(row.Revision.ID, 10))
			sep = ","
		}
	}
	return b.String()
}

// gapFloor is the least largest probability gap written as a number: a
// Beta that meets the stated points exactly (two of them, say) misses
// them by rounding, 1.8e-15, which a number would write as a difference
// to be weighed.
const gapFloor = 1e-6

// probGap writes a largest probability gap |F(x) − p| (a fit's from its
// stated points, an agreed Beta's from its consensus judgement, a single
// Beta's from its pool's CDF) as the pages write probabilities beside
// it: four figures in plain decimals, as many more as keep it on its own
// side of the poor-fit limit (elicit.PoorFitThreshold), and "less than
// 0.000001" below gapFloor. It read "1.832e-15" for an exact fit, on
// the panel at a projector.
func probGap(gap float64) string {
	if gap < gapFloor {
		return "less than " + chart.FormatSpread(gapFloor)
	}
	// FormatWithin on [0, the limit] keeps the gap on its side of both.
	return chart.FormatWithin(gap, 0, elicit.PoorFitThreshold, false)
}

// gapAtMost is probGap after "at most", where the gap is a bound.
func gapAtMost(gap float64) string {
	if gap < gapFloor {
		return probGap(gap)
	}
	return "at most " + probGap(gap)
}

// singleBetaGap says how far the pool's single Beta is from the pool: a
// pool whose experts with weight all have one Beta (a panel of one, or
// performance weights that give one expert all of it) is that Beta
// exactly (elicit.Pool.BestBeta), and "at most 0 away" read as a
// rounding. It does not say every pooled expert has that Beta: experts
// pooled at weight 0 may have judged quite otherwise.
func singleBetaGap(gap float64) string {
	if gap == 0 {
		return "The single Beta is the pool itself: every expert with weight in the pool has this one fitted Beta."
	}
	return "The single Beta's CDF is " + gapAtMost(gap) + " (in probability) away from the pool's. " +
		"A mixture of very different experts can be far from any one Beta: look at the picture before agreeing it."
}

// singleBetaReportGap is singleBetaGap for the report's line on the pool.
func singleBetaReportGap(gap float64) string {
	if gap == 0 {
		return "the pool itself (every expert with weight in the pool has this one fitted Beta)"
	}
	return gapAtMost(gap) + " from the pool's CDF"
}

// fieldPoolSeen is the agree form's record of the pool the page showed
// (questionState.poolSeen). It stands in the live part of the panel,
// tied to the form by its form attribute, so that a live update of the
// pool updates it too.
const fieldPoolSeen = "pool_seen"

// current is the agreed prior in force, or nil.
func (st questionState) current() *workshop.AgreedPrior {
	if len(st.Agreed) == 0 {
		return nil
	}
	return &st.Agreed[len(st.Agreed)-1]
}

// workshopData is the stored state of a workshop that question states
// are built from; read once per page.
type workshopData struct {
	Workshop  workshop.Workshop
	Questions []workshop.Question
	Experts   []workshop.Expert
	Revisions []workshop.Revision
	Weights   workshop.Weights
	Priors    []workshop.AgreedPrior
	// fit is the server's fit cache (fitCache.fit).
	fit func(workshop.Question, workshop.Revision) (elicit.Fit, error)
}

func (s *Server) readWorkshopData(ctx context.Context, ws workshop.Workshop) (workshopData, error) {
	d := workshopData{Workshop: ws, fit: s.fits.fit}
	var err error
	if d.Questions, err = s.store.Questions(ctx, ws.ID); err != nil {
		return d, err
	}
	if d.Experts, err = s.store.Experts(ctx, ws.ID); err != nil {
		return d, err
	}
	if d.Revisions, err = s.store.Revisions(ctx, ws.ID); err != nil {
		return d, err
	}
	if d.Weights, err = s.store.Weights(ctx, ws.ID); err != nil {
		return d, err
	}
	if d.Priors, err = s.store.AgreedPriors(ctx, ws.ID); err != nil {
		return d, err
	}
	return d, nil
}

// state builds question q's state from its panel state
// (workshop.PanelState: each expert's latest revision fitted through the
// fit cache, the linear opinion pool of the active experts' fits under the
// workshop's weights, and its single Beta) and the question's history and
// agreed priors. Revoked experts stay in the table but not in the pool.
func (d workshopData) state(q workshop.Question) questionState {
	st := questionState{Question: q, Weights: d.Weights}
	for _, rv := range d.Revisions {
		if rv.QuestionID == q.ID {
			st.History = append(st.History, rv)
		}
	}
	for _, p := range d.Priors {
		if p.QuestionID == q.ID {
			st.Agreed = append(st.Agreed, p)
		}
	}
	panel := workshop.PanelState(workshop.PanelInput{Question: q, Experts: d.Experts, Revisions: st.History,
		Weights: d.Weights, Fit: d.fit})
	for _, m := range panel.Members {
		row := expertFitRow{Expert: m.Expert, Revision: m.Revision, Saves: m.Saves, Fit: m.Fit,
			Pooled: m.Pooled, Weight: m.Weight, Share: m.Share}
		if m.FitErr != nil {
			row.FitError = fitErrorWords(m.FitErr, q)
		}
		st.Rows = append(st.Rows, row)
	}
	switch err := panel.PoolErr; {
	case errors.Is(err, workshop.ErrNoFits):
		st.PoolError = "No expert has a fitted judgement on this question yet."
		return st
	case errors.Is(err, workshop.ErrNoWeight):
		var names []string
		for _, m := range panel.Members {
			if m.Fitted() {
				names = append(names, m.Expert.Name)
			}
		}
		st.PoolError = noWeightText(names, d.Weights.Scheme, q.Frozen())
		return st
	case errors.Is(err, workshop.ErrPoolPoints):
		st.PoolError = "The pool's quantiles cannot be computed: " + strings.TrimPrefix(err.Error(), workshop.ErrPoolPoints.Error()+": ")
		return st
	case err != nil:
		st.PoolError = "The pool cannot be formed: " + err.Error()
		return st
	}
	st.Pool, st.PoolQs = panel.Pool, panel.Points
	if panel.Single == nil {
		st.RepError = "No single Beta could be fitted to the pool: " + panel.SingleErr.Error()
	} else {
		st.Rep = panel.Single
	}
	return st
}

// noWeightText says why a question has no pool when every expert who
// answered it (names) has weight 0 under the weights in force
// (workshop.ErrNoWeight), in the facilitator's words; the panel and the
// report share it. A frozen question (a revealed calibration question)
// takes no more answers, so only other weights can give it a pool.
func noWeightText(names []string, scheme workshop.WeightScheme, frozen bool) string {
	under := "the weights in force"
	switch scheme {
	case workshop.WeightsPerformance:
		under = "the performance weights in force"
	case workshop.WeightsCustom:
		under = "the weights you set"
	}
	then := " It forms when an expert with weight answers it or the weights change."
	if frozen {
		then = " Its true value is revealed, so it takes no more answers: only other weights give it a pool."
	}
	return "No pool: every expert who answered this question (" + wordList(names) + ") has weight 0 under " + under +
		", and a pool needs some weight." + then
}

// chartView draws every pooled expert's fit (with names), the pool and
// the agreed prior for the facilitator; a large panel gets the strip of
// intervals instead of one curve per expert (picture).
func (st questionState) chartView() picture {
	q := st.Question
	frame := chart.PanelView{ID: "panel-q" + strconv.FormatInt(q.ID, 10), Quantity: q.Quantity, Units: q.Units, Lower: q.Lower, Upper: q.Upper}
	if q.Frozen() && q.TrueValue != nil {
		// Revealed to the room, as the room view draws it.
		t := *q.TrueValue
		frame.Truth = &t
	}
	var names []string
	var dists []elicit.ScaledBeta
	// Every active expert's fit, pooled or not: a question whose
	// answerers all have weight 0 has no pool, and its answers are still
	// to be seen (the demo's Q3 under performance weights).
	for _, row := range st.Rows {
		if row.Fit != nil && !row.Expert.Revoked {
			names, dists = append(names, row.Expert.Name), append(dists, row.Fit.Dist)
		}
	}
	var summary []chart.Curve
	if st.Pool != nil {
		summary = append(summary, chart.Curve{Label: st.Weights.Scheme.PoolName(), Role: chart.RolePool, Dist: chart.Pool{Pool: *st.Pool}})
	}
	if a := st.current(); a != nil {
		summary = append(summary, chart.Curve{Label: "Agreed prior", Role: chart.RoleAgreed, Dist: a.Dist})
	}
	return panelPicture(frame, names, dists, summary)
}

// panelView is the per-question page for the facilitator.
type panelView struct {
	Workshop    workshop.Workshop
	Experts     []workshop.Expert
	State       questionState
	Chart       picture
	WeightsForm *Form
	AgreeForm   *Form
	Consensus   answerForm
	RetireForm  *Form
	// WithholdForm is a refused withhold or release, shown again.
	WithholdForm *Form
	Strength     strengthView // calibration.go: warnings about performance weights
	Recorded     recordedData // study data the agreed prior is updated with
	// Sheets says which answer sheet and row a judgement came from.
	Sheets map[int64]workshop.SheetSource
	// Withdrawn are the withdrawal events of the history's withdrawn
	// revisions (their time and reason), by revision ID.
	Withdrawn map[int64]workshop.Event
	// PoolChanged says how the pool the agreed prior was taken from has
	// changed since (Server.poolChangeText); "" when it has not.
	PoolChanged string
	// Done says what the form that led here saved (doneCorrected,
	// doneRestored), or "": the confirmation shown once (confirm_once.go).
	Done string
}

// withdrawable reports whether the question's judgements may be withdrawn
// (workshop.CheckWithdrawal): not in an archived workshop, nor once a
// calibration question's true value has been shown.
func (v panelView) withdrawable() bool {
	return !v.Workshop.Archived && !v.State.Question.Frozen()
}

// What a form that leads to the panel saved, said there once.
const (
	doneCorrected = "corrected" // the question's correction
	doneRestored  = "restored"  // the question brought back
	doneWithdrawn = "withdrawn" // a judgement withdrawn (facilitator_withdraw.go)
)

// reasoned are the question's revisions that carry a reason and stand
// (not withdrawn), oldest first.
func (st questionState) reasoned() []workshop.Revision {
	var out []workshop.Revision
	for _, rv := range st.History {
		// A withdrawn judgement is fed back to nobody, so its reason
		// needs no decision.
		if strings.TrimSpace(rv.Reason) != "" && !rv.Withdrawn {
			out = append(out, rv)
		}
	}
	return out
}

// loadQuestion reads the {question} of workshop ws, answering 404 when it
// belongs to another workshop.
func (s *Server) loadQuestion(w http.ResponseWriter, r *http.Request, ws workshop.Workshop) (workshop.Question, bool) {
	id, ok := s.pathID(w, r, "question")
	if !ok {
		return workshop.Question{}, false
	}
	q, err := s.store.Question(r.Context(), id)
	if err == nil && q.WorkshopID != ws.ID {
		err = workshop.ErrNotFound
	}
	if err != nil {
		s.fail(w, r, err)
		return workshop.Question{}, false
	}
	return q, true
}

// loadWorkshopQuestion reads the {workshop} and its {question}, answering
// 404 (or the store's error) and false when either is missing.
func (s *Server) loadWorkshopQuestion(w http.ResponseWriter, r *http.Request) (workshop.Workshop, workshop.Question, bool) {
	ws, ok := s.loadWorkshop(w, r)
	if !ok {
		return ws, workshop.Question{}, false
	}
	q, ok := s.loadQuestion(w, r, ws)
	return ws, q, ok
}

func (s *Server) questionPanel(w http.ResponseWriter, r *http.Request) {
	s.questionList(w, r, "")
}

// panelForms are the panel's forms to show again with their errors; nil
// fields are fresh.
type panelForms struct {
	// page is "" for the panel, or one of its long lists on a page of its
	// own for a large panel: "reasons" or "history".
	page                             string
	weights, agree, retire, withhold *Form
}

// showPanelWith renders the panel with forms to show again.
func (s *Server) showPanelWith(w http.ResponseWriter, r *http.Request, status int, ws workshop.Workshop, q workshop.Question, forms panelForms) {
	wf, af := forms.weights, forms.agree
	d, err := s.readWorkshopData(r.Context(), ws)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	st := d.state(q)
	if wf == nil {
		wf = newForm(nil)
		for _, row := range st.Rows {
			wf.Values.Set(weightField(row.Expert.ID), chart.FormatExact(st.Weights.Of(row.Expert.ID)))
		}
	}
	if af == nil {
		af = newForm(nil)
		af.Values.Set("source", string(workshop.PriorFromPool))
	}
	cf := newAnswerForm(q, formValues(af), speaker{Name: "the panel"})
	applyErrors(&cf, af)
	if forms.retire == nil {
		forms.retire = newForm(nil)
	}
	v := panelView{Workshop: ws, Experts: d.Experts, State: st, Chart: st.chartView(), WeightsForm: wf, AgreeForm: af, Consensus: cf,
		RetireForm: forms.retire, WithholdForm: forms.withhold}
	if status == http.StatusOK && forms.page == "" {
		v.Done = s.takeConfirmation(w, r, questionPath(ws.ID, q.ID), doneCorrected, doneRestored, doneWithdrawn)
	}
	v.Strength = panelStrength(d)
	if v.PoolChanged, err = s.poolChangeText(r.Context(), ws, st, d.Experts, againAt{OnQuestionPage: true}); err != nil {
		s.fail(w, r, err)
		return
	}
	if v.Recorded, err = s.recordedFor(r.Context(), ws, q); err != nil {
		s.fail(w, r, err)
		return
	}
	if v.Sheets, err = s.sheetSources(r.Context(), ws.ID, d.Revisions); err != nil {
		s.fail(w, r, err)
		return
	}
	if v.Withdrawn, err = s.withdrawals(r.Context(), ws.ID, st.History); err != nil {
		s.fail(w, r, err)
		return
	}
	m := facilitatorMeta(ws, fmt.Sprintf("Q%d %s", q.Position, q.Quantity), "overview")
	m.Caution = true
	m.Scripts = []string{"/static/live.js"}
	switch forms.page {
	case "reasons":
		m.Title = fmt.Sprintf("Reasons, Q%d %s", q.Position, q.Quantity)
		m.Scripts = nil
		s.renderPage(w, r, status, m, reasonsPage(v))
	case "history":
		m.Title = fmt.Sprintf("History, Q%d %s", q.Position, q.Quantity)
		m.Scripts = nil
		s.renderPage(w, r, status, m, historyPage(v))
	default:
		s.renderPage(w, r, status, m, panelPage(v))
	}
}

// questionReasons is a large panel's list of reasons, each with its
// withhold form, on a page of its own (the panel links to it).
func (s *Server) questionReasons(w http.ResponseWriter, r *http.Request) {
	s.questionList(w, r, "reasons")
}

// questionHistory is a question's whole revision history on a page of
// its own (a large panel shows only the latest saves).
func (s *Server) questionHistory(w http.ResponseWriter, r *http.Request) {
	s.questionList(w, r, "history")
}

// questionList shows the question's panel page ("") or one of its lists
// on a page of its own ("reasons", "history").
func (s *Server) questionList(w http.ResponseWriter, r *http.Request, page string) {
	ws, q, ok := s.loadWorkshopQuestion(w, r)
	if !ok {
		return
	}
	s.showPanelWith(w, r, http.StatusOK, ws, q, panelForms{page: page})
}

// historyTail is how many of the latest saves a large panel's page shows;
// the rest are on the history page.
const historyTail = 20

// recentHistory is the history the panel page shows: all of it for a
// small panel, the latest historyTail saves for a large one.
func (v panelView) recentHistory() []workshop.Revision {
	h := v.State.History
	if v.Chart.large() && len(h) > historyTail {
		return h[len(h)-historyTail:]
	}
	return h
}

func weightField(expertID int64) string { return fmt.Sprintf("weights[%d]", expertID) }

// withholdReason withholds a revision's reason from the feedback and the
// room view, or shows it again (action=withhold or release), with a
// required reason; the revision must be on this question.
func (s *Server) withholdReason(w http.ResponseWriter, r *http.Request) {
	ws, q, ok := s.loadWorkshopQuestion(w, r)
	if !ok {
		return
	}
	revID, ok := s.pathID(w, r, "revision")
	if !ok || !parseForm(w, r) {
		return
	}
	d, err := s.readWorkshopData(r.Context(), ws)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	found := false
	for _, rv := range d.Revisions {
		found = found || (rv.ID == revID && rv.QuestionID == q.ID)
	}
	if !found {
		s.notFound(w, r)
		return
	}
	// A large panel lists its reasons on a page of their own.
	large := d.state(q).chartView().large()
	f := newForm(r.PostForm)
	action := f.Choice("action", "", "withhold", "release")
	why := f.Text("withhold_reason", input.MaxLongText, true)
	if f.OK() {
		if err := s.store.SetReasonWithheld(r.Context(), revID, action == "withhold", why); err != nil {
			switch {
			case s.notSaved(r, f, err):
			case !isInputError(err):
				s.fail(w, r, err)
				return
			default:
				f.Fail(err, map[string]string{"reason": "withhold_reason", "revision": "withhold_reason"})
			}
		}
	}
	if !f.OK() {
		if msg := f.Error("withhold_reason"); msg != "" {
			f.set("", "Withholding or showing a reason needs a reason of its own: "+msg+".")
		} else if f.Error("action") != "" {
			// Only a request not made by the page's buttons: the page
			// said "correct the marked fields" with nothing marked.
			f.set("", "Choose to withhold the reason or to show it again; this request asked for neither, and nothing changed.")
		}
		page := ""
		if large {
			page = "reasons"
		}
		s.showPanelWith(w, r, f.refusedStatus(), ws, q, panelForms{page: page, withhold: f})
		return
	}
	s.reasonGen.Add(1)
	back := questionPath(ws.ID, q.ID) + "#reasons"
	if large {
		back = questionPath(ws.ID, q.ID) + "/reasons"
	}
	http.Redirect(w, r, back, http.StatusSeeOther)
}

// fitErrorWords says why a saved answer of q is not fitted, for the
// facilitator: the answer's part as the form names it ("the 5% value"),
// the rule and the value, without the package's prefix and field path,
// and, for an answer an earlier build of Parley saved under looser rules
// (record.EarlierRule: this version never saves one), that it was, so it
// does not read as today's save gone wrong.
func fitErrorWords(err error, q workshop.Question) string {
	var ie *elicit.InputError
	if !errors.As(err, &ie) {
		return err.Error()
	}
	words := answerPartWords(q, ie.Field) + " " + string(ie.Rule)
	if ie.Detail != "" {
		words += " (" + ie.Detail + ")"
	}
	if record.EarlierRule(err) {
		words = "saved by an earlier version of Parley, whose rules took it; today's rules refuse it: " + words
	}
	return words
}

// answerPartWords names the part of an answer to q that a field of the
// answer's rules names, as the answer form labels it.
func answerPartWords(q workshop.Question, field string) string {
	switch field {
	case "lowest":
		return "the lowest plausible value"
	case "best":
		return "the best estimate"
	case "highest":
		return "the highest plausible value"
	case "values":
		return "the values"
	}
	var i int
	if _, err := fmt.Sscanf(field, "values[%d]", &i); err == nil && i >= 0 && i < len(q.Probs) {
		return "the " + chart.FormatPercent(q.Probs[i]) + " value"
	}
	return field
}

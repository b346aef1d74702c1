package web

import (
	"bytes"
	"errors"
	"fmt"
	"net/http"
	"net/url"
	"sort"
	"strconv"
	"strings"

	"github.com/go-chi/chi/v5"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/web/chart"
)

// calibrationRoutes are a workshop's calibration pages: true values, the
// scores of Cooke's classical model, and performance weights. They are
// mounted inside /w/{workshop} by facilitatorRoutes.
//
//	GET  /w/{workshop}/calibration[?alpha=A]       questions, scores, robustness, pools side by side
//	GET  /w/{workshop}/calibration.csv[?alpha=A]   the scored answers, for parley calibrate
//	POST /w/{workshop}/calibration/q/{question}    enter or reveal a true value
//	POST /w/{workshop}/calibration/q/{question}/scale  score its information on the uniform or the log scale
//	POST /w/{workshop}/calibration/weights         choose equal, performance or custom weights
func (s *Server) calibrationRoutes(r chi.Router) {
	r.Get("/calibration", s.calibrationPage)
	r.Get("/calibration.csv", s.calibrationCSV)
	r.Post("/calibration/q/{question}", s.setTrueValue)
	r.Post("/calibration/q/{question}/background", s.setScale)
	r.Post("/calibration/weights", s.setCalibrationWeights)
}

func calibrationPath(ws int64) string { return workshopPath(ws) + "/calibration" }

// seedRow is one calibration question on the page: who has answered, and
// its true-value form.
type seedRow struct {
	Question    workshop.Question
	Answered    []string
	NotAnswered []string
	Form        *Form
	ScaleForm   *Form // the scale form, shown open when it has errors
}

// calibrationView is the facilitator's calibration page.
type calibrationView struct {
	Workshop workshop.Workshop
	Seeds    []seedRow
	Skipped  []workshop.SkippedQuestion
	Pending  int  // calibration questions still without a true value
	Scored   int  // calibration questions the scores are computed on
	Ready    bool // every calibration question scored has a true value
	// Unshown counts the true values entered but not yet shown to the
	// experts, of the questions scored: the page scores on them, the
	// report waits for their reveal.
	Unshown int
	Probs   []float64

	AlphaForm *Form
	Perf      *workshop.Performance
	PerfError string
	Questions []workshop.Question // the workshop's, for labels and bounds
	Names     map[int64]string    // experts' names by ID

	Robustness      *workshop.Robustness
	RobustnessError string

	Compare []workshop.PoolComparison
	Weights workshop.Weights // in force
	InForce bool             // the weights in force are these performance weights
	// Changed says what has changed since the performance weights in
	// force were set, when they differ from the page's (weightsChanged).
	Changed     string
	Experts     []workshop.Expert
	WeightsForm *Form
}

// forms are the page's forms to show again with their errors; nil fields
// are fresh.
type calibrationForms struct {
	truthFor int64 // the question whose truth form is shown again
	truth    *Form
	scaleFor int64 // the question whose scale form is shown again
	scale    *Form
	alpha    *Form
	weights  *Form
}

func (s *Server) calibrationPage(w http.ResponseWriter, r *http.Request) {
	ws, ok := s.loadWorkshop(w, r)
	if !ok {
		return
	}
	af := newForm(r.URL.Query())
	s.showCalibration(w, r, http.StatusOK, ws, calibrationForms{alpha: af})
}

// calibrationCSV downloads the answers the page scores, with each
// question's true value and bounds, in the form parley calibrate reads
// (record.WriteCalibrationCSV), so the scores can be checked outside the
// server. Until the page can score (a calibration question without a
// true value, or none answered) it answers 409 and says why.
func (s *Server) calibrationCSV(w http.ResponseWriter, r *http.Request) {
	ws, ok := s.loadWorkshop(w, r)
	if !ok {
		return
	}
	af := newForm(r.URL.Query())
	alpha := alphaOf(af)
	if !af.OK() {
		http.Error(w, "The cut-off alpha "+af.Errors["alpha"]+". Nothing was downloaded.", http.StatusBadRequest)
		return
	}
	d, err := s.readWorkshopData(r.Context(), ws)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	set := workshop.NewCalibrationSet(d.Questions, d.Experts, d.Revisions, false)
	if !set.Ready() {
		http.Error(w, "There is nothing to score yet: every calibration question needs its true value and at least one answer.", http.StatusConflict)
		return
	}
	var buf bytes.Buffer
	if err := record.WriteCalibrationCSV(&buf, ws.Title, set, alpha); err != nil {
		s.fail(w, r, err)
		return
	}
	w.Header().Set("Content-Type", "text/csv; charset=utf-8")
	w.Header().Set("Content-Disposition", fmt.Sprintf(`attachment; filename="parley-workshop-%d-calibration.csv"`, ws.ID))
	_, _ = buf.WriteTo(w)
}

// calibrationCSVPath links the download of the scored answers, with the
// page's fixed cut-off when it has one.
// livePage is the address live.js fetches the page at: the page with its
// fixed cut-off, when one is typed and taken, whatever form the page was
// shown after.
func (v calibrationView) livePage() string {
	p := calibrationPath(v.Workshop.ID)
	if a := strings.TrimSpace(v.AlphaForm.Value("alpha")); a != "" && v.AlphaForm.OK() {
		p += "?" + url.Values{"alpha": {a}}.Encode()
	}
	return p
}

func calibrationCSVPath(ws int64, af *Form) string {
	p := calibrationPath(ws) + ".csv"
	if a := strings.TrimSpace(af.Value("alpha")); a != "" && af.OK() {
		p += "?" + url.Values{"alpha": {a}}.Encode()
	}
	return p
}

// calibrationCSVAlpha ends the download's sentence with the page's fixed
// cut-off, which the command needs to score the same.
func calibrationCSVAlpha(af *Form) string {
	if a := strings.TrimSpace(af.Value("alpha")); a != "" && af.OK() {
		return " with --alpha " + a
	}
	return ""
}

// alphaOf parses the optional cut-off field: nil means optimise.
func alphaOf(f *Form) *float64 {
	v, ok := f.OptionalFloat("alpha")
	if !ok {
		return nil
	}
	if v < 0 || v > 1 {
		f.set("alpha", string(elicit.RuleUnitInterval))
		return nil
	}
	return &v // a typed -0 is 0 already (input.Number)
}

// showCalibration reads the workshop and renders the page. A bad cut-off
// in forms.alpha answers 400 with the message beside the field.
func (s *Server) showCalibration(w http.ResponseWriter, r *http.Request, status int, ws workshop.Workshop, forms calibrationForms) {
	d, err := s.readWorkshopData(r.Context(), ws)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	if forms.alpha == nil {
		forms.alpha = newForm(nil)
	}
	alpha := alphaOf(forms.alpha)
	set := workshop.NewCalibrationSet(d.Questions, d.Experts, d.Revisions, false)
	v := calibrationView{
		Workshop: ws, Skipped: set.Skipped, Pending: len(set.Pending), Scored: len(set.Questions), Ready: set.Ready(), Probs: set.Probs,
		AlphaForm: forms.alpha, Weights: d.Weights, Experts: set.Experts,
		Questions: d.Questions, Names: expertNames(d.Experts),
	}
	// A question left out of the scores holds nothing back: the report
	// counts only the scored questions' true values (record's
	// recordPerformance), and so does Unshown.
	skipped := map[int64]bool{}
	for _, s := range set.Skipped {
		skipped[s.ID] = true
	}
	for _, q := range d.Questions {
		if !q.Calibration {
			continue
		}
		row := seedRow{Question: q, Form: newForm(nil), ScaleForm: newForm(nil)}
		row.ScaleForm.Values.Set("background", scaleValue(q.LogScale))
		if forms.scale != nil && forms.scaleFor == q.ID {
			row.ScaleForm = forms.scale
		}
		if forms.truth != nil && forms.truthFor == q.ID {
			row.Form = forms.truth
		} else if q.TrueValue != nil {
			row.Form.Values.Set("true_value", chart.FormatExact(*q.TrueValue))
		}
		answered := map[int64]bool{}
		for _, e := range set.Answered[q.ID] {
			answered[e.ID] = true
			row.Answered = append(row.Answered, e.Name)
		}
		for _, e := range set.Experts {
			if !answered[e.ID] {
				row.NotAnswered = append(row.NotAnswered, e.Name)
			}
		}
		v.Seeds = append(v.Seeds, row)
		if q.TrueValue != nil && !q.Revealed && !skipped[q.ID] {
			v.Unshown++
		}
	}
	perf := map[int64]float64{}
	if v.Ready && forms.alpha.OK() {
		p, err := workshop.ScorePerformance(set, alpha)
		if err != nil {
			// A cut-off refused is the form's error (and the answer's
			// status); a panel the model cannot score is the page's news.
			if ie := (*elicit.InputError)(nil); errors.As(err, &ie) && ie.Field == "alpha" {
				forms.alpha.Fail(err, nil)
			} else {
				v.PerfError = s.scoringProblem(err, d)
			}
		} else {
			v.Perf = &p
			perf = p.WeightsByExpert()
			if inForce, err := workshop.PerformanceInForce(set, d.Weights); err == nil {
				v.InForce = inForce.InForce && sameWeightMap(inForce.WeightsByExpert(), perf)
			}
			if !v.InForce && d.Weights.Scheme == workshop.WeightsPerformance {
				v.Changed = weightsChanged(d.Weights.Basis, set, alpha)
			}
			if rb, err := workshop.PerformanceRobustness(set, d.Questions, d.Experts, d.Revisions, alpha); err != nil {
				v.RobustnessError = s.scoringProblem(err, d)
			} else {
				v.Robustness = &rb
			}
		}
	}
	if v.Ready {
		v.Compare = workshop.ComparePools(d.Questions, d.Experts, d.Revisions, perf)
		if v.Perf == nil {
			// No weights were formed (a cut-off refused, a panel the
			// model cannot score): the performance pool is not one of
			// experts all at weight 0, as the empty weights read.
			for i := range v.Compare {
				if v.Compare[i].Equal != nil { // a question with fits
					v.Compare[i].Performance, v.Compare[i].PerformanceError = nil, noPerformancePool
				}
			}
		}
	}
	if !forms.alpha.OK() && status < 400 {
		status = http.StatusBadRequest
	}
	v.WeightsForm = forms.weights
	if v.WeightsForm == nil {
		v.WeightsForm = freshWeightsForm(d.Weights, set.Experts, forms.alpha.Value("alpha"))
	}
	m := facilitatorMeta(ws, "Calibration: "+ws.Title, "calibration")
	m.Caution = true
	m.Scripts = []string{"/static/live.js"}
	s.renderPage(w, r, status, m, calibrationPage(v))
}

// noPerformancePool stands in the comparison's performance rows when
// the page has no scores to weight by.
const noPerformancePool = "no performance weights: the scores above could not be computed"

// weightsChanged says what differs between the basis b of the
// performance weights in force and the set and cut-off the page scores
// with, as "the true values and the cut-off have changed": the page said "the answers
// or the cut-off have changed" whatever had, though a true value
// corrected or a question's scale changed moves the weights as well. It
// falls back on that sentence where b was not stored (weights set before
// Parley kept it) or nothing stored differs.
func weightsChanged(b *workshop.WeightBasis, set workshop.CalibrationSet, alpha *float64) string {
	const unknown = "the answers or the cut-off have changed"
	if b == nil {
		return unknown
	}
	var what []string
	current := map[int64]workshop.Question{}
	for _, q := range set.Questions {
		current[q.ID] = q
	}
	questions, truths, scales := len(b.Questions) != len(set.Questions), false, false
	for _, bq := range b.Questions {
		q, ok := current[bq.QuestionID]
		switch {
		case !ok:
			questions = true
		case bq.TrueValue != nil && q.TrueValue != nil && *bq.TrueValue != *q.TrueValue:
			truths = true
		case bq.LogScale != q.LogScale:
			scales = true
		}
	}
	if questions {
		what = append(what, "the calibration questions scored")
	}
	if truths {
		what = append(what, "the true values")
	}
	if scales {
		what = append(what, "the scale a question's information is scored on")
	}
	type key struct{ expert, question int64 }
	// The answers are compared where the experts and the questions are
	// the same then and now: an expert revoked (or a question retired)
	// takes their answers out of the scoring, which is said as the panel
	// (or the questions) changing; it read "the experts' answers and the
	// experts on the panel have changed" when nobody had answered anew.
	active, scored := map[int64]bool{}, map[int64]bool{}
	for _, e := range set.Experts {
		active[e.ID] = true
	}
	for _, e := range b.Experts {
		scored[e.ExpertID] = true
	}
	wasAsked := map[int64]bool{}
	for _, bq := range b.Questions {
		wasAsked[bq.QuestionID] = true
	}
	both := func(k key) bool {
		return active[k.expert] && scored[k.expert] && wasAsked[k.question] && current[k.question].ID != 0
	}
	stored := map[key]int64{}
	for _, a := range b.CalibrationAnswers {
		if k := (key{a.ExpertID, a.QuestionID}); both(k) {
			stored[k] = a.RevisionID
		}
	}
	answers, compared := false, 0
	for i, a := range set.Assessments {
		var k key
		for _, e := range set.Experts {
			if workshop.SeedExpertKey(e.ID) == a.Expert {
				k.expert = e.ID
			}
		}
		for _, q := range set.Questions {
			if workshop.SeedQuestionKey(q.ID) == a.Question {
				k.question = q.ID
			}
		}
		if !both(k) {
			continue
		}
		compared++
		if r, ok := stored[k]; !ok || r != set.RevisionIDs[i] {
			answers = true
		}
	}
	if answers || compared != len(stored) {
		what = append(what, "the experts' answers")
	}
	experts := len(b.Experts) != len(set.Experts)
	for _, e := range b.Experts {
		experts = experts || !active[e.ExpertID]
	}
	if experts {
		what = append(what, "the experts on the panel")
	}
	fixed := b.AlphaRule == workshop.AlphaFixed
	if fixed != (alpha != nil) || fixed && *alpha != b.Alpha {
		what = append(what, "the cut-off")
	}
	switch len(what) {
	case 0:
		return unknown
	case 1:
		if what[0] == "the cut-off" || strings.HasPrefix(what[0], "the scale") {
			return what[0] + " has changed"
		}
	}
	return wordList(what) + " have changed"
}

func sameWeightMap(a, b map[int64]float64) bool {
	if len(a) != len(b) {
		return false
	}
	for id, x := range a {
		if y, ok := b[id]; !ok || x-y > 1e-12 || y-x > 1e-12 {
			return false
		}
	}
	return true
}

// freshWeightsForm is the weights form filled with the weights in force.
func freshWeightsForm(wt workshop.Weights, experts []workshop.Expert, alpha string) *Form {
	f := newForm(nil)
	f.Values.Set("scheme", string(wt.Scheme))
	f.Values.Set("alpha", alpha)
	for _, e := range experts {
		f.Values.Set(weightField(e.ID), chart.FormatExact(wt.Of(e.ID)))
	}
	return f
}

// setTrueValue stores a calibration question's true value, within the
// question's bounds (Question.CheckTrueValue), and reveals it to the experts when asked,
// with a required reason (Store.SetTrueValue records the reveal).
func (s *Server) setTrueValue(w http.ResponseWriter, r *http.Request) {
	ws, q, ok := s.loadWorkshopQuestion(w, r)
	if !ok || !parseForm(w, r) {
		return
	}
	f := newForm(r.PostForm)
	if !q.Calibration {
		s.notCalibration(w, r, q)
		return
	}
	// A proportion's true value takes a % sign, as the experts' answers
	// to it do.
	value, _, err := workshop.ParseAnswerNumber("true_value", f.Value("true_value"), q, false)
	f.failField("true_value", err)
	if f.Error("true_value") == "" {
		if err := q.CheckTrueValue(value); err != nil {
			var ie *elicit.InputError
			if errors.As(err, &ie) && ie.Rule == elicit.RuleLogScalePositive {
				f.set("true_value", "must be above 0 while the question's information is scored on the log scale (set below)")
			} else {
				f.set("true_value", "must lie within the question's bounds, "+boundsText(q.Lower, q.Upper, " to "))
			}
		}
	}
	// A revealed value is visible to the experts, so changing it is
	// recorded as a reveal, with its reason.
	reveal := f.Checked("reveal") || q.Revealed
	reason := f.Text("reason", input.MaxLongText, reveal)
	if f.OK() && !s.formSaved(w, r, f, s.store.SetTrueValue(r.Context(), q.ID, value, reveal, reason), nil) {
		return
	}
	if !f.OK() {
		s.showCalibration(w, r, f.refusedStatus(), ws, calibrationForms{truthFor: q.ID, truth: f})
		return
	}
	http.Redirect(w, r, calibrationPath(ws.ID)+"#seed-"+strconv.FormatInt(q.ID, 10), http.StatusSeeOther)
}

// Scale values of the calibration page's scale form.
const (
	scaleUniform = "uniform"
	scaleLog     = "log-uniform"
)

func scaleValue(log bool) string {
	if log {
		return scaleLog
	}
	return scaleUniform
}

// notCalibration refuses a true value or a background posted for a
// question that is not a calibration question (a hand-made post: the
// page offers neither form for it) on a page of its own, since the
// calibration page has no card where the refusal could stand.
func (s *Server) notCalibration(w http.ResponseWriter, r *http.Request, q workshop.Question) {
	s.renderPage(w, r, http.StatusUnprocessableEntity, shell(r, "Not a calibration question"),
		messagePage("Not a calibration question", "Q"+strconv.Itoa(q.Position)+" ("+q.Quantity+") is not a calibration question, so it takes no true value and its answers are not scored. Nothing was saved."))
}

// setScale sets whether a calibration question's information is scored
// against the uniform or the log-uniform background, with the required
// reason (Store.SetLogScale records it in the decision log).
func (s *Server) setScale(w http.ResponseWriter, r *http.Request) {
	ws, q, ok := s.loadWorkshopQuestion(w, r)
	if !ok || !parseForm(w, r) {
		return
	}
	if !q.Calibration {
		s.notCalibration(w, r, q)
		return
	}
	f := newForm(r.PostForm)
	var on bool
	switch f.Value("background") {
	case scaleUniform:
	case scaleLog:
		on = true
	default:
		f.set("background", "choose the uniform or the log-uniform background")
	}
	if f.Error("background") == "" && on {
		if err := q.CheckLogScale(); err != nil {
			f.set("background", logScaleRefusal(q))
		}
	}
	reason := f.Text("reason", input.MaxLongText, on != q.LogScale)
	if f.OK() && !s.formSaved(w, r, f, s.store.SetLogScale(r.Context(), q.ID, on, reason), nil) {
		return
	}
	if !f.OK() {
		s.showCalibration(w, r, f.refusedStatus(), ws, calibrationForms{scaleFor: q.ID, scale: f})
		return
	}
	http.Redirect(w, r, calibrationPath(ws.ID)+"#seed-"+strconv.FormatInt(q.ID, 10), http.StatusSeeOther)
}

// truthHint says which true values the question takes
// (Question.CheckTrueValue): anywhere from its lower to its upper bound,
// both included, as an observed share can be 0 or 1; on the log scale
// above 0. On a proportion it may be typed as a percentage.
func truthHint(q workshop.Question) string {
	lower, upper := fvBounds(q.Lower, q.Upper)
	pct := ""
	if q.IsProportion() {
		pct = " With a % sign it is a percentage: 12.5% is 0.125."
	}
	if q.LogScale {
		return "Above " + lower + " and at most " + upper + " (the log scale needs it above 0)." + pct
	}
	return "From " + lower + " to " + upper + ", either bound included." + pct
}

// logScaleRefusal says why q cannot be scored on the log scale, in the
// facilitator's words.
func logScaleRefusal(q workshop.Question) string {
	switch {
	case !q.Calibration:
		return "only a calibration question is scored"
	case q.Lower < 0:
		return "the log scale needs values above 0, and this question's lower bound is " + fv(q.Lower)
	case q.TrueValue != nil && *q.TrueValue <= 0:
		return "the log scale needs values above 0, and this question's true value is " + fv(*q.TrueValue)
	}
	return "this question cannot be scored on the log scale"
}

// performanceChoice is the weights form's words for performance weights:
// from the scores above once they are computed; before, the page shows
// no scores for "above" to name, and the choice says what it waits for.
func performanceChoice(ready bool) string {
	if ready {
		return "Performance weights from the scores above (with the cut-off shown there)"
	}
	return "Performance weights, once the scores can be computed (see “Who earns weight”)"
}

// notReadyToScore says why a set that is not Ready gives no performance
// weights, as the page's "Who earns weight" says it: a question still
// without its true value, or no answered question the classical model
// scores (every calibration question asked as an interval or in chips,
// or left unanswered), which no true value will change.
func notReadyToScore(set workshop.CalibrationSet) string {
	if n := len(set.Pending); n > 0 {
		return fmt.Sprintf("performance weights need every calibration question given its true value: %d %s none", n, plural(n, "question still has", "questions still have"))
	}
	return "performance weights need at least one answered calibration question asked in quantiles, and this workshop has none (see “Who earns weight”)"
}

// setCalibrationWeights records the pool weights chosen on the
// calibration page, with the required reason. Performance weights are the
// classical model's weights on the experts' current answers with the
// page's cut-off (optimised when empty), stored with their basis
// (workshop.WeightBasis); custom weights are typed per expert, as on a
// question's panel, and stored as typed.
func (s *Server) setCalibrationWeights(w http.ResponseWriter, r *http.Request) {
	ws, ok := s.loadWorkshop(w, r)
	if !ok || !parseForm(w, r) {
		return
	}
	f := newForm(r.PostForm)
	scheme := workshop.WeightScheme(f.Choice("scheme", "", string(workshop.WeightsEqual), string(workshop.WeightsPerformance), string(workshop.WeightsCustom)))
	reason := f.Text("reason", input.MaxLongText, true)
	alpha := alphaOf(f)
	d, err := s.readWorkshopData(r.Context(), ws)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	wt := workshop.Weights{WorkshopID: ws.ID, Scheme: scheme, Reason: reason}
	switch scheme {
	case workshop.WeightsPerformance:
		set := workshop.NewCalibrationSet(d.Questions, d.Experts, d.Revisions, false)
		if !set.Ready() {
			f.set("scheme", notReadyToScore(set))
			break
		}
		if !f.OK() {
			break
		}
		p, err := workshop.ScorePerformance(set, alpha)
		if err != nil {
			if ie := (*elicit.InputError)(nil); errors.As(err, &ie) && ie.Field == "alpha" {
				f.Fail(err, nil)
			} else {
				f.set("scheme", "the classical model could not score the panel: "+s.scoringProblem(err, d))
			}
			break
		}
		// The set keeps what made it: scores, cut-off, true values and
		// the answers scored.
		basis := workshop.NewWeightBasis(set, p)
		wt.ByExpert, wt.Basis = p.WeightsByExpert(), &basis
	case workshop.WeightsCustom:
		wt.ByExpert = map[int64]float64{}
		for _, e := range d.Experts {
			if e.Revoked {
				continue
			}
			x := f.Float(weightField(e.ID))
			if x < 0 {
				f.set(weightField(e.ID), string(elicit.RuleNonNegative))
			}
			wt.ByExpert[e.ID] = x
		}
	}
	if f.OK() && !s.formSaved(w, r, f, s.store.SetWeights(r.Context(), &wt),
		map[string]string{"weights": "scheme", "weights.by_expert": "scheme", "by_expert": "scheme"}) {
		return
	}
	if !f.OK() {
		af := newForm(nil)
		if f.Error("alpha") == "" {
			af.Values.Set("alpha", f.Value("alpha"))
		}
		s.showCalibration(w, r, f.refusedStatus(), ws, calibrationForms{weights: f, alpha: af})
		return
	}
	target := calibrationPath(ws.ID)
	if a := f.Value("alpha"); a != "" {
		target += "?alpha=" + url.QueryEscape(a)
	}
	http.Redirect(w, r, target+"#weights", http.StatusSeeOther)
}

// scoringProblem says in the facilitator's words why the classical model
// refused the panel: the rule, and the calibration question, expert and
// quantile that broke it where workshop.ScoringError places them. Any
// other failure is the server's: it goes to the server log, which the
// words point to.
func (s *Server) scoringProblem(err error, d workshopData) string {
	var ie *elicit.InputError
	if !errors.As(err, &ie) {
		s.log.Error("classical model", "workshop", d.Workshop.ID, "err", err)
		return "it failed; the details are in the server log"
	}
	rule := scoringRuleWords(ie)
	var se *workshop.ScoringError
	if !errors.As(err, &se) || se.QuestionID == 0 {
		return rule
	}
	var q workshop.Question
	for _, c := range d.Questions {
		if c.ID == se.QuestionID {
			q = c
		}
	}
	where := "calibration question Q" + strconv.Itoa(q.Position) + " " + q.Quantity
	if se.ExpertID == 0 {
		return where + ": " + rule
	}
	name := ""
	for _, e := range d.Experts {
		if e.ID == se.ExpertID {
			name = e.Name
		}
	}
	answer := name + "'s answer to " + where
	if se.Quantile < 0 {
		return answer + ": " + rule
	}
	// The value to the last digit: rounded, a quantile a hair from its
	// neighbour or a bound would read as equal to it.
	what := "its " + pct(q.Probs[se.Quantile]) + " quantile"
	for _, rv := range d.Revisions {
		if rv.ID == se.RevisionID && se.Quantile < len(rv.Answer.Values) {
			what += ", " + chart.FormatExact(rv.Answer.Values[se.Quantile]) + ","
		}
	}
	return answer + ": " + what + " " + rule
}

// scoringRuleWords says the classical model's rule in the facilitator's
// words. elicit words its rules for `parley calibrate`, whose file has a
// realization column and whose --overshoot sets how far each question's
// range is widened; the page has neither, and speaks of the true value and
// of the range widened by 10% of its width on each side
// (elicit.DefaultOvershoot, the widening the page scores with). The rule
// itself, what a caller compares, is unchanged.
func scoringRuleWords(ie *elicit.InputError) string {
	widened := "widened by " + pct(elicit.DefaultOvershoot) + " of its width on each side"
	switch {
	case ie.Rule == elicit.RuleRangeCollapsed:
		return "the experts' answers and the true value lie so close together that the span from the lowest of them to the highest, " + widened +
			", rounds back onto them, and the classical model cannot score the question"
	case ie.Rule == elicit.RuleRangeOverflow:
		return "a calibration question's span from the lowest answer or true value to the highest, " + widened +
			", goes past the largest number the computer holds, and the classical model cannot score it"
	case strings.HasPrefix(ie.Field, "realisations["):
		if ie.Rule == elicit.RuleInRange {
			return "its true value must lie within the question's bounds"
		}
		return "its true value " + string(ie.Rule)
	}
	return string(ie.Rule)
}

func isInputError(err error) bool {
	var ie *elicit.InputError
	return errors.As(err, &ie)
}

// strengthView is the warnings block about a performance weighting
// (workshop.CalibrationWarnings) and the sentence that says which weighting
// it is about. It is empty when there is nothing to warn of.
type strengthView struct {
	Lead     string
	Warnings []elicit.Warning
}

// panelStrength is the warnings block of a question's panel: about the
// performance weights in force, as the weight set's basis stored them
// (sets older than the basis are scored again); otherwise about the performance weights the
// calibration page offers, once every scored calibration question has
// its true value.
func panelStrength(d workshopData) strengthView {
	set := workshop.NewCalibrationSet(d.Questions, d.Experts, d.Revisions, false)
	if d.Weights.Scheme == workshop.WeightsPerformance {
		v := strengthView{Lead: "The performance weights in force rest on weak ground:"}
		if b := d.Weights.Basis; b != nil {
			v.Warnings = b.Warnings
		} else if set.Ready() {
			if p, err := workshop.PerformanceInForce(set, d.Weights); err == nil {
				v.Warnings = p.Warnings
			}
		}
		return v
	}
	if !set.Ready() {
		return strengthView{}
	}
	p, err := workshop.ScorePerformance(set, nil)
	if err != nil {
		return strengthView{}
	}
	return strengthView{Lead: "Performance weights from the calibration page would rest on weak ground:", Warnings: p.Warnings}
}

// basisInForce is the basis of the record's weights in force, when they
// are performance weights that keep one.
func basisInForce(r record.Record) *workshop.WeightBasis {
	if r.Weights.Scheme != workshop.WeightsPerformance {
		return nil
	}
	return r.Weights.Basis
}

// weightSetRow is one weight set of a record's history as the report
// lists it.
type weightSetRow struct {
	Set      workshop.Weights
	Scheme   string
	Weights  string // each expert's weight in words
	MadeFrom string
	Weak     string // the basis's warnings, briefly
	Priors   string // agreed priors recorded under the set
	InForce  bool
}

// weightSetRows lists every weight set of the record, oldest first, with
// what it was made from and the agreed priors recorded while it was in
// force (workshop.AgreedPrior.WeightSetID).
// reportsRobustness says whether the report prints the robustness
// reruns of the performance weights: when those weights are in force, or
// when a prior from the pool was agreed under a set of performance
// weights.
// Otherwise they are about a pool nothing rests on, and in a big workshop
// they ran to some 70 printed pages even under equal weights; the
// calibration page and the record's JSON keep them.
func reportsRobustness(r record.Record) bool {
	if r.Performance != nil && r.Performance.InForce {
		return true
	}
	performance := map[int64]bool{}
	for _, w := range r.WeightHistory {
		if w.Scheme == workshop.WeightsPerformance {
			performance[w.ID] = true
		}
	}
	for _, q := range r.Questions {
		for _, ap := range q.PriorHistory {
			if ap.Source == workshop.PriorFromPool && performance[ap.WeightSetID] {
				return true
			}
		}
	}
	return false
}

func weightSetRows(r record.Record) []weightSetRow {
	names := map[int64]string{}
	for _, e := range r.Experts {
		names[e.ID] = e.Name
	}
	labels := recordLabels(r)
	priors := map[int64][]string{}
	for _, q := range r.Questions {
		for _, ap := range q.PriorHistory {
			if ap.WeightSetID != 0 {
				priors[ap.WeightSetID] = append(priors[ap.WeightSetID], labels[q.ID]+" ("+ap.At.UTC().Format("2006-01-02 15:04 UTC")+", "+string(ap.Source)+")")
			}
		}
	}
	var rows []weightSetRow
	for _, w := range r.WeightHistory {
		row := weightSetRow{Set: w, InForce: w.ID == r.Weights.ID, Priors: strings.Join(priors[w.ID], "; ")}
		switch w.Scheme {
		case workshop.WeightsEqual:
			row.Scheme, row.Weights, row.MadeFrom = "equal", "every active expert alike", "—"
		case workshop.WeightsCustom:
			row.Scheme, row.MadeFrom = "set by the facilitator", "the facilitator's own weights, as typed (each share is its weight over their sum)"
			row.Weights = weightList(w.ByExpert, names, func(v float64) string { return fv(v) })
		case workshop.WeightsPerformance:
			row.Scheme = "performance"
			if b := w.Basis; b != nil {
				row.Weights = weightList(b.WeightsByExpert(), names, pct)
				row.MadeFrom = basisSentence(*b, labels)
				var weak []string
				for _, wn := range b.Warnings {
					weak = append(weak, strengthShort(wn.Code))
				}
				row.Weak = strings.Join(weak, "; ")
			} else {
				row.Weights = weightList(w.ByExpert, names, func(v float64) string { return fv(v) })
				row.MadeFrom = "Cooke's classical model; the scores behind these weights were not stored (set before Parley kept them)"
			}
		default:
			row.Scheme = string(w.Scheme)
		}
		rows = append(rows, row)
	}
	return rows
}

// weightList writes weights by expert in roster order of IDs.
func weightList(w map[int64]float64, names map[int64]string, format func(float64) string) string {
	ids := make([]int64, 0, len(w))
	for id := range w {
		ids = append(ids, id)
	}
	sort.Slice(ids, func(i, j int) bool { return ids[i] < ids[j] })
	parts := make([]string, len(ids))
	for i, id := range ids {
		n, ok := names[id]
		if !ok {
			n = "expert " + strconv.FormatInt(id, 10)
		}
		parts[i] = n + " " + format(w[id])
	}
	return strings.Join(parts, ", ")
}

// basisSentence says in words what a set of performance weights was made
// from.
func basisSentence(b workshop.WeightBasis, labels map[int64]string) string {
	var qs []string
	for _, q := range b.Questions {
		l, ok := labels[q.QuestionID]
		if !ok {
			l = "question " + strconv.FormatInt(q.QuestionID, 10)
		}
		if q.TrueValue != nil {
			l += " (true value " + fv(*q.TrueValue)
		} else {
			l += " (true value withheld until revealed"
		}
		if q.LogScale {
			l += ", information on the log scale"
		}
		qs = append(qs, l+")")
	}
	rule := "optimised"
	if b.AlphaRule == workshop.AlphaFixed {
		rule = "fixed by the facilitator"
	}
	return "Cooke's classical model on " + strconv.Itoa(len(b.Questions)) + " calibration " + plural(len(b.Questions), "question", "questions") +
		": " + strings.Join(qs, "; ") + ". " + strconv.Itoa(len(b.CalibrationAnswers)) + " " + plural(len(b.CalibrationAnswers), "answer", "answers") +
		" scored, quantiles at " + workshop.ProbsLabel(b.Probs) + "; cut-off α = " + alphaText(b.Alpha, b.LogAlpha) + ", " + rule + "."
}

// strengthShort names a calibration warning in a few words.
func strengthShort(c elicit.WarningCode) string {
	switch c {
	case workshop.WarnFewCalibrationQuestions:
		return "fewer than " + strconv.Itoa(workshop.RecommendedCalibrationQuestions) + " calibration questions"
	case workshop.WarnOneExpertDominates:
		return "one expert has more than " + pct(workshop.DominantWeight) + " of the weight"
	case workshop.WarnUnequalCalibrationAnswers:
		return "experts answered different numbers of calibration questions"
	}
	return string(c)
}

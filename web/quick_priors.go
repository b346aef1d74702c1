package web

import (
	"errors"
	"fmt"
	"net/http"
	"net/url"
	"strconv"
	"strings"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/web/chart"
)

// Quick priors: a Beta prior from a few numbers, by elicit.Construct —
// uniform, an equivalent prior sample, a mean and SD by the method of
// moments, or a central interval with its coverage by both the moment
// match and the exact quantile match side by side. A page of its own
// (/w/{id}/quick-priors) shows them, and any of them can be recorded as a
// question's agreed prior with a rationale, here or in the agreed-prior
// section of the question's page; the record keeps the construction's
// inputs (workshop.AgreedPrior.Construction).

// quickPriorsPath is the workshop's quick-priors page.
func quickPriorsPath(ws int64) string { return workshopPath(ws) + "/quick-priors" }

// constructionWords says how a quick construction made its prior, with
// its Beta and the coverage it holds written as the pages write them
// beside it (sv, pct): "Beta(3, 20000)" under the card's Beta(3, 20000),
// where the record's words (elicit.Construction.Describe) keep every
// figure, "Beta(3, 19997.4)"; and the inputs as typed (input.Typed): a
// low end typed 0.00003 read "3e-05" above the card's 5% point 0.00003.
func constructionWords(c elicit.Construction) string {
	return c.DescribeIn(elicit.Figures{Shape: sv, Percent: coveragePct, Typed: asTyped})
}

// coveragePct writes the probability a constructed prior gives its
// interval, or either side of it, to four significant figures, as
// `parley prior` does (elicit.PercentText): the moment match of
// [0.4, 0.6] at 90% holds 89.97% (R 4.2.2's pbeta), which pct's three
// figures wrote "90%" beside the exact match's 90%, and the side-by-side
// comparison of the two methods showed no difference.
func coveragePct(p float64) string { return elicit.PercentText(p, 4) + "%" }

// asTyped writes a number the person typed as typed (input.Typed).
func asTyped(v float64) string { return input.Typed(v, false) }

// The construction form's fields. One form reads them for the quick-priors
// page and the question page alike (readConstruction).
const (
	fieldConstruction = "construction"
	// quickInterval on the quick-priors page asks for both interval
	// methods side by side.
	quickInterval = "interval"
)

// constructionAliases map elicit's field names to the form's.
var constructionAliases = map[string]string{
	"successes": "c_successes", "trials": "c_trials", "mean": "c_mean", "sd": "c_sd",
	"low": "c_low", "high": "c_high", "coverage": "c_coverage", "interval": "c_high",
	"lower": fieldConstruction, "upper": fieldConstruction, "method": fieldConstruction,
}

// constructionMethods are elicit's methods, as the form offers them.
var constructionMethods = []string{string(elicit.MethodUniform), string(elicit.MethodEquivalentSample), string(elicit.MethodMeanSD),
	string(elicit.MethodIntervalQuantiles), string(elicit.MethodIntervalMoments)}

// constructionInput reads the inputs of method on q's scale from the
// form, each number by the input rules; only the method's own fields are
// read.
func constructionInput(f *Form, q workshop.Question, method elicit.ConstructionMethod) elicit.ConstructionInput {
	in := elicit.ConstructionInput{Method: method, Lower: q.Lower, Upper: q.Upper}
	switch {
	case method == elicit.MethodEquivalentSample:
		in.Successes, in.Trials = f.Float("c_successes"), f.Float("c_trials")
	case method == elicit.MethodMeanSD:
		in.Mean, in.SD = valueOf(f, q, "c_mean"), valueOf(f, q, "c_sd")
	case method.IsInterval():
		in.Low, in.High, in.Coverage = valueOf(f, q, "c_low"), valueOf(f, q, "c_high"), coverageOf(f)
	}
	return in
}

// valueOf reads a value on the question's scale: on a proportion it
// takes a % sign (3% is 0.03), as the coverage beside it, the experts'
// answers and the true value do; the low end's "3%" was refused as not
// a plain decimal number while the coverage's "90%" was taken. Elsewhere
// a % sign is refused naming the field.
func valueOf(f *Form, q workshop.Question, name string) float64 {
	v, _, err := workshop.ParseAnswerNumber(name, f.Value(name), q, false)
	f.failField(name, err)
	return v
}

// coverageOf reads the interval's coverage: a fraction (0.9), or a
// percentage with its sign (90%), as a room says it and as the
// four-value answer takes its confidence. A plain 90 stays refused by
// the coverage's rule: it may be a slip for either.
func coverageOf(f *Form) float64 { return fractionOf(f, "c_coverage") }

// fractionOf reads a probability or a proportion typed as a fraction
// (0.95), or as a percentage with its sign (95%), for the coverage and
// the study plan's fields alike; a plain 95 is left to the field's own
// rule, which refuses it.
func fractionOf(f *Form, name string) float64 {
	if rest, ok := strings.CutSuffix(strings.TrimSpace(f.Value(name)), "%"); ok {
		v, err := input.Percent(name, rest)
		f.failField(name, err)
		return v
	}
	return f.Float(name)
}

// construct makes the prior of in, recording elicit's refusal beside the
// field it names.
func construct(f *Form, in elicit.ConstructionInput) (elicit.Construction, bool) {
	if !f.OK() {
		return elicit.Construction{}, false
	}
	c, err := elicit.Construct(in)
	if err != nil {
		f.Fail(err, constructionAliases)
		return elicit.Construction{}, false
	}
	return c, true
}

// quickResult is one constructed prior as the page shows it.
type quickResult struct {
	Title        string
	Construction elicit.Construction
	Worth        elicit.PriorWorth
	Picture      chart.PanelView
	Method       string // the elicit method, for recording it
	// Plan is the study page's plan with this prior as the study's
	// analysis prior, for a proportion; empty on other bounds, where the
	// study page plans nothing.
	Plan string
}

// analysedUnderLink is the study page of question q with its plan judged
// under the Beta b as a prior of the lead's own ("Analysed under"): its
// α and β written to round-trip exactly, so that the plan uses the Beta
// this page made, not one rounded for reading.
func analysedUnderLink(ws int64, q workshop.Question, b elicit.Beta, plan url.Values) string {
	v := url.Values{}
	for k, vals := range plan {
		v[k] = vals
	}
	v.Set("analysis", ownAnalysis)
	v.Set("analysis_alpha", strconv.FormatFloat(b.Alpha, 'g', -1, 64))
	v.Set("analysis_beta", strconv.FormatFloat(b.Beta, 'g', -1, 64))
	if v.Get("trials") == "" {
		v.Set("trials", strconv.Itoa(defaultPlanTrials))
	}
	return studyPath(ws, q.ID) + "?" + v.Encode() + "#plan"
}

// fieldPlan carries the study page's plan, as its address, through the
// quick-priors page: the lead who went there from a plan to make an
// analysis prior comes back to that plan (its trials, criterion and
// prior planned under) with the prior made, not to a fresh one.
const fieldPlan = "plan"

// planCarried are the plan's fields the round trip keeps; the analysis
// prior's are the ones it replaces.
var planCarried = []string{"prior", "trials", "threshold", "direction", "confidence", "length", "level", "criterion", "interval", "woc_trim"}

// planAddress is the study page's address of the plan in f, for the
// quick-priors page to come back to: its carried fields alone.
func planAddress(ws int64, q workshop.Question, f *Form) string {
	v := url.Values{}
	for _, k := range planCarried {
		if x := f.Value(k); x != "" {
			v.Set(k, x)
		}
	}
	if len(v) == 0 {
		return studyPath(ws, q.ID)
	}
	return studyPath(ws, q.ID) + "?" + v.Encode()
}

// carriedPlan is the plan the quick-priors form f came from, when it is
// question q's (the study page of another question plans under its own
// priors): its carried fields, or nil.
func carriedPlan(ws int64, q workshop.Question, f *Form) url.Values {
	u, err := url.Parse(f.Value(fieldPlan))
	if err != nil || u.Path != studyPath(ws, q.ID) || u.Host != "" || u.Scheme != "" {
		return nil
	}
	in, out := u.Query(), url.Values{}
	for _, k := range planCarried {
		if x := in.Get(k); x != "" {
			out.Set(k, x)
		}
	}
	return out
}

// quickPriorsFrom is the quick-priors page's address from the study page
// of q, with its plan f to come back to.
func quickPriorsFrom(ws int64, q workshop.Question, f *Form) string {
	v := url.Values{}
	v.Set("question", strconv.FormatInt(q.ID, 10))
	v.Set(fieldPlan, planAddress(ws, q, f))
	return quickPriorsPath(ws) + "?" + v.Encode()
}

// proportion says the construction is on [0, 1], where α + β counts
// binomial trials; on other bounds no trials give it meaning.
func (r quickResult) proportion() bool {
	return r.Construction.Dist.OnUnit()
}

// weightWords says how much the prior weighs: in trials for a proportion,
// and as α + β itself on any other scale.
func (r quickResult) weightWords() string {
	if r.proportion() {
		return worthWords(r.Worth)
	}
	return "α + β = " + elicit.ESSText(r.Worth.Trials) + ". " + alphaBetaHint
}

// pointIn writes a point of the prior d, its mean or a quantile, as the
// picture's table of percentiles under it and the question's panel write
// a prior's points (fvIn: chart.FormatWithin, plain decimals down to
// 1e-9): the card wrote a rare event's 5% point "4.089e-5" (fv) above
// the picture's "0.00004089".
func pointIn(d elicit.ScaledBeta, x float64) string { return fvIn(x, d.Lower, d.Upper) }

// percentilesIn writes the prior d's 5%, 50% and 95% points as pointIn
// does, one range, apart (pointsIn).
func percentilesIn(d elicit.ScaledBeta) string {
	return strings.Join(pointsIn(d.Lower, d.Upper, d.Quantile(0.05), d.Quantile(0.5), d.Quantile(0.95)), ", ")
}

// alphaBetaHint says what α + β tells on a scale other than [0, 1].
const alphaBetaHint = "α + β says how concentrated the prior is: the larger, the narrower. " +
	"It is not a number of trials here; that reading holds only for a proportion on 0 to 1."

// quickView is the quick-priors page.
type quickView struct {
	Workshop  workshop.Workshop
	Questions []workshop.Question // those a prior can be recorded for
	Question  *workshop.Question
	Form      *Form
	Results   []quickResult
	AgreeForm *Form
	Recorded  recordedData // the chosen question's study data
	// Unavailable says why one of the interval's two methods cannot make
	// a Beta when the other can (readQuick).
	Unavailable []string
	// PlanFrom names the question whose study plan the page was reached
	// from ("Q1"), which the priors made for it link back to; "" if none.
	PlanFrom string
}

func (s *Server) quickPriors(w http.ResponseWriter, r *http.Request) {
	ws, ok := s.loadWorkshop(w, r)
	if !ok {
		return
	}
	if name, n := repeatedField(r.URL.Query()); name != "" {
		http.Error(w, fmt.Sprintf("The form could not be read: %s: takes one value, got %d.", input.Clip(name, 40), n), http.StatusBadRequest)
		return
	}
	s.showQuickPriors(w, r, ws, newForm(r.URL.Query()), nil)
}

// showQuickPriors draws the page for the construction form f, with the
// recording form af shown again when it was refused.
func (s *Server) showQuickPriors(w http.ResponseWriter, r *http.Request, ws workshop.Workshop, f, af *Form) {
	qs, err := s.store.Questions(r.Context(), ws.ID)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	v := quickView{Workshop: ws, Form: f, AgreeForm: af}
	if v.AgreeForm == nil {
		v.AgreeForm = newForm(nil)
	}
	for _, q := range qs {
		if !q.Calibration && !q.Retired {
			v.Questions = append(v.Questions, q)
		}
	}
	for _, q := range v.Questions {
		if strconv.FormatInt(q.ID, 10) == f.Value("question") && q.IsProportion() && carriedPlan(ws.ID, q, f) != nil {
			v.PlanFrom = "Q" + strconv.Itoa(q.Position)
		}
	}
	status := http.StatusOK
	// Arriving with only the question and the plan to come back to (from
	// the study page) is not a construction asked for.
	asked := false
	for k := range f.Values {
		asked = asked || (k != "question" && k != fieldPlan)
	}
	if asked && len(v.Questions) > 0 {
		v.Question, v.Results, v.Unavailable = readQuick(f, v.Questions)
	}
	if v.Question != nil && v.Question.IsProportion() {
		for i := range v.Results {
			v.Results[i].Plan = analysedUnderLink(ws.ID, *v.Question, v.Results[i].Construction.Dist.Beta, carriedPlan(ws.ID, *v.Question, f))
		}
	}
	if v.Question != nil {
		if v.Recorded, err = s.recordedFor(r.Context(), ws, *v.Question); err != nil {
			s.fail(w, r, err)
			return
		}
	}
	if !f.OK() || !v.AgreeForm.OK() {
		status = v.AgreeForm.refusedStatus()
	}
	m := facilitatorMeta(ws, "Quick priors", "quick-priors")
	m.Caution = true
	s.renderPage(w, r, status, m, quickPriorsPage(v))
}

// readQuick reads the quick-priors form: the question (its scale) and the
// construction; for a central interval both methods. When one of the two
// cannot make a Beta (the moment match of a wide interval breaks the
// moments' rule, where the exact quantile match still has a Beta) the
// other is shown, with a note saying why the first is missing; only when
// none can is the form refused.
func readQuick(f *Form, qs []workshop.Question) (*workshop.Question, []quickResult, []string) {
	ids := make([]string, len(qs))
	for i, q := range qs {
		ids[i] = strconv.FormatInt(q.ID, 10)
	}
	var q *workshop.Question
	chosen := f.Choice("question", ids[0], ids...)
	for i := range qs {
		if ids[i] == chosen {
			q = &qs[i]
		}
	}
	method := f.Choice(fieldConstruction, "", append([]string{quickInterval}, constructionMethods...)...)
	if q == nil || !f.OK() {
		return q, nil, nil
	}
	methods := []elicit.ConstructionMethod{elicit.ConstructionMethod(method)}
	if method == quickInterval {
		methods = []elicit.ConstructionMethod{elicit.MethodIntervalMoments, elicit.MethodIntervalQuantiles}
	}
	var out []quickResult
	var refused []error
	var notes []string
	for _, m := range methods {
		in := constructionInput(f, *q, m)
		if !f.OK() {
			return q, nil, nil
		}
		c, err := elicit.Construct(in)
		if err != nil {
			refused = append(refused, err)
			notes = append(notes, methodTitle(m)+": no Beta from this interval. "+refusalWords(err))
			continue
		}
		out = append(out, quickResult{Title: methodTitle(m), Construction: c, Worth: elicit.Worth(c.Dist.Beta), Method: string(m),
			Picture: chart.PanelView{ID: "quick-" + string(m), Quantity: q.Quantity, Units: q.Units, Lower: q.Lower, Upper: q.Upper,
				Curves: []chart.Curve{{Label: methodTitle(m), Role: chart.RoleAgreed, Dist: c.Dist}}}})
	}
	if len(out) == 0 {
		f.Fail(refused[0], constructionAliases)
		return q, nil, nil
	}
	return q, out, notes
}

// refusalWords is elicit's refusal as a sentence: its rule, and its
// detail in brackets.
func refusalWords(err error) string {
	var ie *elicit.InputError
	if !errors.As(err, &ie) {
		return err.Error()
	}
	s := string(ie.Rule)
	if ie.Detail != "" {
		s += " (" + ie.Detail + ")"
	}
	return strings.ToUpper(s[:1]) + s[1:] + "."
}

// comparisonPicture overlays the interval's two methods.
func comparisonPicture(v quickView) chart.PanelView {
	q := v.Question
	pv := chart.PanelView{ID: "quick-interval", Quantity: q.Quantity, Units: q.Units, Lower: q.Lower, Upper: q.Upper}
	for _, res := range v.Results {
		role, label := chart.RoleAgreed, "Exact quantile match"
		if res.Method == string(elicit.MethodIntervalMoments) {
			role, label = chart.RoleConsensus, "Moment match"
		}
		pv.Curves = append(pv.Curves, chart.Curve{Label: label, Role: role, Dist: res.Construction.Dist})
	}
	return pv
}

// methodTitle names a construction for people.
func methodTitle(m elicit.ConstructionMethod) string {
	switch m {
	case elicit.MethodUniform:
		return "Uniform"
	case elicit.MethodEquivalentSample:
		return "Equivalent prior sample"
	case elicit.MethodMeanSD:
		return "Mean and SD (method of moments)"
	case elicit.MethodIntervalMoments:
		return "Central interval, moment match"
	case elicit.MethodIntervalQuantiles:
		return "Central interval, exact quantile match"
	}
	return string(m)
}

// agreeQuickPrior records a constructed prior as a question's agreed
// prior, from the quick-priors page: the construction is made again here
// from the typed inputs (never taken from the page), with a rationale.
func (s *Server) agreeQuickPrior(w http.ResponseWriter, r *http.Request) {
	ws, ok := s.loadWorkshop(w, r)
	if !ok || !parseForm(w, r) {
		return
	}
	f := newForm(r.PostForm)
	qs, err := s.store.Questions(r.Context(), ws.ID)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	var targets []workshop.Question
	for _, q := range qs {
		if !q.Calibration && !q.Retired {
			targets = append(targets, q)
		}
	}
	if len(targets) == 0 {
		s.notFound(w, r)
		return
	}
	q, results, _ := readQuick(f, targets)
	rationale := f.Text("rationale", input.MaxLongText, true)
	if ws.Open && !f.Checked("confirm_open") {
		f.set("confirm_open", openRoundWarning(ws))
	}
	if f.OK() && len(results) == 1 && q != nil {
		c := results[0].Construction
		in := c.Input
		p := workshop.AgreedPrior{QuestionID: q.ID, Source: workshop.PriorFromConstruction, Dist: c.Dist, Construction: &in,
			Rationale: rationale, RoundOpen: f.Checked("confirm_open")}
		switch err := s.store.AgreePrior(r.Context(), &p); {
		case err == nil:
			http.Redirect(w, r, questionPath(ws.ID, q.ID)+"#agreed", http.StatusSeeOther)
			return
		case s.notSaved(r, f, err):
		case isInputError(err):
			f.Fail(err, constructionAliases)
		default:
			s.fail(w, r, err)
			return
		}
	}
	if f.OK() && len(results) != 1 {
		f.set(fieldConstruction, "record one method: the moment match or the exact quantile match, by its own button")
	}
	// The construction is read again for the page, apart from the
	// recording's own errors (a missing rationale must not hide it).
	again := newForm(nil)
	for k, v := range r.PostForm {
		if k != "rationale" && k != "confirm_open" {
			again.Values[k] = v
		}
	}
	s.showQuickPriors(w, r, ws, again, f)
}

package web

import (
	"context"
	"errors"
	"fmt"
	"net/http"
	"slices"
	"sort"
	"strconv"
	"strings"
	"time"
	"unicode"
	"unicode/utf8"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/internal/memo"
	"github.com/parley-elicit/parley/web/chart"
)

// The study page of a question, "From the agreed prior to the study":
// the project lead records observed data against the agreed prior and
// sees the posterior; plans the study (prior predictive, assurance,
// sample size); and compares the posterior under every expert's own fit,
// the pools and the agreed prior. Every number is elicit's, through the
// same functions `parley update` and `parley plan` call.

// Defaults of the planning form when the page is opened afresh.
const (
	defaultPlanTrials = 100
	// defaultPlanLevel is the sample size's level when a length is given
	// without one, as `parley plan --level` defaults. The form's field
	// starts empty: a level typed without a length is refused.
	defaultPlanLevel = 0.95
	// planCurvePoints is how many numbers of trials the assurance curve
	// has, as in `parley plan`.
	planCurvePoints = 40
	// sampleSizeTime bounds the sample-size search of one page.
	sampleSizeTime = 20 * time.Second
)

// sizeKey is a sample-size search: the design and analysis priors and
// the goal.
type sizeKey struct {
	prior, analysis elicit.Beta
	goal            elicit.SampleSizeGoal
}

// sampleSizes remembers the sample sizes found, which depend on nothing
// but their key. A search can cost seconds; the study page is opened
// again after every batch of data and every change to the plan, mostly
// with the same goal, and then answers at once. A search that fails or
// runs out of time is not remembered. (A few hundred bytes each.)
var sampleSizes = memo.New[sizeKey, elicit.SampleSizeResult](256)

// studyPath is the question's study page.
func studyPath(ws, q int64) string { return questionPath(ws, q) + "/study" }

// studyView is the study page.
type studyView struct {
	Workshop workshop.Workshop
	Question workshop.Question
	Agreed   *workshop.AgreedPrior
	// AgreedPool names the pool a prior from the pool came from by its
	// weights (pooledBy), as the question's panel does; "" when not known.
	AgreedPool string
	Proportion bool
	Data       []workshop.StudyData // this question's batches, oldest first
	DataForm   *Form
	Update     *workshop.Update
	UpdateErr  string
	UpdatePic  chart.PanelView
	Plan       planView
	Planned    *sensitivityBlock // posteriors at the planned study's typical outcome
	// PlannedOutcome is that typical outcome (successes in the planned
	// trials); when the plan is under the posterior after the recorded
	// data, Planned updates each prior with the data and it together.
	PlannedOutcome int
	Observed       *sensitivityBlock // posteriors for the recorded data
	// PlannedOmitted and ObservedOmitted say why a comparison that is
	// due could not be worked out (compareWhy); "" otherwise.
	PlannedOmitted, ObservedOmitted string
	Skipped                         []string // priors left out of the comparison, and why
	Caveats                         []string // pools whose single Beta stands in for them only roughly
	// UniformPrior names, as a sentence begins ("The agreed prior"), a
	// prior compared that is itself the uniform Beta(1, 1), which then
	// stands as the comparison's reference (no row of its own is added);
	// "" when none is.
	UniformPrior string

	// PoolChanged says how the pool a prior from the pool was agreed
	// from has changed since (poolChangeWords), "" when it has not: the
	// study takes the prior as agreed.
	PoolChanged string
}

// priorChoice is one prior the study can be planned under.
type priorChoice struct {
	Value, Label string
	// InSentence is the label as it reads inside a sentence
	// (priorInSentence): "the agreed prior", "Priya Shah's fit".
	InSentence string
	Prior      elicit.Beta
	// Caveat says that a pool's single Beta stands in for the pool only
	// roughly (workshop.StandInCaveat); "" otherwise.
	Caveat string
	// AfterData marks the posterior after the recorded data: a follow-up
	// study planned under what the data have already taught.
	AfterData bool
}

// priorInSentence is a prior's label as it reads inside a sentence. A
// label of Parley's own ("Agreed prior", "Equal-weight pool (suggested)")
// is a name standing alone in a list or a heading; mid-sentence it takes
// "the" and a small first letter, "the agreed prior". An expert's label
// is their name, which keeps its capitals: "Priya Shah's fit".
func priorInSentence(label string, expert bool) string {
	if expert {
		return label + "'s fit"
	}
	r, size := utf8.DecodeRuneInString(label)
	return "the " + string(unicode.ToLower(r)) + label[size:]
}

// planView is the planning section: its form and what it computed.
type planView struct {
	Form             *Form
	Choices          []priorChoice
	Default          string // the choice planned under unless another is asked for (defaultChoice)
	Chosen           priorChoice
	Ran              bool
	Trials           int
	Worth            elicit.PriorWorth
	Share            float64 // the planned trials' weight in the posterior mean
	PMF              []float64
	PredMean, PredSD float64
	PredQ            [3]int
	PredPic          chart.PredictiveView
	Goal             *elicit.SuccessCriterion
	// Analysis is the prior the study's own analysis will use, on whose
	// posterior success is judged and the sample size's intervals are
	// taken (elicit.AssuranceUnder, SampleSizeUnder); its Value is "" when
	// it is the prior planned under (Chosen), which then plays both parts.
	Analysis priorChoice
	Assure   *elicit.AssuranceResult
	Curve    []elicit.AssuranceResult
	CurvePic chart.AssuranceView
	Size     *elicit.SampleSizeGoal
	SizeRes  *elicit.SampleSizeResult
	SizeAt   *elicit.CriterionResult // the criterion at the planned trials
}

// sensitivityBlock is the posterior under each compared prior for one
// set of data (elicit.Sensitivity).
type sensitivityBlock struct {
	Successes, Trials int
	Rows              []elicit.SensitivityRow
	Picture           chart.IntervalsView
	// Notes say, row by row, how a highest-density interval is to be
	// read where the posterior's shape makes it other than an interval
	// around a peak (elicit.HDINote): after no failures in a run of
	// trials, the uniform reference's posterior is J-shaped and its
	// interval starts at 0, which the table showed without a word.
	Notes []string
}

func (s *Server) studyPage(w http.ResponseWriter, r *http.Request) {
	ws, q, ok := s.loadWorkshopQuestion(w, r)
	if !ok {
		return
	}
	if name, n := repeatedField(r.URL.Query()); name != "" {
		http.Error(w, fmt.Sprintf("The form could not be read: %s: takes one value, got %d.", input.Clip(name, 40), n), http.StatusBadRequest)
		return
	}
	s.showStudy(w, r, ws, q, nil)
}

// repeatedField is the first field given more than once, with its count.
func repeatedField(v map[string][]string) (string, int) {
	var names []string
	for name, vs := range v {
		if len(vs) > 1 {
			names = append(names, name)
		}
	}
	if len(names) == 0 {
		return "", 0
	}
	sort.Strings(names)
	return names[0], len(v[names[0]])
}

// showStudy draws the study page, with the data form df shown again when
// it was refused. The page answers 422 when the data form or the
// planning form was refused.
func (s *Server) showStudy(w http.ResponseWriter, r *http.Request, ws workshop.Workshop, q workshop.Question, df *Form) {
	d, err := s.readWorkshopData(r.Context(), ws)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	data, err := s.store.StudyData(r.Context(), ws.ID)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	if df == nil {
		df = newForm(nil)
	}
	v := buildStudy(r.Context(), d, q, data, df, newForm(r.URL.Query()))
	if v.PoolChanged, err = s.poolChangeText(r.Context(), ws, d.state(q), d.Experts, againAt{}); err != nil {
		s.fail(w, r, err)
		return
	}
	status := http.StatusOK
	if !df.OK() || !v.Plan.Form.OK() {
		status = df.refusedStatus()
	}
	// The study has no item in the menu: none is marked current (it was
	// "overview", which named the workshop's overview as this page).
	m := facilitatorMeta(ws, fmt.Sprintf("Q%d study: %s", q.Position, q.Quantity), "")
	m.Caution = true
	s.renderPage(w, r, status, m, studyPage(v))
}

// buildStudy computes the study page of question q from the workshop's
// data: the update of the agreed prior, the plan asked for in pf, and the
// comparison of priors.
func buildStudy(ctx context.Context, d workshopData, q workshop.Question, data []workshop.StudyData, df, pf *Form) studyView {
	st := d.state(q)
	v := studyView{Workshop: d.Workshop, Question: q, Agreed: st.current(), Proportion: q.IsProportion(), DataForm: df}
	if v.Agreed != nil {
		v.AgreedPool = pooledBy(*v.Agreed, []workshop.Weights{d.Weights}, d.Weights.ID == 0)
	}
	for _, b := range data {
		if b.QuestionID == q.ID {
			v.Data = append(v.Data, b)
		}
	}
	v.Plan.Form = pf
	if !v.Proportion {
		return v
	}
	if v.Agreed != nil && len(v.Data) > 0 {
		u, err := workshop.StudyUpdate(q, *v.Agreed, v.Data)
		if err != nil {
			v.UpdateErr = workshop.UpdateFailure(q, *v.Agreed, v.Data, err)
		} else {
			v.Update = &u
			v.UpdatePic = updatePicture(q, u)
		}
	}
	priors, skipped, caveats := workshop.ComparedPriors(workshop.PanelInput{Question: q, Experts: d.Experts, Revisions: st.History, Weights: d.Weights, Fit: d.fit},
		performanceWeights(d), v.Agreed)
	v.Skipped = skipped
	experts := map[string]bool{}
	for _, e := range d.Experts {
		experts[e.Name] = true
	}
	if name := uniformAmong(priors); name != "" {
		in := priorInSentence(name, experts[name])
		r, size := utf8.DecodeRuneInString(in)
		v.UniformPrior = string(unicode.ToUpper(r)) + in[size:]
	}
	for i, p := range priors {
		// A choice is named by its prior's key, not its place in the
		// list: the plan's address keeps it, and by place a plan of the
		// agreed prior kept (a bookmark, a link sent to a colleague, the
		// browser's history) became a plan of another prior once one
		// more expert had answered.
		v.Plan.Choices = append(v.Plan.Choices, priorChoice{Value: p.Key, Label: p.Name, InSentence: priorInSentence(p.Name, experts[p.Name]),
			Prior: p.Prior, Caveat: caveats[i]})
		if caveats[i] != "" {
			v.Caveats = append(v.Caveats, caveats[i])
		}
	}
	if len(priors) == 0 {
		return v
	}
	v.Plan.Default = defaultChoice(v.Plan.Choices, d.Weights.Scheme)
	if v.Update != nil {
		label := "Posterior after the recorded data"
		v.Plan.Choices = append(v.Plan.Choices, priorChoice{Value: "posterior", Label: label, InSentence: priorInSentence(label, false),
			Prior: v.Update.Posterior, AfterData: true})
	}
	v.Plan = planStudy(ctx, v.Plan)
	if v.Plan.Ran {
		// A typical outcome of the planned study under the prior it is
		// planned under: the median of that prior's predictive.
		if outcomes, err := elicit.PlannedOutcomes(v.Plan.Chosen.Prior, v.Plan.Trials); err == nil {
			v.PlannedOutcome = outcomes[1]
			s, n := outcomes[1], v.Plan.Trials
			if v.Plan.Chosen.AfterData {
				// Planned under what the data taught: each prior learns
				// from the recorded data and the follow-up together.
				s, n = s+v.Update.Successes, n+v.Update.Trials
			}
			v.Planned, v.PlannedOmitted = compareWhy(withReference(priors), s, n, "planned")
		}
	}
	if v.Update != nil {
		v.Observed, v.ObservedOmitted = compareWhy(withReference(priors), v.Update.Successes, v.Update.Trials, "observed")
	}
	return v
}

// referenceName names the uniform prior in the comparison of priors.
const referenceName = "Uniform, for reference (no judgement)"

// withReference is the priors compared with, last, the uniform Beta(1, 1):
// the posterior the data alone give, which carries no one's judgement.
// Beside it a lead sees how far the panel's judgement moves the
// conclusion, the first question of a review of an elicited prior. It is
// a row of the comparison, not a prior to plan a study under.
//
// Where a prior compared is itself the uniform (an agreed prior made as
// Beta(1, 1)), no reference row is added: the same posterior stood twice,
// under two names, one of them saying it carried no judgement.
func withReference(priors []elicit.NamedPrior) []elicit.NamedPrior {
	if uniformAmong(priors) != "" {
		return priors
	}
	out := append([]elicit.NamedPrior(nil), priors...)
	return append(out, elicit.NamedPrior{Name: referenceName, Prior: elicit.Uniform(), Key: "uniform"})
}

// uniformAmong is the name of the first of priors that is the uniform
// Beta(1, 1), or "".
func uniformAmong(priors []elicit.NamedPrior) string {
	for _, p := range priors {
		if p.Prior == elicit.Uniform() {
			return p.Name
		}
	}
	return ""
}

// defaultChoice is the prior a study is planned under unless another is
// asked for: the agreed prior, or without one the pool under the weights
// in force. It was the last choice, which without an agreed prior is the
// performance-weight pool even when it is only suggested: a question
// with equal weights in force was planned, unasked, under performance
// weights that put all the weight on one expert. Where the pool in force
// does not form (custom weights that weigh only experts who have left),
// the equal-weight pool: the last choice was again the performance pool
// only suggested.
func defaultChoice(choices []priorChoice, inForce workshop.WeightScheme) string {
	want := map[workshop.WeightScheme]string{workshop.WeightsEqual: "pool-equal", workshop.WeightsCustom: "pool-custom",
		workshop.WeightsPerformance: "pool-performance"}[inForce]
	for _, key := range []string{"agreed", want, "pool-equal"} {
		for _, c := range choices {
			if c.Value == key {
				return key
			}
		}
	}
	return choices[len(choices)-1].Value
}

// performanceWeights are the performance weights to compare under: those
// in force, or else the ones the calibration page would offer (Cooke's
// classical model with its cut-off optimised, workshop.ScorePerformance);
// nil when the calibration questions cannot be scored yet.
func performanceWeights(d workshopData) *workshop.Weights {
	if d.Weights.Scheme == workshop.WeightsPerformance {
		w := d.Weights
		return &w
	}
	set := workshop.NewCalibrationSet(d.Questions, d.Experts, d.Revisions, false)
	if !set.Ready() {
		return nil
	}
	p, err := workshop.ScorePerformance(set, nil)
	if err != nil {
		return nil
	}
	return &workshop.Weights{WorkshopID: d.Workshop.ID, Scheme: workshop.WeightsPerformance, ByExpert: p.WeightsByExpert()}
}

// updatePicture overlays the agreed prior, the likelihood of the data
// scaled to a density (Beta(s + 1, n − s + 1), the posterior under a
// uniform prior) and the posterior.
func updatePicture(q workshop.Question, u workshop.Update) chart.PanelView {
	lik := elicit.Beta{Alpha: float64(u.Successes) + 1, Beta: float64(u.Trials-u.Successes) + 1}
	return chart.PanelView{ID: "update-q" + strconv.FormatInt(q.ID, 10), Quantity: q.Quantity, Units: q.Units, Lower: 0, Upper: 1,
		Curves: []chart.Curve{
			{Label: "Agreed prior", Role: chart.RoleAgreed, Dist: elicit.Unit(u.Prior)},
			{Label: "Likelihood of the data, scaled", Role: chart.RoleLikelihood, Dist: elicit.Unit(lik)},
			{Label: "Posterior", Role: chart.RolePosterior, Dist: elicit.Unit(u.Posterior)},
		}}
}

// compareWhy is compare, or, when the priors cannot all be updated with
// the data, nil and why, in words: the planned study's comparison was
// left out without a word when the recorded data and the planned trials
// together passed the trials an update takes.
func compareWhy(priors []elicit.NamedPrior, s, n int, id string) (*sensitivityBlock, string) {
	b, err := compare(priors, s, n, id)
	if err == nil {
		return b, ""
	}
	var ie *elicit.InputError
	switch {
	case errors.As(err, &ie) && ie.Field == "trials" && ie.Rule == elicit.RuleCountRange:
		return nil, fmt.Sprintf("Not worked out: %s in all, more than the %d trials an update takes.", successesIn(s, n), elicit.MaxUpdateTrials)
	case errors.As(err, &ie) && ie.Rule == elicit.RulePosteriorRange:
		return nil, "Not worked out: after " + successesIn(s, n) + " a prior's posterior would have α or β above 1e7, beyond what Parley computes accurately."
	}
	return nil, "Not worked out: " + err.Error()
}

// compare is the posterior under every prior for s successes in n trials.
func compare(priors []elicit.NamedPrior, s, n int, id string) (*sensitivityBlock, error) {
	rows, err := elicit.Sensitivity(priors, s, n, workshop.UpdateLevel)
	if err != nil {
		return nil, err
	}
	b := &sensitivityBlock{Successes: s, Trials: n, Rows: rows,
		Picture: chart.IntervalsView{ID: "compare-" + id, XTitle: "posterior proportion",
			Interval: chart.FormatPercent(workshop.UpdateLevel) + " equal-tailed interval",
			Title:    "Posterior under each prior after " + successesIn(s, n)}}
	for _, r := range rows {
		b.Picture.Rows = append(b.Picture.Rows, chart.IntervalRow{Label: r.Name, Mean: r.Mean, Lo: r.Interval[0], Hi: r.Interval[1],
			Emphasis: r.Name == "Agreed prior"})
		if note := elicit.HDINote(r.Posterior, r.HDI[0], r.HDI[1], "the posterior"); note != "" {
			b.Notes = append(b.Notes, r.Name+": "+note+".")
		}
	}
	return b, nil
}

// ruleNumberedPrior is broken by a plan's address that names its prior
// by a number, as addresses did when the priors were numbered by their
// place in the list: that place may hold another prior now (an expert who
// answers since moves the pools down), so the plan is not drawn under a
// guess.
const ruleNumberedPrior elicit.Rule = "the address names the prior by its place in the list, as an earlier version of Parley did; that place may now hold another prior, so choose it again from the list"

// numberedPrior reports whether a prior's key is a bare number: no key
// today is (they are expert-N, pool-…, agreed, posterior).
func numberedPrior(v string) bool {
	v = strings.TrimSpace(v)
	if v == "" {
		return false
	}
	for _, r := range v {
		if r < '0' || r > '9' {
			return false
		}
	}
	return true
}

// planStudy reads the planning form (defaults when it is empty) and
// computes the plan by the functions `parley plan` calls: the prior
// predictive (elicit.PriorPredictive, PredictiveMoments,
// PredictiveQuantile), the prior's worth (elicit.Worth), the assurance
// and its curve over elicit.PlanGrid(trials, 40) (elicit.Assurance,
// AssuranceCurve), and the sample size (elicit.SampleSize) with the
// criterion at the planned trials (elicit.CriterionValue).
func planStudy(ctx context.Context, p planView) planView {
	f := p.Form
	if f.Value("trials") == "" && len(f.Values) == 0 {
		f.Values.Set("trials", strconv.Itoa(defaultPlanTrials))
	}
	for name, def := range map[string]string{"criterion": string(elicit.CriterionALC),
		"interval": string(elicit.IntervalEqual), "direction": string(elicit.DirectionBelow), "prior": p.Default} {
		if f.Value(name) == "" {
			f.Values.Set(name, def)
		}
	}
	values := make([]string, len(p.Choices))
	for i, c := range p.Choices {
		values[i] = c.Value
	}
	if v := strings.TrimSpace(f.Value("prior")); numberedPrior(v) && !slices.Contains(values, v) {
		// An address made before priors were named by key: its number was
		// a place in the list, which may now hold another prior.
		f.set("prior", string(ruleNumberedPrior))
	}
	chosen := f.Choice("prior", "", values...)
	for _, c := range p.Choices {
		if c.Value == chosen {
			p.Chosen = c
		}
	}
	// The analysis prior: the one planned under unless another is asked
	// for, the uniform or any prior the study could be planned under.
	analyses := analysisChoices(p.Choices)
	names := []string{""}
	for _, c := range analyses {
		names = append(names, c.Value)
	}
	names = append(names, ownAnalysis)
	analysis := f.Choice("analysis", "", names...)
	for _, c := range analyses {
		// The prior planned under, chosen again, plays both parts.
		if c.Value == analysis && c.Value != p.Chosen.Value {
			p.Analysis = c
		}
	}
	// A Beta of the lead's own (a sceptical prior, say): its α and β are
	// read only when it is chosen, and refused when given without it, as
	// a worst outcome's trim is without its criterion.
	own := strings.TrimSpace(f.Value("analysis_alpha")) != "" || strings.TrimSpace(f.Value("analysis_beta")) != ""
	switch {
	case analysis == ownAnalysis:
		b := elicit.Beta{Alpha: f.Float("analysis_alpha"), Beta: f.Float("analysis_beta")}
		if f.fieldsOK("analysis_alpha", "analysis_beta") {
			f.Fail(b.Validate(), map[string]string{"alpha": "analysis_alpha", "beta": "analysis_beta"})
		}
		p.Analysis = priorChoice{Value: ownAnalysis, Label: "A Beta of your own", InSentence: "your own analysis prior", Prior: b}
	case own:
		for _, name := range []string{"analysis_alpha", "analysis_beta"} {
			if strings.TrimSpace(f.Value(name)) != "" {
				f.set(name, "applies only to a Beta of your own: choose it under “Analysed under”, or leave this empty")
			}
		}
	}
	p.Trials = f.Int("trials", 1, elicit.MaxPredictiveTrials)
	if f.Value("threshold") != "" || f.Value("confidence") != "" {
		// One of the pair alone: say what it is required with, since
		// the form invites leaving the criterion empty.
		for _, pair := range [][2]string{{"threshold", "confidence"}, {"confidence", "threshold"}} {
			if strings.TrimSpace(f.Value(pair[0])) == "" {
				f.set(pair[0], "is required with a "+pair[1]+" (leave both empty to skip the assurance)")
			}
		}
		g := elicit.SuccessCriterion{
			Threshold:  fractionOf(f, "threshold"),
			Direction:  elicit.Direction(f.Choice("direction", "", string(elicit.DirectionBelow), string(elicit.DirectionAbove))),
			Confidence: fractionOf(f, "confidence"),
		}
		// Checked whatever else is wrong, so that every mistake is marked
		// at once: a threshold of 1.5 was marked only once the missing
		// trials were put right.
		if f.fieldsOK("threshold", "confidence", "direction") {
			f.Fail(g.Validate(), nil)
		}
		p.Goal = &g
	}
	// As on the command line (elicit.CheckSizeSettings): a level or a
	// worst outcome's trim belongs to a sample size, which needs its
	// interval's length. (The criterion and interval are choices the form
	// always sends, so they cannot be told apart from their defaults.)
	var sizeSettings []string
	for _, name := range []string{"level", "woc_trim"} {
		if strings.TrimSpace(f.Value(name)) != "" {
			sizeSettings = append(sizeSettings, name)
		}
	}
	f.Fail(elicit.CheckSizeSettings(strings.TrimSpace(f.Value("length")) != "", sizeSettings...), nil)
	if strings.TrimSpace(f.Value("length")) != "" {
		// The level left empty is planned at defaultPlanLevel but stays
		// empty in the form served back, so that clearing the length
		// next plans without a sample size instead of being refused.
		level := defaultPlanLevel
		if strings.TrimSpace(f.Value("level")) != "" {
			level = fractionOf(f, "level")
		}
		g := elicit.SampleSizeGoal{
			Length:    fractionOf(f, "length"),
			Level:     level,
			Criterion: elicit.Criterion(f.Choice("criterion", "", string(elicit.CriterionALC), string(elicit.CriterionACC), string(elicit.CriterionWOC))),
			Interval:  elicit.IntervalKind(f.Choice("interval", "", string(elicit.IntervalEqual), string(elicit.IntervalHPD))),
		}
		if strings.TrimSpace(f.Value("woc_trim")) != "" {
			g.Trim = fractionOf(f, "woc_trim")
		}
		if f.fieldsOK("length", "level", "criterion", "interval", "woc_trim") {
			f.Fail(g.Validate(), map[string]string{"trim": "woc_trim"})
		}
		p.Size = &g
	}
	if !f.OK() {
		return p
	}
	prior := p.Chosen.Prior
	pmf, err := elicit.PriorPredictive(prior, p.Trials)
	if err != nil {
		f.Fail(err, nil)
		return p
	}
	p.PMF, p.Worth = pmf, elicit.Worth(prior)
	p.Share = p.Worth.DataShare(p.Trials)
	p.PredMean, p.PredSD = elicit.PredictiveMoments(prior, p.Trials)
	p.PredQ = [3]int{elicit.PredictiveQuantile(pmf, 0.05), elicit.PredictiveQuantile(pmf, 0.5), elicit.PredictiveQuantile(pmf, 0.95)}
	p.PredPic = chart.PredictiveView{ID: "predictive", Trials: p.Trials, PMF: pmf, FollowUp: p.Chosen.AfterData}
	judged := prior
	if p.Analysis.Value != "" {
		judged = p.Analysis.Prior
	}
	if p.Goal != nil {
		a, err := elicit.AssuranceUnder(prior, judged, p.Trials, *p.Goal)
		if err != nil {
			f.Fail(err, nil)
			return p
		}
		curve, err := elicit.AssuranceCurveUnder(prior, judged, *p.Goal, elicit.PlanGrid(p.Trials, planCurvePoints))
		if err != nil {
			f.Fail(err, nil)
			return p
		}
		p.Assure, p.Curve = &a, curve
		p.PredPic.Success, p.PredPic.SuccessFrom, p.PredPic.SuccessTo = true, a.SuccessFrom, a.SuccessTo
		p.CurvePic = chart.AssuranceView{ID: "assurance", Planned: p.Trials, FollowUp: p.Chosen.AfterData}
		for _, c := range curve {
			p.CurvePic.Trials = append(p.CurvePic.Trials, c.Trials)
			p.CurvePic.Assurance = append(p.CurvePic.Assurance, c.Assurance)
		}
	}
	if p.Size != nil {
		res, err := sampleSizes.GetErr(sizeKey{prior, judged, *p.Size}, func() (elicit.SampleSizeResult, error) {
			// Other views may wait on this search: it runs to its own
			// deadline even if this view's client goes away.
			sctx, cancel := context.WithTimeout(context.WithoutCancel(ctx), sampleSizeTime)
			defer cancel()
			return elicit.SampleSizeUnder(sctx, prior, judged, *p.Size)
		})
		switch {
		case errors.Is(err, context.DeadlineExceeded):
			f.set("length", fmt.Sprintf("the search for the sample size took longer than %s; ask for a wider interval, or use parley plan on the command line", sampleSizeTime))
		case err != nil:
			f.Fail(err, nil)
		default:
			p.SizeRes = &res
			if p.Trials <= elicit.MaxSampleSize {
				if at, err := elicit.CriterionValueUnder(prior, judged, *p.Size, p.Trials); err == nil {
					p.SizeAt = &at
				}
			}
		}
	}
	p.Ran = true
	return p
}

// uniformAnalysis is the analysis prior that carries no judgement, the
// usual choice where those who judge the study ask that the panel's
// judgement not enter its conclusion.
var uniformAnalysis = priorChoice{Value: "uniform", Label: "Uniform", InSentence: "the uniform prior (no judgement)", Prior: elicit.Uniform()}

// ownAnalysis is the "Analysed under" choice of a Beta of the lead's
// own, its α and β typed in analysis_alpha and analysis_beta.
const ownAnalysis = "own"

// analysisChoices are the priors success can be judged under: the uniform
// first, then every prior the study can be planned under. An analysis
// prior is the study's own, so a choice that is itself the uniform stands
// once, as that choice.
func analysisChoices(plan []priorChoice) []priorChoice {
	out := []priorChoice{uniformAnalysis}
	for _, c := range plan {
		if c.Prior == elicit.Uniform() {
			out[0] = c
			continue
		}
		out = append(out, c)
	}
	return out
}

// judgedWords, after the success criterion's or the sample size's goal,
// name the analysis prior the posterior is taken under, and where the
// outcomes' chances come from; "" when one prior plays both parts.
func judgedWords(p planView) string {
	if p.Analysis.Value == "" {
		return ""
	}
	return ", the posterior taken under " + analysisWords(p)
}

// analysisWords name the analysis prior, what it is, and the prior that
// gives each outcome's chance.
func analysisWords(p planView) string {
	return p.Analysis.InSentence + ", " + betaText(p.Analysis.Prior) +
		", the prior the study's analysis will use; each outcome's chance comes from " + p.Chosen.InSentence
}

// sizeJudgedWords say, as a sentence, whose posterior the sample size's
// intervals are of and where the outcomes' chances come from.
func sizeJudgedWords(p planView) string {
	return "The intervals are of the posterior under " + analysisWords(p) + "."
}

// aloneWords name the prior whose own interval is the criterion with no
// data: the analysis prior where one is chosen.
func aloneWords(p planView) string {
	if p.Analysis.Value == "" {
		return "The prior alone"
	}
	return "The analysis prior alone"
}

// recordData adds one batch of observed data to the question's agreed
// prior: successes, trials, where they come from and the day observed,
// each by the input rules; the store adds it with its event, append-only.
func (s *Server) recordData(w http.ResponseWriter, r *http.Request) {
	ws, q, ok := s.loadWorkshopQuestion(w, r)
	if !ok || !parseForm(w, r) {
		return
	}
	f := newForm(r.PostForm)
	b := workshop.StudyData{QuestionID: q.ID,
		Successes: f.Int("successes", 0, elicit.MaxUpdateTrials),
		Trials:    f.Int("trials", 1, elicit.MaxUpdateTrials),
		Source:    f.Text("source", input.MaxShortText, true),
	}
	date, err := input.Date("observed_on", f.Value("observed_on"))
	f.failField("observed_on", err)
	b.ObservedOn = date
	if !q.IsProportion() {
		f.set("", "Binomial data update a proportion on [0, 1]; this question's bounds are other, so no data can be recorded against it.")
	}
	if f.OK() {
		f.Fail(b.Validate(), nil)
	}
	if f.OK() {
		err := s.store.RecordData(r.Context(), &b)
		switch {
		case err == nil:
			http.Redirect(w, r, studyPath(ws.ID, q.ID)+"#update", http.StatusSeeOther)
			return
		case errors.Is(err, workshop.ErrNoAgreedPrior):
			f.set("", "This question has no agreed prior yet: record one on the question's page first, then the data that update it.")
		case s.notSaved(r, f, err):
		case isInputError(err):
			f.Fail(err, nil)
		default:
			s.fail(w, r, err)
			return
		}
	}
	r.URL.RawQuery = ""
	s.showStudy(w, r, ws, q, f)
}

// predictiveRow is one row of the predictive table.
type predictiveRow struct{ X, P, Cum string }

// predictiveRows lists the outcomes with predictive probability of at
// least chart.PredictiveListed (1e-4; the picture draws them all), with
// their cumulative probability; beyond 60 such outcomes
// every k-th is kept (evenly thinned, so the table spans the same range
// with at most 60 rows; `parley plan --format json` lists them all).
func predictiveRows(pmf []float64) []predictiveRow {
	var rows []predictiveRow
	cdf := elicit.PredictiveCDF(pmf)
	for x, p := range pmf {
		if p >= chart.PredictiveListed {
			rows = append(rows, predictiveRow{strconv.Itoa(x), chart.FormatProbability(p), chart.FormatProbability(min(cdf[x], 1))})
		}
	}
	if len(rows) > 60 {
		step := (len(rows) + 59) / 60
		var thin []predictiveRow
		for i := 0; i < len(rows); i += step {
			thin = append(thin, rows[i])
		}
		rows = thin
	}
	return rows
}

// thinCurve keeps about ten points of the assurance curve for its table,
// always the last (the planned trials).
func thinCurve(c []elicit.AssuranceResult) []elicit.AssuranceResult {
	if len(c) <= 10 {
		return c
	}
	step := len(c) / 10
	var out []elicit.AssuranceResult
	for i := step - 1; i < len(c); i += step {
		out = append(out, c[i])
	}
	if out[len(out)-1].Trials != c[len(c)-1].Trials {
		out = append(out, c[len(c)-1])
	}
	return out
}

// recordedData is the study data already recorded against a question's
// agreed prior, all batches together.
type recordedData struct{ Successes, Trials, Batches int }

// recordedFor reads the study data recorded for question q of workshop
// ws: a form that records a new agreed prior says that the study page
// will update it with them.
func (s *Server) recordedFor(ctx context.Context, ws workshop.Workshop, q workshop.Question) (recordedData, error) {
	if !q.IsProportion() {
		return recordedData{}, nil
	}
	data, err := s.store.StudyData(ctx, ws.ID)
	if err != nil {
		return recordedData{}, err
	}
	var d recordedData
	d.Successes, d.Trials, d.Batches = workshop.DataTotals(data, q.ID)
	return d, nil
}

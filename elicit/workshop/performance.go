package workshop

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"sort"
	"strconv"

	"github.com/parley-elicit/parley/elicit"
)

// CalibrationSet is the classical model's input drawn from one workshop's
// stored state: every active expert's current (latest) answer to each
// calibration question that can be scored. A question can be scored when
// it asks for quantiles at the set's probabilities and its true value is
// known; the set's probabilities are those asked by the most calibration
// questions (the earliest such question breaks a tie).
type CalibrationSet struct {
	Probs []float64
	// Questions are the scored calibration questions in workshop order.
	Questions []Question
	// Pending are quantile calibration questions at Probs that still lack
	// a true value (or, when only revealed values count, a revealed one).
	Pending []Question
	// Skipped are calibration questions that cannot be scored, with why.
	Skipped []SkippedQuestion
	// Answered lists, per calibration question ID, the active experts with
	// a current answer, in roster order.
	Answered map[int64][]Expert
	// Experts are the active experts, in roster order.
	Experts []Expert

	Assessments []elicit.SeedAssessment
	// RevisionIDs[i] is the revision whose answer Assessments[i] scores.
	RevisionIDs  []int64
	Realisations map[string]float64
	Bounds       map[string][2]float64
	// LogScale names the scored questions on the log scale
	// (Question.LogScale), by SeedQuestionKey.
	LogScale map[string]bool
}

// SkippedQuestion is a calibration question left out of the scoring.
type SkippedQuestion struct {
	Question Question `json:"-"`
	ID       int64    `json:"question_id"`
	Reason   string   `json:"reason"`
}

// Ready reports whether the set can be scored: some question is scored,
// none is pending, and someone answered.
func (c CalibrationSet) Ready() bool {
	return len(c.Questions) > 0 && len(c.Pending) == 0 && len(c.Assessments) > 0
}

// SeedExpertKey and SeedQuestionKey name an expert and a question in the
// classical model's input, which identifies both by string.
func SeedExpertKey(id int64) string   { return "e" + strconv.FormatInt(id, 10) }
func SeedQuestionKey(id int64) string { return "q" + strconv.FormatInt(id, 10) }

// answersAtReveal are the answers the scores use (Current): each
// expert's latest revision, except that on a calibration question whose
// true value has been revealed it is the latest saved by the reveal (ID
// at most RevealedThrough), so that nothing saved after the truth was
// shown can earn weight.
func answersAtReveal(questions []Question, revisions []Revision) map[Key]Revision {
	through := map[int64]int64{}
	for _, q := range questions {
		if q.Frozen() && q.RevealedThrough > 0 {
			through[q.ID] = q.RevealedThrough
		}
	}
	return Current(revisions, func(rv Revision) bool {
		t, frozen := through[rv.QuestionID]
		return !frozen || rv.ID <= t
	})
}

// AnswersRule says which answers the classical model scores; the record
// states it beside the scores.
const AnswersRule = "each active expert's latest answer to each calibration question; once a question's true value " +
	"has been revealed its answers are frozen, and the answer scored is the one that stood at the reveal"

// NewCalibrationSet gathers the classical model's input from a workshop's
// questions, experts and revisions (oldest first): the answers of
// AnswersRule. Revoked experts are left out, as they are from the pool, and
// retired questions are skipped. With revealedOnly, a true value counts
// only once revealed, so a record never scores against a hidden truth.
func NewCalibrationSet(questions []Question, experts []Expert, revisions []Revision, revealedOnly bool) CalibrationSet {
	set := CalibrationSet{Answered: map[int64][]Expert{}, Realisations: map[string]float64{}, Bounds: map[string][2]float64{}, LogScale: map[string]bool{}}
	for _, e := range experts {
		if !e.Revoked {
			set.Experts = append(set.Experts, e)
		}
	}
	qs := append([]Question(nil), questions...)
	sort.SliceStable(qs, func(i, j int) bool { return qs[i].Position < qs[j].Position })
	set.Probs = commonProbs(qs)
	latest := answersAtReveal(qs, revisions)
	for _, q := range qs {
		if !q.Calibration {
			continue
		}
		if q.Retired {
			set.skip(q, "retired by the facilitator")
			continue
		}
		for _, e := range set.Experts {
			if _, ok := latest[Key{q.ID, e.ID}]; ok {
				set.Answered[q.ID] = append(set.Answered[q.ID], e)
			}
		}
		switch {
		case q.Format != FormatQuantiles:
			set.skip(q, "asked as "+formatName(q.Format)+"; the classical model scores answers given as quantiles")
			continue
		case !slices.Equal(q.Probs, set.Probs):
			set.skip(q, "asked at "+ProbsLabel(q.Probs)+"; the scored questions ask at "+ProbsLabel(set.Probs))
			continue
		case q.TrueValue == nil || (revealedOnly && !q.Revealed):
			set.Pending = append(set.Pending, q)
			continue
		case len(set.Answered[q.ID]) == 0:
			set.skip(q, "no active expert has answered it")
			continue
		}
		key := SeedQuestionKey(q.ID)
		set.Questions = append(set.Questions, q)
		set.Realisations[key] = *q.TrueValue
		set.Bounds[key] = [2]float64{q.Lower, q.Upper}
		if q.LogScale {
			set.LogScale[key] = true
		}
		for _, e := range set.Answered[q.ID] {
			rv := latest[Key{q.ID, e.ID}]
			set.Assessments = append(set.Assessments, elicit.SeedAssessment{
				Expert: SeedExpertKey(e.ID), Question: key,
				Probs: q.Probs, Quantiles: append([]float64(nil), rv.Answer.Values...),
			})
			set.RevisionIDs = append(set.RevisionIDs, rv.ID)
		}
	}
	return set
}

func (c *CalibrationSet) skip(q Question, why string) {
	c.Skipped = append(c.Skipped, SkippedQuestion{Question: q, ID: q.ID, Reason: why})
}

// commonProbs is the probability set asked by the most quantile
// calibration questions; qs is in workshop order, so the earliest wins a
// tie. It is nil when there is no such question.
func commonProbs(qs []Question) []float64 {
	var best []float64
	bestN := 0
	for i, q := range qs {
		if !q.Calibration || q.Retired || q.Format != FormatQuantiles {
			continue
		}
		n := 0
		for _, o := range qs[i:] {
			if o.Calibration && !o.Retired && o.Format == FormatQuantiles && slices.Equal(o.Probs, q.Probs) {
				n++
			}
		}
		if n > bestN {
			best, bestN = q.Probs, n
		}
	}
	return best
}

func formatName(f AnswerFormat) string {
	switch f {
	case FormatInterval:
		return "a four-value interval"
	case FormatChips:
		return "chips in bins"
	}
	return string(f)
}

// Performance is the record's account of performance weighting by Cooke's
// classical model (see elicit.ClassicalModel): each expert's scores and weight on
// the calibration questions, the cut-off α, the performance-weighted
// pool's scores and the robustness of the weights.
type Performance struct {
	// Alpha is the calibration cut-off; AlphaRule says whether it was
	// chosen to maximise the performance-weighted pool's combined score
	// ("optimised") or set by the facilitator ("fixed").
	Alpha     float64 `json:"alpha"`
	AlphaRule string  `json:"alpha_rule"`
	// LogAlpha is ln α when α is a calibration score below the smallest
	// double, so that Alpha reads 0 (elicit.Scores).
	LogAlpha *float64  `json:"log_alpha,omitempty"`
	Probs    []float64 `json:"probs"`
	// Questions are the IDs of the scored calibration questions.
	Questions []int64           `json:"calibration_questions"`
	Skipped   []SkippedQuestion `json:"skipped"`
	// Answers states which answers were scored (AnswersRule).
	Answers string              `json:"answers"`
	Experts []PerformanceExpert `json:"experts"`
	Pooled  elicit.PooledScore  `json:"pooled"`
	// Warnings say where the weighting rests on weak ground
	// (CalibrationWarnings).
	Warnings []elicit.Warning `json:"warnings"`
	// InForce reports whether the workshop's current pool weights are
	// these performance weights.
	InForce bool `json:"in_force"`
	// Robustness is set in a record (see PerformanceRobustness).
	Robustness *Robustness `json:"robustness,omitempty"`
}

// The rules by which a cut-off was chosen.
const (
	AlphaOptimised = "optimised"
	AlphaFixed     = "fixed"
)

// PerformanceExpert is one active expert's scores and weight. An expert
// who answered no scored question has Answered 0 and weight 0.
type PerformanceExpert struct {
	ExpertID    int64   `json:"expert_id"`
	Name        string  `json:"name"`
	Answered    int     `json:"answered"`
	Calibration float64 `json:"calibration"`
	// LogCalibration is ln Calibration (elicit.ExpertScore), which holds
	// the score where it is below the smallest double and Calibration
	// reads 0; absent from older records.
	LogCalibration float64 `json:"log_calibration,omitempty"`
	Information    float64 `json:"information"`
	Combined       float64 `json:"combined"`
	Weight         float64 `json:"weight"`
}

// ScorePerformance runs elicit.ClassicalModel on set with the cut-off alpha (nil:
// optimised) and returns the scores by expert. The set must be Ready.
func ScorePerformance(set CalibrationSet, alpha *float64) (Performance, error) {
	if !set.Ready() {
		return Performance{}, inputErr("calibration_questions", elicit.RuleRequired,
			"scoring needs answered calibration questions, each with its true value")
	}
	sc, err := elicit.ClassicalModel(set.Assessments, set.Realisations, set.Bounds, elicit.ModelOptions{Alpha: alpha, Overshoot: elicit.DefaultOvershoot, LogScale: set.LogScale})
	if err != nil {
		return Performance{}, set.placeError(err)
	}
	p := Performance{Alpha: sc.Alpha, LogAlpha: sc.LogAlpha, AlphaRule: AlphaOptimised, Probs: set.Probs, Skipped: set.Skipped,
		Questions: make([]int64, len(set.Questions)), Pooled: sc.Pooled, Answers: AnswersRule}
	if alpha != nil {
		p.AlphaRule = AlphaFixed
	}
	if p.Skipped == nil {
		p.Skipped = []SkippedQuestion{}
	}
	for i, q := range set.Questions {
		p.Questions[i] = q.ID
	}
	byKey := map[string]elicit.ExpertScore{}
	for _, es := range sc.Experts {
		byKey[es.Expert] = es
	}
	for _, e := range set.Experts {
		es := byKey[SeedExpertKey(e.ID)]
		p.Experts = append(p.Experts, PerformanceExpert{
			ExpertID: e.ID, Name: e.Name, Answered: es.N,
			Calibration: es.Calibration, LogCalibration: es.LogCalibration, Information: es.Information, Combined: es.Combined, Weight: es.Weight,
		})
	}
	p.Warnings = CalibrationWarnings(len(p.Questions), p.Experts)
	return p, nil
}

// WeightsByExpert are the performance weights by expert ID, for
// Weights.ByExpert and for pools.
func (p Performance) WeightsByExpert() map[int64]float64 {
	m := make(map[int64]float64, len(p.Experts))
	for _, e := range p.Experts {
		m[e.ExpertID] = e.Weight
	}
	return m
}

// matches reports whether saved weights w, normalised over p's experts,
// equal p's weights to 1e-9.
func (p Performance) matches(w Weights) bool {
	if w.Scheme != WeightsPerformance {
		return false
	}
	total := 0.0
	for _, e := range p.Experts {
		total += w.ByExpert[e.ExpertID]
	}
	if !(total > 0) {
		return false
	}
	for _, e := range p.Experts {
		if math.Abs(w.ByExpert[e.ExpertID]/total-e.Weight) > 1e-9 {
			return false
		}
	}
	return true
}

// PerformanceInForce scores set and, when the workshop's weights w are
// performance weights, finds the cut-off that reproduces them. When their
// basis says the facilitator fixed a cut-off and it still gives these
// weights, it is that cut-off as typed (a fixed 0.03 below every score
// stays 0.03, not the 0 that gives the same weights). Otherwise it is the
// smallest that does: weights change only where α passes an expert's
// calibration score, so the candidates are 0 and those scores, and any α
// the facilitator fixed gives the weights of one of them. Without such
// weights, or when the answers have changed since they were set, the
// cut-off is the optimised one and InForce is false.
func PerformanceInForce(set CalibrationSet, w Weights) (Performance, error) {
	opt, err := ScorePerformance(set, nil)
	if err != nil {
		return Performance{}, err
	}
	if w.Scheme != WeightsPerformance {
		return opt, nil
	}
	if b := w.Basis; b != nil && b.AlphaRule == AlphaFixed {
		a := b.Alpha
		if p, err := ScorePerformance(set, &a); err == nil && p.matches(w) {
			p.InForce = true
			return p, nil
		}
	}
	if opt.matches(w) {
		opt.InForce = true
		return opt, nil
	}
	cands := []float64{0}
	for _, e := range opt.Experts {
		if e.Combined > 0 {
			cands = append(cands, e.Calibration)
		}
	}
	sort.Float64s(cands)
	for _, c := range cands {
		c := c
		p, err := ScorePerformance(set, &c)
		if err == nil && p.matches(w) {
			p.InForce = true
			return p, nil
		}
	}
	return opt, nil
}

// Percentiles are a distribution's 5th, 50th and 95th percentiles.
type Percentiles struct {
	P05 float64 `json:"p05"`
	P50 float64 `json:"p50"`
	P95 float64 `json:"p95"`
}

// ExpertWeight is one expert's normalised weight in a pool.
type ExpertWeight struct {
	ExpertID int64   `json:"expert_id"`
	Weight   float64 `json:"weight"`
}

// PoolSummary is a linear opinion pool's weights, mean, SD and 5/50/95
// percentiles.
type PoolSummary struct {
	Weights     []ExpertWeight `json:"weights"` // normalised over the pooled experts
	Mean        float64        `json:"mean"`
	SD          float64        `json:"sd"`
	Percentiles Percentiles    `json:"percentiles"`
}

// PoolComparison sets a target question's equal-weight pool beside its
// performance-weight pool, both elicit.LinearPool over the active experts'
// current fitted Betas.
type PoolComparison struct {
	Question         Question     `json:"-"`
	QuestionID       int64        `json:"question_id"`
	Equal            *PoolSummary `json:"equal,omitempty"`
	EqualError       string       `json:"equal_error,omitempty"`
	Performance      *PoolSummary `json:"performance,omitempty"`
	PerformanceError string       `json:"performance_error,omitempty"`
}

// targetFits are the active experts' current fitted Betas on one target
// question.
type targetFits struct {
	q     Question
	dists []elicit.ScaledBeta
	ids   []int64
}

// fitTargets fits every active expert's current answer to each target
// (non-calibration) question, in workshop order, by the members of
// PanelState.
func fitTargets(questions []Question, experts []Expert, revisions []Revision) []targetFits {
	qs := append([]Question(nil), questions...)
	sort.SliceStable(qs, func(i, j int) bool { return qs[i].Position < qs[j].Position })
	var out []targetFits
	for _, q := range qs {
		if q.Calibration || q.Retired {
			continue
		}
		t := targetFits{q: q}
		for _, m := range members(PanelInput{Question: q, Experts: experts, Revisions: revisions}) {
			if m.Fitted() {
				t.dists, t.ids = append(t.dists, m.Fit.Dist), append(t.ids, m.Expert.ID)
			}
		}
		out = append(out, t)
	}
	return out
}

// weightsFor are w's weights for t's experts (equal when w is nil).
func (t targetFits) weightsFor(w map[int64]float64) []float64 {
	out := make([]float64, len(t.ids))
	for i, id := range t.ids {
		if w == nil {
			out[i] = 1
		} else {
			out[i] = w[id]
		}
	}
	return out
}

const noTargetFits = "no active expert has a fitted judgement on this question"

// ComparePools builds a PoolComparison for every target (non-calibration)
// question, in workshop order, with the performance weights by expert ID.
func ComparePools(questions []Question, experts []Expert, revisions []Revision, performance map[int64]float64) []PoolComparison {
	var out []PoolComparison
	for _, t := range fitTargets(questions, experts, revisions) {
		c := PoolComparison{Question: t.q, QuestionID: t.q.ID}
		if len(t.dists) == 0 {
			c.EqualError, c.PerformanceError = noTargetFits, noTargetFits
		} else {
			c.Equal, c.EqualError = summarisePool(t.dists, t.weightsFor(nil), t.ids)
			c.Performance, c.PerformanceError = summarisePool(t.dists, t.weightsFor(performance), t.ids)
		}
		out = append(out, c)
	}
	return out
}

// Robustness is elicit.LeaveOneOut on a workshop's calibration questions, with
// the target questions' current fits as the targets, named by ID.
type Robustness struct {
	// Targets are the IDs of the questions watched: the target questions
	// with a fitted judgement, or the scored calibration questions when
	// there are none.
	Targets []int64 `json:"targets"`
	// Full are the whole panel's performance-weighted pools on the
	// targets, one per target.
	Full []TargetPool    `json:"full"`
	Rows []RobustnessRow `json:"rows"`
	// Largest is the largest Shift of any row.
	Largest float64 `json:"largest"`
}

// TargetPool is the 5th, 50th and 95th percentiles of a pool on one
// watched question.
type TargetPool struct {
	QuestionID  int64       `json:"question_id"`
	Percentiles Percentiles `json:"percentiles"`
}

// RobustnessRow is LeaveOneOutCase with the left-out question or expert
// named by ID. Pools are this rerun's pools on the targets where it has
// one. Shifts[t] is the largest change of the pooled 5th, 50th or 95th
// percentile on Targets[t], as a fraction of the question's range; Shift
// is the largest over targets.
type RobustnessRow struct {
	LeftOut string  `json:"left_out"` // LeaveOutQuestion or LeaveOutExpert
	ID      int64   `json:"id"`
	Label   string  `json:"label"`
	Alpha   float64 `json:"alpha"`
	// LogAlpha is ln α where α is a score below the smallest double
	// (elicit.Scores.LogAlpha); nil otherwise.
	LogAlpha *float64       `json:"log_alpha,omitempty"`
	Weights  []ExpertWeight `json:"weights"`
	Pools    []TargetPool   `json:"pools"`
	Shifts   []float64      `json:"shifts"`
	Shift    float64        `json:"shift"`
	Unpooled []int64        `json:"unpooled,omitempty"`
	Error    string         `json:"error,omitempty"`
}

// PerformanceRobustness runs elicit.LeaveOneOut on set with the cut-off alpha
// (nil: optimised again on each rerun), watching the linear pools of the
// active experts' current fits on the target questions.
func PerformanceRobustness(set CalibrationSet, questions []Question, experts []Expert, revisions []Revision, alpha *float64) (Robustness, error) {
	labels := map[string]string{}
	ids := map[string]int64{}
	for _, q := range questions {
		k := SeedQuestionKey(q.ID)
		labels[k], ids[k] = fmt.Sprintf("Q%d %s", q.Position, q.Quantity), q.ID
	}
	for _, e := range set.Experts {
		k := SeedExpertKey(e.ID)
		labels[k], ids[k] = e.Name, e.ID
	}
	var targets []elicit.RobustnessTarget
	for _, t := range fitTargets(questions, experts, revisions) {
		if len(t.dists) == 0 {
			continue
		}
		rt := elicit.RobustnessTarget{Question: SeedQuestionKey(t.q.ID), Fits: map[string]elicit.ScaledBeta{}}
		for i, id := range t.ids {
			rt.Fits[SeedExpertKey(id)] = t.dists[i]
		}
		targets = append(targets, rt)
	}
	rep, err := elicit.LeaveOneOut(set.Assessments, set.Realisations, set.Bounds, elicit.ModelOptions{Alpha: alpha, LogScale: set.LogScale}, targets)
	if err != nil {
		return Robustness{}, err
	}
	rb := Robustness{Largest: rep.MaxShift, Targets: []int64{}, Full: []TargetPool{}, Rows: []RobustnessRow{}}
	pools := func(qs [][]float64) []TargetPool {
		out := []TargetPool{}
		for t, q := range qs {
			if len(q) == 3 {
				out = append(out, TargetPool{QuestionID: ids[rep.Targets[t]], Percentiles: Percentiles{q[0], q[1], q[2]}})
			}
		}
		return out
	}
	for _, t := range rep.Targets {
		rb.Targets = append(rb.Targets, ids[t])
	}
	rb.Full = pools(rep.Full)
	for _, c := range rep.Cases {
		row := RobustnessRow{LeftOut: c.LeftOut, ID: ids[c.Name], Label: labels[c.Name], Alpha: c.Alpha, LogAlpha: c.LogAlpha,
			Weights: []ExpertWeight{}, Pools: pools(c.Percentiles), Shifts: c.Shifts, Shift: c.Shift, Error: c.Error}
		if row.Shifts == nil {
			row.Shifts = []float64{}
		}
		for _, e := range set.Experts {
			if w, ok := c.Weights[SeedExpertKey(e.ID)]; ok {
				row.Weights = append(row.Weights, ExpertWeight{ExpertID: e.ID, Weight: w})
			}
		}
		for _, u := range c.Unpooled {
			row.Unpooled = append(row.Unpooled, ids[u])
		}
		rb.Rows = append(rb.Rows, row)
	}
	return rb, nil
}

func summarisePool(dists []elicit.ScaledBeta, weights []float64, ids []int64) (*PoolSummary, string) {
	pool, err := elicit.LinearPool(dists, weights)
	var ie *elicit.InputError
	if errors.As(err, &ie) && ie.Rule == elicit.RuleWeightsNotAllZero {
		return nil, "every expert who answered this question has performance weight 0"
	}
	if err != nil {
		return nil, err.Error()
	}
	qs, err := pool.Quantiles([]float64{0.05, 0.5, 0.95})
	if err != nil {
		return nil, err.Error()
	}
	s := &PoolSummary{Mean: pool.Mean(), SD: pool.SD(), Percentiles: Percentiles{qs[0], qs[1], qs[2]}}
	shares := elicit.Shares(weights)
	for i, id := range ids {
		s.Weights = append(s.Weights, ExpertWeight{ExpertID: id, Weight: shares[i]})
	}
	return s, ""
}

package elicit

import (
	"fmt"
	"math"
	"slices"
	"sort"
	"strconv"

	"gonum.org/v1/gonum/stat/distuv"
)

// Rules of the classical model's input.
const (
	RuleSameProbs       Rule = "all assessments must use the same probabilities"
	RuleDuplicate       Rule = "must not repeat"
	RuleUnitInterval    Rule = "must lie in [0, 1]"
	RuleInRange         Rule = "must lie within [lower, upper]"
	RuleAlphaTooHigh    Rule = "must not exceed the highest calibration score of an expert whose information score is above 0"
	RuleNoScoredExperts Rule = "no expert has a calibration × information score above 0"
	// RuleQuantilesTooClose is the calibration quantiles' form of
	// RuleValuesTooClose: without bounds, the gap is measured against
	// the values' own size (MinValueGap).
	RuleQuantilesTooClose Rule = "is too close to the quantile before it to be told apart (they must differ by at least a millionth of the larger one's size)"
	// RuleRangeCollapsed is broken when widening a question's range by
	// the overshoot leaves it, after rounding, no wider than the
	// quantiles and realisation: a quantile on the range's edge gives an
	// infinite information score.
	RuleRangeCollapsed Rule = "the question's range, widened by the overshoot, must strictly contain every quantile and the realisation"
	// RuleLogScalePositive: a question scored against the log-uniform
	// background (ModelOptions.LogScale) has its range built from
	// logarithms, so its quantiles, its realisation and its upper bound
	// must be above 0 (a lower bound of 0 leaves the range uncut below).
	RuleLogScalePositive Rule = "must be above 0 on a question scored on the log scale"
	// RuleLogScaleTooClose: on the log scale a quantile must keep a
	// logarithm of its own, apart from the quantile before it and from
	// the question's bounds; values a double or two apart can share one
	// (ln 1e-300 = ln 1.0000000000000002e-300), which would leave a bin
	// 0 wide on ln x.
	RuleLogScaleTooClose Rule = "is too close to the quantile before it, or to a bound, to be told apart on the log scale"
)

// DefaultOvershoot is the k of the intrinsic range: the range spanned by
// the experts' outer quantiles and the realisation is widened by k times
// its width on each side (Cooke 1991, "Experts in Uncertainty", §12.4).
// 10% is the customary choice in applications (from memory; Cooke &
// Goossens 2008, "TU Delft expert judgment data base", Reliab. Eng. Syst.
// Saf. 93: 657–674, use it throughout).
const DefaultOvershoot = 0.1

// SeedAssessment is one expert's quantiles for one calibration (seed)
// question: P(X ≤ Quantiles[i]) = Probs[i] in the expert's judgement.
type SeedAssessment struct {
	Expert    string    `json:"expert"`
	Question  string    `json:"question"`
	Probs     []float64 `json:"probs"`
	Quantiles []float64 `json:"quantiles"`
}

// Validate checks that the names are given, that Probs pass CheckProbs and
// that there is one finite, strictly increasing quantile per probability.
func (a SeedAssessment) Validate() error {
	if len(a.Probs) == 0 {
		return inputErr("probs", RuleCount, "need at least 1 probability, got 0")
	}
	if err := CheckProbs("probs", a.Probs); err != nil {
		return err
	}
	return a.validateQuantiles()
}

// validateQuantiles checks the names and quantiles of an assessment whose
// probabilities are known to be valid.
func (a SeedAssessment) validateQuantiles() error {
	if a.Expert == "" {
		return inputErr("expert", RuleRequired, "empty name")
	}
	if a.Question == "" {
		return inputErr("question", RuleRequired, "empty name")
	}
	if len(a.Quantiles) != len(a.Probs) {
		return inputErr("quantiles", RuleLengthMatch, "%d probabilities, %d quantiles", len(a.Probs), len(a.Quantiles))
	}
	for i, q := range a.Quantiles {
		if math.IsNaN(q) || math.IsInf(q, 0) {
			return inputErr(fmt.Sprintf("quantiles[%d]", i), RuleFinite, "got %v", q)
		}
		// Ranges are formed from differences of quantiles: beyond
		// ±maxBound they would overflow (issue 11: ±1.7e308 gave
		// "every calibration score is 0").
		if math.Abs(q) > maxBound {
			return inputErr(fmt.Sprintf("quantiles[%d]", i), RuleBoundsRange, "got %v", q)
		}
		if i > 0 && !(q > a.Quantiles[i-1]) {
			return inputErr(fmt.Sprintf("quantiles[%d]", i), RuleValueIncreasing, "%v after %v", q, a.Quantiles[i-1])
		}
	}
	return nil
}

// checkQuantileGaps applies the idea of RuleValuesTooClose to the
// quantiles of a question without bounds, where no distance to a bound
// exists: consecutive quantiles must be at least MinValueGap of the
// larger one's size apart. Quantiles a few ulps apart widen into a range
// that rounds back onto them (review 3: 5, 5.000000000000001,
// 5.000000000000002 scored +Inf and NaN). A question with bounds is
// asked as a judgement on them, and Judgement.Validate has held its
// answers to the bounded rule.
func checkQuantileGaps(field string, qs []float64) error {
	for i := 1; i < len(qs); i++ {
		q, prev := qs[i], qs[i-1]
		if q-prev < MinValueGap*math.Max(math.Abs(q), math.Abs(prev)) {
			return inputErr(fmt.Sprintf("%s[%d]", field, i), RuleQuantilesTooClose, "%v after %v", q, prev)
		}
	}
	return nil
}

// ModelOptions tunes ClassicalModel. The zero value optimises α and uses
// DefaultOvershoot.
type ModelOptions struct {
	// Alpha is a fixed calibration cut-off in [0, 1]; nil chooses the
	// cut-off that maximises the performance-weighted pool's combined
	// score.
	Alpha *float64
	// Overshoot is the k of the intrinsic range; 0 means DefaultOvershoot.
	Overshoot float64
	// LogScale names the questions whose information is measured
	// against the log-uniform background instead of the uniform: the
	// intrinsic range, the minimal-information distributions and the
	// performance-weighted pool are built on ln x (Cooke 1991, ch. 12,
	// offers both backgrounds, the log-uniform for quantities spread over
	// orders of magnitude; from memory). Calibration scores do not
	// change: a monotone scale keeps each realisation in its
	// inter-quantile bin. Every value of such a question must be above 0
	// (RuleLogScalePositive).
	LogScale map[string]bool
}

// ExpertScore is one expert's performance on the calibration questions.
type ExpertScore struct {
	Expert      string  `json:"expert"`
	Calibration float64 `json:"calibration"`
	// LogCalibration is ln Calibration, finite where Calibration is
	// below the smallest double and so 0.
	LogCalibration float64 `json:"log_calibration"`
	Information    float64 `json:"information"`
	Combined       float64 `json:"combined"` // Calibration × Information
	Weight         float64 `json:"weight"`   // normalised; 0 below the cut-off
	N              int     `json:"n"`        // calibration questions answered
}

// PooledScore is the score of the performance-weighted pool, computed as
// for an expert from its quantiles at the experts' probabilities.
type PooledScore struct {
	Calibration    float64 `json:"calibration"`
	LogCalibration float64 `json:"log_calibration"`
	Information    float64 `json:"information"`
	Combined       float64 `json:"combined"`
	N              int     `json:"n"`
}

// SeedResult is one calibration question's intrinsic range and the
// performance-weighted pool's quantiles on it (nil when no expert with
// weight answered the question).
type SeedResult struct {
	Question    string    `json:"question"`
	Realisation float64   `json:"realisation"`
	Lower       float64   `json:"lower"` // L*, the intrinsic range's lower end
	Upper       float64   `json:"upper"` // U*
	Pooled      []float64 `json:"pooled"`
	// LogScale says the question was scored against the log-uniform
	// background: Lower and Upper are then exp of the range's ends on
	// ln x, and the pool is uniform on ln x between its knots.
	LogScale bool `json:"log_uniform_background,omitempty"`
}

// Scores is the outcome of the classical model. Experts and Questions are
// sorted by name.
type Scores struct {
	Alpha float64 `json:"alpha"`
	// LogAlpha is ln α when α is a calibration score below the smallest
	// double (so that Alpha is 0 though it leaves experts out); nil
	// otherwise.
	LogAlpha  *float64      `json:"log_alpha,omitempty"`
	Probs     []float64     `json:"probs"`
	Overshoot float64       `json:"overshoot"`
	Experts   []ExpertScore `json:"experts"`
	Pooled    PooledScore   `json:"pooled"`
	Questions []SeedResult  `json:"questions"`
}

// Weights returns the experts' normalised weights by name.
func (s Scores) Weights() map[string]float64 {
	w := make(map[string]float64, len(s.Experts))
	for _, e := range s.Experts {
		w[e.Expert] = e.Weight
	}
	return w
}

// ClassicalModel scores experts on calibration questions by Cooke's
// classical model (Cooke 1991, "Experts in Uncertainty", ch. 12; Cooke &
// Goossens 2008, Reliab. Eng. Syst. Saf. 93: 657–674) and weights them.
//
// With bin probabilities pⱼ (p₁, p₂−p₁, …, 1−pₙ for probabilities
// p₁ < … < pₙ), an expert who answered N questions, and sⱼ the fraction of
// realisations in bin j, the calibration score is
//
//	C = 1 − F_χ²(2·N·I(s, p); n),  I(s, p) = Σⱼ sⱼ ln(sⱼ/pⱼ),
//
// (CalibrationScore), the information score is the mean over the expert's
// questions of InformationScore on each question's intrinsic range, and
// the weight is w ∝ C·I·1{C ≥ α}, normalised to sum to 1.
// Scores and weights are formed from ln C, so they stay defined and
// ordered where C itself is below the smallest double (many calibration
// questions): Calibration then reads 0 and LogCalibration holds the score.
//
// Each question's intrinsic range [L*, U*] runs from L = the smallest of
// all experts' lowest quantiles and the realisation to U = the largest of
// the highest quantiles and the realisation, widened by k(U−L) on each
// side and cut to bounds[question] where given (Cooke 1991, §12.4).
//
// The performance-weighted pool on each question is the weighted linear
// pool of the minimal-information distributions of the experts who
// answered it (weights renormalised over them), and is scored like an
// expert from its quantiles at the same probabilities on the same
// intrinsic ranges (Cooke 1991 calls it the decision maker). When
// opt.Alpha is nil, α is the candidate that maximises the pool's C·I; the
// candidates are the experts' calibration scores (α = 0 gives the same
// weights as the smallest), ties go to the smaller α, and only the
// candidates whose pool is scored on the most questions compete (a pool
// has no answer on a question that only experts below the cut-off
// answered; see bestAlpha).
//
// Every question answered must have a finite realisation; a realisation
// must lie within the question's bounds and quantiles strictly inside
// them. All assessments must share one set of probabilities and each
// (expert, question) pair may appear once. The result does not depend on
// the order of assessments: experts and questions are sorted by name.
func ClassicalModel(assessments []SeedAssessment, realisations map[string]float64, bounds map[string][2]float64, opt ModelOptions) (Scores, error) {
	set, err := newSeedSet(assessments, realisations, bounds, opt.Overshoot, opt.LogScale)
	if err != nil {
		return Scores{}, err
	}
	if opt.Alpha != nil {
		a := *opt.Alpha
		if math.IsNaN(a) || math.IsInf(a, 0) {
			return Scores{}, inputErr("alpha", RuleFinite, "got %v", a)
		}
		if a < 0 || a > 1 {
			return Scores{}, inputErr("alpha", RuleUnitInterval, "got %v", a)
		}
		if a == 0 {
			// −0 is the cut-off 0: kept as −0 it was printed and
			// exported "-0".
			a = 0
			opt.Alpha = &a
		}
	}
	return set.score(opt.Alpha)
}

// seedSet is validated classical-model input, sorted by name.
type seedSet struct {
	probs     []float64
	binP      []float64 // p₁, p₂−p₁, …, 1−pₙ
	overshoot float64
	experts   []string
	questions []seedQuestion
}

type seedQuestion struct {
	name        string
	log         bool // on ln x (ModelOptions.LogScale): every value below is ln of the stated one
	realisation float64
	lo, hi      float64 // intrinsic range [L*, U*]
	answers     []seedAnswer
	knots       []float64   // see prepareKnots
	cdfAt       [][]float64 // cdfAt[answer][knot]
}

type seedAnswer struct {
	expert int
	q      []float64
	// bin is the inter-quantile bin of the realisation, counted on the
	// stated values (binOf): on the log scale ln can make a realisation
	// a double above a quantile equal to it.
	bin int
}

func newSeedSet(as []SeedAssessment, realisations map[string]float64, bounds map[string][2]float64, k float64, logScale map[string]bool) (*seedSet, error) {
	if math.IsNaN(k) || math.IsInf(k, 0) {
		return nil, inputErr("overshoot", RuleFinite, "got %v", k)
	}
	if k < 0 {
		return nil, inputErr("overshoot", RuleNonNegative, "got %v", k)
	}
	if k == 0 {
		k = DefaultOvershoot
	}
	if len(as) == 0 {
		return nil, inputErr("assessments", RuleCount, "need at least 1 assessment, got 0")
	}
	s := &seedSet{probs: append([]float64(nil), as[0].Probs...), overshoot: k}
	byQuestion := map[string][]int{}
	experts := map[string]bool{}
	seen := map[[2]string]int{}
	for i, a := range as {
		field := func() string { return fmt.Sprintf("assessments[%d]", i) }
		// The probabilities are checked in full once; the others must
		// equal them.
		check := a.validateQuantiles
		if i == 0 || !sameFloats(a.Probs, s.probs) {
			check = a.Validate
		}
		if err := check(); err != nil {
			return nil, prefixField(field(), err)
		}
		if !sameFloats(a.Probs, s.probs) {
			return nil, inputErr(field()+".probs", RuleSameProbs, "%v differs from %v", a.Probs, s.probs)
		}
		key := [2]string{a.Expert, a.Question}
		if j, dup := seen[key]; dup {
			return nil, inputErr(field(), RuleDuplicate, "expert %q, question %q already in assessments[%d]", a.Expert, a.Question, j)
		}
		seen[key] = i
		byQuestion[a.Question] = append(byQuestion[a.Question], i)
		experts[a.Expert] = true
	}
	s.binP = binProbs(s.probs)
	for e := range experts {
		s.experts = append(s.experts, e)
	}
	sort.Strings(s.experts)
	index := make(map[string]int, len(s.experts))
	for i, e := range s.experts {
		index[e] = i
	}
	names := make([]string, 0, len(byQuestion))
	for q := range byQuestion {
		names = append(names, q)
	}
	sort.Strings(names)
	for _, name := range names {
		q, err := newSeedQuestion(name, as, byQuestion[name], index, realisations, bounds, k, logScale[name])
		if err != nil {
			return nil, err
		}
		q.prepareKnots(s.probs)
		s.questions = append(s.questions, q)
	}
	return s, nil
}

func newSeedQuestion(name string, as []SeedAssessment, rows []int, index map[string]int, realisations map[string]float64, bounds map[string][2]float64, k float64, logScale bool) (seedQuestion, error) {
	x, ok := realisations[name]
	field := "realisations[" + strconv.Quote(name) + "]"
	if !ok {
		return seedQuestion{}, inputErr(field, RuleRequired, "question %q has no realisation", name)
	}
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return seedQuestion{}, inputErr(field, RuleFinite, "got %v", x)
	}
	if math.Abs(x) > maxBound {
		return seedQuestion{}, inputErr(field, RuleBoundsRange, "got %v", x)
	}
	b, bounded := bounds[name]
	if logScale {
		if err := checkLogScale(name, as, rows, x, b, bounded); err != nil {
			return seedQuestion{}, err
		}
	}
	// On the log scale the range is built from ln x; a lower bound of 0
	// is ln 0 = −∞ there and cuts nothing.
	scale := func(v float64) float64 { return v }
	if logScale {
		scale = math.Log
	}
	q := seedQuestion{name: name, log: logScale, realisation: scale(x)}
	lo, hi := q.realisation, q.realisation
	if bounded {
		bf := fmt.Sprintf("bounds[%q]", name)
		if math.IsNaN(b[0]) || math.IsInf(b[0], 0) || math.IsNaN(b[1]) || math.IsInf(b[1], 0) {
			return seedQuestion{}, inputErr(bf, RuleFinite, "got [%v, %v]", b[0], b[1])
		}
		if !(b[0] < b[1]) {
			return seedQuestion{}, inputErr(bf, RuleBoundsOrder, "got [%v, %v]", b[0], b[1])
		}
		if math.Abs(b[0]) > maxBound || math.Abs(b[1]) > maxBound {
			return seedQuestion{}, inputErr(bf, RuleBoundsRange, "got [%v, %v]", b[0], b[1])
		}
		if x < b[0] || x > b[1] {
			return seedQuestion{}, inputErr(field, RuleInRange, "%v outside [%v, %v]", x, b[0], b[1])
		}
	}
	for _, i := range rows {
		a := as[i]
		if !bounded {
			if err := checkQuantileGaps(fmt.Sprintf("assessments[%d].quantiles", i), a.Quantiles); err != nil {
				return seedQuestion{}, err
			}
		}
		if bounded {
			for j, v := range a.Quantiles {
				if !(v > b[0] && v < b[1]) {
					return seedQuestion{}, inputErr(fmt.Sprintf("assessments[%d].quantiles[%d]", i, j), RuleValueInBounds,
						"%v not inside (%v, %v)", v, b[0], b[1])
				}
			}
		}
		qs := a.Quantiles
		if logScale {
			qs = make([]float64, len(a.Quantiles))
			for j, v := range a.Quantiles {
				qs[j] = math.Log(v)
				// Each quantile keeps a logarithm of its own, apart
				// from the one before and from the bounds.
				if j > 0 && !(qs[j] > qs[j-1]) || bounded && !(qs[j] > scale(b[0]) && qs[j] < scale(b[1])) {
					return seedQuestion{}, inputErr(fmt.Sprintf("assessments[%d].quantiles[%d]", i, j), RuleLogScaleTooClose,
						"ln %v = %v", v, qs[j])
				}
			}
		}
		lo = math.Min(lo, qs[0])
		hi = math.Max(hi, qs[len(qs)-1])
		q.answers = append(q.answers, seedAnswer{expert: index[a.Expert], q: qs, bin: binOf(a.Quantiles, x)})
	}
	sort.Slice(q.answers, func(i, j int) bool { return q.answers[i].expert < q.answers[j].expert })
	q.lo, q.hi = intrinsicRange(lo, hi, k)
	if math.IsInf(q.lo, 0) || math.IsInf(q.hi, 0) || !(q.hi-q.lo < math.Inf(1)) {
		return seedQuestion{}, inputErr("overshoot", RuleRangeOverflow, "question %q: [%v, %v] widened by %v", name, lo, hi, k)
	}
	if !(q.lo < lo && q.hi > hi) {
		return seedQuestion{}, inputErr(fmt.Sprintf("questions[%q]", name), RuleRangeCollapsed,
			"[%v, %v] widened by %v gives [%v, %v]", lo, hi, k, q.lo, q.hi)
	}
	if bounded {
		q.lo, q.hi = math.Max(q.lo, scale(b[0])), math.Min(q.hi, scale(b[1]))
	}
	return q, nil
}

// checkLogScale holds a question scored on the log scale to
// RuleLogScalePositive: its realisation, every quantile and its upper
// bound above 0, its lower bound at least 0.
func checkLogScale(name string, as []SeedAssessment, rows []int, x float64, b [2]float64, bounded bool) error {
	if !(x > 0) {
		return inputErr("realisations["+strconv.Quote(name)+"]", RuleLogScalePositive, "got %v", x)
	}
	if bounded && !(b[0] >= 0) {
		return inputErr(fmt.Sprintf("bounds[%q]", name), RuleLogScalePositive, "lower bound %v is below 0", b[0])
	}
	for _, i := range rows {
		for j, v := range as[i].Quantiles {
			if !(v > 0) {
				return inputErr(fmt.Sprintf("assessments[%d].quantiles[%d]", i, j), RuleLogScalePositive, "got %v", v)
			}
		}
	}
	return nil
}

// shown is v on the question's own scale: exp v on the log scale.
func (q seedQuestion) shown(v float64) float64 {
	if q.log {
		return math.Exp(v)
	}
	return v
}

// intrinsicRange widens [lo, hi] by k(hi−lo) on each side.
func intrinsicRange(lo, hi, k float64) (float64, float64) {
	w := hi - lo
	return lo - k*w, hi + k*w
}

func sameFloats(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

// binProbs returns the inter-quantile bin probabilities p₁, p₂−p₁, …, 1−pₙ,
// with bins of equal mass equal to the last bit (sameMasses). In doubles
// 0.95 − 0.5 is 0.44999999999999996 and 1 − 0.95 is 0.050000000000000044,
// so the two middle bins of 5/50/95, of equal mass by definition, differed
// in the last bit, and two experts whose counts mirror each other
// ([1, 5, 4, 0] and [0, 4, 5, 1]) got calibration scores 6e-16 apart: the
// optimised cut-off then kept one and left out the other (found in
// review).
func binProbs(probs []float64) []float64 {
	p := make([]float64, len(probs)+1)
	prev := 0.0
	for i, pr := range probs {
		p[i] = pr - prev
		prev = pr
	}
	p[len(probs)] = 1 - prev
	sameMasses(p)
	return p
}

// sameMassTol is how far apart, relative, two bins' masses may be in
// doubles and still be the same mass: the rounding of a difference of
// two probabilities is a few units in the last place (about 1e-16
// relative); masses that differ by design differ by far more.
const sameMassTol = 1e-12

// sameMasses gives bins whose masses agree to sameMassTol one mass, the
// smallest of them, so that counts moved between them leave the
// calibration score as it was to the last bit.
func sameMasses(p []float64) {
	for i := range p {
		for j := range p {
			if p[j] < p[i] && p[i]-p[j] <= sameMassTol*p[i] {
				p[i] = p[j]
			}
		}
	}
}

// binOf is the inter-quantile bin holding x: the number of quantiles
// strictly below x, so a realisation equal to a quantile counts in the bin
// below it, as P(X ≤ q) = p.
func binOf(q []float64, x float64) int {
	n := 0
	for _, v := range q {
		if v < x {
			n++
		}
	}
	return n
}

// score computes expert scores, then weights and the weighted pool for
// alpha (nil: optimise).
func (s *seedSet) score(alpha *float64) (Scores, error) {
	out := Scores{Probs: s.probs, Overshoot: s.overshoot, Experts: make([]ExpertScore, len(s.experts))}
	counts := make([][]int, len(s.experts))
	info := make([]float64, len(s.experts))
	for e, name := range s.experts {
		out.Experts[e].Expert = name
		counts[e] = make([]int, len(s.binP))
	}
	for _, q := range s.questions {
		for _, a := range q.answers {
			counts[a.expert][a.bin]++
			info[a.expert] += information(a.q, s.binP, q.lo, q.hi)
			out.Experts[a.expert].N++
		}
	}
	for e := range out.Experts {
		es := &out.Experts[e]
		es.Calibration, es.LogCalibration = calibrationLog(counts[e], es.N, s.binP)
	}
	sameScores(out.Experts)
	var maxCal *score
	for e := range out.Experts {
		es := &out.Experts[e]
		es.Information = info[e] / float64(es.N)
		es.Combined = es.Calibration * es.Information
		if c := scoreOf(*es); es.Information > 0 && (maxCal == nil || maxCal.below(c)) {
			maxCal = &c
		}
	}
	if maxCal == nil {
		return Scores{}, inputErr("experts", RuleNoScoredExperts, "every information score is 0")
	}
	var a score
	switch {
	case alpha != nil:
		a = score{c: *alpha, log: logSub(*alpha)}
		if maxCal.below(a) {
			top := strconv.FormatFloat(maxCal.c, 'g', -1, 64)
			if BelowDouble(maxCal.c, maxCal.log) {
				top = FormatExp(maxCal.log, 4) // not "0", which is not the score
			}
			return Scores{}, inputErr("alpha", RuleAlphaTooHigh, "%v above %s", *alpha, top)
		}
	default:
		a = s.bestAlpha(out.Experts)
	}
	w := cutWeights(out.Experts, a)
	for e := range out.Experts {
		out.Experts[e].Weight = w[e]
	}
	out.Alpha = a.c
	if a.c == 0 && !math.IsInf(a.log, -1) {
		l := a.log
		out.LogAlpha = &l
	}
	out.Pooled, out.Questions = s.weightedPool(w)
	return out, nil
}

// sameScoreTol is how far apart, relative, two experts' ln C may be in
// doubles and still be one score: rounding leaves a few units in the last
// place (about 1e-16 relative); scores that differ do so by far more.
const sameScoreTol = 1e-12

// sameScores gives experts whose calibration scores agree to
// sameScoreTol in ln C one score, the smallest of them, so that the
// cut-off keeps them or leaves them out together. C depends on the
// counts through I(s, p) alone, and different counts often give the same
// I: at 5/50/95 [0, 1, 1, 2] and [1, 0, 2, 1] (the same shares, and as
// much of them on the outer bins), at 10/50/90 [0, 1, 1, 1] and
// [0, 1, 2, 0] (ln 0.4 = 2 ln 2 + ln 0.1). Summed as Σ sⱼ ln(sⱼ/pⱼ) such
// scores came out a few units in the last place apart, and a cut-off at
// the higher kept one expert and left out the other (found in review;
// binProbs and relativeInformation make only mirrored counts agree).
func sameScores(es []ExpertScore) {
	for i := range es {
		for j := range es {
			a, b := scoreOf(es[i]), scoreOf(es[j])
			if b.below(a) && a.log-b.log <= sameScoreTol*math.Max(-a.log, -b.log) {
				es[i].Calibration, es[i].LogCalibration = b.c, b.log
			}
		}
	}
}

// score is a calibration score and its logarithm, ordered by the score
// while both are normal doubles (as a typed cut-off compares) and by the
// logarithm below.
type score struct{ c, log float64 }

func scoreOf(e ExpertScore) score { return score{e.Calibration, e.LogCalibration} }

func (s score) below(t score) bool {
	if s.c >= minNormal && t.c >= minNormal {
		return s.c < t.c
	}
	return s.log < t.log
}

// bestAlpha returns the candidate cut-off (an expert's calibration score)
// whose weighted pool has the largest combined score; ties go to the
// smaller α. The pools' scores compare as ln C + ln I, which stay
// ordered where C·I underflows.
//
// Only pools scored on the same calibration questions are compared: a
// cut-off that leaves a question answered only by experts below it has a
// pool with no answer there, scored on fewer questions, and is passed
// over: only the pools scored on the most questions are compared. A
// calibration score on fewer realisations is a weaker test (2·N·I
// shrinks with N), so without this rule experts who skipped the
// questions they would have missed could win the pool its best score.
// The rule errs towards the wider pool: a question that only one expert
// answered rules out every cut-off above that expert's score, however
// poor it is, so that expert keeps a weight (a small one where the
// score is poor: weights are ∝ C·I). (Our rule, no source: Cooke's
// classical model assumes every expert answers every calibration
// question; the calibration page warns when they did not.)
func (s *seedSet) bestAlpha(es []ExpertScore) score {
	var cands []score
	for _, e := range es {
		if e.Information > 0 {
			cands = append(cands, scoreOf(e))
		}
	}
	sort.Slice(cands, func(i, j int) bool { return cands[i].below(cands[j]) })
	type tried struct {
		a     score
		value float64 // ln C + ln I of the pool
		n     int     // questions the pool is scored on
	}
	var pools []tried
	covered := 0
	for i, a := range cands {
		if i > 0 && !cands[i-1].below(a) {
			continue
		}
		pool, _ := s.weightedPool(cutWeights(es, a))
		pools = append(pools, tried{a, pool.LogCalibration + math.Log(pool.Information), pool.N})
		covered = max(covered, pool.N)
	}
	best, bestScore := cands[0], math.Inf(-1)
	for _, p := range pools {
		if p.n == covered && p.value > bestScore {
			best, bestScore = p.a, p.value
		}
	}
	return best
}

// cutWeights returns w ∝ C·I·1{C ≥ α}, normalised to sum to 1, formed as
// exp(ln C + ln I − max) so that scores below the double range keep their
// ratios. The caller guarantees that some expert with I > 0 has C ≥ α.
func cutWeights(es []ExpertScore, alpha score) []float64 {
	w := make([]float64, len(es))
	logs := make([]float64, len(es))
	top := math.Inf(-1)
	for i, e := range es {
		logs[i] = math.Inf(-1)
		if e.Information > 0 && !scoreOf(e).below(alpha) {
			logs[i] = e.LogCalibration + math.Log(e.Information)
			top = math.Max(top, logs[i])
		}
	}
	sum := 0.0
	for i, l := range logs {
		w[i] = math.Exp(l - top)
		sum += w[i]
	}
	for i := range w {
		w[i] /= sum
	}
	return w
}

// weightedPool pools the experts on each question with weights w and
// scores the pool like an expert.
func (s *seedSet) weightedPool(w []float64) (PooledScore, []SeedResult) {
	res := make([]SeedResult, len(s.questions))
	counts := make([]int, len(s.binP))
	var pooled PooledScore
	info := 0.0
	for i, q := range s.questions {
		res[i] = SeedResult{Question: q.name, Realisation: q.shown(q.realisation), Lower: q.shown(q.lo), Upper: q.shown(q.hi), LogScale: q.log}
		d, ok := s.poolQuestion(q, w)
		if !ok {
			continue
		}
		qs := make([]float64, len(s.probs))
		for j, p := range s.probs {
			qs[j] = d.Quantile(p)
		}
		counts[binOf(qs, q.realisation)]++
		info += information(qs, s.binP, q.lo, q.hi)
		pooled.N++
		for j := range qs {
			qs[j] = q.shown(qs[j])
		}
		res[i].Pooled = qs
	}
	if pooled.N == 0 {
		return pooled, res
	}
	pooled.Calibration, pooled.LogCalibration = calibrationLog(counts, pooled.N, s.binP)
	pooled.Information = info / float64(pooled.N)
	pooled.Combined = pooled.Calibration * pooled.Information
	return pooled, res
}

// poolQuestion is the weighted linear pool Σ wᵢ Fᵢ / Σ wᵢ of the
// minimal-information distributions of q's answers: piecewise uniform on
// the union of their knots. ok is false when no answer has weight.
func (s *seedSet) poolQuestion(q seedQuestion, w []float64) (PiecewiseUniform, bool) {
	f := make([]float64, len(q.knots))
	sum := 0.0
	for i, a := range q.answers {
		wi := w[a.expert]
		if wi <= 0 {
			continue
		}
		sum += wi
		for k, v := range q.cdfAt[i] {
			f[k] += wi * v
		}
	}
	if sum == 0 {
		return PiecewiseUniform{}, false
	}
	for k := range f {
		f[k] /= sum
		// Where every expert with weight has the same CDF at a knot (a
		// quantile they share), so has the pool; the weighted mean of
		// equal values rounds away from them (0.1 · Σ wᵢ / Σ wᵢ above
		// 0.1), and a true value equal to the shared quantile fell in
		// the bin above the pool's.
		if v, ok := sameCDFAt(q.cdfAt, q.answers, w, k); ok {
			f[k] = v
		}
	}
	f[0], f[len(f)-1] = 0, 1
	return PiecewiseUniform{X: q.knots, F: f}, true
}

// sameCDFAt is the value at knot k of the CDFs of the answers with
// weight under w, and whether they all have that one value.
func sameCDFAt(cdfAt [][]float64, answers []seedAnswer, w []float64, k int) (float64, bool) {
	v, seen := 0.0, false
	for i, a := range answers {
		if w[a.expert] <= 0 {
			continue
		}
		if seen && cdfAt[i][k] != v {
			return 0, false
		}
		v, seen = cdfAt[i][k], true
	}
	return v, seen
}

// prepareKnots sets q's knots, the union of L*, U* and every answer's
// quantiles, and each answer's minimal-information CDF at them, which do
// not depend on the weights.
func (q *seedQuestion) prepareKnots(probs []float64) {
	xs := []float64{q.lo, q.hi}
	for _, a := range q.answers {
		xs = append(xs, a.q...)
	}
	sort.Float64s(xs)
	q.knots = xs[:0]
	for i, x := range xs {
		if i == 0 || x != xs[i-1] {
			q.knots = append(q.knots, x)
		}
	}
	q.cdfAt = make([][]float64, len(q.answers))
	for i, a := range q.answers {
		d := minimalInformation(a.q, probs, q.lo, q.hi)
		q.cdfAt[i] = make([]float64, len(q.knots))
		for k, x := range q.knots {
			q.cdfAt[i][k] = d.CDF(x)
		}
	}
}

// CalibrationScore is Cooke's calibration score for counts[j] realisations
// in inter-quantile bin j (j = 0 below the first quantile, j = n above the
// last) of an expert who gave quantiles at probs:
//
//	C = 1 − F_χ²(2·N·I(s, p); n),  I(s, p) = Σⱼ sⱼ ln(sⱼ/pⱼ),  0·ln 0 = 0,
//
// with N = Σ counts, sⱼ = counts[j]/N, pⱼ the bin probabilities and F_χ²
// the chi-square CDF with n = len(probs) degrees of freedom: for a
// perfectly calibrated expert 2·N·I is asymptotically χ²(n) (Cooke 1991,
// "Experts in Uncertainty", §12.3).
func CalibrationScore(counts []int, probs []float64) (float64, error) {
	if err := CheckProbs("probs", probs); err != nil {
		return 0, err
	}
	if len(probs) == 0 {
		return 0, inputErr("probs", RuleCount, "need at least 1 probability, got 0")
	}
	if len(counts) != len(probs)+1 {
		return 0, inputErr("counts", RuleCount, "%d probabilities need %d bins, got %d", len(probs), len(probs)+1, len(counts))
	}
	n := 0
	for i, c := range counts {
		if c < 0 {
			return 0, inputErr(fmt.Sprintf("counts[%d]", i), RuleNonNegative, "got %d", c)
		}
		n += c
	}
	if n == 0 {
		return 0, inputErr("counts", RuleCount, "no realisations")
	}
	return calibration(counts, n, binProbs(probs)), nil
}

// RelativeInformation is I(s, p) = Σⱼ sⱼ ln(sⱼ/pⱼ) with 0·ln 0 = 0
// (Kullback & Leibler 1951, Ann. Math. Statist. 22: 79–86), for
// unvalidated s and p of the same length with pⱼ > 0.
//
// The terms are added smallest first, whatever the bins' order, so that
// counts moved between bins of equal mass give the same sum to the last
// bit, and equal calibration scores compare equal at the cut-off.
func relativeInformation(s, p []float64) float64 {
	var buf [16]float64
	terms := buf[:0]
	for j := range s {
		if s[j] > 0 {
			terms = append(terms, s[j]*math.Log(s[j]/p[j]))
		}
	}
	slices.Sort(terms)
	sum := 0.0
	for _, t := range terms {
		sum += t
	}
	return sum
}

func calibration(counts []int, n int, binP []float64) float64 {
	c, _ := calibrationLog(counts, n, binP)
	return c
}

// calibrationLog is the calibration score C and its natural logarithm.
// ln C is finite whatever N: with a few hundred calibration questions a
// poorly calibrated expert's 2·N·I passes 1500, where C is below the
// smallest double and was 0 for every such expert, so that weights
// C·I/Σ C·I became 0/0 or all alike. C is exp(ln C), 0 below the double
// range; ln C is math.Log(C) exactly wherever C is a normal double, so
// that a cut-off typed as a shown score compares the same either way.
func calibrationLog(counts []int, n int, binP []float64) (float64, float64) {
	s := make([]float64, len(counts))
	for j, c := range counts {
		s[j] = float64(c) / float64(n)
	}
	stat := 2 * float64(n) * relativeInformation(s, binP)
	if stat <= 0 {
		return 1, 0 // rounding can make I slightly negative when s = p
	}
	lc := logChiSquareSurvival(float64(len(binP)-1), stat)
	c := math.Exp(lc)
	if c >= minNormal {
		lc = math.Log(c)
	}
	return c, lc
}

// minNormal is the smallest normal float64, 2⁻¹⁰²².
const minNormal = 0x1p-1022

// logChiSquareSurvival is ln(1 − F_χ²(x; k)) = ln Q(k/2, x/2), Q the
// regularized upper incomplete gamma function. Where gonum's tail is a
// normal double it is gonum's (through log1p of the lower tail while the
// upper is above one half); beyond, where gonum's underflows (x above
// about 1500 for k up to 40), it is Legendre's continued fraction
//
//	Q(a, z) = e⁻ᶻ zᵃ / Γ(a) · 1/(z+1−a − 1·(1−a)/(z+3−a − 2·(2−a)/(z+5−a − …)))
//
// evaluated by the modified Lentz method, with the prefactor in logs
// (Numerical Recipes, 3rd ed., §6.2, gcf; Abramowitz & Stegun 6.5.31).
// It converges fast for z > a + 1, which holds wherever Q underflows.
func logChiSquareSurvival(k, x float64) float64 {
	d := distuv.ChiSquared{K: k}
	if p := d.CDF(x); p < 0.5 {
		return math.Log1p(-p)
	}
	if q := d.Survival(x); q >= 1e-300 {
		return math.Log(q)
	}
	a, z := k/2, x/2
	if !(z > a+1) {
		return logSub(d.Survival(x))
	}
	const tiny = 1e-300
	b := z + 1 - a
	c := 1 / tiny
	dd := 1 / b
	h := dd
	for i := 1; i < 10000; i++ {
		an := -float64(i) * (float64(i) - a)
		b += 2
		dd = an*dd + b
		if math.Abs(dd) < tiny {
			dd = tiny
		}
		c = b + an/c
		if math.Abs(c) < tiny {
			c = tiny
		}
		dd = 1 / dd
		del := dd * c
		h *= del
		if math.Abs(del-1) < floatEps {
			break
		}
	}
	lg, _ := math.Lgamma(a)
	return a*math.Log(z) - z - lg + math.Log(h)
}

// InformationScore is the relative information, on one question with
// intrinsic range [lower, upper], of an expert's minimal-information
// distribution (uniform between the quantiles x₁ < … < xₙ, with bin masses
// pⱼ) with respect to the uniform background on the range:
//
//	I = Σⱼ pⱼ ln(pⱼ / ((xⱼ − xⱼ₋₁)/(U* − L*))),  x₀ = L*, xₙ₊₁ = U*
//
// (Cooke 1991, "Experts in Uncertainty", §12.4), and exactly 0 when the
// quantiles split the range in the bins' proportions, as the uniform
// background itself does (see information). The quantiles must lie
// strictly inside (lower, upper).
func InformationScore(quantiles, probs []float64, lower, upper float64) (float64, error) {
	a := SeedAssessment{Expert: "-", Question: "-", Probs: probs, Quantiles: quantiles}
	if err := a.Validate(); err != nil {
		return 0, err
	}
	if math.IsNaN(lower) || math.IsInf(lower, 0) || math.IsNaN(upper) || math.IsInf(upper, 0) {
		return 0, inputErr("lower", RuleFinite, "got [%v, %v]", lower, upper)
	}
	if !(lower < upper) {
		return 0, inputErr("lower", RuleBoundsOrder, "got [%v, %v]", lower, upper)
	}
	for j, v := range quantiles {
		if !(v > lower && v < upper) {
			return 0, inputErr(fmt.Sprintf("quantiles[%d]", j), RuleValueInBounds, "%v not inside (%v, %v)", v, lower, upper)
		}
	}
	return information(quantiles, binProbs(probs), lower, upper), nil
}

// information is InformationScore on validated input. Each term is a sum
// of logarithms: the ratio width/(next − prev) itself overflows when a
// range near ±1e300 holds a bin near 1e-290 wide. A bin narrower than
// the smallest normal number takes logSub, as Go's math.Log on amd64 is
// wrong for subnormals (DEVELOPERS.md, accuracy envelope).
//
// The relative information is never below 0 and is 0 only for the
// uniform background itself (Gibbs' inequality; Kullback & Leibler 1951),
// but the sum of logarithms carries rounding of either sign: an expert
// whose quantiles split the range in the bins' proportions scored
// +5e-16 on [0, 100] and −1.2e-15 on [0, 3000], and so earned a weight
// of either sign, or the whole weight under a cut-off above the
// informative experts. A sum within its own rounding bound of 0 is
// therefore 0. The bound is 8ε Σⱼ pⱼ(|ln pⱼ| + |ln W| + |ln wⱼ| + 4): ε/2
// per logarithm and per subtraction of the widths, with room to spare
// (common practice, no source for the factor).
func information(q, binP []float64, lo, hi float64) float64 {
	logWidth := logSub(hi - lo)
	sum, size := 0.0, 0.0
	prev := lo
	for j, p := range binP {
		next := hi
		if j < len(q) {
			next = q[j]
		}
		lp, lw := math.Log(p), logSub(next-prev)
		sum += p * (lp + logWidth - lw)
		size += p * (math.Abs(lp) + math.Abs(logWidth) + math.Abs(lw) + 4)
		prev = next
	}
	if sum <= 8*floatEps*size {
		return 0
	}
	return sum
}

// PiecewiseUniform is a distribution with a piecewise-linear CDF through
// the knots (X[k], F[k]): uniform density between consecutive knots. An
// expert's minimal-information distribution given quantiles is one (Cooke
// 1991, §12.4), and so is any linear pool of them on one range.
type PiecewiseUniform struct {
	X []float64 `json:"x"` // knots, strictly increasing
	F []float64 `json:"f"` // CDF at the knots: F[0] = 0 ≤ … ≤ F[last] = 1
}

// CDF is P(X ≤ x), linear between knots.
func (d PiecewiseUniform) CDF(x float64) float64 {
	n := len(d.X)
	switch {
	case n == 0 || math.IsNaN(x):
		return math.NaN()
	case x <= d.X[0]:
		return 0
	case x >= d.X[n-1]:
		return 1
	}
	k := sort.SearchFloat64s(d.X, x) // d.X[k-1] < x ≤ d.X[k]
	t := (x - d.X[k-1]) / (d.X[k] - d.X[k-1])
	return d.F[k-1] + t*(d.F[k]-d.F[k-1])
}

// Quantile is the inverse CDF at p in [0, 1], linear between knots; on a
// flat stretch it returns the stretch's left end.
func (d PiecewiseUniform) Quantile(p float64) float64 {
	n := len(d.X)
	switch {
	case n == 0 || math.IsNaN(p):
		return math.NaN()
	case p <= 0:
		return d.X[0]
	case p >= 1:
		return d.X[n-1]
	}
	k := sort.SearchFloat64s(d.F, p) // first knot with F ≥ p
	if k == 0 {
		return d.X[0]
	}
	if k == n {
		return d.X[n-1]
	}
	if d.F[k] == p {
		// The knot itself: interpolated from the knot before, it could
		// come out a unit in the last place beside it, and a realisation
		// equal to it then fell in the bin above.
		return d.X[k]
	}
	dF := d.F[k] - d.F[k-1]
	if dF <= 0 {
		return d.X[k-1]
	}
	return d.X[k-1] + (p-d.F[k-1])/dF*(d.X[k]-d.X[k-1])
}

// minimalInformation is the distribution uniform between L*, the quantiles
// and U*, with CDF 0, probs…, 1 at those points.
func minimalInformation(q, probs []float64, lo, hi float64) PiecewiseUniform {
	x := make([]float64, 0, len(q)+2)
	f := make([]float64, 0, len(q)+2)
	x = append(append(append(x, lo), q...), hi)
	f = append(append(append(f, 0), probs...), 1)
	return PiecewiseUniform{X: x, F: f}
}

// BelowDouble reports whether a score c with logarithm logC is below the
// smallest double, so that c reads 0 (or a subnormal with few digits)
// and only logC holds it.
func BelowDouble(c, logC float64) bool {
	return c < minNormal && logC < math.Log(minNormal) && !math.IsInf(logC, -1)
}

// FormatExp writes e^logV in decimal scientific notation with sig
// significant figures, such as "7.507e-509" for logV = −1170: a value far
// below the smallest double, which strconv cannot write.
func FormatExp(logV float64, sig int) string {
	if math.IsNaN(logV) || math.IsInf(logV, 0) {
		return strconv.FormatFloat(math.Exp(logV), 'g', sig, 64)
	}
	e := math.Floor(logV / math.Ln10)
	m := math.Exp(logV - e*math.Ln10)
	// m lies in [1, 10) but for rounding at either end.
	s := strconv.FormatFloat(m, 'f', sig-1, 64)
	if s == strconv.FormatFloat(10, 'f', sig-1, 64) {
		e++
		s = strconv.FormatFloat(1, 'f', sig-1, 64)
	}
	return s + "e" + strconv.FormatFloat(e, 'f', 0, 64)
}

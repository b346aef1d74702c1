package elicit

import (
	"errors"
	"math"
	"strconv"
	"strings"
)

// Planning a study from a Beta prior for a proportion θ: the prior
// predictive distribution of the number of successes, assurance, sample
// size for estimation (plan_samplesize.go) and what the prior is worth in
// trials. Everything is computed exactly, by summing over the
// beta-binomial distribution of the study's outcome, not by simulation:
// with X | θ ~ Binomial(n, θ) and θ ~ Beta(A, B),
//
//	P(X = x) = C(n, x) B(A + x, B + n − x) / B(A, B),  x = 0…n
//
// (PriorPredictive), and after x successes the posterior is
// Beta(A + x, B + n − x) (Posterior).

// Rules of the planning inputs.
const (
	RuleSampleSizeUnreachable Rule = "no sample size up to the limit meets the criterion"
)

// Direction says which side of the threshold a study's success lies.
type Direction string

// The directions of a success criterion.
const (
	DirectionBelow Direction = "below" // success: P(θ < T | data) ≥ G
	DirectionAbove Direction = "above" // success: P(θ > T | data) ≥ G
)

// SuccessCriterion is a study's goal stated on its posterior: the study
// succeeds when P(θ < Threshold | data) ≥ Confidence (DirectionBelow) or
// P(θ > Threshold | data) ≥ Confidence (DirectionAbove).
type SuccessCriterion struct {
	Threshold  float64   `json:"threshold"`
	Direction  Direction `json:"direction"`
	Confidence float64   `json:"confidence"`
}

// Validate checks the threshold and the confidence, both strictly inside
// (0, 1), and the direction.
func (s SuccessCriterion) Validate() error {
	if err := checkOpenProb("threshold", s.Threshold); err != nil {
		return err
	}
	if s.Direction != DirectionBelow && s.Direction != DirectionAbove {
		return inputErr("direction", RuleUnknown, "%q: below or above", s.Direction)
	}
	if err := checkOpenProb("confidence", s.Confidence); err != nil {
		return err
	}
	if !(s.Confidence >= MinProb && s.Confidence <= 1-MinProb) {
		return inputErr("confidence", RuleProbRange, "got %v", s.Confidence)
	}
	return nil
}

// checkOpenProb checks that v is finite and strictly inside (0, 1).
func checkOpenProb(field string, v float64) error {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return inputErr(field, RuleFinite, "got %v", v)
	}
	if !(v > 0 && v < 1) {
		return inputErr(field, RuleProbOpen, "got %v", v)
	}
	return nil
}

// checkPlanTrials checks a planned number of trials against [min, max].
func checkPlanTrials(n, min, max int) error {
	if n < min || n > max {
		return inputErr("trials", RuleCountRange, "%d is outside %d to %d", n, min, max)
	}
	return nil
}

// AssuranceResult is the assurance of a study of Trials trials, and the
// outcomes that count as success.
type AssuranceResult struct {
	Trials    int     `json:"trials"`
	Assurance float64 `json:"assurance"`
	// The study succeeds exactly when its number of successes lies in
	// [SuccessFrom, SuccessTo]; when no outcome succeeds SuccessFrom >
	// SuccessTo.
	SuccessFrom int `json:"success_from"`
	SuccessTo   int `json:"success_to"`
}

// Assurance is the probability, under the prior predictive distribution,
// that a study of n trials meets the success criterion (O'Hagan, Stevens
// & Campbell 2005, "Assurance in clinical trial design", Pharmaceut.
// Statist. 4(3)):
//
//	assurance = Σₓ P(X = x) · 1[P(θ < T | x) ≥ G]   (below; θ > T for above)
//
// with P(θ < T | x) = I_T(A + x, B + n − x). The posterior Beta(A + x,
// B + n − x) rises in likelihood-ratio order with x, so P(θ < T | x) falls
// with x and the successful outcomes are x = 0…x* (below) or x*…n
// (above): x* is found by bisection over x, and the sum runs over those
// outcomes (predictiveSum). It needs a valid prior and
// 0 ≤ n ≤ MaxPredictiveTrials. It is AssuranceUnder with one prior in
// both roles.
func Assurance(prior Beta, n int, goal SuccessCriterion) (AssuranceResult, error) {
	return AssuranceUnder(prior, prior, n, goal)
}

// AssuranceUnder is the assurance of a study planned with two priors
// (O'Hagan & Stevens 2001, "Bayesian assessment of sample size for
// clinical trials of cost-effectiveness", Med. Decis. Making 21(3); the
// "sampling" and "fitting" priors of Wang & Gelfand 2002, Statist. Sci.
// 17(2)): the design prior says how likely each outcome is, and the
// analysis prior is the one the study's own analysis will use, on whose
// posterior success is judged:
//
//	assurance = Σₓ P_design(X = x) · 1[P_analysis(θ < T | x) ≥ G]
//
// The usual case is an elicited design prior with a uniform or sceptical
// analysis prior, where those who judge the study ask that the panel's
// judgement not enter its conclusion: the elicited prior then says how
// likely the study is to convince them. The posterior under the analysis
// prior still rises with x, so the successful outcomes are again one run
// x = 0…x* or x*…n, found by bisection on the analysis posterior; the sum
// is over the design prior's predictive. Both priors must be valid.
func AssuranceUnder(design, analysis Beta, n int, goal SuccessCriterion) (AssuranceResult, error) {
	if err := design.Validate(); err != nil {
		return AssuranceResult{}, err
	}
	if err := analysisPrior(analysis); err != nil {
		return AssuranceResult{}, err
	}
	if err := goal.Validate(); err != nil {
		return AssuranceResult{}, err
	}
	if err := checkPlanTrials(n, 0, MaxPredictiveTrials); err != nil {
		return AssuranceResult{}, err
	}
	return assurance(design, analysis, n, goal), nil
}

// analysisPrior checks an analysis prior, naming its fields
// analysis_alpha and analysis_beta so that a message tells it from the
// design prior's.
func analysisPrior(b Beta) error {
	var ie *InputError
	if err := b.Validate(); errors.As(err, &ie) {
		return &InputError{Field: "analysis_" + ie.Field, Rule: ie.Rule, Detail: ie.Detail}
	} else if err != nil {
		return err
	}
	return nil
}

// assurance is AssuranceUnder for valid input.
func assurance(design, analysis Beta, n int, goal SuccessCriterion) AssuranceResult {
	below := goal.Direction == DirectionBelow
	// succeeds(x): the analysis posterior after x successes meets the
	// criterion.
	succeeds := func(x int) bool {
		p := newPosterior(analysis.Alpha+float64(x), analysis.Beta+float64(n-x))
		if below {
			return p.cdf(goal.Threshold) >= goal.Confidence
		}
		return p.sf(goal.Threshold) >= goal.Confidence
	}
	// Bisect for the boundary between failing and succeeding outcomes:
	// below, succeeds is true on 0…x* and false after; above, false
	// before x* and true on x*…n. lo and hi are the last outcome known
	// on the first side and the first known on the second (−1 and n + 1
	// stand for "none").
	lo, hi := -1, n+1
	for hi-lo > 1 {
		mid := lo + (hi-lo)/2
		if succeeds(mid) == below {
			lo = mid
		} else {
			hi = mid
		}
	}
	r := AssuranceResult{Trials: n, SuccessFrom: 0, SuccessTo: lo}
	if !below {
		r.SuccessFrom, r.SuccessTo = hi, n
	}
	r.Assurance = predictiveSum(design, n, r.SuccessFrom, r.SuccessTo)
	return r
}

// predictiveSum is P(from ≤ X ≤ to) under the beta-binomial prior
// predictive of n trials, summed term by term in logs as PriorPredictive
// does, from the end of the distribution inwards so that a small sum keeps
// its relative precision; when the span is more than half the outcomes it
// is 1 minus the sum over the others, so a point of an assurance curve
// costs at most (n + 1)/2 terms whatever its side. A sum above 1 − 1e-7
// over a shorter span is also 1 minus the outcomes outside it
// (predictiveTerms.outside): each term carries the rounding of
// ln B(x + a, n − x + b), a number near n log 2, up to 5e-10 relative at
// 10⁶ trials (it was 4e-9 while ln C(n, x) came from lgamma differences),
// so the sum itself can read 0.9999999994 where the outcomes outside hold
// 1e-44. A span of more than half the outcomes whose 1 minus the others
// is below smallSpanSum is summed itself: that difference keeps only the
// rounding of the others' sum, so an assurance of 1.16e-15 (Beta(49.9,
// 224.3), 1000 trials, P(θ > 0.347 | data) ≥ 0.99 from 433 successes)
// read 1.11e-15, and one of 1.6e-19 read 0 (found in review); a tail is
// summed from its inner end outwards, stopped once a bound on the rest is
// below 1e-17 of the sum (predictiveTerms.tail).
func predictiveSum(prior Beta, n, from, to int) float64 {
	if from > to {
		return 0
	}
	t := newPredictiveTerms(prior, n)
	if 2*(to-from+1) > n+1 {
		r := math.Max(0, 1-predictiveSum(prior, n, 0, from-1)-predictiveSum(prior, n, to+1, n))
		switch {
		case r >= smallSpanSum:
			return r
		case to == n:
			return t.tail(from, 1, 1e-17)
		case from == 0:
			return t.tail(to, -1, 1e-17)
		}
	}
	var sum neumaierSum
	if from == 0 || to != n && from < n-to {
		for x := from; x <= to; x++ {
			sum.add(t.term(x))
		}
	} else {
		for x := to; x >= from; x-- {
			sum.add(t.term(x))
		}
	}
	if s := sum.sum(); s <= 1-1e-7 {
		return math.Min(s, 1)
	}
	return math.Max(0, 1-t.outside(from-1, -1)-t.outside(to+1, 1))
}

// predictiveTerms are the beta-binomial probabilities of n trials under
// a Beta(a, b) prior, one at a time.
type predictiveTerms struct {
	a, b, lbPrior float64
	n             int
}

func newPredictiveTerms(prior Beta, n int) predictiveTerms {
	return predictiveTerms{a: prior.Alpha, b: prior.Beta, lbPrior: lnBeta(prior.Alpha, prior.Beta), n: n}
}

// term is P(X = x), computed in logs (PriorPredictive's terms).
func (t predictiveTerms) term(x int) float64 {
	fx, fnx := float64(x), float64(t.n-x)
	return math.Exp(lnChoose(t.n, x) + lnBeta(fx+t.a, fnx+t.b) - t.lbPrior)
}

// lnChoose is ln C(n, k) for 0 ≤ k ≤ n, to a few ulps of its size. As
// lnΓ(n+1) − lnΓ(k+1) − lnΓ(n−k+1) it lost about 2⁻⁵³·n ln n to the
// cancellation of three large values (7e-10 at n = 10⁶, k = n/2; 4e-8
// relative at n = 10⁹, k = 1). With j = min(k, n − k): for j below
// stirlingMin it is the sum of the j positive terms ln((n−j+i)/i); else
// Stirling's formula for each factorial with its remainder δ (stirlingRem,
// Loader's stirlerr), arranged as positive terms without cancellation
// (Loader 2000, "Fast and Accurate Computation of Binomial
// Probabilities", §2–3):
//
//	ln C(n, j) = j ln(n/j) − (n−j) ln(1 − j/n) − ½ ln(2π j (n−j)/n)
//	             + δ(n) − δ(j) − δ(n−j).
func lnChoose(n, k int) float64 {
	j := min(k, n-k)
	if j < 0 {
		return math.Inf(-1)
	}
	fn, fj := float64(n), float64(j)
	if fj < stirlingMin {
		sum := 0.0
		for i := 1; i <= j; i++ {
			sum += math.Log((fn - fj + float64(i)) / float64(i))
		}
		return sum
	}
	fr := fn - fj
	return fj*math.Log(fn/fj) - fr*math.Log1p(-fj/fn) - 0.5*math.Log(fj*(fr/fn)) - lnSqrt2Pi +
		stirlingRem(fn) - stirlingRem(fj) - stirlingRem(fr)
}

// outside is P(X ≥ x) for step +1, or P(X ≤ x) for step −1: the outcomes
// from x to the end of the distribution in that direction, summed from
// x outwards, and stopped once a bound on the rest is below 1e-18. The
// ratio of successive terms, rightwards
//
//	P(X = j + 1)/P(X = j) = (j + a)/(j + 1) · (n − j)/(n − j − 1 + b),
//
// has a first factor below 1 for a < 1 and falling in j for a ≥ 1, and a
// second that falls in j for b ≥ 1 (and rises without bound for b < 1);
// leftwards, the mirror image. So for every j beyond k the ratio is at
// most R, the product of the factors at k (1 for a factor below 1), and
// when R < 1 the terms after one of size p add up to at most p·R/(1 − R).
// When no such R exists (b < 1 rightwards, a < 1 leftwards: the
// predictive rises towards that end) every outcome is summed.
func (t predictiveTerms) outside(x, step int) float64 { return t.tail(x, step, 0) }

// smallSpanSum is the largest sum of predictive probabilities that
// predictiveSum forms as 1 minus the others only when the span is short:
// below it, the rounding of the others' sum (up to 5e-10 at 10⁶ trials)
// would be more than 1e-6 of it.
const smallSpanSum = 1e-3

// tail is outside, stopped instead once the bound on the rest is below
// rel times the sum so far, where rel > 0: a small sum, such as a small
// assurance, then keeps its relative precision.
func (t predictiveTerms) tail(x, step int, rel float64) float64 {
	var sum neumaierSum
	fn := float64(t.n)
	aUp, bUp := t.a >= 1, t.b >= 1 // the a or the b factor falls onwards
	for k := x; k >= 0 && k <= t.n; k += step {
		p := t.term(k)
		sum.add(p)
		fk := float64(k)
		near, far := (fk+t.a)/(fk+1), (fn-fk)/(fn-fk-1+t.b) // rightwards: the a factor, the b factor
		if step < 0 {
			near, far = fk/(fk-1+t.a), (fn-fk+t.b)/(fn-fk+1)
		}
		r := 1.0
		switch {
		case step > 0 && !bUp, step < 0 && !aUp:
			continue // the ratio is unbounded onwards
		case step > 0:
			r = far
			if aUp {
				r *= near
			}
		default:
			r = near
			if bUp {
				r *= far
			}
		}
		stop := 1e-18
		if rel > 0 {
			stop = rel * sum.sum()
		}
		if r < 1 && p*r/(1-r) < stop {
			break
		}
	}
	return sum.sum()
}

// AssuranceCurve is the assurance at each planned number of trials in
// ns, each as Assurance. It is not monotone in n: with a discrete outcome
// the set of successful outcomes moves in whole steps, so the curve has
// teeth (see TestAssuranceCurveTeeth).
func AssuranceCurve(prior Beta, goal SuccessCriterion, ns []int) ([]AssuranceResult, error) {
	return AssuranceCurveUnder(prior, prior, goal, ns)
}

// AssuranceCurveUnder is AssuranceCurve with a design and an analysis
// prior, each point as AssuranceUnder.
func AssuranceCurveUnder(design, analysis Beta, goal SuccessCriterion, ns []int) ([]AssuranceResult, error) {
	if err := design.Validate(); err != nil {
		return nil, err
	}
	if err := analysisPrior(analysis); err != nil {
		return nil, err
	}
	if err := goal.Validate(); err != nil {
		return nil, err
	}
	out := make([]AssuranceResult, len(ns))
	for i, n := range ns {
		if err := checkPlanTrials(n, 0, MaxPredictiveTrials); err != nil {
			return nil, err
		}
		out[i] = assurance(design, analysis, n, goal)
	}
	return out, nil
}

// PlanGrid returns up to points numbers of trials from 1 to max for a
// curve over n: every n when max ≤ points, else max·k/points rounded,
// k = 1…points, without repeats. It returns nil for max < 1 or points < 1.
func PlanGrid(max, points int) []int {
	if max < 1 || points < 1 {
		return nil
	}
	if max <= points {
		ns := make([]int, max)
		for i := range ns {
			ns[i] = i + 1
		}
		return ns
	}
	ns := make([]int, 0, points)
	for k := 1; k <= points; k++ {
		n := int(math.Round(float64(max) * float64(k) / float64(points)))
		if len(ns) == 0 || n > ns[len(ns)-1] {
			ns = append(ns, n)
		}
	}
	return ns
}

// predictiveTieTol is the rounding PredictiveQuantile forgives: far
// above the error of a small predictive's sums, far below any
// probability a reader tells apart.
const predictiveTieTol = 1e-12

// PredictiveQuantile is the smallest outcome x with P(X ≤ x) ≥ p under
// the distribution pmf of x = 0…len(pmf)−1 (such as PriorPredictive's),
// for p in (0, 1]. Sums are compensated, and a sum within
// predictiveTieTol of p counts as reaching it: the probabilities come
// from exp of sums of log-gamma terms and carry relative errors of order
// 1e-15, so where P(X ≤ x) = p exactly (the uniform prior's predictive of
// 3 trials at its median, 0.25 + 0.25) the computed sum may fall a few
// ulps short and give x + 1 (SciPy's betabinom.ppf gives x).
func PredictiveQuantile(pmf []float64, p float64) int {
	var sum neumaierSum
	for x, v := range pmf {
		sum.add(v)
		if sum.sum() >= p-predictiveTieTol {
			return x
		}
	}
	return len(pmf) - 1
}

// PredictiveCDF is P(X ≤ x) for x = 0…len(pmf)−1 under the distribution
// pmf (such as PriorPredictive's): the compensated sum up to x where that
// is at most one half, else 1 minus the sum beyond x, so that the last
// value is 1 exactly and a value near 1 keeps its distance from 1, which
// the sum of every probability, each carrying the rounding of its
// log-gamma terms, does not (it left 0.99999999 at the last outcome of
// Beta(3e6, 2) and 1000 trials).
func PredictiveCDF(pmf []float64) []float64 {
	cdf := make([]float64, len(pmf))
	var above neumaierSum // P(X > x)
	for x := len(pmf) - 1; x >= 0; x-- {
		cdf[x] = 1 - above.sum()
		above.add(pmf[x])
	}
	var upTo neumaierSum
	for x, p := range pmf {
		upTo.add(p)
		if s := upTo.sum(); s <= 0.5 {
			cdf[x] = s
		}
	}
	return cdf
}

// PriorWorth is what a Beta(α, β) prior is worth in observed trials: its
// effective sample size α + β, the number of binomial trials whose
// information the prior carries under the conjugate update, as if α
// successes and β failures had been seen (Morita, Thall & Müller 2008,
// "Determining the effective sample size of a parametric prior",
// Biometrics 64(2), where the ESS of Beta(α, β) is α + β).
type PriorWorth struct {
	Trials    float64 `json:"trials"`
	Successes float64 `json:"successes"`
	Failures  float64 `json:"failures"`
}

// Worth is the prior's effective sample size and its split into imagined
// successes and failures.
func Worth(d Beta) PriorWorth {
	return PriorWorth{Trials: d.Alpha + d.Beta, Successes: d.Alpha, Failures: d.Beta}
}

// DataShare is n/(n + α + β), the weight n observed trials get in the
// posterior mean: after x successes in n trials the posterior mean is
// (1 − w)·α/(α + β) + w·x/n with w = DataShare(n), a weighted average of
// the prior mean and the observed proportion (Gelman et al. 2013, BDA3
// §2.4).
func (w PriorWorth) DataShare(n int) float64 {
	return float64(n) / (float64(n) + w.Trials)
}

// WorthOf says in plain words what d weighs: in observed trials for a
// proportion on [0, 1] (PriorWorth.Words, its counts written by shape as
// the caller writes d's α and β), and as α + β itself on other bounds,
// where trials mean nothing.
func WorthOf(d ScaledBeta, shape func(float64) string) string {
	if d.OnUnit() {
		return Worth(d.Beta).Words(shape)
	}
	return "α + β = " + ESSText(d.Alpha+d.Beta.Beta) + ": how strongly the prior holds its shape (not a number of trials on these bounds)"
}

// Words says in plain words what the prior is worth: WorthInTrials with
// its split into successes and failures, "worth about 40 observed trials
// (2 successes and 38 failures)". The successes and failures are the
// Beta's α and β, written by shape as the page or command writes them in
// the Beta beside this line: beside Beta(3, 20000) they are "3 successes
// and 20000 failures", where whole counts said 19997, a figure the Beta
// does not show, and beside Beta(0.99997, 5) "0.99997 successes", where
// four figures said "1 success". A count is singular only when written
// "1" (which a shape written to its own side of 1, ShapeDigits, is only
// when it is 1).
func (w PriorWorth) Words(shape func(float64) string) string {
	return WorthInTrials(w.Trials) + " (" + countedAs(shape(w.Successes), "success", "successes") + " and " + countedAs(shape(w.Failures), "failure", "failures") + ")"
}

// WorthInTrials is the one phrase for what a prior on a proportion
// whose effective sample size α + β is ess is worth, wherever Parley
// says it (the pages, the commands, a near-certainty warning): "worth
// about 58.51 observed trials", the number of binomial trials whose
// information the prior carries (PriorWorth), written by ESSText.
func WorthInTrials(ess float64) string {
	return "worth about " + counted(ess, "observed trial", "observed trials")
}

// ESSText writes an effective sample size α + β, or a count of
// successes or failures, as Parley writes it everywhere: four
// significant figures, as the pages write α and β, so that α + β reads
// as their sum (Beta(3.456, 55.05) is worth about 58.51 trials); whole
// from 1000 up, so that a count is not rounded to tens (15366, not
// 15370); without an exponent below a billion, and with one written as
// the pages write theirs (2e-6 and 1.5e9, not 2e-06 and 1.5e+09).
func ESSText(v float64) string {
	if v >= 1000 && v < 1e9 {
		return strconv.FormatFloat(v, 'f', 0, 64)
	}
	s := strconv.FormatFloat(v, 'g', 4, 64)
	if mant, exp, ok := strings.Cut(s, "e"); ok {
		sign := ""
		if exp[0] == '-' {
			sign = "-"
		}
		s = mant + "e" + sign + strings.TrimLeft(exp[1:], "0")
	}
	return s
}

// counted is ESSText(v) with its noun, singular when it reads as 1.
func counted(v float64, one, many string) string { return countedAs(ESSText(v), one, many) }

// countedAs is the written count s with its noun, singular when s is "1".
func countedAs(s, one, many string) string {
	if s != "1" {
		return s + " " + many
	}
	return "1 " + one
}

// PredictiveMoments are the mean and standard deviation of the number of
// successes in n trials under the beta-binomial prior predictive of a
// Beta(α, β) prior (Johnson, Kemp & Kotz 2005, "Univariate Discrete
// Distributions", 3rd ed., §6.7.2): nα/(α+β) and
// √(nαβ(α+β+n)/((α+β)²(α+β+1))).
func PredictiveMoments(prior Beta, n int) (mean, sd float64) {
	a, b, fn := prior.Alpha, prior.Beta, float64(n)
	s := a + b
	return fn * prior.Mean(), math.Sqrt(fn * a * b * (s + fn) / (s * s * (s + 1)))
}

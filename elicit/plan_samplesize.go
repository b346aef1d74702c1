package elicit

import (
	"context"
	"fmt"
	"math"
	"sort"
)

// Criterion names a Bayesian sample-size criterion for estimating a
// proportion (Joseph, Wolfson & du Berger 1995, "Sample size calculations
// for binomial proportions via highest posterior density intervals", The
// Statistician 44(2); M'Lan, Joseph & Wolfson 2008, "Bayesian sample size
// determination for binomial proportions", Bayesian Analysis 3(2)).
type Criterion string

// The sample-size criteria. With level 1 − a and length l:
const (
	// CriterionALC, average length: the posterior credible interval with
	// coverage 1 − a is on average, over the prior predictive
	// distribution of the outcome, at most l wide.
	CriterionALC Criterion = "alc"
	// CriterionACC, average coverage: the posterior credible interval of
	// length l covers on average at least 1 − a.
	CriterionACC Criterion = "acc"
	// CriterionWOC, worst outcome: for every outcome the posterior
	// credible interval with coverage 1 − a is at most l wide, or
	// equivalently the interval of length l covers at least 1 − a (the
	// width at a coverage and the coverage at a width of these intervals
	// rise together). "Every outcome" is every x = 0…n, or with Trim > 0
	// the outcomes left when the least likely ones, of total predictive
	// probability at most Trim, are set aside (in the spirit of the
	// modified worst-outcome criteria of the literature, which ignore
	// outcomes of small predictive probability; this rule is our own).
	CriterionWOC Criterion = "woc"
)

// IntervalKind names the kind of credible interval a criterion uses.
type IntervalKind string

// The kinds of interval.
const (
	// IntervalEqual: equal-tailed. At a coverage, the quantiles at
	// (1 ∓ level)/2 (EqualTailed); at a length l, the interval [c, c + l]
	// with equal probability in each tail.
	IntervalEqual IntervalKind = "equal"
	// IntervalHPD: highest posterior density. At a coverage, the shortest
	// interval (HDI); at a length, the interval of that length with the
	// most probability.
	IntervalHPD IntervalKind = "hpd"
)

// MaxSampleSize is the largest number of trials SampleSize searches and
// CriterionValue evaluates. A criterion at n costs n + 1 posterior
// intervals (a few microseconds each), and the search evaluates it at
// many n.
const MaxSampleSize = 100_000

// scanWork is how many posterior intervals (or their cost in predictive
// probabilities, see predictiveCost) SampleSize spends checking every n in
// turn from 1 before it brackets and bisects (see SampleSize). An n that
// fails usually costs a fraction of its n + 1 intervals (criterionAt
// stops once the failure is certain), so the scan reaches n ≈ 1100–1400
// for ALC and ACC under a vague prior and a few thousand under an
// informative one, and the worst outcome without trimming (no predictive
// needed, and the first interval usually decides) up to the limit.
// Measured on this project's machine: at most about 2–4 s of CPU.
const scanWork = 400_000

// tailMass is the predictive probability left out of the average
// criteria at each end: outcomes whose total probability is at most
// tailMass/2 on each side. Widths and coverages lie in [0, 1], so the
// averages move by at most tailMass, below the rounding of the sum.
const tailMass = 1e-15

// SampleSizeGoal is what a study of a proportion should achieve: a
// criterion on an interval kind, at a coverage level and a length.
type SampleSizeGoal struct {
	Criterion Criterion    `json:"criterion"`
	Interval  IntervalKind `json:"interval"`
	Level     float64      `json:"level"`  // coverage 1 − a
	Length    float64      `json:"length"` // l, on the proportion's scale
	// Trim (WOC only) is the predictive probability of unlikely outcomes
	// the worst outcome may ignore, in [0, 1); 0 for the plain WOC.
	Trim float64 `json:"trim"`
}

// Validate checks the goal: a known criterion and interval kind, level
// and length strictly inside (0, 1), and trim in [0, 1) and zero unless
// the criterion is WOC.
func (g SampleSizeGoal) Validate() error {
	switch g.Criterion {
	case CriterionALC, CriterionACC, CriterionWOC:
	default:
		return inputErr("criterion", RuleUnknown, "%q: alc, acc or woc", g.Criterion)
	}
	switch g.Interval {
	case IntervalEqual, IntervalHPD:
	default:
		return inputErr("interval", RuleUnknown, "%q: equal or hpd", g.Interval)
	}
	if err := checkCentral("level", g.Level); err != nil {
		return err
	}
	if err := checkOpenProb("length", g.Length); err != nil {
		return err
	}
	if math.IsNaN(g.Trim) || math.IsInf(g.Trim, 0) {
		return inputErr("trim", RuleFinite, "got %v", g.Trim)
	}
	if !(g.Trim >= 0 && g.Trim < 1) {
		return inputErr("trim", RuleTrimRange, "got %v", g.Trim)
	}
	if g.Trim != 0 && g.Criterion != CriterionWOC {
		return inputErr("trim", RuleTrimWOCOnly, "criterion %s", g.Criterion)
	}
	return nil
}

// Rules of the sample-size goal.
const (
	RuleTrimRange   Rule = "must be at least 0 and below 1"
	RuleTrimWOCOnly Rule = "applies only to the worst outcome criterion (woc)"
	// RuleSizeNeedsLength: a setting of the goal (its level, criterion,
	// interval or trim) given without the interval's length.
	RuleSizeNeedsLength Rule = "applies to the sample size: give the interval's length too"
)

// CheckSizeSettings refuses settings of a sample-size goal given without
// the goal's length: with no length no sample size is worked out, so a
// level, criterion, interval or trim typed alone would be dropped in
// silence. withLength says whether the length was given; given names the
// settings that were, in the order to report them, and the error names
// the first. The command line and the study page's form both ask it.
func CheckSizeSettings(withLength bool, given ...string) error {
	if withLength || len(given) == 0 {
		return nil
	}
	return &InputError{Field: given[0], Rule: RuleSizeNeedsLength}
}

// met reports whether a criterion's value meets the goal: an average or
// worst width at most Length (ALC, WOC), or an average coverage at least
// Level (ACC).
func (g SampleSizeGoal) met(v float64) bool {
	if g.Criterion == CriterionACC {
		return v >= g.Target()
	}
	return v <= g.Target()
}

// Target is the value the criterion's value is held to: the level for
// ACC (an average coverage of at least it), else the length (a width of
// at most it). Pages write a criterion's value on its own side of it
// (SideDigits).
func (g SampleSizeGoal) Target() float64 {
	if g.Criterion == CriterionACC {
		return g.Level
	}
	return g.Length
}

// CriterionResult is a criterion evaluated at n trials.
type CriterionResult struct {
	Trials int `json:"trials"`
	// Value is the expected width (ALC), the average coverage (ACC) or
	// the worst width (WOC).
	Value float64 `json:"value"`
	// Worst (WOC only) is the outcome with the widest interval.
	Worst int  `json:"worst"`
	Met   bool `json:"met"`
}

// CriterionValue evaluates the goal's criterion for a study of n trials
// under the prior, by summing over all n + 1 outcomes:
//
//	ALC: Σₓ P(X = x) · w(x),   w(x) the width of the posterior interval at Level
//	ACC: Σₓ P(X = x) · c(x),   c(x) the coverage of the posterior interval of width Length
//	WOC: maxₓ w(x)             over all x, or the x kept after Trim
//
// with P(X = x) the beta-binomial prior predictive (PriorPredictive) and
// the posterior Beta(A + x, B + n − x). For ALC and ACC, outcomes in the
// far tails with predictive probability at most tailMass/2 on each side
// are left out; they move the sum by less than its rounding. It needs
// 1 ≤ n ≤ MaxSampleSize.
func CriterionValue(prior Beta, goal SampleSizeGoal, n int) (CriterionResult, error) {
	return CriterionValueUnder(prior, prior, goal, n)
}

// CriterionValueUnder is CriterionValue with a design prior, whose
// predictive gives each outcome's probability, and an analysis prior,
// whose posterior Beta(a + x, b + n − x) gives each outcome's interval
// (the two priors of Wang & Gelfand 2002, Statist. Sci. 17(2), "sampling"
// and "fitting"; De Santis 2007, J. R. Statist. Soc. A 170(1), for these
// criteria). The untrimmed worst outcome does not depend on the design
// prior: it is the widest interval over every outcome.
func CriterionValueUnder(design, analysis Beta, goal SampleSizeGoal, n int) (CriterionResult, error) {
	if err := design.Validate(); err != nil {
		return CriterionResult{}, err
	}
	if err := analysisPrior(analysis); err != nil {
		return CriterionResult{}, err
	}
	if err := goal.Validate(); err != nil {
		return CriterionResult{}, err
	}
	if err := checkPlanTrials(n, 1, MaxSampleSize); err != nil {
		return CriterionResult{}, err
	}
	r, _, err := criterionAt(design, analysis, goal, n, false)
	return r, err
}

// criterionAt evaluates the criterion at n and also returns how many
// posterior intervals it computed. With settle true it may stop as soon
// as the outcomes seen so far prove that the goal fails at n, which is all
// the search needs of an n that fails: Met is then false and Value only a
// bound (at least the expected or worst width, at most the average
// coverage). To settle early it visits the outcomes from the one most
// likely to decide outwards (see outward): the most probable outcome for
// ALC and ACC, the kept outcome whose posterior has the largest variance
// for WOC.
//
// The outcomes' probabilities are the design prior's predictive, each
// outcome's interval the analysis prior's posterior.
func criterionAt(design, analysis Beta, goal SampleSizeGoal, n int, settle bool) (CriterionResult, int, error) {
	r := CriterionResult{Trials: n}
	count := 0
	var pmf []float64
	if goal.Criterion != CriterionWOC || goal.Trim > 0 {
		var err error
		if pmf, err = PriorPredictive(design, n); err != nil {
			return CriterionResult{}, 0, err
		}
		// A predictive probability costs about a tenth of a posterior
		// interval (three log-gamma functions and a log-beta).
		count += (n + 1) / predictiveCost
	}
	tail := (1 - goal.Level) / 2
	measure := func(x int, s *warm) float64 {
		p := newPosterior(analysis.Alpha+float64(x), analysis.Beta+float64(n-x))
		s.move(p)
		switch {
		case goal.Criterion == CriterionACC && goal.Interval == IntervalEqual:
			return p.equalCoverage(goal.Length, s)
		case goal.Criterion == CriterionACC:
			return p.hpdCoverage(goal.Length, s)
		case goal.Interval == IntervalEqual:
			return p.equalWidth(tail, s)
		}
		return p.hpdWidth(goal.Level, s)
	}
	if goal.Criterion == CriterionWOC {
		// The widest posterior interval is usually where the posterior
		// variance, (A+x)(B+n−x)/((A+B+n)²(A+B+n+1)), is largest: at
		// x = (n + B − A)/2, or the kept x nearest it.
		start := int(math.Round(math.Min(math.Max((float64(n)+analysis.Beta-analysis.Alpha)/2, 0), float64(n))))
		var keep []bool
		if goal.Trim > 0 {
			keep = keptOutcomes(pmf, goal.Trim)
			best := math.Inf(-1)
			for x, k := range keep {
				if v := (analysis.Alpha + float64(x)) * (analysis.Beta + float64(n-x)); k && v > best {
					start, best = x, v
				}
			}
		}
		r.Value = math.Inf(-1)
		outward(start, 0, n, func(x int, s *warm) bool {
			if keep != nil && !keep[x] {
				return true
			}
			count++
			if w := measure(x, s); w > r.Value {
				r.Value, r.Worst = w, x
			}
			return !(settle && r.Value > goal.Length)
		})
	} else {
		lo, hi := centralOutcomes(pmf, tailMass/2)
		start := lo
		for x := lo; x <= hi; x++ {
			if pmf[x] > pmf[start] {
				start = x
			}
		}
		var sum, seen neumaierSum
		total := 0.0
		for x := lo; x <= hi; x++ {
			total += pmf[x]
		}
		outward(start, lo, hi, func(x int, s *warm) bool {
			count++
			sum.add(pmf[x] * measure(x, s))
			seen.add(pmf[x])
			if !settle {
				return true
			}
			// Widths are at least 0 and coverages at most 1, so the
			// outcomes not yet seen can add at least nothing to the
			// expected width and at most their probability to the
			// average coverage.
			if goal.Criterion == CriterionACC {
				return !(sum.sum()+(total-seen.sum())*(1+1e-12) < goal.Level)
			}
			return !(sum.sum() > goal.Length)
		})
		r.Value = sum.sum()
	}
	if math.IsNaN(r.Value) || math.IsInf(r.Value, 0) {
		return CriterionResult{}, count, fmt.Errorf("elicit: the %s criterion at %d trials is not a finite number", goal.Criterion, n)
	}
	r.Met = goal.met(r.Value)
	return r, count, nil
}

// outward calls visit for the outcomes from start outwards within
// [lo, hi]: start, start+1, start−1, start+2, … , each side with its own
// warm start, so that every interval still begins from its neighbour's.
// It stops when visit returns false.
func outward(start, lo, hi int, visit func(x int, s *warm) bool) {
	var right, left warm
	if !visit(start, &right) {
		return
	}
	left = right // move() measures each side's shift from its own last mean
	for d := 1; start+d <= hi || start-d >= lo; d++ {
		if x := start + d; x <= hi && !visit(x, &right) {
			return
		}
		if x := start - d; x >= lo && !visit(x, &left) {
			return
		}
	}
}

// predictiveCost is how many predictive probabilities cost as much as one
// posterior interval, for the scan's account of its work (measured: about
// 0.3 µs against 3 µs).
const predictiveCost = 10

// centralOutcomes returns the outcomes [lo, hi] left when those at each
// end with total probability at most tail are set aside.
func centralOutcomes(pmf []float64, tail float64) (lo, hi int) {
	lo, hi = 0, len(pmf)-1
	var s neumaierSum
	for lo < hi {
		s.add(pmf[lo])
		if s.sum() > tail {
			break
		}
		lo++
	}
	s = neumaierSum{}
	for hi > lo {
		s.add(pmf[hi])
		if s.sum() > tail {
			break
		}
		hi--
	}
	return lo, hi
}

// keptOutcomes marks the outcomes a trimmed worst-outcome criterion looks
// at: all of them for trim 0; otherwise, taking outcomes from the least
// likely up (ties: the larger x first), those set aside while their total
// probability stays at most trim are dropped. The most likely outcome is
// always kept.
func keptOutcomes(pmf []float64, trim float64) []bool {
	keep := make([]bool, len(pmf))
	for i := range keep {
		keep[i] = true
	}
	if trim == 0 {
		return keep
	}
	order := make([]int, len(pmf))
	for i := range order {
		order[i] = i
	}
	sort.Slice(order, func(i, j int) bool {
		a, b := order[i], order[j]
		if pmf[a] != pmf[b] {
			return pmf[a] < pmf[b]
		}
		return a > b
	})
	var dropped neumaierSum
	for _, x := range order[:len(order)-1] {
		dropped.add(pmf[x])
		if dropped.sum() > trim {
			break
		}
		keep[x] = false
	}
	return keep
}

// SampleSizeResult is the smallest number of trials that meets a goal.
type SampleSizeResult struct {
	Goal SampleSizeGoal `json:"goal"`
	N    int            `json:"n"`
	// At is the criterion at N.
	At CriterionResult `json:"at"`
	// Exhaustive is true when every n from 1 to N − 1 was evaluated and
	// fails, so N is certainly the smallest. When false, the n from 1 to
	// ScannedTo were evaluated and fail, and N was found above them by
	// bisection (see SampleSize).
	Exhaustive bool `json:"exhaustive"`
	ScannedTo  int  `json:"scanned_to"`
	// After N, the n from N + 1 to CheckedTo were evaluated too (at
	// least ten, up to N more, as the cost allows); FailsAgainAt is the
	// first of them that fails the goal, or 0. A criterion met at N that
	// fails again soon after is not settled at N: look at it over n.
	CheckedTo    int `json:"checked_to"`
	FailsAgainAt int `json:"fails_again_at"`
	// WithoutData is the criterion at n = 0: the prior's own interval,
	// before any trial. When it is met, the prior alone already meets the
	// goal, and N = 1 is only where the search starts, not a study the
	// goal needs (a strong prior, or one too sure of itself).
	WithoutData CriterionResult `json:"without_data"`
}

// SampleSize is the smallest number of trials n ≥ 1 whose criterion
// meets the goal (see CriterionValue for the sums; Joseph, Wolfson &
// du Berger 1995; M'Lan, Joseph & Wolfson 2008). For example, ALC with
// equal-tailed intervals gives the smallest n with
//
//	Σₓ P(X = x | n) · (Q_x((1 + level)/2) − Q_x((1 − level)/2)) ≤ length,
//
// Q_x the quantile function of the posterior after x successes.
//
// These criteria need not be monotone in n: the outcome is discrete and
// the posteriors of a skewed prior can widen as data arrive, so a
// criterion met at some n can fail at a larger one. Two cases the tests
// show (TestSampleSizeNotMonotone): for Beta(2, 38) the worst outcome is
// all successes, whose posterior widens as n grows from 1 to about 17 (the
// worst 95% width goes 0.153, 0.172, …, 0.241) before it narrows; and
// for the J-shaped Beta(0.1, 20) the average width of the 50% intervals
// rises from 0.0020 at n = 1 to 0.0033 at n ≈ 35. The trimmed worst
// outcome also jumps as outcomes join or leave the kept set: for
// Beta(2, 38), 90% intervals of width 0.1 with trim 0.05 are met at
// n = 53 and fail at 55, and bisection from n = 1 would answer 58
// (TestSampleSizeScanFindsWhatBisectionMisses). The definition is the
// smallest n, so SampleSize first evaluates every n in turn from 1, which
// finds the smallest wherever it lies, and stops there when the criterion
// is met. Only when that scan has cost scanWork posterior intervals
// without success (for ALC and ACC beyond n ≈ 1100–1400 under a vague
// prior, a few thousand under an informative one; the untrimmed WOC is
// scanned to the limit) does it bracket the answer by doubling n and
// bisect, which returns the smallest n above the scan only where the
// criterion, once met, stays met. The
// result says which (Exhaustive). SampleSizeExhaustive always scans.
// Either way it then evaluates the n just above the answer and reports
// the first that fails again (FailsAgainAt).
//
// It refuses with RuleSampleSizeUnreachable (field "length") when no n up
// to MaxSampleSize meets the goal, and stops with ctx's error when ctx is
// done.
func SampleSize(ctx context.Context, prior Beta, goal SampleSizeGoal) (SampleSizeResult, error) {
	return sampleSize(ctx, prior, prior, goal, scanWork, MaxSampleSize)
}

// SampleSizeUnder is SampleSize with a design and an analysis prior, each
// n's criterion as CriterionValueUnder; WithoutData is the analysis
// prior's own interval, the one the analysis starts from.
func SampleSizeUnder(ctx context.Context, design, analysis Beta, goal SampleSizeGoal) (SampleSizeResult, error) {
	return sampleSize(ctx, design, analysis, goal, scanWork, MaxSampleSize)
}

// SampleSizeExhaustiveUnder is SampleSizeExhaustive with a design and an
// analysis prior.
func SampleSizeExhaustiveUnder(ctx context.Context, design, analysis Beta, goal SampleSizeGoal) (SampleSizeResult, error) {
	return sampleSize(ctx, design, analysis, goal, math.MaxInt, MaxSampleSize)
}

// SampleSizeExhaustive is SampleSize with no limit on the scan: it
// evaluates every n from 1 until the criterion is met, so the answer is
// always the smallest. The cost grows as the square of the answer: about
// n²/2 posterior intervals, minutes for n in the tens of thousands.
func SampleSizeExhaustive(ctx context.Context, prior Beta, goal SampleSizeGoal) (SampleSizeResult, error) {
	return sampleSize(ctx, prior, prior, goal, math.MaxInt, MaxSampleSize)
}

// sampleSize scans every n from 1 until the criterion is met or the scan
// has computed budget posterior intervals, then brackets and bisects; no
// n above maxN is evaluated. Outcomes are drawn from design, intervals
// taken under analysis.
func sampleSize(ctx context.Context, design, analysis Beta, goal SampleSizeGoal, budget, maxN int) (SampleSizeResult, error) {
	if err := design.Validate(); err != nil {
		return SampleSizeResult{}, err
	}
	if err := analysisPrior(analysis); err != nil {
		return SampleSizeResult{}, err
	}
	if err := goal.Validate(); err != nil {
		return SampleSizeResult{}, err
	}
	eval := func(n int) (CriterionResult, int, error) {
		if err := ctx.Err(); err != nil {
			return CriterionResult{}, 0, err
		}
		return criterionAt(design, analysis, goal, n, true)
	}
	res := SampleSizeResult{Goal: goal}
	// n = 0 costs one interval: the analysis prior itself (the predictive
	// is the single outcome 0 with probability 1).
	without, _, err := criterionAt(design, analysis, goal, 0, false)
	if err != nil {
		return SampleSizeResult{}, err
	}
	res.WithoutData = without
	work, n := 0, 1
	for ; n <= maxN; n++ {
		r, cost, err := eval(n)
		if err != nil {
			return SampleSizeResult{}, err
		}
		if r.Met {
			res.N, res.At, res.Exhaustive, res.ScannedTo = n, r, true, n-1
			return res, res.checkAfter(eval, maxN)
		}
		res.ScannedTo = n
		if work += cost; work >= budget {
			break
		}
	}
	if n >= maxN {
		return SampleSizeResult{}, unreachable(goal, maxN)
	}
	// Bracket: lo fails; double the step until hi meets the goal.
	lo, hi, step := n, n, n
	var at CriterionResult
	for {
		hi = min(lo+step, maxN)
		r, _, err := eval(hi)
		if err != nil {
			return SampleSizeResult{}, err
		}
		if r.Met {
			at = r
			break
		}
		if hi == maxN {
			return SampleSizeResult{}, unreachable(goal, maxN)
		}
		lo, step = hi, 2*step
	}
	for hi-lo > 1 {
		mid := lo + (hi-lo)/2
		r, _, err := eval(mid)
		if err != nil {
			return SampleSizeResult{}, err
		}
		if r.Met {
			hi, at = mid, r
		} else {
			lo = mid
		}
	}
	res.N, res.At = hi, at
	return res, res.checkAfter(eval, maxN)
}

// checkAfter evaluates n = N + 1, N + 2, … for at least ten and at most
// N values, while they cost no more than scanWork/4 posterior intervals,
// and records the first that fails the goal.
func (res *SampleSizeResult) checkAfter(eval func(int) (CriterionResult, int, error), maxN int) error {
	work := 0
	res.CheckedTo = res.N
	for n := res.N + 1; n <= maxN && n <= res.N+max(10, res.N) && work < scanWork/4; n++ {
		r, cost, err := eval(n)
		if err != nil {
			return err
		}
		res.CheckedTo, work = n, work+cost
		if !r.Met {
			res.FailsAgainAt = n
			return nil
		}
	}
	return nil
}

func unreachable(goal SampleSizeGoal, maxN int) error {
	return inputErr("length", RuleSampleSizeUnreachable, "%s with %s intervals at level %v and length %v: not met by any n up to %d",
		goal.Criterion, goal.Interval, goal.Level, goal.Length, maxN)
}

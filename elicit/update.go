package elicit

import (
	"fmt"
	"math"
	"sort"
	"strings"
)

// MaxPredictiveTrials is the largest planned number of trials for which
// PriorPredictive and ConflictCheck list the whole distribution of
// successes (one float64 per count).
const MaxPredictiveTrials = 1_000_000

// MaxUpdateTrials is the largest number of trials Posterior accepts: the
// posterior's α and β must stay within MaxShape, the accuracy envelope
// of the Beta's CDF and quantiles, and 10⁶ trials leave every prior up to
// 9·10⁶ room; it is also MaxPredictiveTrials, so the prior-data conflict
// check is always available.
const MaxUpdateTrials = 1_000_000

// Posterior is the conjugate update of a Beta prior by binomial data,
// s successes in n trials:
//
//	Beta(α, β) prior, s | θ ~ Binomial(n, θ)  ⇒  θ | s ~ Beta(α + s, β + n − s)
//
// (Gelman et al. 2013, "Bayesian Data Analysis", 3rd ed., §2.4). It needs
// a valid prior, 0 ≤ s ≤ n ≤ MaxUpdateTrials and a posterior within
// MaxShape (RulePosteriorRange).
func Posterior(prior Beta, successes, trials int) (Beta, error) {
	if err := checkData(prior, successes, trials); err != nil {
		return Beta{}, err
	}
	post := Beta{Alpha: prior.Alpha + float64(successes), Beta: prior.Beta + float64(trials-successes)}
	if post.Alpha > MaxShape {
		return Beta{}, inputErr("successes", RulePosteriorRange, "posterior alpha %v", post.Alpha)
	}
	if post.Beta > MaxShape {
		return Beta{}, inputErr("trials", RulePosteriorRange, "posterior beta %v", post.Beta)
	}
	return post, nil
}

func checkData(prior Beta, successes, trials int) error {
	if err := prior.Validate(); err != nil {
		return err
	}
	if trials < 0 {
		return inputErr("trials", RuleNonNegative, "got %d", trials)
	}
	if trials > MaxUpdateTrials {
		return inputErr("trials", RuleCountRange, "%d is above the limit %d", trials, MaxUpdateTrials)
	}
	if successes < 0 {
		return inputErr("successes", RuleNonNegative, "got %d", successes)
	}
	if successes > trials {
		return inputErr("successes", RuleCountRange, "%s in %s", counted(float64(successes), "success", "successes"), counted(float64(trials), "trial", "trials"))
	}
	return nil
}

// checkLevel checks a credible level (checkCentral).
func checkLevel(level float64) error { return checkCentral("level", level) }

// MaxCentral is the largest coverage of a central interval, 1 − 2e-12:
// each tail (1 − c)/2 at least MinProb, the accuracy envelope of
// quantiles. As a float64 it is the number typed as 0.999999999998, whose
// tail computed in float64, (1 − c)/2 = 9.99978e-13, falls short of
// MinProb by the rounding of c alone (2.2e-17); it is taken, as its rule
// says (centralTails).
const MaxCentral = 1 - 2*MinProb

// MinCentral is the smallest coverage of a central interval, MinProb =
// 1e-12, the least probability of the accuracy envelope, as it is the
// least a success criterion's confidence may be. Below it the interval
// holds next to no chance and its ends are the median in all but name: a
// moment match's z = Φ⁻¹((1 + c)/2) rounded to 0 and its sd to +Inf,
// which was reported as an infinite interval. (A highest-density
// interval at 1e-12 still holds its mode, TestHDIAtATinyLevelHoldsTheMode.)
const MinCentral = MinProb

// checkCentral checks the coverage of a central interval (a credible
// level, an interval's coverage, a four-value confidence): finite,
// strictly inside (0, 1), at least MinCentral and at most MaxCentral. A comparison of the
// computed tail with MinProb refused MaxCentral itself, the largest
// value the rule names.
func checkCentral(field string, c float64) error {
	if math.IsNaN(c) || math.IsInf(c, 0) {
		return inputErr(field, RuleFinite, "got %v", c)
	}
	if !(c > 0 && c < 1) {
		return inputErr(field, RuleProbOpen, "got %v", c)
	}
	if c > MaxCentral {
		return inputErr(field, RuleCentralTails, "each tail (1 - %s)/2 = %v is below %v", field, (1-c)/2, MinProb)
	}
	if c < MinCentral {
		return inputErr(field, RuleCentralNarrow, "got %v", c)
	}
	return nil
}

// centralTails are the probabilities below and above a central interval
// of coverage c ≤ MaxCentral: (1 − c)/2 and (1 + c)/2, held within
// [MinProb, 1 − MinProb], which only the rounding of c at MaxCentral
// itself leaves (by 2.2e-17).
func centralTails(c float64) (lo, hi float64) {
	return max((1-c)/2, MinProb), min((1+c)/2, 1-MinProb)
}

// EqualTailed is the equal-tailed credible interval with coverage level:
// the quantiles at (1 − level)/2 and (1 + level)/2 (Gelman et al. 2013,
// BDA3 §2.3, "central posterior interval").
func EqualTailed(d Beta, level float64) (lo, hi float64, err error) {
	if err := d.Validate(); err != nil {
		return 0, 0, err
	}
	if err := checkLevel(level); err != nil {
		return 0, 0, err
	}
	tail := (1 - level) / 2
	return d.Quantile(tail), d.Quantile(1 - tail), nil
}

// HDI is the highest-density interval with coverage level: the shortest
// interval [lo, hi] with F(hi) − F(lo) = level (Box & Tiao 1973, "Bayesian
// Inference in Statistical Analysis", §2.8; Gelman et al. 2013, BDA3
// §2.3). By the shape of the density:
//
//   - α > 1 and β > 1 (unimodal, log-concave): the interval whose ends
//     have equal density, f(lo) = f(hi), the first-order condition for the
//     least width Q(t + level) − Q(t) over the lower tail mass t. With a
//     log-concave density log f(Q(t + level)) − log f(Q(t)) decreases in t,
//     so its root is bracketed in [0, 1 − level] (see hdiInterior).
//   - density non-increasing (α ≤ 1 ≤ β, not both 1): [0, Q(level)].
//   - density non-decreasing (β ≤ 1 ≤ α, not both 1): [Q(1 − level), 1].
//   - Beta(1, 1), uniform: every interval of width level is shortest; HDI
//     returns the central one.
//   - α < 1 and β < 1 (U-shaped): the highest-density region is two
//     pieces against the bounds, not an interval; HDI returns the shorter
//     of [0, Q(level)] and [Q(1 − level), 1], the shortest single
//     interval, since the width is then concave in t.
func HDI(d Beta, level float64) (lo, hi float64, err error) {
	if err := d.Validate(); err != nil {
		return 0, 0, err
	}
	if err := checkLevel(level); err != nil {
		return 0, 0, err
	}
	a, b := d.Alpha, d.Beta
	switch {
	case a == 1 && b == 1:
		return (1 - level) / 2, (1 + level) / 2, nil
	case a <= 1 && b >= 1:
		return 0, d.Quantile(level), nil
	case b <= 1 && a >= 1:
		return d.Quantile(1 - level), 1, nil
	case a < 1 && b < 1:
		left, right := d.Quantile(level), d.Quantile(1-level)
		if left <= 1-right {
			return 0, left, nil
		}
		return right, 1, nil
	}
	lo, hi = hdiInterior(d, level)
	return lo, hi, nil
}

// HDINote says, in words, how the highest-density interval [lo, hi] of d
// (HDI's) is to be read when d's shape makes it other than an interval
// around an interior mode, by the same cases as HDI, and when an end of
// an interval around a mode lies closer to a bound than float64 holds
// (α or β just above 1, whose density climbs from 0 within 10^-1000 of
// the bound): "" for a Beta with both shapes above 1 and ends that are
// not bounds, or the uniform. name is what the words call d ("the
// posterior").
func HDINote(d Beta, lo, hi float64, name string) string {
	a, b := d.Alpha, d.Beta
	switch {
	case a == 1 && b == 1:
		return ""
	case a <= 1 && b >= 1:
		return fmt.Sprintf("%s is J-shaped (α = %s, at most 1): its density is highest at 0, so the highest-density interval starts at 0; "+
			"report the equal-tailed interval where a lower limit above 0 is wanted", name, ShapeText(a))
	case b <= 1 && a >= 1:
		return fmt.Sprintf("%s is J-shaped (β = %s, at most 1): its density is highest at 1, so the highest-density interval ends at 1; "+
			"report the equal-tailed interval where an upper limit below 1 is wanted", name, ShapeText(b))
	case a < 1 && b < 1:
		return name + " is U-shaped: its highest-density region is two pieces against the bounds; the highest-density interval is the shorter single interval with that probability"
	case lo == 0:
		return fmt.Sprintf("%s's density is 0 at 0 but rises from it extremely steeply (α = %s, just above 1), so the highest-density interval's lower end "+
			"is smaller than the computer can hold (below 1e-323) and is shown as 0; report the equal-tailed interval where a lower limit above 0 is wanted", name, ShapeText(a))
	case hi == 1:
		return fmt.Sprintf("%s's density is 0 at 1 but falls to it extremely steeply (β = %s, just above 1), so the highest-density interval's upper end "+
			"is closer to 1 than the computer can show and is shown as 1; report the equal-tailed interval where an upper limit below 1 is wanted", name, ShapeText(b))
	}
	return ""
}

// IntervalsBeyondDouble says which ends of d's equal-tailed interval eq
// and highest-density interval hdi at level (EqualTailed's and HDI's)
// are quantiles nearer a bound than a double holds, so that the double
// written is the bound itself, and how far from the bound each really
// lies, in the words of WarnBeyondDouble; "" when none is. For
// Beta(1e-5, 0.99999) the 95% equal-tailed interval is written [0, 0],
// its ends lying about 1e-160206 and 2.9e-1100 above 0: as [0, 0], with
// no word, it read as a posterior certain of 0. An HDI end that is
// a bound by the density's shape (a J-shaped density's 0 or 1) is no
// quantile and is left to HDINote, as is an end solved from the equal
// density condition. inEq and inHDI say whether an end of eq, or of
// hdi, is among them.
func IntervalsBeyondDouble(d Beta, level float64, eq, hdi [2]float64) (m string, inEq, inHDI bool) {
	if d.Validate() != nil || checkLevel(level) != nil {
		return "", false, false
	}
	held := func(s ShownPoint) bool { return s.X == 0 || s.X == 1 }
	tail := (1 - level) / 2
	shown := []ShownPoint{{P: tail, X: eq[0]}, {P: 1 - tail, X: eq[1]}}
	inEq = held(shown[0]) || held(shown[1])
	var end *ShownPoint
	a, b := d.Alpha, d.Beta
	switch {
	case a == 1 && b == 1:
	case a <= 1 && b >= 1, a < 1 && b < 1 && hdi[0] == 0:
		end = &ShownPoint{P: level, X: hdi[1]}
	case b <= 1 && a >= 1, a < 1 && b < 1:
		end = &ShownPoint{P: 1 - level, X: hdi[0]}
	}
	if end != nil {
		shown = append(shown, *end)
		inHDI = held(*end)
	}
	sort.SliceStable(shown, func(i, j int) bool { return shown[i].P < shown[j].P })
	m, ok := beyondDouble(Unit(d), shown, "the ")
	if !ok {
		return "", false, false
	}
	return m, inEq, inHDI
}

// hdiInterior solves g(t) = log f(Q(t + level)) − log f(Q(t)) = 0 for the
// lower tail mass t of the HDI of a Beta with α, β > 1, where g decreases
// in t. It runs Newton's method on g, with
// g′(t) = (log f)′(hi)/f(hi) − (log f)′(lo)/f(lo) and
// (log f)′(x) = (α−1)/x − (β−1)/(1−x), from the equal-tailed interval,
// inside a bracket on t that every evaluation narrows; a step that leaves
// the bracket is replaced by bisection, geometric near 0 (see bisect)
// because for α just above 1 the tail mass t can be below 1e-15.
func hdiInterior(d Beta, level float64) (lo, hi float64) {
	a, b := d.Alpha, d.Beta
	logf := func(x float64) float64 { return (a-1)*math.Log(x) + (b-1)*math.Log1p(-x) }
	dlogf := func(x float64) float64 { return (a-1)/x - (b-1)/(1-x) }
	// logRise is log f(hi) − log f(lo) as (α−1)·log1p((hi−lo)/lo) −
	// (β−1)·log1p((hi−lo)/(1−hi)): its sign is that of
	// (α−1)/lo − (β−1)/(1−hi) even where hi − lo carries the rounding of
	// two quantiles. As the difference of two logs of size 1 it was lost
	// in their rounding for a narrow interval (a level of 1e-9 or less,
	// or large shapes), and the solve stopped at an interval beside the
	// mode instead of around it (TestHDIAtATinyLevelHoldsTheMode).
	logRise := func(lo, hi float64) float64 {
		w := hi - lo
		return (a-1)*math.Log1p(w/lo) - (b-1)*math.Log1p(w/(1-hi))
	}
	tLo, tHi := 0.0, 1-level
	t := (1 - level) / 2
	for i := 0; i < 2000; i++ {
		lo, hi = d.Quantile(t), d.Quantile(t+level)
		g := logRise(lo, hi)
		switch {
		case g > 0:
			tLo = t
		case g < 0:
			tHi = t
		default:
			return lo, hi
		}
		if converged(tLo, tHi) {
			break
		}
		next := t - g/(dlogf(hi)/d.PDF(hi)-dlogf(lo)/d.PDF(lo))
		if !(next > tLo && next < tHi) {
			next = bisect(tLo, tHi)
			if !(next > tLo && next < tHi) {
				break // no float64 left between the ends of the bracket
			}
		} else if math.Abs(next-t) <= 1e-13*next {
			t = next
			break
		}
		t = next
	}
	lo, hi = d.Quantile(t), d.Quantile(t+level)
	if lo < 0x1p-1022 { // below float64's normal range
		// For α just above 1 the lower end is far below float64's range
		// (10^-2900000 for Beta(1.000001, 50)), and the solve stops at
		// the smallest subnormal its tail mass reaches. There F(lo) is
		// nothing beside level, so hi is right, and f(lo) = f(hi) gives
		// log lo = log f(hi)/(α − 1) − (β − 1)/(α − 1)·log(1 − lo), with
		// log(1 − lo) = 0 in float64: lo rounded to float64, 0 when it
		// underflows.
		lo = math.Exp(logf(hi) / (a - 1))
	}
	if hi > 1-0x1p-50 { // within a few float64 steps of 1
		// The mirror image for β just above 1, where float64's steps
		// near 1 are 1.1e-16 wide: log(1 − hi) = (log f(lo) − (α − 1)·log hi)/(β − 1),
		// so hi is 1 when 1 − hi is below half a step.
		hi = -math.Expm1((logf(lo) - (a-1)*math.Log(hi)) / (b - 1))
	}
	return lo, hi
}

// PriorPredictive is the prior predictive distribution of the number of
// successes Y in n planned trials, the beta-binomial pmf
//
//	P(Y = k) = C(n, k) B(k + α, n − k + β) / B(α, β),  k = 0…n
//
// (Gelman et al. 2013, BDA3 §2.4 and appendix A; Johnson, Kemp & Kotz
// 2005, "Univariate Discrete Distributions", 3rd ed., §6.7.2), computed in
// logs with math.Lgamma and lnBeta (accurate where mathext.Lbeta loses
// max(α, β)·2⁻⁵² to cancellation). It needs 0 ≤ n ≤
// MaxPredictiveTrials.
func PriorPredictive(prior Beta, n int) ([]float64, error) {
	if err := prior.Validate(); err != nil {
		return nil, err
	}
	if n < 0 {
		return nil, inputErr("trials", RuleNonNegative, "got %d", n)
	}
	if n > MaxPredictiveTrials {
		return nil, inputErr("trials", RuleCountRange, "%d is above the limit %d", n, MaxPredictiveTrials)
	}
	t := newPredictiveTerms(prior, n)
	pmf := make([]float64, n+1)
	for k := range pmf {
		pmf[k] = t.term(k)
	}
	return pmf, nil
}

// Conflict is a prior-data conflict check: where the observed number of
// successes falls in the prior predictive (beta-binomial) distribution of
// Y, the successes in the same number of trials.
type Conflict struct {
	Successes int `json:"successes"`
	Trials    int `json:"trials"`
	// Lower is P(Y ≤ s) and Upper is P(Y ≥ s) under the prior predictive.
	Lower float64 `json:"p_lower"`
	Upper float64 `json:"p_upper"`
	// TwoSided is min(1, 2·min(Lower, Upper)), the doubled smaller tail.
	TwoSided float64 `json:"p_two_sided"`
}

// ConflictCheck is the prior predictive check of Box (1980, "Sampling and
// Bayes' inference in scientific modelling and robustness", J. R. Statist.
// Soc. A 143: 383–430) for binomial data: the tail probabilities of the
// observed count s under the prior predictive distribution of successes in
// n trials (see PriorPredictive); Evans & Moshonov (2006, "Checking for
// prior-data conflict", Bayesian Analysis 1: 893–914) discuss the idea.
// A small tail probability says the data are surprising under the prior.
// Convention: both one-sided tails include the observed count, and the
// two-sided value doubles the smaller one, capped at 1 (common practice
// for discrete tail probabilities; Box's own measure orders outcomes by
// predictive density instead). Each tail is summed from its own end, so a
// small tail keeps its relative precision; a tail above one half is 1
// minus the sum beyond the observed count on the other side, so that
// P(Y ≥ 0) and P(Y ≤ n) are 1 exactly, not the sum of all n + 1
// probabilities, each of which carries the rounding of its log-gamma
// terms (0.9999999996 for 10⁶ trials).
func ConflictCheck(prior Beta, successes, trials int) (Conflict, error) {
	if err := checkData(prior, successes, trials); err != nil {
		return Conflict{}, err
	}
	pmf, err := PriorPredictive(prior, trials)
	if err != nil {
		return Conflict{}, err
	}
	c := Conflict{Successes: successes, Trials: trials}
	var below, above neumaierSum // P(Y < s) and P(Y > s)
	for k := 0; k < successes; k++ {
		below.add(pmf[k])
	}
	for k := trials; k > successes; k-- {
		above.add(pmf[k])
	}
	c.Lower = below.sum() + pmf[successes]
	c.Upper = above.sum() + pmf[successes]
	if c.Lower > 0.5 {
		c.Lower = 1 - above.sum()
	}
	if c.Upper > 0.5 {
		c.Upper = 1 - below.sum()
	}
	c.Lower, c.Upper = math.Min(c.Lower, 1), math.Min(c.Upper, 1)
	c.TwoSided = math.Min(1, 2*math.Min(c.Lower, c.Upper))
	return c, nil
}

// TailUnderflowWords is how Parley writes a tail probability of the prior
// predictive check (Conflict) that is computed as 0. Under a Beta prior
// every count 0…n has positive predictive probability, so such a tail is
// one whose terms all fell below the smallest double: even a million of
// them, each below 4.9e-324, add up to less than 1e-300. For no success
// in 1000 trials under Beta(1e6, 1), P(Y ≤ 0) is 10^-3432.6 (R 4.2.2:
// (lbeta(1e6, 1001) − lbeta(1e6, 1))/log(10) = −3432.612648). Written as
// "0" it said that the data could not have happened.
const TailUnderflowWords = "below 1e-300"

// String is a one-line summary, e.g. for the command line. Each
// probability has four significant figures, or as many more as keep one
// short of 1 from reading 1 (ProbabilityText): P(Y ≤ s) = 0.99996 is not
// "1", which would say that more successes could not happen; one
// computed as 0 is "< 1e-300" (TailUnderflowWords).
func (c Conflict) String() string {
	tail := func(p float64) string {
		if p == 0 {
			return "< 1e-300"
		}
		return "= " + ProbabilityText(p, 4)
	}
	two := "two-sided " + strings.TrimPrefix(tail(c.TwoSided), "= ")
	return fmt.Sprintf("P(Y ≤ %d) %s, P(Y ≥ %d) %s, %s", c.Successes, tail(c.Lower), c.Successes, tail(c.Upper), two)
}

// Updated is a Beta prior updated with binomial data: the posterior
// (Posterior) and its equal-tailed (EqualTailed) and highest-density
// (HDI) intervals at one credible level.
type Updated struct {
	Posterior Beta
	Interval  [2]float64
	HDI       [2]float64
}

// UpdateWith updates prior with successes in trials and gives the
// posterior's intervals at level: the one computation behind `parley
// update` and a study page's update.
func UpdateWith(prior Beta, successes, trials int, level float64) (Updated, error) {
	post, err := Posterior(prior, successes, trials)
	if err != nil {
		return Updated{}, err
	}
	lo, hi, err := EqualTailed(post, level)
	if err != nil {
		return Updated{}, err
	}
	hlo, hhi, err := HDI(post, level)
	if err != nil {
		return Updated{}, err
	}
	return Updated{Posterior: post, Interval: [2]float64{lo, hi}, HDI: [2]float64{hlo, hhi}}, nil
}

package elicit

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"gonum.org/v1/gonum/stat/distuv"
)

// Rules of the quick constructions and the chips format.
const (
	RuleBelowTrials      Rule = "successes must be fewer than trials"
	RuleCountsNotAllZero Rule = "at least one chip must be placed"
	RuleChipsSpread      Rule = "chips must be in at least three bins"
	RuleEdgesSpanBounds  Rule = "bin edges must run from lower to upper"
)

// Limits of the chips-in-bins format.
const (
	// MinBins is the fewest bins a chips histogram may have. With fewer
	// than three bins there are fewer than two interior edges, and two
	// cumulative fractions are needed to pin down α and β.
	MinBins = 3
	// MaxBins is the most bins a chips histogram may have.
	MaxBins = 20
	// MinChipBins is the fewest bins that must hold chips. With chips in
	// only one or two bins, least squares on the cumulative fractions is
	// driven towards α+β → ∞ (all mass inside the occupied bins) or
	// α, β → 0, and no finite Beta is the answer.
	MinChipBins = 3
	// maxBinCount bounds one bin's count so that totals cannot overflow.
	maxBinCount = 1_000_000_000
)

// Uniform is Beta(1, 1), the uniform distribution on [0, 1]: every value
// of the proportion equally likely (Bayes 1763, Laplace 1774; see Gelman
// et al. 2013, "Bayesian Data Analysis", 3rd ed., §2.4).
func Uniform() Beta { return Beta{Alpha: 1, Beta: 1} }

// EquivalentSample is the prior worth n imagined trials of which s were
// successes, under the convention Beta(s, n−s): its mean is s/n and its
// effective sample size α+β is n (the ESS of a Beta prior; Morita, Thall &
// Müller 2008, "Determining the effective sample size of a parametric
// prior", Biometrics 64(2)). It needs 0 < s < n; s and n need not be
// whole numbers.
//
// The other common convention, Beta(s+1, n−s+1) — the posterior after
// observing s of n starting from Uniform — is Beta(s+1, n−s+1) =
// EquivalentSample(s+1, n+2).
func EquivalentSample(s, n float64) (Beta, error) {
	if err := checkPositive("successes", s); err != nil {
		return Beta{}, err
	}
	if err := checkPositive("trials", n); err != nil {
		return Beta{}, err
	}
	if !(s < n) {
		return Beta{}, inputErr("successes", RuleBelowTrials, "%v %s in %v %s", s, nounFor(s, "success", "successes"), n, nounFor(n, "trial", "trials"))
	}
	d := Beta{Alpha: s, Beta: n - s}
	// The limits hold α = s and β = n − s each, as every construction's
	// (checkShapeLimits): n itself may pass 1e7. Beta(5e6, 1e7), which the
	// mean and SD make, was refused here as 5e6 in 1.5e7 imagined trials.
	switch {
	case s > MaxPriorShape:
		return Beta{}, inputErr("successes", RuleShapeTooLarge, "%v imagined successes", s)
	case n-s > MaxPriorShape:
		return Beta{}, inputErr("trials", RuleShapeTooLarge, "%v imagined failures", n-s)
	case s < MinPriorShape:
		return Beta{}, inputErr("successes", RuleShapeTooSmall, "%v imagined successes", s)
	case n-s < MinPriorShape:
		return Beta{}, inputErr("successes", RuleShapeTooSmall, "%v imagined failures", n-s)
	}
	return d, d.Validate()
}

// FromMeanSD is the Beta with mean m and standard deviation sd by the
// method of moments: with v = sd²,
//
//	α = m (m(1−m)/v − 1),  β = (1−m) (m(1−m)/v − 1),
//
// which needs 0 < m < 1 and the feasibility rule v < m(1−m), since every
// distribution on [0, 1] with mean m has variance at most m(1−m)
// (Johnson, Kotz & Balakrishnan 1995, "Continuous Univariate
// Distributions", vol. 2, ch. 25, moment estimators).
func FromMeanSD(m, sd float64) (Beta, error) {
	if math.IsNaN(m) || math.IsInf(m, 0) {
		return Beta{}, inputErr("mean", RuleFinite, "got %v", m)
	}
	if !(m > 0 && m < 1) {
		return Beta{}, inputErr("mean", RuleProbOpen, "got %v", m)
	}
	if err := checkPositive("sd", sd); err != nil {
		return Beta{}, err
	}
	v := sd * sd
	if !(v < m*(1-m)) {
		return Beta{}, inputErr("sd", RuleVarianceFeasible, "variance %.6g, m(1-m) = %.6g", v, m*(1-m))
	}
	k := m*(1-m)/v - 1
	if v == 0 || math.IsInf(k, 1) {
		// sd² underflows to 0, or m(1 − m)/sd² overflows (sd below about
		// 1e-154): α and β are beyond any double, and are worked in logs
		// for the refusal, which said "Beta(+Inf, +Inf)", or, where sd²
		// was 0, that the sd (1e-200, say) must be greater than 0.
		// α + β is then m(1 − m)/sd² to the last figure.
		// (logSub: m or sd may be subnormal.)
		lnK := logSub(m) + math.Log1p(-m) - 2*logSub(sd)
		lnA, lnB := logSub(m)+lnK, math.Log1p(-m)+lnK
		rule := RuleShapeTooSmall // m as small as sd²: α below 1e-6
		if math.Max(lnA, lnB) > math.Log(MaxPriorShape) {
			rule = RuleShapeTooLarge
		}
		return Beta{}, inputErr("sd", rule, "Beta(%s, %s)", FormatExp(lnA, 3), FormatExp(lnB, 3))
	}
	d := Beta{Alpha: m * k, Beta: (1 - m) * k}
	if err := checkShapeLimits("sd", d); err != nil {
		return Beta{}, err
	}
	return d, d.Validate()
}

// FromIntervalMoments is the Beta whose central interval [low, high] on
// [0, 1] has the stated coverage c, by the method of moments on a normal
// approximation: the mean is the midpoint, m = (low + high)/2, and the
// standard deviation is sd = (high − low)/2 / z with z = Φ⁻¹((1 + c)/2)
// (so z ≈ 1.96 for 95%); then FromMeanSD. The approximation is good when
// the Beta is nearly symmetric; the Beta's own central interval at c then
// differs from [low, high] (ConstructionResult reports the coverage it
// achieves). FromIntervalQuantiles matches the interval exactly.
//
// Rules: low and high finite and strictly inside (0, 1) with low < high;
// coverage finite and strictly inside (0, 1); and the moments' rule,
// sd² < m(1 − m), reported on the field "interval" as
// RuleVarianceFeasible: the interval is too wide for its coverage.
func FromIntervalMoments(low, high, coverage float64) (Beta, error) {
	if err := checkInterval(low, high, coverage); err != nil {
		return Beta{}, err
	}
	z := distuv.UnitNormal.Quantile((1 + coverage) / 2)
	d, err := FromMeanSD((low+high)/2, (high-low)/2/z)
	var ie *InputError
	if errors.As(err, &ie) {
		return Beta{}, inputErr("interval", ie.Rule,
			"the moment match of [%v, %v] at %s%% coverage, mean %v and sd %.6g: %s", low, high, percentOf(coverage), (low+high)/2, (high-low)/2/z, ie.Detail)
	}
	return d, err
}

// checkInterval checks a central interval on [0, 1] and its coverage.
func checkInterval(low, high, coverage float64) error {
	for _, c := range []struct {
		field string
		v     float64
	}{{"low", low}, {"high", high}, {"coverage", coverage}} {
		if math.IsNaN(c.v) || math.IsInf(c.v, 0) {
			return inputErr(c.field, RuleFinite, "got %v", c.v)
		}
	}
	if err := checkCentral("coverage", coverage); err != nil {
		return err
	}
	if !(low > 0 && low < 1) {
		return inputErr("low", RuleValueInBounds, "%v not inside (0, 1)", low)
	}
	if !(high > 0 && high < 1) {
		return inputErr("high", RuleValueInBounds, "%v not inside (0, 1)", high)
	}
	if !(low < high) {
		return inputErr("high", RuleValueIncreasing, "%v after %v", high, low)
	}
	return nil
}

// FourValue turns the four-value interval format — the lowest and highest
// plausible values, a best estimate, and the expert's confidence c that
// the truth lies between lowest and highest (Speirs-Bridge et al. 2010,
// "Reducing overconfidence in the interval judgments of experts", Risk
// Analysis 30(3)) — into quantile judgements on (lower, upper):
//
//	lowest at (1−c)/2,  best at 0.5,  highest at (1+c)/2.
//
// Convention: the best estimate is read as the median and the interval as
// a central one, with (1−c)/2 of the probability in each tail. It checks
// lowest < best < highest, all strictly inside (lower, upper), and c in
// (0, 1).
func FourValue(lowest, highest, best, confidence, lower, upper float64) (Judgement, error) {
	if err := CheckBounds(lower, upper); err != nil {
		return Judgement{}, err
	}
	for _, c := range []struct {
		field string
		v     float64
	}{{"lowest", lowest}, {"best", best}, {"highest", highest}} {
		if math.IsNaN(c.v) || math.IsInf(c.v, 0) {
			return Judgement{}, inputErr(c.field, RuleFinite, "got %v", c.v)
		}
		if !(c.v > lower && c.v < upper) {
			return Judgement{}, inputErr(c.field, RuleValueInBounds, "%v not inside (%v, %v)", c.v, lower, upper)
		}
	}
	if !(best > lowest) {
		return Judgement{}, inputErr("best", RuleValueIncreasing, "best %v not above lowest %v", best, lowest)
	}
	if !(highest > best) {
		return Judgement{}, inputErr("highest", RuleValueIncreasing, "highest %v not above best %v", highest, best)
	}
	if err := checkCentral("confidence", confidence); err != nil {
		return Judgement{}, err
	}
	pl, ph := centralTails(confidence) // apart from 0.5, 0 and 1 by checkCentral
	j := Judgement{Probs: []float64{pl, 0.5, ph}, Values: []float64{lowest, best, highest}, Lower: lower, Upper: upper}
	if err := j.Validate(); err != nil {
		return j, fourValueError(err)
	}
	return j, nil
}

// fourValueError names the four-value form's own field for an error of
// the judgement it makes: its probabilities come from the confidence,
// and its values are lowest, best and highest, in that order.
func fourValueError(err error) error {
	var ie *InputError
	if !errors.As(err, &ie) {
		return err
	}
	switch {
	case strings.HasPrefix(ie.Field, "probs["):
		// Only the tails can leave [MinProb, 1 − MinProb]: the confidence
		// is too close to 1.
		return inputErr("confidence", RuleCentralTails, "tails of %v", ie.Detail)
	case strings.HasPrefix(ie.Field, "values["):
		names := map[string]string{"values[0]": "lowest", "values[1]": "best", "values[2]": "highest"}
		if n, ok := names[ie.Field]; ok {
			return &InputError{Field: n, Rule: ie.Rule, Detail: ie.Detail}
		}
	}
	return err
}

// FitChips fits a Beta to a chips-in-bins histogram (trial roulette: Gore
// 1987, "Biostatistics and the Medical Research Council", MRC News;
// Johnson et al. 2010, "Methods to elicit beliefs for Bayesian priors: a
// systematic review", J. Clin. Epidemiol. 63(4)). The bins are
// [edges[i], edges[i+1]]; the Beta lives on [edges[0], edges[last]]. The
// fit is least squares on the cumulative chip fractions at the interior
// edges: minimise Σᵢ (F(edges[i]) − Σ_{k<i} counts[k] / total)² over
// i = 1..bins−1, with the same search as FitQuantiles.
//
// Rules, each an *InputError naming its field: MinBins to MaxBins bins;
// edges finite and strictly increasing; one count per bin, none negative,
// not all zero, and chips in at least MinChipBins bins.
func FitChips(edges []float64, counts []int) (Fit, error) {
	if err := CheckEdges("edges", edges); err != nil {
		return Fit{}, err
	}
	if len(counts) != len(edges)-1 {
		return Fit{}, inputErr("counts", RuleLengthMatch, "%d bins, %d counts", len(edges)-1, len(counts))
	}
	total, used := 0, 0
	for i, c := range counts {
		if c < 0 {
			return Fit{}, inputErr(fmt.Sprintf("counts[%d]", i), RuleNonNegative, "got %d", c)
		}
		if c > maxBinCount {
			return Fit{}, inputErr(fmt.Sprintf("counts[%d]", i), RuleCountRange, "%d chips, at most %d per bin", c, maxBinCount)
		}
		total += c
		if c > 0 {
			used++
		}
	}
	if total == 0 {
		return Fit{}, inputErr("counts", RuleCountsNotAllZero, "")
	}
	if used < MinChipBins {
		return Fit{}, inputErr("counts", RuleChipsSpread, "chips in %d bins", used)
	}
	lower, upper := edges[0], edges[len(edges)-1]
	inner, p := ChipsPoints(edges, counts)
	u := make([]float64, len(inner))
	for i, e := range inner {
		u[i] = (e - lower) / (upper - lower)
	}
	d, sse, resid, err := fitCumulative("edges", u, p)
	if err != nil {
		return Fit{}, err
	}
	return newFit(ScaledBeta{Beta: d, Lower: lower, Upper: upper}, p, inner, sse, resid), nil
}

// ChipsPoints are the points and probabilities a chips judgement
// states, as FitChips fits them: the inner edges, each at the share of
// the chips placed below it. counts has one count per bin, at least one
// of them above 0.
func ChipsPoints(edges []float64, counts []int) (points, probs []float64) {
	total := 0
	for _, c := range counts {
		total += c
	}
	points = edges[1 : len(edges)-1]
	probs = make([]float64, len(points))
	cum := 0
	for i := range points {
		cum += counts[i]
		probs[i] = float64(cum) / float64(total)
	}
	return points, probs
}

// CheckEdges checks bin edges: MinBins to MaxBins bins, finite and
// strictly increasing.
func CheckEdges(field string, edges []float64) error {
	if bins := len(edges) - 1; bins < MinBins || bins > MaxBins {
		return inputErr(field, RuleCount, "need %d to %d bins (%d to %d edges), got %d edges", MinBins, MaxBins, MinBins+1, MaxBins+1, len(edges))
	}
	for i, e := range edges {
		f := fmt.Sprintf("%s[%d]", field, i)
		if math.IsNaN(e) || math.IsInf(e, 0) {
			return inputErr(f, RuleFinite, "got %v", e)
		}
		if i > 0 && !(e > edges[i-1]) {
			return inputErr(f, RuleValueIncreasing, "%v after %v", e, edges[i-1])
		}
	}
	last := len(edges) - 1
	if err := CheckBounds(edges[0], edges[last]); err != nil {
		ie := *err.(*InputError)
		ie.Field = fmt.Sprintf("%s[0]", field)
		if ie.Field == "upper" || ie.Rule == RuleBoundsWidth {
			ie.Field = fmt.Sprintf("%s[%d]", field, last)
		}
		return &ie
	}
	// The inner edges are the points the fit uses, as stated values are.
	return checkValues(field, edges[1:last], edges[0], edges[last], 1)
}

// nounFor is one when x is exactly 1 ("1 success in 2 trials"), else
// many ("0.5 successes", "1.5 trials").
func nounFor(x float64, one, many string) string {
	if x == 1 {
		return one
	}
	return many
}

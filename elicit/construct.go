package elicit

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
)

// Limits of every quick construction: α and β in [MinPriorShape,
// MaxPriorShape], Parley's accuracy envelope (MinShape, MaxShape; see
// beta.go): above it the incomplete beta function loses the accuracy
// Parley needs; below it nearly all the probability sits within a
// rounding error of the bounds.
const (
	MinPriorShape = MinShape
	MaxPriorShape = MaxShape
)

// Rules of the quick constructions beyond those of their inputs.
const (
	RuleShapeTooLarge     Rule = "the Beta would need alpha or beta above 1e7"
	RuleShapeTooSmall     Rule = "the Beta would need alpha or beta below 1e-6"
	RuleSampleOnUnitScale Rule = "an equivalent prior sample describes a proportion on [0, 1]"
)

// checkShapeLimits refuses a constructed Beta outside [MinPriorShape,
// MaxPriorShape], naming the input that led there.
func checkShapeLimits(field string, d Beta) error {
	switch {
	case d.Alpha > MaxPriorShape || d.Beta > MaxPriorShape:
		return inputErr(field, RuleShapeTooLarge, "Beta(%.3g, %.3g)", d.Alpha, d.Beta)
	case d.Alpha < MinPriorShape || d.Beta < MinPriorShape:
		return inputErr(field, RuleShapeTooSmall, "Beta(%.3g, %.3g)", d.Alpha, d.Beta)
	}
	return nil
}

// ConstructionMethod names one quick construction of a Beta prior.
type ConstructionMethod string

// The quick constructions; see Construct.
const (
	MethodUniform           ConstructionMethod = "uniform"
	MethodEquivalentSample  ConstructionMethod = "equivalent_sample"
	MethodMeanSD            ConstructionMethod = "mean_sd"
	MethodIntervalMoments   ConstructionMethod = "interval_moments"
	MethodIntervalQuantiles ConstructionMethod = "interval_quantiles"
)

// ConstructionInput is what a person gave for a quick construction: the
// method and its numbers, on the quantity's scale [Lower, Upper]. A method
// reads only its own fields (Successes and Trials; Mean and SD; Low, High
// and Coverage) and leaves the others zero.
type ConstructionInput struct {
	Method    ConstructionMethod `json:"method"`
	Successes float64            `json:"successes"`
	Trials    float64            `json:"trials"`
	Mean      float64            `json:"mean"`
	SD        float64            `json:"sd"`
	Low       float64            `json:"low"`
	High      float64            `json:"high"`
	Coverage  float64            `json:"coverage"`
	Lower     float64            `json:"lower"`
	Upper     float64            `json:"upper"`
}

// Construction is a Beta prior made by a quick construction, with the
// input that made it, so that a record can say how the prior was set and
// the prior can be made again from it.
type Construction struct {
	Input ConstructionInput `json:"input"`
	Dist  ScaledBeta        `json:"dist"`
	// For the interval methods: the probability Dist gives to
	// [Low, High], and to each side of it. The exact quantile match
	// achieves the asked coverage (each tail to matchTol: 1e-9 relative
	// for α + β up to 1e5); the
	// moment match only approximately. Zero for the other methods.
	CoverageAchieved float64 `json:"coverage_achieved"`
	BelowLow         float64 `json:"below_low"`
	AboveHigh        float64 `json:"above_high"`
	// Warnings are the shapes a reader should look at twice, with the
	// codes of a fit's warnings: U- or J-shaped, or near-certainty.
	Warnings []Warning `json:"warnings"`
}

// IsInterval reports whether the method is one of the interval methods.
func (m ConstructionMethod) IsInterval() bool {
	return m == MethodIntervalMoments || m == MethodIntervalQuantiles
}

// Construct makes a Beta prior on [in.Lower, in.Upper] by one quick
// construction:
//
//   - MethodUniform: Beta(1, 1), every value equally likely (Uniform).
//   - MethodEquivalentSample: Beta(s, n − s) for s successes in n
//     imagined trials (EquivalentSample; needs s > 0 and n − s > 0, and
//     the bounds [0, 1]: imagined trials describe a proportion).
//   - MethodMeanSD: the method of moments (FromMeanSD) on the unit scale,
//     m = (mean − lower)/w and sd/w with w = upper − lower; feasible only
//     when sd² < (mean − lower)(upper − mean).
//   - MethodIntervalMoments: the central interval [low, high] with its
//     coverage by the moment match (FromIntervalMoments).
//   - MethodIntervalQuantiles: the same interval by the exact quantile
//     match (FromIntervalQuantiles).
//
// Every input is checked with its field named; a Beta with α or β
// outside [MinPriorShape, MaxPriorShape] is refused.
func Construct(in ConstructionInput) (Construction, error) {
	if err := CheckBounds(in.Lower, in.Upper); err != nil {
		return Construction{}, err
	}
	lower, w := in.Lower, in.Upper-in.Lower
	unit := func(v float64) float64 { return (v - lower) / w }
	var d Beta
	var err error
	switch in.Method {
	case MethodUniform:
		d = Uniform()
	case MethodEquivalentSample:
		if in.Lower != 0 || in.Upper != 1 {
			return Construction{}, inputErr("lower", RuleSampleOnUnitScale, "bounds [%v, %v]", in.Lower, in.Upper)
		}
		d, err = EquivalentSample(in.Successes, in.Trials)
	case MethodMeanSD:
		if err := checkInBounds("mean", in.Mean, in.Lower, in.Upper); err != nil {
			return Construction{}, err
		}
		if err := checkPositive("sd", in.SD); err != nil {
			return Construction{}, err
		}
		// sd² < (mean − lower)(upper − mean), compared as sd against
		// √(mean − lower)·√(upper − mean), which neither overflows nor
		// underflows for bounds within ±1e300: as variances, bounds of
		// 1e200 made both sides +Inf and bounds of 1e-200 both 0, and the
		// feasible mean 5e199, sd 1e199 on [0, 1e200] (Beta(12, 12)) was
		// refused in words that said +Inf.
		if limit := math.Sqrt(in.Mean-in.Lower) * math.Sqrt(in.Upper-in.Mean); !(in.SD < limit) {
			return Construction{}, inputErr("sd", RuleVarianceFeasible,
				"sd %v, but a mean of %v on [%v, %v] allows an sd below √((mean − lower)(upper − mean)) = %.6g", in.SD, in.Mean, in.Lower, in.Upper, limit)
		}
		d, err = FromMeanSD(unit(in.Mean), in.SD/w)
	case MethodIntervalMoments, MethodIntervalQuantiles:
		if err := checkScaledInterval(in); err != nil {
			return Construction{}, err
		}
		if in.Method == MethodIntervalMoments {
			d, err = FromIntervalMoments(unit(in.Low), unit(in.High), in.Coverage)
		} else {
			d, err = FromIntervalQuantiles(unit(in.Low), unit(in.High), in.Coverage)
		}
		err = onTypedScale(err, in)
	default:
		return Construction{}, inputErr("method", RuleUnknown, "%q", in.Method)
	}
	if err != nil {
		return Construction{}, err
	}
	dist := ScaledBeta{Beta: d, Lower: in.Lower, Upper: in.Upper}
	c := Construction{Input: in, Dist: dist, Warnings: constructionWarnings(dist)}
	if in.Method.IsInterval() {
		c.BelowLow = d.CDF(unit(in.Low))
		c.AboveHigh = d.Survival(unit(in.High))
		c.CoverageAchieved = 1 - c.BelowLow - c.AboveHigh
	}
	return c, nil
}

// onTypedScale puts the person's own interval and bounds first in an
// interval's refusal, which FromInterval* word on [0, 1]; on [0, 1] the
// two are the same and err is returned as it is.
func onTypedScale(err error, in ConstructionInput) error {
	var ie *InputError
	if in.Lower == 0 && in.Upper == 1 || !errors.As(err, &ie) {
		return err
	}
	return &InputError{Field: ie.Field, Rule: ie.Rule, Detail: fmt.Sprintf("[%v, %v] on [%v, %v] at %s%% coverage; on the 0-to-1 scale, %s",
		in.Low, in.High, in.Lower, in.Upper, percentOf(in.Coverage), ie.Detail)}
}

// checkInBounds checks that v is finite and strictly inside (lower, upper).
func checkInBounds(field string, v, lower, upper float64) error {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return inputErr(field, RuleFinite, "got %v", v)
	}
	if !(v > lower && v < upper) {
		return inputErr(field, RuleValueInBounds, "%v not inside (%v, %v)", v, lower, upper)
	}
	return nil
}

// checkScaledInterval checks an interval on the quantity's scale before it
// is moved to [0, 1], so that messages carry the person's own numbers.
func checkScaledInterval(in ConstructionInput) error {
	if err := checkInBounds("low", in.Low, in.Lower, in.Upper); err != nil {
		return err
	}
	if err := checkInBounds("high", in.High, in.Lower, in.Upper); err != nil {
		return err
	}
	if !(in.Low < in.High) {
		return inputErr("high", RuleValueIncreasing, "%v after %v", in.High, in.Low)
	}
	return checkCentral("coverage", in.Coverage)
}

// Describe says in one line how the prior was made, for a record and
// the command line: the Beta's α and β as %g writes them, to the last
// figure a float64 needs, and the coverage it holds to four figures.
func (c Construction) Describe() string {
	return c.DescribeIn(Figures{
		Shape:   func(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) },
		Percent: func(p float64) string { return PercentText(p, 4) + "%" },
	})
}

// Figures says how a description writes its numbers, so that a page
// writes the description's Beta and coverage as it writes them elsewhere
// on the same page: Shape writes a Beta's α or β, Percent a probability
// as a percentage, its sign included, and Typed, when set, the person's
// own inputs and the question's bounds (nil: %g).
type Figures struct {
	Shape   func(float64) string
	Percent func(float64) string
	Typed   func(float64) string
}

// typed writes an input by f.Typed, or %g.
func (f Figures) typed(v float64) string {
	if f.Typed != nil {
		return f.Typed(v)
	}
	return fmt.Sprintf("%g", v)
}

// DescribeIn says in one line how the prior was made, as Describe does,
// with the Beta and the coverage it holds written by f, and the person's
// own inputs as f.Typed writes them (%g when it is nil).
func (c Construction) DescribeIn(f Figures) string {
	in := c.Input
	scale := ""
	if in.Lower != 0 || in.Upper != 1 {
		scale = " on [" + f.typed(in.Lower) + ", " + f.typed(in.Upper) + "]"
	}
	switch in.Method {
	case MethodUniform:
		return "uniform" + scale + ", Beta(1, 1): every value equally likely"
	case MethodEquivalentSample:
		return fmt.Sprintf("equivalent prior sample: %s %s in %s imagined %s, Beta(s, n − s) = Beta(%s, %s)", f.typed(in.Successes), nounFor(in.Successes, "success", "successes"),
			f.typed(in.Trials), nounFor(in.Trials, "trial", "trials"), f.Shape(c.Dist.Alpha), f.Shape(c.Dist.Beta.Beta))
	case MethodMeanSD:
		return fmt.Sprintf("mean %s and standard deviation %s%s by the method of moments", f.typed(in.Mean), f.typed(in.SD), scale)
	case MethodIntervalMoments:
		return fmt.Sprintf("central %s%% interval [%s, %s]%s by moment match (midpoint as mean, half-width / z as sd); it holds %s", percentOf(in.Coverage), f.typed(in.Low), f.typed(in.High), scale, f.Percent(c.CoverageAchieved))
	case MethodIntervalQuantiles:
		return fmt.Sprintf("central %s%% interval [%s, %s]%s by exact quantile match; it holds %s", percentOf(in.Coverage), f.typed(in.Low), f.typed(in.High), scale, f.Percent(c.CoverageAchieved))
	}
	return string(in.Method)
}

// PriorWarnings are the warnings of a prior however it was made (a
// construction's, which are a fit's shape and certainty rules): U- or
// J-shaped, or worth more than NearCertaintyESS trials. The report gives
// them beside each agreed prior.
func PriorWarnings(d ScaledBeta) []Warning { return constructionWarnings(d) }

// constructionWarnings flags a constructed Beta that is U-shaped (α and β
// below 1), J-shaped (one of them below 1) or worth more than
// NearCertaintyESS trials, as a fit's warnings do, in words for whoever
// set the prior, and one whose 5%, 50% or 95% point is shown as a bound
// (WarnBeyondDouble); on [0, 1] α + β reads as trials (weightWords).
func constructionWarnings(d ScaledBeta) []Warning {
	w := []Warning{}
	a, b := d.Alpha, d.Beta.Beta
	switch {
	case shapeBelowOne(a) && shapeBelowOne(b):
		w = append(w, Warning{WarnUShaped, fmt.Sprintf(
			"This prior is U-shaped (α = %s and β = %s are both below 1): it says the value is most likely close to one bound or the other and least likely in the middle.", ShapeText(a), ShapeText(b))})
	case shapeBelowOne(a):
		w = append(w, Warning{WarnJShaped, fmt.Sprintf(
			"This prior is J-shaped (α = %s is below 1): its density rises without limit towards the lower bound.", ShapeText(a))})
	case shapeBelowOne(b):
		w = append(w, Warning{WarnJShaped, fmt.Sprintf(
			"This prior is J-shaped (β = %s is below 1): its density rises without limit towards the upper bound.", ShapeText(b))})
	}
	if ess := a + b; ess > NearCertaintyESS {
		w = append(w, Warning{WarnNearCertainty, "This prior " + weightWords(ess, d.OnUnit()) + ": it implies near-certainty. Check that this much certainty is meant."})
	}
	var shown []ShownPoint
	for _, p := range [3]float64{0.05, 0.5, 0.95} {
		shown = append(shown, ShownPoint{P: p, X: d.Quantile(p)})
	}
	if m, ok := beyondDouble(d, shown, "the "); ok {
		w = append(w, Warning{WarnBeyondDouble, m})
	}
	return w
}

// ShownPoint is a p-quantile of a Beta as it is shown: X is the double
// the pages and commands write for the point at probability P.
type ShownPoint struct{ P, X float64 }

// BoundsShown says whether any of the points is shown as d's lower bound
// and whether any is shown as its upper bound: a point strictly inside
// the range whose double is the bound itself (WarnBeyondDouble).
func BoundsShown(d ScaledBeta, shown []ShownPoint) (lower, upper bool) {
	for _, s := range shown {
		if s.P > 0 && s.P < 1 {
			lower = lower || s.X == d.Lower
			upper = upper || s.X == d.Upper
		}
	}
	return lower, upper
}

// beyondDouble says which of the shown points lie nearer a bound than
// a double holds beside that bound, so that the double is the bound
// itself, and how far from the bound each really lies. On [0, 1] only a
// point below about 2.5e-324 (half the smallest subnormal double: 1e-315
// is held as itself), or within about 1.1e-16 of 1, is held as the bound: for Beta(2e-4, 2e-4) the 5% point is about 1.0e-5000,
// which a double holds only as 0, and the 95% point 1 − 1.0e-5000, held
// as 1. On other bounds the bound's own size sets how near is too near:
// on [10, 20] a 5% point 5e-18 above 10 is held as 10. Nothing shown may
// be a bound that is not the value without saying so. subject starts
// each point's name ("the ", "the fitted ").
func beyondDouble(d ScaledBeta, shown []ShownPoint, subject string) (string, bool) {
	if d.Beta.Validate() != nil {
		return "", false
	}
	mirror := Beta{Alpha: d.Beta.Beta, Beta: d.Alpha}
	return heldAsBound(d.Lower, d.Upper, shown, subject, func(p float64, upper bool) float64 {
		if upper {
			return logUnitQuantile(mirror, 1-p)
		}
		return logUnitQuantile(d.Beta, p)
	})
}

// heldAsBound writes beyondDouble's message for any distribution on
// [lower, upper]: logGap(p, upper) is ln of the distance, as a share of
// the range, from the lower bound (or from the upper one) to the
// p-quantile.
func heldAsBound(lower, upper float64, shown []ShownPoint, subject string, logGap func(p float64, upper bool) float64) (string, bool) {
	lnW := math.Log(upper - lower)
	seen := map[float64]bool{}
	var items []string
	for _, s := range shown {
		if seen[s.P] || !(s.P > 0 && s.P < 1) || (s.X != lower && s.X != upper) {
			continue
		}
		seen[s.P] = true
		name := subject + percentOf(s.P) + "% point"
		if s.X == lower {
			v := FormatExp(lnW+logGap(s.P, false), 2)
			if lower == 0 {
				items = append(items, name+" is about "+v)
			} else {
				items = append(items, name+" lies about "+v+" above the lower bound, "+strconv.FormatFloat(lower, 'g', -1, 64))
			}
			continue
		}
		v := FormatExp(lnW+logGap(s.P, true), 2)
		if lower == 0 && upper == 1 {
			items = append(items, name+" is about 1 − "+v)
		} else {
			items = append(items, name+" lies about "+v+" below the upper bound, "+strconv.FormatFloat(upper, 'g', -1, 64))
		}
	}
	if len(items) == 0 {
		return "", false
	}
	how := "it is shown as the bound itself"
	if len(items) > 1 {
		how = "each is shown as its bound"
	}
	s := strings.Join(items, ", and ")
	return strings.ToUpper(s[:1]) + s[1:] + ": nearer the bound than the computer's numbers (double precision) can hold, so " + how + ".", true
}

// logUnitQuantile is ln x of d's p-quantile x, from the leading term at 0
// (logTinyQuantile) where x is below the smallest normal double.
func logUnitQuantile(d Beta, p float64) float64 {
	if x := d.Quantile(p); x >= minNormal {
		return math.Log(x)
	}
	return logTinyQuantile(d, p)
}

// logTinyQuantile is ln x of d's p-quantile x where x is below the
// smallest normal double, from the leading term of the incomplete beta
// function at 0, I_x(α, β) = x^α (1−x)^β F(α+β, 1; α+1; x)/(α B(α, β))
// (DLMF 8.17.8), whose factors after x^α are 1 to within x:
//
//	ln x = (ln p + ln α + ln B(α, β))/α.
func logTinyQuantile(d Beta, p float64) float64 {
	return (math.Log(p) + math.Log(d.Alpha) + lnBeta(d.Alpha, d.Beta)) / d.Alpha
}

// percentOf writes a probability as a percentage to 12 significant
// figures: 0.99999 is "99.999", not 100·0.99999 = 99.99900000000001, and
// the largest coverage taken (1 − 2e-12) is still told from 100.
func percentOf(p float64) string { return strconv.FormatFloat(100*p, 'g', 12, 64) }

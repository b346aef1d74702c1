package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"strconv"
	"strings"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
)

func init() {
	command("plan", "plan a study from a Beta prior (--alpha, --beta, --trials, [--threshold, --direction, --confidence], [--length, --level, --criterion, --interval, --woc-trim, --exhaustive], [--analysis-alpha, --analysis-beta], --format)", runPlan)
}

// curvePoints is how many numbers of trials the assurance curve has.
const curvePoints = 40

// planOutput is the JSON of `parley plan`; its keys trials, predictive,
// assurance and sample_size (criterion, interval, level, length, n) are a
// public contract.
type planOutput struct {
	Alpha     float64           `json:"alpha"`
	Beta      float64           `json:"beta"`
	PriorMean float64           `json:"prior_mean"`
	PriorSD   float64           `json:"prior_sd"`
	Worth     elicit.PriorWorth `json:"worth"`
	Trials    int               `json:"trials"`
	// DataShare is the weight the planned trials get in the posterior
	// mean, n/(n + alpha + beta).
	DataShare float64 `json:"data_share"`
	// Predictive is P(X = x) for x = 0…trials, the beta-binomial prior
	// predictive distribution of the number of successes.
	Predictive            []float64     `json:"predictive"`
	PredictiveMean        float64       `json:"predictive_mean"`
	PredictiveSD          float64       `json:"predictive_sd"`
	PredictivePercentiles planQuantiles `json:"predictive_percentiles"`
	// Assurance, with Success, when --threshold is given.
	Assurance *float64 `json:"assurance,omitempty"`
	// AnalysisPrior, when --analysis-alpha and --analysis-beta are given,
	// is the prior the study's analysis will use: success is judged, and
	// the sample size's intervals taken, on its posterior, while the
	// outcomes are drawn from the prior above (the design prior).
	AnalysisPrior  *planPrior           `json:"analysis_prior,omitempty"`
	Success        *planSuccess         `json:"success,omitempty"`
	AssuranceCurve []planAssurancePoint `json:"assurance_curve,omitempty"`
	// SampleSize when --length is given.
	SampleSize *planSampleSize `json:"sample_size,omitempty"`
	Warnings   []string        `json:"warnings"`
	Caution    string          `json:"caution"`
}

type planPrior struct {
	Alpha float64 `json:"alpha"`
	Beta  float64 `json:"beta"`
}

type planQuantiles struct {
	Q05 int `json:"q05"`
	Q50 int `json:"q50"`
	Q95 int `json:"q95"`
}

type planSuccess struct {
	Threshold  float64 `json:"threshold"`
	Direction  string  `json:"direction"`
	Confidence float64 `json:"confidence"`
	// The study succeeds when its number of successes lies in
	// [SuccessesFrom, SuccessesTo]; none does when from > to.
	SuccessesFrom int `json:"successes_from"`
	SuccessesTo   int `json:"successes_to"`
}

type planAssurancePoint struct {
	Trials    int     `json:"trials"`
	Assurance float64 `json:"assurance"`
}

type planSampleSize struct {
	Criterion string  `json:"criterion"`
	Interval  string  `json:"interval"`
	Level     float64 `json:"level"`
	Length    float64 `json:"length"`
	N         int     `json:"n"`
	Trim      float64 `json:"trim"`
	// Value is the criterion at n: the expected width (alc), the average
	// coverage (acc) or the worst width (woc).
	Value        float64 `json:"value"`
	WorstOutcome *int    `json:"worst_outcome,omitempty"`
	Exhaustive   bool    `json:"exhaustive"`
	ScannedTo    int     `json:"scanned_to"`
	CheckedTo    int     `json:"checked_to"`
	FailsAgainAt int     `json:"fails_again_at"`
	// The criterion at the planned number of trials, when it is at most
	// elicit.MaxSampleSize.
	ValueAtTrials *float64 `json:"value_at_trials,omitempty"`
	MetAtTrials   *bool    `json:"met_at_trials,omitempty"`
	// The criterion with no data (the prior's own interval): when it is
	// met the prior alone already meets the goal, and n is only the
	// smallest study that keeps it (the search starts at 1).
	ValueWithoutData float64 `json:"value_without_data"`
	MetWithoutData   bool    `json:"met_without_data"`
}

// planArgs are the raw flag values of `parley plan`, and which were set.
type planArgs struct {
	alpha, beta, trials                string
	threshold, direction, confidence   string
	analysisAlpha, analysisBeta        string
	length, level, criterion, interval string
	trim, format                       string
	exhaustive                         bool
	set                                map[string]bool
}

func runPlan(args []string, _ io.Reader, stdout, stderr io.Writer) int {
	fs := newFlags("plan", stderr)
	var a planArgs
	fs.StringVar(&a.alpha, "alpha", "", "prior alpha, from 1e-6 to 1e7 (the accuracy envelope)")
	fs.StringVar(&a.beta, "beta", "", "prior beta, from 1e-6 to 1e7")
	fs.StringVar(&a.trials, "trials", "", fmt.Sprintf("planned number of trials (1 to %d)", elicit.MaxPredictiveTrials))
	fs.StringVar(&a.threshold, "threshold", "", "assurance: the threshold T of the success criterion, strictly between 0 and 1 (0.08, or 8%)")
	fs.StringVar(&a.direction, "direction", "", "assurance: below (success when P(θ < T | data) ≥ G) or above (P(θ > T | data) ≥ G)")
	fs.StringVar(&a.confidence, "confidence", "", "assurance: the posterior probability G the criterion asks for, strictly between 0 and 1 (0.95, or 95%)")
	fs.StringVar(&a.analysisAlpha, "analysis-alpha", "", "assurance and sample size: alpha of the analysis prior, on whose posterior success is judged and intervals are taken (with --analysis-beta; without them, the prior above)")
	fs.StringVar(&a.analysisBeta, "analysis-beta", "", "assurance and sample size: beta of the analysis prior (with --analysis-alpha)")
	fs.StringVar(&a.length, "length", "", "sample size: the interval length l, strictly between 0 and 1 (0.04, or 4%)")
	fs.StringVar(&a.level, "level", "0.95", "sample size: the coverage of the credible intervals (0.95, or 95%)")
	fs.StringVar(&a.criterion, "criterion", "alc", "sample size: alc (average length), acc (average coverage) or woc (worst outcome)")
	fs.StringVar(&a.interval, "interval", "equal", "sample size: equal (equal-tailed) or hpd (highest posterior density) intervals")
	fs.StringVar(&a.trim, "woc-trim", "0", "sample size, woc: predictive probability of unlikely outcomes the worst outcome may ignore, in [0, 1)")
	fs.BoolVar(&a.exhaustive, "exhaustive", false, "sample size: check every n from 1 however long it takes, instead of bisecting beyond the first thousand or so")
	fs.StringVar(&a.format, "format", "text", "output: text or json")
	if code, ok := parseArgs(fs, args, stdout, stderr); !ok {
		return code
	}
	a.set = map[string]bool{}
	fs.Visit(func(f *flag.Flag) { a.set[f.Name] = true })
	out, err := planCommand(context.Background(), a)
	if err != nil {
		return fail(stderr, "plan", err)
	}
	if a.format == "json" {
		err = writeJSON(stdout, out)
	} else {
		err = writePlanText(stdout, out)
	}
	if err != nil {
		return fail(stderr, "plan", err)
	}
	return exitOK
}

// checkPlanGroups checks that the flags of assurance come together, and
// that the sample-size flags come with --length.
func checkPlanGroups(a planArgs) error {
	for _, f := range []string{"alpha", "beta", "trials"} {
		if !a.set[f] {
			return badInput(f, "is required")
		}
	}
	assurance := []string{"threshold", "direction", "confidence"}
	for _, f := range assurance {
		if a.set[f] {
			for _, g := range assurance {
				if !a.set[g] {
					return badInput(g, "is required with --%s", f)
				}
			}
			break
		}
	}
	// The analysis prior comes whole, and only with a success criterion
	// or a sample size, the things it is used for.
	for _, pair := range [][2]string{{"analysis-alpha", "analysis-beta"}, {"analysis-beta", "analysis-alpha"}} {
		if a.set[pair[0]] && !a.set[pair[1]] {
			return badInput(pair[1], "is required with --%s", pair[0])
		}
	}
	if a.set["analysis-alpha"] && !a.set["threshold"] && !a.set["length"] {
		return badInput("analysis-alpha", "applies to the assurance and the sample size: give --threshold, --direction and --confidence, or --length, too")
	}
	var given []string
	for _, f := range []string{"level", "criterion", "interval", "woc-trim", "exhaustive"} {
		if a.set[f] {
			given = append(given, f)
		}
	}
	var ie *elicit.InputError
	if errors.As(elicit.CheckSizeSettings(a.set["length"], given...), &ie) {
		// elicit's rule, in the words of the flags.
		return badInput(ie.Field, "applies to the sample size: give --length too")
	}
	return nil
}

func planCommand(ctx context.Context, a planArgs) (planOutput, error) {
	if err := checkFormat(a.format); err != nil {
		return planOutput{}, err
	}
	if err := checkPlanGroups(a); err != nil {
		return planOutput{}, err
	}
	alpha, err := number("alpha", a.alpha)
	if err != nil {
		return planOutput{}, err
	}
	beta, err := number("beta", a.beta)
	if err != nil {
		return planOutput{}, err
	}
	// A study has at least one trial: the range stated is 1 to the limit.
	n, err := input.Whole("trials", a.trials, 1, elicit.MaxPredictiveTrials)
	if err != nil {
		return planOutput{}, err
	}
	prior := elicit.Beta{Alpha: alpha, Beta: beta}
	if err := prior.Validate(); err != nil {
		return planOutput{}, err
	}
	var goal *elicit.SuccessCriterion
	if a.set["threshold"] {
		g := elicit.SuccessCriterion{Direction: elicit.Direction(a.direction)}
		if g.Threshold, err = fraction("threshold", a.threshold); err != nil {
			return planOutput{}, err
		}
		if g.Confidence, err = fraction("confidence", a.confidence); err != nil {
			return planOutput{}, err
		}
		if err := g.Validate(); err != nil {
			return planOutput{}, err
		}
		goal = &g
	}
	analysis := prior
	if a.set["analysis-alpha"] {
		if analysis.Alpha, err = number("analysis-alpha", a.analysisAlpha); err != nil {
			return planOutput{}, err
		}
		if analysis.Beta, err = number("analysis-beta", a.analysisBeta); err != nil {
			return planOutput{}, err
		}
	}
	var size *elicit.SampleSizeGoal
	if a.set["length"] {
		g := elicit.SampleSizeGoal{Criterion: elicit.Criterion(a.criterion), Interval: elicit.IntervalKind(a.interval)}
		if g.Length, err = fraction("length", a.length); err != nil {
			return planOutput{}, err
		}
		if g.Level, err = fraction("level", a.level); err != nil {
			return planOutput{}, err
		}
		if g.Trim, err = fraction("woc-trim", a.trim); err != nil {
			return planOutput{}, err
		}
		if err := g.Validate(); err != nil {
			return planOutput{}, flagNames(err)
		}
		size = &g
	}

	pmf, err := elicit.PriorPredictive(prior, n)
	if err != nil {
		return planOutput{}, err
	}
	worth := elicit.Worth(prior)
	predMean, predSD := elicit.PredictiveMoments(prior, n)
	out := planOutput{
		Alpha: alpha, Beta: beta, PriorMean: prior.Mean(), PriorSD: prior.SD(), Worth: worth,
		Trials: n, DataShare: worth.DataShare(n), Predictive: pmf, Caution: cautionJSON,
		PredictiveMean: predMean,
		PredictiveSD:   predSD,
		PredictivePercentiles: planQuantiles{
			elicit.PredictiveQuantile(pmf, 0.05), elicit.PredictiveQuantile(pmf, 0.5), elicit.PredictiveQuantile(pmf, 0.95),
		},
		Warnings: []string{},
	}
	if a.set["analysis-alpha"] {
		out.AnalysisPrior = &planPrior{analysis.Alpha, analysis.Beta}
	}
	nums := append([]float64{out.PriorMean, out.PriorSD, out.DataShare, out.PredictiveMean, out.PredictiveSD}, pmf...)
	if goal != nil {
		r, err := elicit.AssuranceUnder(prior, analysis, n, *goal)
		if err != nil {
			return planOutput{}, flagNames(err)
		}

		out.Assurance = &r.Assurance
		out.Success = &planSuccess{Threshold: goal.Threshold, Direction: string(goal.Direction), Confidence: goal.Confidence,
			SuccessesFrom: r.SuccessFrom, SuccessesTo: r.SuccessTo}
		curve, err := elicit.AssuranceCurveUnder(prior, analysis, *goal, elicit.PlanGrid(n, curvePoints))
		if err != nil {
			return planOutput{}, err
		}
		for _, c := range curve {
			out.AssuranceCurve = append(out.AssuranceCurve, planAssurancePoint{c.Trials, c.Assurance})
			nums = append(nums, c.Assurance)
		}
		nums = append(nums, r.Assurance)
	}
	if size != nil {
		search := elicit.SampleSizeUnder
		if a.exhaustive {
			search = elicit.SampleSizeExhaustiveUnder
		}
		r, err := search(ctx, prior, analysis, *size)
		if err != nil {
			return planOutput{}, flagNames(err)
		}
		ss := &planSampleSize{
			Criterion: string(size.Criterion), Interval: string(size.Interval), Level: size.Level, Length: size.Length,
			N: r.N, Trim: size.Trim, Value: r.At.Value, Exhaustive: r.Exhaustive, ScannedTo: r.ScannedTo,
			CheckedTo: r.CheckedTo, FailsAgainAt: r.FailsAgainAt,
			ValueWithoutData: r.WithoutData.Value, MetWithoutData: r.WithoutData.Met,
		}
		nums = append(nums, r.At.Value, r.WithoutData.Value)
		if size.Criterion == elicit.CriterionWOC {
			ss.WorstOutcome = &r.At.Worst
		}
		if n <= elicit.MaxSampleSize {
			at, err := elicit.CriterionValueUnder(prior, analysis, *size, n)
			if err != nil {
				return planOutput{}, err
			}
			ss.ValueAtTrials, ss.MetAtTrials = &at.Value, &at.Met
			nums = append(nums, at.Value)
		} else {
			out.Warnings = append(out.Warnings, fmt.Sprintf("the sample-size criterion is not evaluated at %d trials: more than %d", n, elicit.MaxSampleSize))
		}
		if r.FailsAgainAt != 0 {
			out.Warnings = append(out.Warnings, fmt.Sprintf("the %s criterion is met at n = %d but fails again at n = %d: it is not monotone here, so look at it over a range of n before settling on one", size.Criterion, r.N, r.FailsAgainAt))
		}
		if !r.Exhaustive {
			out.Warnings = append(out.Warnings, fmt.Sprintf("every n up to %d fails the criterion; above that n = %d was found by bisection, which assumes the criterion stays met once met (use --exhaustive to check every n)", r.ScannedTo, r.N))
		}
		out.SampleSize = ss
	}
	if !finite(nums...) {
		return planOutput{}, errors.New("the plan produced a non-finite number; nothing printed")
	}
	return out, nil
}

// flagNames names elicit's fields by their flags: "trim" is --woc-trim,
// "analysis_alpha" --analysis-alpha and "analysis_beta" --analysis-beta.
func flagNames(err error) error {
	var ie *elicit.InputError
	if !errors.As(err, &ie) {
		return err
	}
	if flag, ok := map[string]string{"trim": "woc-trim", "analysis_alpha": "analysis-alpha", "analysis_beta": "analysis-beta"}[ie.Field]; ok {
		return &elicit.InputError{Field: flag, Rule: ie.Rule, Detail: ie.Detail}
	}
	return err
}

// criterionWords names a criterion and its value for people.
var criterionWords = map[string][2]string{
	"alc": {"average length", "expected width"},
	"acc": {"average coverage", "average coverage"},
	"woc": {"worst outcome", "worst width"},
}

func writePlanText(w io.Writer, o planOutput) error {
	var b strings.Builder
	// The mean as `update` and `prior` write a proportion, never reading as
	// 0 or 1 when inside them (Beta(1e7, 1)'s 0.9999999 read "1").
	fmt.Fprintf(&b, "prior Beta(%s, %s): mean %s, sd %.4g; %s\n", shape(o.Alpha), shape(o.Beta), withinSig(o.PriorMean, 0, 1, 4), o.PriorSD, o.Worth.Words(shapeCount))
	fmt.Fprintf(&b, "a study of %s gets %s%% of the weight in the posterior mean\n", countOf(o.Trials, "trial", "trials"), elicit.PercentText(o.DataShare, 3))
	q := o.PredictivePercentiles
	fmt.Fprintf(&b, "prior predictive number of successes in %s: mean %s, sd %s; 5%% %d, 50%% %d, 95%% %d\n",
		countOf(o.Trials, "trial", "trials"), plainWithin(o.PredictiveMean, 0, float64(o.Trials)), plainSig4(o.PredictiveSD), q.Q05, q.Q50, q.Q95)
	if len(o.Predictive) <= 31 {
		fmt.Fprintf(&b, "  %9s  %s\n", "successes", "probability")
		for x, p := range o.Predictive {
			// Short of 1 when it is: 10 successes in 10 trials under
			// Beta(1e7, 1), 0.999999, read "1", as if certain.
			fmt.Fprintf(&b, "  %9d  %s\n", x, elicit.ProbabilityText(p, 4))
		}
	} else {
		fmt.Fprintf(&b, "  (--format json lists all %d probabilities)\n", len(o.Predictive))
	}
	if s := o.Success; s != nil {
		sign := "<"
		if s.Direction == string(elicit.DirectionAbove) {
			sign = ">"
		}
		judged := ""
		if ap := o.AnalysisPrior; ap != nil {
			judged = fmt.Sprintf(", judged under the analysis prior Beta(%s, %s) with outcomes drawn from the prior above", shape(ap.Alpha), shape(ap.Beta))
		}
		fmt.Fprintf(&b, "assurance that P(θ %s %g | data) ≥ %g after %s%s: %s\n", sign, s.Threshold, s.Confidence, countOf(o.Trials, "trial", "trials"), judged, elicit.ProbabilityText(*o.Assurance, 4))
		switch {
		case s.SuccessesFrom > s.SuccessesTo:
			fmt.Fprintf(&b, "  no outcome of %s meets the criterion\n", countOf(o.Trials, "trial", "trials"))
		case s.SuccessesFrom == 0 && s.SuccessesTo == o.Trials:
			fmt.Fprintf(&b, "  every outcome of %s meets the criterion\n", countOf(o.Trials, "trial", "trials"))
		case s.SuccessesFrom == 0:
			fmt.Fprintf(&b, "  the study succeeds if it sees at most %s\n", countOf(s.SuccessesTo, "success", "successes"))
		default:
			fmt.Fprintf(&b, "  the study succeeds if it sees at least %s\n", countOf(s.SuccessesFrom, "success", "successes"))
		}
		step := max(1, len(o.AssuranceCurve)/8)
		var points []string
		for i := step - 1; i < len(o.AssuranceCurve); i += step {
			c := o.AssuranceCurve[i]
			points = append(points, fmt.Sprintf("%d: %s", c.Trials, elicit.ProbabilityText(c.Assurance, 3)))
		}
		fmt.Fprintf(&b, "  assurance over the number of trials: %s\n", strings.Join(points, "; "))
	}
	if s := o.SampleSize; s != nil {
		words := criterionWords[s.Criterion]
		kind := "equal-tailed"
		if s.Interval == string(elicit.IntervalHPD) {
			kind = "highest-density"
		}
		var goal string
		switch s.Criterion {
		case string(elicit.CriterionALC):
			goal = fmt.Sprintf("its %s %s%% intervals are on average at most %g wide", kind, input.Typed(s.Level, true), s.Length)
		case string(elicit.CriterionACC):
			goal = fmt.Sprintf("its %s intervals %g wide hold on average at least %s%%", kind, s.Length, input.Typed(s.Level, true))
		default:
			goal = fmt.Sprintf("its %s %s%% intervals are at most %g wide whatever the outcome", kind, input.Typed(s.Level, true), s.Length)
			if s.Trim > 0 {
				goal += fmt.Sprintf(", leaving aside unlikely outcomes of total probability %g", s.Trim)
			}
		}
		alone := "the prior"
		if ap := o.AnalysisPrior; ap != nil {
			goal += fmt.Sprintf(" (intervals of the posterior under the analysis prior Beta(%s, %s), outcomes drawn from the prior above)", shape(ap.Alpha), shape(ap.Beta))
			alone = "the analysis prior"
		}
		fmt.Fprintf(&b, "sample size by %s (%s), the smallest n for which %s: n = %d\n", words[0], s.Criterion, goal, s.N)
		// The value with the figures that keep it on its own side of the
		// goal (elicit.SideDigits), as the study page writes it.
		goalValue := elicit.SampleSizeGoal{Criterion: elicit.Criterion(s.Criterion), Level: s.Level, Length: s.Length}.Target()
		beside := func(v float64) string { return strconv.FormatFloat(v, 'g', elicit.SideDigits(v, goalValue, 4), 64) }
		fmt.Fprintf(&b, "  %s at n = %d: %s", words[1], s.N, beside(s.Value))
		if s.WorstOutcome != nil {
			fmt.Fprintf(&b, " (the posterior after %d of %d)", *s.WorstOutcome, s.N)
		}
		if s.Exhaustive && s.N > 1 {
			b.WriteString("; every smaller n was checked and fails\n")
		} else {
			b.WriteString("\n")
		}
		if s.MetWithoutData {
			fmt.Fprintf(&b, "  %s alone, before any trial, already meets the goal (%s with no data: %s): the goal calls for no study, and n = %d is the smallest study that keeps it; check that the prior is not surer than the evidence behind it\n", alone, words[1], beside(s.ValueWithoutData), s.N)
		}
		if s.ValueAtTrials != nil {
			met := "not met"
			if *s.MetAtTrials {
				met = "met"
			}
			fmt.Fprintf(&b, "  at the planned %s: %s %s (%s)\n", countOf(o.Trials, "trial", "trials"), words[1], beside(*s.ValueAtTrials), met)
		}
	}
	for _, m := range o.Warnings {
		fmt.Fprintf(&b, "warning: %s\n", m)
	}
	fmt.Fprintln(&b, priorCaution)
	_, err := io.WriteString(w, b.String())
	return err
}

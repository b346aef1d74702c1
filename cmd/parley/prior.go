package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"slices"
	"strings"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
)

func init() {
	command("prior", "make a Beta prior quickly (--uniform | --successes, --trials | --mean, --sd | --interval, --coverage, [--method]; [--lower, --upper], --format)", runPrior)
}

// priorOutput is the JSON of `parley prior`; its keys are a public
// contract (alpha, beta, method, mean, sd, q05, q50, q95 and, for an
// interval, coverage_achieved).
type priorOutput struct {
	Alpha  float64 `json:"alpha"`
	Beta   float64 `json:"beta"`
	Lower  float64 `json:"lower"`
	Upper  float64 `json:"upper"`
	Method string  `json:"method"`
	Mean   float64 `json:"mean"`
	SD     float64 `json:"sd"`
	Q05    float64 `json:"q05"`
	Q50    float64 `json:"q50"`
	Q95    float64 `json:"q95"`
	// For an interval: the probability the prior gives to it and to each
	// side of it.
	CoverageAchieved *float64 `json:"coverage_achieved,omitempty"`
	BelowLow         *float64 `json:"below_low,omitempty"`
	AboveHigh        *float64 `json:"above_high,omitempty"`
	// Alternative is the other interval method's prior, for comparison.
	Alternative *priorAlternative        `json:"alternative,omitempty"`
	Worth       elicit.PriorWorth        `json:"worth"`
	Description string                   `json:"description"`
	Input       elicit.ConstructionInput `json:"input"`
	Warnings    []string                 `json:"warnings"`
	WarningCode []string                 `json:"warning_codes"`
	Caution     string                   `json:"caution"`
}

type priorAlternative struct {
	Method           string  `json:"method"`
	Alpha            float64 `json:"alpha"`
	Beta             float64 `json:"beta"`
	CoverageAchieved float64 `json:"coverage_achieved"`
}

// priorArgs are the raw flag values of `parley prior`, and which were set.
type priorArgs struct {
	uniform                            bool
	successes, trials, mean, sd        string
	interval, coverage, method, format string
	lower, upper                       string
	set                                map[string]bool
}

func runPrior(args []string, _ io.Reader, stdout, stderr io.Writer) int {
	fs := newFlags("prior", stderr)
	var a priorArgs
	fs.BoolVar(&a.uniform, "uniform", false, "the uniform prior, Beta(1, 1): every value equally likely")
	fs.StringVar(&a.successes, "successes", "", "equivalent prior sample: imagined successes s (> 0), with --trials")
	fs.StringVar(&a.trials, "trials", "", "equivalent prior sample: imagined trials n (> s); the prior is Beta(s, n - s)")
	fs.StringVar(&a.mean, "mean", "", "method of moments: the mean, with --sd (on bounds 0 and 1 it may be a percentage, 10%)")
	fs.StringVar(&a.sd, "sd", "", "method of moments: the standard deviation (sd² < (mean - lower)(upper - mean))")
	fs.StringVar(&a.interval, "interval", "", "central interval: low,high, with --coverage (on bounds 0 and 1 each may be a percentage, 3%)")
	fs.StringVar(&a.coverage, "coverage", "", "central interval: the probability it holds, strictly between 0 and 1 (0.9, or 90%)")
	fs.StringVar(&a.method, "method", "quantiles", "central interval: quantiles (exact match) or moments (normal approximation)")
	fs.StringVar(&a.lower, "lower", "0", "lower bound of the quantity")
	fs.StringVar(&a.upper, "upper", "1", "upper bound of the quantity")
	fs.StringVar(&a.format, "format", "text", "output: text or json")
	if code, ok := parseArgs(fs, args, stdout, stderr); !ok {
		return code
	}
	a.set = map[string]bool{}
	fs.Visit(func(f *flag.Flag) { a.set[f.Name] = true })
	out, err := priorCommand(a)
	if err != nil {
		return fail(stderr, "prior", err)
	}
	if a.format == "json" {
		err = writeJSON(stdout, out)
	} else {
		err = writePriorText(stdout, out)
	}
	if err != nil {
		return fail(stderr, "prior", err)
	}
	return exitOK
}

// priorGroups are the constructions, each named by its flags.
var priorGroups = []struct {
	method elicit.ConstructionMethod
	flags  []string
}{
	{elicit.MethodUniform, []string{"uniform"}},
	{elicit.MethodEquivalentSample, []string{"successes", "trials"}},
	{elicit.MethodMeanSD, []string{"mean", "sd"}},
	{elicit.MethodIntervalQuantiles, []string{"interval", "coverage"}},
}

// chooseConstruction checks that exactly one construction was given, with
// all its flags, and returns it.
func chooseConstruction(a priorArgs) (elicit.ConstructionMethod, error) {
	chosen, given := -1, ""
	for i, g := range priorGroups {
		for _, f := range g.flags {
			if a.set[f] && (f != "uniform" || a.uniform) {
				if chosen >= 0 && chosen != i {
					return "", badInput(f, "cannot be combined with --%s: give exactly one construction", given)
				}
				if chosen < 0 {
					chosen, given = i, f
				}
			}
		}
	}
	if chosen < 0 {
		return "", badInput("uniform", "give exactly one construction: --uniform, --successes with --trials, --mean with --sd, or --interval with --coverage")
	}
	for _, f := range priorGroups[chosen].flags {
		if !a.set[f] {
			return "", badInput(f, "is required with --%s", given)
		}
	}
	m := priorGroups[chosen].method
	if a.set["method"] && m != elicit.MethodIntervalQuantiles {
		return "", badInput("method", "applies only to --interval")
	}
	if m == elicit.MethodIntervalQuantiles {
		switch a.method {
		case "quantiles":
		case "moments":
			m = elicit.MethodIntervalMoments
		default:
			return "", badInput("method", "must be quantiles or moments, got %q", a.method)
		}
	}
	if m == elicit.MethodEquivalentSample && (a.set["lower"] || a.set["upper"]) {
		f := "lower"
		if !a.set["lower"] {
			f = "upper"
		}
		return "", badInput(f, "an equivalent prior sample describes a proportion on [0, 1]: --lower and --upper apply to --uniform, --mean and --interval")
	}
	return m, nil
}

func priorCommand(a priorArgs) (priorOutput, error) {
	if err := checkFormat(a.format); err != nil {
		return priorOutput{}, err
	}
	method, err := chooseConstruction(a)
	if err != nil {
		return priorOutput{}, err
	}
	in := elicit.ConstructionInput{Method: method}
	if in.Lower, err = number("lower", a.lower); err != nil {
		return priorOutput{}, err
	}
	if in.Upper, err = number("upper", a.upper); err != nil {
		return priorOutput{}, err
	}
	// On a proportion (bounds 0 and 1) a value may carry a % sign, as on
	// the quick priors page: 3% is 0.03. On other bounds a % sign is
	// refused, since 3% of what is not said.
	value := func(field, raw string) (float64, error) {
		if strings.HasSuffix(strings.TrimSpace(raw), "%") && !(in.Lower == 0 && in.Upper == 1) {
			return 0, badInput(field, "takes a %% sign only on bounds 0 and 1, where it is a proportion; here the bounds are %s and %s", input.Typed(in.Lower, false), input.Typed(in.Upper, false))
		}
		return fraction(field, raw)
	}
	switch method {
	case elicit.MethodEquivalentSample:
		if in.Successes, err = number("successes", a.successes); err != nil {
			return priorOutput{}, err
		}
		if in.Trials, err = number("trials", a.trials); err != nil {
			return priorOutput{}, err
		}
	case elicit.MethodMeanSD:
		if in.Mean, err = value("mean", a.mean); err != nil {
			return priorOutput{}, err
		}
		if in.SD, err = value("sd", a.sd); err != nil {
			return priorOutput{}, err
		}
	case elicit.MethodIntervalQuantiles, elicit.MethodIntervalMoments:
		var ends []float64
		if strings.Contains(a.interval, "%") {
			for i, end := range strings.Split(a.interval, ",") {
				v, err := value(fmt.Sprintf("interval[%d]", i), end)
				if err != nil {
					return priorOutput{}, err
				}
				ends = append(ends, v)
			}
		} else if ends, err = numbers("interval", a.interval); err != nil {
			return priorOutput{}, err
		}
		if len(ends) != 2 {
			return priorOutput{}, badInput("interval", "needs two numbers, low,high; got %d", len(ends))
		}
		in.Low, in.High = ends[0], ends[1]
		// A fraction (0.9), or a percentage with its sign (90%), as the
		// quick priors page takes it; a plain 90 stays refused.
		if in.Coverage, err = fraction("coverage", a.coverage); err != nil {
			return priorOutput{}, err
		}
	}
	c, err := elicit.Construct(in)
	if err != nil {
		return priorOutput{}, intervalFlag(err)
	}
	out := priorOutput{
		Alpha: c.Dist.Alpha, Beta: c.Dist.Beta.Beta, Lower: c.Dist.Lower, Upper: c.Dist.Upper,
		Method: string(method), Mean: c.Dist.Mean(), SD: c.Dist.SD(), Caution: cautionJSON,
		Q05: c.Dist.Quantile(0.05), Q50: c.Dist.Quantile(0.5), Q95: c.Dist.Quantile(0.95),
		Worth: elicit.Worth(c.Dist.Beta), Description: c.Describe(), Input: c.Input,
		Warnings: []string{}, WarningCode: []string{},
	}
	nums := []float64{out.Alpha, out.Beta, out.Mean, out.SD, out.Q05, out.Q50, out.Q95}
	if method.IsInterval() {
		out.CoverageAchieved, out.BelowLow, out.AboveHigh = &c.CoverageAchieved, &c.BelowLow, &c.AboveHigh
		nums = append(nums, c.CoverageAchieved, c.BelowLow, c.AboveHigh)
		other := in
		other.Method = elicit.MethodIntervalMoments
		if method == elicit.MethodIntervalMoments {
			other.Method = elicit.MethodIntervalQuantiles
		}
		if oc, err := elicit.Construct(other); err == nil {
			out.Alternative = &priorAlternative{Method: string(other.Method), Alpha: oc.Dist.Alpha, Beta: oc.Dist.Beta.Beta, CoverageAchieved: oc.CoverageAchieved}
			nums = append(nums, oc.Dist.Alpha, oc.Dist.Beta.Beta, oc.CoverageAchieved)
		} else {
			out.Warnings = append(out.Warnings, fmt.Sprintf("the %s method gives no prior for this interval: %v", other.Method, errText(err)))
			out.WarningCode = append(out.WarningCode, "no_alternative")
		}
	}
	for _, w := range c.Warnings {
		out.Warnings = append(out.Warnings, w.Message)
		out.WarningCode = append(out.WarningCode, string(w.Code))
	}
	if !finite(nums...) {
		return priorOutput{}, errors.New("the construction produced a non-finite number; nothing printed")
	}
	return out, nil
}

// intervalFlag renames elicit's fields for the interval to the flag that
// carries them: low and high are --interval's items 0 and 1.
func intervalFlag(err error) error {
	var ie *elicit.InputError
	if !errors.As(err, &ie) {
		return err
	}
	field := map[string]string{"low": "interval[0]", "high": "interval[1]"}[ie.Field]
	if field == "" {
		return err
	}
	return &elicit.InputError{Field: field, Rule: ie.Rule, Detail: ie.Detail}
}

// beyondNote follows a line of points when a warning says one of them
// is shown as its bound (elicit.WarnBeyondDouble), so that a 0 or a 1
// that is not the value is never read without a word.
func beyondNote(codes []string) string {
	if slices.Contains(codes, string(elicit.WarnBeyondDouble)) {
		return " (a point nearer its bound than a double holds is shown as the bound: see the warning below)"
	}
	return ""
}

func writePriorText(w io.Writer, o priorOutput) error {
	var b strings.Builder
	fmt.Fprintf(&b, "Beta(%s, %s) on [%g, %g]\n", shape(o.Alpha), shape(o.Beta), o.Lower, o.Upper)
	fmt.Fprintf(&b, "made from: %s\n", o.Description)
	in := func(x float64) string { return within(x, o.Lower, o.Upper) }
	fmt.Fprintf(&b, "mean %s, sd %.6g; 5%% %s, 50%% %s, 95%% %s%s\n", in(o.Mean), o.SD, in(o.Q05), in(o.Q50), in(o.Q95), beyondNote(o.WarningCode))
	if o.CoverageAchieved != nil {
		fmt.Fprintf(&b, "the interval [%g, %g] holds %s%% of this prior (asked %s%%): %.4g%% below it, %.4g%% above it\n",
			o.Input.Low, o.Input.High, elicit.PercentText(*o.CoverageAchieved, 4), input.Typed(o.Input.Coverage, true), 100**o.BelowLow, 100**o.AboveHigh)
	}
	if alt := o.Alternative; alt != nil {
		name := "exact quantile match"
		if alt.Method == string(elicit.MethodIntervalMoments) {
			name = "moment match"
		}
		fmt.Fprintf(&b, "the %s of the same interval gives Beta(%s, %s), which holds %s%% of its probability there\n", name, shape(alt.Alpha), shape(alt.Beta), elicit.PercentText(alt.CoverageAchieved, 4))
	}
	// The JSON's worth keeps the numbers; the words follow the bounds.
	fmt.Fprintf(&b, "%s\n", elicit.WorthOf(elicit.ScaledBeta{Beta: elicit.Beta{Alpha: o.Alpha, Beta: o.Beta}, Lower: o.Lower, Upper: o.Upper}, shapeCount))
	for _, m := range o.Warnings {
		fmt.Fprintf(&b, "warning: %s\n", m)
	}
	fmt.Fprintln(&b, priorCaution)
	_, err := io.WriteString(w, b.String())
	return err
}

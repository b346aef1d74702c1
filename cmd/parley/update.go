package main

import (
	"errors"
	"fmt"
	"io"
	"strconv"
	"strings"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
)

func init() {
	command("update", "update a Beta prior with binomial data (--alpha, --beta, --successes, --trials, [--level], --format)", runUpdate)
}

// maxTrials bounds --trials and --successes: elicit's own limit.
const maxTrials = elicit.MaxUpdateTrials

// updateOutput is the JSON of `parley update`; its keys are a public
// contract.
type updateOutput struct {
	Prior     elicit.Beta `json:"prior"`
	Successes int         `json:"successes"`
	Trials    int         `json:"trials"`
	Level     float64     `json:"level"`
	Alpha     float64     `json:"alpha"` // posterior
	Beta      float64     `json:"beta"`  // posterior
	Mean      float64     `json:"mean"`
	SD        float64     `json:"sd"`
	Interval  [2]float64  `json:"interval"` // equal-tailed credible interval
	HDI       [2]float64  `json:"hdi"`      // highest-density interval
	// Conflict is the prior predictive check of the observed count; it is
	// null, with a warning, when trials exceed elicit.MaxPredictiveTrials.
	Conflict *elicit.Conflict `json:"prior_data_conflict"`
	Warnings []string         `json:"warnings"`
	// WarningCode is each warning's code, in the order of Warnings, as
	// `parley prior` and `parley fit` give them: conflict_unchecked,
	// hdi_shape (elicit.HDINote) or beyond_double (an interval's end
	// written as the bound it lies a hair inside).
	WarningCode []string `json:"warning_codes"`
	Caution     string   `json:"caution"`
	// heldEq and heldHDI: an end of the interval, or of the HDI, is
	// written as the bound it lies a hair inside (the text says so on
	// its line).
	heldEq, heldHDI bool
}

// warn adds a warning with its code.
func (o *updateOutput) warn(code, message string) {
	o.Warnings = append(o.Warnings, message)
	o.WarningCode = append(o.WarningCode, code)
}

func runUpdate(args []string, _ io.Reader, stdout, stderr io.Writer) int {
	fs := newFlags("update", stderr)
	alphaArg := fs.String("alpha", "", "prior alpha, from 1e-6 to 1e7 (the accuracy envelope)")
	betaArg := fs.String("beta", "", "prior beta, from 1e-6 to 1e7")
	sArg := fs.String("successes", "", "observed successes (whole number, at most --trials)")
	nArg := fs.String("trials", "", "observed trials (whole number, 0 to 1000000)")
	levelArg := fs.String("level", "0.95", "credible level of the intervals, strictly between 0 and 1 (0.95, or 95%)")
	format := fs.String("format", "text", "output: text or json")
	if code, ok := parseArgs(fs, args, stdout, stderr); !ok {
		return code
	}
	out, err := updateCommand(*alphaArg, *betaArg, *sArg, *nArg, *levelArg, *format)
	if err != nil {
		return fail(stderr, "update", err)
	}
	if *format == "json" {
		err = writeJSON(stdout, out)
	} else {
		err = writeUpdateText(stdout, out)
	}
	if err != nil {
		return fail(stderr, "update", err)
	}
	return exitOK
}

func updateCommand(alphaArg, betaArg, sArg, nArg, levelArg, format string) (updateOutput, error) {
	if err := checkFormat(format); err != nil {
		return updateOutput{}, err
	}
	a, err := number("alpha", alphaArg)
	if err != nil {
		return updateOutput{}, err
	}
	b, err := number("beta", betaArg)
	if err != nil {
		return updateOutput{}, err
	}
	s, err := count("successes", sArg, maxTrials)
	if err != nil {
		return updateOutput{}, err
	}
	n, err := count("trials", nArg, maxTrials)
	if err != nil {
		return updateOutput{}, err
	}
	level, err := fraction("level", levelArg)
	if err != nil {
		return updateOutput{}, err
	}
	prior := elicit.Beta{Alpha: a, Beta: b}
	up, err := elicit.UpdateWith(prior, s, n, level)
	if err != nil {
		return updateOutput{}, err
	}
	post := up.Posterior
	lo, hi, hlo, hhi := up.Interval[0], up.Interval[1], up.HDI[0], up.HDI[1]
	out := updateOutput{
		Prior: prior, Successes: s, Trials: n, Level: level,
		Alpha: post.Alpha, Beta: post.Beta, Mean: post.Mean(), SD: post.SD(),
		Interval: up.Interval, HDI: up.HDI, Caution: cautionJSON,
		Warnings: []string{}, WarningCode: []string{},
	}
	if n <= elicit.MaxPredictiveTrials {
		c, err := elicit.ConflictCheck(prior, s, n)
		if err != nil {
			return updateOutput{}, err
		}
		out.Conflict = &c
	} else {
		out.warn("conflict_unchecked", fmt.Sprintf("prior-data conflict not checked: more than %d trials", elicit.MaxPredictiveTrials))
	}
	if note := elicit.HDINote(post, hlo, hhi, "the posterior"); note != "" {
		out.warn("hdi_shape", note)
	}
	if note, eq, hdi := elicit.IntervalsBeyondDouble(post, level, up.Interval, up.HDI); note != "" {
		out.warn(string(elicit.WarnBeyondDouble), note)
		out.heldEq, out.heldHDI = eq, hdi
	}
	nums := []float64{out.Alpha, out.Beta, out.Mean, out.SD, lo, hi, hlo, hhi}
	if out.Conflict != nil {
		nums = append(nums, out.Conflict.Lower, out.Conflict.Upper, out.Conflict.TwoSided)
	}
	if !finite(nums...) {
		return updateOutput{}, errors.New("the update produced a non-finite number; nothing printed")
	}
	return out, nil
}

func writeUpdateText(w io.Writer, o updateOutput) error {
	var b strings.Builder
	pct := input.Typed(o.Level, true)
	fmt.Fprintf(&b, "prior Beta(%s, %s), data %s in %s\n", shape(o.Prior.Alpha), shape(o.Prior.Beta), countOf(o.Successes, "success", "successes"), countOf(o.Trials, "trial", "trials"))
	in := func(x float64) string { return within(x, 0, 1) }
	fmt.Fprintf(&b, "posterior Beta(%s, %s): mean %s, sd %.6g\n", shape(o.Alpha), shape(o.Beta), in(o.Mean), o.SD)
	note := func(held bool) string {
		if held {
			return beyondNote([]string{string(elicit.WarnBeyondDouble)})
		}
		return ""
	}
	fmt.Fprintf(&b, "%s%% equal-tailed interval [%s, %s]%s\n", pct, in(o.Interval[0]), in(o.Interval[1]), note(o.heldEq))
	fmt.Fprintf(&b, "%s%% highest-density interval [%s, %s]%s\n", pct, in(o.HDI[0]), in(o.HDI[1]), note(o.heldHDI))
	if c := o.Conflict; c != nil {
		fmt.Fprintf(&b, "prior predictive check: %s\n", c)
	}
	for _, m := range o.Warnings {
		fmt.Fprintf(&b, "warning: %s\n", m)
	}
	fmt.Fprintln(&b, priorCaution)
	_, err := io.WriteString(w, b.String())
	return err
}

// countOf is "1 trial" or "n trials".
func countOf(n int, one, many string) string {
	if n == 1 {
		return "1 " + one
	}
	return strconv.Itoa(n) + " " + many
}

package main

import (
	"errors"
	"fmt"
	"io"
	"strings"

	"github.com/parley-elicit/parley/elicit"
)

func init() {
	command("fit", "fit a Beta to quantile judgements (--probs, --values, [--lower, --upper], --format)", runFit)
}

// fitOutput is the JSON of `parley fit`; its keys are a public contract.
type fitOutput struct {
	Alpha        float64     `json:"alpha"`
	Beta         float64     `json:"beta"`
	Lower        float64     `json:"lower"`
	Upper        float64     `json:"upper"`
	SSE          float64     `json:"sse"`
	Probs        []float64   `json:"probs"`
	Values       []float64   `json:"values"`
	Fitted       []float64   `json:"fitted"`
	ProbErrors   []float64   `json:"prob_errors"`
	MaxProbError float64     `json:"max_prob_error"`
	Percentiles  percentiles `json:"percentiles"`
	Mean         float64     `json:"mean"`
	SD           float64     `json:"sd"`
	Warnings     []string    `json:"warnings"`
	WarningCodes []string    `json:"warning_codes"`
	Caution      string      `json:"caution"`
}

// percentiles are values at the probabilities 0.05, 0.5 and 0.95.
type percentiles struct {
	P05 float64 `json:"p05"`
	P50 float64 `json:"p50"`
	P95 float64 `json:"p95"`
}

func runFit(args []string, _ io.Reader, stdout, stderr io.Writer) int {
	fs := newFlags("fit", stderr)
	probsArg := fs.String("probs", "", "stated probabilities, comma-separated, e.g. 0.05,0.5,0.95")
	valuesArg := fs.String("values", "", "the expert's values at those probabilities, comma-separated")
	lowerArg := fs.String("lower", "0", "lower bound of the quantity")
	upperArg := fs.String("upper", "1", "upper bound of the quantity")
	format := fs.String("format", "text", "output: text or json")
	if code, ok := parseArgs(fs, args, stdout, stderr); !ok {
		return code
	}
	out, err := fitCommand(*probsArg, *valuesArg, *lowerArg, *upperArg, *format)
	if err != nil {
		return fail(stderr, "fit", err)
	}
	if *format == "json" {
		err = writeJSON(stdout, out)
	} else {
		err = writeFitText(stdout, out)
	}
	if err != nil {
		return fail(stderr, "fit", err)
	}
	return exitOK
}

func fitCommand(probsArg, valuesArg, lowerArg, upperArg, format string) (fitOutput, error) {
	if err := checkFormat(format); err != nil {
		return fitOutput{}, err
	}
	probs, err := numbers("probs", probsArg)
	if err != nil {
		return fitOutput{}, err
	}
	values, err := numbers("values", valuesArg)
	if err != nil {
		return fitOutput{}, err
	}
	lower, err := number("lower", lowerArg)
	if err != nil {
		return fitOutput{}, err
	}
	upper, err := number("upper", upperArg)
	if err != nil {
		return fitOutput{}, err
	}
	f, err := elicit.FitQuantiles(elicit.Judgement{Probs: probs, Values: values, Lower: lower, Upper: upper})
	if err != nil {
		return fitOutput{}, err
	}
	out := fitOutput{Caution: cautionJSON,
		Alpha: f.Dist.Alpha, Beta: f.Dist.Beta.Beta, Lower: f.Dist.Lower, Upper: f.Dist.Upper,
		SSE: f.SSE, Probs: f.Probs, Values: f.Stated, Fitted: f.Fitted, ProbErrors: f.ProbErrors,
		MaxProbError: f.MaxProbError,
		Percentiles:  percentiles{f.Percentiles[0], f.Percentiles[1], f.Percentiles[2]},
		Mean:         f.Dist.Mean(), SD: f.Dist.SD(),
		Warnings: []string{}, WarningCodes: []string{},
	}
	for _, w := range f.Warnings {
		out.Warnings = append(out.Warnings, w.Message)
		out.WarningCodes = append(out.WarningCodes, string(w.Code))
	}
	nums := append([]float64{out.Alpha, out.Beta, out.SSE, out.MaxProbError, out.Mean, out.SD,
		out.Percentiles.P05, out.Percentiles.P50, out.Percentiles.P95}, out.Fitted...)
	if !finite(nums...) {
		return fitOutput{}, errors.New("the fit produced a non-finite number; nothing printed")
	}
	return out, nil
}

func writeFitText(w io.Writer, o fitOutput) error {
	var b strings.Builder
	fmt.Fprintf(&b, "Beta(%s, %s) on [%g, %g]\n", shape(o.Alpha), shape(o.Beta), o.Lower, o.Upper)
	in := func(x float64) string { return within(x, o.Lower, o.Upper) }
	fmt.Fprintf(&b, "mean %s, sd %.6g; 5%% %s, 50%% %s, 95%% %s%s\n", in(o.Mean), o.SD, in(o.Percentiles.P05), in(o.Percentiles.P50), in(o.Percentiles.P95), beyondNote(o.WarningCodes))
	fmt.Fprintf(&b, "%-12s %-12s %-12s %s\n", "probability", "stated", "fitted", "F(stated)-p")
	for i, p := range o.Probs {
		fmt.Fprintf(&b, "%-12g %-12s %-12s %+.2e\n", p, in(o.Values[i]), in(o.Fitted[i]), o.ProbErrors[i])
	}
	fmt.Fprintf(&b, "sum of squares %.3e, largest probability error %.3e\n", o.SSE, o.MaxProbError)
	for _, m := range o.Warnings {
		fmt.Fprintf(&b, "warning: %s\n", m)
	}
	fmt.Fprintln(&b, priorCaution)
	_, err := io.WriteString(w, b.String())
	return err
}

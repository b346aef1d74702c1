package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"reflect"
	"strings"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
)

func init() {
	command("pool", `combine experts' Betas read as JSON on stdin ({"experts":[{"alpha","beta","weight"}],"probs","method":"linear"|"log","lower","upper"}; --format)`, runPool)
}

// Rules of the JSON read by `parley pool`, beside elicit's own.
const (
	ruleJSONSyntax elicit.Rule = "must be one valid JSON object"
	ruleJSONType   elicit.Rule = "has the wrong JSON type"
	ruleJSONField  elicit.Rule = "is not a field of this input"
	ruleAllOrNone  elicit.Rule = "give a weight for every expert or for none"
)

// Limits of the pool input.
const (
	maxPoolInput   = 1 << 20 // bytes on stdin
	maxPoolExperts = 1000
	maxPoolProbs   = 999
)

// poolInput is the JSON read by `parley pool`; its keys are a public
// contract. Pointers tell a missing number from 0.
type poolInput struct {
	Experts []poolExpert `json:"experts"`
	Probs   []float64    `json:"probs"`  // default 0.05, 0.5, 0.95
	Method  *string      `json:"method"` // "linear" (default, when absent) or "log"; "" is refused, as an empty flag is
	Lower   *float64     `json:"lower"`  // default 0
	Upper   *float64     `json:"upper"`  // default 1
}

type poolExpert struct {
	Alpha  *float64 `json:"alpha"`
	Beta   *float64 `json:"beta"`
	Weight *float64 `json:"weight"` // optional: all or none; none means equal
}

// poolOutput is the JSON printed by `parley pool`; its keys are a public
// contract.
type poolOutput struct {
	Method    string    `json:"method"`
	Experts   int       `json:"experts"`
	Lower     float64   `json:"lower"`
	Upper     float64   `json:"upper"`
	Mean      float64   `json:"mean"`
	SD        float64   `json:"sd"`
	Probs     []float64 `json:"probs"`
	Quantiles []float64 `json:"quantiles"`
	// QuantileDetail says for each quantile whether it is unique; where
	// the pooled CDF is flat, to within its rounding, across [low, high],
	// the quantile is that interval's midpoint (elicit.PoolQuantile).
	QuantileDetail []elicit.PoolQuantile `json:"quantile_detail"`
	// Beta is null, with a warning, when no Beta within the fitter's
	// search range represents a linear pool.
	Beta *elicit.Beta `json:"beta"`
	// BetaExact is true for the log pool, whose result is itself a Beta;
	// for the linear pool beta is the least-squares representation and
	// BetaFit says how far it is from the pool.
	BetaExact bool     `json:"beta_exact"`
	BetaFit   *betaFit `json:"beta_fit"`
	Warnings  []string `json:"warnings"`
	Caution   string   `json:"caution"`

	pool        elicit.Pool // the linear pool, for its points held as a bound
	heldAsBound bool        // a quantile is written as the bound it lies inside
}

type betaFit struct {
	SSE           float64     `json:"sse"`
	MaxCDFError   float64     `json:"max_cdf_error"`
	QuantileDiffs percentiles `json:"quantile_diffs"` // Beta's minus pool's quantiles
	SDRatio       float64     `json:"sd_ratio"`       // Beta's sd over the pool's
	IntervalRatio float64     `json:"interval_ratio"` // Beta's central 90% width over the pool's
}

func runPool(args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	fs := newFlags("pool", stderr)
	format := fs.String("format", "text", "output: text or json")
	if code, ok := parseArgs(fs, args, stdout, stderr); !ok {
		return code
	}
	if err := checkFormat(*format); err != nil {
		return fail(stderr, "pool", err)
	}
	in, err := readPoolInput(stdin)
	if err != nil {
		return fail(stderr, "pool", err)
	}
	out, err := poolCommand(in)
	if err != nil {
		return fail(stderr, "pool", err)
	}
	if *format == "json" {
		err = writeJSON(stdout, out)
	} else {
		err = writePoolText(stdout, out)
	}
	if err != nil {
		return fail(stderr, "pool", err)
	}
	return exitOK
}

// poolLayout is how input.ScanJSON reads the pool's JSON.
var poolLayout = input.JSONLayout{
	Type: reflect.TypeFor[poolInput](), Whole: "stdin",
	Syntax: ruleJSONSyntax, Unknown: ruleJSONField, WrongType: ruleJSONType,
}

// readPoolInput decodes exactly one JSON object with only known fields.
// The scan before decoding refuses what encoding/json would take silently
// (a repeated key, whose last value would win; a key in another letter
// case) and names each refusal by its path, as experts[0].alpha.
func readPoolInput(r io.Reader) (poolInput, error) {
	data, err := io.ReadAll(io.LimitReader(r, maxPoolInput+1))
	if err != nil {
		return poolInput{}, err
	}
	if len(data) > maxPoolInput {
		return poolInput{}, &elicit.InputError{Field: "stdin", Rule: input.RuleTooLong, Detail: fmt.Sprintf("more than %d bytes", maxPoolInput)}
	}
	if err := input.ScanJSON(data, poolLayout); err != nil {
		return poolInput{}, err
	}
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	var in poolInput
	if err := dec.Decode(&in); err != nil {
		return poolInput{}, jsonInputError(err)
	}
	if dec.More() {
		return poolInput{}, &elicit.InputError{Field: "stdin", Rule: ruleJSONSyntax, Detail: "more data after the object"}
	}
	return in, nil
}

// jsonInputError turns a decoding error into an *elicit.InputError
// naming the field where it can.
func jsonInputError(err error) error {
	var syn *json.SyntaxError
	var typ *json.UnmarshalTypeError
	switch {
	case errors.As(err, &syn):
		return &elicit.InputError{Field: "stdin", Rule: ruleJSONSyntax, Detail: fmt.Sprintf("%v at byte %d", syn, syn.Offset)}
	case errors.As(err, &typ):
		field := typ.Field
		if field == "" {
			field = "stdin"
		}
		// typ.Type is a Go type (main.poolInput): not for the reader.
		return &elicit.InputError{Field: field, Rule: ruleJSONType, Detail: "got " + typ.Value}
	case errors.Is(err, io.EOF), errors.Is(err, io.ErrUnexpectedEOF):
		return &elicit.InputError{Field: "stdin", Rule: ruleJSONSyntax, Detail: "empty or cut short"}
	}
	// encoding/json reports unknown fields only as text: json: unknown field "name".
	if name, ok := strings.CutPrefix(err.Error(), "json: unknown field "); ok {
		return &elicit.InputError{Field: strings.Trim(name, `"`), Rule: ruleJSONField}
	}
	return &elicit.InputError{Field: "stdin", Rule: ruleJSONSyntax, Detail: err.Error()}
}

func poolCommand(in poolInput) (poolOutput, error) {
	out, err := poolResult(in)
	return out, inputFields(err)
}

// inputFields renames the fields of elicit's pool errors to the keys of
// the JSON input: weights[i] is experts[i].weight, and the shared bounds
// are the top-level lower and upper.
func inputFields(err error) error {
	var ie *elicit.InputError
	if !errors.As(err, &ie) {
		return err
	}
	c := *ie
	switch {
	case strings.HasPrefix(c.Field, "weights["):
		c.Field = "experts" + strings.TrimPrefix(c.Field, "weights") + ".weight"
	case c.Field == "weights":
		c.Field = "experts[].weight"
	case strings.HasSuffix(c.Field, ".lower"):
		c.Field = "lower"
	case strings.HasSuffix(c.Field, ".upper"):
		c.Field = "upper"
	}
	return &c
}

func poolResult(in poolInput) (poolOutput, error) {
	lower, upper := 0.0, 1.0
	// + 0 turns a JSON -0 into 0, as input.Number reads a typed -0: the
	// pool was printed "on [-0, 1]".
	if in.Lower != nil {
		lower = *in.Lower + 0
	}
	if in.Upper != nil {
		upper = *in.Upper + 0
	}
	if len(in.Experts) > maxPoolExperts {
		return poolOutput{}, &elicit.InputError{Field: "experts", Rule: elicit.RuleCount, Detail: fmt.Sprintf("at most %d, got %d", maxPoolExperts, len(in.Experts))}
	}
	probs := in.Probs
	if probs == nil {
		probs = []float64{0.05, 0.5, 0.95}
	}
	if len(probs) > maxPoolProbs {
		return poolOutput{}, &elicit.InputError{Field: "probs", Rule: elicit.RuleCount, Detail: fmt.Sprintf("at most %d, got %d", maxPoolProbs, len(probs))}
	}
	if err := elicit.CheckProbs("probs", probs); err != nil {
		return poolOutput{}, err
	}
	dists, weights, err := poolExperts(in.Experts, lower, upper)
	if err != nil {
		return poolOutput{}, err
	}
	// quantiles and quantile_detail are arrays, empty for "probs": [],
	// never null.
	out := poolOutput{Experts: len(dists), Lower: lower, Upper: upper, Probs: probs, Warnings: []string{}, Caution: cautionJSON,
		Quantiles: make([]float64, 0, len(probs)), QuantileDetail: []elicit.PoolQuantile{}}
	method := "linear"
	if in.Method != nil {
		method = *in.Method
	}
	switch method {
	case "linear":
		out.Method = "linear"
		p, err := elicit.LinearPool(dists, weights)
		if err != nil {
			return poolOutput{}, err
		}
		out.pool = p
		qs, err := p.QuantileSet(probs)
		if err != nil {
			return poolOutput{}, err
		}
		out.QuantileDetail = append(out.QuantileDetail, qs...)
		for _, q := range out.QuantileDetail {
			out.Quantiles = append(out.Quantiles, q.Value)
			if !q.Unique {
				out.Warnings = append(out.Warnings, fmt.Sprintf(
					"the %g quantile is not unique: the pooled CDF equals %g, to within its rounding, everywhere from %.6g to %.6g; the midpoint %.6g is reported",
					q.Prob, q.Prob, q.Low, q.High, q.Value))
			}
		}
		out.Mean, out.SD = p.Mean(), p.SD()
		r, err := p.BestBeta()
		switch {
		case errors.Is(err, elicit.ErrFitFailed):
			out.Warnings = append(out.Warnings, "no single Beta represents this pool: "+err.Error())
		case err != nil:
			return poolOutput{}, err
		default:
			out.Beta = &r.Dist.Beta
			out.BetaFit = &betaFit{r.SSE, r.MaxCDFError, percentiles{r.QuantileDiffs[0], r.QuantileDiffs[1], r.QuantileDiffs[2]},
				r.SDRatio, r.IntervalRatio}
			// Flagged by the CDF distance (the 0.05 an expert's fit is
			// judged by) and by the spread ratios.
			out.Warnings = append(out.Warnings, r.Warnings...)
		}
	case "log":
		out.Method = "log"
		d, err := elicit.LogPool(dists, weights)
		if err != nil {
			return poolOutput{}, err
		}
		for i, pr := range probs {
			out.Quantiles = append(out.Quantiles, d.Quantile(pr))
			out.QuantileDetail = append(out.QuantileDetail, elicit.PoolQuantile{Prob: pr, Value: out.Quantiles[i], Unique: true, Low: out.Quantiles[i], High: out.Quantiles[i]})
		}
		out.Mean, out.SD, out.Beta, out.BetaExact = d.Mean(), d.SD(), &d.Beta, true
	default:
		return poolOutput{}, &elicit.InputError{Field: "method", Rule: elicit.RuleUnknown, Detail: fmt.Sprintf("got %q, want \"linear\" or \"log\"", method)}
	}
	if w, ok := poolBeyondDouble(out, lower, upper); ok {
		out.Warnings, out.heldAsBound = append(out.Warnings, w), true
	}
	nums := append([]float64{out.Mean, out.SD}, out.Quantiles...)
	if out.Beta != nil {
		nums = append(nums, out.Beta.Alpha, out.Beta.Beta)
	}
	if !finite(nums...) {
		return poolOutput{}, errors.New("the pool produced a non-finite number; nothing printed")
	}
	return out, nil
}

// poolBeyondDouble is the warning that a quantile of the pool is written
// as a bound it lies a hair inside (elicit.WarnBeyondDouble), with its
// distance; the logarithmic pool is one Beta, its pool of one.
func poolBeyondDouble(out poolOutput, lower, upper float64) (string, bool) {
	var shown []elicit.ShownPoint
	for i, p := range out.Probs {
		shown = append(shown, elicit.ShownPoint{P: p, X: out.Quantiles[i]})
	}
	var p elicit.Pool
	var err error
	if out.Method == "log" {
		p, err = elicit.LinearPool([]elicit.ScaledBeta{{Beta: *out.Beta, Lower: lower, Upper: upper}}, nil)
	} else {
		p, err = out.pool, nil
	}
	if err != nil {
		return "", false
	}
	w, ok := p.BeyondDouble(shown)
	return w.Message, ok
}

// poolExperts turns the experts of the input into elicit's types; a
// missing alpha or beta is an error, and weights are given for all or
// none (nil weights: equal).
func poolExperts(experts []poolExpert, lower, upper float64) ([]elicit.ScaledBeta, []float64, error) {
	dists := make([]elicit.ScaledBeta, len(experts))
	var weights []float64
	for i, e := range experts {
		if e.Alpha == nil {
			return nil, nil, &elicit.InputError{Field: fmt.Sprintf("experts[%d].alpha", i), Rule: elicit.RuleRequired}
		}
		if e.Beta == nil {
			return nil, nil, &elicit.InputError{Field: fmt.Sprintf("experts[%d].beta", i), Rule: elicit.RuleRequired}
		}
		if (e.Weight == nil) != (experts[0].Weight == nil) {
			return nil, nil, &elicit.InputError{Field: fmt.Sprintf("experts[%d].weight", i), Rule: ruleAllOrNone}
		}
		dists[i] = elicit.ScaledBeta{Beta: elicit.Beta{Alpha: *e.Alpha, Beta: *e.Beta}, Lower: lower, Upper: upper}
		if e.Weight != nil {
			weights = append(weights, *e.Weight)
		}
	}
	return dists, weights, nil
}

func writePoolText(w io.Writer, o poolOutput) error {
	var b strings.Builder
	in := func(x float64) string { return within(x, o.Lower, o.Upper) }
	fmt.Fprintf(&b, "%s pool of %s on [%g, %g]: mean %s, sd %.6g\n", o.Method, countOf(o.Experts, "expert", "experts"), o.Lower, o.Upper, in(o.Mean), o.SD)
	for i, p := range o.Probs {
		fmt.Fprintf(&b, "  quantile %-8g %s", p, in(o.Quantiles[i]))
		if x := o.Quantiles[i]; (x == o.Lower || x == o.Upper) && o.heldAsBound {
			fmt.Fprint(&b, " (nearer the bound than a double holds: see the warning below)")
		}
		if q := o.QuantileDetail[i]; !q.Unique {
			fmt.Fprintf(&b, " (not unique: every value from %s to %s has this probability; the midpoint is shown)", in(q.Low), in(q.High))
		}
		fmt.Fprintln(&b)
	}
	switch {
	case o.Beta == nil:
		// No representation; a warning says why.
	case o.BetaExact:
		fmt.Fprintf(&b, "the pool is exactly Beta(%s, %s)\n", shape(o.Beta.Alpha), shape(o.Beta.Beta))
	case o.BetaFit != nil:
		f := o.BetaFit
		fmt.Fprintf(&b, "best single Beta(%s, %s): its CDF is within %.3g of the pool's; quantiles differ by %+.3g, %+.3g, %+.3g at 5%%, 50%%, 95%%; its sd is %.3g and its central 90%% interval %.3g times the pool's\n",
			shape(o.Beta.Alpha), shape(o.Beta.Beta), f.MaxCDFError, f.QuantileDiffs.P05, f.QuantileDiffs.P50, f.QuantileDiffs.P95, f.SDRatio, f.IntervalRatio)
	}
	for _, m := range o.Warnings {
		fmt.Fprintf(&b, "warning: %s\n", m)
	}
	fmt.Fprintln(&b, priorCaution)
	_, err := io.WriteString(w, b.String())
	return err
}

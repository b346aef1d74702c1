package workshop

import (
	"errors"
	"fmt"
	"math"
	"reflect"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
)

// Invented questions of the demo scenario's kind.
func quantileQuestion() Question {
	return Question{
		Wording:  "What proportion of the new inverters will fail in their first year? (invented example)",
		Quantity: "first-year failure proportion",
		Lower:    0, Upper: 1,
		Format: FormatQuantiles,
		Probs:  ProbsDefault,
	}
}

func intervalQuestion() Question {
	q := quantileQuestion()
	q.Format, q.Probs = FormatInterval, nil
	return q
}

func chipsQuestion() Question {
	q := quantileQuestion()
	q.Format, q.Probs = FormatChips, nil
	q.Upper = 0.25
	q.BinEdges = []float64{0, 0.025, 0.05, 0.075, 0.1, 0.15, 0.25}
	q.Chips = 20
	return q
}

func TestProbSets(t *testing.T) {
	for name, ps := range map[string][]float64{"default": ProbsDefault, "quartiles": ProbsQuartiles, "tertiles": ProbsTertiles} {
		if err := elicit.CheckProbs(name, ps); err != nil {
			t.Errorf("%s: %v", name, err)
		}
	}
	if !reflect.DeepEqual(ProbsDefault, []float64{0.05, 0.5, 0.95}) || !reflect.DeepEqual(ProbsQuartiles, []float64{0.25, 0.5, 0.75}) {
		t.Errorf("default %v quartiles %v", ProbsDefault, ProbsQuartiles)
	}
	if ProbsTertiles[0] != 1.0/3 || ProbsTertiles[1] != 0.5 || ProbsTertiles[2] != 2.0/3 {
		t.Errorf("tertiles %v", ProbsTertiles)
	}
}

func TestQuestionValidate(t *testing.T) {
	for _, q := range []Question{quantileQuestion(), intervalQuestion(), chipsQuestion()} {
		if err := q.Validate(); err != nil {
			t.Errorf("valid %s question rejected: %v", q.Format, err)
		}
	}
	tv := func(v float64) *float64 { return &v }
	cases := []struct {
		name  string
		edit  func(*Question)
		field string
		rule  elicit.Rule
	}{
		{"no wording", func(q *Question) { q.Wording = "  " }, "wording", elicit.RuleRequired},
		{"long wording", func(q *Question) { q.Wording = strings.Repeat("é", input.MaxLongText+1) }, "wording", input.RuleTooLong},
		{"no quantity", func(q *Question) { q.Quantity = "" }, "quantity", elicit.RuleRequired},
		{"long units", func(q *Question) { q.Units = strings.Repeat("u", input.MaxShortText+1) }, "units", input.RuleTooLong},
		{"long quantity", func(q *Question) { q.Quantity = strings.Repeat("語", input.MaxShortText+1) }, "quantity", input.RuleTooLong},
		{"control character in wording", func(q *Question) { q.Wording = "How many\x1b[31m?" }, "wording", input.RuleTextValid},
		{"lower NaN", func(q *Question) { q.Lower = math.NaN() }, "lower", elicit.RuleFinite},
		{"upper Inf", func(q *Question) { q.Upper = math.Inf(1) }, "upper", elicit.RuleFinite},
		{"bounds order", func(q *Question) { q.Lower, q.Upper = 1, 0 }, "lower", elicit.RuleBoundsOrder},
		{"format", func(q *Question) { q.Format = "sliders" }, "format", elicit.RuleUnknown},
		{"one prob", func(q *Question) { q.Probs = []float64{0.5} }, "probs", elicit.RuleCount},
		{"ten probs", func(q *Question) { q.Probs = make([]float64, 10) }, "probs", elicit.RuleCount},
		{"prob order", func(q *Question) { q.Probs = []float64{0.5, 0.25} }, "probs[1]", elicit.RuleProbIncreasing},
		{"prob open", func(q *Question) { q.Probs = []float64{0, 0.5} }, "probs[0]", elicit.RuleProbOpen},
		// Two labels "50%" for one question, and two sheet columns q50.
		{"probs too close", func(q *Question) { q.Probs = []float64{0.05, 0.5, 0.5005, 0.95} }, "probs[2]", RuleProbGap},
		{"probs a hair apart", func(q *Question) { q.Probs = []float64{0.05, 0.5, 0.5000001} }, "probs[2]", RuleProbGap},
		{"true value outside", func(q *Question) { q.TrueValue = tv(1.0000001) }, "true_value", elicit.RuleInRange},
		{"true value NaN", func(q *Question) { q.TrueValue = tv(math.NaN()) }, "true_value", elicit.RuleFinite},
	}
	// A true value on a bound is taken: an observed share can be 0 or 1.
	for _, v := range []float64{0, 1} {
		q := quantileQuestion()
		q.Calibration, q.TrueValue = true, tv(v)
		if err := q.Validate(); err != nil {
			t.Errorf("true value %v on a bound refused: %v", v, err)
		}
	}
	// A gap typed as exactly MinProbGap is taken, though 0.051 − 0.05 is
	// 0.000999… in binary.
	for _, ps := range [][]float64{{0.05, 0.051, 0.5}, {0.001, 0.002, 0.003}, {0.5, 0.998, 0.999}} {
		q := quantileQuestion()
		q.Probs = ps
		if err := q.Validate(); err != nil {
			t.Errorf("probabilities %v a tenth of a point apart refused: %v", ps, err)
		}
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			q := quantileQuestion()
			c.edit(&q)
			checkRule(t, q.Validate(), c.field, c.rule)
		})
	}
	chips := []struct {
		name  string
		edit  func(*Question)
		field string
		rule  elicit.Rule
	}{
		{"two bins", func(q *Question) { q.BinEdges = []float64{0, 0.1, 0.25} }, "bin_edges", elicit.RuleCount},
		{"edge order", func(q *Question) { q.BinEdges = []float64{0, 0.1, 0.05, 0.2, 0.25} }, "bin_edges[2]", elicit.RuleValueIncreasing},
		{"edge NaN", func(q *Question) { q.BinEdges = []float64{0, math.NaN(), 0.2, 0.25} }, "bin_edges[1]", elicit.RuleFinite},
		{"first edge", func(q *Question) { q.BinEdges = []float64{0.01, 0.1, 0.2, 0.25} }, "bin_edges[0]", elicit.RuleEdgesSpanBounds},
		{"last edge", func(q *Question) { q.BinEdges = []float64{0, 0.1, 0.2, 0.3} }, "bin_edges[3]", elicit.RuleEdgesSpanBounds},
		{"no chips", func(q *Question) { q.Chips = 0 }, "chips", elicit.RuleCountRange},
		{"too many chips", func(q *Question) { q.Chips = MaxChips + 1 }, "chips", elicit.RuleCountRange},
	}
	for _, c := range chips {
		t.Run("chips "+c.name, func(t *testing.T) {
			q := chipsQuestion()
			c.edit(&q)
			checkRule(t, q.Validate(), c.field, c.rule)
		})
	}
}

func TestQuestionFit(t *testing.T) {
	// Quantiles: the same fit as FitQuantiles on the judgement.
	q := quantileQuestion()
	a := Answer{Values: []float64{0.01, 0.04, 0.12}}
	got, err := q.Fit(a)
	if err != nil {
		t.Fatal(err)
	}
	want, _ := elicit.FitQuantiles(elicit.Judgement{Probs: ProbsDefault, Values: a.Values, Lower: 0, Upper: 1})
	if !reflect.DeepEqual(got, want) {
		t.Errorf("quantile answer: %+v, want %+v", got, want)
	}
	// Interval: through FourValue.
	qi := intervalQuestion()
	ai := Answer{Lowest: 0.01, Highest: 0.15, Best: 0.04, Confidence: 0.8}
	got, err = qi.Fit(ai)
	if err != nil {
		t.Fatal(err)
	}
	j, _ := elicit.FourValue(0.01, 0.15, 0.04, 0.8, 0, 1)
	want, _ = elicit.FitQuantiles(j)
	if !reflect.DeepEqual(got, want) {
		t.Errorf("interval answer: %+v, want %+v", got, want)
	}
	if jj, err := qi.Judgement(ai); err != nil || !reflect.DeepEqual(jj, j) {
		t.Errorf("Judgement(interval) = %v, %v; want %v", jj, err, j)
	}
	// Chips: through FitChips.
	qc := chipsQuestion()
	ac := Answer{Counts: []int{2, 6, 5, 3, 3, 1}}
	got, err = qc.Fit(ac)
	if err != nil {
		t.Fatal(err)
	}
	want, _ = elicit.FitChips(qc.BinEdges, ac.Counts)
	if !reflect.DeepEqual(got, want) {
		t.Errorf("chips answer: %+v, want %+v", got, want)
	}
}

func TestQuestionFitRules(t *testing.T) {
	cases := []struct {
		name  string
		q     Question
		a     Answer
		field string
		rule  elicit.Rule
	}{
		{"values length", quantileQuestion(), Answer{Values: []float64{0.01, 0.04}}, "values", elicit.RuleLengthMatch},
		{"values order", quantileQuestion(), Answer{Values: []float64{0.01, 0.2, 0.12}}, "values[2]", elicit.RuleValueIncreasing},
		{"value outside", quantileQuestion(), Answer{Values: []float64{0.01, 1.04, 1.12}}, "values[1]", elicit.RuleValueInBounds},
		{"value NaN", quantileQuestion(), Answer{Values: []float64{0.01, math.NaN(), 0.12}}, "values[1]", elicit.RuleFinite},
		{"lowest", intervalQuestion(), Answer{Lowest: -0.1, Highest: 0.15, Best: 0.04, Confidence: 0.8}, "lowest", elicit.RuleValueInBounds},
		{"best", intervalQuestion(), Answer{Lowest: 0.05, Highest: 0.15, Best: 0.04, Confidence: 0.8}, "best", elicit.RuleValueIncreasing},
		{"confidence", intervalQuestion(), Answer{Lowest: 0.01, Highest: 0.15, Best: 0.04, Confidence: 80}, "confidence", elicit.RuleProbOpen},
		{"confidence missing", intervalQuestion(), Answer{Lowest: 0.01, Highest: 0.15, Best: 0.04}, "confidence", elicit.RuleProbOpen},
		{"counts negative", chipsQuestion(), Answer{Counts: []int{2, 6, -5, 3, 3, 1}}, "counts[2]", elicit.RuleNonNegative},
		{"counts length", chipsQuestion(), Answer{Counts: []int{2, 6, 5}}, "counts", elicit.RuleLengthMatch},
		{"too many chips", chipsQuestion(), Answer{Counts: []int{2, 6, 5, 3, 3, 2}}, "counts", RuleChipsExceeded},
		{"chips in two bins", chipsQuestion(), Answer{Counts: []int{0, 10, 10, 0, 0, 0}}, "counts", elicit.RuleChipsSpread},
		{"bad question", func() Question { q := quantileQuestion(); q.Format = "x"; return q }(), Answer{}, "format", elicit.RuleUnknown},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := c.q.Fit(c.a)
			checkRule(t, err, c.field, c.rule)
		})
	}
	_, err := chipsQuestion().Judgement(Answer{Counts: []int{2, 6, 5, 3, 3, 1}})
	checkRule(t, err, "format", RuleQuantileFormat)
}

// checkRule fails unless err is an *elicit.InputError with the given
// field and rule.
func checkRule(t *testing.T, err error, field string, rule elicit.Rule) {
	t.Helper()
	var ie *elicit.InputError
	if !errors.As(err, &ie) {
		t.Errorf("want InputError %s/%q, got %v", field, rule, err)
		return
	}
	if ie.Field != field || ie.Rule != rule {
		t.Errorf("got %s/%q, want %s/%q (%v)", ie.Field, ie.Rule, field, rule, err)
	}
}

// Parley's default bins keep the rules a facilitator's own bins must:
// on bounds far from 0 compared with their width, rounding each inner
// edge to four significant figures of itself made equal edges (1000 and
// 1001: 1000, 1000, …, 1001) or edges beyond the upper bound (123456 and
// 123457: 123500), and the question was refused for a field left blank.
// The eighths of [0, 1] and of [10, 50] stay as they read.
func TestDefaultBinEdgesKeepTheRulesOfBins(t *testing.T) {
	for _, b := range [][2]float64{
		{0, 1}, {10, 50}, {-1, 1}, {0, 8.0 / 3}, {1000, 1001}, {123456, 123457}, {0.001, 0.0010001},
		{1, 1 + 1e-12}, {-1e300, 1e300}, {1e-300, 3e-300}, {-3, 1e300},
	} {
		q := Question{Wording: "w", Quantity: "q", Lower: b[0], Upper: b[1], Format: FormatChips,
			BinEdges: DefaultBinEdges(b[0], b[1]), Chips: DefaultChips}
		if err := q.Validate(); err != nil {
			t.Errorf("bounds %v: default bins %v refused: %v", b, q.BinEdges, err)
		}
	}
	for _, c := range []struct {
		lower, upper float64
		want         string
	}{
		{0, 1, "[0 0.125 0.25 0.375 0.5 0.625 0.75 0.875 1]"},
		{10, 50, "[10 15 20 25 30 35 40 45 50]"},
		{1000, 1001, "[1000 1000.125 1000.25 1000.375 1000.5 1000.625 1000.75 1000.875 1001]"},
	} {
		if got := fmt.Sprint(DefaultBinEdges(c.lower, c.upper)); got != c.want {
			t.Errorf("default bins of [%v, %v]: %s, want %s", c.lower, c.upper, got, c.want)
		}
	}
}

// TestValidateKeptTakesAQuestionFromBeforeTheGapRule: a question recorded
// before MinProbGap, asking for 0.5 and 0.5000001, is kept (ValidateKept,
// which an imported record's questions meet) though a new one is refused
// (Validate); every other rule holds for both.
func TestValidateKeptTakesAQuestionFromBeforeTheGapRule(t *testing.T) {
	q := quantileQuestion()
	q.Probs = []float64{0.05, 0.5, 0.5000001, 0.95}
	var ie *elicit.InputError
	if err := q.Validate(); !errors.As(err, &ie) || ie.Rule != RuleProbGap {
		t.Fatalf("Validate: %v, want %s", err, RuleProbGap)
	}
	if err := q.ValidateKept(); err != nil {
		t.Fatalf("ValidateKept: %v", err)
	}
	// Such a question is answered, fitted and corrected as it was asked.
	a := Answer{Values: []float64{0.1, 0.3, 0.31, 0.6}}
	if _, err := q.Fit(a); err != nil {
		t.Errorf("Fit of an answer to it: %v", err)
	}
	if ps := q.Problems(a); len(ps) != 0 {
		t.Errorf("Problems of an answer to it: %v", ps)
	}
	next := q
	next.Wording = "What proportion of the new inverters will fail within a year? (invented example)"
	if err := q.CheckCorrection(next, Recorded{Answers: 1}); err != nil {
		t.Errorf("a correction of its wording: %v", err)
	}
	next.Probs = []float64{0.05, 0.5, 0.5000002, 0.95}
	if err := q.CheckCorrection(next, Recorded{}); !errors.As(err, &ie) || ie.Rule != RuleProbGap {
		t.Errorf("a correction to other probabilities too close: %v, want %s", err, RuleProbGap)
	}
	q.Probs = []float64{0.05, 0.5, 0.5}
	if err := q.ValidateKept(); !errors.As(err, &ie) || ie.Field != "probs[2]" {
		t.Fatalf("ValidateKept of probabilities that do not increase: %v", err)
	}
}

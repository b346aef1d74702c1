package elicit

import (
	"errors"
	"math"
	"testing"
)

// TestLogScaleIsTheUniformOnLogs: scoring a question against the
// log-uniform background (ModelOptions.LogScale) is, by its definition
// (Cooke 1991, ch. 12, from memory), scoring the logarithms of its values
// against the uniform one: the same calibration and information scores,
// weights and pool, with the range and the pool given back on the
// question's own scale. Invented answers on rare-event shares.
func TestLogScaleIsTheUniformOnLogs(t *testing.T) {
	c := newLogScaleCase()
	as, lnAs, truth, lnTruth, bounds, logs := c.as, c.lnAs, c.truth, c.lnTruth, c.bounds, c.logs
	lnBounds := map[string][2]float64{}
	// On ln x a lower bound of 0 is −∞ and cuts nothing; an upper bound of
	// 1 is 0.
	lnBounds["r1"], lnBounds["r2"] = [2]float64{-1000, 0}, [2]float64{-1000, 0}
	got, err := ClassicalModel(as, truth, bounds, ModelOptions{LogScale: logs})
	if err != nil {
		t.Fatal(err)
	}
	want, err := ClassicalModel(lnAs, lnTruth, lnBounds, ModelOptions{})
	if err != nil {
		t.Fatal(err)
	}
	near := func(what string, a, b float64) {
		t.Helper()
		if math.Abs(a-b) > 1e-12*math.Max(1, math.Abs(b)) {
			t.Errorf("%s: %v on the log scale, %v on the logarithms", what, a, b)
		}
	}
	near("alpha", got.Alpha, want.Alpha)
	for i, e := range got.Experts {
		w := want.Experts[i]
		near(e.Expert+" calibration", e.Calibration, w.Calibration)
		near(e.Expert+" information", e.Information, w.Information)
		near(e.Expert+" weight", e.Weight, w.Weight)
	}
	near("pooled information", got.Pooled.Information, want.Pooled.Information)
	for i, q := range got.Questions {
		w := want.Questions[i]
		back := func(v float64) float64 { return v }
		if logs[q.Question] {
			back = math.Exp
			if !q.LogScale {
				t.Errorf("%s: not marked as on the log scale", q.Question)
			}
		}
		near(q.Question+" lower", q.Lower, back(w.Lower))
		near(q.Question+" upper", q.Upper, back(w.Upper))
		near(q.Question+" realisation", q.Realisation, back(w.Realisation))
		for j := range q.Pooled {
			near(q.Question+" pooled", q.Pooled[j], back(w.Pooled[j]))
		}
	}
	// Without the scale, the rare-event shares score otherwise.
	plain, err := ClassicalModel(as, truth, bounds, ModelOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if plain.Experts[1].Information == got.Experts[1].Information {
		t.Error("the log scale changes no information score")
	}
}

// A question on the log scale needs its values above 0 and a lower bound
// of at least 0.
func TestLogScaleNeedsPositiveValues(t *testing.T) {
	probs := []float64{0.05, 0.5, 0.95}
	logs := map[string]bool{"q": true}
	for _, c := range []struct {
		name   string
		qs     []float64
		truth  float64
		bounds map[string][2]float64
		field  string
	}{
		{"quantile at 0", []float64{-1, 1, 2}, 1, nil, "assessments[0].quantiles[0]"},
		{"realisation at 0", []float64{0.5, 1, 2}, 0, nil, `realisations["q"]`},
		{"lower bound below 0", []float64{0.5, 1, 2}, 1, map[string][2]float64{"q": {-1, 5}}, `bounds["q"]`},
	} {
		_, err := ClassicalModel([]SeedAssessment{{Expert: "A", Question: "q", Probs: probs, Quantiles: c.qs}},
			map[string]float64{"q": c.truth}, c.bounds, ModelOptions{LogScale: logs})
		var ie *InputError
		if !errors.As(err, &ie) || ie.Field != c.field || ie.Rule != RuleLogScalePositive {
			t.Errorf("%s: %v, want %s: %s", c.name, err, c.field, RuleLogScalePositive)
		}
	}
}

// TestLogScaleQuantilesThatMeetOnLogs: two quantiles a double apart can
// share one logarithm (ln 1e-300 = ln 1.0000000000000002e-300 in
// float64), and a quantile a double above a bound of 1e6 can share the
// bound's. The bin between them is then 0 wide on ln x, its information
// term ln(p/0) infinite, and the expert's information came out as 0 in
// silence. They are refused, naming the quantile.
func TestLogScaleQuantilesThatMeetOnLogs(t *testing.T) {
	probs := []float64{0.05, 0.5, 0.95}
	logs := map[string]bool{"q": true}
	above := math.Nextafter(1e6, 2e6)
	for _, c := range []struct {
		name   string
		qs     []float64
		truth  float64
		bounds map[string][2]float64
		field  string
	}{
		{"two quantiles", []float64{1e-300, math.Nextafter(1e-300, 1), 0.9}, 0.5, map[string][2]float64{"q": {0, 1}}, "assessments[0].quantiles[1]"},
		{"a quantile and the lower bound", []float64{above, 1.5e6, 1.9e6}, 1.2e6, map[string][2]float64{"q": {1e6, 2e6}}, "assessments[0].quantiles[0]"},
	} {
		if math.Log(c.qs[0]) != math.Log(c.qs[1]) && math.Log(c.qs[0]) != math.Log(c.bounds["q"][0]) {
			t.Fatalf("%s: the logarithms no longer meet", c.name)
		}
		as := []SeedAssessment{
			{Expert: "A", Question: "q", Probs: probs, Quantiles: c.qs},
			{Expert: "B", Question: "q", Probs: probs, Quantiles: []float64{c.truth * 0.9, c.truth, c.truth * 1.05}},
		}
		_, err := ClassicalModel(as, map[string]float64{"q": c.truth}, c.bounds, ModelOptions{LogScale: logs})
		var ie *InputError
		if !errors.As(err, &ie) || ie.Field != c.field || ie.Rule != RuleLogScaleTooClose {
			t.Errorf("%s: %v, want %s: %s", c.name, err, c.field, RuleLogScaleTooClose)
		}
		// On the uniform scale the same answers are told apart.
		if _, err := ClassicalModel(as, map[string]float64{"q": c.truth}, c.bounds, ModelOptions{}); err != nil {
			t.Errorf("%s, uniform scale: %v", c.name, err)
		}
	}
}

// TestLogScaleLeaveOneOutIsTheUniformOnLogs: on a calibration question on
// the log scale, the leave-one-out shifts are the shifts of ln x against
// the intrinsic range on ln x, and the percentiles are given back on the
// question's own scale: the same report as the uniform model's on the
// logarithms (the rare-event shares' ranges on ln x stay below ln 1 = 0,
// so their upper bound of 1 cuts nothing and the logarithms are scored
// without bounds). Invented answers, as in TestLogScaleIsTheUniformOnLogs.
func TestLogScaleLeaveOneOutIsTheUniformOnLogs(t *testing.T) {
	c := newLogScaleCase()
	as, lnAs, truth, lnTruth, logs := c.as, c.lnAs, c.truth, c.lnTruth, c.logs
	got, err := LeaveOneOut(as, truth, c.bounds, ModelOptions{LogScale: logs}, nil)
	if err != nil {
		t.Fatal(err)
	}
	want, err := LeaveOneOut(lnAs, lnTruth, nil, ModelOptions{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	near := func(what string, a, b float64) {
		t.Helper()
		if math.Abs(a-b) > 1e-12*math.Max(1, math.Abs(b)) {
			t.Errorf("%s: %v on the log scale, %v on the logarithms", what, a, b)
		}
	}
	near("largest shift", got.MaxShift, want.MaxShift)
	if len(got.Cases) != len(want.Cases) || len(got.Cases) != 6 {
		t.Fatalf("%d and %d cases", len(got.Cases), len(want.Cases))
	}
	for ti, name := range got.Targets {
		back := func(v float64) float64 { return v }
		if logs[name] {
			back = math.Exp
		}
		for i := range got.Full[ti] {
			near(name+" full percentile", got.Full[ti][i], back(want.Full[ti][i]))
		}
		for ci, c := range got.Cases {
			w := want.Cases[ci]
			near(c.Name+" on "+name+" shift", c.Shifts[ti], w.Shifts[ti])
			for i := range c.Percentiles[ti] {
				near(c.Name+" on "+name+" percentile", c.Percentiles[ti][i], back(w.Percentiles[ti][i]))
			}
		}
	}
}

// TestLogScaleKeepsEachTrueValueInItsBin: the log scale changes no
// calibration score, since ln keeps every true value in its
// inter-quantile bin, but in float64 ln can make a true value a double
// above a quantile equal to it (ln 1e6 = ln 1000000.0000000001), which
// moved it into the bin below. Bins are counted on the stated values.
func TestLogScaleKeepsEachTrueValueInItsBin(t *testing.T) {
	probs := []float64{0.05, 0.5, 0.95}
	above := math.Nextafter(1e6, 2e6)
	if math.Log(above) != math.Log(1e6) {
		t.Fatal("the logarithms no longer meet")
	}
	as := []SeedAssessment{
		{Expert: "A", Question: "q", Probs: probs, Quantiles: []float64{1e5, 1e6, 1e7}},
		{Expert: "B", Question: "q", Probs: probs, Quantiles: []float64{2e5, 5e5, 9e5}},
		{Expert: "A", Question: "p", Probs: probs, Quantiles: []float64{1, 2, 3}},
		{Expert: "B", Question: "p", Probs: probs, Quantiles: []float64{1.5, 2.5, 3.5}},
	}
	truth := map[string]float64{"q": above, "p": 2.2}
	logged, err := ClassicalModel(as, truth, nil, ModelOptions{LogScale: map[string]bool{"q": true}})
	if err != nil {
		t.Fatal(err)
	}
	plain, err := ClassicalModel(as, truth, nil, ModelOptions{})
	if err != nil {
		t.Fatal(err)
	}
	for i, e := range logged.Experts {
		if e.Calibration != plain.Experts[i].Calibration {
			t.Errorf("%s: calibration %v on the log scale, %v on the uniform", e.Expert, e.Calibration, plain.Experts[i].Calibration)
		}
	}
}

// logScaleCase is the invented panel of the log-scale tests: three
// experts on two rare-event shares on [0, 1] scored on the log scale (r1,
// r2) and a repair time in days on the uniform (d), with the same
// answers and true values as logarithms (lnAs, lnTruth) for the uniform
// model on ln x.
type logScaleCase struct {
	as, lnAs       []SeedAssessment
	truth, lnTruth map[string]float64
	bounds         map[string][2]float64
	logs           map[string]bool
}

func newLogScaleCase() logScaleCase {
	probs := []float64{0.05, 0.5, 0.95}
	answers := map[string]map[string][]float64{
		"A": {"r1": {5e-7, 2e-6, 8e-6}, "r2": {1e-4, 5e-4, 2e-3}, "d": {4, 7, 10}},
		"B": {"r1": {1e-7, 3e-6, 1e-4}, "r2": {1e-5, 1e-3, 1e-2}, "d": {3, 6, 14}},
		"C": {"r1": {8e-6, 1e-5, 1.2e-5}, "r2": {1e-4, 1.2e-4, 1.4e-4}, "d": {8, 9, 10}},
	}
	c := logScaleCase{
		truth:   map[string]float64{"r1": 2e-6, "r2": 4e-4, "d": 6.5},
		lnTruth: map[string]float64{},
		bounds:  map[string][2]float64{"r1": {0, 1}, "r2": {0, 1}},
		logs:    map[string]bool{"r1": true, "r2": true},
	}
	for _, e := range []string{"A", "B", "C"} {
		for q, v := range answers[e] {
			c.as = append(c.as, SeedAssessment{Expert: e, Question: q, Probs: probs, Quantiles: v})
			lv := append([]float64(nil), v...)
			if c.logs[q] {
				for i := range lv {
					lv[i] = math.Log(lv[i])
				}
			}
			c.lnAs = append(c.lnAs, SeedAssessment{Expert: e, Question: q, Probs: probs, Quantiles: lv})
		}
	}
	for q, x := range c.truth {
		c.lnTruth[q] = x
		if c.logs[q] {
			c.lnTruth[q] = math.Log(x)
		}
	}
	return c
}

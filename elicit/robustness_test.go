package elicit

import (
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

// TestLeaveOneOutBetaTargets recomputes one expert-left-out case and one
// question-left-out case by hand from ClassicalModel and LinearPool.
func TestLeaveOneOutBetaTargets(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	as, real := randomSeeds(rng, 4, 6, seedProbs)
	fits := map[string]ScaledBeta{
		"expert00": {Beta: Beta{Alpha: 2, Beta: 30}, Lower: 0, Upper: 1},
		"expert01": {Beta: Beta{Alpha: 3, Beta: 20}, Lower: 0, Upper: 1},
		"expert02": {Beta: Beta{Alpha: 1.5, Beta: 60}, Lower: 0, Upper: 1},
		"expert03": {Beta: Beta{Alpha: 5, Beta: 25}, Lower: 0, Upper: 1},
	}
	targets := []RobustnessTarget{{Question: "inverter_first_year_failures", Fits: fits}}
	rep, err := LeaveOneOut(as, real, nil, ModelOptions{}, targets)
	if err != nil {
		t.Fatal(err)
	}
	if len(rep.Cases) != 6+4 {
		t.Fatalf("%d cases, want 10", len(rep.Cases))
	}
	pooled := func(w map[string]float64) []float64 {
		names := []string{"expert00", "expert01", "expert02", "expert03"}
		var ds []ScaledBeta
		var ws []float64
		for _, n := range names {
			ds, ws = append(ds, fits[n]), append(ws, w[n])
		}
		p, err := LinearPool(ds, ws)
		if err != nil {
			t.Fatal(err)
		}
		qs, err := p.Quantiles([]float64{0.05, 0.5, 0.95})
		if err != nil {
			t.Fatal(err)
		}
		return qs
	}
	full, _ := ClassicalModel(as, real, nil, ModelOptions{})
	base := pooled(full.Weights())
	for i := range base {
		if math.Abs(base[i]-rep.Full[0][i]) > 1e-15 {
			t.Errorf("full pool %v, want %v", rep.Full[0], base)
		}
	}
	maxShift := 0.0
	for _, c := range rep.Cases {
		keep := func(a SeedAssessment) bool { return a.Expert != c.Name }
		if c.LeftOut == LeaveOutQuestion {
			keep = func(a SeedAssessment) bool { return a.Question != c.Name }
		}
		var sub []SeedAssessment
		for _, a := range as {
			if keep(a) {
				sub = append(sub, a)
			}
		}
		s, err := ClassicalModel(sub, real, nil, ModelOptions{})
		if err != nil {
			t.Fatal(err)
		}
		got := pooled(s.Weights())
		want := 0.0
		for i := range got {
			want = math.Max(want, math.Abs(got[i]-base[i]))
			if len(c.Percentiles) != 1 || math.Abs(c.Percentiles[0][i]-got[i]) > 1e-15 {
				t.Errorf("%s %s: pooled percentiles %v, want %v", c.LeftOut, c.Name, c.Percentiles, got)
			}
		}
		if c.Error != "" || math.Abs(c.Shift-want) > 1e-15 || c.Alpha != s.Alpha {
			t.Errorf("%s %s: shift %v alpha %v err %q, want %v alpha %v", c.LeftOut, c.Name, c.Shift, c.Alpha, c.Error, want, s.Alpha)
		}
		if c.LeftOut == LeaveOutExpert && c.Weights[c.Name] != 0 {
			t.Errorf("expert %s left out still has weight %v", c.Name, c.Weights[c.Name])
		}
		maxShift = math.Max(maxShift, want)
	}
	if rep.MaxShift != maxShift || !(maxShift > 0) {
		t.Errorf("max shift %v, want %v > 0", rep.MaxShift, maxShift)
	}
}

// TestLeaveOneOutNoDisagreement: when every expert says the same, the pool
// cannot depend on the weights and every shift is 0.
func TestLeaveOneOutNoDisagreement(t *testing.T) {
	real := map[string]float64{"a": 3, "b": 5, "c": 7.5}
	var as []SeedAssessment
	for _, e := range []string{"X", "Y", "Z"} {
		for q := range real {
			as = append(as, SeedAssessment{Expert: e, Question: q, Probs: seedProbs, Quantiles: []float64{2, 5, 8}})
		}
	}
	fit := ScaledBeta{Beta: Beta{Alpha: 2, Beta: 8}, Lower: 0, Upper: 1}
	for _, targets := range [][]RobustnessTarget{nil, {{Question: "t", Fits: map[string]ScaledBeta{"X": fit, "Y": fit, "Z": fit}}}} {
		rep, err := LeaveOneOut(as, real, nil, ModelOptions{}, targets)
		if err != nil {
			t.Fatal(err)
		}
		for _, c := range rep.Cases {
			if c.Error != "" || c.Shift > 1e-12 {
				t.Errorf("%d targets, %s %s: shift %v err %q", len(targets), c.LeftOut, c.Name, c.Shift, c.Error)
			}
		}
	}
}

// TestLeaveOneOutSeedTargets uses the calibration questions as targets:
// leaving out the only informative expert moves the pool.
func TestLeaveOneOutSeedTargets(t *testing.T) {
	as, real := handSeeds()
	rep, err := LeaveOneOut(as, real, nil, ModelOptions{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(rep.Targets) != 4 || rep.Targets[0] != "q1" {
		t.Fatalf("targets %v", rep.Targets)
	}
	var outB *LeaveOneOutCase
	for i, c := range rep.Cases {
		if c.LeftOut == LeaveOutExpert && c.Name == "B" {
			outB = &rep.Cases[i]
		}
		for _, s := range c.Shifts {
			if math.IsNaN(s) || s < 0 {
				t.Errorf("%s %s: shift %v", c.LeftOut, c.Name, s)
			}
		}
	}
	if outB == nil || outB.Error != "" || outB.Weights["A"] != 1 {
		t.Fatalf("case without B: %+v", outB)
	}
	// Without B the pool is A's own (2, 5, 8) on [1.4, 8.6] (see
	// TestClassicalModelByHand), so on q1 the shift is the largest gap
	// between the full DM's 5/50/95 quantiles and A's, over the width 7.2.
	full, _ := ClassicalModel(as, real, nil, ModelOptions{})
	want := 0.0
	for i, a := range []float64{2, 5, 8} {
		want = math.Max(want, math.Abs(full.Questions[0].Pooled[i]-a)/7.2)
	}
	if math.Abs(outB.Shifts[0]-want) > 1e-12 || !(want > 0.01) {
		t.Errorf("shift on q1 without B %v, want %v", outB.Shifts[0], want)
	}
}

func TestLeaveOneOutEdgeCases(t *testing.T) {
	// One expert: leaving them out leaves nothing to score.
	as := []SeedAssessment{
		{Expert: "solo", Question: "a", Probs: seedProbs, Quantiles: []float64{1, 2, 3}},
		{Expert: "solo", Question: "b", Probs: seedProbs, Quantiles: []float64{1, 2, 3}},
	}
	rep, err := LeaveOneOut(as, map[string]float64{"a": 2.5, "b": 1.5}, nil, ModelOptions{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	last := rep.Cases[len(rep.Cases)-1]
	if last.LeftOut != LeaveOutExpert || last.Error == "" || last.Shift != 0 {
		t.Errorf("leaving out the only expert: %+v", last)
	}
	// Targets on different bounds are refused with the target's field.
	bad := []RobustnessTarget{{Question: "t", Fits: map[string]ScaledBeta{
		"solo":  {Beta: Beta{Alpha: 2, Beta: 3}, Lower: 0, Upper: 1},
		"other": {Beta: Beta{Alpha: 2, Beta: 3}, Lower: 0, Upper: 2},
	}}}
	_, err = LeaveOneOut(as, map[string]float64{"a": 2.5, "b": 1.5}, nil, ModelOptions{}, bad)
	if !calHasRule(err, RuleSameBounds) || !strings.Contains(err.Error(), "targets[0]") {
		t.Errorf("mixed bounds: got %v", err)
	}
	// Bad model input is the classical model's error.
	if _, err := LeaveOneOut(nil, nil, nil, ModelOptions{}, nil); !calHasRule(err, RuleCount) {
		t.Errorf("no assessments: got %v", err)
	}
}

// With bounds, a calibration question watched as a target has the
// question's range [lower, upper] as its width, as a target question's
// fits do (Upper − Lower): the workshop, which always gives bounds, says
// "as a fraction of the question's range" and draws the bounds. The
// shift was taken over U* − L*, here 7.2 of the bounds' 10, so a move of
// 0.07 of the question's range read 0.1. Without bounds (parley
// calibrate) the width stays U* − L* (TestLeaveOneOutSeedTargets).
func TestLeaveOneOutSeedTargetsOnBounds(t *testing.T) {
	as, real := handSeeds()
	bounds := map[string][2]float64{}
	for q := range real {
		bounds[q] = [2]float64{0, 10}
	}
	rep, err := LeaveOneOut(as, real, bounds, ModelOptions{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	checked := 0
	for _, c := range rep.Cases {
		for ti, qs := range c.Percentiles {
			if qs == nil {
				continue
			}
			want := 0.0
			for i := range qs {
				want = math.Max(want, math.Abs(qs[i]-rep.Full[ti][i])/10)
			}
			if math.Abs(c.Shifts[ti]-want) > 1e-12 {
				t.Errorf("%s %s, %s: shift %v, want %v (over the bounds' width 10)", c.LeftOut, c.Name, rep.Targets[ti], c.Shifts[ti], want)
			}
			if want > 0.01 {
				checked++
			}
		}
	}
	if checked == 0 {
		t.Fatal("no case moved the pool")
	}
}

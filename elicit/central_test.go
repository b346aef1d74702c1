package elicit

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// Every central coverage Parley takes (a credible level, an interval's
// coverage, the four-value confidence) leaves tails (1 − c)/2 of at least
// MinProb = 1e-12, the accuracy envelope of quantiles, and a success
// criterion's confidence lies in [MinProb, 1 − MinProb]; beyond, each is
// refused naming its own field (review of the input rules: 1 − 1e-16
// used to pass as a coverage or a sample-size level, and 1e-320 as a
// confidence). The bounds themselves are taken: MaxCentral, 1 − 2e-12,
// as typed (0.999999999998), whose float64 tail is 2.2e-17 short of
// 1e-12 and was refused, though its rule said "at most 1 − 2e-12"; and
// MinProb and 1 − MinProb for the criterion. The float64 just beyond
// each is refused.
func TestCentralCoveragesStayInTheEnvelope(t *testing.T) {
	const tooClose = 0.9999999999999999 // tail 5.6e-17
	central := []float64{0.99999999999, MaxCentral, 0.999999999998}
	beyond := []float64{tooClose, math.Nextafter(MaxCentral, 1)}
	goal := func(level float64) error {
		return SampleSizeGoal{Criterion: CriterionALC, Interval: IntervalEqual, Level: level, Length: 0.05}.Validate()
	}
	crit := func(c float64) error {
		return SuccessCriterion{Threshold: 0.1, Direction: DirectionBelow, Confidence: c}.Validate()
	}
	cases := []struct {
		name  string
		check func(c float64) error
		field string
		rule  Rule
		good  []float64
		bad   []float64
	}{
		{"interval by quantiles", func(c float64) error { _, err := FromIntervalQuantiles(0.03, 0.12, c); return err }, "coverage", RuleCentralTails, central, beyond},
		{"interval by moments", func(c float64) error { _, err := FromIntervalMoments(0.03, 0.12, c); return err }, "coverage", RuleCentralTails, central, beyond},
		{"interval on a scale", func(c float64) error {
			_, err := Construct(ConstructionInput{Method: MethodIntervalQuantiles, Low: 3, High: 12, Coverage: c, Lower: 0, Upper: 100})
			return err
		}, "coverage", RuleCentralTails, central, beyond},
		{"sample-size level", goal, "level", RuleCentralTails, central, beyond},
		{"credible level", func(c float64) error { _, _, err := EqualTailed(Beta{Alpha: 2, Beta: 38}, c); return err }, "level", RuleCentralTails, central, beyond},
		{"four-value confidence", func(c float64) error { _, err := FourValue(0.1, 0.4, 0.2, c, 0, 1); return err }, "confidence", RuleCentralTails, central, beyond},
		{"success criterion's confidence", crit, "confidence", RuleProbRange,
			[]float64{0.99999999999, MinProb, 1 - MinProb, 0.999999999999, 1e-12},
			[]float64{tooClose, 1e-320, 1e-13, math.Nextafter(MinProb, 0), math.Nextafter(1-MinProb, 1)}},
	}
	for _, c := range cases {
		for _, v := range c.good {
			if err := c.check(v); err != nil {
				t.Errorf("%s: %v refused: %v", c.name, v, err)
			}
		}
		for _, v := range c.bad {
			var ie *InputError
			if err := c.check(v); !errors.As(err, &ie) || ie.Field != c.field || ie.Rule != c.rule {
				t.Errorf("%s: %v gave %v, want %s: %s", c.name, v, err, c.field, c.rule)
			}
		}
	}
}

// A central coverage must also be at least MinCentral = MinProb = 1e-12,
// as a success criterion's confidence must. Below it the moment match's z = Φ⁻¹((1 + c)/2) rounded to 0:
// a coverage of 1e-300 was refused as an interval with sd +Inf, "must be
// a finite number … got +Inf", on the field "interval" (review, 2026-12-05).
// Every door that takes a central coverage refuses below it, naming its
// own field; MinCentral itself is taken where the interval is all that
// is asked for (a credible level).
func TestCentralCoveragesHoldSomeChance(t *testing.T) {
	narrow := []float64{1e-300, 5e-324, 1e-13, math.Nextafter(MinCentral, 0)}
	goal := func(level float64) error {
		return SampleSizeGoal{Criterion: CriterionALC, Interval: IntervalEqual, Level: level, Length: 0.05}.Validate()
	}
	cases := []struct {
		name  string
		check func(c float64) error
		field string
	}{
		{"interval by quantiles", func(c float64) error { _, err := FromIntervalQuantiles(0.03, 0.12, c); return err }, "coverage"},
		{"interval by moments", func(c float64) error { _, err := FromIntervalMoments(0.03, 0.12, c); return err }, "coverage"},
		{"interval on a scale", func(c float64) error {
			_, err := Construct(ConstructionInput{Method: MethodIntervalMoments, Low: 3, High: 12, Coverage: c, Lower: 0, Upper: 100})
			return err
		}, "coverage"},
		{"sample-size level", goal, "level"},
		{"credible level", func(c float64) error { _, _, err := EqualTailed(Beta{Alpha: 2, Beta: 38}, c); return err }, "level"},
		{"four-value confidence", func(c float64) error { _, err := FourValue(0.1, 0.4, 0.2, c, 0, 1); return err }, "confidence"},
	}
	for _, c := range cases {
		for _, v := range narrow {
			var ie *InputError
			if err := c.check(v); !errors.As(err, &ie) || ie.Field != c.field || ie.Rule != RuleCentralNarrow {
				t.Errorf("%s: %v gave %v, want %s: %s", c.name, v, err, c.field, RuleCentralNarrow)
			}
		}
	}
	for _, v := range []float64{MinCentral, 1e-12, 2e-12, 1e-9} {
		if err := goal(v); err != nil {
			t.Errorf("sample-size level %v refused: %v", v, err)
		}
		lo, hi, err := EqualTailed(Beta{Alpha: 2, Beta: 38}, v)
		if err != nil || !(lo < hi) {
			t.Errorf("credible level %v: [%v, %v], %v; want an interval", v, lo, hi, err)
		}
	}
	// Just above it the moment match is refused for its interval, as too
	// wide for so small a coverage, with finite figures.
	_, err := FromIntervalMoments(0.03, 0.12, 1e-11)
	var ie *InputError
	if !errors.As(err, &ie) || ie.Field != "interval" || ie.Rule != RuleVarianceFeasible || strings.Contains(ie.Detail, "Inf") {
		t.Errorf("moment match at 1e-11: %v; want the interval refused as too wide, in finite figures", err)
	}
}

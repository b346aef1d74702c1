package elicit

import (
	"errors"
	"testing"
)

// Every central coverage Parley takes (a credible level, an interval's
// coverage, the four-value confidence) leaves tails (1 − c)/2 of at least
// MinProb = 1e-12, the accuracy envelope of quantiles, and a success
// criterion's confidence lies in [MinProb, 1 − MinProb]; beyond, each is
// refused naming its own field (review of the input rules: 1 − 1e-16
// used to pass as a coverage or a sample-size level, and 1e-320 as a
// confidence).
func TestCentralCoveragesStayInTheEnvelope(t *testing.T) {
	const ok, tooClose = 0.99999999999, 0.9999999999999999 // tails 5e-12 and 5.6e-17
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
		bad   []float64
	}{
		{"interval by quantiles", func(c float64) error { _, err := FromIntervalQuantiles(0.03, 0.12, c); return err }, "coverage", RuleCentralTails, []float64{tooClose}},
		{"interval by moments", func(c float64) error { _, err := FromIntervalMoments(0.03, 0.12, c); return err }, "coverage", RuleCentralTails, []float64{tooClose}},
		{"interval on a scale", func(c float64) error {
			_, err := Construct(ConstructionInput{Method: MethodIntervalQuantiles, Low: 3, High: 12, Coverage: c, Lower: 0, Upper: 100})
			return err
		}, "coverage", RuleCentralTails, []float64{tooClose}},
		{"sample-size level", goal, "level", RuleCentralTails, []float64{tooClose}},
		{"credible level", func(c float64) error { _, _, err := EqualTailed(Beta{Alpha: 2, Beta: 38}, c); return err }, "level", RuleCentralTails, []float64{tooClose}},
		{"four-value confidence", func(c float64) error { _, err := FourValue(0.1, 0.4, 0.2, c, 0, 1); return err }, "confidence", RuleCentralTails, []float64{tooClose}},
		{"success criterion's confidence", crit, "confidence", RuleProbRange, []float64{tooClose, 1e-320, 1e-13}},
	}
	for _, c := range cases {
		if err := c.check(ok); err != nil {
			t.Errorf("%s: %v refused: %v", c.name, ok, err)
		}
		for _, v := range c.bad {
			var ie *InputError
			if err := c.check(v); !errors.As(err, &ie) || ie.Field != c.field || ie.Rule != c.rule {
				t.Errorf("%s: %v gave %v, want %s: %s", c.name, v, err, c.field, c.rule)
			}
		}
	}
}

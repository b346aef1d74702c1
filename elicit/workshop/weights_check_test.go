package workshop

import (
	"errors"
	"math"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

// A weight set's own rules, which the store and the record both apply
// (by hand: the rules as DEVELOPERS.md's input-rule table states them).
func TestWeightsCheck(t *testing.T) {
	basis := &WeightBasis{}
	for _, c := range []struct {
		name  string
		w     Weights
		field string
		rule  elicit.Rule
	}{
		{"equal, no weights", Weights{Scheme: WeightsEqual}, "", ""},
		{"custom", Weights{Scheme: WeightsCustom, ByExpert: map[int64]float64{1: 2, 2: 0}}, "", ""},
		{"performance with its basis", Weights{Scheme: WeightsPerformance, ByExpert: map[int64]float64{1: 0.3}, Basis: basis}, "", ""},
		{"unknown scheme", Weights{Scheme: "loudest"}, "scheme", elicit.RuleUnknown},
		{"NaN weight", Weights{Scheme: WeightsCustom, ByExpert: map[int64]float64{1: 1, 7: math.NaN()}}, "by_expert[7]", elicit.RuleFinite},
		{"infinite weight", Weights{Scheme: WeightsCustom, ByExpert: map[int64]float64{3: math.Inf(1)}}, "by_expert[3]", elicit.RuleFinite},
		{"negative weight, the first by id", Weights{Scheme: WeightsCustom, ByExpert: map[int64]float64{9: -1, 4: -2}}, "by_expert[4]", elicit.RuleNonNegative},
		{"all zero", Weights{Scheme: WeightsCustom, ByExpert: map[int64]float64{1: 0, 2: 0}}, "by_expert", elicit.RuleWeightsNotAllZero},
		{"none under performance", Weights{Scheme: WeightsPerformance}, "by_expert", elicit.RuleWeightsNotAllZero},
		{"a basis for custom weights", Weights{Scheme: WeightsCustom, ByExpert: map[int64]float64{1: 1}, Basis: basis}, "basis", elicit.RuleUnknown},
	} {
		err := c.w.Check()
		var ie *elicit.InputError
		switch {
		case c.field == "" && err != nil:
			t.Errorf("%s: refused: %v", c.name, err)
		case c.field != "" && (!errors.As(err, &ie) || ie.Field != c.field || ie.Rule != c.rule):
			t.Errorf("%s: %v, want %s: %s", c.name, err, c.field, c.rule)
		}
	}
}

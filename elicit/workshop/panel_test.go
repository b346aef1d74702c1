package workshop

import (
	"errors"
	"slices"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

// PoolPanel pools only experts with a fit and unrevoked access, under
// Weights.Of, with weights normalised (worked by hand: 2 and 6 of 8).
func TestPoolPanel(t *testing.T) {
	a := elicit.ScaledBeta{Beta: elicit.Beta{Alpha: 2, Beta: 8}, Lower: 0, Upper: 1}
	b := elicit.ScaledBeta{Beta: elicit.Beta{Alpha: 5, Beta: 5}, Lower: 0, Upper: 1}
	c := elicit.ScaledBeta{Beta: elicit.Beta{Alpha: 9, Beta: 3}, Lower: 0, Upper: 1}
	panel := []PanelFit{
		{ExpertID: 1, Dist: &a},
		{ExpertID: 2},                          // no fit
		{ExpertID: 3, Dist: &b, Revoked: true}, // revoked
		{ExpertID: 4, Dist: &c},
	}
	w := Weights{Scheme: WeightsCustom, ByExpert: map[int64]float64{1: 2, 3: 5, 4: 6}}
	pp, err := PoolPanel(panel, w)
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(pp.Experts, []int64{1, 4}) || !slices.Equal(pp.Weights, []float64{0.25, 0.75}) {
		t.Errorf("pooled experts %v weights %v, want [1 4] [0.25 0.75]", pp.Experts, pp.Weights)
	}
	want, _ := elicit.LinearPool([]elicit.ScaledBeta{a, c}, []float64{2, 6})
	for _, x := range []float64{0.1, 0.4, 0.8} {
		if got, ref := pp.Pool.CDF(x), want.CDF(x); got != ref {
			t.Errorf("pool CDF(%v) = %v, want %v", x, got, ref)
		}
	}
	if _, err := PoolPanel(panel[1:3], w); !errors.Is(err, ErrNoFits) {
		t.Errorf("no pooled expert: %v, want ErrNoFits", err)
	}
	if pp, err := PoolPanel(panel, Weights{}); err != nil || !slices.Equal(pp.Weights, []float64{0.5, 0.5}) {
		t.Errorf("equal weights: %v, %v", pp.Weights, err)
	}
}

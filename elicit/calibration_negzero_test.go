package elicit

import (
	"math"
	"testing"
)

// A cut-off of −0 (typed "-0" on the page or to parley calibrate) is the
// cut-off 0: the scores carried α = −0, which `parley calibrate` printed
// as "Cut-off alpha = -0" and the JSON as "alpha": -0. The weights are
// those of α = 0.
func TestNegativeZeroCutOffIsZero(t *testing.T) {
	as, real := handSeeds()
	negZero, zero := math.Copysign(0, -1), 0.0
	got, err := ClassicalModel(as, real, nil, ModelOptions{Alpha: &negZero})
	if err != nil {
		t.Fatal(err)
	}
	if math.Signbit(got.Alpha) {
		t.Errorf("α = %v, want 0", got.Alpha)
	}
	want, err := ClassicalModel(as, real, nil, ModelOptions{Alpha: &zero})
	if err != nil {
		t.Fatal(err)
	}
	for i := range want.Experts {
		if got.Experts[i].Weight != want.Experts[i].Weight {
			t.Errorf("%s: weight %v under −0, %v under 0", want.Experts[i].Expert, got.Experts[i].Weight, want.Experts[i].Weight)
		}
	}
	if !math.Signbit(negZero) {
		t.Error("the caller's cut-off was changed")
	}
}

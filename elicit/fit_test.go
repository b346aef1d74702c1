package elicit

import (
	"math"
	"testing"
)

// TestFitAgainstR fits each judgement of the R reference table and
// requires our objective to be no worse than R's optim over many starts
// (source: testdata/r/beta_reference.R) plus 1e-6.
func TestFitAgainstR(t *testing.T) {
	n := 0
	for _, r := range readReference(t) {
		if r.kind != "fit" {
			continue
		}
		n++
		j := Judgement{Probs: r.probs, Values: r.vals, Lower: r.lower, Upper: r.upper}
		f, err := FitQuantiles(j)
		if err != nil {
			t.Errorf("%s: %v", r.name, err)
			continue
		}
		t.Logf("%s: ours Beta(%.6g, %.6g) sse %.6g; R Beta(%.6g, %.6g) sse %.6g", r.name, f.Dist.Alpha, f.Dist.Beta.Beta, f.SSE, r.alpha, r.beta, r.value)
		if !(f.SSE <= r.value+1e-6) {
			t.Errorf("%s: objective %.10g, R's %.10g", r.name, f.SSE, r.value)
		}
		if len(j.Probs) == 2 && !(f.MaxProbError <= 1e-9) {
			t.Errorf("%s: two pairs must be matched exactly, max prob error %g", r.name, f.MaxProbError)
		}
	}
	if n < 6 {
		t.Fatalf("only %d fits in the reference table", n)
	}
}

var _ = math.Abs

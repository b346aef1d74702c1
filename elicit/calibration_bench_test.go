package elicit

import (
	"math/rand/v2"
	"testing"
)

// BenchmarkClassicalModel20x15 scores 20 experts on 15 calibration
// questions at 5/50/95 with the cut-off α optimised.
func BenchmarkClassicalModel20x15(b *testing.B) {
	as, real := randomSeeds(rand.New(rand.NewPCG(20, 15)), 20, 15, seedProbs)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := ClassicalModel(as, real, nil, ModelOptions{}); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkLeaveOneOut20x15 is the robustness analysis of the same panel:
// 35 reruns of the classical model, on the calibration questions.
func BenchmarkLeaveOneOut20x15(b *testing.B) {
	as, real := randomSeeds(rand.New(rand.NewPCG(20, 15)), 20, 15, seedProbs)
	for b.Loop() {
		if _, err := LeaveOneOut(as, real, nil, ModelOptions{}, nil); err != nil {
			b.Fatal(err)
		}
	}
}

package elicit

import (
	"math/rand/v2"
	"testing"
)

// BenchmarkClassicalModel20x15 scores 20 experts on 15 calibration
// questions at 5/50/95 with the cut-off α optimised.
func BenchmarkClassicalModel20x15(b *testing.B) {
	as, real := randomSeeds(rand.New(rand.NewPCG(20, 15)), 20, 15, p5_50_95)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := ClassicalModel(as, real, nil, ModelOptions{}); err != nil {
			b.Fatal(err)
		}
	}
}

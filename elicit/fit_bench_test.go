package elicit

import "testing"

// BenchmarkFit3 fits a 5/50/95 judgement (invented inverter failure
// proportion), the common case. Target: under 50 µs on a 2-core machine.
func BenchmarkFit3(b *testing.B) {
	j := Judgement{Probs: []float64{0.05, 0.5, 0.95}, Values: []float64{0.01, 0.04, 0.12}, Lower: 0, Upper: 1}
	for b.Loop() {
		if _, err := FitQuantiles(j); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkFit5 fits a five-point judgement (invented).
func BenchmarkFit5(b *testing.B) {
	j := Judgement{Probs: []float64{0.1, 0.25, 0.5, 0.75, 0.9}, Values: []float64{0.2, 0.3, 0.4, 0.5, 0.65}, Lower: 0, Upper: 1}
	for b.Loop() {
		if _, err := FitQuantiles(j); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkFit3Rare fits a rare-event 5/50/95 judgement (invented, values
// near 0, α+β in the thousands).
func BenchmarkFit3Rare(b *testing.B) {
	j := Judgement{Probs: []float64{0.05, 0.5, 0.95}, Values: []float64{0.0001, 0.0005, 0.002}, Lower: 0, Upper: 1}
	for b.Loop() {
		if _, err := FitQuantiles(j); err != nil {
			b.Fatal(err)
		}
	}
}

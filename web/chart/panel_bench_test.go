package chart

import (
	"io"
	"math/rand/v2"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

// benchPanel is an invented round-2 panel of the issue 4 workshop: 200
// experts' Betas and their equal-weight pool.
func benchPanel(b *testing.B, rng *rand.Rand) PanelView {
	dists := make([]elicit.ScaledBeta, 200)
	for i := range dists {
		m := 0.15 + 0.3*rng.Float64()
		n := 8 + 40*rng.Float64()
		dists[i] = sbeta(m*n, (1-m)*n, 0, 1)
	}
	return panelOf(b, true, dists...)
}

// BenchmarkPanel200 draws the panel of 200 experts as an expert's page
// does after one expert has revised: one new curve, the rest remembered.
func BenchmarkPanel200(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 2026))
	v := benchPanel(b, rng)
	if err := Panel(v).Render(b.Context(), io.Discard); err != nil {
		b.Fatal(err)
	}
	for b.Loop() {
		m := 0.15 + 0.3*rng.Float64()
		v.Curves[rng.IntN(200)].Dist = sbeta(m*20, (1-m)*20, 0, 1)
		if err := Panel(v).Render(b.Context(), io.Discard); err != nil {
			b.Fatal(err)
		}
	}
}

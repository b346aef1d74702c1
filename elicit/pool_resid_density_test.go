package elicit

import (
	"math"
	"testing"
)

// residDensity, the quantile solver's one pass over the components, takes
// each density from the prefactor its tail evaluation formed; it must
// agree with resid and unitDensity, which form them apart (the density in
// logs), to rounding, from the far tails to the middle: the 20-expert
// pool of the benchmark, a pool with a spike on a broad hump, and U and
// J shapes.
func TestResidDensityAgreesWithItsParts(t *testing.T) {
	ds20, w20 := benchExperts()
	for _, c := range []struct {
		name string
		ds   []ScaledBeta
		w    []float64
	}{
		{"twenty experts", ds20, w20},
		{"spike on a hump", benchPanel4(), nil},
		{"U and J shapes", unitBetas(0.4, 0.6, 0.7, 9, 3, 0.8, 1, 1), []float64{1, 2, 1, 1}},
	} {
		p := mustPool(t, c.ds, c.w).withIncBeta()
		for _, u := range []float64{1e-150, 1e-12, 1e-6, 0.001, 0.01, 0.05, 0.2, 0.5, 0.8, 0.99, 1 - 1e-9} {
			for _, prob := range []float64{0.01, 0.5, 0.99} {
				r, f, df, d2f := p.residDensity(u, prob)
				wantR := p.resid(u, prob)
				wf, wdf, wd2f := p.unitDensity(u)
				if r != wantR {
					t.Errorf("%s: u %g, p %g: residual %g, resid gives %g", c.name, u, prob, r, wantR)
				}
				for _, q := range []struct {
					name      string
					got, want float64
				}{{"f", f, wf}, {"f′", df, wdf}, {"f″", d2f, wd2f}} {
					if q.got != q.want && !(math.Abs(q.got-q.want) <= 1e-12*math.Abs(q.want)) {
						t.Errorf("%s: u %g: %s %g, unitDensity gives %g", c.name, u, q.name, q.got, q.want)
					}
				}
			}
		}
	}
}

package elicit

import "testing"

// TestPoolPointsHeldAsABoundAreSaid: a pool's quantiles are written as
// doubles too, so a pool whose point is held as a bound says so, with
// its distance, as one Beta does (beyond_double).
//
// On [10, 20] the equal pool of Beta(0.0668198, 0.292528) and Beta(0.05,
// 0.3) puts its 5% point 1.515707e-21 above 10, held as 10. On [0, 1] the
// equal pool of Beta(0.001, 0.001) and Beta(0.002, 0.001) puts its 5%
// point at 10^−747.854821, its median at 1 − 10^−66.947910 and its 95%
// point at 1 − 10^−1066.947910, held as 0, 1 and 1 (the median had been
// shown as the last double below 1, the nearer CDF in that gap). R 4.2.2, testdata/r/pool_held_bound_reference.R (pbeta for
// the first; the leading term of each component, DLMF 8.17.8, solved by
// hand with lbeta for the second).
func TestPoolPointsHeldAsABoundAreSaid(t *testing.T) {
	probs := []float64{0.05, 0.5, 0.95}
	for _, c := range []struct {
		name         string
		lower, upper float64
		dists        [2]Beta
		held         []int
		want         string
	}{
		{"[10, 20]", 10, 20, [2]Beta{{0.0668198, 0.292528}, {0.05, 0.3}}, []int{0},
			"The pool's 5% point lies about 1.5e-21 above the lower bound, 10: nearer the bound than the computer's numbers (double precision) can hold, so it is shown as the bound itself."},
		{"[0, 1]", 0, 1, [2]Beta{{0.001, 0.001}, {0.002, 0.001}}, []int{0, 1, 2},
			"The pool's 5% point is about 1.4e-748, and the pool's 50% point is about 1 − 1.1e-67, and the pool's 95% point is about 1 − 1.1e-1067: nearer the bound than the computer's numbers (double precision) can hold, so each is shown as its bound."},
	} {
		ds := []ScaledBeta{{Beta: c.dists[0], Lower: c.lower, Upper: c.upper}, {Beta: c.dists[1], Lower: c.lower, Upper: c.upper}}
		p, err := LinearPool(ds, nil)
		if err != nil {
			t.Fatal(err)
		}
		qs, err := p.QuantileSet(probs)
		if err != nil {
			t.Fatal(err)
		}
		var shown []ShownPoint
		for _, q := range qs {
			shown = append(shown, ShownPoint{P: q.Prob, X: q.Value})
		}
		for _, i := range c.held {
			if qs[i].Value != c.lower && qs[i].Value != c.upper {
				t.Fatalf("%s: the %v point %v is no longer held as a bound", c.name, qs[i].Prob, qs[i].Value)
			}
		}
		w, ok := p.BeyondDouble(shown)
		if !ok || w.Code != WarnBeyondDouble || w.Message != c.want {
			t.Errorf("%s: %v %q\nwant %q", c.name, ok, w.Message, c.want)
		}
	}
	// An ordinary pool says nothing.
	p, err := LinearPool([]ScaledBeta{{Beta: Beta{2, 30}, Upper: 1}, {Beta: Beta{4, 60}, Upper: 1}}, nil)
	if err != nil {
		t.Fatal(err)
	}
	qs, _ := p.QuantileSet(probs)
	var shown []ShownPoint
	for _, q := range qs {
		shown = append(shown, ShownPoint{P: q.Prob, X: q.Value})
	}
	if w, ok := p.BeyondDouble(shown); ok {
		t.Errorf("an ordinary pool warns %q", w.Message)
	}
}

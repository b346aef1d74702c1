package elicit

import (
	"math"
	"testing"
)

func TestLogPoolFormula(t *testing.T) {
	// α = Σ wᵢ(αᵢ−1)+1, β = Σ wᵢ(βᵢ−1)+1 with normalised weights (Genest
	// & Zidek 1986, Statist. Sci. 1: 114–148), worked by hand per row.
	tests := []struct {
		name  string
		ds    []ScaledBeta
		w     []float64
		a, b  float64
		lower float64
		upper float64
	}{
		// 0.25·(2−1) + 0.75·(4−1) + 1 = 3.5; 0.25·7 + 0.75·5 + 1 = 6.5.
		{"two experts", unitBetas(2, 8, 4, 6), []float64{1, 3}, 3.5, 6.5, 0, 1},
		// Equal weights: (0.5·(0.5−1) + 0.5·(3−1)) + 1 = 1.75; (0.5·9 + 0.5·1) + 1 = 6.
		{"equal weights", unitBetas(0.5, 10, 3, 2), nil, 1.75, 6, 0, 1},
		{"one expert", unitBetas(7, 0.3), []float64{5}, 7, 0.3, 0, 1},
		{"scaled", []ScaledBeta{{Beta{2, 3}, 5, 9}, {Beta{6, 3}, 5, 9}}, []float64{1, 1}, 4, 3, 5, 9},
	}
	for _, tc := range tests {
		got, err := LogPool(tc.ds, tc.w)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(got.Alpha-tc.a) > 1e-14 || math.Abs(got.Beta.Beta-tc.b) > 1e-14 || got.Lower != tc.lower || got.Upper != tc.upper {
			t.Errorf("%s: %+v, want Beta(%v, %v) on [%v, %v]", tc.name, got, tc.a, tc.b, tc.lower, tc.upper)
		}
	}
}

func TestLogPoolIsGeometricMean(t *testing.T) {
	// The pooled density is proportional to Πᵢ fᵢ(x)^wᵢ (definition of
	// the logarithmic pool), so log f(x) − Σ wᵢ log fᵢ(x) must not depend
	// on x.
	ds := unitBetas(2, 8, 9, 3, 0.7, 1.4)
	w := []float64{0.5, 0.3, 0.2}
	lp, err := LogPool(ds, w)
	if err != nil {
		t.Fatal(err)
	}
	diff := func(x float64) float64 {
		s := math.Log(lp.PDF(x))
		for i, d := range ds {
			s -= w[i] * math.Log(d.PDF(x))
		}
		return s
	}
	c := diff(0.5)
	for _, x := range []float64{0.01, 0.2, 0.35, 0.8, 0.99} {
		if math.Abs(diff(x)-c) > 1e-12 {
			t.Errorf("at %v: log-ratio %v, at 0.5 %v", x, diff(x), c)
		}
	}
}

func TestLogPoolValidity(t *testing.T) {
	// Shapes outside [MinShape, MaxShape] are refused before pooling
	// (issue 11: a log pool with alpha 1e308 overflowed).
	tiny := math.SmallestNonzeroFloat64
	_, err := LogPool(unitBetas(tiny, 2, 1, 3), []float64{1, 1})
	wantRule(t, err, "experts[0].alpha", RuleShapeRange)
	_, err = LogPool(unitBetas(2, 3, 1e308, 3), nil)
	wantRule(t, err, "experts[1].alpha", RuleShapeRange)
	// With normalised weights α = Σ wᵢαᵢ is a convex combination: its
	// rounding stays within the smallest and largest αᵢ, so a pool of
	// shapes at MinShape is still valid.
	got, err := LogPool(unitBetas(MinShape, 2, MinShape, 3, MinShape, 4), []float64{1, 1, 1})
	if err != nil || got.Alpha < MinShape || got.Validate() != nil {
		t.Errorf("three experts with alpha %g: %+v, %v", MinShape, got, err)
	}
	got, err = LogPool(unitBetas(MaxShape, 2, MaxShape, 3, MaxShape, 4), []float64{0.1, 0.3, 0.7})
	if err != nil || got.Alpha > MaxShape || got.Validate() != nil {
		t.Errorf("three experts with alpha %g: %+v, %v", MaxShape, got, err)
	}
}

// TestLogPoolOfAgreeingExpertsIsTheirBeta: the log pool of one density
// taken several times is that density (Πᵢ f^wᵢ = f when Σ wᵢ = 1), so
// five experts who all give Beta(0.1, 3.3) pool to Beta(0.1, 3.3)
// exactly, however the weighted sum rounds (in float64, five times
// 0.2·0.1 is 0.10000000000000002 and five times 0.2·3.3 is
// 3.3000000000000003). A sixth expert of weight 0, who is not in the
// pool, does not widen the interval the rounding is kept in.
func TestLogPoolOfAgreeingExpertsIsTheirBeta(t *testing.T) {
	ds := unitBetas(0.1, 3.3, 0.1, 3.3, 0.1, 3.3, 0.1, 3.3, 0.1, 3.3, 5, 5)
	for _, w := range [][]float64{{1, 1, 1, 1, 1, 0}, {2, 2, 2, 2, 2, 0}} {
		got, err := LogPool(ds, w)
		if err != nil {
			t.Fatal(err)
		}
		if got.Beta != (Beta{Alpha: 0.1, Beta: 3.3}) {
			t.Errorf("weights %v: Beta(%v, %v), want Beta(0.1, 3.3) exactly", w, got.Alpha, got.Beta.Beta)
		}
	}
	got, err := LogPool(ds[:5], nil)
	if err != nil {
		t.Fatal(err)
	}
	if got.Beta != (Beta{Alpha: 0.1, Beta: 3.3}) {
		t.Errorf("equal weights: Beta(%v, %v), want Beta(0.1, 3.3) exactly", got.Alpha, got.Beta.Beta)
	}
}

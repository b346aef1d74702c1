package elicit

import (
	"encoding/json"
	"math"
	"math/rand/v2"
	"slices"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
	"gonum.org/v1/gonum/mathext"
)

func unitBetas(ab ...float64) []ScaledBeta {
	var ds []ScaledBeta
	for i := 0; i+1 < len(ab); i += 2 {
		ds = append(ds, Unit(Beta{ab[i], ab[i+1]}))
	}
	return ds
}

func mustPool(t *testing.T, ds []ScaledBeta, w []float64) Pool {
	t.Helper()
	p, err := LinearPool(ds, w)
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// parseComponents reads "alpha:beta:weight|..." from the SciPy table.
func parseComponents(t *testing.T, s string) ([]ScaledBeta, []float64) {
	t.Helper()
	var ds []ScaledBeta
	var ws []float64
	for _, c := range strings.Split(s, "|") {
		f := strings.Split(c, ":")
		v := make([]float64, 3)
		for i := range v {
			x, err := strconv.ParseFloat(f[i], 64)
			if err != nil {
				t.Fatalf("bad component %q", c)
			}
			v[i] = x
		}
		ds = append(ds, Unit(Beta{v[0], v[1]}))
		ws = append(ws, v[2])
	}
	return ds, ws
}

func TestPoolQuantileScipy(t *testing.T) {
	// Against scipy.optimize.brentq on the mixture of scipy.stats.beta
	// CDFs (testdata/scipy), to 1e-10 absolute as the issue asks.
	byPool := map[string][]scipyRow{}
	var order []string
	for _, r := range readScipy(t, "pool_q") {
		if _, ok := byPool[r.components]; !ok {
			order = append(order, r.components)
		}
		byPool[r.components] = append(byPool[r.components], r)
	}
	for _, key := range order {
		ds, ws := parseComponents(t, key)
		p := mustPool(t, ds, ws)
		rows := byPool[key]
		probs := make([]float64, len(rows))
		for i, r := range rows {
			probs[i] = r.x
		}
		qs, err := p.Quantiles(probs)
		if err != nil {
			t.Fatal(err)
		}
		for i, r := range rows {
			one := p.Quantile(r.x)
			if math.Abs(qs[i]-r.value) > 1e-10 || math.Abs(one-r.value) > 1e-10 {
				t.Errorf("pool %s at %v: Quantiles %.17g, Quantile %.17g, scipy %.17g", key, r.x, qs[i], one, r.value)
			}
			if e := math.Abs(p.CDF(qs[i]) - r.x); e > 1e-13 {
				t.Errorf("pool %s: F(Q(%v)) off by %v", key, r.x, e)
			}
		}
	}
}

func TestPoolOfOneIsThatBeta(t *testing.T) {
	// A mixture of one component, or of identical components, is that
	// component (definition of the linear pool, Stone 1961).
	probs := []float64{1e-6, 0.001, 0.05, 0.3, 0.5, 0.77, 0.95, 0.999, 1 - 1e-6}
	for _, d := range []Beta{{2, 8}, {0.05, 0.05}, {0.2, 1000}, {5000, 3}, {1, 1}, {0.5, 30}} {
		for _, n := range []int{1, 4} {
			ds := make([]ScaledBeta, n)
			ws := make([]float64, n)
			for i := range ds {
				ds[i], ws[i] = Unit(d), float64(i+1)
			}
			p := mustPool(t, ds, ws)
			qs, err := p.Quantiles(probs)
			if err != nil {
				t.Fatal(err)
			}
			for i, pr := range probs {
				want := d.Quantile(pr)
				if !relClose(qs[i], want, 1e-10) && math.Abs(qs[i]-want) > 1e-10*math.Min(want, 1-want) {
					t.Errorf("%d × %v at %v: %.17g, Beta's own quantile %.17g", n, d, pr, qs[i], want)
				}
			}
			if math.Abs(p.Mean()-d.Mean()) > 1e-15 || math.Abs(p.Variance()-d.Variance()) > 1e-15 {
				t.Errorf("%d × %v: mean %v var %v", n, d, p.Mean(), p.Variance())
			}
		}
	}
}

func TestPoolMoments(t *testing.T) {
	// Mixture mean Σ wᵢμᵢ and the law of total variance, checked against
	// direct integration of x f(x) and x² f(x) by 64-point Gauss–Legendre
	// quadrature (gonum/integrate/quad); smooth components (α, β ≥ 2) so
	// the quadrature is exact to rounding.
	ds := unitBetas(2, 8, 9, 3, 20, 20)
	w := []float64{1, 2, 1}
	p := mustPool(t, ds, w)
	mean := quad.Fixed(func(x float64) float64 { return x * p.PDF(x) }, 0, 1, 64, quad.Legendre{}, 0)
	m2 := quad.Fixed(func(x float64) float64 { return x * x * p.PDF(x) }, 0, 1, 64, quad.Legendre{}, 0)
	if math.Abs(p.Mean()-mean) > 1e-12 {
		t.Errorf("mean %v, by quadrature %v", p.Mean(), mean)
	}
	if v := m2 - mean*mean; math.Abs(p.Variance()-v) > 1e-12 {
		t.Errorf("variance %v, by quadrature %v", p.Variance(), v)
	}
	// Weighted mean of means by hand: (0.2 + 2·0.75 + 0.5)/4.
	if want := (0.2 + 2*0.75 + 0.5) / 4; math.Abs(p.Mean()-want) > 1e-15 {
		t.Errorf("mean %v, want %v", p.Mean(), want)
	}
	if math.Abs(p.SD()-math.Sqrt(p.Variance())) > 0 {
		t.Errorf("SD %v", p.SD())
	}
	if got := quad.Fixed(p.PDF, 0, 1, 64, quad.Legendre{}, 0); math.Abs(got-1) > 1e-12 {
		t.Errorf("density integrates to %v", got)
	}
}

func TestPoolScaledBounds(t *testing.T) {
	// On [10, 30] every value is 10 + 20·(the unit pool's value).
	unit := mustPool(t, unitBetas(2, 5, 6, 2), []float64{3, 1})
	var ds []ScaledBeta
	for _, c := range unit.Components {
		ds = append(ds, ScaledBeta{Beta: c.Dist.Beta, Lower: 10, Upper: 30})
	}
	sc := mustPool(t, ds, []float64{3, 1})
	for _, pr := range []float64{0.1, 0.5, 0.9} {
		if got, want := sc.Quantile(pr), 10+20*unit.Quantile(pr); math.Abs(got-want) > 1e-12 {
			t.Errorf("quantile %v: %v, want %v", pr, got, want)
		}
	}
	if got, want := sc.Mean(), 10+20*unit.Mean(); math.Abs(got-want) > 1e-12 {
		t.Errorf("mean %v, want %v", got, want)
	}
	if got, want := sc.SD(), 20*unit.SD(); math.Abs(got-want) > 1e-12 {
		t.Errorf("sd %v, want %v", got, want)
	}
	// Var(10 + 20U) = 20²·Var U (the variance of a linear map), and by hand
	// for the unit pool: components Beta(2, 5) and Beta(6, 2), weights ¾
	// and ¼, means 2/7 and 3/4, variances 10/392 and 12/576; the law of
	// total variance gives Σ wᵢσᵢ² + Σ wᵢ(μᵢ − μ)² with μ = 3/14 + 3/16.
	mu := 0.75*2/7 + 0.25*0.75
	wantVar := 0.75*10/392.0 + 0.25*12/576.0 + 0.75*(2.0/7-mu)*(2.0/7-mu) + 0.25*(0.75-mu)*(0.75-mu)
	if got := unit.Variance(); math.Abs(got-wantVar) > 1e-15 {
		t.Errorf("unit variance %v, by hand %v", got, wantVar)
	}
	if got, want := sc.Variance(), 400*wantVar; math.Abs(got-want) > 1e-12 {
		t.Errorf("variance on [10, 30] %v, want 20² × %v = %v", got, wantVar, want)
	}
	if got, want := sc.CDF(18), unit.CDF(0.4); math.Abs(got-want) > 1e-15 {
		t.Errorf("CDF %v, want %v", got, want)
	}
	if got, want := sc.PDF(18), unit.PDF(0.4)/20; math.Abs(got-want) > 1e-14 {
		t.Errorf("PDF %v, want %v", got, want)
	}
	if sc.Quantile(0) != 10 || sc.Quantile(1) != 30 {
		t.Errorf("end quantiles %v %v", sc.Quantile(0), sc.Quantile(1))
	}
}

func TestPoolWeightsNormalised(t *testing.T) {
	p := mustPool(t, unitBetas(2, 8, 9, 3, 4, 4), []float64{2, 0, 6})
	if len(p.Components) != 2 || p.Components[0].Weight != 0.25 || p.Components[1].Weight != 0.75 {
		t.Errorf("components %+v", p.Components)
	}
	eq := mustPool(t, unitBetas(2, 8, 9, 3), nil)
	if eq.Components[0].Weight != 0.5 || eq.Components[1].Weight != 0.5 {
		t.Errorf("nil weights: %+v", eq.Components)
	}
	huge := mustPool(t, unitBetas(2, 8, 9, 3), []float64{math.MaxFloat64, math.MaxFloat64})
	if huge.Components[0].Weight != 0.5 {
		t.Errorf("huge weights: %+v", huge.Components)
	}
}

func TestLinearPoolBadInput(t *testing.T) {
	good := unitBetas(2, 8, 9, 3)
	tests := []struct {
		name  string
		ds    []ScaledBeta
		w     []float64
		field string
		rule  Rule
	}{
		{"no experts", nil, nil, "experts", RuleCount},
		{"bad alpha", unitBetas(2, 8, -1, 3), nil, "experts[1].alpha", RulePositive},
		{"NaN beta", unitBetas(2, math.NaN()), nil, "experts[0].beta", RuleFinite},
		{"bad bounds", []ScaledBeta{{Beta{2, 2}, 1, 1}}, nil, "experts[0].lower", RuleBoundsOrder},
		{"different bounds", []ScaledBeta{Unit(Beta{2, 2}), {Beta{2, 2}, 0, 2}}, nil, "experts[1].lower", RuleSameBounds},
		{"too few weights", good, []float64{1}, "weights", RuleLengthMatch},
		{"NaN weight", good, []float64{1, math.NaN()}, "weights[1]", RuleFinite},
		{"Inf weight", good, []float64{math.Inf(1), 1}, "weights[0]", RuleFinite},
		{"negative weight", good, []float64{1, -0.5}, "weights[1]", RuleNonNegative},
		{"all zero", good, []float64{0, 0}, "weights", RuleWeightsNotAllZero},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := LinearPool(tc.ds, tc.w)
			wantRule(t, err, tc.field, tc.rule)
			_, err = LogPool(tc.ds, tc.w)
			wantRule(t, err, tc.field, tc.rule)
		})
	}
	p := mustPool(t, good, nil)
	for _, tc := range []struct {
		probs []float64
		field string
		rule  Rule
	}{
		{[]float64{0.5, 0.5}, "probs[1]", RuleProbIncreasing},
		{[]float64{0}, "probs[0]", RuleProbOpen},
		{[]float64{0.2, math.NaN()}, "probs[1]", RuleFinite},
	} {
		_, err := p.Quantiles(tc.probs)
		wantRule(t, err, tc.field, tc.rule)
	}
	if _, err := (Pool{}).Quantiles([]float64{0.5}); err == nil {
		t.Error("empty pool: no error")
	}
	if _, err := (Pool{}).BestBeta(); err == nil {
		t.Error("empty pool BestBeta: no error")
	}
	if q := (Pool{}).Quantile(0.5); !math.IsNaN(q) {
		t.Errorf("empty pool quantile %v", q)
	}
}

func TestBestBetaOfOneBeta(t *testing.T) {
	// The pool of one Beta is represented by that Beta, with no distance.
	for _, d := range []Beta{{2, 8}, {0.7, 12}, {300, 40}} {
		r, err := mustPool(t, []ScaledBeta{Unit(d), Unit(d)}, nil).BestBeta()
		if err != nil {
			t.Fatal(err)
		}
		if !relClose(r.Dist.Alpha, d.Alpha, 1e-5) || !relClose(r.Dist.Beta.Beta, d.Beta, 1e-5) {
			t.Errorf("%v: best Beta %v", d, r.Dist.Beta)
		}
		if r.MaxCDFError > 1e-7 || r.SSE > 1e-12 {
			t.Errorf("%v: distance %v, SSE %v", d, r.MaxCDFError, r.SSE)
		}
	}
}

func TestBestBetaReportsDistance(t *testing.T) {
	// Two experts who disagree (invented): the pool is bimodal, so the
	// best single Beta is visibly off; the report must say by how much,
	// and the least-squares Beta must beat the moment-matched one on the
	// criterion it minimises.
	p := mustPool(t, []ScaledBeta{
		{Beta{4, 36}, 0, 1}, {Beta{30, 30}, 0, 1},
	}, []float64{1, 1})
	r, err := p.BestBeta()
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Probs) != 99 || r.Probs[0] != 0.01 || r.Probs[98] != 0.99 {
		t.Fatalf("grid %v", r.Probs)
	}
	qs, _ := p.Quantiles(r.Probs)
	var sse, maxE float64
	for k, q := range qs {
		e := r.Dist.CDF(q) - r.Probs[k]
		sse += e * e
		maxE = math.Max(maxE, math.Abs(e))
	}
	// The largest gap is over the whole curve, so never below the grid's.
	if math.Abs(sse-r.SSE) > 1e-12 || !(r.MaxCDFError >= maxE-1e-12) {
		t.Errorf("reported SSE %v max %v, recomputed %v, grid's largest gap %v", r.SSE, r.MaxCDFError, sse, maxE)
	}
	if maxE < 0.02 {
		t.Errorf("a bimodal pool fitted within %v: implausible", maxE)
	}
	for i, pr := range []float64{0.05, 0.5, 0.95} {
		if want := r.Dist.Quantile(pr) - p.Quantile(pr); math.Abs(r.QuantileDiffs[i]-want) > 1e-10 {
			t.Errorf("quantile difference at %v: %v, want %v", pr, r.QuantileDiffs[i], want)
		}
	}
	// Moment-matched Beta: α+β = m(1−m)/v − 1 (method of moments).
	m, v := p.Mean(), p.Variance()
	s := m*(1-m)/v - 1
	mm := Beta{m * s, (1 - m) * s}
	var mmSSE float64
	for k, q := range qs {
		e := mm.CDF(q) - r.Probs[k]
		mmSSE += e * e
	}
	if !(r.SSE < mmSSE) {
		t.Errorf("least-squares SSE %v not below moment-matched %v", r.SSE, mmSSE)
	}
}

// bisectQuantile is an independent reference: plain bisection of the
// mixture CDF in u over [0, 1], 2000 halvings of a geometric-or-linear
// split, sharing nothing with quantileIn but unitCDF.
func bisectQuantile(p Pool, prob float64) float64 {
	lo, hi := 0.0, 1.0
	for i := 0; i < 2000; i++ {
		mid := 0.5 * (lo + hi)
		if lo > 0 && hi < 1e-3 {
			mid = math.Sqrt(lo * hi)
		} else if lo == 0 && hi < 1e-3 {
			mid = hi / 1024
		}
		if mid <= lo || mid >= hi {
			break
		}
		if l, _ := p.withIncBeta().unitTails(mid); l < prob {
			lo = mid
		} else {
			hi = mid
		}
	}
	return 0.5 * (lo + hi)
}

func TestPoolQuantileExtremeShapes(t *testing.T) {
	// Extreme and disagreeing experts (invented), the hard cases for a
	// root finder: a U shape, a rare-event J shape, a near-certain expert
	// near 1, and a sharp one in the middle. The roots must agree with
	// plain bisection to 1e-10 absolute, or relatively near 0.
	pools := []struct {
		ds []ScaledBeta
		w  []float64
	}{
		{unitBetas(0.05, 0.05, 0.2, 1000), []float64{1, 1}},
		{unitBetas(5000, 3, 2, 2), []float64{1, 4}},
		{unitBetas(0.3, 40, 400, 400, 3, 1), []float64{2, 1, 1}},
		{unitBetas(1, 1, 10000, 10000), []float64{0.01, 0.99}},
		{unitBetas(0.5, 3, 0.5, 3), []float64{1, 1}},
	}
	probs := []float64{1e-9, 1e-4, 0.01, 0.1, 0.3, 0.4999, 0.5, 0.7, 0.9, 0.99, 0.9999, 1 - 1e-9}
	for k, pc := range pools {
		p := mustPool(t, pc.ds, pc.w)
		qs, err := p.Quantiles(probs)
		if err != nil {
			t.Fatal(err)
		}
		for i, pr := range probs {
			want := bisectQuantile(p, pr)
			for _, got := range []float64{qs[i], p.Quantile(pr)} {
				if math.Abs(got-want) > 1e-10 && !relClose(got, want, 1e-9) {
					t.Errorf("pool %d at %v: %.17g, bisection %.17g", k, pr, got, want)
				}
			}
		}
	}
}

func FuzzPoolQuantiles(f *testing.F) {
	f.Add(2.0, 8.0, 9.0, 3.0, 0.5, 0.3)
	f.Add(0.05, 0.05, 1e4, 2.0, 0.01, 0.999)
	f.Fuzz(func(t *testing.T, a1, b1, a2, b2, w, pr float64) {
		p, err := LinearPool(unitBetas(a1, b1, a2, b2), []float64{w, 1})
		if err != nil {
			return
		}
		qs, err := p.Quantiles([]float64{pr})
		if err != nil {
			return
		}
		if math.IsNaN(qs[0]) || qs[0] < 0 || qs[0] > 1 {
			t.Fatalf("quantile %v at %v of %+v", qs[0], pr, p.Components)
		}
		if m, v := p.Mean(), p.Variance(); math.IsNaN(m) || math.IsNaN(v) {
			t.Fatalf("mean %v variance %v", m, v)
		}
	})
}

func TestPoolQuantileUnderflow(t *testing.T) {
	// Beta(0.001, 5): for small x, I_x(a, b) ≈ x^a / (a B(a, b)), the
	// leading term of its series (DLMF §8.17(iii)), so the median is
	// (0.5·a·B(a, b))^(1/a) ≈ 1.16e-302, and the 1% quantile (≈ 1e-2000)
	// underflows to 0. Quantiles must stay ordered and not stall.
	a, b := 0.001, 5.0
	p := mustPool(t, unitBetas(a, b), nil)
	qs, err := p.Quantiles([]float64{0.001, 0.01, 0.5, 0.999})
	if err != nil {
		t.Fatal(err)
	}
	median := math.Exp(math.Log(0.5*a*math.Exp(mathext.Lbeta(a, b))) / a)
	if qs[0] != 0 || qs[1] != 0 || !relClose(qs[2], median, 1e-9) {
		t.Errorf("quantiles %v, want [0 0 %v ...]", qs, median)
	}
	for i := 1; i < len(qs); i++ {
		if qs[i] < qs[i-1] {
			t.Errorf("quantiles out of order: %v", qs)
		}
	}
}

func TestBestBetaWithQuantilesOnBounds(t *testing.T) {
	// A U-shaped expert (invented) puts grid quantiles within an ulp of
	// 1; they leave the fit but not the reported distance. In the second
	// pool (two U-shaped experts) the single Beta too holds mass beyond
	// the last double before 1 (its CDF there is about 0.70), so the
	// curves cannot be compared there and only the grid's distance at the
	// quantiles held as 1 (up to 0.29) says how far apart they are.
	for _, ab := range [][4]float64{{0.01, 0.01, 3, 3}, {0.01, 0.01, 0.02, 0.02}} {
		p := mustPool(t, unitBetas(ab[0], ab[1], ab[2], ab[3]), nil)
		r, err := p.BestBeta()
		if err != nil {
			t.Fatal(err)
		}
		qs, _ := p.Quantiles(r.Probs)
		var maxE float64
		onBound := 0
		for k, q := range qs {
			if q <= 0 || q >= 1 {
				onBound++
			}
			maxE = math.Max(maxE, math.Abs(r.Dist.CDF(q)-r.Probs[k]))
		}
		if onBound == 0 {
			t.Fatalf("%v: test case has no grid quantile on a bound", ab)
		}
		// The distance is over the whole curve, beside the bounds too, so
		// it is never below the grid's, bound points included.
		if !(r.MaxCDFError >= maxE-1e-15) {
			t.Errorf("%v: max CDF error %v, below the whole grid's %v", ab, r.MaxCDFError, maxE)
		}
		if !PoorFit(maxE) {
			continue
		}
		if cdf, _, _ := r.Far(); !cdf {
			t.Errorf("%v: grid distance %v above PoorFitThreshold, but the Beta is not reported far", ab, maxE)
		}
	}
}

func TestPoolDecodedFromJSON(t *testing.T) {
	// A Pool that went through JSON (as storage may keep it) has lost its
	// cache and must still answer, with the same numbers.
	p := mustPool(t, unitBetas(2, 8, 9, 3), []float64{1, 3})
	data, err := json.Marshal(p)
	if err != nil {
		t.Fatal(err)
	}
	var q Pool
	if err := json.Unmarshal(data, &q); err != nil {
		t.Fatal(err)
	}
	want, _ := p.Quantiles([]float64{0.1, 0.5, 0.9})
	got, err := q.Quantiles([]float64{0.1, 0.5, 0.9})
	if err != nil {
		t.Fatal(err)
	}
	for i := range want {
		if got[i] != want[i] || q.Quantile(0.5) != p.Quantile(0.5) {
			t.Errorf("decoded pool quantile %v, want %v", got[i], want[i])
		}
	}
}

func TestPoolValidate(t *testing.T) {
	good := Component{Dist: Unit(Beta{2, 3}), Weight: 1}
	tests := []struct {
		name  string
		p     Pool
		field string
		rule  Rule
	}{
		{"empty", Pool{Lower: 0, Upper: 1}, "experts", RuleCount},
		{"bad alpha", Pool{Components: []Component{{Dist: Unit(Beta{0, 3}), Weight: 1}}, Upper: 1}, "experts[0].alpha", RulePositive},
		{"other bounds", Pool{Components: []Component{good}, Lower: 0, Upper: 2}, "experts[0].lower", RuleSameBounds},
		{"NaN weight", Pool{Components: []Component{{Dist: good.Dist, Weight: math.NaN()}}, Upper: 1}, "weights[0]", RuleFinite},
		{"negative weight", Pool{Components: []Component{good, {Dist: good.Dist, Weight: -0.5}}, Upper: 1}, "weights[1]", RuleNonNegative},
		{"sum not 1", Pool{Components: []Component{good, good}, Upper: 1}, "weights", RuleWeightsSumToOne},
		// The rule's tolerance is 1e-9: a sum off by 1e-8 is refused.
		{"sum off by 1e-8", Pool{Components: []Component{{Dist: good.Dist, Weight: 0.5}, {Dist: good.Dist, Weight: 0.5 + 1e-8}}, Upper: 1}, "weights", RuleWeightsSumToOne},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			wantRule(t, tc.p.Validate(), tc.field, tc.rule)
			_, err := tc.p.Quantiles([]float64{0.5})
			wantRule(t, err, tc.field, tc.rule)
			if _, err := tc.p.BestBeta(); err == nil {
				t.Error("BestBeta: no error")
			}
			for _, v := range []float64{tc.p.CDF(0.5), tc.p.PDF(0.5), tc.p.Quantile(0.5)} {
				if !math.IsNaN(v) {
					t.Errorf("invalid pool gave %v, want NaN", v)
				}
			}
		})
	}
	if err := mustPool(t, unitBetas(2, 3, 4, 5), []float64{1, 2}).Validate(); err != nil {
		t.Errorf("LinearPool's pool: %v", err)
	}
}

// poolGridQuantiles is what BestBeta fits: the pool's quantiles at
// 0.01, …, 0.99 on the unit scale, those strictly inside (0, 1).
func poolGridQuantiles(t *testing.T, p Pool) (u, up []float64) {
	t.Helper()
	probs := gridProbs(representationGrid)
	qs, err := p.Quantiles(probs)
	if err != nil {
		t.Fatal(err)
	}
	for k, q := range qs {
		if x := (q - p.Lower) / p.width(); x > 0 && x < 1 {
			u, up = append(u, x), append(up, probs[k])
		}
	}
	return u, up
}

// exhaustiveRepresentation is the smallest objective over the whole grid
// of 99 points from local fits started at FitQuantiles' moment-based
// start, at every start of the cumulative fitter's grid (all 15 levels of
// α+β), and at every component's own Beta, the best finished to a
// relative improvement of 1e-13: the search BestBeta did before it
// looked for the basin on subsets of the grid.
func exhaustiveRepresentation(p Pool, u, up []float64) float64 {
	q := newLSQ(u, up)
	starts := append([][2]float64{q.momentStart()}, q.gridStarts(15)...)
	for _, c := range p.Components {
		starts = append(starts, clampBox([2]float64{math.Log(c.Dist.Alpha), math.Log(c.Dist.Beta.Beta)}))
	}
	bestF := math.Inf(1)
	for _, th := range starts {
		if _, f := q.localFit(th); f < bestF {
			bestF = f
		}
	}
	return bestF
}

func TestBestBetaFastPathMatchesGrid(t *testing.T) {
	// Invented pools, tight and wide, skewed, disagreeing and rare-event:
	// the representation found from the moment-matched and quantile-based
	// starts on subsets of the grid must reach the objective of the
	// exhaustive search on the whole grid within 1e-9 relative. Pools
	// close to a single Beta must be settled without the grid of starts.
	// (unimodal is kept for reading; the global fit needs no grid of
	// starts when its proof goes through.)
	cases := []struct {
		name     string
		dists    []ScaledBeta
		weights  []float64
		unimodal bool // settled from the first starts
	}{
		{"tight, agreeing", unitBetas(400, 600, 420, 580, 390, 610), nil, true},
		{"wide, agreeing", unitBetas(1.2, 1.5, 0.9, 2, 1.6, 1.3), nil, true},
		{"skewed, agreeing", unitBetas(2, 40, 1.5, 30, 3, 55), []float64{2, 1, 1}, true},
		{"rare event", unitBetas(0.5, 2000, 1.2, 800, 2, 5000), nil, false},
		{"bimodal, two experts", unitBetas(4, 36, 30, 30), nil, false},
		{"opposed, J against J", unitBetas(5, 45, 45, 5), nil, false},
		{"three far apart", unitBetas(20, 180, 100, 100, 180, 20), nil, false},
		{"U shape and a hump", unitBetas(0.3, 0.3, 5, 5), nil, false},
		{"overconfident expert off centre", benchPanel4(), nil, false},
		{"confident minority", unitBetas(2, 6, 900, 100), []float64{0.9, 0.1}, false},
		// Pools where the first starts find a local minimum only.
		{"rare J, a near-certain high expert, a J at 0", unitBetas(5, 1400, 600, 14, 0.3, 105), []float64{0.42, 0.58, 0.9}, false},
		{"rare-event J against a sharp middle", unitBetas(0.48, 395, 1270, 1230), []float64{1.03, 0.34}, false},
		{"low hump against a spike at 1", unitBetas(13.6, 200, 1450, 0.4), []float64{0.42, 0.95}, false},
		{"broad high against narrow low", unitBetas(8, 2.5, 29, 335), []float64{0.35, 1}, false},
		{"twenty, unequal weights", func() []ScaledBeta { d, _ := benchExperts(); return d }(),
			func() []float64 { _, w := benchExperts(); return w }(), true},
	}
	rng := rand.New(rand.NewPCG(3, 9))
	logU := func(lo, hi float64) float64 { return math.Exp(math.Log(lo) + rng.Float64()*math.Log(hi/lo)) }
	random := 16
	if testing.Short() {
		random = 4
	}
	for k := 0; k < random; k++ {
		// Experts who disagree widely: α, β log-uniform on [0.3, 3000].
		var ds []ScaledBeta
		var w []float64
		for i := 2 + rng.IntN(5); i > 0; i-- {
			ds = append(ds, Unit(Beta{logU(0.3, 3000), logU(0.3, 3000)}))
			w = append(w, 0.2+rng.Float64())
		}
		cases = append(cases, struct {
			name     string
			dists    []ScaledBeta
			weights  []float64
			unimodal bool
		}{"random " + strconv.Itoa(k), ds, w, false})
	}
	for _, tc := range cases {
		p := mustPool(t, tc.dists, tc.weights)
		u, up := poolGridQuantiles(t, p)
		_, f, err := p.representationFit(u, up)
		if err != nil {
			t.Errorf("%s: %v", tc.name, err)
			continue
		}
		if ref := exhaustiveRepresentation(p, u, up); !(f <= ref*(1+1e-9)+1e-15) {
			t.Errorf("%s: objective %.12g, exhaustive search %.12g", tc.name, f, ref)
		}
	}
}

// TestShares checks elicit.Shares against shares worked by hand: w_i/Σw.
func TestShares(t *testing.T) {
	cases := []struct {
		raw, want []float64
	}{
		{[]float64{1, 1, 2}, []float64{0.25, 0.25, 0.5}},                           // by hand
		{[]float64{1e308, 1e308, 1e308, 1e308}, []float64{0.25, 0.25, 0.25, 0.25}}, // the sum overflows float64; the shares do not
		{[]float64{3, 0}, []float64{1, 0}},
		{[]float64{5e-324, 5e-324}, []float64{0.5, 0.5}}, // subnormal weights
		{[]float64{0, 0}, nil},
		{[]float64{1, -1}, nil},
		{[]float64{1, math.Inf(1)}, nil},
		{[]float64{math.NaN()}, nil},
		{nil, nil},
	}
	for _, c := range cases {
		if got := Shares(c.raw); !slices.Equal(got, c.want) {
			t.Errorf("Shares(%v) = %v, want %v", c.raw, got, c.want)
		}
	}
}

// On bounds as wide as CheckBounds allows, the variance is beyond
// float64's range but the SD is not: it is the width times the unit
// scale's SD. Beta(3, 5)'s variance is αβ/((α+β)²(α+β+1)) = 15/576 (the
// textbook formula, e.g. Johnson, Kotz & Balakrishnan, "Continuous
// Univariate Distributions", vol. 2, ch. 25).
func TestSDOnTheWidestBounds(t *testing.T) {
	lo, hi := -1e300, 1e300
	if err := CheckBounds(lo, hi); err != nil {
		t.Fatal(err)
	}
	d := ScaledBeta{Beta: Beta{Alpha: 3, Beta: 5}, Lower: lo, Upper: hi}
	if got, want := d.SD(), 2e300*math.Sqrt(15.0/576); !(math.Abs(got-want) <= 1e-15*want) {
		t.Errorf("SD %v, want %v", got, want)
	}
	if !math.IsInf(d.Variance(), 1) {
		t.Errorf("variance %v: (2e300)² is beyond float64", d.Variance())
	}
	ds := []ScaledBeta{d, {Beta: Beta{Alpha: 20, Beta: 4}, Lower: lo, Upper: hi}}
	p, err := LinearPool(ds, []float64{1, 3})
	if err != nil {
		t.Fatal(err)
	}
	unit := mustPool(t, unitBetas(3, 5, 20, 4), []float64{1, 3})
	if got, want := p.SD(), 2e300*unit.SD(); !(math.Abs(got-want) <= 1e-14*want) {
		t.Errorf("pool SD %v, want the width times the unit pool's, %v", got, want)
	}
	r, err := p.BestBeta()
	if err != nil {
		t.Fatal(err)
	}
	if !(r.SDRatio > 0) || math.IsInf(r.SDRatio, 0) {
		t.Errorf("single Beta's SD ratio %v", r.SDRatio)
	}
}

// A pool whose components are all one Beta is represented by that Beta
// exactly, even where the grid of its quantiles cannot see it: Beta(1000,
// 1e-6) is a point mass at 1 in float64, and its best single Beta came
// out as Beta(2e-5, 7e-6), 0.49 away (review of the input rules).
func TestBestBetaOfOneBetaIsItself(t *testing.T) {
	for _, c := range []struct {
		d Beta
		w []float64
	}{{Beta{Alpha: 1000, Beta: 1e-6}, []float64{1}}, {Beta{Alpha: 3, Beta: 9}, []float64{1, 2, 5}}} {
		ds := make([]ScaledBeta, len(c.w))
		for i := range ds {
			ds[i] = ScaledBeta{Beta: c.d, Lower: 0, Upper: 1}
		}
		p, err := LinearPool(ds, c.w)
		if err != nil {
			t.Fatal(err)
		}
		r, err := p.BestBeta()
		if err != nil || r.Dist.Beta != c.d || r.MaxCDFError != 0 || len(r.Warnings) != 0 || r.SDRatio != 1 {
			t.Errorf("%v × %d: %+v, %v", c.d, len(c.w), r, err)
		}
	}
}

// TestPoolQuantileNarrowFlatSetIsNotUnique: a flat set a little wider than
// poolFlatWide makes the median not unique. Beta(2, 50) and Beta(50, 2),
// equally weighted, leave the pooled density f(0.5) = 2.26e-12 at the
// median (SciPy 1.10.1: beta(2, 50).pdf(0.5) = 2.26e-12; the test reads
// the density from the pool itself). The set where double precision cannot tell F from ½,
// |F(v) − ½| ≤ 2⁻⁵³, is about 2⁻⁵²/f ≈ 1e-4 wide: 2e-4 of min(u, 1 − u),
// above poolFlatWide (1e-6) and below 1e-3, so a rule a thousand times
// looser would call this median unique.
func TestPoolQuantileNarrowFlatSetIsNotUnique(t *testing.T) {
	p := mustPool(t, unitBetas(2, 50, 50, 2), nil)
	f := p.PDF(0.5)
	if !(f > 1e-12 && f < 5e-12) {
		t.Fatalf("pooled density at ½ %g, want about 2.26e-12", f)
	}
	set, err := p.QuantileSet([]float64{0.25, 0.5, 0.75})
	if err != nil {
		t.Fatal(err)
	}
	m := set[1]
	width := 0x1p-52 / f
	if m.Unique || math.Abs(m.Value-0.5) > 1e-12 || !(m.Low < 0.5 && m.High > 0.5) {
		t.Errorf("median %+v: want not unique, 0.5 (by symmetry) inside [Low, High]", m)
	}
	// The set's ends carry the rounding of F (an ulp of ½ each side), so
	// its width is 2⁻⁵²/f within a factor of 3.
	if w := m.High - m.Low; !(w > width/3 && w < 3*width) {
		t.Errorf("flat set [%v, %v], %g wide; want about 2⁻⁵²/f = %g", m.Low, m.High, w, width)
	}
	if !set[0].Unique || !set[2].Unique {
		t.Errorf("quartiles %+v, %+v: want unique", set[0], set[2])
	}
}

// TestPoolTinyQuantileAgainstR: a U-shaped expert with most of the weight
// puts the pool's lower quantiles far below 1e-100, where the root must be
// bracketed geometrically to be reached at all. Each quantile, from
// Quantile and from QuantileSet, matches R 4.2.2's root of
// Σ wᵢ pbeta(x, αᵢ, βᵢ) = p found by uniroot in ln x
// (testdata/r/pool_tiny_quantile_reference.R) to 1e-9 relative in x, the
// pool's quantile accuracy.
func TestPoolTinyQuantileAgainstR(t *testing.T) {
	rows := referenceTable(t, "../testdata/r/pool_tiny_quantile_reference.csv", "# R version", 8)
	for _, c := range rows {
		var v [8]float64
		for i := range v {
			var err error
			if v[i], err = strconv.ParseFloat(c[i], 64); err != nil {
				t.Fatal(err)
			}
		}
		p := mustPool(t, unitBetas(v[0], v[1], v[3], v[4]), []float64{v[2], v[5]})
		prob, want := v[6], v[7]
		set, err := p.QuantileSet([]float64{prob, 0.5})
		if err != nil {
			t.Fatal(err)
		}
		for _, got := range []float64{p.Quantile(prob), set[0].Value} {
			if math.Abs(math.Log(got)-want) > 1e-9 {
				t.Errorf("pool of Beta(%v, %v) ×%v and Beta(%v, %v) ×%v at %v: %v, R exp(%v)", v[0], v[1], v[2], v[3], v[4], v[5], prob, got, want)
			}
		}
	}
	if len(rows) != 6 {
		t.Fatalf("%d rows, want 6", len(rows))
	}
}

// TestPoolCDFAtTheBoundsIsExact: P(X ≤ Upper) = 1 and P(X ≤ Lower) = 0 for
// every pool on [Lower, Upper] (a distribution's CDF at the ends of its
// support), exactly, not as a weighted sum of the components' ones that
// rounds to 0.9999999999999999 with weights of 1, 9 and 3.
func TestPoolCDFAtTheBoundsIsExact(t *testing.T) {
	for _, ds := range [][]ScaledBeta{unitBetas(2, 8, 9, 3, 0.5, 0.5), {{Beta: Beta{2, 5}, Lower: 10, Upper: 30}, {Beta: Beta{0.3, 4}, Lower: 10, Upper: 30}}} {
		for _, w := range [][]float64{nil, []float64{1, 9, 3}[:len(ds)]} {
			p := mustPool(t, ds, w)
			if lo, hi := p.CDF(p.Lower), p.CDF(p.Upper); lo != 0 || hi != 1 {
				t.Errorf("pool on [%v, %v], weights %v: CDF %v at the lower bound, %v at the upper", p.Lower, p.Upper, w, lo, hi)
			}
		}
	}
}

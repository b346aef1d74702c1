package elicit

import (
	"errors"
	"math"
	"strconv"
	"strings"
	"testing"
)

func TestUniform(t *testing.T) {
	// Beta(1,1) is uniform (Gelman et al. 2013, BDA3 §2.4).
	u := Uniform()
	if u != (Beta{1, 1}) {
		t.Fatalf("Uniform() = %v", u)
	}
	for _, x := range []float64{0.1, 0.5, 0.8} {
		if math.Abs(u.CDF(x)-x) > 1e-14 {
			t.Errorf("Uniform CDF(%g) = %g", x, u.CDF(x))
		}
	}
}

func TestEquivalentSample(t *testing.T) {
	// Convention Beta(s, n−s): mean s/n, α+β = n (Morita, Thall & Müller
	// 2008: the ESS of Beta(a, b) is a+b).
	for _, c := range []struct{ s, n float64 }{{3, 10}, {0.5, 20}, {199.5, 200}} {
		d, err := EquivalentSample(c.s, c.n)
		if err != nil {
			t.Fatalf("%v: %v", c, err)
		}
		if d.Alpha != c.s || math.Abs(d.Beta-(c.n-c.s)) > 1e-12 {
			t.Errorf("EquivalentSample(%g, %g) = %v, want Beta(%g, %g)", c.s, c.n, d, c.s, c.n-c.s)
		}
		if math.Abs(d.Mean()-c.s/c.n) > 1e-12 || math.Abs(d.ESS()-c.n) > 1e-12 {
			t.Errorf("EquivalentSample(%g, %g): mean %g ESS %g", c.s, c.n, d.Mean(), d.ESS())
		}
	}
	bad := []struct {
		s, n  float64
		field string
		rule  Rule
	}{
		{0, 10, "successes", RulePositive},
		{-1, 10, "successes", RulePositive},
		{math.NaN(), 10, "successes", RuleFinite},
		{3, math.Inf(1), "trials", RuleFinite},
		{3, 0, "trials", RulePositive},
		{10, 10, "successes", RuleBelowTrials},
		{11, 10, "successes", RuleBelowTrials},
		{2e7, 2.5e7, "successes", RuleShapeTooLarge}, // α = 2e7
		{5e6, 2e7, "trials", RuleShapeTooLarge},      // β = 1.5e7
	}
	for _, c := range bad {
		_, err := EquivalentSample(c.s, c.n)
		checkRule(t, err, c.field, c.rule)
	}
	// The limits are α's and β's, not n's: 5e6 in 1.5e7 imagined trials
	// is Beta(5e6, 1e7) by the convention Beta(s, n − s), both shapes
	// within 1e7 (a Beta the mean and SD method makes from mean
	// 0.3333333333 and sd 0.00012171612). It was refused as above 1e7.
	d, err := EquivalentSample(5e6, 1.5e7)
	if err != nil || d != (Beta{Alpha: 5e6, Beta: 1e7}) {
		t.Errorf("EquivalentSample(5e6, 1.5e7) = %v, %v; want Beta(5e6, 1e7)", d, err)
	}
}

func TestFromMeanSD(t *testing.T) {
	// Method of moments inverts the closed-form mean α/(α+β) and variance
	// αβ/((α+β)²(α+β+1)) (Johnson, Kotz & Balakrishnan 1995, ch. 25).
	for _, want := range []Beta{{2, 5}, {0.3, 0.7}, {1.5, 2500}, {700, 300}, {0.05, 10000}} {
		d, err := FromMeanSD(want.Mean(), want.SD())
		if err != nil {
			t.Fatalf("%v: %v", want, err)
		}
		if math.Abs(d.Alpha/want.Alpha-1) > 1e-9 || math.Abs(d.Beta/want.Beta-1) > 1e-9 {
			t.Errorf("FromMeanSD(mean, sd of %v) = %v", want, d)
		}
	}
	bad := []struct {
		m, sd float64
		field string
		rule  Rule
	}{
		{math.NaN(), 0.1, "mean", RuleFinite},
		{0, 0.1, "mean", RuleProbOpen},
		{1, 0.1, "mean", RuleProbOpen},
		{1.2, 0.1, "mean", RuleProbOpen},
		{0.3, 0, "sd", RulePositive},
		{0.3, -0.1, "sd", RulePositive},
		{0.3, math.Inf(1), "sd", RuleFinite},
		{0.3, 1e-200, "sd", RuleShapeTooLarge},    // sd² underflows to 0: see TestFromMeanSDBeyondDouble
		{0.5, 0.5, "sd", RuleVarianceFeasible},    // variance = m(1−m) exactly
		{0.1, 0.31, "sd", RuleVarianceFeasible},   // 0.0961 > 0.09
		{0.9, 0.3001, "sd", RuleVarianceFeasible}, // just above the limit
	}
	for _, c := range bad {
		_, err := FromMeanSD(c.m, c.sd)
		checkRule(t, err, c.field, c.rule)
	}
}

// TestFromMeanSDBeyondDouble: an sd so small that sd² underflows to 0,
// or m(1 − m)/sd² overflows, asks for shapes beyond any double, α =
// m(m(1 − m)/sd² − 1) (the moment estimators, Johnson, Kotz &
// Balakrishnan 1995, ch. 25; worked by hand): 6.3e398 for m = 0.3 and
// sd = 1e-200, 1.25e319 for m = 0.5 and sd = 1e-160. They are refused as
// beyond the shape limit, with the shapes written in full; the first was
// refused as "must be greater than 0", a rule 1e-200 meets, and the
// second as "Beta(+Inf, +Inf)".
func TestFromMeanSDBeyondDouble(t *testing.T) {
	for _, c := range []struct {
		m, sd float64
		want  string
	}{
		{0.3, 1e-200, "Beta(6.30e398, 1.47e399)"},
		{0.5, 1e-160, "Beta(1.25e319, 1.25e319)"},
	} {
		_, err := FromMeanSD(c.m, c.sd)
		checkRule(t, err, "sd", RuleShapeTooLarge)
		if err == nil || !strings.Contains(err.Error(), c.want) || strings.Contains(err.Error(), "Inf") {
			t.Errorf("FromMeanSD(%v, %v): %v, want the shapes %s", c.m, c.sd, err, c.want)
		}
	}
	// A mean as small as sd² leaves α below the limit: Beta(1e-322, 10)
	// for m = 1e-323 and sd = 1e-162 (α + β = m/sd² = 10).
	_, err := FromMeanSD(1e-323, 1e-162)
	checkRule(t, err, "sd", RuleShapeTooSmall)
}

func TestFromIntervalMoments(t *testing.T) {
	// Normal approximation: mean = midpoint, sd = half-width / z with
	// z = Φ⁻¹(0.975) = 1.9599639845400536 for 95% (R 4.2.2:
	// print(qnorm(0.975), digits = 17); the standard normal table of
	// Abramowitz & Stegun 1964, Table 26.5, prints 1.959964).
	d, err := FromIntervalMoments(0.2, 0.4, 0.95)
	if err != nil {
		t.Fatal(err)
	}
	m, sd := 0.3, 0.1/1.9599639845400536
	k := m*(1-m)/(sd*sd) - 1
	if math.Abs(d.Alpha-m*k) > 1e-9 || math.Abs(d.Beta-(1-m)*k) > 1e-9 {
		t.Errorf("FromIntervalMoments(0.2, 0.4, 0.95) = %v, want Beta(%g, %g)", d, m*k, (1-m)*k)
	}
	// For a nearly normal Beta the central interval is recovered closely:
	// Beta(300, 700)'s 90% central interval gives back α, β within 2%.
	want := Beta{300, 700}
	got, err := FromIntervalMoments(want.Quantile(0.05), want.Quantile(0.95), 0.9)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(got.Alpha/want.Alpha-1) > 0.02 || math.Abs(got.Beta/want.Beta-1) > 0.02 {
		t.Errorf("FromInterval of Beta(300,700)'s 90%% interval = %v", got)
	}
	bad := []struct {
		lo, hi, c float64
		field     string
		rule      Rule
	}{
		{math.NaN(), 0.4, 0.9, "low", RuleFinite},
		{0.2, math.Inf(1), 0.9, "high", RuleFinite},
		{0.2, 0.4, math.NaN(), "coverage", RuleFinite},
		{0.2, 0.4, 0, "coverage", RuleProbOpen},
		{0.2, 0.4, 1, "coverage", RuleProbOpen},
		{0, 0.4, 0.9, "low", RuleValueInBounds},
		{0.2, 1, 0.9, "high", RuleValueInBounds},
		{0.4, 0.2, 0.9, "high", RuleValueIncreasing},
		{0.3, 0.3, 0.9, "high", RuleValueIncreasing},
		{0.01, 0.99, 0.5, "interval", RuleVarianceFeasible},
		{0.3, 0.3000000000001, 0.9, "interval", RuleShapeTooLarge},
	}
	for _, c := range bad {
		_, err := FromIntervalMoments(c.lo, c.hi, c.c)
		checkRule(t, err, c.field, c.rule)
	}
}

func TestFourValue(t *testing.T) {
	// Convention: lowest at (1−c)/2, best at 0.5, highest at (1+c)/2.
	j, err := FourValue(0.02, 0.2, 0.06, 0.8, 0, 1)
	if err != nil {
		t.Fatal(err)
	}
	wantP := []float64{0.1, 0.5, 0.9}
	wantV := []float64{0.02, 0.06, 0.2}
	for i := range wantP {
		if math.Abs(j.Probs[i]-wantP[i]) > 1e-15 || j.Values[i] != wantV[i] {
			t.Errorf("FourValue: pair %d = (%g, %g), want (%g, %g)", i, j.Probs[i], j.Values[i], wantP[i], wantV[i])
		}
	}
	if j.Lower != 0 || j.Upper != 1 {
		t.Errorf("bounds [%g, %g]", j.Lower, j.Upper)
	}
	// On a scaled quantity, fitted through FitQuantiles: the fit's stated
	// probabilities are the convention's.
	j, err = FourValue(120, 400, 200, 0.9, 0, 1000)
	if err != nil {
		t.Fatal(err)
	}
	f, err := FitQuantiles(j)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(f.Probs[0]-0.05) > 1e-15 || math.Abs(f.Probs[2]-0.95) > 1e-15 || f.Dist.Upper != 1000 {
		t.Errorf("fit of four values: %+v", f)
	}
	bad := []struct {
		lowest, highest, best, conf, lo, hi float64
		field                               string
		rule                                Rule
	}{
		{0.1, 0.3, 0.2, 0.8, 1, 0, "lower", RuleBoundsOrder},
		{math.NaN(), 0.3, 0.2, 0.8, 0, 1, "lowest", RuleFinite},
		{0.1, math.Inf(1), 0.2, 0.8, 0, 1, "highest", RuleFinite},
		{0.1, 0.3, math.NaN(), 0.8, 0, 1, "best", RuleFinite},
		{0, 0.3, 0.2, 0.8, 0, 1, "lowest", RuleValueInBounds},
		{0.1, 1.3, 0.2, 0.8, 0, 1, "highest", RuleValueInBounds},
		{0.1, 0.3, 1, 0.8, 0, 1, "best", RuleValueInBounds},
		{0.2, 0.3, 0.2, 0.8, 0, 1, "best", RuleValueIncreasing},
		{0.25, 0.3, 0.2, 0.8, 0, 1, "best", RuleValueIncreasing},
		{0.1, 0.2, 0.2, 0.8, 0, 1, "highest", RuleValueIncreasing},
		{0.1, 0.3, 0.2, math.NaN(), 0, 1, "confidence", RuleFinite},
		{0.1, 0.3, 0.2, 0, 0, 1, "confidence", RuleProbOpen},
		{0.1, 0.3, 0.2, 1, 0, 1, "confidence", RuleProbOpen},
		{0.1, 0.3, 0.2, 80, 0, 1, "confidence", RuleProbOpen},
		{0.1, 0.3, 0.2, 1e-17, 0, 1, "confidence", RuleCentralNarrow},
	}
	for _, c := range bad {
		_, err := FourValue(c.lowest, c.highest, c.best, c.conf, c.lo, c.hi)
		checkRule(t, err, c.field, c.rule)
	}
}

// TestFitChipsRecoversBeta: counts proportional to an exact Beta's bin
// probabilities (rounded to whole chips out of 10000) give back that
// Beta approximately; the bin probabilities come from the Beta's CDF,
// which TestBetaAgainstR checks against R.
func TestFitChipsRecoversBeta(t *testing.T) {
	cases := []struct {
		d     Beta
		lower float64
		upper float64
		bins  int
	}{
		{Beta{3, 7}, 0, 1, 10},
		{Beta{2, 2}, 0, 1, 5},
		{Beta{8, 3}, 20, 70, 12},
		{Beta{1.5, 30}, 0, 0.25, 10},
	}
	for _, c := range cases {
		s := ScaledBeta{Beta: c.d, Lower: c.lower, Upper: c.upper}
		edges := make([]float64, c.bins+1)
		for i := range edges {
			edges[i] = c.lower + (c.upper-c.lower)*float64(i)/float64(c.bins)
		}
		counts := make([]int, c.bins)
		for i := range counts {
			counts[i] = int(math.Round(10000 * (s.CDF(edges[i+1]) - s.CDF(edges[i]))))
		}
		f, err := FitChips(edges, counts)
		if err != nil {
			t.Fatalf("%v: %v", c, err)
		}
		if math.Abs(f.Dist.Alpha/c.d.Alpha-1) > 0.02 || math.Abs(f.Dist.Beta.Beta/c.d.Beta-1) > 0.02 {
			t.Errorf("chips from %v on [%g, %g]: fitted Beta(%g, %g)", c.d, c.lower, c.upper, f.Dist.Alpha, f.Dist.Beta.Beta)
		}
		if f.Dist.Lower != c.lower || f.Dist.Upper != c.upper {
			t.Errorf("bounds %v", f.Dist)
		}
		if len(f.Probs) != c.bins-1 || f.Stated[0] != edges[1] {
			t.Errorf("chips fit should report the interior edges: %+v", f)
		}
		checkFinite(t, "chips", f)
	}
}

// TestFitChipsUneven: a hand-made histogram with empty bins (cumulative
// fractions 0 and 1 at interior edges) still fits, and the objective is
// the sum of squared differences from the cumulative fractions.
func TestFitChipsUneven(t *testing.T) {
	edges := []float64{0, 0.05, 0.1, 0.2, 0.3, 0.5, 1}
	counts := []int{0, 4, 9, 5, 2, 0}
	f, err := FitChips(edges, counts)
	if err != nil {
		t.Fatal(err)
	}
	cum := []float64{0, 4.0 / 20, 13.0 / 20, 18.0 / 20, 1}
	sse := 0.0
	for i, p := range cum {
		if math.Abs(f.Probs[i]-p) > 1e-15 {
			t.Errorf("probs[%d] = %g, want %g", i, f.Probs[i], p)
		}
		e := f.Dist.CDF(edges[i+1]) - p
		sse += e * e
	}
	if math.Abs(f.SSE-sse) > 1e-12 {
		t.Errorf("sse %g, recomputed %g", f.SSE, sse)
	}
	checkFinite(t, "uneven chips", f)
	// No Beta does better from the exhaustive grid of starts.
	q := newLSQ([]float64{0.05, 0.1, 0.2, 0.3, 0.5}, cum)
	for _, th := range q.gridStarts(15) {
		if _, g := q.localFit(th); g < f.SSE-1e-9 {
			t.Errorf("grid start reaches %g < %g", g, f.SSE)
		}
	}
}

func TestFitChipsRules(t *testing.T) {
	edges := []float64{0, 0.2, 0.4, 0.6, 0.8, 1}
	cases := []struct {
		name   string
		edges  []float64
		counts []int
		field  string
		rule   Rule
	}{
		{"too few bins", []float64{0, 0.5, 1}, []int{3, 3}, "edges", RuleCount},
		{"too many bins", make([]float64, MaxBins+2), make([]int, MaxBins+1), "edges", RuleCount},
		{"edge NaN", []float64{0, math.NaN(), 0.4, 1}, []int{1, 1, 1}, "edges[1]", RuleFinite},
		{"edge order", []float64{0, 0.4, 0.4, 1}, []int{1, 1, 1}, "edges[2]", RuleValueIncreasing},
		// Issue 11: a subnormal inner edge was accepted.
		{"edge subnormal", []float64{0, 1e-320, 0.4, 1}, []int{1, 1, 1}, "edges[1]", RuleValueNearBound},
		{"edges too close", []float64{0, 0.4, 0.4000000001, 1}, []int{1, 1, 1}, "edges[2]", RuleValuesTooClose},
		{"edges overflow", []float64{-1e308, 0, 0.4, 1e308}, []int{1, 1, 1}, "edges[0]", RuleBoundsRange},
		{"count length", edges, []int{1, 2, 3}, "counts", RuleLengthMatch},
		{"negative", edges, []int{1, 2, -3, 1, 1}, "counts[2]", RuleNonNegative},
		{"huge", edges, []int{1, 2, 3, 2_000_000_000, 1}, "counts[3]", RuleCountRange},
		{"all zero", edges, []int{0, 0, 0, 0, 0}, "counts", RuleCountsNotAllZero},
		{"one bin", edges, []int{0, 0, 7, 0, 0}, "counts", RuleChipsSpread},
		{"two bins", edges, []int{0, 3, 7, 0, 0}, "counts", RuleChipsSpread},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := FitChips(c.edges, c.counts)
			checkRule(t, err, c.field, c.rule)
		})
	}
	var ie *InputError
	if _, err := FitChips(edges, []int{1, 2, 3, 2, 1}); errors.As(err, &ie) {
		t.Errorf("valid chips rejected: %v", err)
	}
}

// TestFitChipsAgainstSciPy: the chips fit against SciPy 1.10.1's global
// least-squares search over the whole shape box on the same cumulative
// shares (testdata/scipy/chips_fit_reference.py: a lattice of starts and
// scipy.optimize.least_squares; Boost's incomplete beta), for invented
// histograms, with empty bins inside and at the ends, uneven bins, scaled
// bounds, chips at both ends. Tolerance: the objective within 1e-9
// relative or 1e-15 (an exact fit), the shapes within 1e-5 relative
// (the objective is flat to second order at its minimum).
func TestFitChipsAgainstSciPy(t *testing.T) {
	rows := referenceTable(t, "../testdata/scipy/chips_fit_reference.csv", "# scipy 1.10.1", 6)
	if len(rows) < 8 {
		t.Fatalf("%d histograms in the reference table", len(rows))
	}
	for _, c := range rows {
		var edges []float64
		for _, s := range strings.Split(c[1], ";") {
			v, err := strconv.ParseFloat(s, 64)
			if err != nil {
				t.Fatal(err)
			}
			edges = append(edges, v)
		}
		var counts []int
		for _, s := range strings.Split(c[2], ";") {
			k, err := strconv.Atoi(s)
			if err != nil {
				t.Fatal(err)
			}
			counts = append(counts, k)
		}
		var want [3]float64
		for i := range want {
			v, err := strconv.ParseFloat(c[3+i], 64)
			if err != nil {
				t.Fatal(err)
			}
			want[i] = v
		}
		f, err := FitChips(edges, counts)
		if err != nil {
			t.Errorf("%s: %v", c[0], err)
			continue
		}
		if f.SSE > want[2]*(1+1e-9)+1e-15 || !(math.Abs(f.SSE-want[2]) <= 1e-9*want[2]+1e-15) {
			t.Errorf("%s: objective %.12g, SciPy's global minimum %.12g", c[0], f.SSE, want[2])
		}
		if !relClose(f.Dist.Alpha, want[0], 1e-5) || !relClose(f.Dist.Beta.Beta, want[1], 1e-5) {
			t.Errorf("%s: Beta(%.10g, %.10g), SciPy Beta(%.10g, %.10g)", c[0], f.Dist.Alpha, f.Dist.Beta.Beta, want[0], want[1])
		}
		if f.Dist.Lower != edges[0] || f.Dist.Upper != edges[len(edges)-1] {
			t.Errorf("%s: bounds [%v, %v]", c[0], f.Dist.Lower, f.Dist.Upper)
		}
	}
}

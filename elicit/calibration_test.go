package elicit

import (
	"encoding/csv"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"reflect"
	"slices"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

var seedProbs = []float64{0.05, 0.5, 0.95}

// pchisqRow is one row of testdata/r/pchisq_reference.csv, written by
// testdata/r/pchisq_reference.R with R's pchisq (R 4.2.2, header line).
type pchisqRow struct{ df, x, cdf, upper float64 }

func readPchisq(t *testing.T) []pchisqRow {
	t.Helper()
	f, err := os.Open("../testdata/r/pchisq_reference.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	r := csv.NewReader(f)
	r.Comment = '#'
	recs, err := r.ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	var rows []pchisqRow
	for _, rec := range recs[1:] {
		var v [4]float64
		for i := range v {
			if v[i], err = strconv.ParseFloat(rec[i], 64); err != nil {
				t.Fatal(err)
			}
		}
		rows = append(rows, pchisqRow{v[0], v[1], v[2], v[3]})
	}
	if len(rows) < 50 {
		t.Fatalf("only %d reference rows", len(rows))
	}
	return rows
}

// rUpper returns R's pchisq(x, df, lower.tail = FALSE) for a statistic x
// that the R script also computes.
func rUpper(t *testing.T, rows []pchisqRow, df, x float64) float64 {
	t.Helper()
	for _, r := range rows {
		if r.df == df && math.Abs(r.x-x) <= 1e-13*x {
			return r.upper
		}
	}
	t.Fatalf("no R reference for df %v, x %v", df, x)
	return 0
}

func calRelErr(got, want float64) float64 {
	if want == 0 {
		return math.Abs(got)
	}
	return math.Abs(got-want) / math.Abs(want)
}

// TestChiSquareAgainstR checks gonum's chi-square CDF and upper tail, which
// the calibration score is built on, against R's pchisq.
func TestChiSquareAgainstR(t *testing.T) {
	for _, r := range readPchisq(t) {
		d := distuv.ChiSquared{K: r.df}
		// Tolerance: relative 1e-12 on the tail we use, 1e-13 absolute on
		// the CDF (common practice, no source).
		if e := calRelErr(d.Survival(r.x), r.upper); e > 1e-12 && math.Abs(d.Survival(r.x)-r.upper) > 1e-300 {
			t.Errorf("df %v x %v: upper tail %v, R %v (rel %g)", r.df, r.x, d.Survival(r.x), r.upper, e)
		}
		if math.Abs(d.CDF(r.x)-r.cdf) > 1e-13 {
			t.Errorf("df %v x %v: CDF %v, R %v", r.df, r.x, d.CDF(r.x), r.cdf)
		}
	}
}

// handSeeds is the hand-worked case: two experts give the same quantiles
// on four questions, A = (2, 5, 8) and B = (4, 5, 6) at 5/50/95, with
// realisations 3, 4.5, 5.5 and 5.8 (invented numbers).
func handSeeds() ([]SeedAssessment, map[string]float64) {
	real := map[string]float64{"q1": 3, "q2": 4.5, "q3": 5.5, "q4": 5.8}
	var as []SeedAssessment
	for _, q := range []string{"q1", "q2", "q3", "q4"} {
		as = append(as,
			SeedAssessment{Expert: "A", Question: q, Probs: seedProbs, Quantiles: []float64{2, 5, 8}},
			SeedAssessment{Expert: "B", Question: q, Probs: seedProbs, Quantiles: []float64{4, 5, 6}})
	}
	return as, real
}

// TestClassicalModelByHand works the classical model by hand.
//
// Bins (≤q05, (q05,q50], (q50,q95], >q95) have p = (0.05, 0.45, 0.45, 0.05).
// Realisations 3, 4.5, 5.5, 5.8:
//
//	A (2,5,8): bins 1, 1, 2, 2 → s = (0, 0.5, 0.5, 0)
//	  I(s,p) = 0.5 ln(0.5/0.45) + 0.5 ln(0.5/0.45) = ln(1/0.9) = 0.1053605
//	  2·N·I = 8 ln(1/0.9) = 0.8428841;  C_A = 1 − F_χ²(0.8428841; 3)
//	B (4,5,6): bins 0, 1, 2, 2 → s = (0.25, 0.25, 0.5, 0)
//	  I = 0.25 ln 5 + 0.25 ln(0.25/0.45) + 0.5 ln(0.5/0.45)
//	    = 0.4023595 − 0.1469467 + 0.0526803 = 0.3080931
//	  2·N·I = 2.4647446;  C_B = 1 − F_χ²(2.4647446; 3)
//
// F_χ² is taken from R's pchisq (testdata/r/pchisq_reference.csv).
//
// Intrinsic range, the same on every question: L = min(2, 4, x) = 2,
// U = max(8, 6, x) = 8, widened by 0.1·6 = 0.6 → [1.4, 8.6], width 7.2.
//
//	I_A = 0.05 ln(0.05·7.2/0.6)·2 + 0.45 ln(0.45·7.2/3)·2
//	    = 0.1 ln 0.6 + 0.9 ln 1.08 = −0.05108256 + 0.06926494 = 0.01818237
//	I_B = 0.1 ln(0.05·7.2/2.6) + 0.9 ln(0.45·7.2/1)
//	    = 0.1 ln(9/65) + 0.9 ln 3.24 = −0.19771627 + 1.05801600 = 0.86029973
//
// With α = 0 the weights are C·I / (C_A·I_A + C_B·I_B).
func TestClassicalModelByHand(t *testing.T) {
	ref := readPchisq(t)
	cA := rUpper(t, ref, 3, 8*math.Log(1/0.9))
	cB := rUpper(t, ref, 3, 8*(0.25*math.Log(0.25/0.05)+0.25*math.Log(0.25/0.45)+0.5*math.Log(0.5/0.45)))
	const iA, iB = 0.01818237, 0.86029973 // by hand, 8 decimals

	as, real := handSeeds()
	zero := 0.0
	s, err := ClassicalModel(as, real, nil, ModelOptions{Alpha: &zero})
	if err != nil {
		t.Fatal(err)
	}
	a, b := s.Experts[0], s.Experts[1]
	if a.Expert != "A" || b.Expert != "B" || a.N != 4 || b.N != 4 {
		t.Fatalf("experts %+v", s.Experts)
	}
	for _, c := range []struct {
		name      string
		got, want float64
		tol       float64
	}{
		{"C_A", a.Calibration, cA, 1e-12},
		{"C_B", b.Calibration, cB, 1e-12},
		{"I_A", a.Information, iA, 1e-6},
		{"I_B", b.Information, iB, 1e-7},
		{"w_A", a.Weight, cA * iA / (cA*iA + cB*iB), 1e-6},
		{"w_B", b.Weight, cB * iB / (cA*iA + cB*iB), 1e-6},
	} {
		if calRelErr(c.got, c.want) > c.tol {
			t.Errorf("%s = %.10g, want %.10g", c.name, c.got, c.want)
		}
	}
	for _, q := range s.Questions {
		if math.Abs(q.Lower-1.4) > 1e-12 || math.Abs(q.Upper-8.6) > 1e-12 {
			t.Errorf("%s: intrinsic range [%v, %v], want [1.4, 8.6]", q.Question, q.Lower, q.Upper)
		}
	}

	// The same scores through the exported one-question functions.
	if got, _ := CalibrationScore([]int{1, 1, 2, 0}, seedProbs); calRelErr(got, cB) > 1e-12 {
		t.Errorf("CalibrationScore = %v, want %v", got, cB)
	}
	if got, _ := InformationScore([]float64{2, 5, 8}, seedProbs, 1.4, 8.6); math.Abs(got-iA) > 1e-8 {
		t.Errorf("InformationScore = %v, want %v", got, iA)
	}
	// Widths 2, 3, 3, 2 on [0, 10]: I = 0.1 ln(0.05/0.2) + 0.9 ln(0.45/0.3)
	// = −0.1386294 + 0.3649186 = 0.2262892 (by hand).
	if got, _ := InformationScore([]float64{2, 5, 8}, seedProbs, 0, 10); math.Abs(got-0.2262892) > 1e-7 {
		t.Errorf("InformationScore on [0, 10] = %v, want 0.2262892", got)
	}
}

// seedsWithBins gives expert "E" quantiles (10, 20, 30) at probs and, per
// question, a realisation in the given bin, plus a wide expert "W" that
// fixes the intrinsic range.
func seedsWithBins(probs []float64, bins []int) ([]SeedAssessment, map[string]float64) {
	q := make([]float64, len(probs))
	for i := range q {
		q[i] = 10 * float64(i+1)
	}
	real := map[string]float64{}
	var as []SeedAssessment
	for i, b := range bins {
		name := fmt.Sprintf("s%02d", i)
		real[name] = 5 + 10*float64(b) // in bin b of E's quantiles
		w := make([]float64, len(probs))
		for j := range w {
			w[j] = -100 + 200*float64(j)/float64(len(w)-1)
		}
		as = append(as,
			SeedAssessment{Expert: "E", Question: name, Probs: probs, Quantiles: q},
			SeedAssessment{Expert: "W", Question: name, Probs: probs, Quantiles: w})
	}
	return as, real
}

func expertScore(t *testing.T, s Scores, name string) ExpertScore {
	t.Helper()
	for _, e := range s.Experts {
		if e.Expert == name {
			return e
		}
	}
	t.Fatalf("no expert %q", name)
	return ExpertScore{}
}

func TestCalibrationProperties(t *testing.T) {
	zero := 0.0
	for _, c := range []struct {
		name  string
		probs []float64
		bins  []int
		check func(c float64) bool
		want  string
	}{
		// s = p exactly: I(s, p) = 0, so C = 1 − F(0) = 1.
		{"quartiles, two per bin", []float64{0.25, 0.5, 0.75}, []int{0, 0, 1, 1, 2, 2, 3, 3}, func(c float64) bool { return c == 1 }, "= 1"},
		{"5/50/95, 1+9+9+1 of 20", seedProbs, append(append(append([]int{0}, repeatBin(1, 9)...), repeatBin(2, 9)...), 3), func(c float64) bool { return c == 1 }, "= 1"},
		{"tertiles, one per bin", []float64{1.0 / 3, 2.0 / 3}, []int{0, 1, 2}, func(c float64) bool { return math.Abs(c-1) < 1e-12 }, "≈ 1"},
		// Every realisation outside the outer quantiles on 10 questions.
		{"all above q95", seedProbs, repeatBin(3, 10), func(c float64) bool { return c < 1e-3 }, "< 1e-3"},
		{"all below q05", seedProbs, repeatBin(0, 10), func(c float64) bool { return c < 1e-3 }, "< 1e-3"},
		{"half below, half above", seedProbs, append(repeatBin(0, 5), repeatBin(3, 5)...), func(c float64) bool { return c < 1e-3 }, "< 1e-3"},
		{"all beyond q10/q90", []float64{0.1, 0.5, 0.9}, append(repeatBin(0, 3), repeatBin(3, 7)...), func(c float64) bool { return c < 1e-3 }, "< 1e-3"},
	} {
		as, real := seedsWithBins(c.probs, c.bins)
		s, err := ClassicalModel(as, real, nil, ModelOptions{Alpha: &zero})
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		if got := expertScore(t, s, "E").Calibration; !c.check(got) {
			t.Errorf("%s: calibration %v, want %s", c.name, got, c.want)
		}
	}
}

func repeatBin(v, n int) []int {
	out := make([]int, n)
	for i := range out {
		out[i] = v
	}
	return out
}

// TestInformationNarrower: the narrower an expert's quantiles about the
// same median, on a range fixed by a wide expert, the larger the score.
func TestInformationNarrower(t *testing.T) {
	prev := -1.0
	for _, half := range []float64{40, 20, 10, 5, 1, 0.1} {
		as := []SeedAssessment{
			{Expert: "N", Question: "q", Probs: seedProbs, Quantiles: []float64{50 - half, 50, 50 + half}},
			{Expert: "W", Question: "q", Probs: seedProbs, Quantiles: []float64{0, 50, 100}},
		}
		s, err := ClassicalModel(as, map[string]float64{"q": 50}, nil, ModelOptions{})
		if err != nil {
			t.Fatal(err)
		}
		got := expertScore(t, s, "N").Information
		if !(got > prev) {
			t.Errorf("half-width %v: information %v not above %v", half, got, prev)
		}
		prev = got
	}
}

// randomSeeds is an invented panel: expert e has a bias and a spread, and
// its quantiles at probs are those of a normal around the truth.
func randomSeeds(rng *rand.Rand, experts, questions int, probs []float64) ([]SeedAssessment, map[string]float64) {
	real := map[string]float64{}
	var as []SeedAssessment
	bias := make([]float64, experts)
	spread := make([]float64, experts)
	for e := range bias {
		bias[e] = rng.NormFloat64() * 0.7
		spread[e] = 0.3 + 2*rng.Float64()
	}
	for q := 0; q < questions; q++ {
		name := fmt.Sprintf("seed%02d", q)
		x := 10 * rng.Float64()
		real[name] = x
		for e := 0; e < experts; e++ {
			c := x + bias[e] + 0.5*rng.NormFloat64()
			qs := make([]float64, len(probs))
			for i, p := range probs {
				qs[i] = c + spread[e]*distuv.UnitNormal.Quantile(p)
			}
			as = append(as, SeedAssessment{Expert: fmt.Sprintf("expert%02d", e), Question: name, Probs: probs, Quantiles: qs})
		}
	}
	return as, real
}

func TestClassicalModelOrderInvariant(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	as, real := randomSeeds(rng, 6, 8, seedProbs)
	want, err := ClassicalModel(as, real, nil, ModelOptions{})
	if err != nil {
		t.Fatal(err)
	}
	for i := 0; i < 5; i++ {
		shuffled := append([]SeedAssessment(nil), as...)
		rng.Shuffle(len(shuffled), func(i, j int) { shuffled[i], shuffled[j] = shuffled[j], shuffled[i] })
		got, err := ClassicalModel(shuffled, real, nil, ModelOptions{})
		if err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(got, want) {
			t.Fatalf("shuffle %d changed the result:\n%+v\n%+v", i, got.Experts, want.Experts)
		}
	}
}

// TestAlphaOptimisation checks the chosen α against a brute-force search
// over a fine grid of fixed cut-offs.
func TestAlphaOptimisation(t *testing.T) {
	for seed := uint64(1); seed <= 4; seed++ {
		rng := rand.New(rand.NewPCG(seed, 7))
		as, real := randomSeeds(rng, 5, 8, seedProbs)
		opt, err := ClassicalModel(as, real, nil, ModelOptions{})
		if err != nil {
			t.Fatal(err)
		}
		maxCal := 0.0
		for _, e := range opt.Experts {
			maxCal = math.Max(maxCal, e.Calibration)
		}
		best, bestAlpha := math.Inf(-1), -1.0
		const steps = 1000
		for i := 0; i <= steps; i++ {
			a := maxCal * float64(i) / steps
			s, err := ClassicalModel(as, real, nil, ModelOptions{Alpha: &a})
			if err != nil {
				t.Fatalf("α = %v: %v", a, err)
			}
			if s.Pooled.Combined > best {
				best, bestAlpha = s.Pooled.Combined, a
			}
		}
		if opt.Pooled.Combined < best*(1-1e-12) {
			t.Errorf("seed %d: optimised α %v gives DM %v, grid α %v gives %v", seed, opt.Alpha, opt.Pooled.Combined, bestAlpha, best)
		}
		// The grid can only miss the optimum when two calibration scores
		// are closer than its step; require it to find the same value.
		if math.Abs(opt.Pooled.Combined-best) > 1e-12*best && minGap(opt.Experts) > maxCal/steps {
			t.Errorf("seed %d: optimum %v not found by grid (%v at α %v)", seed, opt.Pooled.Combined, best, bestAlpha)
		}
		// The chosen α is a calibration score and the weights are cut there.
		found := false
		for _, e := range opt.Experts {
			found = found || e.Calibration == opt.Alpha
			if (e.Weight > 0) != (e.Calibration >= opt.Alpha && e.Combined > 0) {
				t.Errorf("seed %d: expert %s C %v, weight %v at α %v", seed, e.Expert, e.Calibration, e.Weight, opt.Alpha)
			}
		}
		if !found {
			t.Errorf("seed %d: α %v is no expert's calibration score", seed, opt.Alpha)
		}
	}
}

func minGap(es []ExpertScore) float64 {
	g := math.Inf(1)
	for i := range es {
		for j := range es {
			if i != j && es[i].Calibration != es[j].Calibration {
				g = math.Min(g, math.Abs(es[i].Calibration-es[j].Calibration))
			}
		}
	}
	return g
}

func TestFixedAlpha(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	as, real := randomSeeds(rng, 5, 10, seedProbs)
	zero := 0.0
	s, err := ClassicalModel(as, real, nil, ModelOptions{Alpha: &zero})
	if err != nil {
		t.Fatal(err)
	}
	// α = 0: w ∝ C·I for every expert.
	sum := 0.0
	for _, e := range s.Experts {
		sum += e.Calibration * e.Information
	}
	total := 0.0
	for _, e := range s.Experts {
		if calRelErr(e.Weight, e.Calibration*e.Information/sum) > 1e-12 {
			t.Errorf("α = 0: %s weight %v, want %v", e.Expert, e.Weight, e.Calibration*e.Information/sum)
		}
		total += e.Weight
	}
	if math.Abs(total-1) > 1e-12 || s.Alpha != 0 {
		t.Errorf("α = 0: weights sum to %v, alpha %v", total, s.Alpha)
	}

	// α at the median calibration score: experts below get nothing.
	cals := make([]float64, len(s.Experts))
	for i, e := range s.Experts {
		cals[i] = e.Calibration
	}
	mid := calMedian(cals)
	s2, err := ClassicalModel(as, real, nil, ModelOptions{Alpha: &mid})
	if err != nil {
		t.Fatal(err)
	}
	total = 0
	for _, e := range s2.Experts {
		if (e.Calibration < mid) != (e.Weight == 0) {
			t.Errorf("α = %v: %s C %v weight %v", mid, e.Expert, e.Calibration, e.Weight)
		}
		total += e.Weight
	}
	if math.Abs(total-1) > 1e-12 || s2.Alpha != mid {
		t.Errorf("α = %v: weights sum to %v, alpha %v", mid, total, s2.Alpha)
	}

	// α above every calibration score is refused.
	high := 1.0
	if _, err := ClassicalModel(as, real, nil, ModelOptions{Alpha: &high}); !calHasRule(err, RuleAlphaTooHigh) {
		t.Errorf("α = 1: got %v, want %q", err, RuleAlphaTooHigh)
	}
}

func calMedian(v []float64) float64 {
	c := append([]float64(nil), v...)
	for i := range c {
		for j := i + 1; j < len(c); j++ {
			if c[j] < c[i] {
				c[i], c[j] = c[j], c[i]
			}
		}
	}
	return c[len(c)/2]
}

func calHasRule(err error, r Rule) bool {
	var ie *InputError
	return errors.As(err, &ie) && ie.Rule == r
}

// TestDecisionMakerSingleExpert: with one expert the DM is that expert.
func TestDecisionMakerSingleExpert(t *testing.T) {
	as, real := handSeeds()
	var onlyA []SeedAssessment
	for _, a := range as {
		if a.Expert == "A" {
			onlyA = append(onlyA, a)
		}
	}
	s, err := ClassicalModel(onlyA, real, nil, ModelOptions{})
	if err != nil {
		t.Fatal(err)
	}
	e := s.Experts[0]
	if e.Weight != 1 || math.Abs(s.Pooled.Calibration-e.Calibration) > 1e-12 || math.Abs(s.Pooled.Information-e.Information) > 1e-12 {
		t.Errorf("DM %+v, expert %+v", s.Pooled, e)
	}
	for _, q := range s.Questions {
		for i, v := range q.Pooled {
			if math.Abs(v-[]float64{2, 5, 8}[i]) > 1e-12 {
				t.Errorf("%s: DM quantiles %v, want [2 5 8]", q.Question, q.Pooled)
			}
		}
	}
}

// TestDecisionMakerQuantiles checks the pooled quantiles of the hand case
// with α = 0 against a bisection of Σ wᵢ Fᵢ(x) = p on the experts'
// piecewise-linear CDFs, written out here independently.
func TestDecisionMakerQuantiles(t *testing.T) {
	as, real := handSeeds()
	zero := 0.0
	s, err := ClassicalModel(as, real, nil, ModelOptions{Alpha: &zero})
	if err != nil {
		t.Fatal(err)
	}
	wA, wB := s.Experts[0].Weight, s.Experts[1].Weight
	lin := func(xs, fs []float64, x float64) float64 {
		for k := 1; k < len(xs); k++ {
			if x <= xs[k] {
				return fs[k-1] + (x-xs[k-1])/(xs[k]-xs[k-1])*(fs[k]-fs[k-1])
			}
		}
		return 1
	}
	f := []float64{0, 0.05, 0.5, 0.95, 1}
	cdf := func(x float64) float64 {
		return wA*lin([]float64{1.4, 2, 5, 8, 8.6}, f, x) + wB*lin([]float64{1.4, 4, 5, 6, 8.6}, f, x)
	}
	for i, p := range seedProbs {
		lo, hi := 1.4, 8.6
		for it := 0; it < 200; it++ {
			m := (lo + hi) / 2
			if cdf(m) < p {
				lo = m
			} else {
				hi = m
			}
		}
		if got := s.Questions[0].Pooled[i]; math.Abs(got-lo) > 1e-9 {
			t.Errorf("DM quantile at %v: %v, bisection %v", p, got, lo)
		}
	}
}

func TestClassicalModelBadInput(t *testing.T) {
	good := func() ([]SeedAssessment, map[string]float64, map[string][2]float64) {
		as, real := handSeeds()
		return as, real, nil
	}
	nan, neg, big := math.NaN(), -0.1, 1.5
	for _, c := range []struct {
		name  string
		edit  func(as []SeedAssessment, real map[string]float64, b *map[string][2]float64, o *ModelOptions) []SeedAssessment
		field string
		rule  Rule
	}{
		{"empty", func(as []SeedAssessment, _ map[string]float64, _ *map[string][2]float64, _ *ModelOptions) []SeedAssessment {
			return nil
		}, "assessments", RuleCount},
		{"too few quantiles", func(as []SeedAssessment, _ map[string]float64, _ *map[string][2]float64, _ *ModelOptions) []SeedAssessment {
			as[3].Quantiles = as[3].Quantiles[:2]
			return as
		}, "assessments[3].quantiles", RuleLengthMatch},
		{"non-increasing quantiles", func(as []SeedAssessment, _ map[string]float64, _ *map[string][2]float64, _ *ModelOptions) []SeedAssessment {
			as[2].Quantiles = []float64{2, 5, 5}
			return as
		}, "assessments[2].quantiles[2]", RuleValueIncreasing},
		{"NaN quantile", func(as []SeedAssessment, _ map[string]float64, _ *map[string][2]float64, _ *ModelOptions) []SeedAssessment {
			as[1].Quantiles = []float64{2, nan, 8}
			return as
		}, "assessments[1].quantiles[1]", RuleFinite},
		{"bad probs", func(as []SeedAssessment, _ map[string]float64, _ *map[string][2]float64, _ *ModelOptions) []SeedAssessment {
			for i := range as {
				as[i].Probs = []float64{0.5, 0.05, 0.95}
			}
			return as
		}, "assessments[0].probs[1]", RuleProbIncreasing},
		{"mixed probs", func(as []SeedAssessment, _ map[string]float64, _ *map[string][2]float64, _ *ModelOptions) []SeedAssessment {
			as[5].Probs = []float64{0.1, 0.5, 0.9}
			return as
		}, "assessments[5].probs", RuleSameProbs},
		{"missing realisation", func(as []SeedAssessment, real map[string]float64, _ *map[string][2]float64, _ *ModelOptions) []SeedAssessment {
			delete(real, "q3")
			return as
		}, `realisations["q3"]`, RuleRequired},
		{"Inf realisation", func(as []SeedAssessment, real map[string]float64, _ *map[string][2]float64, _ *ModelOptions) []SeedAssessment {
			real["q2"] = math.Inf(1)
			return as
		}, `realisations["q2"]`, RuleFinite},
		{"duplicate", func(as []SeedAssessment, _ map[string]float64, _ *map[string][2]float64, _ *ModelOptions) []SeedAssessment {
			return append(as, as[4])
		}, "assessments[8]", RuleDuplicate},
		{"no expert name", func(as []SeedAssessment, _ map[string]float64, _ *map[string][2]float64, _ *ModelOptions) []SeedAssessment {
			as[0].Expert = ""
			return as
		}, "assessments[0].expert", RuleRequired},
		{"quantile on bound", func(as []SeedAssessment, _ map[string]float64, b *map[string][2]float64, _ *ModelOptions) []SeedAssessment {
			*b = map[string][2]float64{"q1": {2, 10}}
			return as
		}, "assessments[0].quantiles[0]", RuleValueInBounds},
		{"realisation out of bounds", func(as []SeedAssessment, _ map[string]float64, b *map[string][2]float64, _ *ModelOptions) []SeedAssessment {
			*b = map[string][2]float64{"q1": {0, 2.5}}
			return as
		}, `realisations["q1"]`, RuleInRange},
		{"bounds reversed", func(as []SeedAssessment, _ map[string]float64, b *map[string][2]float64, _ *ModelOptions) []SeedAssessment {
			*b = map[string][2]float64{"q1": {10, 0}}
			return as
		}, `bounds["q1"]`, RuleBoundsOrder},
		{"NaN alpha", func(as []SeedAssessment, _ map[string]float64, _ *map[string][2]float64, o *ModelOptions) []SeedAssessment {
			o.Alpha = &nan
			return as
		}, "alpha", RuleFinite},
		{"alpha above 1", func(as []SeedAssessment, _ map[string]float64, _ *map[string][2]float64, o *ModelOptions) []SeedAssessment {
			o.Alpha = &big
			return as
		}, "alpha", RuleUnitInterval},
		{"negative overshoot", func(as []SeedAssessment, _ map[string]float64, _ *map[string][2]float64, o *ModelOptions) []SeedAssessment {
			o.Overshoot = neg
			return as
		}, "overshoot", RuleNonNegative},
		// Review 3: quantiles a few ulps apart scored +Inf and NaN.
		{"quantiles adjacent floats", func(as []SeedAssessment, _ map[string]float64, _ *map[string][2]float64, _ *ModelOptions) []SeedAssessment {
			as[2].Quantiles = []float64{5, 5.000000000000001, 5.000000000000002}
			return as
		}, "assessments[2].quantiles[1]", RuleQuantilesTooClose},
		{"overshoot too small to widen", func(as []SeedAssessment, _ map[string]float64, _ *map[string][2]float64, o *ModelOptions) []SeedAssessment {
			o.Overshoot = 1e-300
			return as
		}, `questions["q1"]`, RuleRangeCollapsed},
	} {
		as, real, b := good()
		var o ModelOptions
		as = c.edit(as, real, &b, &o)
		s, err := ClassicalModel(as, real, b, o)
		var ie *InputError
		if !errors.As(err, &ie) || ie.Rule != c.rule || ie.Field != c.field {
			t.Errorf("%s: got %v (%+v), want field %s rule %q", c.name, err, s.Experts, c.field, c.rule)
			continue
		}
		if strings.Contains(err.Error(), "NaN") && c.rule != RuleFinite {
			t.Errorf("%s: message mentions NaN: %v", c.name, err)
		}
	}
}

func TestCalibrationScoreBadInput(t *testing.T) {
	for _, c := range []struct {
		name   string
		counts []int
		probs  []float64
		rule   Rule
	}{
		{"wrong bins", []int{1, 2, 3}, seedProbs, RuleCount},
		{"no realisations", []int{0, 0, 0, 0}, seedProbs, RuleCount},
		{"negative", []int{1, -1, 0, 0}, seedProbs, RuleNonNegative},
		{"bad probs", []int{1, 1, 1, 1}, []float64{0.5, 0.5, 0.9}, RuleProbIncreasing},
		{"no probs", []int{1}, nil, RuleCount},
	} {
		if _, err := CalibrationScore(c.counts, c.probs); !calHasRule(err, c.rule) {
			t.Errorf("%s: got %v, want %q", c.name, err, c.rule)
		}
	}
	if _, err := InformationScore([]float64{2, 5, 8}, seedProbs, 2, 10); !calHasRule(err, RuleValueInBounds) {
		t.Errorf("quantile on range end: got %v", err)
	}
}

// TestPartialAnswers: N counts only the questions an expert answered, and
// the DM skips a question that no expert with weight answered.
func TestPartialAnswers(t *testing.T) {
	as, real := handSeeds()
	// Z answers only q5, and misses it by far.
	real["q5"] = 100
	as = append(as,
		SeedAssessment{Expert: "Z", Question: "q5", Probs: seedProbs, Quantiles: []float64{1, 2, 3}})
	zero := 0.0
	s0, err := ClassicalModel(as, real, nil, ModelOptions{Alpha: &zero})
	if err != nil {
		t.Fatal(err)
	}
	z := expertScore(t, s0, "Z")
	// One realisation above q95: s = (0, 0, 0, 1), I = ln(1/0.05),
	// C = 1 − F_χ²(2 ln 20; 3), by the formula.
	want := distuv.ChiSquared{K: 3}.Survival(2 * math.Log(20))
	if z.N != 1 || calRelErr(z.Calibration, want) > 1e-12 || expertScore(t, s0, "A").N != 4 {
		t.Errorf("Z: %+v, want N 1, calibration %v", z, want)
	}
	if s0.Pooled.N != 5 || s0.Questions[4].Question != "q5" || len(s0.Questions[4].Pooled) != 3 {
		t.Errorf("α = 0: DM on %d questions, q5 %+v", s0.Pooled.N, s0.Questions[4])
	}
	// A cut-off above Z's calibration leaves q5 without a weighted expert.
	cut := z.Calibration * 2
	s1, err := ClassicalModel(as, real, nil, ModelOptions{Alpha: &cut})
	if err != nil {
		t.Fatal(err)
	}
	if s1.Pooled.N != 4 || s1.Questions[4].Pooled != nil || expertScore(t, s1, "Z").Weight != 0 {
		t.Errorf("α = %v: DM on %d questions, q5 %+v", cut, s1.Pooled.N, s1.Questions[4])
	}
}

// TestScoreBelowTheDoubleRange: a calibration score below the smallest
// double is still a score. Here one expert has every one of 400
// realisations above the 95% value: 2·N·I = 800 ln 20 ≈ 2397 and
// C = e^−1194.6 (R 4.2.2: pchisq(800 * log(20), 3, lower.tail = FALSE,
// log.p = TRUE) = −1194.6273835608188). It was refused as "every
// calibration score is 0".
func TestScoreBelowTheDoubleRange(t *testing.T) {
	as, real := seedsWithBins(seedProbs, repeatBin(3, 400))
	var onlyE []SeedAssessment
	for _, a := range as {
		if a.Expert == "E" {
			onlyE = append(onlyE, a)
		}
	}
	s, err := ClassicalModel(onlyE, real, nil, ModelOptions{})
	if err != nil {
		t.Fatal(err)
	}
	e := expertScore(t, s, "E")
	const want = -1194.6273835608188
	if e.Calibration != 0 || math.Abs(e.LogCalibration-want) > 1e-12*-want || e.Weight != 1 {
		t.Errorf("E: %+v, want calibration 0, ln %v, weight 1", e, want)
	}
	if s.Alpha != 0 || s.LogAlpha == nil || *s.LogAlpha != e.LogCalibration {
		t.Errorf("α %v, ln α %v: want 0 and E's ln C", s.Alpha, s.LogAlpha)
	}
}

// TestManyCalibrationQuestions: with 300 calibration questions two poorly
// calibrated experts both score below the smallest double, and the better
// calibrated one keeps the larger weight, in the ratio
// w_A/w_B = e^(ln C_A − ln C_B)·I_A/I_B. Every realisation is 0, asked at
// 1/50/99 %; A has 150 realisations below its 1% value and 150 above its
// 99% value, B 200 and 100. ln C from R 4.2.2's pchisq(…, log.p = TRUE)
// (testdata/r/pchisq_log_tail_reference.R, its two "cases"). Before, both
// scores were 0 and the model refused the panel.
func TestManyCalibrationQuestions(t *testing.T) {
	as, real := manySeeds()
	for _, alpha := range []*float64{nil, new(float64)} {
		s, err := ClassicalModel(as, real, nil, ModelOptions{Alpha: alpha})
		if err != nil {
			t.Fatal(err)
		}
		a, b := expertScore(t, s, "A"), expertScore(t, s, "B")
		for _, c := range []struct {
			e    ExpertScore
			want float64
		}{{a, -1169.9517750719319}, {b, -1186.9344983883962}} {
			if c.e.Calibration != 0 || math.Abs(c.e.LogCalibration-c.want) > 1e-12*-c.want {
				t.Errorf("%s: calibration %v, ln %v, want 0 and ln %v (R)", c.e.Expert, c.e.Calibration, c.e.LogCalibration, c.want)
			}
		}
		if alpha != nil {
			// Both experts weighted: the ratio follows the scores.
			ratio := math.Exp(-1169.9517750719319+1186.9344983883962) * a.Information / b.Information
			if !(a.Weight > b.Weight) || calRelErr(a.Weight/b.Weight, ratio) > 1e-9 || math.Abs(a.Weight+b.Weight-1) > 1e-15 {
				t.Errorf("α = 0: weights A %v, B %v, want ratio %v", a.Weight, b.Weight, ratio)
			}
			continue
		}
		if !(a.Weight > b.Weight) || math.IsNaN(a.Weight+b.Weight) || math.Abs(a.Weight+b.Weight-1) > 1e-15 {
			t.Errorf("optimised α: weights A %v, B %v", a.Weight, b.Weight)
		}
	}
}

// TestQuantileGap: consecutive quantiles of a question without bounds
// must be at least MinValueGap of the larger one's size apart. At 1e6 a
// gap of 1 is just short of 1e-6 × (1e6 + 1), a gap of 2 is enough. With
// bounds, the judgement's own rule has applied; close quantiles far from
// 0 on a narrow range are scored.
func TestQuantileGap(t *testing.T) {
	for _, c := range []struct {
		q    []float64
		want Rule // "" for accepted
	}{
		{[]float64{1e6, 1e6 + 1, 1e6 + 3}, RuleQuantilesTooClose},
		{[]float64{1e6, 1e6 + 2, 1e6 + 4}, ""},
		{[]float64{-1, 0, 1}, ""},
		{[]float64{0, 1e-300, 2e-300}, ""},
		{[]float64{-5.000000000000002, -5.000000000000001, 0}, RuleQuantilesTooClose},
	} {
		as := []SeedAssessment{{Expert: "A", Question: "q", Probs: seedProbs, Quantiles: c.q}}
		_, err := ClassicalModel(as, map[string]float64{"q": c.q[1]}, nil, ModelOptions{})
		switch {
		case c.want == "" && err != nil:
			t.Errorf("%v: %v, want accepted", c.q, err)
		case c.want != "" && !calHasRule(err, c.want):
			t.Errorf("%v: %v, want %q", c.q, err, c.want)
		}
	}
	narrow := []SeedAssessment{
		{Expert: "A", Question: "q", Probs: seedProbs, Quantiles: []float64{1e6 + 2, 1e6 + 2.5, 1e6 + 3}},
		{Expert: "B", Question: "q", Probs: seedProbs, Quantiles: []float64{1e6 + 1, 1e6 + 4, 1e6 + 8}},
	}
	if _, err := ClassicalModel(narrow, map[string]float64{"q": 1e6 + 3.5}, map[string][2]float64{"q": {1e6, 1e6 + 10}}, ModelOptions{}); err != nil {
		t.Errorf("bounded [1e6, 1e6 + 10]: %v", err)
	}
}

// TestRangeCollapsed: one quantile equal to the realisation spans no
// range, and no overshoot widens it; the question is refused, not scored
// as log(0).
func TestRangeCollapsed(t *testing.T) {
	as := []SeedAssessment{
		{Expert: "A", Question: "q", Probs: []float64{0.5}, Quantiles: []float64{5}},
		{Expert: "B", Question: "q", Probs: []float64{0.5}, Quantiles: []float64{5}},
	}
	_, err := ClassicalModel(as, map[string]float64{"q": 5}, nil, ModelOptions{})
	var ie *InputError
	if !errors.As(err, &ie) || ie.Rule != RuleRangeCollapsed || ie.Field != `questions["q"]` {
		t.Fatalf("got %v, want questions[\"q\"] and %q", err, RuleRangeCollapsed)
	}
}

// TestInformationExtremeScales: bins 1e-290 wide on a range 2.2e300
// wide. Cooke's formula (1991, §12.4), worked by hand on
// quantiles 1e-290, 2e-290, 3e-290 and [L*, U*] = [−1.1e300, 1.1e300]:
// the outer bins are 1.1e300 wide (1e-290 is lost in the rounding), so
//
//	I = 2 · 0.05 ln(0.05 · 2.2e300 / 1.1e300) + 2 · 0.45 ln(0.45 · 2.2e300 / 1e-290)
//	  = 0.1 ln 0.1 + 0.9 (ln 0.99 + 590 ln 10).
//
// Formed as one ratio, 0.99e300 / 1e-290 overflows to +Inf.
func TestInformationExtremeScales(t *testing.T) {
	got, err := InformationScore([]float64{1e-290, 2e-290, 3e-290}, seedProbs, -1.1e300, 1.1e300)
	if err != nil {
		t.Fatal(err)
	}
	want := 0.1*math.Log(0.1) + 0.9*(math.Log(0.99)+590*math.Log(10))
	if math.IsInf(got, 0) || math.Abs(got-want) > 1e-12*want {
		t.Errorf("information %v, want %v", got, want)
	}
}

// The information score depends on the bins' widths only through their
// ratios to the range's (Cooke 1991, "Experts in Uncertainty", the
// relative information against the uniform background), so scaling
// every number by a power of two leaves it unchanged to rounding, down
// into the subnormals, where Go's math.Log on amd64 is wrong (logSub).
func TestInformationIsScaleFree(t *testing.T) {
	qs, probs := []float64{3, 4, 9}, []float64{0.05, 0.5, 0.95}
	want, err := InformationScore(qs, probs, 1, 12)
	if err != nil {
		t.Fatal(err)
	}
	for _, s := range []float64{0x1p-1000, 0x1p-1060, 0x1p-1066} {
		sq := []float64{qs[0] * s, qs[1] * s, qs[2] * s}
		got, err := InformationScore(sq, probs, 1*s, 12*s)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(got-want) > 1e-12 {
			t.Errorf("scaled by %g: information %v, want %v", s, got, want)
		}
	}
}

// An expert whose quantiles split the intrinsic range exactly in the
// bins' proportions states the uniform background itself, and the
// relative information of a distribution with respect to itself is 0
// (Kullback & Leibler 1951, Ann. Math. Statist. 22: 79–86; Gibbs'
// inequality: I ≥ 0, with equality only there). By hand, each term
// pⱼ ln(pⱼ / (wⱼ/W)) has wⱼ/W = pⱼ and is pⱼ ln 1 = 0. The sum of
// logarithms left rounding noise of either sign (+5e-16 on [0, 100],
// −1.2e-15 on [0, 3000]), so the same panel, rescaled, gave the
// know-nothing expert a weight of +1e-13 or −3e-13 (and the other
// expert a weight above 1), and with α = 0.4, above the informative
// expert's calibration, the whole weight on [0, 100] but a refusal on
// [0, 3000].
func TestUniformExpertHasNoInformation(t *testing.T) {
	for _, top := range []float64{1, 0.37, 100, 3000, 7e5} {
		got, err := InformationScore([]float64{0.05 * top, 0.5 * top, 0.95 * top}, seedProbs, 0, top)
		if err != nil {
			t.Fatal(err)
		}
		if got != 0 {
			t.Errorf("[0, %v]: uniform expert's information %v, want 0", top, got)
		}
		// Away from the uniform, the information stays above 0.
		near, err := InformationScore([]float64{0.05 * top, 0.5 * top, 0.96 * top}, seedProbs, 0, top)
		if err != nil {
			t.Fatal(err)
		}
		if !(near > 1e-4) {
			t.Errorf("[0, %v]: near-uniform expert's information %v, want > 1e-4", top, near)
		}

		var as []SeedAssessment
		real, bounds := map[string]float64{}, map[string][2]float64{}
		for i := 0; i < 10; i++ {
			q := fmt.Sprintf("q%d", i)
			x := top * float64(10+7*i) / 100
			real[q], bounds[q] = x, [2]float64{0, top}
			as = append(as,
				// U's own quantiles widened by the overshoot reach past
				// the bounds, so the intrinsic range is [0, top].
				SeedAssessment{Expert: "U", Question: q, Probs: seedProbs, Quantiles: []float64{0.05 * top, 0.5 * top, 0.95 * top}},
				SeedAssessment{Expert: "A", Question: q, Probs: seedProbs, Quantiles: []float64{x - 0.05*top, x + 0.01*top, x + 0.06*top}})
		}
		s, err := ClassicalModel(as, real, bounds, ModelOptions{})
		if err != nil {
			t.Fatalf("[0, %v]: %v", top, err)
		}
		w := s.Weights()
		if s.Experts[1].Information != 0 || s.Experts[1].Combined != 0 || w["U"] != 0 || w["A"] != 1 {
			t.Errorf("[0, %v]: U information %v, combined %v, weight %v; A weight %v; want 0, 0, 0, 1",
				top, s.Experts[1].Information, s.Experts[1].Combined, w["U"], w["A"])
		}
		a := 0.4 // above A's calibration score, below U's
		if !(s.Experts[0].Calibration < a && s.Experts[1].Calibration > a) {
			t.Fatalf("[0, %v]: calibration A %v, U %v: the case needs A < %v < U", top, s.Experts[0].Calibration, s.Experts[1].Calibration, a)
		}
		if _, err := ClassicalModel(as, real, bounds, ModelOptions{Alpha: &a}); !calHasRule(err, RuleAlphaTooHigh) {
			t.Errorf("[0, %v]: α = %v leaves only the uninformative expert: got %v, want %q", top, a, err, RuleAlphaTooHigh)
		}
	}
}

// TestAlphaAboveScoresBelowTheDoubleRange: a typed cut-off above every
// expert's score is refused naming the highest score; where that score
// is below the smallest double (E's, e^−1194.63 as in
// TestScoreBelowTheDoubleRange) it is written from its logarithm,
// 1.513e-519 (Python's decimal: exp(-1194.6273835608188) =
// 1.5133e-519), not as "above 0".
func TestAlphaAboveScoresBelowTheDoubleRange(t *testing.T) {
	as, real := seedsWithBins(seedProbs, repeatBin(3, 400))
	var onlyE []SeedAssessment
	for _, a := range as {
		if a.Expert == "E" {
			onlyE = append(onlyE, a)
		}
	}
	alpha := 0.001
	_, err := ClassicalModel(onlyE, real, nil, ModelOptions{Alpha: &alpha})
	var ie *InputError
	if !errors.As(err, &ie) || ie.Rule != RuleAlphaTooHigh {
		t.Fatalf("α = 0.001 above a score of e^-1194.6: %v", err)
	}
	if ie.Detail != "0.001 above 1.513e-519" {
		t.Errorf("detail %q, want %q", ie.Detail, "0.001 above 1.513e-519")
	}
}

// TestLeaveOneOutCutOffBelowTheDoubleRange: in TestManyCalibrationQuestions'
// panel, the rerun without B leaves A alone, whose cut-off is its own
// score e^−1169.95 (R 4.2.2's pchisq(…, log.p = TRUE)); the rerun keeps
// its logarithm, as Scores does, so that it is not written as 0.
func TestLeaveOneOutCutOffBelowTheDoubleRange(t *testing.T) {
	as, real := manySeeds()
	rep, err := LeaveOneOut(as, real, nil, ModelOptions{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	found := false
	for _, c := range rep.Cases {
		if c.LeftOut != LeaveOutExpert || c.Name != "B" {
			continue
		}
		found = true
		const want = -1169.9517750719319
		if c.Alpha != 0 || c.LogAlpha == nil || math.Abs(*c.LogAlpha-want) > 1e-12*-want {
			t.Errorf("without B: α %v, ln α %v, want 0 and %v", c.Alpha, c.LogAlpha, want)
		}
	}
	if !found {
		t.Fatal("no rerun without B")
	}
}

// manySeeds is TestManyCalibrationQuestions' invented panel: 300
// calibration questions, every realisation 0, asked at 1/50/99%; A has
// 150 realisations below its 1% value and 150 above its 99% value, B 200
// and 100.
func manySeeds() ([]SeedAssessment, map[string]float64) {
	probs := []float64{0.01, 0.5, 0.99}
	above, below := []float64{-3, -2, -1}, []float64{1, 2, 3}
	var as []SeedAssessment
	real := map[string]float64{}
	for i := 0; i < 300; i++ {
		q := fmt.Sprintf("s%03d", i)
		real[q] = 0
		a, b := below, below
		if i >= 150 {
			a = above
		}
		if i >= 200 {
			b = above
		}
		as = append(as, SeedAssessment{Expert: "A", Question: q, Probs: probs, Quantiles: a},
			SeedAssessment{Expert: "B", Question: q, Probs: probs, Quantiles: b})
	}
	return as, real
}

// TestOptimisedCutOffScoresEveryPoolOnTheSameQuestions: the optimised
// cut-off compares pools scored on the same calibration questions. In the
// invented inverter_seeds_skipped.csv Esi answers four of six questions,
// narrowly and well, and Farid misses the surge question that only he and
// Gita answered. A cut-off at Esi's score keeps only her: its pool is
// scored on her four questions, never meets the surge question and scores
// best (C·I = 1.53 against 0.42); it is passed over for Gita's, whose pool
// answers all six. The scores are checked against SciPy in cmd/parley's
// TestCalibrateAgainstSciPy; here, which cut-off wins.
func TestOptimisedCutOffScoresEveryPoolOnTheSameQuestions(t *testing.T) {
	type row struct {
		expert, question string
		real             float64
		q                []float64
	}
	rows := []row{
		{"Esi", "predecessor", 3.1, []float64{2.8, 3.2, 3.6}},
		{"Farid", "predecessor", 3.1, []float64{2.0, 3.5, 5.0}},
		{"Gita", "predecessor", 3.1, []float64{1.0, 3.0, 8.0}},
		{"Esi", "fan", 1.4, []float64{1.2, 1.45, 1.7}},
		{"Farid", "fan", 1.4, []float64{0.9, 1.6, 2.5}},
		{"Gita", "fan", 1.4, []float64{0.5, 1.5, 4.0}},
		{"Esi", "capacitor", 0.8, []float64{0.7, 0.78, 0.9}},
		{"Farid", "capacitor", 0.8, []float64{0.5, 0.9, 1.5}},
		{"Gita", "capacitor", 0.8, []float64{0.2, 1.0, 3.0}},
		{"Esi", "repair", 6.5, []float64{5.5, 6.3, 7.2}},
		{"Farid", "repair", 6.5, []float64{4, 6, 9}},
		{"Gita", "repair", 6.5, []float64{2, 7, 14}},
		{"Farid", "firmware", 2.2, []float64{1.5, 2.5, 4.0}},
		{"Gita", "firmware", 2.2, []float64{0.5, 2.0, 6.0}},
		{"Farid", "surge", 0.5, []float64{1.0, 2.0, 4.0}},
		{"Gita", "surge", 0.5, []float64{0.2, 0.8, 3.0}},
	}
	var as []SeedAssessment
	real := map[string]float64{}
	for _, r := range rows {
		as = append(as, SeedAssessment{Expert: r.expert, Question: r.question, Probs: seedProbs, Quantiles: r.q})
		real[r.question] = r.real
	}
	s, err := ClassicalModel(as, real, nil, ModelOptions{})
	if err != nil {
		t.Fatal(err)
	}
	esi, gita := expertScore(t, s, "Esi"), expertScore(t, s, "Gita")
	if s.Alpha != gita.Calibration || s.Pooled.N != 6 || esi.Weight == 1 {
		t.Errorf("optimised: α %v (Gita's score %v), pool on %d questions, Esi's weight %v; want Gita's score, 6, below 1",
			s.Alpha, gita.Calibration, s.Pooled.N, esi.Weight)
	}
	// The cut-off passed over: its pool is scored on four questions and
	// would have scored better.
	a := esi.Calibration
	only, err := ClassicalModel(as, real, nil, ModelOptions{Alpha: &a})
	if err != nil {
		t.Fatal(err)
	}
	if only.Pooled.N != 4 || !(only.Pooled.Combined > s.Pooled.Combined) {
		t.Errorf("cut-off at Esi's score: pool on %d questions, C·I %v (optimised %v); want 4 and above",
			only.Pooled.N, only.Pooled.Combined, s.Pooled.Combined)
	}
}

// TestMirroredCountsScoreAlike: bins of equal mass are alike, so counts
// mirrored about the median (5/50/95: the two outer bins hold 0.05 each,
// the two inner 0.45) have the same calibration score, to the last bit,
// by the definition C = 1 − F_χ²(2·N·I(s, p); n) (Cooke 1991, ch. 12).
// In doubles the bin masses were 0.45 and 0.44999999999999996, and the
// scores 6e-16 apart (found in review).
func TestMirroredCountsScoreAlike(t *testing.T) {
	for _, probs := range [][]float64{{0.05, 0.5, 0.95}, {0.1, 0.5, 0.9}, {0.25, 0.5, 0.75}, {0.05, 0.25, 0.5, 0.75, 0.95}, {1.0 / 3, 2.0 / 3}} {
		n := len(probs) + 1
		counts := make([]int, n)
		var walk func(j, left int)
		checked := 0
		walk = func(j, left int) {
			if j == n-1 {
				counts[j] = left
				mirror := slices.Clone(counts)
				slices.Reverse(mirror)
				a, errA := CalibrationScore(counts, probs)
				b, errB := CalibrationScore(mirror, probs)
				if errA != nil || errB != nil {
					t.Fatal(errA, errB)
				}
				if a != b {
					t.Errorf("probs %v: C%v = %.17g, C%v = %.17g", probs, counts, a, mirror, b)
				}
				checked++
				return
			}
			for c := 0; c <= left; c++ {
				counts[j] = c
				walk(j+1, left-c)
			}
		}
		for total := 1; total <= 10; total++ {
			walk(0, total)
		}
		if checked < 100 {
			t.Errorf("probs %v: %d count vectors checked", probs, checked)
		}
	}
}

// TestEqualScoresAreCutAlike: two experts with mirrored counts, and so
// equal calibration scores, are kept or left out together. An invented
// panel of three on three questions: Ada's counts are [1, 1, 0, 1] and
// Bea's [1, 0, 1, 1]. The cut-off can keep all three or Cai alone; the
// optimised one must give the weights of one of these, the better pool.
// Before, a cut-off at Bea's score (6e-16 above Ada's) kept Bea and not
// Ada, weights no cut-off can give.
func TestEqualScoresAreCutAlike(t *testing.T) {
	probs := []float64{0.05, 0.5, 0.95}
	mk := func(e, q string, x ...float64) SeedAssessment {
		return SeedAssessment{Expert: e, Question: q, Probs: probs, Quantiles: x}
	}
	as := []SeedAssessment{
		mk("Ada", "Q1", 11, 60, 110), mk("Ada", "Q2", 1, 60, 110), mk("Ada", "Q3", -90, -40, 9),
		mk("Bea", "Q1", 10.5, 11, 11.5), mk("Bea", "Q2", 9, 9.5, 10.5), mk("Bea", "Q3", 8, 8.5, 9),
		mk("Cai", "Q1", 9, 10.5, 12), mk("Cai", "Q2", 8, 9.5, 11), mk("Cai", "Q3", 7, 8.5, 9.5),
	}
	real := map[string]float64{"Q1": 10, "Q2": 10, "Q3": 10}
	s, err := ClassicalModel(as, real, nil, ModelOptions{})
	if err != nil {
		t.Fatal(err)
	}
	ada, bea, cai := expertScore(t, s, "Ada"), expertScore(t, s, "Bea"), expertScore(t, s, "Cai")
	if ada.Calibration != bea.Calibration {
		t.Fatalf("Ada's score %.17g, Bea's %.17g: equal by definition", ada.Calibration, bea.Calibration)
	}
	if (ada.Weight == 0) != (bea.Weight == 0) {
		t.Errorf("equal scores cut apart: Ada %v, Bea %v at α %v", ada.Weight, bea.Weight, s.Alpha)
	}
	// The two cut-offs the model can choose, and the better pool.
	zero, top := 0.0, cai.Calibration
	all, err := ClassicalModel(as, real, nil, ModelOptions{Alpha: &zero})
	if err != nil {
		t.Fatal(err)
	}
	alone, err := ClassicalModel(as, real, nil, ModelOptions{Alpha: &top})
	if err != nil {
		t.Fatal(err)
	}
	want := all
	if alone.Pooled.Combined > all.Pooled.Combined {
		want = alone
	}
	for _, e := range want.Experts {
		if got := expertScore(t, s, e.Expert).Weight; math.Abs(got-e.Weight) > 1e-15 {
			t.Errorf("%s: weight %v, the better cut-off's %v (all three: pool C·I %v; Cai alone: %v)",
				e.Expert, got, e.Weight, all.Pooled.Combined, alone.Pooled.Combined)
		}
	}
}

// TestRealisationOnAQuantileCountsInTheBinBelow: a true value equal to an
// expert's 5% quantile lies in the bin below it, since P(X ≤ q) = p (the
// bins of Cooke's classical model are (−∞, q₁], (q₁, q₂], …). One
// realisation in the 5% bin gives 2·N·I(s, p) = 2 ln(1/0.05) = 2 ln 20
// and a calibration score of 0.11202623267236217 (R 4.2.2:
// pchisq(2*log(20), 3, lower.tail = FALSE)); counted in the bin above it
// would be pchisq(2*log(1/0.45), 3, lower.tail = FALSE) = 0.66. The pool
// of the one expert has the same quantiles and the same score.
func TestRealisationOnAQuantileCountsInTheBinBelow(t *testing.T) {
	as := []SeedAssessment{{Expert: "A", Question: "q1", Probs: []float64{0.05, 0.5, 0.95}, Quantiles: []float64{10, 20, 30}}}
	s, err := ClassicalModel(as, map[string]float64{"q1": 10}, nil, ModelOptions{})
	if err != nil {
		t.Fatal(err)
	}
	const want = 0.11202623267236217 // R 4.2.2, above
	if got := s.Experts[0].Calibration; math.Abs(got-want) > 1e-12 {
		t.Errorf("expert's calibration %v, R %v", got, want)
	}
	if got := s.Pooled.Calibration; math.Abs(got-want) > 1e-12 {
		t.Errorf("pool's calibration %v, R %v (its quantiles %v)", got, want, s.Questions[0].Pooled)
	}
}

// TestTiedPoolsTakeTheSmallerCutOff: bestAlpha's rule (ours, stated in its
// doc comment) is that pools of equal combined score go to the smaller
// cut-off α. Expert B answers only q1, with A's own quantiles, and misses
// it (the true value in the 5% bin; calibration 0.112, as in
// TestRealisationOnAQuantileCountsInTheBinBelow), A answers q1 to q4 and
// scores higher. With or without B the pool's distribution is A's on
// every question, so the cut-offs at B's score and at A's give the same
// pool to the last bit: α is B's score and B keeps a weight.
func TestTiedPoolsTakeTheSmallerCutOff(t *testing.T) {
	probs := []float64{0.05, 0.5, 0.95}
	qs := []float64{10, 20, 30}
	as := []SeedAssessment{{Expert: "B", Question: "q1", Probs: probs, Quantiles: qs}}
	for _, q := range []string{"q1", "q2", "q3", "q4"} {
		as = append(as, SeedAssessment{Expert: "A", Question: q, Probs: probs, Quantiles: qs})
	}
	truth := map[string]float64{"q1": 5, "q2": 15, "q3": 25, "q4": 15}
	s, err := ClassicalModel(as, truth, nil, ModelOptions{})
	if err != nil {
		t.Fatal(err)
	}
	a, b := s.Experts[0], s.Experts[1]
	if a.Expert != "A" || b.Expert != "B" || !(b.Calibration < a.Calibration) {
		t.Fatalf("the case needs B below A: %+v", s.Experts)
	}
	if s.Alpha != b.Calibration || !(b.Weight > 0) {
		t.Errorf("α %v, B's weight %v: want α = B's score %v and B weighted", s.Alpha, b.Weight, b.Calibration)
	}
}

// TestPiecewiseUniformQuantileAtAKnotIsTheKnot: the CDF is F[k] at the
// knot X[k] and rises through it, so the quantile at F[k] is X[k] exactly
// (the inverse of a strictly increasing CDF). Interpolated from the knot
// before it would be −1.7 + (0.1 − (−1.7)) = 0.10000000000000009 in
// float64, and a true value of 0.1 would fall in the bin above it.
func TestPiecewiseUniformQuantileAtAKnotIsTheKnot(t *testing.T) {
	d := PiecewiseUniform{X: []float64{-1.7, 0.1, 0.3, 2.3}, F: []float64{0, 0.05, 0.5, 1}}
	for k, p := range d.F {
		if got := d.Quantile(p); got != d.X[k] {
			t.Errorf("quantile at %v: %v, want the knot %v", p, got, d.X[k])
		}
	}
}

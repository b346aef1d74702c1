package workshop_test

import (
	"errors"
	"math"
	"slices"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/elicit/workshop/workshoptest"
)

// chiSq3Survival is P(χ²₃ > x) in closed form for 3 degrees of freedom,
// erfc(√(x/2)) + √(2x/π)·e^(−x/2) (Abramowitz & Stegun 1964, "Handbook of
// Mathematical Functions", §26.4, χ² with odd ν), independent of gonum.
func chiSq3Survival(x float64) float64 {
	return math.Erfc(math.Sqrt(x/2)) + math.Sqrt(2*x/math.Pi)*math.Exp(-x/2)
}

func TestCalibrationSetFromWorkshop(t *testing.T) {
	src := workshoptest.ValveWear(false)
	set := workshop.NewCalibrationSet(src.Questions, src.Experts, src.Revisions, false)
	if !slices.Equal(set.Probs, []float64{0.05, 0.5, 0.95}) {
		t.Fatalf("probs %v, want the 5/50/95 asked by three of four quantile seeds", set.Probs)
	}
	if len(set.Questions) != 3 || len(set.Pending) != 0 || !set.Ready() {
		t.Fatalf("scored %d, pending %d", len(set.Questions), len(set.Pending))
	}
	if len(set.Skipped) != 2 || set.Skipped[0].ID != 105 || !strings.Contains(set.Skipped[0].Reason, "chips") ||
		set.Skipped[1].ID != 106 || !strings.Contains(set.Skipped[1].Reason, "25%, 50%, 75%") {
		t.Fatalf("skipped %+v", set.Skipped)
	}
	if len(set.Assessments) != 9 {
		t.Fatalf("%d assessments, want 3 experts × 3 seeds (revoked D left out)", len(set.Assessments))
	}
	for _, a := range set.Assessments {
		if a.Expert == workshop.SeedExpertKey(1) && a.Question == workshop.SeedQuestionKey(102) && !slices.Equal(a.Quantiles, []float64{0.10, 0.25, 0.50}) {
			t.Errorf("A on seed 1 uses %v, not the latest revision", a.Quantiles)
		}
		if a.Expert == workshop.SeedExpertKey(4) {
			t.Error("revoked expert scored")
		}
	}
	if n := len(set.Answered[106]); n != 1 {
		t.Errorf("quartile seed answered by %d, want 1", n)
	}
	// Only revealed truths count for a record.
	hidden := workshop.NewCalibrationSet(src.Questions, src.Experts, src.Revisions, true)
	if hidden.Ready() || len(hidden.Pending) != 3 {
		t.Fatalf("unrevealed: ready %v, pending %d", hidden.Ready(), len(hidden.Pending))
	}
	if _, err := workshop.ScorePerformance(hidden, nil); err == nil {
		t.Fatal("scored against hidden truths")
	}
}

func TestScorePerformanceByHand(t *testing.T) {
	src := workshoptest.ValveWear(true)
	set := workshop.NewCalibrationSet(src.Questions, src.Experts, src.Revisions, false)
	p, err := workshop.ScorePerformance(set, nil)
	if err != nil {
		t.Fatal(err)
	}
	// Bins (below 5%, 5–50%, 50–95%, above 95%) of the realisations:
	//   A: 0.30 in (0.25, 0.50], 0.50 in (0.30, 0.55], 0.20 in (0.15, 0.40] → counts 0,1,2,0
	//   B: 0.30 below 0.60, 0.50 above 0.14, 0.20 below 0.70           → counts 2,0,0,1
	//   C: 0.30 in (0.20, 0.35], 0.50 in (0.45, 0.70], 0.20 in (0.10, 0.25] → counts 0,2,1,0
	// with p = (0.05, 0.45, 0.45, 0.05) and N = 3:
	//   I_A = I_C = ⅓ ln((⅓)/0.45) + ⅔ ln((⅔)/0.45) = −0.100035 + 0.262029 = 0.161994
	//   I_B = ⅔ ln((⅔)/0.05) + ⅓ ln((⅓)/0.05) = 1.726845 + 0.632373 = 2.359218
	// and the calibration score is P(χ²₃ > 2·3·I).
	iA := 1.0/3*math.Log((1.0/3)/0.45) + 2.0/3*math.Log((2.0/3)/0.45)
	iB := 2.0/3*math.Log((2.0/3)/0.05) + 1.0/3*math.Log((1.0/3)/0.05)
	if math.Abs(iA-0.161994) > 1e-6 || math.Abs(iB-2.359218) > 1e-6 {
		t.Fatalf("hand arithmetic: I_A %v, I_B %v", iA, iB)
	}
	wantCal := map[int64]float64{1: chiSq3Survival(6 * iA), 2: chiSq3Survival(6 * iB), 3: chiSq3Survival(6 * iA)}
	// Intrinsic ranges: the smallest and largest outer quantile or
	// realisation, widened by 10% of the span on each side:
	//   seed 1: [0.10, 0.64] → [0.046, 0.694]; seed 2: [0.10, 0.80] → [0.03, 0.87];
	//   seed 3: [0.05, 0.74] → [−0.019, 0.809], cut to the bound 0 → [0, 0.809].
	ranges := map[int64][2]float64{102: {0.046, 0.694}, 103: {0.03, 0.87}, 104: {0, 0.809}}
	answers := map[int64]map[int64][]float64{
		1: {102: {0.10, 0.25, 0.50}, 103: {0.30, 0.55, 0.80}, 104: {0.05, 0.15, 0.40}},
		2: {102: {0.60, 0.62, 0.64}, 103: {0.10, 0.12, 0.14}, 104: {0.70, 0.72, 0.74}},
		3: {102: {0.20, 0.35, 0.60}, 103: {0.20, 0.45, 0.70}, 104: {0.10, 0.25, 0.45}},
	}
	if len(p.Experts) != 3 {
		t.Fatalf("%d experts scored, want 3 (revoked D left out)", len(p.Experts))
	}
	sum := 0.0
	for _, e := range p.Experts {
		if math.Abs(e.Calibration-wantCal[e.ExpertID]) > 1e-9 {
			t.Errorf("expert %s calibration %v, want %v", e.Name, e.Calibration, wantCal[e.ExpertID])
		}
		info := 0.0
		for q, r := range ranges {
			v, err := elicit.InformationScore(answers[e.ExpertID][q], set.Probs, r[0], r[1])
			if err != nil {
				t.Fatal(err)
			}
			info += v / 3
		}
		if math.Abs(e.Information-info) > 1e-9 || e.Answered != 3 {
			t.Errorf("expert %s information %v (n %d), want %v", e.Name, e.Information, e.Answered, info)
		}
		if math.Abs(e.Combined-e.Calibration*e.Information) > 1e-12 {
			t.Errorf("expert %s combined %v", e.Name, e.Combined)
		}
		sum += e.Weight
	}
	if math.Abs(sum-1) > 1e-12 || p.AlphaRule != workshop.AlphaOptimised || p.Pooled.N != 3 {
		t.Fatalf("weights sum %v, rule %s, pooled %+v", sum, p.AlphaRule, p.Pooled)
	}
	// α = 0 keeps everyone: weights ∝ calibration × information.
	zero := 0.0
	p0, err := workshop.ScorePerformance(set, &zero)
	if err != nil {
		t.Fatal(err)
	}
	total := 0.0
	for _, e := range p0.Experts {
		total += e.Combined
	}
	for _, e := range p0.Experts {
		if math.Abs(e.Weight-e.Combined/total) > 1e-12 {
			t.Errorf("α=0: %s weight %v, want %v", e.Name, e.Weight, e.Combined/total)
		}
	}
	if p0.AlphaRule != workshop.AlphaFixed || p0.Alpha != 0 {
		t.Errorf("α=0 reported as %v (%s)", p0.Alpha, p0.AlphaRule)
	}
}

func TestPerformanceInForceFindsTheCutOff(t *testing.T) {
	src := workshoptest.ValveWear(true)
	set := workshop.NewCalibrationSet(src.Questions, src.Experts, src.Revisions, true)
	opt, err := workshop.ScorePerformance(set, nil)
	if err != nil {
		t.Fatal(err)
	}
	// The highest calibration score keeps only A and C.
	top := 0.0
	for _, e := range opt.Experts {
		top = math.Max(top, e.Calibration)
	}
	zero := 0.0
	for _, alpha := range []*float64{nil, &zero, &top} {
		want, err := workshop.ScorePerformance(set, alpha)
		if err != nil {
			t.Fatal(err)
		}
		w := workshop.Weights{WorkshopID: 9, Scheme: workshop.WeightsPerformance, ByExpert: map[int64]float64{}}
		for id, v := range want.WeightsByExpert() {
			w.ByExpert[id] = 3 * v // stored weights need not be normalised
		}
		got, err := workshop.PerformanceInForce(set, w)
		if err != nil {
			t.Fatal(err)
		}
		if !got.InForce || !sameWeights(got, want) {
			t.Errorf("α %v: in force %v, weights %v, want %v", want.Alpha, got.InForce, got.WeightsByExpert(), want.WeightsByExpert())
		}
	}
	// Weights of another scheme, or from other answers, are not these.
	for _, w := range []workshop.Weights{
		{Scheme: workshop.WeightsEqual},
		{Scheme: workshop.WeightsPerformance, ByExpert: map[int64]float64{1: 1, 2: 1, 3: 5}},
	} {
		got, err := workshop.PerformanceInForce(set, w)
		if err != nil {
			t.Fatal(err)
		}
		if got.InForce || got.Alpha != opt.Alpha || got.AlphaRule != workshop.AlphaOptimised {
			t.Errorf("%+v: in force %v, α %v (%s)", w, got.InForce, got.Alpha, got.AlphaRule)
		}
	}
}

func sameWeights(a, b workshop.Performance) bool {
	wa, wb := a.WeightsByExpert(), b.WeightsByExpert()
	for id, v := range wb {
		if math.Abs(wa[id]-v) > 1e-12 {
			return false
		}
	}
	return len(wa) == len(wb)
}

func TestComparePools(t *testing.T) {
	src := workshoptest.ValveWear(true)
	perf := map[int64]float64{1: 0.7, 2: 0, 3: 0.3, 4: 1}
	cs := workshop.ComparePools(src.Questions, src.Experts, src.Revisions, perf)
	if len(cs) != 1 || cs[0].QuestionID != 101 || cs[0].Equal == nil || cs[0].Performance == nil {
		t.Fatalf("comparisons %+v", cs)
	}
	q := src.Questions[0]
	means := map[int64]float64{}
	for _, rv := range src.Revisions {
		if rv.QuestionID == 101 {
			f, err := q.Fit(rv.Answer)
			if err != nil {
				t.Fatal(err)
			}
			means[rv.ExpertID] = f.Dist.Mean()
		}
	}
	// A linear pool's mean is the weighted mean of its components' means
	// (Frühwirth-Schnatter 2006, "Finite Mixture and Markov Switching
	// Models", §1.2.4); the revoked D is not pooled.
	eq := (means[1] + means[2] + means[3]) / 3
	pm := 0.7*means[1] + 0.3*means[3]
	if math.Abs(cs[0].Equal.Mean-eq) > 1e-12 || math.Abs(cs[0].Performance.Mean-pm) > 1e-12 {
		t.Fatalf("means %v, %v; want %v, %v", cs[0].Equal.Mean, cs[0].Performance.Mean, eq, pm)
	}
	pc := cs[0].Performance.Percentiles
	if !(pc.P05 < pc.P50 && pc.P50 < pc.P95) || len(cs[0].Performance.Weights) != 3 {
		t.Fatalf("performance pool %+v", cs[0].Performance)
	}
	none := workshop.ComparePools(src.Questions, src.Experts, src.Revisions, map[int64]float64{2: 0})
	if none[0].Performance != nil || !strings.Contains(none[0].PerformanceError, "weight 0") {
		t.Fatalf("all-zero weights: %+v", none[0])
	}
}

func TestPerformanceRobustness(t *testing.T) {
	src := workshoptest.ValveWear(true)
	set := workshop.NewCalibrationSet(src.Questions, src.Experts, src.Revisions, true)
	rb, err := workshop.PerformanceRobustness(set, src.Questions, src.Experts, src.Revisions, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(rb.Rows) != 6 || len(rb.Targets) != 1 || rb.Targets[0] != 101 {
		t.Fatalf("%d rows on targets %v, want 3 questions + 3 experts on question 101", len(rb.Rows), rb.Targets)
	}
	target := src.Questions[0]
	fits := map[int64]elicit.ScaledBeta{}
	for _, rv := range src.Revisions {
		if rv.QuestionID == target.ID {
			f, err := target.Fit(rv.Answer)
			if err != nil {
				t.Fatal(err)
			}
			fits[rv.ExpertID] = f.Dist
		}
	}
	// The pool's percentiles straight from ClassicalModel's weights and
	// LinearPool, without the code under test; the target is on [0, 1],
	// so shifts are absolute.
	percentiles := func(as []elicit.SeedAssessment) []float64 {
		sc, err := elicit.ClassicalModel(as, set.Realisations, set.Bounds, elicit.ModelOptions{})
		if err != nil {
			t.Fatal(err)
		}
		w := sc.Weights()
		var ds []elicit.ScaledBeta
		var ws []float64
		for _, id := range []int64{1, 2, 3} {
			ds, ws = append(ds, fits[id]), append(ws, w[workshop.SeedExpertKey(id)])
		}
		pool, err := elicit.LinearPool(ds, ws)
		if err != nil {
			t.Fatal(err)
		}
		return []float64{pool.Quantile(0.05), pool.Quantile(0.5), pool.Quantile(0.95)}
	}
	full := percentiles(set.Assessments)
	largest := 0.0
	labels := map[string]bool{}
	for _, row := range rb.Rows {
		labels[row.Label] = true
		if row.Error != "" {
			t.Errorf("%s %d: %s", row.LeftOut, row.ID, row.Error)
			continue
		}
		var as []elicit.SeedAssessment
		for _, a := range set.Assessments {
			if (row.LeftOut == elicit.LeaveOutQuestion && a.Question == workshop.SeedQuestionKey(row.ID)) ||
				(row.LeftOut == elicit.LeaveOutExpert && a.Expert == workshop.SeedExpertKey(row.ID)) {
				continue
			}
			as = append(as, a)
		}
		got := percentiles(as)
		want := 0.0
		for i := range got {
			want = math.Max(want, math.Abs(got[i]-full[i]))
		}
		if math.Abs(row.Shift-want) > 1e-9 || len(row.Shifts) != 1 || math.Abs(row.Shifts[0]-want) > 1e-9 {
			t.Errorf("%s %d: shift %v, want %v", row.LeftOut, row.ID, row.Shift, want)
		}
		largest = math.Max(largest, want)
	}
	if math.Abs(rb.Largest-largest) > 1e-9 || rb.Largest == 0 {
		t.Errorf("largest %v, want %v (and not zero: leaving out A or C moves the pool)", rb.Largest, largest)
	}
	for _, l := range []string{"Q2 s1", "Q3 s2", "Q4 s3", "A", "B", "C"} {
		if !labels[l] {
			t.Errorf("no row labelled %q", l)
		}
	}
}

// Answers saved to a calibration question after its reveal never reach
// the scores: the set takes each expert's latest answer with an ID of at
// most the question's RevealedThrough. Expert B "corrects" seed 1 to a
// tight interval around its true value 0.30 after the reveal (the gaming
// this rule exists to stop); the scores must be those of B's answer at the
// reveal.
func TestCalibrationSetUsesAnswersAtReveal(t *testing.T) {
	src := workshoptest.ValveWear(true)
	before := workshop.NewCalibrationSet(src.Questions, src.Experts, src.Revisions, true)
	perfBefore, err := workshop.ScorePerformance(before, nil)
	if err != nil {
		t.Fatal(err)
	}
	last := src.Revisions[len(src.Revisions)-1].ID
	for i := range src.Questions {
		if src.Questions[i].Calibration {
			src.Questions[i].RevealedThrough = last
		}
	}
	src.Revisions = append(src.Revisions, workshop.Revision{ID: last + 1, QuestionID: 102, ExpertID: 2, Round: 1, At: workshoptest.T0,
		Answer: workshop.Answer{Values: []float64{0.29, 0.30, 0.31}}})
	after := workshop.NewCalibrationSet(src.Questions, src.Experts, src.Revisions, true)
	for _, a := range after.Assessments {
		if a.Expert == workshop.SeedExpertKey(2) && a.Question == workshop.SeedQuestionKey(102) && a.Quantiles[1] != 0.62 {
			t.Fatalf("B's seed-1 answer scored is %v, want the one standing at the reveal (0.60, 0.62, 0.64)", a.Quantiles)
		}
	}
	perfAfter, err := workshop.ScorePerformance(after, nil)
	if err != nil {
		t.Fatal(err)
	}
	if !sameScores(perfBefore, perfAfter) {
		t.Fatalf("a save after the reveal changed the scores: %+v → %+v", perfBefore.Experts, perfAfter.Experts)
	}
	if perfAfter.Answers != workshop.AnswersRule {
		t.Errorf("the performance record does not state which answers it scored: %q", perfAfter.Answers)
	}
	// Without the freeze (a question not yet revealed), the later answer
	// would count: the test above is not vacuous.
	for i := range src.Questions {
		src.Questions[i].RevealedThrough = 0
	}
	open := workshop.NewCalibrationSet(src.Questions, src.Experts, src.Revisions, true)
	perfOpen, err := workshop.ScorePerformance(open, nil)
	if err != nil {
		t.Fatal(err)
	}
	if sameScores(perfBefore, perfOpen) {
		t.Fatal("the post-reveal answer does not change the scores even unfrozen; the test proves nothing")
	}
}

// sameScores reports whether a and b give every expert the same
// calibration and information scores and weight.
func sameScores(a, b workshop.Performance) bool {
	if len(a.Experts) != len(b.Experts) {
		return false
	}
	for i := range a.Experts {
		x, y := a.Experts[i], b.Experts[i]
		if x.ExpertID != y.ExpertID || x.Calibration != y.Calibration || x.Information != y.Information || x.Weight != y.Weight {
			return false
		}
	}
	return true
}

// A retired calibration question is skipped with its reason, and a
// retired target question is not pooled.
func TestRetiredQuestionsLeaveTheScores(t *testing.T) {
	src := workshoptest.ValveWear(true)
	for i := range src.Questions {
		if src.Questions[i].ID == 104 {
			src.Questions[i].Retired = true
		}
	}
	set := workshop.NewCalibrationSet(src.Questions, src.Experts, src.Revisions, true)
	if len(set.Questions) != 2 {
		t.Fatalf("scored %d calibration questions, want 2 with seed 3 retired", len(set.Questions))
	}
	found := false
	for _, s := range set.Skipped {
		if s.ID == 104 && strings.Contains(s.Reason, "retired") {
			found = true
		}
	}
	if !found {
		t.Fatalf("the retired question is not listed as skipped: %+v", set.Skipped)
	}
}

// TestPerformanceInForceKeepsTheFixedCutOff: weights applied with a cut-off
// the facilitator fixed report that cut-off as typed, while it still gives
// them; a cut-off below every score used to be reported as 0, the smallest
// that gives the same weights, beside a stored basis saying 0.03.
func TestPerformanceInForceKeepsTheFixedCutOff(t *testing.T) {
	src := workshoptest.ValveWear(true)
	set := workshop.NewCalibrationSet(src.Questions, src.Experts, src.Revisions, true)
	low := math.Inf(1)
	opt, err := workshop.ScorePerformance(set, nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range opt.Experts {
		low = math.Min(low, e.Calibration)
	}
	typed := low / 2 // below every score: the same weights as α = 0
	fixed, err := workshop.ScorePerformance(set, &typed)
	if err != nil {
		t.Fatal(err)
	}
	basis := workshop.NewWeightBasis(set, fixed)
	w := workshop.Weights{WorkshopID: 9, Scheme: workshop.WeightsPerformance, ByExpert: fixed.WeightsByExpert(), Basis: &basis}
	got, err := workshop.PerformanceInForce(set, w)
	if err != nil {
		t.Fatal(err)
	}
	if !got.InForce || got.Alpha != typed || got.AlphaRule != workshop.AlphaFixed || !sameWeights(got, fixed) {
		t.Errorf("in force %v, α %v (%s), want %v as fixed", got.InForce, got.Alpha, got.AlphaRule, typed)
	}
	// A basis whose cut-off no longer gives the weights in force (they
	// were edited, or the answers moved) falls back to the search.
	w.ByExpert = map[int64]float64{}
	top := 0.0
	for _, e := range opt.Experts {
		top = math.Max(top, e.Calibration)
	}
	high, err := workshop.ScorePerformance(set, &top)
	if err != nil {
		t.Fatal(err)
	}
	for id, v := range high.WeightsByExpert() {
		w.ByExpert[id] = v
	}
	got, err = workshop.PerformanceInForce(set, w)
	if err != nil {
		t.Fatal(err)
	}
	if !got.InForce || got.Alpha == typed || !sameWeights(got, high) {
		t.Errorf("stale basis: in force %v, α %v, weights %v", got.InForce, got.Alpha, got.WeightsByExpert())
	}
}

// TestScoringErrorPlacesTheRefusal: a refusal of the classical model
// comes back with the calibration question, and for a rule about one
// answer the expert, revision and quantile, that broke it.
func TestScoringErrorPlacesTheRefusal(t *testing.T) {
	// One answer: on the log scale, a 95% quantile a step below the upper
	// bound 1e300 has the bound's own logarithm.
	src := workshoptest.ValveWear(true)
	var target workshop.Revision
	for i, q := range src.Questions {
		if q.ID == 103 {
			src.Questions[i].LogScale, src.Questions[i].Upper = true, 1e300
		}
	}
	for i := len(src.Revisions) - 1; i >= 0; i-- {
		if rv := src.Revisions[i]; rv.QuestionID == 103 && rv.ExpertID == 2 {
			src.Revisions[i].Answer.Values = []float64{rv.Answer.Values[0], rv.Answer.Values[1], math.Nextafter(1e300, 0)}
			target = src.Revisions[i]
			break
		}
	}
	set := workshop.NewCalibrationSet(src.Questions, src.Experts, src.Revisions, false)
	_, err := workshop.ScorePerformance(set, nil)
	var se *workshop.ScoringError
	var ie *elicit.InputError
	if !errors.As(err, &se) || !errors.As(err, &ie) || ie.Rule != elicit.RuleLogScaleTooClose {
		t.Fatalf("err %v, want a placed %q", err, elicit.RuleLogScaleTooClose)
	}
	if se.QuestionID != 103 || se.ExpertID != 2 || se.RevisionID != target.ID || se.Quantile != 2 {
		t.Errorf("placed at question %d, expert %d, revision %d, quantile %d; want 103, 2, %d, 2", se.QuestionID, se.ExpertID, se.RevisionID, se.Quantile, target.ID)
	}

	// The whole question: every answer and the true value within three
	// steps of 1, so the range widened by 10% rounds back onto them.
	src = workshoptest.ValveWear(true)
	u := math.Nextafter(1, 2) - 1
	crammed := []float64{1 - 4*u, 1 - 3*u, 1 - 2*u}
	for i, rv := range src.Revisions {
		if rv.QuestionID == 102 {
			src.Revisions[i].Answer.Values = crammed
		}
	}
	for i, q := range src.Questions {
		if q.ID == 102 {
			x := 1 - 3*u
			src.Questions[i].TrueValue = &x
		}
	}
	set = workshop.NewCalibrationSet(src.Questions, src.Experts, src.Revisions, false)
	_, err = workshop.ScorePerformance(set, nil)
	if !errors.As(err, &se) || !errors.As(err, &ie) || ie.Rule != elicit.RuleRangeCollapsed {
		t.Fatalf("err %v, want a placed %q", err, elicit.RuleRangeCollapsed)
	}
	if se.QuestionID != 102 || se.ExpertID != 0 || se.Quantile != -1 {
		t.Errorf("placed at question %d, expert %d, quantile %d; want 102, 0, -1", se.QuestionID, se.ExpertID, se.Quantile)
	}
}

// A calibration answer withdrawn before the reveal is not scored: the
// expert's earlier answer is, or, with none, the expert has not answered.
func TestCalibrationSetLeavesWithdrawnAnswersOut(t *testing.T) {
	src := workshoptest.ValveWear(false)
	var mine []int
	for i, rv := range src.Revisions {
		if rv.ExpertID == 1 && rv.QuestionID == 102 {
			mine = append(mine, i)
		}
	}
	if len(mine) < 2 {
		t.Fatalf("expert A answered seed 102 %d times in the fixture, want at least 2", len(mine))
	}
	last, before := mine[len(mine)-1], mine[len(mine)-2]
	src.Revisions[last].Withdrawn = true
	set := workshop.NewCalibrationSet(src.Questions, src.Experts, src.Revisions, false)
	found := false
	for _, a := range set.Assessments {
		if a.Expert == workshop.SeedExpertKey(1) && a.Question == workshop.SeedQuestionKey(102) {
			found = true
			if !slices.Equal(a.Quantiles, src.Revisions[before].Answer.Values) {
				t.Errorf("A on seed 102 uses %v, want the answer before the withdrawn one, %v", a.Quantiles, src.Revisions[before].Answer.Values)
			}
		}
	}
	if !found {
		t.Error("A's earlier answer to seed 102 is not scored")
	}
	for _, i := range mine {
		src.Revisions[i].Withdrawn = true
	}
	set = workshop.NewCalibrationSet(src.Questions, src.Experts, src.Revisions, false)
	for _, e := range set.Answered[102] {
		if e.ID == 1 {
			t.Error("A, every answer to seed 102 withdrawn, counts as having answered it")
		}
	}
}

package workshop

import (
	"errors"
	"math"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

// panelCase is an invented panel on one question: A revises in round 2,
// B answers once, C answered and was revoked, D never answered, E's only
// answer cannot be fitted (its values fall), and B also answered another
// question.
func panelCase() PanelInput {
	q := Question{ID: 1, WorkshopID: 9, Position: 1, Wording: "Share failing (invented)?", Quantity: "failure share",
		Lower: 0, Upper: 1, Format: FormatQuantiles, Probs: ProbsDefault}
	vals := func(v ...float64) Answer { return Answer{Values: v} }
	return PanelInput{
		Question: q,
		Experts: []Expert{
			{ID: 1, Name: "A"}, {ID: 2, Name: "B"}, {ID: 3, Name: "C", Revoked: true}, {ID: 4, Name: "D"}, {ID: 5, Name: "E"},
		},
		Revisions: []Revision{
			{ID: 10, QuestionID: 1, ExpertID: 1, Round: 1, Answer: vals(0.05, 0.2, 0.4)},
			{ID: 11, QuestionID: 1, ExpertID: 2, Round: 1, Answer: vals(0.02, 0.08, 0.2)},
			{ID: 12, QuestionID: 1, ExpertID: 3, Round: 1, Answer: vals(0.2, 0.5, 0.8)},
			{ID: 14, QuestionID: 1, ExpertID: 5, Round: 1, Answer: vals(0.3, 0.2, 0.5)},
			{ID: 15, QuestionID: 2, ExpertID: 2, Round: 1, Answer: vals(0.5, 0.6, 0.7)},
			{ID: 13, QuestionID: 1, ExpertID: 1, Round: 2, Answer: vals(0.1, 0.25, 0.45)},
		},
		Weights: Weights{Scheme: WeightsCustom, ByExpert: map[int64]float64{1: 2, 2: 6, 3: 5}},
	}
}

func mustFit(t *testing.T, q Question, v ...float64) elicit.ScaledBeta {
	t.Helper()
	f, err := q.Fit(Answer{Values: v})
	if err != nil {
		t.Fatal(err)
	}
	return f.Dist
}

// PanelState against the panel worked by hand: current revisions by the
// highest id, saves counted, the revoked expert listed but not pooled,
// the unfittable answer said, shares 2/8 and 6/8, and the pool the
// mixture 0.25 F_A + 0.75 F_B (the linear opinion pool's definition,
// Stone 1961), its points where that mixture reaches 5%, 50% and 95%.
func TestPanelStateByHand(t *testing.T) {
	in := panelCase()
	p := PanelState(in)
	if len(p.Members) != 5 {
		t.Fatalf("%d members, want 5", len(p.Members))
	}
	a, b, c, d, e := p.Members[0], p.Members[1], p.Members[2], p.Members[3], p.Members[4]
	if a.Revision == nil || a.Revision.ID != 13 || a.Saves != 2 || !a.Pooled || a.Weight != 2 || a.Share != 0.25 {
		t.Errorf("A: %+v", a)
	}
	if b.Revision == nil || b.Revision.ID != 11 || b.Saves != 1 || !b.Pooled || b.Weight != 6 || b.Share != 0.75 {
		t.Errorf("B: %+v", b)
	}
	if c.Revision == nil || c.Fit == nil || c.Pooled || c.Fitted() || c.Share != 0 {
		t.Errorf("C (revoked) is listed with a fit, not pooled: %+v", c)
	}
	if d.Revision != nil || d.Saves != 0 || d.Fit != nil || d.Pooled {
		t.Errorf("D (no answer): %+v", d)
	}
	var ie *elicit.InputError
	if e.Fit != nil || !errors.As(e.FitErr, &ie) || ie.Field != "values[1]" || ie.Rule != elicit.RuleValueIncreasing || e.Pooled {
		t.Errorf("E (values falling): fit %v, error %v", e.Fit, e.FitErr)
	}
	q := in.Question
	fa, fb := mustFit(t, q, 0.1, 0.25, 0.45), mustFit(t, q, 0.02, 0.08, 0.2)
	if a.Fit.Dist != fa || b.Fit.Dist != fb {
		t.Fatalf("fits %v, %v; Question.Fit gives %v, %v", a.Fit.Dist, b.Fit.Dist, fa, fb)
	}
	if p.Pool == nil || p.PoolErr != nil {
		t.Fatalf("no pool: %v", p.PoolErr)
	}
	mix := func(x float64) float64 { return 0.25*fa.CDF(x) + 0.75*fb.CDF(x) }
	for _, x := range []float64{0.01, 0.05, 0.1, 0.2, 0.4, 0.7} {
		if got, want := p.Pool.CDF(x), mix(x); math.Abs(got-want) > 1e-14 {
			t.Errorf("pool CDF(%v) = %v, the mixture by hand %v", x, got, want)
		}
	}
	if len(p.Points) != 3 {
		t.Fatalf("%d points, want 3", len(p.Points))
	}
	for i, pt := range p.Points {
		if pt.Prob != PoolProbs[i] || !pt.Unique || math.Abs(mix(pt.Value)-pt.Prob) > 1e-12 {
			t.Errorf("point %d: %+v; the mixture there is %v", i, pt, mix(pt.Value))
		}
	}
	best, err := p.Pool.BestBeta()
	if err != nil || p.Single == nil || p.Single.Dist != best.Dist || p.Single.SSE != best.SSE {
		t.Errorf("single Beta %+v, the pool's BestBeta %+v (%v)", p.Single, best.Dist, err)
	}
}

// The round cut-off: through round 1, A's current answer is the one of
// round 1, and the saves count round 1 only.
func TestPanelStateThroughARound(t *testing.T) {
	in := panelCase()
	in.Through = 1
	p := PanelState(in)
	a := p.Members[0]
	if a.Revision == nil || a.Revision.ID != 10 || a.Saves != 1 {
		t.Fatalf("A through round 1: %+v", a)
	}
	if a.Fit.Dist != mustFit(t, in.Question, 0.05, 0.2, 0.4) {
		t.Errorf("A's fit through round 1 is not the round-1 answer's")
	}
}

// A withdrawal: A's round-2 revision withdrawn, their round-1 answer is
// current, counted once; B's only answer withdrawn, B leaves the pool and
// A's share is the whole (weights 2 of 2, worked by hand).
func TestPanelStateWithWithdrawals(t *testing.T) {
	in := panelCase()
	for i := range in.Revisions {
		if id := in.Revisions[i].ID; id == 13 || id == 11 {
			in.Revisions[i].Withdrawn = true
		}
	}
	p := PanelState(in)
	a, b := p.Members[0], p.Members[1]
	if a.Revision == nil || a.Revision.ID != 10 || a.Saves != 1 || !a.Pooled || a.Share != 1 {
		t.Errorf("A: %+v, want revision 10, one save, the whole pool", a)
	}
	if b.Revision != nil || b.Saves != 0 || b.Pooled {
		t.Errorf("B: %+v, want no answer", b)
	}
}

// Weights: equal weights share alike; an expert the custom weights leave
// out is pooled with share 0 and left out of the mixture; weights that
// are all zero form no pool and pool nobody.
func TestPanelStateWeights(t *testing.T) {
	in := panelCase()
	in.Weights = Weights{}
	p := PanelState(in)
	if p.Members[0].Share != 0.5 || p.Members[1].Share != 0.5 || p.Members[0].Weight != 1 {
		t.Errorf("equal weights: %+v, %+v", p.Members[0], p.Members[1])
	}
	in.Weights = Weights{Scheme: WeightsCustom, ByExpert: map[int64]float64{1: 1}}
	p = PanelState(in)
	fa := mustFit(t, in.Question, 0.1, 0.25, 0.45)
	if b := p.Members[1]; !b.Pooled || b.Share != 0 || b.Weight != 0 {
		t.Errorf("B without a weight: %+v", b)
	}
	if got, want := p.Pool.CDF(0.2), fa.CDF(0.2); got != want {
		t.Errorf("pool of A alone: CDF(0.2) = %v, A's %v", got, want)
	}
	in.Weights = Weights{Scheme: WeightsCustom, ByExpert: map[int64]float64{3: 1}}
	p = PanelState(in)
	if p.Pool != nil || !errors.Is(p.PoolErr, ErrNoWeight) {
		t.Errorf("weights only on the revoked expert: pool %v, error %v", p.Pool, p.PoolErr)
	}
	for _, m := range p.Members {
		if m.Pooled {
			t.Errorf("%s pooled in a pool that did not form", m.Expert.Name)
		}
	}
}

// No active expert with a fit: ErrNoFits, and no pool, points or single
// Beta.
func TestPanelStateWithoutFits(t *testing.T) {
	in := panelCase()
	in.Experts = []Expert{{ID: 3, Name: "C", Revoked: true}, {ID: 4, Name: "D"}, {ID: 5, Name: "E"}}
	p := PanelState(in)
	if !errors.Is(p.PoolErr, ErrNoFits) || p.Pool != nil || p.Points != nil || p.Single != nil {
		t.Errorf("pool %v, points %v, single %v, error %v", p.Pool, p.Points, p.Single, p.PoolErr)
	}
}

// A caller's own fit function (a cache) is used for every current
// revision, once each, and what it returns is what the panel shows.
func TestPanelStateUsesTheCallersFit(t *testing.T) {
	in := panelCase()
	calls := map[int64]int{}
	in.Fit = func(q Question, rv Revision) (elicit.Fit, error) {
		calls[rv.ID]++
		if rv.ID == 14 { // E's answer, which Question.Fit refuses
			return q.Fit(Answer{Values: []float64{0.2, 0.3, 0.5}})
		}
		return q.Fit(rv.Answer)
	}
	p := PanelState(in)
	if len(calls) != 4 || calls[13] != 1 || calls[11] != 1 || calls[12] != 1 || calls[14] != 1 {
		t.Errorf("fit calls %v, want one for each of 13, 11, 12, 14", calls)
	}
	if e := p.Members[4]; e.Fit == nil || !e.Pooled {
		t.Errorf("E's fit from the caller is not used: %+v", e)
	}
}

// Without a caller's fit function, a revision's kept fit is used, and
// only a revision without one is fitted.
func TestPanelStateUsesKeptFits(t *testing.T) {
	in := panelCase()
	fresh, err := in.Question.Fit(in.Revisions[1].Answer) // B's
	if err != nil {
		t.Fatal(err)
	}
	kept := fresh
	kept.Dist.Alpha, kept.Dist.Beta.Beta = 3, 7 // unlike the fresh fit, to tell them apart
	in.Revisions[1].Kept = &kept
	p := PanelState(in)
	if b := p.Members[1]; b.Fit == nil || b.Fit.Dist != kept.Dist {
		t.Errorf("B's fit %+v, want the kept %+v", b.Fit, kept.Dist)
	}
	if a := p.Members[0]; a.Fit == nil || a.Fit.Dist != mustFit(t, in.Question, 0.1, 0.25, 0.45) {
		t.Errorf("A, with no kept fit, is not fitted afresh: %+v", a.Fit)
	}
}

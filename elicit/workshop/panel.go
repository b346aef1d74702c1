package workshop

import (
	"errors"
	"fmt"

	"github.com/parley-elicit/parley/elicit"
)

// PanelInput is what a question's panel state is computed from.
type PanelInput struct {
	Question Question
	// Experts is the roster, in the order the panel lists them; revoked
	// experts are listed but not pooled.
	Experts []Expert
	// Revisions are the revisions to read; those of other questions are
	// left out.
	Revisions []Revision
	// Weights are the pool weights in force (Weights.Of).
	Weights Weights
	// Through is the last round whose revisions count (the round
	// feedback's cut-off, Workshop.FeedbackRound); 0 counts every round.
	Through int
	// Fit fits a revision's answer to the question; nil means
	// Revision.FitOf (the kept fit, else Question.Fit). A caller with a
	// cache of fits passes its own.
	Fit func(Question, Revision) (elicit.Fit, error)
}

// Member is one expert's standing on a question's panel.
type Member struct {
	Expert Expert
	// Revision is the expert's current revision within the cut-off (the
	// rule of Current); nil when they had not answered by then.
	Revision *Revision
	// Saves counts the expert's revisions of the question within the
	// cut-off.
	Saves int
	// Fit is the current revision's fit; nil when there is no revision
	// or FitErr says why it cannot be fitted.
	Fit    *elicit.Fit
	FitErr error
	// Pooled is set when the pool formed with the member in it: an
	// active expert with a fit. Weight is their weight as set
	// (Weights.Of) and Share their normalised share of the pool
	// (elicit.Shares); both are 0 for a member not pooled.
	Pooled bool
	Weight float64
	Share  float64
}

// Fitted reports whether the member has a fitted judgement and active
// access: the members a pool is formed from.
func (m Member) Fitted() bool { return m.Fit != nil && !m.Expert.Revoked }

// Panel is a question's panel state: each expert's current fit, the
// linear opinion pool of the active experts' fits under the weights in
// force, its 5%, 50% and 95% points, and the single Beta that stands for
// it.
type Panel struct {
	Question Question
	Weights  Weights
	Through  int
	Members  []Member // one per expert of PanelInput.Experts, in its order
	// Pool is nil when PoolErr says why there is none: ErrNoFits when no
	// active expert has a fit, ErrNoWeight when every one who has has
	// weight 0 under the weights in force, an *elicit.InputError from
	// elicit.LinearPool, or ErrPoolPoints wrapping why its points could
	// not be computed.
	Pool    *elicit.Pool
	Points  []elicit.PoolQuantile // at PoolProbs
	PoolErr error
	// Single is the pool's single Beta (elicit.Pool.BestBeta); nil when
	// there is no pool or SingleErr says why none could be fitted.
	Single    *elicit.Representation
	SingleErr error
}

// PoolProbs are the probabilities of a panel's pool points: the 5th,
// 50th and 95th percentiles.
var PoolProbs = []float64{0.05, 0.5, 0.95}

// ErrNoFits means no active expert on the panel has a fitted judgement
// to pool.
var ErrNoFits = errors.New("no expert has a fitted judgement on this question yet")

// ErrNoWeight means every active expert with a fitted judgement on the
// question has weight 0 under the weights in force (performance weights
// that leave them below the cut-off, or weights the facilitator set), so
// no pool can be formed: a pool needs some weight.
var ErrNoWeight = errors.New("every expert who answered this question has weight 0 under the weights in force")

// ErrPoolPoints means the pool formed but its points at PoolProbs could
// not be computed.
var ErrPoolPoints = errors.New("the pool's 5%, 50% and 95% points cannot be computed")

// PanelState computes question in.Question's panel state from its
// revisions, the weights in force and the round cut-off. Each expert's
// current revision is the latest within the cut-off (Current with
// Through); it is fitted with in.Fit; the pool is elicit.LinearPool of
// the fits of the experts who are not revoked, each weighted
// in.Weights.Of(expert), and its single Beta elicit.Pool.BestBeta. It is
// the one place a question's panel is assembled: the facilitator's panel,
// the round feedback (the panel as the previous round closed, under equal
// weights) and the export record all call it.
func PanelState(in PanelInput) Panel {
	p := Panel{Question: in.Question, Weights: in.Weights, Through: in.Through, Members: members(in)}
	var dists []elicit.ScaledBeta
	var raw []float64
	var pooled []int
	for i, m := range p.Members {
		if m.Fitted() {
			dists = append(dists, m.Fit.Dist)
			raw = append(raw, in.Weights.Of(m.Expert.ID))
			pooled = append(pooled, i)
		}
	}
	if len(dists) == 0 {
		p.PoolErr = ErrNoFits
		return p
	}
	pool, err := elicit.LinearPool(dists, raw)
	if ie := (*elicit.InputError)(nil); errors.As(err, &ie) && ie.Rule == elicit.RuleWeightsNotAllZero {
		p.PoolErr = ErrNoWeight
		return p
	}
	if err != nil {
		p.PoolErr = err
		return p
	}
	points, err := pool.QuantileSet(PoolProbs)
	if err != nil {
		p.PoolErr = fmt.Errorf("%w: %v", ErrPoolPoints, err)
		return p
	}
	shares := elicit.Shares(raw)
	for k, i := range pooled {
		m := &p.Members[i]
		m.Pooled, m.Weight, m.Share = true, raw[k], shares[k]
	}
	p.Pool, p.Points = &pool, points
	if rep, err := pool.BestBeta(); err != nil {
		p.SingleErr = err
	} else {
		p.Single = &rep
	}
	return p
}

// members are in.Experts with their current revisions within the cut-off
// and their fits: the first half of PanelState, which the calibration
// page's pool comparisons share.
func members(in PanelInput) []Member {
	q := in.Question
	fit := in.Fit
	if fit == nil {
		fit = func(q Question, rv Revision) (elicit.Fit, error) { return rv.FitOf(q) }
	}
	within := Through(in.Through)
	keep := func(rv Revision) bool { return rv.QuestionID == q.ID && within(rv) }
	cur := Current(in.Revisions, keep)
	saves := map[int64]int{}
	for _, rv := range in.Revisions {
		if keep(rv) && !rv.Withdrawn {
			saves[rv.ExpertID]++
		}
	}
	out := make([]Member, len(in.Experts))
	for i, e := range in.Experts {
		m := Member{Expert: e, Saves: saves[e.ID]}
		if rv, ok := cur[Key{q.ID, e.ID}]; ok {
			m.Revision = &rv
			if f, err := fit(q, rv); err != nil {
				m.FitErr = err
			} else {
				m.Fit = &f
			}
		}
		out[i] = m
	}
	return out
}

package workshop

import (
	"errors"

	"github.com/parley-elicit/parley/elicit"
)

// PanelFit is one expert's standing on a question as the pool sees it:
// their current fitted Beta (nil when they have none, or it failed) and
// whether their access is revoked.
type PanelFit struct {
	ExpertID int64
	Revoked  bool
	Dist     *elicit.ScaledBeta
}

// PanelPool is the linear opinion pool of a question's panel: the pool,
// and the experts in it (in the order given) with their normalised
// weights.
type PanelPool struct {
	Pool    elicit.Pool
	Experts []int64
	Weights []float64 // normalised, one per expert in Experts
}

// ErrNoFits means no expert on the panel has a fitted judgement to pool.
var ErrNoFits = errors.New("no expert has a fitted judgement on this question yet")

// PoolPanel pools the panel's current fits under the workshop's weights:
// every expert with a fit and unrevoked access, with weight w.Of(id). It
// is the one rule by which the facilitator's panel and the exported
// record form a question's pool.
func PoolPanel(panel []PanelFit, w Weights) (PanelPool, error) {
	var dists []elicit.ScaledBeta
	var raw []float64
	var ids []int64
	for _, m := range panel {
		if m.Dist == nil || m.Revoked {
			continue
		}
		dists = append(dists, *m.Dist)
		raw = append(raw, w.Of(m.ExpertID))
		ids = append(ids, m.ExpertID)
	}
	if len(dists) == 0 {
		return PanelPool{}, ErrNoFits
	}
	pool, err := elicit.LinearPool(dists, raw)
	if err != nil {
		return PanelPool{}, err
	}
	return PanelPool{Pool: pool, Experts: ids, Weights: elicit.Shares(raw)}, nil
}

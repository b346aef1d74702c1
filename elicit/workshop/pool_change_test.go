package workshop

import (
	"fmt"
	"testing"
)

// A prior from the pool names the revisions it pooled; PoolChangeSince
// tells the pool then from the pool now, expert by expert.
func TestPoolChangeSince(t *testing.T) {
	// Revisions 11, 12, 13 are experts 1, 2, 3's answers when the prior
	// was agreed under weight set 5; 14 is expert 2's later revision and
	// 15 expert 4's first answer.
	expertOf := map[int64]int64{11: 1, 12: 2, 13: 3, 14: 2, 15: 4}
	p := AgreedPrior{Source: PriorFromPool, Pooled: []int64{11, 12, 13}, WeightSetID: 5}

	if c, ok := p.PoolChangeSince(map[int64]int64{1: 11, 2: 12, 3: 13}, 5, expertOf); !ok || c.Any() {
		t.Errorf("the same pool: %+v, %v; want no change", c, ok)
	}
	c, ok := p.PoolChangeSince(map[int64]int64{1: 11, 2: 14, 4: 15}, 6, expertOf)
	if !ok || fmt.Sprint(c.Revised, c.Joined, c.Left, c.Weights) != "[2] [4] [3] true" || !c.Any() {
		t.Errorf("expert 2 revised, 4 answered, 3 revoked, weights changed: got %+v, %v", c, ok)
	}
	for _, other := range []AgreedPrior{
		{Source: PriorFromConsensus},
		{Source: PriorFromPool},                      // agreed before Parley kept the pooled revisions
		{Source: PriorFromPool, Pooled: []int64{99}}, // a revision the caller does not know
	} {
		if _, ok := other.PoolChangeSince(map[int64]int64{1: 11}, 5, expertOf); ok {
			t.Errorf("%+v: compared, want nothing to compare", other)
		}
	}
}

// Custom weights leave out the active experts they do not name; equal
// and performance weights leave out nobody by this rule.
func TestUnweighed(t *testing.T) {
	es := []Expert{{ID: 1}, {ID: 2}, {ID: 3, Revoked: true}, {ID: 4}}
	custom := Weights{Scheme: WeightsCustom, ByExpert: map[int64]float64{1: 2, 2: 0}}
	if got := custom.Unweighed(es); len(got) != 1 || got[0].ID != 4 {
		t.Errorf("custom weights naming 1 and 2: %+v, want expert 4 (3 is revoked)", got)
	}
	for _, w := range []Weights{{Scheme: WeightsEqual}, {Scheme: WeightsPerformance, ByExpert: map[int64]float64{1: 1}}} {
		if got := w.Unweighed(es); got != nil {
			t.Errorf("%s weights: %+v, want none", w.Scheme, got)
		}
	}
}

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

	set5 := Weights{ID: 5, Scheme: WeightsCustom, ByExpert: map[int64]float64{1: 2, 2: 1, 3: 1}}
	if c, ok := p.PoolChangeSince(map[int64]int64{1: 11, 2: 12, 3: 13}, set5, nil, expertOf, nil); !ok || c.Any() {
		t.Errorf("the same pool: %+v, %v; want no change", c, ok)
	}
	set6 := Weights{ID: 6, Scheme: WeightsCustom, ByExpert: map[int64]float64{1: 1, 2: 1, 3: 1, 4: 1}}
	c, ok := p.PoolChangeSince(map[int64]int64{1: 11, 2: 14, 4: 15}, set6, &set5, expertOf, nil)
	if !ok || fmt.Sprint(c.Revised, c.Joined, c.Left, c.Weights) != "[2] [4] [3] true" || !c.Any() {
		t.Errorf("expert 2 revised, 4 answered, 3 revoked, weights changed: got %+v, %v", c, ok)
	}
	for _, other := range []AgreedPrior{
		{Source: PriorFromConsensus},
		{Source: PriorFromPool},                      // agreed before Parley kept the pooled revisions
		{Source: PriorFromPool, Pooled: []int64{99}}, // a revision the caller does not know
	} {
		if _, ok := other.PoolChangeSince(map[int64]int64{1: 11}, set5, nil, expertOf, nil); ok {
			t.Errorf("%+v: compared, want nothing to compare", other)
		}
	}
}

// A pooled judgement withdrawn since is named as withdrawn, whether the
// expert's earlier answer is current again (not "revised") or they have
// none (not "left"); one of an expert with weight 0 then changes nothing.
func TestPoolChangeSinceWithdrawn(t *testing.T) {
	// 9 is expert 2's answer before 12; 11, 12, 13 were pooled under set 5.
	expertOf := map[int64]int64{9: 2, 11: 1, 12: 2, 13: 3}
	p := AgreedPrior{Source: PriorFromPool, Pooled: []int64{11, 12, 13}, WeightSetID: 5}
	set5 := Weights{ID: 5, Scheme: WeightsCustom, ByExpert: map[int64]float64{1: 2, 2: 1, 3: 1}}
	for _, now := range []map[int64]int64{{1: 11, 2: 9, 3: 13}, {1: 11, 3: 13}} {
		c, ok := p.PoolChangeSince(now, set5, &set5, expertOf, map[int64]bool{12: true})
		if !ok || fmt.Sprint(c.Withdrawn, c.Revised, c.Left, c.Joined) != "[2] [] [] []" || !c.Any() {
			t.Errorf("now %v, 12 withdrawn: %+v, want expert 2's judgement withdrawn and nothing else", now, c)
		}
	}
	zero := Weights{ID: 5, Scheme: WeightsCustom, ByExpert: map[int64]float64{1: 2, 2: 0, 3: 1}}
	if c, _ := p.PoolChangeSince(map[int64]int64{1: 11, 3: 13}, zero, &zero, expertOf, map[int64]bool{12: true}); c.Any() {
		t.Errorf("a withdrawn judgement of weight 0: %+v, want no change", c)
	}
}

// Weights set again as they were weigh the pool alike: equal weights
// applied where none had been, or the same custom weights once more, are
// no change; other weights are, and so is a set the caller cannot name.
func TestPoolChangeSinceWeightsAlike(t *testing.T) {
	expertOf := map[int64]int64{11: 1, 12: 2}
	now := map[int64]int64{1: 11, 2: 12}
	none := AgreedPrior{Source: PriorFromPool, Pooled: []int64{11, 12}}
	equal := Weights{Scheme: WeightsEqual}
	if c, _ := none.PoolChangeSince(now, Weights{ID: 3, Scheme: WeightsEqual}, &equal, expertOf, nil); c.Any() {
		t.Errorf("equal weights applied after a prior agreed under none: %+v, want no change", c)
	}
	if c, _ := none.PoolChangeSince(now, Weights{ID: 3, Scheme: WeightsCustom, ByExpert: map[int64]float64{1: 1, 2: 3}}, &equal, expertOf, nil); !c.Weights {
		t.Error("custom weights after equal ones: no change, want one")
	}
	custom := Weights{ID: 3, Scheme: WeightsCustom, ByExpert: map[int64]float64{1: 1, 2: 3}}
	under := AgreedPrior{Source: PriorFromPool, Pooled: []int64{11, 12}, WeightSetID: 3}
	again := custom
	again.ID = 4
	if c, _ := under.PoolChangeSince(now, again, &custom, expertOf, nil); c.Any() {
		t.Errorf("the same custom weights set again: %+v, want no change", c)
	}
	if c, _ := under.PoolChangeSince(now, again, nil, expertOf, nil); !c.Weights {
		t.Error("another set, the earlier one not known: no change, want one")
	}
	// Weights are relative: 2 and 6 give the shares 1 and 3 gave, and an
	// expert left out is one weighed 0; 1 and 2 give others.
	for _, c := range []struct {
		by     map[int64]float64
		change bool
	}{
		{map[int64]float64{1: 2, 2: 6}, false},
		{map[int64]float64{1: 0.25, 2: 0.75, 5: 0}, false},
		{map[int64]float64{1: 1, 2: 2}, true},
		{map[int64]float64{1: 1, 2: 3, 5: 1}, true},
	} {
		scaled := Weights{ID: 4, Scheme: WeightsCustom, ByExpert: c.by}
		if got, _ := under.PoolChangeSince(now, scaled, &custom, expertOf, nil); got.Weights != c.change {
			t.Errorf("custom weights %v after %v: a change %v, want %v", c.by, custom.ByExpert, got.Weights, c.change)
		}
	}
}

// An expert with weight 0 counts for nothing in the pool, then or now:
// a late expert the custom weights leave out answering, or one weighed 0
// revising or leaving, does not change it.
func TestPoolChangeSinceWeightZero(t *testing.T) {
	expertOf := map[int64]int64{11: 1, 12: 2, 13: 3, 14: 3, 15: 4}
	set := Weights{ID: 5, Scheme: WeightsCustom, ByExpert: map[int64]float64{1: 2, 2: 1, 3: 0}}
	p := AgreedPrior{Source: PriorFromPool, Pooled: []int64{11, 12, 13}, WeightSetID: 5}
	for _, then := range []*Weights{nil, &set} {
		// Expert 4 answered since (not named: weight 0); expert 3 (weight 0) revised.
		if c, _ := p.PoolChangeSince(map[int64]int64{1: 11, 2: 12, 3: 14, 4: 15}, set, then, expertOf, nil); c.Any() {
			t.Errorf("then %v: experts weighed 0 answering and revising: %+v, want no change", then != nil, c)
		}
		// Expert 3 (weight 0) left.
		if c, _ := p.PoolChangeSince(map[int64]int64{1: 11, 2: 12}, set, then, expertOf, nil); c.Any() {
			t.Errorf("then %v: an expert weighed 0 leaving: %+v, want no change", then != nil, c)
		}
	}
	// Under other weights that give expert 4 a share, their answer is a change.
	other := Weights{ID: 6, Scheme: WeightsCustom, ByExpert: map[int64]float64{1: 2, 2: 1, 3: 0, 4: 1}}
	c, _ := p.PoolChangeSince(map[int64]int64{1: 11, 2: 12, 3: 13, 4: 15}, other, &set, expertOf, nil)
	if fmt.Sprint(c.Revised, c.Joined, c.Left, c.Weights) != "[] [4] [] true" {
		t.Errorf("expert 4 weighed in under other weights: %+v", c)
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

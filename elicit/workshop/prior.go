package workshop

import (
	"errors"
	"fmt"
	"maps"
	"math"
	"slices"

	"github.com/parley-elicit/parley/elicit"
)

// RuleConstructionMismatch is broken by a constructed prior whose Beta is
// not the one its construction makes.
const RuleConstructionMismatch elicit.Rule = "must be the Beta its construction makes"

// CheckSource checks that an agreed prior's source is known and carries
// what it was made from: a constructed prior keeps its construction's
// inputs, and its Beta is the one elicit.Construct makes from them (to
// 1e-9 relative, so a record written with fewer digits still reads); no
// other source keeps a construction.
func (p AgreedPrior) CheckSource() error {
	if len(p.Pooled) > 0 && p.Source != PriorFromPool {
		return inputErr("pooled_revisions", elicit.RuleUnknown, "only a prior from the pool keeps the revisions it pooled")
	}
	seen := map[int64]bool{}
	for i, id := range p.Pooled {
		if id <= 0 || seen[id] {
			return inputErr(fmt.Sprintf("pooled_revisions[%d]", i), elicit.RuleUnknown, "revision %d given twice or not an id", id)
		}
		seen[id] = true
	}
	switch p.Source {
	case PriorFromPool, PriorFromConsensus:
		if p.Construction != nil {
			return inputErr("construction", elicit.RuleUnknown, "only a prior from a construction keeps one")
		}
		return nil
	case PriorFromConstruction:
	default:
		return inputErr("source", elicit.RuleUnknown, "%q", p.Source)
	}
	if p.Construction == nil {
		return inputErr("construction", elicit.RuleRequired, "a prior from a construction keeps its inputs")
	}
	c, err := elicit.Construct(*p.Construction)
	if err != nil {
		return underField("construction", err)
	}
	d, want := p.Dist, c.Dist
	if relDiff(d.Alpha, want.Alpha) > 1e-9 || relDiff(d.Beta.Beta, want.Beta.Beta) > 1e-9 || d.Lower != want.Lower || d.Upper != want.Upper {
		return inputErr("dist", RuleConstructionMismatch, "Beta(%g, %g) on [%g, %g], but the construction makes Beta(%g, %g) on [%g, %g]",
			d.Alpha, d.Beta.Beta, d.Lower, d.Upper, want.Alpha, want.Beta.Beta, want.Lower, want.Upper)
	}
	return nil
}

func relDiff(a, b float64) float64 { return math.Abs(a-b) / math.Max(math.Abs(b), 1e-300) }

// underField prefixes an input error's field with prefix.
func underField(prefix string, err error) error {
	var ie *elicit.InputError
	if errors.As(err, &ie) {
		return &elicit.InputError{Field: prefix + "." + ie.Field, Rule: ie.Rule, Detail: ie.Detail}
	}
	return err
}

// ConstructionWords says how a constructed prior was made, from its kept
// inputs (elicit.Construction.Describe); "" for a prior of another source
// or one whose construction cannot be made again.
func (p AgreedPrior) ConstructionWords() string {
	c, ok := p.Constructed()
	if !ok {
		return ""
	}
	return c.Describe()
}

// Constructed makes a constructed prior's construction again from its
// kept inputs, for a caller that words it its own way
// (elicit.Construction.DescribeIn); false for a prior of another source
// or one whose construction cannot be made again.
func (p AgreedPrior) Constructed() (elicit.Construction, bool) {
	if p.Source != PriorFromConstruction || p.Construction == nil {
		return elicit.Construction{}, false
	}
	c, err := elicit.Construct(*p.Construction)
	if err != nil {
		return elicit.Construction{}, false
	}
	return c, true
}

// PoolChange is how the pool a prior from the pool was agreed from
// (AgreedPrior.Pooled, AgreedPrior.WeightSetID) differs from the pool as
// it stands now. Each list holds expert IDs in ascending order, which is
// the roster's order.
type PoolChange struct {
	// Revised are experts pooled then and now whose current revision is
	// no longer the one pooled: they saved again since.
	Revised []int64
	// Joined are experts pooled now who were not then: they answered
	// since, or had their access back.
	Joined []int64
	// Left are experts pooled then who are not now: their access was
	// revoked (or their latest answer could not be fitted).
	Left []int64
	// Withdrawn are experts whose pooled judgement the facilitator has
	// withdrawn since (entered against the wrong expert or question, or
	// taken back): the prior rests on a judgement that is nobody's.
	Withdrawn []int64
	// Weights is set when another weight set is in force than the one
	// the prior was agreed under.
	Weights bool
}

// Any reports whether the pool changed at all.
func (c PoolChange) Any() bool {
	return c.Weights || len(c.Revised) > 0 || len(c.Joined) > 0 || len(c.Left) > 0 || len(c.Withdrawn) > 0
}

// PoolChangeSince compares the pool prior p was agreed from with the
// pool now: now maps each expert who would be pooled now (an active
// expert with a fitted current revision, Member.Fitted) to that
// revision's ID, in are the weights in force, then the weight set in
// force when p was agreed (the set whose ID is p.WeightSetID, equal
// weights when it is 0; nil when the caller does not have it, and then
// any other set in force counts as a change), expertOf maps a
// revision's ID to its expert's, and withdrawn holds the IDs of the
// revisions withdrawn since (nil: none). A pooled judgement withdrawn is
// named as such, not as a revision or a departure, whatever the expert's
// answer now. An agreed prior keeps on standing for
// the pool as it was; once the panel moves under it (an expert revises,
// a late expert answers, one is revoked, the weights change), the pool
// the panel shows is no longer the pool the prior represents, and the
// pages say so rather than let the two be read as one. False when p is
// not from the pool, or was agreed before Parley kept the revisions it
// pooled, so nothing can be compared.
func (p AgreedPrior) PoolChangeSince(now map[int64]int64, in Weights, then *Weights, expertOf map[int64]int64, withdrawn map[int64]bool) (PoolChange, bool) {
	if p.Source != PriorFromPool || len(p.Pooled) == 0 {
		return PoolChange{}, false
	}
	var c PoolChange
	pooled := make(map[int64]int64, len(p.Pooled))
	for _, rv := range p.Pooled {
		e, ok := expertOf[rv]
		if !ok {
			return PoolChange{}, false
		}
		pooled[e] = rv
	}
	// An expert with weight 0 (custom weights that leave them out, or
	// performance weights below the cut-off) counts for nothing in the
	// pool: their answering, revising or leaving moves it not at all. A
	// late expert with weight 0 under the custom weights the prior was
	// agreed under was said to be "now in the pool" beside the warning
	// that their judgements count for nothing in it.
	nothingThen := func(e int64) bool {
		switch {
		case then != nil:
			return then.Of(e) == 0
		case in.ID == p.WeightSetID:
			return in.Of(e) == 0
		}
		return false
	}
	nothingNow := func(e int64) bool { return in.Of(e) == 0 }
	for e, rv := range pooled {
		cur, ok := now[e]
		switch {
		case withdrawn[rv] && !nothingThen(e):
			c.Withdrawn = append(c.Withdrawn, e)
		case withdrawn[rv]:
		case !ok && !nothingThen(e):
			c.Left = append(c.Left, e)
		case ok && cur != rv && !(nothingThen(e) && nothingNow(e)):
			c.Revised = append(c.Revised, e)
		}
	}
	for e := range now {
		if _, ok := pooled[e]; !ok && !nothingNow(e) {
			c.Joined = append(c.Joined, e)
		}
	}
	slices.Sort(c.Revised)
	slices.Sort(c.Joined)
	slices.Sort(c.Left)
	slices.Sort(c.Withdrawn)
	switch {
	case in.ID == p.WeightSetID:
	case then == nil:
		c.Weights = true
	default:
		c.Weights = !sameWeights(*then, in)
	}
	return c, true
}

// sameWeights reports whether two weight sets weigh every expert alike:
// both equal weights (a set of equal weights applied again, or applied
// where none had been), or the same scheme giving every expert the same
// share. Weights are relative (each share is its weight over their sum),
// so custom weights set again at another scale (2 and 6 after 1 and 3)
// form the same pool; they were said to be other weights in force. An
// expert missing from a set has weight 0 in it.
func sameWeights(a, b Weights) bool {
	eq := func(w Weights) bool { return w.Scheme == WeightsEqual || w.Scheme == "" }
	if eq(a) || eq(b) {
		return eq(a) && eq(b)
	}
	if a.Scheme != b.Scheme {
		return false
	}
	sum := func(w map[int64]float64) float64 {
		t := 0.0
		for _, x := range w {
			t += x
		}
		return t
	}
	sa, sb := sum(a.ByExpert), sum(b.ByExpert)
	if !(sa > 0 && sb > 0) {
		return maps.Equal(a.ByExpert, b.ByExpert)
	}
	// Shares that agree to rounding: 1/4 and 2/8 are one share however
	// the division rounds.
	alike := func(x, y map[int64]float64, sx, sy float64) bool {
		for id, w := range x {
			if d := w/sx - y[id]/sy; math.Abs(d) > 1e-12 {
				return false
			}
		}
		return true
	}
	return alike(a.ByExpert, b.ByExpert, sa, sb) && alike(b.ByExpert, a.ByExpert, sb, sa)
}

// RuleRetiredNoPrior refuses a prior agreed for a retired question.
const RuleRetiredNoPrior elicit.Rule = "a retired question takes no agreed prior: bring it back first"

// CheckTakesPrior reports whether a prior may be agreed for q: not a
// retired question, which is out of the workshop (hidden from the
// experts, left out of the report's table of agreed priors, and not
// offered on the quick priors page). The question's own agree form took
// one, recorded for a question the workshop had set aside. The error
// names the field "question".
func (q Question) CheckTakesPrior() error {
	if q.Retired {
		return inputErr("question", RuleRetiredNoPrior, "Q%d", q.Position)
	}
	return nil
}

package workshop

import (
	"errors"
	"fmt"
	"math"

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

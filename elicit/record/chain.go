package record

import (
	"fmt"
	"time"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/fingerprint"
)

// Chain is the record's hash chain as the record writes it (package
// fingerprint): the encoding's version, the start value h₀ and every fact
// in the chain's order with the chain's value after it, each value in 64
// hex digits.
type Chain struct {
	Version int         `json:"version"`
	Start   string      `json:"start"`
	Facts   []ChainFact `json:"facts"`
}

// ChainFact is one fact of the chain: its kind (revision, weight_set,
// agreed_prior, study_data, event), id and time, and the chain's value
// after it.
type ChainFact struct {
	Kind  fingerprint.Kind `json:"kind"`
	ID    int64            `json:"id"`
	At    time.Time        `json:"at"`
	Value string           `json:"value"`
}

// RuleChainMismatch is broken by a record whose chain or fingerprint is
// not the one its facts give: a fact was changed, added or removed after
// the record was written.
const RuleChainMismatch elicit.Rule = "does not match the chain of the record's facts (the record was changed after it was written)"

// Facts are the record's append-only facts, which its chain runs over:
// every revision, weight set of the history, agreed prior of every
// question's history, batch of study data and event.
func (r Record) Facts() fingerprint.Facts {
	f := fingerprint.Facts{Workshop: r.Workshop, WeightSets: r.WeightHistory, Data: r.StudyData, Events: r.Events}
	for _, rv := range r.Revisions {
		f.Revisions = append(f.Revisions, rv.Revision)
	}
	for _, q := range r.Questions {
		f.Priors = append(f.Priors, q.PriorHistory...)
	}
	return f
}

// seal writes the chain of the record's facts and its fingerprint into
// the record.
func (r *Record) seal() {
	c := fingerprint.Of(r.Facts())
	out := &Chain{Version: fingerprint.Version, Start: c.Start.Hex(), Facts: make([]ChainFact, len(c.Links))}
	for i, l := range c.Links {
		out.Facts[i] = ChainFact{Kind: l.Kind, ID: l.ID, At: l.At.UTC(), Value: l.Value.Hex()}
	}
	r.Fingerprint, r.Chain = c.Head().Hex(), out
}

// CheckChain checks the record's chain and fingerprint against the ones
// its facts give, naming the first fact that disagrees (RuleChainMismatch,
// at the fact's path, e.g. "revisions[3]"). A record made before Parley
// kept a chain has neither key and passes; one with only one of them does
// not.
func (r Record) CheckChain() error {
	switch {
	case r.Chain == nil && r.Fingerprint == "":
		return nil
	case r.Chain == nil:
		return inputErr("chain", RuleChainMismatch, "the record has a fingerprint but no chain")
	case r.Fingerprint == "":
		return inputErr("fingerprint", RuleChainMismatch, "the record has a chain but no fingerprint")
	case r.Chain.Version != fingerprint.Version:
		return inputErr("chain.version", elicit.RuleUnknown, "version %d; this version of Parley reads %d", r.Chain.Version, fingerprint.Version)
	}
	c := fingerprint.Of(r.Facts())
	if r.Chain.Start != c.Start.Hex() {
		return inputErr("chain.start", RuleChainMismatch, "the record says %s, its workshop's id and created time give %s", r.Chain.Start, c.Start.Hex())
	}
	stored := r.Chain.Facts
	for i := range max(len(stored), len(c.Links)) {
		p := fmt.Sprintf("chain.facts[%d]", i)
		if i >= len(c.Links) {
			s := stored[i]
			return inputErr(p, RuleChainMismatch, "the chain lists %s %d, but the record has no more facts (%d)", s.Kind, s.ID, len(c.Links))
		}
		l := c.Links[i]
		if i >= len(stored) {
			return inputErr(r.factPath(l), RuleChainMismatch, "%s %d is not in the chain, which ends after %d facts", l.Kind, l.ID, len(stored))
		}
		s := stored[i]
		if s.Kind != l.Kind || s.ID != l.ID || !s.At.Equal(l.At) {
			f, ok := inChain(c.Links, s)
			switch {
			case !ok:
				return inputErr(p, RuleChainMismatch, "the chain lists %s %d at %s, which the record does not have (it was removed)",
					s.Kind, s.ID, s.At.UTC().Format(time.RFC3339Nano))
			case !f.At.Equal(s.At):
				return inputErr(r.factPath(f), RuleChainMismatch, "%s %d is at %s, but at %s in the chain (%s)",
					f.Kind, f.ID, f.At.UTC().Format(time.RFC3339Nano), s.At.UTC().Format(time.RFC3339Nano), p)
			}
			return inputErr(r.factPath(l), RuleChainMismatch, "%s %d at %s should be %s in the chain, which lists %s %d at %s there",
				l.Kind, l.ID, l.At.UTC().Format(time.RFC3339Nano), p, s.Kind, s.ID, s.At.UTC().Format(time.RFC3339Nano))
		}
		if s.Value != l.Value.Hex() {
			return inputErr(r.factPath(l), RuleChainMismatch, "%s %d: the chain's value after it (%s) is %s, its content gives %s",
				l.Kind, l.ID, p, s.Value, l.Value.Hex())
		}
	}
	if head := c.Head().Hex(); r.Fingerprint != head {
		return inputErr("fingerprint", RuleChainMismatch, "the record says %s, its chain ends with %s", r.Fingerprint, head)
	}
	return nil
}

// inChain is the record's fact of s's kind and id, if it has one.
func inChain(links []fingerprint.Link, s ChainFact) (fingerprint.Link, bool) {
	for _, l := range links {
		if l.Kind == s.Kind && l.ID == s.ID {
			return l, true
		}
	}
	return fingerprint.Link{}, false
}

// factPath is where a fact of the chain is in the record: "revisions[3]",
// "questions[0].prior_history[1]", ….
func (r Record) factPath(l fingerprint.Link) string {
	switch l.Kind {
	case fingerprint.KindRevision:
		for i, rv := range r.Revisions {
			if rv.ID == l.ID {
				return fmt.Sprintf("revisions[%d]", i)
			}
		}
	case fingerprint.KindWeightSet:
		for i, w := range r.WeightHistory {
			if w.ID == l.ID {
				return fmt.Sprintf("weight_history[%d]", i)
			}
		}
	case fingerprint.KindAgreedPrior:
		for i, q := range r.Questions {
			for j, p := range q.PriorHistory {
				if p.ID == l.ID {
					return fmt.Sprintf("questions[%d].prior_history[%d]", i, j)
				}
			}
		}
	case fingerprint.KindStudyData:
		for i, d := range r.StudyData {
			if d.ID == l.ID {
				return fmt.Sprintf("study_data[%d]", i)
			}
		}
	case fingerprint.KindEvent:
		for i, e := range r.Events {
			if e.ID == l.ID {
				return fmt.Sprintf("events[%d]", i)
			}
		}
	}
	return "chain"
}

// Package fingerprint is the hash chain over a workshop's append-only
// record: a running SHA-256 value (the record fingerprint) that the room
// can note at each round's close, so that a later copy of the record that
// was changed in between shows another value.
//
// The SQLite triggers keep the record append-only against mistakes, but
// whoever holds the file can drop them and rewrite an old answer; the
// chain does not stop that, it makes it show against a value noted
// outside the file (on paper, in a photograph of the projector).
//
// # The chain
//
//	h₀ = SHA-256( str("parley record fingerprint v1") ‖ i64(workshop id) ‖ time(workshop created) )
//	hᵢ = SHA-256( hᵢ₋₁ ‖ bytes(fact i) )
//
// over every fact of the record, ordered by its recorded time (at), then
// by its kind's rank (revision 1, weight_set 2, agreed_prior 3,
// study_data 4, event 5: a decision's log entry after the item it
// records, which shares its time), then by its id. The fingerprint of the
// record as it stands is the last value (h₀ when there is no fact); the
// value after a fact is the record's fingerprint at the moment it was
// written. The room is shown the first 64 bits of a value, as 4 groups of
// 4 hex digits (Short).
//
// # Canonical bytes (version 1)
//
// Every field is written in a fixed order with fixed-width or
// length-prefixed parts, never as a Go struct's JSON (which would change
// when the struct gains a field):
//
//	i64(n)    8 bytes, two's complement, big-endian
//	f64(x)    the 8 bytes of its IEEE-754 binary64 bits, big-endian (so 0 and −0 differ)
//	bool(b)   1 byte, 0 or 1
//	str(s)    i64(length in bytes) then the UTF-8 bytes
//	time(t)   i64(Unix seconds) then i64(nanoseconds within the second, 0–999999999)
//	list(f)   i64(count) then each item with f
//	opt(f)    bool(present) then, if present, the value with f
//
// A fact is str(kind) followed by its fields, which are the stored row's
// (the record's JSON keys in brackets):
//
//	revision      i64(id) i64(question_id) i64(expert_id) i64(round) time(at) str(reason)
//	              answer str(entered_by; "" is written "expert") str(channel)
//	agreed_prior  i64(id) i64(question_id) str(source) f64(dist.alpha) f64(dist.beta)
//	              f64(dist.lower) f64(dist.upper) opt(answer)(consensus)
//	              opt(construction)(construction) str(rationale) i64(round)
//	              bool(while_round_open) i64(weight_set_id; 0 for none)
//	              list(i64)(pooled_revisions) time(at)
//	weight_set    i64(id) i64(workshop_id) str(scheme)
//	              list(i64(expert id) f64(weight))(by_expert, by expert id ascending)
//	              str(reason) time(at)
//	study_data    i64(id) i64(question_id) i64(successes) i64(trials) str(source)
//	              str(observed_on) time(at)
//	event         i64(id) i64(workshop_id) i64(question_id; 0 for the whole workshop)
//	              str(kind) time(at) str(reason) str(detail)
//	answer        list(f64)(values) f64(lowest) f64(highest) f64(best) f64(confidence)
//	              list(i64)(counts) bool(percent)
//	construction  str(method) f64(successes) f64(trials) f64(mean) f64(sd) f64(low)
//	              f64(high) f64(coverage) f64(lower) f64(upper)
//
// A key absent from the JSON, or null, is its zero value (0, "", false,
// an empty list, or opt absent). Left out, because they are derived or change
// after the fact without a new fact: a revision's fit (recomputed, and
// may change with Parley's version), its sheet row (read from the
// answers_imported event, which is chained), whether its reason is
// withheld (each withholding is a chained event), and a weight set's
// basis (computed from chained revisions and from true values the record
// shows only once revealed). Questions and the workshop's own text can
// be corrected, each correction with its chained event; a question's
// definition is its question_added event's detail, an expert's name is
// their expert_added event's, and record.CheckDefinitions holds their
// rows to their events.
//
// testdata/fingerprint/chain.py recomputes the chain of a record file
// with Python's standard library alone.
package fingerprint

import (
	"crypto/sha256"
	"encoding/binary"
	"encoding/hex"
	"encoding/json"
	"math"
	"slices"
	"strings"
	"time"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// Version is the version of the chain's encoding, named in Domain.
const Version = 1

// Domain is the text h₀ starts with.
const Domain = "parley record fingerprint v1"

// Kind names the kind of a fact, as the record's chain lists it.
type Kind string

// The kinds of fact the chain runs over.
const (
	KindRevision    Kind = "revision"
	KindWeightSet   Kind = "weight_set"
	KindAgreedPrior Kind = "agreed_prior"
	KindStudyData   Kind = "study_data"
	KindEvent       Kind = "event"
)

// rank orders facts recorded at the same time.
var rank = map[Kind]int{KindRevision: 1, KindWeightSet: 2, KindAgreedPrior: 3, KindStudyData: 4, KindEvent: 5}

// Value is one value of the chain: a SHA-256.
type Value [sha256.Size]byte

// Hex is the value's 64 lowercase hex digits.
func (v Value) Hex() string { return hex.EncodeToString(v[:]) }

// Short is the value's first 64 bits as 4 groups of 4 hex digits, as the
// room is shown it: "3f2a 91c0 7be4 0d15".
func (v Value) Short() string {
	h := v.Hex()
	return h[0:4] + " " + h[4:8] + " " + h[8:12] + " " + h[12:16]
}

// Facts are what the chain runs over: one workshop's append-only items.
// Their order does not matter; Of sorts them.
type Facts struct {
	Workshop   workshop.Workshop
	Revisions  []workshop.Revision
	WeightSets []workshop.Weights // the sets applied; the equal weights of a workshop that never set any are no fact
	Priors     []workshop.AgreedPrior
	Data       []workshop.StudyData
	Events     []workshop.Event
}

// Link is one fact of the chain and the chain's value after it.
type Link struct {
	Kind  Kind
	ID    int64
	At    time.Time
	Value Value
	// Closed is the round a round_closed event closed; 0 for any other fact.
	Closed int
}

// Chain is the chain of one workshop's record: its start h₀ and every
// fact in order with the value after it.
type Chain struct {
	Start Value
	Links []Link
}

// Head is the chain's last value, the record's fingerprint: h₀ when the
// record has no fact.
func (c Chain) Head() Value {
	if len(c.Links) == 0 {
		return c.Start
	}
	return c.Links[len(c.Links)-1].Value
}

// RoundCloses are the links of the round_closed events, in order: the
// record's fingerprint as each round closed.
func (c Chain) RoundCloses() []Link {
	var out []Link
	for _, l := range c.Links {
		if l.Closed > 0 {
			out = append(out, l)
		}
	}
	return out
}

// LastClose is the link of the latest close of round n (a round closed,
// reopened and closed again has closed twice), and ok false when round n
// has not closed.
func (c Chain) LastClose(n int) (Link, bool) {
	for i := len(c.Links) - 1; i >= 0; i-- {
		if c.Links[i].Closed == n {
			return c.Links[i], true
		}
	}
	return Link{}, false
}

// Find is the index of the first link whose value begins with prefix, -1
// when the start h₀ does, and ok false when no value does.
func (c Chain) Find(prefix []byte) (index int, ok bool) {
	if len(prefix) == 0 {
		return 0, false
	}
	if hasPrefix(c.Start, prefix) {
		return -1, true
	}
	for i, l := range c.Links {
		if hasPrefix(l.Value, prefix) {
			return i, true
		}
	}
	return 0, false
}

func hasPrefix(v Value, p []byte) bool {
	return len(p) <= len(v) && string(v[:len(p)]) == string(p)
}

// fact is one fact with its canonical bytes.
type fact struct {
	kind   Kind
	id     int64
	at     time.Time
	closed int
	bytes  []byte
}

// Of computes the chain of f.
func Of(f Facts) Chain {
	var facts []fact
	for _, rv := range f.Revisions {
		facts = append(facts, fact{kind: KindRevision, id: rv.ID, at: rv.At, bytes: revisionBytes(rv)})
	}
	for _, w := range f.WeightSets {
		facts = append(facts, fact{kind: KindWeightSet, id: w.ID, at: w.At, bytes: weightBytes(w)})
	}
	for _, p := range f.Priors {
		facts = append(facts, fact{kind: KindAgreedPrior, id: p.ID, at: p.At, bytes: priorBytes(p)})
	}
	for _, d := range f.Data {
		facts = append(facts, fact{kind: KindStudyData, id: d.ID, at: d.At, bytes: dataBytes(d)})
	}
	for _, e := range f.Events {
		facts = append(facts, fact{kind: KindEvent, id: e.ID, at: e.At, closed: closedRound(e), bytes: eventBytes(e)})
	}
	slices.SortStableFunc(facts, func(a, b fact) int {
		if c := a.at.Compare(b.at); c != 0 {
			return c
		}
		if c := rank[a.kind] - rank[b.kind]; c != 0 {
			return c
		}
		switch {
		case a.id < b.id:
			return -1
		case a.id > b.id:
			return 1
		}
		return 0
	})
	c := Chain{Start: Start(f.Workshop), Links: make([]Link, len(facts))}
	h := c.Start
	for i, x := range facts {
		s := sha256.New()
		s.Write(h[:])
		s.Write(x.bytes)
		s.Sum(h[:0])
		c.Links[i] = Link{Kind: x.kind, ID: x.id, At: x.at, Value: h, Closed: x.closed}
	}
	return c
}

// Start is h₀ of a workshop's chain.
func Start(w workshop.Workshop) Value {
	var e enc
	e.str(Domain)
	e.i64(w.ID)
	e.time(w.Created)
	return sha256.Sum256(e.b)
}

// closedRound is the round a round_closed event closed, from its detail
// ({"round": N}); 0 for other events.
func closedRound(e workshop.Event) int {
	if r, ok := e.Round(); ok && e.Kind == workshop.EventRoundClosed {
		return r
	}
	return 0
}

// enc appends the canonical encoding's parts.
type enc struct{ b []byte }

func (e *enc) i64(n int64)   { e.b = binary.BigEndian.AppendUint64(e.b, uint64(n)) }
func (e *enc) f64(x float64) { e.b = binary.BigEndian.AppendUint64(e.b, math.Float64bits(x)) }
func (e *enc) str(s string)  { e.i64(int64(len(s))); e.b = append(e.b, s...) }
func (e *enc) time(t time.Time) {
	e.i64(t.Unix())
	e.i64(int64(t.Nanosecond()))
}
func (e *enc) bool(b bool) {
	if b {
		e.b = append(e.b, 1)
	} else {
		e.b = append(e.b, 0)
	}
}
func (e *enc) floats(xs []float64) {
	e.i64(int64(len(xs)))
	for _, x := range xs {
		e.f64(x)
	}
}
func (e *enc) ints(ns []int64) {
	e.i64(int64(len(ns)))
	for _, n := range ns {
		e.i64(n)
	}
}

func (e *enc) answer(a workshop.Answer) {
	e.floats(a.Values)
	e.f64(a.Lowest)
	e.f64(a.Highest)
	e.f64(a.Best)
	e.f64(a.Confidence)
	counts := make([]int64, len(a.Counts))
	for i, c := range a.Counts {
		counts[i] = int64(c)
	}
	e.ints(counts)
	e.bool(a.Percent)
}

func revisionBytes(rv workshop.Revision) []byte {
	var e enc
	e.str(string(KindRevision))
	e.i64(rv.ID)
	e.i64(rv.QuestionID)
	e.i64(rv.ExpertID)
	e.i64(int64(rv.Round))
	e.time(rv.At)
	e.str(rv.Reason)
	e.answer(rv.Answer)
	by := rv.EnteredBy
	if by == "" {
		by = workshop.ByExpert // as the record writes a revision older than the field
	}
	e.str(string(by))
	e.str(string(rv.Channel))
	return e.b
}

func weightBytes(w workshop.Weights) []byte {
	var e enc
	e.str(string(KindWeightSet))
	e.i64(w.ID)
	e.i64(w.WorkshopID)
	e.str(string(w.Scheme))
	ids := make([]int64, 0, len(w.ByExpert))
	for id := range w.ByExpert {
		ids = append(ids, id)
	}
	slices.Sort(ids)
	e.i64(int64(len(ids)))
	for _, id := range ids {
		e.i64(id)
		e.f64(w.ByExpert[id])
	}
	e.str(w.Reason)
	e.time(w.At)
	return e.b
}

func priorBytes(p workshop.AgreedPrior) []byte {
	var e enc
	e.str(string(KindAgreedPrior))
	e.i64(p.ID)
	e.i64(p.QuestionID)
	e.str(string(p.Source))
	e.f64(p.Dist.Alpha)
	e.f64(p.Dist.Beta.Beta)
	e.f64(p.Dist.Lower)
	e.f64(p.Dist.Upper)
	e.bool(p.Consensus != nil)
	if p.Consensus != nil {
		e.answer(*p.Consensus)
	}
	e.bool(p.Construction != nil)
	if c := p.Construction; c != nil {
		e.construction(*c)
	}
	e.str(p.Rationale)
	e.i64(int64(p.Round))
	e.bool(p.RoundOpen)
	e.i64(p.WeightSetID)
	e.ints(p.Pooled)
	e.time(p.At)
	return e.b
}

func (e *enc) construction(c elicit.ConstructionInput) {
	e.str(string(c.Method))
	for _, x := range []float64{c.Successes, c.Trials, c.Mean, c.SD, c.Low, c.High, c.Coverage, c.Lower, c.Upper} {
		e.f64(x)
	}
}

func dataBytes(d workshop.StudyData) []byte {
	var e enc
	e.str(string(KindStudyData))
	e.i64(d.ID)
	e.i64(d.QuestionID)
	e.i64(int64(d.Successes))
	e.i64(int64(d.Trials))
	e.str(d.Source)
	e.str(d.ObservedOn)
	e.time(d.At)
	return e.b
}

func eventBytes(ev workshop.Event) []byte {
	var e enc
	e.str(string(KindEvent))
	e.i64(ev.ID)
	e.i64(ev.WorkshopID)
	e.i64(ev.QuestionID)
	e.str(string(ev.Kind))
	e.time(ev.At)
	e.str(ev.Reason)
	e.str(ev.Detail)
	return e.b
}

// RuleNoted is the rule of a noted fingerprint: 16 hex digits (the 4
// groups the room is shown) or all 64, in either letter case, with
// spaces, hyphens or colons allowed between them.
const RuleNoted elicit.Rule = "must be 16 hex digits as the room is shown them (4 groups of 4), or all 64"

// ParseNoted reads a noted value, "3f2a 91c0 7be4 0d15" or its 64-digit
// whole, into the bytes it gives. field names it in an error
// (*elicit.InputError with RuleNoted). A value noted by hand is often
// grouped with hyphens ("3f2a-91c0-7be4-0d15"), and one copied from a
// page may carry a no-break space; both were refused, so the
// facilitator's own note of the room's value did not check.
func ParseNoted(field, s string) ([]byte, error) {
	digits := strings.Map(func(r rune) rune {
		switch r {
		case ' ', '\t', '\u00a0', '\u202f', '-', ':':
			return -1
		}
		return r
	}, s)
	if n := len(digits); n != 16 && n != 64 {
		return nil, &elicit.InputError{Field: field, Rule: RuleNoted, Detail: "got " + quote(s)}
	}
	b, err := hex.DecodeString(strings.ToLower(digits))
	if err != nil {
		return nil, &elicit.InputError{Field: field, Rule: RuleNoted, Detail: "got " + quote(s)}
	}
	return b, nil
}

func quote(s string) string {
	b, _ := json.Marshal(s)
	return string(b)
}

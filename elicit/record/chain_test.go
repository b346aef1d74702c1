package record

import (
	"bufio"
	"bytes"
	"errors"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/fingerprint"
	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/elicit/workshop/workshoptest"
)

// chainDir holds the records whose chains Python recomputes.
const chainDir = "../../testdata/fingerprint"

// chainRecords are the invented workshops whose records are committed in
// testdata/fingerprint: the pump seals with every kind of fact (a weight
// set, a constructed prior, a round's close, a facilitator's entry, text
// in several scripts, a time with nanoseconds) and the valve wear panel
// (chips, revealed calibration questions).
func chainRecords(t *testing.T) map[string]Record {
	t.Helper()
	src := workshoptest.PumpSeals()
	at := func(m int, s int, ns int) time.Time {
		return workshoptest.T0.Add(time.Duration(m)*time.Minute + time.Duration(s)*time.Second + time.Duration(ns))
	}
	set := workshop.Weights{ID: 71, WorkshopID: 7, Scheme: workshop.WeightsCustom, Reason: "Ada ran the audits",
		ByExpert: map[int64]float64{21: 3, 22: 1, 23: 0.1}, At: at(6, 0, 0)}
	src.Weights, src.WeightHistory = set, []workshop.Weights{set}
	src.Revisions[1].Reason = "Wöhler curve — 語 𝔸\ttabbed\nsecond line"
	src.Revisions[1].Answer.Percent = true
	src.Revisions[2].At = at(3, 0, 123456789)
	src.Revisions[3].EnteredBy, src.Revisions[3].Channel = workshop.ByFacilitator, workshop.ChannelPhone
	src.Priors[0].WeightSetID = 71
	// The prior names the revisions it pooled (the latest of each expert
	// on question 11) with that pool's single Beta, as Validate computes
	// it; a value one ulp from its decimal neighbour.
	src.Priors[0].Pooled = []int64{32, 33, 35}
	src.Priors[0].Dist = elicit.Unit(elicit.Beta{Alpha: 4.250028395008177, Beta: 17.114528803222143})
	src.Revisions[0].Answer.Values[0] = 0.05000000000000001
	in := elicit.ConstructionInput{Method: elicit.MethodEquivalentSample, Successes: 3, Trials: 20, Lower: 0, Upper: 1}
	c, err := elicit.Construct(in)
	if err != nil {
		t.Fatal(err)
	}
	src.Priors = append(src.Priors, workshop.AgreedPrior{ID: 43, QuestionID: 11, Source: workshop.PriorFromConstruction,
		Dist: c.Dist, Construction: &in, Rationale: "a quick check", Round: 2, RoundOpen: true, WeightSetID: 71, At: at(8, 30, 0)})
	src.Events = append(src.Events,
		workshop.Event{ID: 55, WorkshopID: 7, Kind: workshop.EventRoundClosed, At: at(4, 30, 0), Reason: "all answered", Detail: `{"round":1}`},
		workshop.Event{ID: 56, WorkshopID: 7, Kind: workshop.EventRoundOpened, At: at(4, 45, 0), Reason: "discussion done", Detail: `{"round":2}`},
		workshop.Event{ID: 57, WorkshopID: 7, Kind: workshop.EventWeightsSet, At: at(6, 0, 0), Reason: "Ada ran the audits",
			Detail: `{"scheme":"custom","by_expert":{"21":3,"22":1,"23":0.1}}`},
		workshop.Event{ID: 58, WorkshopID: 7, QuestionID: 11, Kind: workshop.EventPriorAgreed, At: at(8, 30, 0), Reason: "a quick check"},
	)
	pump, err := Build(src, workshoptest.T0.Add(time.Hour))
	if err != nil {
		t.Fatal(err)
	}
	valves, err := Build(workshoptest.ValveWear(true), workshoptest.T0.Add(time.Hour))
	if err != nil {
		t.Fatal(err)
	}
	return map[string]Record{"pump_seals.json": pump, "valve_wear.json": valves}
}

// TestWriteChainRecords writes the committed records again when
// PARLEY_WRITE_CHAIN_RECORDS is set; then run
// /usr/bin/python3 testdata/fingerprint/chain.py testdata/fingerprint/*.json > testdata/fingerprint/chain_reference.txt
func TestWriteChainRecords(t *testing.T) {
	if os.Getenv("PARLEY_WRITE_CHAIN_RECORDS") == "" {
		t.Skip("set PARLEY_WRITE_CHAIN_RECORDS to write testdata/fingerprint's records again")
	}
	for name, r := range chainRecords(t) {
		var buf bytes.Buffer
		if err := r.WriteJSON(&buf); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join(chainDir, name), buf.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

// pythonChain is one record's chain as testdata/fingerprint/chain.py
// computed it.
type pythonChain struct {
	start, head string
	facts       []ChainFact // kind, id and value
}

// readPythonChains reads chain_reference.txt, written by
// testdata/fingerprint/chain.py (Python 3.11.2, hashlib) from the
// committed records' facts alone.
func readPythonChains(t *testing.T) map[string]*pythonChain {
	t.Helper()
	f, err := os.Open(filepath.Join(chainDir, "chain_reference.txt"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	out := map[string]*pythonChain{}
	var cur *pythonChain
	sc := bufio.NewScanner(f)
	if !sc.Scan() || !strings.HasPrefix(sc.Text(), "# made by testdata/fingerprint/chain.py with Python 3.") {
		t.Fatalf("chain_reference.txt does not open naming the script and Python's version: %q", sc.Text())
	}
	for sc.Scan() {
		fs := strings.Fields(sc.Text())
		switch {
		case len(fs) == 3 && fs[0] == "#":
			cur = &pythonChain{}
			out[fs[2]] = cur
		case len(fs) == 2 && fs[0] == "start":
			cur.start = fs[1]
		case len(fs) == 2 && fs[0] == "head":
			cur.head = fs[1]
		case len(fs) == 3:
			id, err := strconv.ParseInt(fs[1], 10, 64)
			if err != nil {
				t.Fatal(err)
			}
			cur.facts = append(cur.facts, ChainFact{Kind: fingerprint.Kind(fs[0]), ID: id, Value: fs[2]})
		default:
			t.Fatalf("chain_reference.txt: cannot read %q", sc.Text())
		}
	}
	return out
}

// The chain of each committed record, computed by elicit/fingerprint,
// against the same chain computed apart in Python from the encoding as
// documented (testdata/fingerprint/chain.py, Python 3.11.2, hashlib's
// SHA-256). The committed record is also the one Build writes today, and
// its own chain values are the ones Python computes.
func TestChainAgainstPython(t *testing.T) {
	want := readPythonChains(t)
	built := chainRecords(t)
	if len(want) != len(built)+len(handWritten) {
		t.Fatalf("chain_reference.txt has %d records, want %d", len(want), len(built)+len(handWritten))
	}
	for name, b := range built {
		doc, err := os.ReadFile(filepath.Join(chainDir, name))
		if err != nil {
			t.Fatal(err)
		}
		var now bytes.Buffer
		if err := b.WriteJSON(&now); err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(now.Bytes(), doc) {
			t.Errorf("%s is not the record Build writes today: run TestWriteChainRecords and chain.py again", name)
		}
		r, err := Parse(bytes.NewReader(doc))
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		py := want[name]
		if py == nil {
			t.Fatalf("no %s in chain_reference.txt", name)
		}
		c := fingerprint.Of(r.Facts())
		if c.Start.Hex() != py.start || r.Chain.Start != py.start {
			t.Errorf("%s: start %s (record %s), Python %s", name, c.Start.Hex(), r.Chain.Start, py.start)
		}
		if len(c.Links) != len(py.facts) || len(r.Chain.Facts) != len(py.facts) {
			t.Fatalf("%s: %d facts (record %d), Python %d", name, len(c.Links), len(r.Chain.Facts), len(py.facts))
		}
		for i, l := range c.Links {
			p, s := py.facts[i], r.Chain.Facts[i]
			if l.Kind != p.Kind || l.ID != p.ID || l.Value.Hex() != p.Value || s.Value != p.Value {
				t.Errorf("%s: fact %d is %s %d %s (record %s), Python %s %d %s", name, i, l.Kind, l.ID, l.Value.Hex(), s.Value, p.Kind, p.ID, p.Value)
			}
		}
		if c.Head().Hex() != py.head || r.Fingerprint != py.head {
			t.Errorf("%s: head %s (record %s), Python %s", name, c.Head().Hex(), r.Fingerprint, py.head)
		}
	}
}

// handWritten are the committed records written by hand, not by Build:
// edge_cases.json has the JSON forms Parley's writer never uses but its
// reader takes (null for a key, a list or an item; -0 and -0.0; exponents
// in capitals; an integer past 2⁵³ and one past 2⁶⁴ in a float field; the
// smallest subnormal; escapes of a surrogate pair, a combining accent and
// U+2028; a time with an offset and one with nanoseconds; facts at the
// very same nanosecond).
var handWritten = []string{"edge_cases.json"}

// The chain of each hand-written record as Parley reads it (Decode, as
// parley fingerprint does) against the same chain computed by chain.py:
// a null reads as the key left out in both.
func TestHandWrittenChainAgainstPython(t *testing.T) {
	want := readPythonChains(t)
	for _, name := range handWritten {
		f, err := os.Open(filepath.Join(chainDir, name))
		if err != nil {
			t.Fatal(err)
		}
		r, err := Decode(f)
		f.Close()
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		py := want[name]
		if py == nil {
			t.Fatalf("no %s in chain_reference.txt", name)
		}
		c := fingerprint.Of(r.Facts())
		if c.Start.Hex() != py.start {
			t.Errorf("%s: start %s, Python %s", name, c.Start.Hex(), py.start)
		}
		if len(c.Links) != len(py.facts) {
			t.Fatalf("%s: %d facts, Python %d", name, len(c.Links), len(py.facts))
		}
		for i, l := range c.Links {
			if p := py.facts[i]; l.Kind != p.Kind || l.ID != p.ID || l.Value.Hex() != p.Value {
				t.Errorf("%s: fact %d is %s %d %s, Python %s %d %s", name, i, l.Kind, l.ID, l.Value.Hex(), p.Kind, p.ID, p.Value)
			}
		}
		if c.Head().Hex() != py.head {
			t.Errorf("%s: head %s, Python %s", name, c.Head().Hex(), py.head)
		}
	}
}

// A record whose fact was changed after it was written, its chain left
// as it was, is refused naming that fact; a change the fit check cannot
// see (a reason, a value moved by less than the fit's tolerance) is
// caught by the chain alone.
func TestParseRefusesAChangedFact(t *testing.T) {
	good := goodDoc(t)
	for _, tt := range []struct{ name, old, new, field string }{
		{"a reason", `"reason":"-after discussion"`, `"reason":"-after a long discussion"`, "revisions[4]"},
		{"a value", `"values":[0.05,0.15,0.35]`, `"values":[0.05,0.15000000001,0.35]`, "revisions[0]"},
		{"a log entry's reason", `"reason":"site A log (invented)"`, `"reason":"site C log (invented)"`, "events[2]"},
		{"a batch of data", `"successes":4`, `"successes":3`, "study_data[0]"},
		{"an agreement's rationale", `"rationale":"the pool"`, `"rationale":"the pooled view"`, "questions[0].prior_history[0]"},
		{"a time", `"at":"2026-03-02T09:01:00Z"`, `"at":"2026-03-02T09:01:01Z"`, "revisions[0]"},
	} {
		t.Run(tt.name, func(t *testing.T) {
			doc := strings.Replace(good, tt.old, tt.new, 1)
			if doc == good {
				t.Fatalf("no %q in the record", tt.old)
			}
			_, err := Parse(strings.NewReader(doc))
			var ie *elicit.InputError
			if !errors.As(err, &ie) || ie.Field != tt.field || ie.Rule != RuleChainMismatch {
				t.Fatalf("Parse = %v, want %s: %s", err, tt.field, RuleChainMismatch)
			}
			// Without its chain the same record reads: it is one made
			// before Parley kept a chain, and its fingerprint differs.
			r, err := Parse(strings.NewReader(unchained(t, doc)))
			if err != nil {
				t.Fatalf("without its chain: %v", err)
			}
			if fingerprint.Of(r.Facts()).Head().Hex() == buildInvented(t).Fingerprint {
				t.Error("the changed record has the fingerprint of the record as written")
			}
		})
	}
}

// The chain and the fingerprint must agree with each other and be whole:
// one without the other, a fact left out of the chain or added to it,
// another start, and another head are refused.
func TestParseRefusesABrokenChain(t *testing.T) {
	r := buildInvented(t)
	for _, tt := range []struct {
		name  string
		edit  func(r *Record)
		field string
		rule  elicit.Rule
	}{
		{"no chain", func(r *Record) { r.Chain = nil }, "chain", RuleChainMismatch},
		{"no fingerprint", func(r *Record) { r.Fingerprint = "" }, "fingerprint", RuleChainMismatch},
		{"another version", func(r *Record) { r.Chain.Version = 2 }, "chain.version", elicit.RuleUnknown},
		{"another start", func(r *Record) { r.Workshop.Created = r.Workshop.Created.Add(time.Second) }, "chain.start", RuleChainMismatch},
		{"a fact left out", func(r *Record) { r.Chain.Facts = r.Chain.Facts[:len(r.Chain.Facts)-1] }, "events[3]", RuleChainMismatch},
		{"a fact too many", func(r *Record) { r.Chain.Facts = append(r.Chain.Facts, r.Chain.Facts[0]) }, "chain.facts[13]", RuleChainMismatch},
		{"a revision removed", func(r *Record) { r.Revisions = r.Revisions[:len(r.Revisions)-1] }, "chain.facts[5]", RuleChainMismatch},
		{"another head", func(r *Record) { r.Fingerprint = strings.Repeat("0", 64) }, "fingerprint", RuleChainMismatch},
	} {
		t.Run(tt.name, func(t *testing.T) {
			c := r
			ch := *r.Chain
			ch.Facts = append([]ChainFact(nil), r.Chain.Facts...)
			c.Chain = &ch
			c.Revisions = append([]Revision(nil), r.Revisions...)
			tt.edit(&c)
			err := c.CheckChain()
			var ie *elicit.InputError
			if !errors.As(err, &ie) || ie.Field != tt.field || ie.Rule != tt.rule {
				t.Fatalf("CheckChain = %v, want %s: %s", err, tt.field, tt.rule)
			}
		})
	}
}

// A record narrowed to one question leaves facts out, so it carries no
// chain, and reads as a record made before Parley kept one.
func TestNarrowedRecordCarriesNoChain(t *testing.T) {
	r, err := buildInvented(t).ForQuestion(11)
	if err != nil {
		t.Fatal(err)
	}
	if r.Fingerprint != "" || r.Chain != nil {
		t.Fatalf("narrowed record has fingerprint %q", r.Fingerprint)
	}
	if err := r.Validate(); err != nil {
		t.Fatal(err)
	}
}

// A record made before Parley kept a chain (no fingerprint, no chain)
// reads as before.
func TestRecordWithoutChainReads(t *testing.T) {
	doc := unchained(t, goodDoc(t))
	if strings.Contains(doc, `"fingerprint"`) || strings.Contains(doc, `"chain"`) {
		t.Fatal("the chain keys are still there")
	}
	r, err := Parse(strings.NewReader(doc))
	if err != nil {
		t.Fatal(err)
	}
	if r.Fingerprint != "" || r.Chain != nil {
		t.Fatalf("read a fingerprint %q from a record without one", r.Fingerprint)
	}
}

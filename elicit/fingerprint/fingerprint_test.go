package fingerprint

import (
	"crypto/sha256"
	"errors"
	"math"
	"strings"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/elicit/workshop/workshoptest"
)

// everyKind is the invented pump seals workshop with a weight set, a
// constructed prior and a round's close, so that every kind of fact and
// every optional part is present.
func everyKind() Facts {
	src := workshoptest.PumpSeals()
	at := func(m int) time.Time { return workshoptest.T0.Add(time.Duration(m) * time.Minute) }
	in := elicit.ConstructionInput{Method: elicit.MethodEquivalentSample, Successes: 3, Trials: 20, Lower: 0, Upper: 1}
	return Facts{
		Workshop:  src.Workshop,
		Revisions: src.Revisions,
		WeightSets: []workshop.Weights{{ID: 71, WorkshopID: 7, Scheme: workshop.WeightsCustom, Reason: "audits",
			ByExpert: map[int64]float64{21: 3, 22: 1}, At: at(6)}},
		Priors: append(src.Priors, workshop.AgreedPrior{ID: 43, QuestionID: 11, Source: workshop.PriorFromConstruction,
			Dist: elicit.Unit(elicit.Beta{Alpha: 3, Beta: 17}), Construction: &in, Rationale: "check", Round: 2,
			Pooled: []int64{31}, At: at(8)}),
		Data: src.Data,
		Events: append(src.Events, workshop.Event{ID: 55, WorkshopID: 7, Kind: workshop.EventRoundClosed,
			At: at(4), Detail: `{"round":1}`}),
	}
}

// Every stored field of every kind of fact is in its bytes: changing any
// one changes the fingerprint (a field left out of the encoding could be
// rewritten unseen).
func TestEveryFieldIsChained(t *testing.T) {
	head := Of(everyKind()).Head()
	for _, tt := range []struct {
		name string
		edit func(f *Facts)
	}{
		{"workshop id", func(f *Facts) { f.Workshop.ID++ }},
		{"workshop created", func(f *Facts) { f.Workshop.Created = f.Workshop.Created.Add(time.Nanosecond) }},
		{"revision id", func(f *Facts) { f.Revisions[0].ID = 39 }},
		{"revision question", func(f *Facts) { f.Revisions[0].QuestionID = 12 }},
		{"revision expert", func(f *Facts) { f.Revisions[0].ExpertID = 22 }},
		{"revision round", func(f *Facts) { f.Revisions[0].Round = 2 }},
		{"revision time", func(f *Facts) { f.Revisions[0].At = f.Revisions[0].At.Add(time.Nanosecond) }},
		{"revision reason", func(f *Facts) { f.Revisions[0].Reason = "x" }},
		{"revision value", func(f *Facts) { f.Revisions[0].Answer.Values[1] = math.Nextafter(0.15, 1) }},
		{"revision value list", func(f *Facts) { f.Revisions[0].Answer.Values = f.Revisions[0].Answer.Values[:2] }},
		{"revision lowest", func(f *Facts) { f.Revisions[3].Answer.Lowest = 0.11 }},
		{"revision highest", func(f *Facts) { f.Revisions[3].Answer.Highest = 0.51 }},
		{"revision best", func(f *Facts) { f.Revisions[3].Answer.Best = 0.26 }},
		{"revision confidence", func(f *Facts) { f.Revisions[3].Answer.Confidence = 0.81 }},
		{"revision counts", func(f *Facts) { f.Revisions[3].Answer.Counts = []int{1} }},
		{"revision percent", func(f *Facts) { f.Revisions[0].Answer.Percent = true }},
		{"revision entered by", func(f *Facts) { f.Revisions[0].EnteredBy = workshop.ByFacilitator }},
		{"revision channel", func(f *Facts) { f.Revisions[0].Channel = workshop.ChannelPhone }},
		{"weight set id", func(f *Facts) { f.WeightSets[0].ID = 72 }},
		{"weight set workshop", func(f *Facts) { f.WeightSets[0].WorkshopID = 8 }},
		{"weight set scheme", func(f *Facts) { f.WeightSets[0].Scheme = workshop.WeightsPerformance }},
		{"weight set weight", func(f *Facts) { f.WeightSets[0].ByExpert = map[int64]float64{21: 3, 22: 2} }},
		{"weight set expert", func(f *Facts) { f.WeightSets[0].ByExpert = map[int64]float64{21: 3, 23: 1} }},
		{"weight set reason", func(f *Facts) { f.WeightSets[0].Reason = "y" }},
		{"weight set time", func(f *Facts) { f.WeightSets[0].At = f.WeightSets[0].At.Add(time.Second) }},
		{"prior id", func(f *Facts) { f.Priors[0].ID = 49 }},
		{"prior question", func(f *Facts) { f.Priors[0].QuestionID = 12 }},
		{"prior source", func(f *Facts) { f.Priors[0].Source = workshop.PriorFromConsensus }},
		{"prior alpha", func(f *Facts) { f.Priors[0].Dist.Alpha = 3.1 }},
		{"prior beta", func(f *Facts) { f.Priors[0].Dist.Beta.Beta = 12.1 }},
		{"prior lower", func(f *Facts) { f.Priors[0].Dist.Lower = math.Copysign(0, -1) }},
		{"prior upper", func(f *Facts) { f.Priors[0].Dist.Upper = 2 }},
		{"prior consensus", func(f *Facts) { f.Priors[1].Consensus.Values[0] = 0.07 }},
		{"prior consensus gone", func(f *Facts) { f.Priors[1].Consensus = nil }},
		{"prior construction", func(f *Facts) { c := *f.Priors[2].Construction; c.Trials = 21; f.Priors[2].Construction = &c }},
		{"prior construction method", func(f *Facts) {
			c := *f.Priors[2].Construction
			c.Method = elicit.MethodUniform
			f.Priors[2].Construction = &c
		}},
		{"prior construction gone", func(f *Facts) { f.Priors[2].Construction = nil }},
		{"prior rationale", func(f *Facts) { f.Priors[0].Rationale = "z" }},
		{"prior round", func(f *Facts) { f.Priors[0].Round = 1 }},
		{"prior while open", func(f *Facts) { f.Priors[0].RoundOpen = true }},
		{"prior weight set", func(f *Facts) { f.Priors[0].WeightSetID = 71 }},
		{"prior pooled", func(f *Facts) { f.Priors[2].Pooled = []int64{32} }},
		{"prior time", func(f *Facts) { f.Priors[0].At = f.Priors[0].At.Add(time.Second) }},
		{"data id", func(f *Facts) { f.Data[0].ID = 69 }},
		{"data question", func(f *Facts) { f.Data[0].QuestionID = 12 }},
		{"data successes", func(f *Facts) { f.Data[0].Successes = 5 }},
		{"data trials", func(f *Facts) { f.Data[0].Trials = 26 }},
		{"data source", func(f *Facts) { f.Data[0].Source = "w" }},
		{"data observed", func(f *Facts) { f.Data[0].ObservedOn = "2026-02-26" }},
		{"data time", func(f *Facts) { f.Data[0].At = f.Data[0].At.Add(time.Second) }},
		{"event id", func(f *Facts) { f.Events[0].ID = 59 }},
		{"event workshop", func(f *Facts) { f.Events[0].WorkshopID = 8 }},
		{"event question", func(f *Facts) { f.Events[0].QuestionID = 11 }},
		{"event kind", func(f *Facts) { f.Events[0].Kind = workshop.EventRoundOpened }},
		{"event time", func(f *Facts) { f.Events[0].At = f.Events[0].At.Add(time.Nanosecond) }},
		{"event reason", func(f *Facts) { f.Events[0].Reason = "v" }},
		{"event detail", func(f *Facts) { f.Events[4].Detail = `{"round": 1}` }},
		{"a fact removed", func(f *Facts) { f.Data = f.Data[:1] }},
	} {
		f := everyKind()
		// Deep enough copies of what the edits change.
		f.Revisions = append([]workshop.Revision(nil), f.Revisions...)
		f.Revisions[0].Answer.Values = append([]float64(nil), f.Revisions[0].Answer.Values...)
		f.Priors = append([]workshop.AgreedPrior(nil), f.Priors...)
		c := *f.Priors[1].Consensus
		c.Values = append([]float64(nil), c.Values...)
		f.Priors[1].Consensus = &c
		f.Data = append([]workshop.StudyData(nil), f.Data...)
		f.Events = append([]workshop.Event(nil), f.Events...)
		tt.edit(&f)
		if Of(f).Head() == head {
			t.Errorf("%s: the fingerprint did not change", tt.name)
		}
	}
	if Of(everyKind()).Head() != head {
		t.Fatal("the fingerprint is not a function of the facts")
	}
}

// What is derived or changes without a new fact is not chained: a
// revision's kept fit and whether its reason is withheld (each withholding
// is an event), an empty EnteredBy (read as the expert's, as the record
// writes it), a weight set's basis, and the order the facts are given in.
func TestDerivedPartsAreNotChained(t *testing.T) {
	head := Of(everyKind()).Head()
	f := everyKind()
	f.Revisions = append([]workshop.Revision(nil), f.Revisions...)
	f.Revisions[0].ReasonWithheld = true
	f.Revisions[0].Kept = &elicit.Fit{SSE: 1}
	f.Revisions[1].EnteredBy = workshop.ByExpert
	f.WeightSets[0].Basis = &workshop.WeightBasis{}
	f.Events[0], f.Events[1] = f.Events[1], f.Events[0]
	if Of(f).Head() != head {
		t.Error("a derived part changed the fingerprint")
	}
}

// The chain only grows: the value after a fact is the fingerprint the
// record had when that fact was its last, whatever is written later. So
// a value noted at a round's close is found in every later copy.
func TestValueAtACloseStaysAsLaterFactsArrive(t *testing.T) {
	all := everyKind()
	full := Of(all)
	closes := full.RoundCloses()
	if len(closes) != 1 || closes[0].Closed != 1 || closes[0].ID != 55 {
		t.Fatalf("round closes %+v, want event 55 closing round 1", closes)
	}
	// The record as it stood when round 1 closed: the facts up to then.
	cut := closes[0].At
	var then Facts
	then.Workshop = all.Workshop
	for _, r := range all.Revisions {
		if !r.At.After(cut) {
			then.Revisions = append(then.Revisions, r)
		}
	}
	for _, e := range all.Events {
		if !e.At.After(cut) {
			then.Events = append(then.Events, e)
		}
	}
	if got := Of(then).Head(); got != closes[0].Value {
		t.Fatalf("fingerprint when round 1 closed %s, the full chain says %s", got.Short(), closes[0].Value.Short())
	}
	if i, ok := full.Find(closes[0].Value[:8]); !ok || full.Links[i].ID != 55 {
		t.Fatalf("Find = %d, %v", i, ok)
	}
	if i, ok := full.Find(full.Start[:8]); !ok || i != -1 {
		t.Fatalf("Find(start) = %d, %v", i, ok)
	}
	if _, ok := full.Find([]byte{0, 0, 0, 0, 0, 0, 0, 0}); ok {
		t.Fatal("Find found a value that is not there")
	}
	if l, ok := full.LastClose(1); !ok || l != closes[0] {
		t.Fatalf("LastClose(1) = %+v, %v", l, ok)
	}
	if _, ok := full.LastClose(2); ok {
		t.Fatal("LastClose(2) found a close of a round that never closed")
	}
	// Round 1 closed again later: the room is shown the latest close.
	again := all
	again.Events = append(append([]workshop.Event(nil), all.Events...), workshop.Event{ID: 99, WorkshopID: all.Workshop.ID,
		Kind: workshop.EventRoundClosed, At: full.Links[len(full.Links)-1].At.Add(time.Hour), Detail: `{"round":1}`})
	if l, ok := Of(again).LastClose(1); !ok || l.ID != 99 {
		t.Fatalf("LastClose(1) after a second close = %+v, %v; want event 99", l, ok)
	}
}

// The start value by the documented recipe, written out by hand here:
// SHA-256 of the length-prefixed domain text, the id and the created time
// as seconds and nanoseconds.
func TestStartValue(t *testing.T) {
	w := workshop.Workshop{ID: 7, Created: time.Date(2026, 3, 2, 9, 0, 0, 5, time.UTC)}
	var b []byte
	b = append(b, 0, 0, 0, 0, 0, 0, 0, byte(len(Domain)))
	b = append(b, Domain...)
	b = append(b, 0, 0, 0, 0, 0, 0, 0, 7)
	secs := w.Created.Unix()
	for i := 7; i >= 0; i-- {
		b = append(b, byte(secs>>(8*i)))
	}
	b = append(b, 0, 0, 0, 0, 0, 0, 0, 5)
	if got, want := Start(w), Value(sha256.Sum256(b)); got != want {
		t.Fatalf("Start = %s, want %s", got.Hex(), want.Hex())
	}
	if s := Start(w).Short(); len(s) != 19 || s[4] != ' ' || s[:4] != Start(w).Hex()[:4] {
		t.Fatalf("Short = %q", s)
	}
}

func TestParseNoted(t *testing.T) {
	v := Of(everyKind()).Head()
	// Grouped by hand with hyphens or colons, or copied from a page with
	// no-break spaces, the value reads as typed with spaces.
	for _, s := range []string{v.Short(), v.Hex(), "  " + v.Hex()[:16] + " ", strings.ToUpper(v.Short()),
		strings.ReplaceAll(v.Short(), " ", "-"), strings.ReplaceAll(v.Short(), " ", ":"), strings.ReplaceAll(v.Short(), " ", "\u00a0")} {
		b, err := ParseNoted("check", s)
		if err != nil || !hasPrefix(v, b) {
			t.Errorf("ParseNoted(%q) = %x, %v", s, b, err)
		}
	}
	for _, s := range []string{"", "3f2a 91c0 7be4", "3f2a 91c0 7be4 0d1g", "3f2a_91c0_7be4_0d15", "3f2a-91c0-7be4", v.Hex() + "0"} {
		_, err := ParseNoted("check", s)
		var ie *elicit.InputError
		if !errors.As(err, &ie) || ie.Field != "check" || ie.Rule != RuleNoted {
			t.Errorf("ParseNoted(%q) = %v, want check: %s", s, err, RuleNoted)
		}
	}
}

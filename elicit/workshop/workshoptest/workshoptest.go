// Package workshoptest holds invented workshops, as storage would return
// them, for the tests of the packages that read workshops.
package workshoptest

import (
	"time"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// T0 is the invented workshops' starting time.
var T0 = time.Date(2026, 3, 2, 9, 0, 0, 0, time.UTC)

// PumpSeals is an invented workshop on a pump seal failure share:
// three experts, a quantile question with two rounds, a hidden
// calibration question, custom weights and two agreed priors.
func PumpSeals() workshop.Snapshot {
	truth := 0.3
	w := workshop.Workshop{ID: 7, Title: "Pump seals (invented)", Purpose: "prior for a failure share",
		Decision: "spare stock", Notes: "=not a formula", Round: 2, Open: true, Invented: true, Created: T0}
	qs := []workshop.Question{
		{ID: 11, WorkshopID: 7, Position: 1, Wording: "Share of seals failing within a year?",
			Quantity: "failure share", Units: "proportion", Lower: 0, Upper: 1,
			Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95}},
		{ID: 12, WorkshopID: 7, Position: 2, Wording: "Share of audited pumps leaking last year?",
			Quantity: "leak share", Lower: 0, Upper: 1, Format: workshop.FormatInterval,
			Calibration: true, TrueValue: &truth},
	}
	es := []workshop.Expert{
		{ID: 21, WorkshopID: 7, Name: "Ada", Affiliation: "Plant A", Created: T0},
		{ID: 22, WorkshopID: 7, Name: "Bela", Created: T0},
		{ID: 23, WorkshopID: 7, Name: "Chidi", Revoked: true, Created: T0},
	}
	at := func(m int) time.Time { return T0.Add(time.Duration(m) * time.Minute) }
	rs := []workshop.Revision{
		{ID: 31, QuestionID: 11, ExpertID: 21, Round: 1, At: at(1), Answer: workshop.Answer{Values: []float64{0.05, 0.15, 0.35}}},
		{ID: 32, QuestionID: 11, ExpertID: 22, Round: 1, At: at(2), Answer: workshop.Answer{Values: []float64{0.1, 0.2, 0.4}}},
		{ID: 33, QuestionID: 11, ExpertID: 23, Round: 1, At: at(3), Answer: workshop.Answer{Values: []float64{0.2, 0.5, 0.8}}},
		{ID: 34, QuestionID: 12, ExpertID: 21, Round: 1, At: at(4),
			Answer: workshop.Answer{Lowest: 0.1, Highest: 0.5, Best: 0.25, Confidence: 0.8}},
		{ID: 35, QuestionID: 11, ExpertID: 21, Round: 2, At: at(5), Reason: "-after discussion",
			Answer: workshop.Answer{Values: []float64{0.08, 0.18, 0.36}}},
	}
	// The consensus is Beta(4.2, 17.9)'s own 5/50/95 percentiles (R 4.2.2
	// qbeta), so the agreed prior is its fit, as the panel's form makes it.
	consensus := workshop.Answer{Values: []float64{0.073412589023379202, 0.180604212155905025, 0.339070562704283707}}
	return workshop.Snapshot{
		Workshop:  w,
		Questions: qs,
		Experts:   es,
		Revisions: rs,
		Weights: workshop.Weights{WorkshopID: 7, Scheme: workshop.WeightsCustom, Reason: "Ada ran the audits",
			ByExpert: map[int64]float64{21: 3, 22: 1, 23: 1}, At: at(6)},
		Priors: []workshop.AgreedPrior{
			{ID: 41, QuestionID: 11, Source: workshop.PriorFromPool, Dist: elicit.Unit(elicit.Beta{Alpha: 3, Beta: 12}),
				Rationale: "the pool", Round: 2, At: at(7)},
			{ID: 42, QuestionID: 11, Source: workshop.PriorFromConsensus, Dist: elicit.Unit(elicit.Beta{Alpha: 4.2, Beta: 17.9}),
				Consensus: &consensus, Rationale: "agreed in discussion", Round: 2, At: at(8)},
		},
		// Two batches of invented field data for question 11: 9 failures
		// in 60 seals in all.
		Data: []workshop.StudyData{
			{ID: 61, QuestionID: 11, Successes: 4, Trials: 25, Source: "site A log (invented)", ObservedOn: "2026-02-27", At: at(9)},
			{ID: 62, QuestionID: 11, Successes: 5, Trials: 35, Source: "site B log (invented)", ObservedOn: "2026-02-28", At: at(10)},
		},
		Events: []workshop.Event{
			{ID: 51, WorkshopID: 7, Kind: workshop.EventWorkshopCreated, At: T0},
			{ID: 52, WorkshopID: 7, QuestionID: 11, Kind: workshop.EventPriorAgreed, At: at(8), Reason: "agreed in discussion"},
			{ID: 53, WorkshopID: 7, QuestionID: 11, Kind: workshop.EventDataRecorded, At: at(9), Reason: "site A log (invented)"},
			{ID: 54, WorkshopID: 7, QuestionID: 11, Kind: workshop.EventDataRecorded, At: at(10), Reason: "site B log (invented)"},
		},
	}
}

// ValveWear is an invented workshop on valve wear: three experts (B
// far too sure of himself), three calibration questions at 5/50/95 with
// true values 0.30, 0.50 and 0.20, one calibration question in chips and
// one at quartiles (both left out of the scoring), and one target
// question. Expert D is revoked and answered everything.
func ValveWear(revealed bool) workshop.Snapshot {
	p := []float64{0.05, 0.5, 0.95}
	tv := func(v float64) *float64 { return &v }
	qs := []workshop.Question{
		{ID: 101, WorkshopID: 9, Position: 1, Wording: "Target", Quantity: "worn share", Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: p},
		{ID: 102, WorkshopID: 9, Position: 2, Wording: "Seed 1", Quantity: "s1", Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: p, Calibration: true, TrueValue: tv(0.30), Revealed: revealed},
		{ID: 103, WorkshopID: 9, Position: 3, Wording: "Seed 2", Quantity: "s2", Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: p, Calibration: true, TrueValue: tv(0.50), Revealed: revealed},
		{ID: 104, WorkshopID: 9, Position: 4, Wording: "Seed 3", Quantity: "s3", Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: p, Calibration: true, TrueValue: tv(0.20), Revealed: revealed},
		{ID: 105, WorkshopID: 9, Position: 5, Wording: "Chips seed", Quantity: "s4", Lower: 0, Upper: 1, Format: workshop.FormatChips, BinEdges: []float64{0, 0.3, 0.6, 1}, Chips: 10, Calibration: true, TrueValue: tv(0.4), Revealed: revealed},
		{ID: 106, WorkshopID: 9, Position: 6, Wording: "Quartile seed", Quantity: "s5", Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: workshop.ProbsQuartiles, Calibration: true, TrueValue: tv(0.4), Revealed: revealed},
	}
	es := []workshop.Expert{
		{ID: 1, WorkshopID: 9, Name: "A", Created: T0},
		{ID: 2, WorkshopID: 9, Name: "B", Created: T0},
		{ID: 3, WorkshopID: 9, Name: "C", Created: T0},
		{ID: 4, WorkshopID: 9, Name: "D", Revoked: true, Created: T0},
	}
	var rs []workshop.Revision
	add := func(q, e int64, v ...float64) {
		rs = append(rs, workshop.Revision{ID: int64(len(rs) + 1), QuestionID: q, ExpertID: e, Round: 1, At: T0, Answer: workshop.Answer{Values: v}})
	}
	add(102, 1, 0.05, 0.2, 0.4) // superseded below
	add(102, 1, 0.10, 0.25, 0.50)
	add(103, 1, 0.30, 0.55, 0.80)
	add(104, 1, 0.05, 0.15, 0.40)
	add(102, 2, 0.60, 0.62, 0.64)
	add(103, 2, 0.10, 0.12, 0.14)
	add(104, 2, 0.70, 0.72, 0.74)
	add(102, 3, 0.20, 0.35, 0.60)
	add(103, 3, 0.20, 0.45, 0.70)
	add(104, 3, 0.10, 0.25, 0.45)
	for _, q := range []int64{102, 103, 104} {
		add(q, 4, 0.01, 0.02, 0.03)
	}
	add(106, 1, 0.2, 0.4, 0.6)
	add(101, 1, 0.05, 0.15, 0.35)
	add(101, 2, 0.28, 0.30, 0.32)
	add(101, 3, 0.10, 0.20, 0.40)
	return workshop.Snapshot{
		Workshop:  workshop.Workshop{ID: 9, Title: "Valve wear (invented)", Round: 1, Open: true, Invented: true, Created: T0},
		Questions: qs, Experts: es, Revisions: rs,
		Weights: workshop.Weights{WorkshopID: 9, Scheme: workshop.WeightsEqual, At: T0},
	}
}

package web

import (
	"context"
	"fmt"
	"strconv"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// DemoLink is one demo expert's private link, returned once by SeedDemo
// so the person starting Parley can open the expert pages.
type DemoLink struct {
	Name string
	Path string // "/e/{token}/"
}

func ptr(v float64) *float64 { return &v }

// The demo is an invented scenario: a utility's reliability team
// eliciting the proportion of a new inverter model that fails in its
// first year. Every name, number and "true value" below is made up.
var (
	demoWorkshop = workshop.Workshop{
		Title: "Invented demo: first-year failures of the HX-40 inverter",
		Purpose: "INVENTED SCENARIO. The reliability team of an invented regional utility, Northfield Power Cooperative, " +
			"is about to install a new (invented) string inverter model, the HX-40, across its solar sites. " +
			"No field data exist yet. The panel gives its judgement of the proportion of units that will fail in their first year.",
		Decision: "INVENTED. The agreed prior feeds the spare-parts order for year one and the Bayesian reliability model " +
			"that will be updated as field returns arrive.",
		// Notes is completed by demoNotes, which counts the calibration questions.
		Notes:    "Demo data, all invented. One panel member (Ole Brandt) is deliberately overconfident: compare the widths of the fits. ",
		Invented: true,
	}
	demoQuestions = []workshop.Question{
		{
			Wording: "Of the HX-40 inverters installed next spring, what proportion will fail (need a replacement or a main-board repair) " +
				"within their first 12 months in service? Give the value you think has a 5% chance of not being exceeded, " +
				"your median, and the value with a 95% chance of not being exceeded.",
			Quantity: "first-year failure proportion, HX-40", Units: "proportion of units",
			Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95},
		},
		{
			Wording:  "(Invented.) What proportion of the older HX-30 units installed in the (invented) 2023 batch failed within their first year?",
			Quantity: "first-year failure proportion, HX-30 2023 batch", Units: "proportion of units",
			Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95},
			Calibration: true, TrueValue: ptr(0.0413),
		},
		{
			Wording:  "(Invented.) Of last year's inverter field returns at the cooperative, what proportion were traced to a capacitor fault?",
			Quantity: "share of returns from capacitor faults", Units: "proportion of returns",
			Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: []float64{0.25, 0.5, 0.75},
			Calibration: true, TrueValue: ptr(0.3268),
		},
	}
	demoExperts = []workshop.Expert{
		{Name: "Ines Varga", Affiliation: "Field service (invented)", Expertise: "Ten years commissioning and repairing string inverters."},
		{Name: "Tomas Lindqvist", Affiliation: "Reliability engineering (invented)", Expertise: "Accelerated life testing of power electronics."},
		{Name: "Priya Raman", Affiliation: "Supplier quality (invented)", Expertise: "Audits the inverter maker's production line."},
		{Name: "Ole Brandt", Affiliation: "Warranty analytics (invented)", Expertise: "Warranty claims data; tends to be very sure of himself."},
	}
	// demoAnswers are round-1 answers: expert index → question index → values.
	// Priya has not answered yet; Ole's intervals are far too narrow.
	demoAnswers = []struct {
		Expert, Question int
		Values           []float64
		Reason           string
	}{
		{0, 0, []float64{0.01, 0.04, 0.12}, ""},
		{1, 0, []float64{0.02, 0.05, 0.10}, ""},
		{3, 0, []float64{0.028, 0.030, 0.033}, ""},
		{0, 1, []float64{0.015, 0.045, 0.10}, ""},
		{3, 1, []float64{0.060, 0.063, 0.066}, ""},
		{1, 2, []float64{0.20, 0.30, 0.40}, ""},
	}
)

// The demo's agreed prior for its target question: a consensus judgement
// (5%, 50% and 95% points), invented like the rest.
var (
	demoConsensus = []float64{0.015, 0.045, 0.11}
	demoRationale = "INVENTED. In discussion the panel set aside the narrowest range as too sure for a model with no field history, " +
		"and settled on a median near the older model's 4.1% with a long upper tail for early-life faults. Agreed before the fourth expert had answered; " +
		"to be reviewed when that answer is in."
)

// demoNotes is the demo workshop's facilitator notes, with the number of
// calibration questions counted from the demo's questions.
func demoNotes() string {
	n := len(demoSeeds)
	for _, q := range demoQuestions {
		if q.Calibration {
			n++
		}
	}
	return demoWorkshop.Notes + fmt.Sprintf("Its %s calibration questions have invented true values, stored hidden until revealed on the calibration page.", numberWord(n))
}

// numberWord writes small counts in words, as prose does.
func numberWord(n int) string {
	words := []string{"no", "one", "two", "three", "four", "five", "six", "seven", "eight", "nine", "ten"}
	if n >= 0 && n < len(words) {
		return words[n]
	}
	return strconv.Itoa(n)
}

// SeedDemo creates the invented demo workshop when the database has no
// workshop at all, and returns its experts' private links (shown once; the
// store keeps only hashes). With any workshop present it does nothing and
// returns nil.
func SeedDemo(ctx context.Context, st Store) ([]DemoLink, error) {
	existing, err := st.Workshops(ctx)
	if err != nil {
		return nil, err
	}
	if len(existing) > 0 {
		return nil, nil
	}
	ws := demoWorkshop
	ws.Notes = demoNotes()
	if err := st.CreateWorkshop(ctx, &ws); err != nil {
		return nil, fmt.Errorf("web: demo workshop: %w", err)
	}
	qs := make([]workshop.Question, len(demoQuestions))
	for i, q := range demoQuestions {
		q.WorkshopID = ws.ID
		q.Probs = append([]float64(nil), q.Probs...)
		if q.TrueValue != nil {
			q.TrueValue = ptr(*q.TrueValue)
		}
		if err := q.Validate(); err != nil {
			return nil, fmt.Errorf("web: demo question %d: %w", i+1, err)
		}
		if err := st.AddQuestion(ctx, &q); err != nil {
			return nil, fmt.Errorf("web: demo question %d: %w", i+1, err)
		}
		qs[i] = q
	}
	links := make([]DemoLink, len(demoExperts))
	es := make([]workshop.Expert, len(demoExperts))
	for i, e := range demoExperts {
		e.WorkshopID = ws.ID
		token, hash, err := newToken()
		if err != nil {
			return nil, err
		}
		if err := st.AddExpert(ctx, &e, hash); err != nil {
			return nil, fmt.Errorf("web: demo expert %s: %w", e.Name, err)
		}
		es[i] = e
		links[i] = DemoLink{Name: e.Name, Path: expertPath(token)}
	}
	for _, a := range demoAnswers {
		rv := workshop.Revision{
			QuestionID: qs[a.Question].ID, ExpertID: es[a.Expert].ID, Reason: a.Reason,
			Answer: workshop.Answer{Values: append([]float64(nil), a.Values...)},
		}
		if err := keepFit(qs[a.Question], &rv); err != nil {
			return nil, fmt.Errorf("web: demo answer: %w", err)
		}
		if err := st.SaveRevision(ctx, &rv); err != nil {
			return nil, fmt.Errorf("web: demo answer: %w", err)
		}
	}
	if err := seedDemoCalibration(ctx, st, ws.ID, es); err != nil { // demo_calibration.go
		return nil, err
	}
	// The panel's agreed prior for the target question, so the way from
	// the agreed prior to the study can be tried at once.
	consensus := workshop.Answer{Values: append([]float64(nil), demoConsensus...)}
	fit, err := qs[0].Fit(consensus)
	if err != nil {
		return nil, fmt.Errorf("web: demo agreed prior: %w", err)
	}
	prior := workshop.AgreedPrior{QuestionID: qs[0].ID, Source: workshop.PriorFromConsensus, Dist: fit.Dist,
		Consensus: &consensus, Rationale: demoRationale, RoundOpen: true}
	if err := st.AgreePrior(ctx, &prior); err != nil {
		return nil, fmt.Errorf("web: demo agreed prior: %w", err)
	}
	return links, nil
}

// keepFit fits rv's answer under q, as a save from the form does, and
// keeps the fit with the revision.
func keepFit(q workshop.Question, rv *workshop.Revision) error {
	f, err := q.Fit(rv.Answer)
	if err != nil {
		return err
	}
	rv.Kept = &f
	return nil
}

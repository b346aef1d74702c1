package web

import (
	"context"
	"fmt"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// More calibration questions of the invented inverter demo, so that the
// calibration page has scores from first start. Every wording, true value
// and answer is made up. Ole Brandt's narrow ranges miss every true value;
// the others' ranges mostly hold them.
var (
	demoSeeds = []workshop.Question{
		{
			Wording:  "(Invented.) At the cooperative's older (invented) sites, what proportion of HX-30 inverters needed a new cooling fan within three years of installation?",
			Quantity: "three-year fan replacement share, HX-30", Units: "proportion of units",
			Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95},
			Calibration: true, TrueValue: ptr(0.1846),
		},
		{
			Wording:  "(Invented.) In the (invented) 2024 site inspections, what proportion of string inverters showed corrosion on their DC connectors?",
			Quantity: "share of inverters with connector corrosion", Units: "proportion of units",
			Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95},
			Calibration: true, TrueValue: ptr(0.0687),
		},
		{
			Wording:  "(Invented.) What proportion of the (invented) 2022 batch of HX-30 units were still running their original firmware two years later?",
			Quantity: "share still on original firmware", Units: "proportion of units",
			Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95},
			Calibration: true, TrueValue: ptr(0.5521),
		},
	}
	// demoSeedAnswers[expert][seed] are 5/50/95 answers, experts in the
	// order of demoExperts.
	demoSeedAnswers = [][][]float64{
		{{0.08, 0.17, 0.32}, {0.03, 0.08, 0.16}, {0.35, 0.55, 0.75}},          // Ines Varga
		{{0.05, 0.15, 0.35}, {0.02, 0.06, 0.15}, {0.30, 0.60, 0.85}},          // Tomas Lindqvist
		{{0.10, 0.22, 0.40}, {0.04, 0.10, 0.20}, {0.40, 0.62, 0.80}},          // Priya Raman
		{{0.100, 0.105, 0.110}, {0.120, 0.125, 0.130}, {0.300, 0.310, 0.320}}, // Ole Brandt
	}
)

// seedDemoCalibration adds the demo's further calibration questions, with
// their hidden invented true values, and the four experts' answers.
func seedDemoCalibration(ctx context.Context, st Store, workshopID int64, experts []workshop.Expert) error {
	if len(experts) != len(demoSeedAnswers) {
		return fmt.Errorf("web: demo calibration: %d experts, answers for %d", len(experts), len(demoSeedAnswers))
	}
	for j, q := range demoSeeds {
		q.WorkshopID = workshopID
		q.Probs = append([]float64(nil), q.Probs...)
		q.TrueValue = ptr(*q.TrueValue)
		if err := st.AddQuestion(ctx, &q); err != nil {
			return fmt.Errorf("web: demo calibration question %d: %w", j+1, err)
		}
		for i, e := range experts {
			rv := workshop.Revision{QuestionID: q.ID, ExpertID: e.ID,
				Answer: workshop.Answer{Values: append([]float64(nil), demoSeedAnswers[i][j]...)}}
			if err := keepFit(q, &rv); err != nil {
				return fmt.Errorf("web: demo calibration answer: %w", err)
			}
			if err := st.SaveRevision(ctx, &rv); err != nil {
				return fmt.Errorf("web: demo calibration answer: %w", err)
			}
		}
	}
	return nil
}

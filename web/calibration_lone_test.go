package web

import (
	"context"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// One expert on one calibration question: no rerun of the robustness
// analysis can be done, and the table's lead said "the largest of all is
// 0", a steadiness nothing tested.
func TestSteadinessOfALonePanelSaysNothingWasTested(t *testing.T) {
	h := newHarness(t)
	h.signIn()
	ctx := context.Background()
	ws := workshop.Workshop{Title: "Lone panel (invented)", Purpose: "Invented test panel", Invented: true}
	if err := h.db.CreateWorkshop(ctx, &ws); err != nil {
		t.Fatal(err)
	}
	truth := 0.3
	target := workshop.Question{WorkshopID: ws.ID, Wording: "Target?", Quantity: "target share", Upper: 1, Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95}}
	seed := workshop.Question{WorkshopID: ws.ID, Wording: "Seed?", Quantity: "seed share", Upper: 1, Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95},
		Calibration: true, TrueValue: &truth}
	for _, q := range []*workshop.Question{&target, &seed} {
		if err := h.db.AddQuestion(ctx, q); err != nil {
			t.Fatal(err)
		}
	}
	h.expertAnswering(ws.ID, "Sole Expert", []int64{target.ID, seed.ID}, []float64{0.2, 0.3, 0.5}, []float64{0.1, 0.3, 0.5})
	_, body := h.get(calibrationPath(ws.ID))
	if !strings.Contains(body, `id="robustness"`) {
		t.Fatal("no robustness section")
	}
	if strings.Contains(body, "the largest of all is 0") {
		t.Error("the robustness table says the largest shift is 0 though no rerun was done")
	}
	if !strings.Contains(body, "No rerun could be done") {
		t.Error("the robustness table does not say no rerun could be done")
	}
}

// Before the scores can be computed (a calibration question still
// without its true value), the weights form's performance choice does not
// point at "the scores above": the page shows none (found in review).
func TestPerformanceChoiceWaitsForTheScores(t *testing.T) {
	h := newHarness(t)
	h.signIn()
	ctx := context.Background()
	ws := workshop.Workshop{Title: "Waiting panel (invented)", Purpose: "Invented test panel", Invented: true}
	if err := h.db.CreateWorkshop(ctx, &ws); err != nil {
		t.Fatal(err)
	}
	seed := workshop.Question{WorkshopID: ws.ID, Wording: "Seed?", Quantity: "seed share", Upper: 1, Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95},
		Calibration: true}
	if err := h.db.AddQuestion(ctx, &seed); err != nil {
		t.Fatal(err)
	}
	for _, name := range []string{"First Expert", "Second Expert"} {
		h.expertAnswering(ws.ID, name, []int64{seed.ID}, []float64{0.1, 0.3, 0.5})
	}
	_, body := h.get(calibrationPath(ws.ID))
	if !strings.Contains(body, `id="weights"`) {
		t.Fatal("no weights form on the page")
	}
	if strings.Contains(body, "from the scores above") {
		t.Error("the weights form offers performance weights from the scores above, and the page shows no scores")
	}
	if !strings.Contains(body, performanceChoice(false)) {
		t.Error("the weights form does not say performance weights wait for the scores")
	}
}

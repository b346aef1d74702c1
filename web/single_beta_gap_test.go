package web

import (
	"context"
	"net/http"
	"net/url"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// A panel of one expert pools to that expert's Beta exactly
// (elicit.Pool.BestBeta makes no fit then), and the panel and the report
// say so, where they used to say the single Beta was "at most 0" from the
// pool. A panel of several keeps the distance.
func TestSingleBetaOfOneExpertIsThePool(t *testing.T) {
	h := newHarness(t)
	h.signIn()
	ctx := context.Background()
	ws := h.newWorkshop("Pump seals, one expert (invented)")
	q := workshop.Question{WorkshopID: ws.ID, Wording: "Share of seals failing in a year?", Quantity: "seal failure share",
		Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: workshop.ProbsDefault}
	if err := h.db.AddQuestion(ctx, &q); err != nil {
		t.Fatal(err)
	}
	e := workshop.Expert{WorkshopID: ws.ID, Name: "Ada (invented)"}
	if err := h.db.AddExpert(ctx, &e, []byte("one-expert")); err != nil {
		t.Fatal(err)
	}
	rv := workshop.Revision{QuestionID: q.ID, ExpertID: e.ID, Answer: workshop.Answer{Values: []float64{0.02, 0.05, 0.12}}}
	if err := h.db.SaveRevision(ctx, &rv); err != nil {
		t.Fatal(err)
	}
	_, panel := h.get(questionPath(ws.ID, q.ID))
	_, report := h.get(workshopPath(ws.ID) + "/report")
	if !strings.Contains(panel, "The single Beta is the pool itself") || strings.Contains(panel, "at most 0 (in probability)") {
		t.Error("the panel of one expert does not say its single Beta is the pool")
	}
	if !strings.Contains(report, "the pool itself (every expert with weight in the pool") || strings.Contains(report, "at most 0 from the pool") {
		t.Error("the report of one expert does not say its single Beta is the pool")
	}

	h2, ws2, qs, _, _ := seeded(t)
	_, panel = h2.get(questionPath(ws2.ID, qs[0].ID))
	if !strings.Contains(panel, "The single Beta&#39;s CDF is at most 0.1") || strings.Contains(panel, "is the pool itself") {
		t.Error("the demo's panel of four does not give its single Beta's distance from the pool")
	}
}

// Walking the invented demo under performance weights, which give Ines
// Varga all the weight: the panel and the report said the single Beta is
// the pool itself because "every pooled expert's fit is this one Beta",
// while Tomas Lindqvist and Ole Brandt, pooled at weight 0, had judged
// otherwise (Ole Brandt far narrower). They say it of the experts with
// weight.
func TestSingleBetaOfOneWeightedExpertIsThePool(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	if res, body := h.post(workshopPath(ws.ID)+"/calibration/weights", url.Values{"scheme": {"performance"}, "reason": {"Classical model weights (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("weights: %d %s", res.StatusCode, body)
	}
	_, panel := h.get(questionPath(ws.ID, qs[0].ID))
	_, report := h.get(workshopPath(ws.ID) + "/report")
	for where, body := range map[string]string{"panel": panel, "report": report} {
		if strings.Contains(body, "every pooled expert&#39;s fit is this one Beta") || strings.Contains(body, "every pooled expert's fit is this one Beta") {
			t.Errorf("the %s says every pooled expert has the single Beta, with two of them at weight 0 and other fits", where)
		}
		if !strings.Contains(body, "every expert with weight in the pool has this one fitted Beta") {
			t.Errorf("the %s does not say the experts with weight have the single Beta", where)
		}
	}
}

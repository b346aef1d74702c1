package web

import (
	"context"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// A question's panel in a workshop with no expert yet showed the table of
// judgements as its headings alone, and a choice of expert with nobody in
// it, whose button led to a refusal. Both say in words that there is no
// expert yet, and where to add one.
func TestPanelWithoutExpertsSaysSo(t *testing.T) {
	h := newHarness(t)
	h.signIn()
	ctx := context.Background()
	ws := workshop.Workshop{Title: "Invented: a panel still to be chosen", Invented: true}
	if err := h.db.CreateWorkshop(ctx, &ws); err != nil {
		t.Fatal(err)
	}
	q := workshop.Question{WorkshopID: ws.ID, Wording: "Invented: what share of the new seals will fail in their first year?",
		Quantity: "first-year failure share", Units: "proportion of seals", Lower: 0, Upper: 1,
		Format: workshop.FormatQuantiles, Probs: workshop.ProbsDefault}
	if err := h.db.AddQuestion(ctx, &q); err != nil {
		t.Fatal(err)
	}
	_, body := h.get(questionPath(ws.ID, q.ID))
	if strings.Contains(body, "table-judgements") || !strings.Contains(body, "No expert is on this workshop") {
		t.Errorf("the panel without experts shows an empty table of judgements, or no sentence saying there is none")
	}
	if strings.Contains(body, `id="f-enter-expert"`) || !strings.Contains(body, "There is no expert to enter a judgement for") {
		t.Errorf("the panel without experts offers an empty choice of expert to enter a judgement for")
	}
}

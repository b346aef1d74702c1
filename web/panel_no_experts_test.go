package web

import (
	"context"
	"regexp"
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

// A question one expert answered (the demo's question 3): on the panel,
// as in the room view, that expert's curve is drawn above the pool, which
// is the same curve. Drawn after it, the pool's thick line hid the
// expert's, and the legend named a line the facilitator could not find.
func TestPanelDrawsALoneExpertAboveThePool(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	_, body := h.get(questionPath(ws.ID, qs[2].ID))
	curves := regexp.MustCompile(`class="curve curve-density curve-(\w+)"`).FindAllStringSubmatch(wideOnly(body), -1)
	var order []string
	for _, c := range curves {
		order = append(order, c[1])
	}
	if len(order) < 2 || order[0] != "pool" || order[1] != "expert" {
		t.Errorf("the panel draws one expert's answer in the order %v, want the pool first and the expert above it", order)
	}
	// A panel of several keeps the pool above the experts.
	_, body = h.get(questionPath(ws.ID, qs[0].ID))
	curves = regexp.MustCompile(`class="curve curve-density curve-(\w+)"`).FindAllStringSubmatch(wideOnly(body), -1)
	if n := len(curves); n < 3 || curves[0][1] != "expert" {
		t.Errorf("question 1's panel draws %v, want the experts first", curves)
	}
}

package web

import (
	"context"
	"net/http"
	"net/url"
	"strings"
	"testing"
)

// A retired question takes no agreed prior, as the quick priors page
// already held: its page offers no agree form, and a form sent from a
// page drawn before it was retired is refused beside the choice of
// source, with nothing recorded. The panel's form recorded one.
func TestRetiredQuestionTakesNoPrior(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	qp := questionPath(ws.ID, qs[0].ID)
	if res, body := h.post(qp+"/retire", url.Values{"action": {"retire"}, "retire_reason": {"Asked twice (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("retire: %d %s", res.StatusCode, body)
	}
	_, body := h.get(qp)
	if strings.Contains(body, `id="agree-form"`) || !strings.Contains(body, "This question is retired, so no prior is agreed for it.") {
		t.Error("a retired question's page offers the agree form, or does not say why it does not")
	}
	before, err := h.db.AgreedPriors(context.Background(), ws.ID)
	if err != nil {
		t.Fatal(err)
	}
	res, body := h.post(qp+"/agree", url.Values{"source": {"pool"}, "confirm_open": {"on"}, "rationale": {"From a stale tab (invented)."}})
	if res.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, "a retired question takes no agreed prior: bring it back first") {
		t.Errorf("agreeing a retired question's prior: %d, want 422 saying why", res.StatusCode)
	}
	after, err := h.db.AgreedPriors(context.Background(), ws.ID)
	if err != nil {
		t.Fatal(err)
	}
	if len(after) != len(before) {
		t.Errorf("%d agreed priors after the refusal, want %d", len(after), len(before))
	}
	// Brought back, it takes one again.
	if res, body := h.post(qp+"/retire", url.Values{"action": {"restore"}, "retire_reason": {"Needed after all (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("restore: %d %s", res.StatusCode, body)
	}
	if res, body := h.post(qp+"/agree", url.Values{"source": {"pool"}, "confirm_open": {"on"}, "rationale": {"Back (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Errorf("agreeing after bringing it back: %d %s", res.StatusCode, body)
	}
}

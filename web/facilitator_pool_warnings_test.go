package web

import (
	"net/http"
	"net/url"
	"strings"
	"testing"
)

// Two pairs of experts who do not overlap at all (rates near 2% and near
// 95%, invented) make an equal-weight pool with a gap in the middle: the
// pooled CDF is flat at 1/2 across the gap, so the pool's 50% point is not
// unique, and no single Beta comes near a two-humped pool. The panel says
// both (issue 11), instead of showing one median and one Beta as if they
// settled the matter. Flatness of a two-component mixture between its
// components: by hand, F = (F₁ + F₂)/2 with F₁ ≈ 1 and F₂ ≈ 0 there.
func TestPanelSaysWhenThePoolHasNoUniqueMedianOrSingleBeta(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	q := qs[0]
	values := [][]string{{"0.01", "0.02", "0.03"}, {"0.011", "0.021", "0.032"}, {"0.90", "0.95", "0.98"}, {"0.91", "0.95", "0.975"}}
	for i, e := range es {
		form := url.Values{"channel": {"in_person"}, "values[0]": {values[i][0]}, "values[1]": {values[i][1]}, "values[2]": {values[i][2]}}
		if r, body := h.post(entryPath(ws.ID, q.ID, e.ID)+"/save", form); r.StatusCode != http.StatusSeeOther {
			t.Fatalf("entry for %s: %d %s", e.Name, r.StatusCode, body)
		}
	}
	wf := url.Values{"scheme": {"equal"}, "reason": {"Equal weights for the check (invented)."}}
	if r, body := h.post(questionPath(ws.ID, q.ID)+"/weights", wf); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("weights: %d %s", r.StatusCode, body)
	}
	_, panel := h.get(questionPath(ws.ID, q.ID))
	if !strings.Contains(panel, "50% point is not unique") || !strings.Contains(panel, "≈ ") {
		t.Error("the panel does not say the pool's 50% point is not unique")
	}
	if !strings.Contains(panel, "The single Beta is far from the pool") {
		t.Error("the panel does not warn that the single Beta is far from the pool")
	}
	// A panel that agrees has neither note.
	for _, e := range es {
		form := url.Values{"channel": {"in_person"}, "values[0]": {"0.02"}, "values[1]": {"0.04"}, "values[2]": {"0.08"}}
		if r, body := h.post(entryPath(ws.ID, q.ID, e.ID)+"/save", form); r.StatusCode != http.StatusSeeOther {
			t.Fatalf("entry for %s: %d %s", e.Name, r.StatusCode, body)
		}
	}
	_, panel = h.get(questionPath(ws.ID, q.ID))
	if strings.Contains(panel, "is not unique") || strings.Contains(panel, "The single Beta is far from the pool") {
		t.Error("an agreeing panel is flagged")
	}
}

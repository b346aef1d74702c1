package web

import (
	"net/http"
	"net/url"
	"strconv"
	"strings"
	"testing"
)

// When the performance weights in force differ from the page's, the page
// says what changed since they were set. It said "the answers or the
// cut-off have changed" whatever had: after a true value was corrected
// that pointed the facilitator at the wrong thing.
func TestWeightsInForceSayWhatChanged(t *testing.T) {
	p := newSeedPanel(t)
	p.enterTruths(t, false)
	if res, _ := p.h.post(p.path()+"/weights", url.Values{"scheme": {"performance"}, "reason": {"scores are in (invented)"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("performance weights: %d", res.StatusCode)
	}
	if _, body := p.h.get(p.path()); !strings.Contains(body, "They are the performance weights shown above.") {
		t.Fatal("the weights just set are not said to be in force")
	}
	// A fixed cut-off on the page: the cut-off differs.
	_, body := p.h.get(p.path() + "?alpha=0")
	if !strings.Contains(body, "(the cut-off has changed since they were set)") {
		t.Error("a fixed cut-off beside optimised weights is not named as the change")
	}
	// A true value corrected: the true values differ, not the answers.
	res, _ := p.h.post(seedPath(p.ws.ID, p.seeds[0].ID), url.Values{"true_value": {"0.05"}})
	if res.StatusCode != http.StatusSeeOther {
		t.Fatalf("correcting a true value: %d", res.StatusCode)
	}
	_, body = p.h.get(p.path())
	if !strings.Contains(body, "They differ from the performance weights shown above (the true values have changed since they were set).") {
		t.Error("a corrected true value is not named as the change")
	}
	if strings.Contains(body, "the answers or the cut-off") {
		t.Error("the page still blames the answers or the cut-off")
	}
}

// An expert revoked after the performance weights were set takes their
// answers out of the scoring: the panel changed, not the answers. The
// page said "the experts' answers and the experts on the panel have
// changed" when nobody had answered anew. (The demo's weights give Ines
// Varga all of the weight, so without her the scores give others.)
func TestWeightsInForceAfterARevokeSayThePanelChanged(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	for _, q := range qs[1:] {
		if res, body := h.post(calibrationPath(ws.ID)+"/q/"+strconv.FormatInt(q.ID, 10),
			url.Values{"true_value": {strconv.FormatFloat(*q.TrueValue, 'g', -1, 64)}, "reveal": {"on"}, "reason": {"Shown (invented)."}}); res.StatusCode != http.StatusSeeOther {
			t.Fatalf("reveal Q%d: %d %s", q.Position, res.StatusCode, body)
		}
	}
	if res, _ := h.post(calibrationPath(ws.ID)+"/weights", url.Values{"scheme": {"performance"}, "reason": {"Scores are in (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("performance weights: %d", res.StatusCode)
	}
	if res, _ := h.post(expertActionPath(ws.ID, es[0].ID, "revoke"), url.Values{"confirm": {"yes"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("revoke: %d", res.StatusCode)
	}
	_, body := h.get(calibrationPath(ws.ID))
	if !strings.Contains(body, "They differ from the performance weights shown above (the experts on the panel have changed since they were set).") {
		t.Errorf("after a revoke the page does not say the panel alone changed:\n%s", clipAround(body, "performance weights set"))
	}
}

// clipAround is the 300 bytes of body from the first s, or "" without it.
func clipAround(body, s string) string {
	i := strings.Index(body, s)
	if i < 0 {
		return ""
	}
	return body[i:min(len(body), i+300)]
}

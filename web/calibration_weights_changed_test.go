package web

import (
	"net/http"
	"net/url"
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

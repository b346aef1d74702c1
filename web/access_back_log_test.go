package web

import (
	"net/http"
	"net/url"
	"strings"
	"testing"
)

// A new link for a revoked expert gives them their access back, and their
// judgements rejoin every pool; the decision log (and the report's copy
// of it) says so. It said only "was given a new private link; the old
// one stopped working", of a link that had stopped at the revocation.
func TestLogSaysAccessWasGivenBack(t *testing.T) {
	h, ws, _, es, _ := seeded(t)
	for _, step := range []struct{ action, reason string }{
		{"revoke", "Left the panel (invented)."},
		{"reissue", "Back on the panel (invented)."},
		{"reissue", "Lost the link (invented)."},
	} {
		if res, _ := h.post(expertActionPath(ws.ID, es[3].ID, step.action), url.Values{"confirm": {"yes"}, "reason": {step.reason}}); res.StatusCode != http.StatusSeeOther {
			t.Fatalf("%s: %d", step.action, res.StatusCode)
		}
	}
	const back = "Ole Brandt was given access back, with a new private link; their judgements count in the pools again."
	const link = "Ole Brandt was given a new private link; the old one stopped working."
	for _, page := range []string{"/log", "/report"} {
		_, body := h.get(workshopPath(ws.ID) + page)
		i, j := strings.Index(body, back), strings.Index(body, link)
		if strings.Count(body, back) != 1 || strings.Count(body, link) != 1 || i > j {
			t.Errorf("%s: want %q once, then %q once", page, back, link)
		}
	}
}

// An expert given access back after custom weights were set without
// them has weight 0 under those weights (workshop.Weights.Unweighed):
// the log says they count for nothing in the pools until the weights
// are set again. It said their judgements counted in the pools again.
func TestLogSaysAccessBackUnderWeightsWithoutThem(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	if res, _ := h.post(expertActionPath(ws.ID, es[3].ID, "revoke"), url.Values{"confirm": {"yes"}, "reason": {"Left (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("revoke: %d", res.StatusCode)
	}
	wf := url.Values{"scheme": {"custom"}, "reason": {"Invented."}}
	for _, e := range es[:3] {
		wf.Set(weightField(e.ID), "1")
	}
	if res, body := h.post(questionPath(ws.ID, qs[0].ID)+"/weights", wf); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("set weights: %d %s", res.StatusCode, body)
	}
	if res, _ := h.post(expertActionPath(ws.ID, es[3].ID, "reissue"), url.Values{"confirm": {"yes"}, "reason": {"Back (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("reissue: %d", res.StatusCode)
	}
	_, body := h.get(workshopPath(ws.ID) + "/log")
	if strings.Contains(body, "their judgements count in the pools again") ||
		!strings.Contains(body, "Ole Brandt was given access back, with a new private link; the weights in force give them no share, so their judgements count for nothing in the pools until the weights are set again.") {
		t.Error("the log says Ole's judgements count in the pools again under weights that give him none")
	}
}

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

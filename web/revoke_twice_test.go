package web

import (
	"context"
	"net/http"
	"net/url"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// A revoke sent from a tab that still shows the expert active (or from a
// second browser) after they were revoked: the overview says they are
// already revoked, above the roster, and the decision log keeps one
// revocation. It recorded a second, with the second tab's reason.
func TestRevokeFromAStaleTab(t *testing.T) {
	h, ws, _, es, _ := seeded(t)
	revoke := expertActionPath(ws.ID, es[3].ID, "revoke")
	if res, _ := h.post(revoke, url.Values{"confirm": {"yes"}, "reason": {"Left the panel (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("revoke: %d", res.StatusCode)
	}
	for _, form := range []url.Values{
		{"reason": {"Second tab (invented)."}},                     // the roster's button: the confirmation would follow
		{"confirm": {"yes"}, "reason": {"Second tab (invented)."}}, // the confirmation page's
	} {
		res, body := h.post(revoke, form)
		if res.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, "Ole Brandt&#39;s access is already revoked, so nothing changed.") {
			t.Errorf("revoking again (%v): %d, want 422 saying so", form, res.StatusCode)
		}
		if strings.Contains(body, "Revoke the access of") {
			t.Errorf("revoking again (%v): asks to confirm a revoke that would change nothing", form)
		}
	}
	evs, err := h.db.Events(context.Background(), ws.ID)
	if err != nil {
		t.Fatal(err)
	}
	n := 0
	for _, ev := range evs {
		if ev.Kind == workshop.EventExpertRevoked {
			n++
			if ev.Reason != "Left the panel (invented)." {
				t.Errorf("revocation recorded with the reason %q", ev.Reason)
			}
		}
	}
	if n != 1 {
		t.Errorf("%d revocations in the log, want 1", n)
	}
}

package web

import (
	"net/http"
	"net/url"
	"strings"
	"testing"
)

// A correction's confirmation, and that of a question brought back, are
// shown once: they rode in the panel's address (?done=corrected), and
// every reload of the panel said again that the correction was saved.
// The same form sent twice (a double click, a browser's retry) is saved
// once, and the copy that reaches the browser still confirms it.
func TestPanelConfirmsASaveOnce(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	q := qs[0]
	panel := questionPath(ws.ID, q.ID)
	// The panel as the browser is sent to it, and as a reload asks for it
	// again.
	at := panel
	shows := func(want string) bool {
		t.Helper()
		res, page := h.get(at)
		if res.StatusCode != http.StatusOK {
			t.Fatalf("panel: %d", res.StatusCode)
		}
		return strings.Contains(page, want)
	}
	const corrected, restored = "Correction saved.", "The question is back: experts see it again."

	_, page := h.get(panel + "/edit")
	form := url.Values{"wording": {q.Wording + " (Corrected, invented.)"}, "quantity": {q.Quantity}, "units": {q.Units},
		"reason": {"Clearer wording (invented)."}, onceName: {keyOf(t, page, panel+"/edit")}}
	r, _ := h.post(panel+"/edit", form)
	if at = r.Header.Get("Location"); r.StatusCode != http.StatusSeeOther || !strings.HasPrefix(at, panel) {
		t.Fatalf("correction: %d to %q, want 303 to the panel", r.StatusCode, at)
	}
	if !shows(corrected) {
		t.Error("the panel after a correction does not say it was saved")
	}
	if shows(corrected) {
		t.Error("the panel reloaded says again that the correction was saved")
	}

	r, _ = h.post(panel+"/edit", form)
	if at = r.Header.Get("Location"); r.StatusCode != http.StatusSeeOther || !strings.HasPrefix(at, panel) {
		t.Fatalf("the same correction sent again: %d to %q, want 303 to the panel", r.StatusCode, at)
	}
	if !shows(corrected) || shows(corrected) {
		t.Error("the correction sent again is not confirmed once")
	}

	retire := panel + "/retire"
	if r, _ := h.post(retire, url.Values{"action": {"retire"}, "retire_reason": {"Duplicate (invented)."}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("retire: %d", r.StatusCode)
	}
	at = panel
	if shows(restored) {
		t.Error("the panel of a retired question says it is back")
	}
	r, _ = h.post(retire, url.Values{"action": {"restore"}, "retire_reason": {"Kept after all (invented)."}})
	if at = r.Header.Get("Location"); r.StatusCode != http.StatusSeeOther || !strings.HasPrefix(at, panel) {
		t.Fatalf("restore: %d to %q", r.StatusCode, at)
	}
	if !shows(restored) {
		t.Error("the panel after bringing the question back does not say so")
	}
	if shows(restored) {
		t.Error("the panel reloaded says again that the question is back")
	}
}

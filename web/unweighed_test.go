package web

import (
	"net/http"
	"net/url"
	"strings"
	"testing"
)

// Custom weights name the experts active when they were set. An expert
// added later, or given their access back, has weight 0 under them; the
// panel, the report and the calibration page say so, by name, until the
// weights are set again, instead of a bare "0%" in the panel's table.
func TestCustomWeightsSayWhomTheyLeaveOut(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	qp := questionPath(ws.ID, qs[0].ID)
	setWeights := func(ids map[int64]string) {
		t.Helper()
		wf := url.Values{"scheme": {"custom"}, "reason": {"Invented."}}
		for id, w := range ids {
			wf.Set(weightField(id), w)
		}
		if res, body := h.post(qp+"/weights", wf); res.StatusCode != http.StatusSeeOther {
			t.Fatalf("set weights: %d %s", res.StatusCode, body)
		}
	}
	notices := func() (panel, report, calibration string) {
		t.Helper()
		_, p := h.get(qp)
		_, r := h.get(workshopPath(ws.ID) + "/report")
		_, c := h.get(calibrationPath(ws.ID))
		pick := func(body string) string {
			i := strings.Index(body, "after these weights were set")
			if i < 0 {
				return ""
			}
			i = strings.LastIndex(body[:i], ">") + 1
			return body[i : i+strings.Index(body[i:], "<")]
		}
		return pick(p), pick(r), pick(c)
	}
	// Tomas is revoked when the weights are set, so they leave him out.
	if res, _ := h.post(expertActionPath(ws.ID, es[1].ID, "revoke"), url.Values{"confirm": {"yes"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("revoke: %d", res.StatusCode)
	}
	setWeights(map[int64]string{es[0].ID: "2", es[2].ID: "1", es[3].ID: "1"})
	if p, r, c := notices(); p != "" || r != "" || c != "" {
		t.Fatalf("weights naming every active expert: %q, %q, %q", p, r, c)
	}
	h.addExpert(ws, "Lena Okafor (invented)")
	p, r, c := notices()
	for _, got := range []string{p, r, c} {
		if !strings.Contains(got, "Lena Okafor (invented) joined the panel, or had access back, after these weights were set, so has weight 0 under them") {
			t.Errorf("a late expert: %q", got)
		}
	}
	if res, _ := h.post(expertActionPath(ws.ID, es[1].ID, "reissue"), url.Values{"confirm": {"yes"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("reissue: %d", res.StatusCode)
	}
	p, r, c = notices()
	for _, got := range []string{p, r, c} {
		if !strings.Contains(got, "Tomas Lindqvist and Lena Okafor (invented) joined the panel, or had access back, after these weights were set, so each has weight 0 under them") {
			t.Errorf("a late expert and one given access back: %q", got)
		}
	}
	// Set again, naming everyone (a weight of 0 included, as decided).
	all, _ := h.db.Experts(t.Context(), ws.ID)
	ids := map[int64]string{}
	for _, e := range all {
		ids[e.ID] = "1"
	}
	ids[all[len(all)-1].ID] = "0"
	setWeights(ids)
	if p, r, c := notices(); p != "" || r != "" || c != "" {
		t.Fatalf("weights set again: %q, %q, %q", p, r, c)
	}
}

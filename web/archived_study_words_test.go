package web

import (
	"context"
	"html"
	"net/http"
	"net/url"
	"strings"
	"testing"
)

// An archived workshop's panel says what its study page offers: it kept
// inviting the facilitator to record the study's data there, while the
// archived study page has no form to record them. Nor does that page wait
// for data any more.
func TestArchivedPanelSaysWhatTheStudyPageOffers(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	ctx := context.Background()
	panel, study := questionPath(ws.ID, qs[0].ID), studyPath(ws.ID, qs[0].ID)
	read := func(path string) string {
		t.Helper()
		_, page := h.get(path)
		return html.UnescapeString(page)
	}
	if page := read(panel); !strings.Contains(page, "Record the study's data against this prior") {
		t.Fatal("the panel of a workshop in progress does not offer to record the study's data")
	}
	if err := h.db.SetArchived(ctx, ws.ID, true, "Finished (invented)."); err != nil {
		t.Fatal(err)
	}
	page := read(panel)
	if strings.Contains(page, "Record the study's data") || !strings.Contains(page, "No study data were recorded against this prior; plan the study from it.") {
		t.Error("the archived panel without data does not say what the study page offers")
	}
	if page := read(study); strings.Contains(page, "No data recorded yet") || strings.Contains(page, "Once data are recorded") ||
		strings.Contains(page, "or recorded data") || !strings.Contains(page, "No data were recorded before the workshop was archived.") {
		t.Error("the archived study page waits for data")
	}

	if err := h.db.SetArchived(ctx, ws.ID, false, "One batch more (invented)."); err != nil {
		t.Fatal(err)
	}
	if res, body := h.post(study+"/data", url.Values{"successes": {"3"}, "trials": {"40"}, "source": {"Site log (invented)"},
		"observed_on": {"2026-03-31"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("record data: %d %s", res.StatusCode, body)
	}
	if err := h.db.SetArchived(ctx, ws.ID, true, "Finished (invented)."); err != nil {
		t.Fatal(err)
	}
	page = read(panel)
	if strings.Contains(page, "Record the study's data") || !strings.Contains(page, "Read the study's data recorded against this prior and the posterior they give, and plan the study.") {
		t.Error("the archived panel with data does not say what the study page offers")
	}
	if page := read(study); strings.Contains(page, `action="`+study+`/data"`) {
		t.Error("the archived study page offers to record data")
	}
}

package web

import (
	"context"
	"net/http"
	"net/url"
	"strings"
	"testing"
)

// The archive's guard refuses the answer sheet's check, which saves
// nothing. No page of an archived workshop leads to it: the overview
// links to the import page only while a round is open (archiving closes
// it), and the import page itself, reached by a bookmark or a tab left
// open, offered the upload form whose check the guard then refused. It
// now says the workshop is archived and offers no form.
func TestArchivedWorkshopOffersNoSheetImport(t *testing.T) {
	h, ws, _, _, _ := seeded(t)
	ctx := context.Background()
	link := `href="` + sheetPath(ws.ID) + `"`
	form := `action="` + sheetPath(ws.ID) + `"`
	if _, page := h.get(workshopPath(ws.ID)); !strings.Contains(page, link) {
		t.Fatal("the open workshop's overview does not link to the import page")
	}
	if _, page := h.get(sheetPath(ws.ID)); !strings.Contains(page, form) {
		t.Fatal("the open workshop's import page offers no form")
	}
	if err := h.db.SetArchived(ctx, ws.ID, true, "Finished (invented)."); err != nil {
		t.Fatal(err)
	}
	if _, page := h.get(workshopPath(ws.ID)); strings.Contains(page, link) {
		t.Error("the archived workshop's overview links to the import page")
	}
	r, page := h.get(sheetPath(ws.ID))
	if r.StatusCode != http.StatusOK || strings.Contains(page, form) ||
		!strings.Contains(page, "This workshop is archived, so no judgements can be imported into it.") {
		t.Errorf("the archived workshop's import page: %d, want 200 saying it is archived, with no form", r.StatusCode)
	}
	// The check itself is still refused, as every POST to an archived
	// workshop is but bringing it back and the entry page's preview.
	if r, _ := h.post(sheetPath(ws.ID), url.Values{"sheet": {"expert,question,q05,q50,q95\n"}, "channel": {"file"}}); r.StatusCode != http.StatusConflict {
		t.Errorf("the sheet's check in an archived workshop: %d, want 409", r.StatusCode)
	}
}

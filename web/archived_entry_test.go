package web

import (
	"context"
	"html"
	"net/http"
	"net/url"
	"strings"
	"testing"
)

// The entry page of an archived workshop invites the facilitator to
// choose Show the fit, as the expert's own page does; its preview was
// refused (409, "nothing in an archived workshop can be changed") though
// it saves nothing. It now draws the fit, with and without the script,
// and still saves nothing; the save is still refused.
func TestArchivedEntryPageShowsTheFit(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	ctx := context.Background()
	q := qs[0]
	priya := es[2] // the demo's Priya Raman has answered nothing
	entry := entryPath(ws.ID, q.ID, priya.ID)
	if err := h.db.SetArchived(ctx, ws.ID, true, "Finished (invented)."); err != nil {
		t.Fatal(err)
	}
	_, page := h.get(entry)
	if !strings.Contains(page, "choose <em>Show the fit</em>") {
		t.Fatal("the archived workshop's entry page no longer invites Show the fit")
	}
	before, _ := h.db.Revisions(ctx, ws.ID)
	form := url.Values{"channel": {"paper_form"}, "values[0]": {"0.01"}, "values[1]": {"0.03"}, "values[2]": {"0.09"}}
	r, frag := h.post(entry+"/preview?fragment=1", form)
	if r.StatusCode != http.StatusOK || !strings.Contains(html.UnescapeString(frag), "What Priya Raman's numbers imply") || !strings.Contains(frag, "Beta(α = ") {
		t.Errorf("the archived entry page's live preview: %d, want 200 with the fit", r.StatusCode)
	}
	// Without the script the button posts the whole form.
	r, page = h.post(entry+"/preview", form)
	if r.StatusCode != http.StatusOK || !strings.Contains(page, "Beta(α = ") || !strings.Contains(page, "Q1 for Priya Raman") {
		t.Errorf("the archived entry page's preview without the script: %d, want 200 with the page and the fit", r.StatusCode)
	}
	if r, _ := h.post(entry+"/save", form); r.StatusCode != http.StatusConflict {
		t.Errorf("a save in an archived workshop: %d, want 409", r.StatusCode)
	}
	// Nor does a path that only ends like a preview get through.
	if r, _ := h.post(questionPath(ws.ID, q.ID)+"/agree/preview", url.Values{}); r.StatusCode != http.StatusConflict {
		t.Errorf("another POST ending in /preview in an archived workshop: %d, want 409", r.StatusCode)
	}
	if after, _ := h.db.Revisions(ctx, ws.ID); len(after) != len(before) {
		t.Errorf("%d revisions saved in an archived workshop", len(after)-len(before))
	}
}

package web

import (
	"context"
	"html"
	"strconv"
	"strings"
	"testing"
)

// The fit preview's invitation says why nothing tried is kept in words
// true of the case: "Saving is closed for now" was said of an archived
// workshop, which no round will reopen, and of an expert whose access was
// revoked. So does the disabled save button, and the facilitator's entry
// page of an archived workshop no longer waits for a next round.
func TestPreviewInviteSaysWhySavingIsClosed(t *testing.T) {
	h, ws, qs, es, links := seeded(t)
	ctx := context.Background()
	q := qs[0]
	priya := es[2] // the demo's Priya Raman has answered nothing
	own := links[2].Path + "q/" + strconv.FormatInt(q.ID, 10)
	entry := entryPath(ws.ID, q.ID, priya.ID)
	read := func(path string) string {
		t.Helper()
		_, page := h.get(path)
		return html.UnescapeString(page)
	}

	if err := h.db.SetRound(ctx, ws.ID, ws.Round, false, "Break (invented)."); err != nil {
		t.Fatal(err)
	}
	for _, path := range []string{own, entry} {
		if page := read(path); !strings.Contains(page, "Saving is closed for now: nothing tried here is kept.") ||
			!strings.Contains(page, "Saving is closed for this round") {
			t.Errorf("%s, round closed: the page does not say that saving is closed for now", path)
		}
	}

	if err := h.db.SetArchived(ctx, ws.ID, true, "Finished (invented)."); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct{ path, invite, button string }{
		{own, "The facilitator has closed this workshop, so nothing tried here is kept.", "Saving is closed: the workshop is over"},
		{entry, "This workshop is archived, so nothing tried here is kept.", "Saving is closed: the workshop is archived"},
	} {
		if c.path == entry && strings.Contains(read(entry), "until the next round opens") {
			t.Error("the archived workshop's entry page says a next round will open")
		}
		page := read(c.path)
		if !strings.Contains(page, c.invite) || !strings.Contains(page, c.button) {
			t.Errorf("%s, archived: want %q and the button %q", c.path, c.invite, c.button)
		}
		if strings.Contains(page, "for now") || strings.Contains(page, "for this round") {
			t.Errorf("%s, archived: the page says saving is closed for now", c.path)
		}
	}

	if err := h.db.SetArchived(ctx, ws.ID, false, "One more look (invented)."); err != nil {
		t.Fatal(err)
	}
	if err := h.db.RevokeExpert(ctx, priya.ID, "Left the panel (invented)."); err != nil {
		t.Fatal(err)
	}
	page := read(entry)
	if !strings.Contains(page, "Priya Raman's access is revoked, so nothing tried here is kept.") ||
		!strings.Contains(page, "Saving is closed: access revoked") {
		t.Error("the entry page of a revoked expert does not say that their access is revoked")
	}
	if strings.Contains(page, "for now") || strings.Contains(page, "for this round") {
		t.Error("the entry page of a revoked expert says saving is closed for now")
	}
}

package web

import (
	"context"
	"net/http"
	"net/url"
	"regexp"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

var selectedChannel = regexp.MustCompile(`(?s)<select id="f-channel" name="channel">.*?</select>`)

// The entry form does not answer "how it reached you" for the
// facilitator. It offered "said in the session" to every expert, so an
// entry taken by phone and saved without a look at the list was recorded
// as said in the room. The first entry for an expert asks, and nothing is
// saved without an answer; the next offers the way the last one came.
// The live preview draws the values before the choice.
func TestEntryAsksHowItReachedYou(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	ctx := context.Background()
	priya := es[2]
	page := entryPath(ws.ID, qs[0].ID, priya.ID)
	_, body := h.get(page)
	sel := selectedChannel.FindString(body)
	if !strings.Contains(sel, `<option value="" selected>choose…</option>`) || strings.Count(sel, "selected") != 1 {
		t.Fatalf("the first entry's channel is chosen for the facilitator:\n%s", sel)
	}
	values := url.Values{"values[0]": {"0.01"}, "values[1]": {"0.03"}, "values[2]": {"0.09"}}
	if r, frag := h.post(page+"/preview?fragment=1", values); r.StatusCode != http.StatusOK || !strings.Contains(frag, "Beta(α = ") {
		t.Fatalf("preview before the channel is chosen: %d", r.StatusCode)
	}
	before, _ := h.db.Revisions(ctx, ws.ID)
	r, body := h.post(page+"/save", values)
	if r.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, "choose how the judgement reached you") {
		t.Fatalf("a save without its channel: %d", r.StatusCode)
	}
	if after, _ := h.db.Revisions(ctx, ws.ID); len(after) != len(before) {
		t.Fatal("an entry without its channel was saved")
	}
	values.Set("channel", string(workshop.ChannelPhone))
	if r, _ := h.post(page+"/save", values); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("save by phone: %d", r.StatusCode)
	}
	// Her next question offers the phone.
	_, body = h.get(entryPath(ws.ID, qs[1].ID, priya.ID))
	if sel := selectedChannel.FindString(body); !strings.Contains(sel, `<option value="phone" selected>`) || strings.Contains(sel, "choose…") {
		t.Errorf("the next entry does not offer the last one's channel:\n%s", sel)
	}
}

// A judgement imported from an answer sheet is no entry on the form: the
// form went on to offer "from a spreadsheet file" for the expert's next
// entry, taken by phone, and saved untruly if not looked at. It asks, or
// offers the way the last entry on the form came.
func TestEntryAfterASheetAsksHowItReachedYou(t *testing.T) {
	g := newSheetRig(t)
	ada := g.experts[0]
	g.uploadSheet(t, "monday.csv", "expert,question,q05,q50,q95\nAda Quell,Q1,0.02,0.06,0.15\n", "file")
	page := entryPath(g.ws.ID, g.qs[3].ID, ada.ID)
	_, body := g.h.get(page)
	if sel := selectedChannel.FindString(body); !strings.Contains(sel, `<option value="" selected>choose…</option>`) || strings.Count(sel, "selected") != 1 {
		t.Fatalf("after a sheet, the entry's channel is chosen for the facilitator:\n%s", sel)
	}
	form := url.Values{"channel": {"phone"}, "values[0]": {"0.1"}, "values[1]": {"0.15"}, "values[2]": {"0.2"}}
	if r, _ := g.h.post(page+"/save", form); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("save by phone: %d", r.StatusCode)
	}
	g.uploadSheet(t, "tuesday.csv", "expert,question,q05,q50,q95\nAda Quell,Q1,0.02,0.07,0.15\n", "file")
	_, body = g.h.get(entryPath(g.ws.ID, g.qs[0].ID, ada.ID))
	if sel := selectedChannel.FindString(body); !strings.Contains(sel, `<option value="phone" selected>`) {
		t.Errorf("after a sheet, the entry does not offer the last entry's channel:\n%s", sel)
	}
}

package web

import (
	"context"
	"encoding/json"
	"net/http"
	"net/url"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// The facilitator enters a judgement for an expert with the expert's own
// preview; it is saved as the facilitator's entry with its channel, and
// the expert, the panel, the export and the CSV all say so.
func TestFacilitatorEntersForAnExpert(t *testing.T) {
	h, ws, qs, es, links := seeded(t)
	ctx := context.Background()
	q := qs[0]
	priya := es[2] // has not answered question 1 in the demo
	page := entryPath(ws.ID, q.ID, priya.ID)

	// The panel's chooser leads to the page.
	if r, _ := h.get(questionPath(ws.ID, q.ID) + "/enter?expert=" + strconv.FormatInt(priya.ID, 10)); r.StatusCode != http.StatusSeeOther || r.Header.Get("Location") != page {
		t.Fatalf("chooser: %d %s", r.StatusCode, r.Header.Get("Location"))
	}
	r, body := h.get(page)
	if r.StatusCode != http.StatusOK || !strings.Contains(body, "Q1 for Priya Raman") || !strings.Contains(body, `name="channel"`) ||
		!strings.Contains(body, `data-preview="`+page+`/preview?fragment=1"`) {
		t.Fatalf("entry page: %d", r.StatusCode)
	}
	// Before any values, the empty preview speaks of the expert's values,
	// not the facilitator's.
	if !strings.Contains(body, "Enter Priya Raman's values and choose <em>Show the fit</em>") || strings.Contains(body, "Enter your values") {
		t.Error("the entry page's empty preview does not speak of the expert's values")
	}
	form := url.Values{"channel": {"paper_form"}, "values[0]": {"0.01"}, "values[1]": {"0.03"}, "values[2]": {"0.09"},
		"reason": {"Field returns from the pilot site (invented)."}}
	// The live preview is the expert's: read-backs and the fitted Beta.
	r, frag := h.post(page+"/preview?fragment=1", form)
	if r.StatusCode != http.StatusOK || !strings.Contains(frag, "What Priya Raman&#39;s numbers imply") || !strings.Contains(frag, "Beta(α = ") {
		t.Fatalf("entry preview: %d %s", r.StatusCode, frag)
	}
	// Bad input: every rule of the expert's page, nothing saved.
	bad := url.Values{"channel": {"pigeon"}, "values[0]": {"0.05"}, "values[1]": {"0.03"}, "values[2]": {"0.09"}}
	r, body = h.post(page+"/save", bad)
	if r.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, `id="f-values-1-error"`) || !strings.Contains(body, "must be one of the offered") {
		t.Fatalf("bad entry: %d", r.StatusCode)
	}
	before, _ := h.db.Revisions(ctx, ws.ID)
	if r, _ := h.post(page+"/save", form); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("save: %d", r.StatusCode)
	}
	after, _ := h.db.Revisions(ctx, ws.ID)
	if len(after) != len(before)+1 {
		t.Fatalf("%d revisions saved", len(after)-len(before))
	}
	rv := after[len(after)-1]
	if rv.EnteredBy != workshop.ByFacilitator || rv.Channel != workshop.ChannelPaperForm || rv.ExpertID != priya.ID || rv.Answer.Values[1] != 0.03 {
		t.Fatalf("saved revision %+v", rv)
	}
	// The expert's own page says who entered it and from what.
	_, own := h.get(links[2].Path + "q/" + strconv.FormatInt(q.ID, 10))
	if !strings.Contains(own, "Your current answer was entered by the facilitator on") || !strings.Contains(own, "from your paper form") {
		t.Error("the expert's page does not say the facilitator entered the answer from their paper form")
	}
	// The panel's history and the export say so too.
	if _, panel := h.get(questionPath(ws.ID, q.ID)); !strings.Contains(panel, "facilitator, from a paper form") {
		t.Error("the panel's history does not show who entered the revision")
	}
	_, raw := h.get(workshopPath(ws.ID) + "/export.json")
	var rec record.Record
	if err := json.Unmarshal([]byte(raw), &rec); err != nil {
		t.Fatal(err)
	}
	last := rec.Revisions[len(rec.Revisions)-1]
	if last.EnteredBy != workshop.ByFacilitator || last.Channel != workshop.ChannelPaperForm || rec.Revisions[0].EnteredBy != workshop.ByExpert {
		t.Errorf("export provenance: first %q, last %q %q", rec.Revisions[0].EnteredBy, last.EnteredBy, last.Channel)
	}
	_, csv := h.get(workshopPath(ws.ID) + "/export.csv")
	if !strings.Contains(csv, ",entered_by,channel,") || !strings.Contains(csv, ",facilitator,paper_form,") {
		t.Error("the revision CSV lacks the provenance columns")
	}
	// The expert's link cannot reach the facilitator's entry page.
	if r, _ := newHarnessOn(t, h).get(page); r.StatusCode == http.StatusOK {
		t.Error("the entry page answers without the facilitator's session")
	}
}

// Round and calibration rules are the expert page's: no entry in a closed
// round, none after a reveal.
func TestFacilitatorEntryFollowsTheRules(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	ctx := context.Background()
	form := url.Values{"channel": {"phone"}, "values[0]": {"0.01"}, "values[1]": {"0.03"}, "values[2]": {"0.09"}}
	// A revealed calibration question is final.
	if err := h.db.SetTrueValue(ctx, qs[1].ID, 0.0413, true, "shown"); err != nil {
		t.Fatal(err)
	}
	before, _ := h.db.Revisions(ctx, ws.ID)
	if r, body := h.post(entryPath(ws.ID, qs[1].ID, es[0].ID)+"/save", form); r.StatusCode != http.StatusConflict || !strings.Contains(body, "answers are final") {
		t.Fatalf("entry after the reveal: %d", r.StatusCode)
	}
	// A closed round takes nothing.
	if err := h.db.SetRound(ctx, ws.ID, 1, false, ""); err != nil {
		t.Fatal(err)
	}
	if r, body := h.post(entryPath(ws.ID, qs[0].ID, es[2].ID)+"/save", form); r.StatusCode != http.StatusConflict || !strings.Contains(body, "is closed, so Priya Raman&#39;s answer was not saved") || !strings.Contains(body, `value="0.03"`) {
		t.Fatalf("entry in a closed round: %d", r.StatusCode)
	}
	if after, _ := h.db.Revisions(ctx, ws.ID); len(after) != len(before) {
		t.Fatal("a refused entry was saved")
	}
}

// newHarnessOn is a client without a session on h's server.
func newHarnessOn(t *testing.T, h *harness) *harness {
	t.Helper()
	o := newHarness(t)
	o.ts = h.ts
	return o
}

// The per-expert view lists the expert's answers with who entered them,
// and links to enter each on their behalf.
func TestExpertViewForTheFacilitator(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	r, body := h.get(expertPagePath(ws.ID, es[2].ID))
	if r.StatusCode != http.StatusOK || !strings.Contains(body, "Priya Raman") || !strings.Contains(body, "no answer yet") ||
		!strings.Contains(body, `href="`+entryPath(ws.ID, qs[0].ID, es[2].ID)+`"`) {
		t.Fatalf("expert view: %d", r.StatusCode)
	}
	if !strings.Contains(body, `<td data-label="Entered by">expert</td>`) {
		t.Error("the expert view does not say who entered the answers")
	}
	if _, ov := h.get(workshopPath(ws.ID)); !strings.Contains(ov, `href="`+expertPagePath(ws.ID, es[2].ID)+`"`) {
		t.Error("the roster does not link to the expert's view")
	}
}

package web

import (
	"context"
	"html"
	"net/http"
	"net/url"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

var (
	inputValue   = regexp.MustCompile(`<input type="text"[^>]* name="(values\[\d\])" value="([^"]*)"`)
	reasonBox    = regexp.MustCompile(`(?s)<textarea id="f-reason"[^>]*>(.*?)</textarea>`)
	channelChose = regexp.MustCompile(`<option value="([a-z_]+)" selected>`)
)

// entryForm is what a browser sends from the entry page as it stands:
// its typed values, its reason box and its chosen channel.
func entryForm(t *testing.T, page string) url.Values {
	t.Helper()
	f := url.Values{"unit": {"proportion"}}
	for _, m := range inputValue.FindAllStringSubmatch(page, -1) {
		f.Set(m[1], html.UnescapeString(m[2]))
	}
	if m := reasonBox.FindStringSubmatch(page); m != nil {
		f.Set("reason", html.UnescapeString(m[1]))
	} else {
		t.Fatal("the entry page has no reason box")
	}
	if m := channelChose.FindStringSubmatch(page); m != nil {
		f.Set("channel", m[1])
	}
	return f
}

// The facilitator corrects a value they mistyped from an expert's paper
// form: the page holds the entry as saved, they put the one value right
// and save. The expert's reasoning stays with their current answer, and
// the next round's feedback shows it to the other experts; the reason's
// box started empty, and the correction left the answer without it.
func TestCorrectedEntryKeepsTheExpertsReasoning(t *testing.T) {
	h := newHarness(t)
	h.signIn()
	ctx := context.Background()
	ws := h.newWorkshop("Culvert survey (invented)")
	q := h.addQuantileQuestion(t, ws.ID, "What share of culverts are blocked?", "blocked culvert share")
	ada, _ := h.addExpert(ws, "Ada Quell")
	_, bruno := h.addExpert(ws, "Bruno Ferrante")
	// Chiara answers too: Bruno reads the others' answers only when two
	// of them answered (othersShown).
	chiara, _ := h.addExpert(ws, "Chiara Osei")
	if r, body := h.post(entryPath(ws.ID, q.ID, chiara.ID)+"/save", url.Values{"channel": {"paper_form"}, "unit": {"proportion"},
		"values[0]": {"0.03"}, "values[1]": {"0.08"}, "values[2]": {"0.2"}, "reason": {"Road crew notes (invented)."}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("Chiara's entry: %d %s", r.StatusCode, body)
	}
	page := entryPath(ws.ID, q.ID, ada.ID)
	const why = "Drone survey of two valleys (invented)."
	typo := url.Values{"channel": {"paper_form"}, "unit": {"proportion"}, "values[0]": {"0.02"}, "values[1]": {"0.05"}, "values[2]": {"0.9"}, "reason": {why}}
	if r, body := h.post(page+"/save", typo); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("first entry: %d %s", r.StatusCode, body)
	}
	_, body := h.get(page)
	if !strings.Contains(body, "The box holds the reasoning saved with their current answer") {
		t.Error("the entry page does not say the reason's box holds the current answer's reasoning")
	}
	fix := entryForm(t, body)
	if fix.Get("values[2]") != "0.9" || fix.Get("channel") != "paper_form" {
		t.Fatalf("the entry page holds %v", fix)
	}
	fix.Set("values[2]", "0.12")
	if r, body := h.post(page+"/save", fix); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("correction: %d %s", r.StatusCode, body)
	}
	own, err := h.db.QuestionExpertRevisions(ctx, q.ID, ada.ID)
	if err != nil || len(own) != 2 {
		t.Fatalf("%d revisions, %v", len(own), err)
	}
	if cur := own[1]; cur.Answer.Values[2] != 0.12 || cur.Reason != why {
		t.Fatalf("the corrected answer: %v, reason %q", cur.Answer.Values, cur.Reason)
	}
	// What the other experts read in round 2.
	h.nextRound(t, ws.ID)
	_, feedback := h.get("/e/" + bruno + "/q/" + strconv.FormatInt(q.ID, 10))
	if !strings.Contains(html.UnescapeString(feedback), why) {
		t.Error("round 2's feedback lacks the expert's reasoning after the correction")
	}
	// In round 2 the box starts empty: round 1's reasoning is not the
	// expert's word in this round.
	_, body = h.get(page)
	if f := entryForm(t, body); f.Get("reason") != "" || strings.Contains(body, "The box holds the reasoning") {
		t.Errorf("round 2's entry page starts with the reason %q", f.Get("reason"))
	}
}

// A reasoning the facilitator withheld from the feedback is not carried
// into a correction, which would show it again; the page says why the
// box is empty.
func TestCorrectedEntryLeavesAWithheldReasoningOut(t *testing.T) {
	ctx := context.Background()
	h, _, q, ada, page := culvertEntry(t, "Names the contractor at fault (invented).")
	own, _ := h.db.QuestionExpertRevisions(ctx, q.ID, ada.ID)
	if err := h.db.SetReasonWithheld(ctx, own[0].ID, true, "It names a firm (invented)."); err != nil {
		t.Fatal(err)
	}
	_, body := h.get(page)
	if f := entryForm(t, body); f.Get("reason") != "" {
		t.Errorf("the withheld reasoning is in the box: %q", f.Get("reason"))
	}
	if !strings.Contains(body, "is withheld from the feedback, so it is not carried into this entry") {
		t.Error("the page does not say the withheld reasoning is left out")
	}
}

// In a closed round no entry is saved, so the entry page carries no
// reasoning and does not say it is "saved again with this entry"; once
// the round is reopened it carries it again.
func TestClosedRoundEntryCarriesNoReasoning(t *testing.T) {
	h, ws, _, _, page := culvertEntry(t, "Silt after the spring floods (invented).")
	if r, body := h.post(workshopPath(ws.ID)+"/round", url.Values{"action": {"close"}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("close: %d %s", r.StatusCode, body)
	}
	if _, body := h.get(page); strings.Contains(body, "saved again with this entry") {
		t.Error("in a closed round the entry page says the reasoning is saved again with this entry")
	}
	if r, body := h.post(workshopPath(ws.ID)+"/round", url.Values{"action": {"reopen"}, "reopen_reason": {"One more answer (invented)."}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("reopen: %d %s", r.StatusCode, body)
	}
	if _, body := h.get(page); !strings.Contains(body, "saved again with this entry") {
		t.Error("in the reopened round the entry page does not carry the reasoning")
	}
}

// culvertEntry is an invented workshop with one question and one expert,
// Ada Quell, whose answer the facilitator has entered by phone with the
// reasoning given; page is the entry page.
func culvertEntry(t *testing.T, reason string) (h *harness, ws workshop.Workshop, q workshop.Question, ada workshop.Expert, page string) {
	t.Helper()
	h = newHarness(t)
	h.signIn()
	ws = h.newWorkshop("Culvert survey (invented)")
	q = h.addQuantileQuestion(t, ws.ID, "What share of culverts are blocked?", "blocked culvert share")
	ada, _ = h.addExpert(ws, "Ada Quell")
	page = entryPath(ws.ID, q.ID, ada.ID)
	form := url.Values{"channel": {"phone"}, "unit": {"proportion"}, "values[0]": {"0.02"}, "values[1]": {"0.05"}, "values[2]": {"0.12"},
		"reason": {reason}}
	if r, body := h.post(page+"/save", form); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("entry: %d %s", r.StatusCode, body)
	}
	return h, ws, q, ada, page
}

package web

import (
	"context"
	"html"
	"net/http"
	"net/url"
	"strings"
	"testing"
)

// In a closed round an expert's question page said only "Round 1 is
// closed. You can read your answers; the facilitator will open the next
// round." above their answer's values, still in boxes, and a reasoning
// box whose text, the page said, later in the workshop the other experts
// may see: nothing kept it (the preview does not read it, the save is
// refused, and the page opened again starts empty). The page now says
// that nothing can be saved until the facilitator opens the next round,
// that the answer below is the one saved and from which round, and that
// changing the values only tries the fit (and, where the values were
// tried without the script, not that they are the saved answer); it asks
// for no reasoning.
// Only a save refused because the round closed keeps the box, with the
// reasoning it sent, so that nothing typed vanishes. The facilitator's
// entry page of a closed round asks neither how the judgement reached
// them nor for the expert's reasoning. An open round asks for both again.
func TestClosedRoundPageShowsTheAnswerAndAsksForNothingToSave(t *testing.T) {
	g := newExpertRig(t, "Ada Quell", "Bruno Ferrante")
	ctx := context.Background()
	const reason = "Field returns of a similar seal (invented)."
	form := quantiles("0.05", "0.2", "0.4")
	form.Set("reason", reason)
	if resp, _ := g.post(g.qpath(0, g.q)+"/save", form); resp.StatusCode != http.StatusSeeOther {
		t.Fatalf("save in round 1: %d", resp.StatusCode)
	}
	if err := g.db.SetRound(ctx, g.ws.ID, 1, false, "Discussion (invented)."); err != nil {
		t.Fatal(err)
	}
	read := func(i int) string {
		t.Helper()
		_, page := g.get(g.qpath(i, g.q))
		return html.UnescapeString(page)
	}

	// Ada answered: her answer, its round and what comes next.
	page := read(0)
	status := "Round 1 is closed: nothing can be saved until the facilitator opens the next round, when you can revise your answer here. " +
		"Below are your answer from round 1 and its best-matching curve; changing the values only tries the fit, and nothing tried here is kept."
	for _, want := range []string{status, `name="values[1]" value="0.2"`, "What your numbers imply", reason, "Saving is closed for this round"} {
		if !strings.Contains(page, want) {
			t.Errorf("Ada's page in the closed round lacks %q", want)
		}
	}
	for _, wrong := range []string{`id="f-reason"`, "Later in the workshop the other experts may see it", "You can read your answers"} {
		if strings.Contains(page, wrong) {
			t.Errorf("Ada's page in the closed round says %q", wrong)
		}
	}
	// Bruno did not answer: nothing to show, nothing asked for a save.
	page = read(1)
	if !strings.Contains(page, "You have not answered this question yet; you can when the facilitator opens the next round.") || strings.Contains(page, `id="f-reason"`) {
		t.Error("Bruno's page in the closed round does not say he can answer in the next round, or asks for reasoning")
	}

	// Values tried without the script are not the saved answer.
	if _, tried := g.post(g.qpath(0, g.q)+"/preview", quantiles("0.06", "0.21", "0.41")); strings.Contains(html.UnescapeString(tried), "Below are your answer") ||
		!strings.Contains(tried, `value="0.21"`) {
		t.Error("the page of values tried without the script says they are the saved answer")
	}

	// A save the closed round refused keeps what it sent on the page,
	// its reasoning too.
	sent := quantiles("0.06", "0.21", "0.41")
	sent.Set("reason", "Sent after the close (invented).")
	resp, body := g.post(g.qpath(1, g.q)+"/save", sent)
	if resp.StatusCode != http.StatusConflict {
		t.Fatalf("save in the closed round: %d", resp.StatusCode)
	}
	if !strings.Contains(body, "Sent after the close (invented).</textarea>") {
		t.Error("the refused save's reasoning is gone from the page")
	}
	if strings.Contains(html.UnescapeString(body), "Below are your answer") {
		t.Error("the refused save's page says its values are the saved answer")
	}

	// The facilitator's entry page of the closed round.
	h, ws, qs, es, _ := seeded(t)
	if err := h.db.SetRound(ctx, ws.ID, ws.Round, false, "Break (invented)."); err != nil {
		t.Fatal(err)
	}
	_, entry := h.get(entryPath(ws.ID, qs[0].ID, es[0].ID))
	if !strings.Contains(entry, `name="values[0]"`) || !strings.Contains(entry, "Show the fit") {
		t.Fatal("the entry page of a closed round has no values to try the fit with")
	}
	for _, part := range []string{`id="f-channel"`, `id="f-reason"`} {
		if strings.Contains(entry, part) {
			t.Errorf("the entry page of a closed round offers %q, which only a save uses", part)
		}
	}
	if r, _ := h.post(entryPath(ws.ID, qs[0].ID, es[0].ID)+"/save", url.Values{}); r.StatusCode < 400 {
		t.Errorf("an entry in a closed round: %d", r.StatusCode)
	}

	// The next round asks for reasoning again.
	if err := g.db.SetRound(ctx, g.ws.ID, 2, true, "Second round (invented)."); err != nil {
		t.Fatal(err)
	}
	if page := read(0); !strings.Contains(page, `id="f-reason"`) || strings.Contains(page, "nothing tried here is kept") {
		t.Error("the open round's page does not ask for reasoning, or says nothing is kept")
	}
}

// An answer the facilitator entered was said "You can revise it here if
// it is not what you meant." above a closed round's disabled save. It now
// says the expert can revise it when the next round opens.
func TestEnteredAnswerSaysWhenItCanBeRevised(t *testing.T) {
	h, ws, qs, es, links := seeded(t)
	ctx := context.Background()
	priya := es[2] // the demo's Priya Raman has answered nothing
	form := url.Values{"channel": {"phone"}, "values[0]": {"0.01"}, "values[1]": {"0.03"}, "values[2]": {"0.09"}}
	if r, _ := h.post(entryPath(ws.ID, qs[0].ID, priya.ID)+"/save", form); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("entry: %d", r.StatusCode)
	}
	own := links[2].Path + "q/" + itoa(qs[0].ID)
	read := func() string {
		t.Helper()
		_, page := h.get(own)
		return html.UnescapeString(page)
	}
	if page := read(); !strings.Contains(page, "You can revise it here if it is not what you meant.") {
		t.Fatal("the open round's page does not say the entered answer can be revised")
	}
	if err := h.db.SetRound(ctx, ws.ID, ws.Round, false, "Break (invented)."); err != nil {
		t.Fatal(err)
	}
	page := read()
	if strings.Contains(page, "You can revise it here") ||
		!strings.Contains(page, "If it is not what you meant, you can revise it here when the facilitator opens the next round.") {
		t.Error("the closed round's page does not say the entered answer can be revised when the next round opens")
	}
	if err := h.db.SetArchived(ctx, ws.ID, true, "Finished (invented)."); err != nil {
		t.Fatal(err)
	}
	if page := read(); strings.Contains(page, "revise it here") || !strings.Contains(page, "was entered by the facilitator") {
		t.Error("the archived workshop's page says the entered answer can be revised")
	}
}

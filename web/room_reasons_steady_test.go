package web

import (
	"context"
	"net/http"
	"net/url"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// The reasons display stands still as the open round's count grows. Its
// pages were laid out under the header as it read at each fetch, and the
// count ("No expert has revised this question in round 2 yet." to "2 of
// 12 experts have answered or revised this question in round 2 so
// far.") took a second line as experts saved: the live page of eleven
// experts' reasons went from "Reasons 1–11 of 11" to "Reasons 1–9 of 11
// (page 1 of 2)", two reasons leaving the wall while the room read them.
// The pages are laid out for the longest count the round can show.
func TestReasonsDisplayStaysPutAsTheCountGrows(t *testing.T) {
	h := newHarness(t)
	h.signIn()
	ctx := context.Background()
	ws := workshop.Workshop{Title: "Invented: a panel of twelve", Invented: true}
	if err := h.db.CreateWorkshop(ctx, &ws); err != nil {
		t.Fatal(err)
	}
	q := workshop.Question{WorkshopID: ws.ID, Wording: "Of the new valve seals fitted next year, what proportion will leak within 12 months? (Invented.)",
		Quantity: "12-month leak share", Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: workshop.ProbsDefault}
	if err := h.db.AddQuestion(ctx, &q); err != nil {
		t.Fatal(err)
	}
	// Reasons of four short sentences each: about 180 characters, three
	// to four lines of a column.
	why := strings.TrimSpace(strings.Repeat("Field returns of a similar seal (invented). ", 4))
	var es []workshop.Expert
	save := func(e workshop.Expert, m float64) {
		t.Helper()
		rv := workshop.Revision{QuestionID: q.ID, ExpertID: e.ID, Answer: workshop.Answer{Values: []float64{m / 2, m, 1.8 * m}}, Reason: why}
		f, err := q.Fit(rv.Answer)
		if err != nil {
			t.Fatal(err)
		}
		rv.Kept = &f
		if err := h.db.SaveRevision(ctx, &rv); err != nil {
			t.Fatal(err)
		}
	}
	// Twelve experts; the twelfth joined late and answers first in
	// round 2.
	for i := 0; i < 12; i++ {
		e, _ := h.addExpert(ws, "Invented engineer "+string(rune('A'+i)))
		es = append(es, e)
		if i < 11 {
			save(e, 0.04+0.02*float64(i))
		}
	}
	for _, step := range []url.Values{{"action": {"close"}}, {"action": {"open"}, "reason": {"Round 2 (invented)."}}} {
		if r, _ := h.post(workshopPath(ws.ID)+"/round", step); r.StatusCode != http.StatusSeeOther {
			t.Fatalf("round %v: %d", step, r.StatusCode)
		}
	}
	display := reasonsPath(roomPath(ws.ID, q.ID), 1)
	heading := func() string {
		t.Helper()
		r, body := h.get(display)
		m := reasonsH2.FindStringSubmatch(body)
		if r.StatusCode != http.StatusOK || m == nil {
			t.Fatalf("the reasons display answers %d with no heading", r.StatusCode)
		}
		return m[1]
	}
	before := heading()
	for i, e := range append(es[11:], es[:11]...) {
		save(e, 0.05+0.02*float64(i))
		if got := heading(); got != before {
			t.Fatalf("after %d of 12 experts saved in round 2, the reasons display's first page reads %q; before, %q", i+1, got, before)
		}
	}
}

package web

import (
	"context"
	"net/url"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// The room's header said "Shown: every expert's answer as round 1 closed,
// without names." over "Nobody had answered this question when round 1
// closed." and over a retired question, on a screen that showed no
// answer; a retired question also said "No expert has revised this
// question in round 2 yet." though no expert can. The words stand over a
// panel shown, and only there.
func TestRoomSaysItShowsAnswersOnlyWhenItDoes(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	ctx := context.Background()
	unanswered := workshop.Question{WorkshopID: ws.ID, Wording: "Invented: what share of the spare boards will be used in year one?",
		Quantity: "spare boards used", Units: "proportion of boards", Lower: 0, Upper: 1,
		Format: workshop.FormatQuantiles, Probs: workshop.ProbsDefault}
	if err := h.db.AddQuestion(ctx, &unanswered); err != nil {
		t.Fatal(err)
	}
	if r, _ := h.post(workshopPath(ws.ID)+"/round", url.Values{"action": {"close"}}); r.StatusCode != 303 {
		t.Fatalf("close: %d", r.StatusCode)
	}
	const shown = "Shown: every expert"
	_, body := h.get(roomPath(ws.ID, qs[0].ID))
	if !strings.Contains(body, shown) {
		t.Fatalf("question 1's room, which shows its panel, does not say %q:\n%s", shown, body[strings.Index(body, "room-state"):][:600])
	}
	_, body = h.get(roomPath(ws.ID, unanswered.ID))
	if !strings.Contains(body, "Nobody had answered this question when round 1 closed.") || strings.Contains(body, shown) {
		t.Errorf("the room of a question nobody answered says %q beside its note, or no note", shown)
	}
	if r, _ := h.post(workshopPath(ws.ID)+"/round", url.Values{"action": {"open"}, "reason": {"Round 2 (invented)."}}); r.StatusCode != 303 {
		t.Fatalf("open round 2: %d", r.StatusCode)
	}
	if err := h.db.SetQuestionRetired(ctx, qs[0].ID, true, "Retired (invented)."); err != nil {
		t.Fatal(err)
	}
	_, body = h.get(roomPath(ws.ID, qs[0].ID))
	if !strings.Contains(body, "This question has been retired") {
		t.Fatal("the retired question's room does not say it is retired")
	}
	for _, no := range []string{shown, "revised this question in round 2"} {
		if strings.Contains(body, no) {
			t.Errorf("the retired question's room says %q", no)
		}
	}
}

// An archived workshop's room view said only "Round 1 is closed.", as
// though the next round might open; the overview and the panels say the
// workshop is archived, and so does the room now.
func TestRoomSaysTheWorkshopIsArchived(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	if err := h.db.SetArchived(context.Background(), ws.ID, true, "Finished (invented)."); err != nil {
		t.Fatal(err)
	}
	_, body := h.get(roomPath(ws.ID, qs[0].ID))
	if !strings.Contains(body, "The workshop is archived; round 1 is closed.") {
		t.Errorf("the archived workshop's room view does not say it is archived")
	}
}

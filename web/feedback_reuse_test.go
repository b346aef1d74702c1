package web

import (
	"context"
	"net/http"
	"net/url"
	"strings"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// A question's id can come back: SQLite gives a new question the id after
// the largest, so a workshop deleted while it was the newest frees its
// questions' ids, and a workshop imported next (by `parley import`, another
// process, while the server runs) takes them. Workshop ids never come
// back (store's nextWorkshopID counts the deleted). The remembered round
// feedback of the deleted workshop's question, empty since nobody had
// answered it, was served for the imported question with the same id, and
// the room view said "Nobody had answered" over a panel of three until a
// round changed.
func TestFeedbackOfAReusedQuestionIDIsItsOwn(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	ctx := context.Background()
	wp := workshopPath(ws.ID)
	for _, form := range []url.Values{{"action": {"close"}}, {"action": {"open"}, "reason": {"Discussion done (invented)."}}} {
		if r, body := h.post(wp+"/round", form); r.StatusCode != http.StatusSeeOther {
			t.Fatalf("%v: %d %s", form, r.StatusCode, body)
		}
	}
	rec, err := h.db.Record(ctx, ws.ID, time.Now())
	if err != nil {
		t.Fatal(err)
	}

	// A workshop nobody answered, its first round closed, its room viewed.
	empty := workshop.Workshop{Title: "Dry run (invented)", Purpose: "Practice.", Invented: true}
	if err := h.db.CreateWorkshop(ctx, &empty); err != nil {
		t.Fatal(err)
	}
	q := qs[0]
	q.ID, q.WorkshopID = 0, empty.ID
	if err := h.db.AddQuestion(ctx, &q); err != nil {
		t.Fatal(err)
	}
	if err := h.db.SetRound(ctx, empty.ID, 1, false, ""); err != nil {
		t.Fatal(err)
	}
	if _, body := h.get(roomPath(empty.ID, q.ID)); !strings.Contains(body, "Nobody had answered this question when round 1 closed.") {
		t.Fatalf("room of the unanswered workshop: %s", body)
	}
	if err := h.db.DeleteWorkshop(ctx, empty.ID, "A dry run (invented)."); err != nil {
		t.Fatal(err)
	}

	id, err := h.db.Import(ctx, rec)
	if err != nil {
		t.Fatal(err)
	}
	imported, err := h.db.Questions(ctx, id)
	if err != nil {
		t.Fatal(err)
	}
	if imported[0].ID != q.ID {
		t.Fatalf("the imported question has id %d, the deleted one had %d: the test no longer reuses an id", imported[0].ID, q.ID)
	}
	_, body := h.get(roomPath(id, imported[0].ID))
	if got := strings.Join(legendLabels(body), ","); got != "Expert A,Expert B,Expert C" {
		t.Errorf("room of the imported question: panel %q, want the three who answered round 1", got)
	}
}

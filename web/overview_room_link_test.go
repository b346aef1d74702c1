package web

import (
	"strings"
	"testing"
)

// The overview's questions table links each question's room view, the
// page for the projector: it was reached only through the question's
// panel, a page that names the experts, opened first on the facilitator's
// screen.
func TestOverviewLinksEachRoomView(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	_, page := h.get(workshopPath(ws.ID))
	table := page[strings.Index(page, `id="questions"`):]
	table = table[:strings.Index(table, "</table>")]
	for _, q := range qs {
		if link := `<a href="` + roomPath(ws.ID, q.ID) + `">Room view</a>`; !strings.Contains(table, link) {
			t.Errorf("the questions table lacks %s", link)
		}
	}
}

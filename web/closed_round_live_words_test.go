package web

import (
	"net/http"
	"net/url"
	"strings"
	"testing"
)

// In a closed round the overview's table of who answered what said it
// "follows new answers as they arrive", though none can arrive; it says
// the round is closed and that it follows them once the next opens.
func TestClosedRoundOverviewSaysNoAnswersArrive(t *testing.T) {
	h, ws, _, _, _ := seeded(t)
	wp := workshopPath(ws.ID)
	if _, body := h.get(wp); !strings.Contains(body, "this table follows new answers as they arrive") {
		t.Fatal("the open round's overview does not say it follows new answers")
	}
	if r, body := h.post(wp+"/round", url.Values{"action": {"close"}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("close: %d %s", r.StatusCode, body)
	}
	_, body := h.get(wp)
	if strings.Contains(body, "this table follows new answers as they arrive") ||
		!strings.Contains(body, "round 1 is closed: no answers arrive until the next round opens, and this table follows them then.") {
		t.Error("the closed round's overview says it follows new answers as they arrive")
	}
}

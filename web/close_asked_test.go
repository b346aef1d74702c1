package web

import (
	"context"
	"net/http"
	"net/url"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// A workshop with no question in use offers no "Close round 1": its
// rounds card says what to do first, and a close sent anyway (a stale
// tab) is refused beside the rounds card, 422, with nothing recorded.
// Closing it had been offered and taken, and round 2 then fed nothing
// back.
func TestNoCloseWithNothingAsked(t *testing.T) {
	h := newHarness(t)
	h.signIn()
	ws := h.newWorkshop("Nothing asked yet (invented)")
	wp := workshopPath(ws.ID)
	_, page := h.get(wp)
	if strings.Contains(page, "Close round 1") {
		t.Errorf("the overview offers to close round 1 with no question:\n%s", excerpt(page, `id="rounds"`))
	}
	if want := "Round 1 is open, with no question yet: experts have nothing to answer. Add a question below; the round can close once there is one."; !strings.Contains(page, want) {
		t.Errorf("the rounds card lacks %q:\n%s", want, excerpt(page, `id="rounds"`))
	}
	res, page := h.post(wp+"/round", url.Values{"action": {"close"}})
	if res.StatusCode != http.StatusUnprocessableEntity {
		t.Fatalf("closing round 1 with no question: %d, want 422", res.StatusCode)
	}
	if want := "round 1 has no question in use to answer: add one, or bring back a retired one, before closing it"; !strings.Contains(page, want) {
		t.Errorf("the refusal lacks %q:\n%s", want, excerpt(page, `id="rounds"`))
	}
	evs, err := h.db.Events(context.Background(), ws.ID)
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range evs {
		if e.Kind == workshop.EventRoundClosed {
			t.Fatalf("a round close was recorded: %+v", e)
		}
	}
	q := h.addQuantileQuestion(t, ws.ID, "What share of the invented pumps fail in a year?", "failure share")
	qp := questionPath(ws.ID, q.ID)
	if res, body := h.post(qp+"/retire", url.Values{"action": {"retire"}, "retire_reason": {"Asked too soon (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("retire: %d %s", res.StatusCode, body)
	}
	_, page = h.get(wp)
	if want := "Round 1 is open, but every question is retired: experts have nothing to answer. Bring one back from its page, or add one below"; !strings.Contains(page, want) || strings.Contains(page, "Close round 1") {
		t.Errorf("the rounds card, every question retired, lacks %q or offers to close:\n%s", want, excerpt(page, `id="rounds"`))
	}
	if res, body := h.post(qp+"/retire", url.Values{"action": {"restore"}, "retire_reason": {"Asked after all (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("restore: %d %s", res.StatusCode, body)
	}
	if _, page := h.get(wp); !strings.Contains(page, "Close round 1") {
		t.Errorf("with a question in use, the overview offers no close:\n%s", excerpt(page, `id="rounds"`))
	}
	if res, body := h.post(wp+"/round", url.Values{"action": {"close"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("closing round 1 with a question: %d %s", res.StatusCode, excerpt(body, `id="rounds"`))
	}
}

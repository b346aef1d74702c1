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
	if want := "with no question in use yet: experts have nothing to answer. Add a question below"; !strings.Contains(page, want) {
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
	h.addQuantileQuestion(t, ws.ID, "What share of the invented pumps fail in a year?", "failure share")
	if _, page := h.get(wp); !strings.Contains(page, "Close round 1") {
		t.Errorf("with a question in use, the overview offers no close:\n%s", excerpt(page, `id="rounds"`))
	}
	if res, body := h.post(wp+"/round", url.Values{"action": {"close"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("closing round 1 with a question: %d %s", res.StatusCode, excerpt(body, `id="rounds"`))
	}
}

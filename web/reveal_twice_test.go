package web

import (
	"context"
	"net/http"
	"net/url"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// The value already shown to the experts, sent again (from a second tab,
// or "Change the shown value" pressed with it unchanged), changes nothing
// and is refused beside the field; the decision log keeps one reveal. It
// recorded a second reveal of the same value with the second reason.
func TestRevealingTheShownValueAgainIsRefused(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	q := qs[1]
	value := strconv.FormatFloat(*q.TrueValue, 'g', -1, 64)
	path := calibrationPath(ws.ID) + "/q/" + strconv.FormatInt(q.ID, 10)
	if res, body := h.post(path, url.Values{"true_value": {value}, "reveal": {"on"}, "reason": {"Shown to the room (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("reveal: %d %s", res.StatusCode, body)
	}
	res, body := h.post(path, url.Values{"true_value": {value}, "reveal": {"on"}, "reason": {"Second tab (invented)."}})
	if res.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, "nothing to change (the true value shown to the experts is already "+value+")") {
		t.Errorf("revealing the shown value again: %d, want 422 saying nothing changed", res.StatusCode)
	}
	evs, err := h.db.Events(context.Background(), ws.ID)
	if err != nil {
		t.Fatal(err)
	}
	n := 0
	for _, ev := range evs {
		if ev.Kind == workshop.EventTruthRevealed && ev.QuestionID == q.ID {
			n++
		}
	}
	if n != 1 {
		t.Errorf("%d reveals of Q2 in the log, want 1", n)
	}
	// A new value is still shown, as a reveal of its own.
	if res, body := h.post(path, url.Values{"true_value": {"0.07"}, "reason": {"Typo (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("changing the shown value: %d %s", res.StatusCode, body)
	}
}

package web

import (
	"context"
	"net/http"
	"net/url"
	"regexp"
	"strings"
	"testing"
)

// roundForm reads the overview's round forms: each one's action and
// the round its button names, as the page sends them.
var roundForm = regexp.MustCompile(`<input type="hidden" name="action" value="(close|open|reopen)">\s*<input type="hidden" name="round" value="(\d+)">`)

// A round form sent from a page that was out of date (left open in
// another tab, or brought back by the back button) said "Close round 1"
// and closed round 2, or "Open round 2" and opened round 3: the form
// named no round, and the action took the workshop's round as it stood.
// It carries the round its button names now, and one that is no longer
// the open (or the next, or the last closed) round is refused, nothing
// changed.
func TestStaleRoundFormChangesNothing(t *testing.T) {
	h, ws, _, _, _ := seeded(t)
	wp := workshopPath(ws.ID)
	// The page as it stood with round 1 open: its form to close round 1.
	page := func() map[string]url.Values {
		t.Helper()
		_, body := h.get(wp)
		forms := map[string]url.Values{}
		for _, m := range roundForm.FindAllStringSubmatch(body, -1) {
			forms[m[1]] = url.Values{"action": {m[1]}, "round": {m[2]}, "reason": {"From a page left open (invented)."}, "reopen_reason": {"From a page left open (invented)."}}
		}
		return forms
	}
	stale := page()
	if stale["close"].Get("round") != "1" {
		t.Fatalf("the overview in round 1 sends %v to close it", stale["close"])
	}
	round := func() (int, bool) {
		t.Helper()
		w, err := h.db.Workshop(context.Background(), ws.ID)
		if err != nil {
			t.Fatal(err)
		}
		return w.Round, w.Open
	}
	send := func(f url.Values) (int, string) {
		t.Helper()
		r, body := h.post(wp+"/round", f)
		return r.StatusCode, body
	}
	// In another tab: round 1 closed, round 2 opened.
	for _, action := range []string{"close", "open"} {
		if st, _ := send(page()[action]); st != http.StatusSeeOther {
			t.Fatalf("%s: %d", action, st)
		}
	}
	if r, open := round(); r != 2 || !open {
		t.Fatalf("round %d (open %v), want round 2 open", r, open)
	}
	// The stale "Close round 1".
	st, body := send(stale["close"])
	if r, open := round(); st != http.StatusUnprocessableEntity || r != 2 || !open {
		t.Fatalf("the stale close of round 1 answered %d and left round %d (open %v); want 422 and round 2 open", st, r, open)
	}
	if !strings.Contains(body, "the open round is 2, not 1") {
		t.Errorf("the refusal does not say which round is open")
	}
	// Round 2 closed here; the stale "Open round 2" of a page from when
	// round 1 had closed, and its "Reopen round 1".
	if st, _ := send(page()["close"]); st != http.StatusSeeOther {
		t.Fatalf("close round 2: %d", st)
	}
	between := url.Values{"action": {"open"}, "round": {"2"}, "reason": {"From a page left open (invented)."}}
	if st, body := send(between); st != http.StatusUnprocessableEntity || !strings.Contains(body, "the next round is 3, not 2") {
		t.Errorf("the stale opening of round 2 answered %d", st)
	}
	reopen := url.Values{"action": {"reopen"}, "round": {"1"}, "reopen_reason": {"From a page left open (invented)."}}
	if st, body := send(reopen); st != http.StatusUnprocessableEntity || !strings.Contains(body, "the last closed round is 2, not 1") {
		t.Errorf("the stale reopening of round 1 answered %d", st)
	}
	if r, open := round(); r != 2 || open {
		t.Fatalf("after the stale forms the workshop is at round %d (open %v), want round 2 closed", r, open)
	}
	// A round that is not a whole number is refused by name.
	if st, body := send(url.Values{"action": {"open"}, "round": {"three"}, "reason": {"x"}}); st != http.StatusUnprocessableEntity || !strings.Contains(body, "round") {
		t.Errorf("a round of %q answered %d", "three", st)
	}
	// The page's own forms, current, still work.
	if st, _ := send(page()["reopen"]); st != http.StatusSeeOther {
		t.Errorf("reopen round 2 from the current page: %d", st)
	}
}

package web

import (
	"net/http"
	"net/url"
	"strconv"
	"strings"
	"testing"
)

// A calibration question's true value shown while a round is open
// freezes its answers (store.SaveRevision refuses them), and the room
// said "No expert has revised this question in round 2 yet." under the
// true value, as though revisions were still to come; after a revision
// saved before the reveal, "1 of 4 experts has revised this question in
// round 2 so far." The room says the answers closed at the reveal and
// how many came before it.
func TestRoomSaysARevealedQuestionTakesNoMoreAnswers(t *testing.T) {
	h, ws, qs, _, links := seeded(t)
	wp := workshopPath(ws.ID)
	q := qs[1] // the demo's calibration question
	if !q.Calibration {
		t.Fatalf("the demo's question 2 is not a calibration question")
	}
	for _, step := range []url.Values{{"action": {"close"}}, {"action": {"open"}, "reason": {"Round 2 (invented)."}}} {
		if r, _ := h.post(wp+"/round", step); r.StatusCode != http.StatusSeeOther {
			t.Fatalf("round %v: %d", step, r.StatusCode)
		}
	}
	reveal := func(value string) {
		t.Helper()
		if r, _ := h.post(calibrationPath(ws.ID)+"/q/"+strconv.FormatInt(q.ID, 10),
			url.Values{"true_value": {value}, "reveal": {"on"}, "reason": {"Shown (invented)."}}); r.StatusCode != http.StatusSeeOther {
			t.Fatalf("reveal: %d", r.StatusCode)
		}
	}
	state := func() string {
		t.Helper()
		_, body := h.get(roomPath(ws.ID, q.ID))
		i := strings.Index(body, `<p class="room-state">`)
		j := strings.Index(body[i:], "</p>")
		return strings.Join(strings.Fields(body[i:i+j]), " ")
	}
	if got := state(); !strings.Contains(got, "No expert has revised this question in round 2 yet.") {
		t.Fatalf("before any save the room's state reads %q", got)
	}
	// One expert revises before the reveal.
	if r, _ := h.post(links[0].Path+"q/"+strconv.FormatInt(q.ID, 10)+"/save",
		url.Values{"values[0]": {"0.02"}, "values[1]": {"0.05"}, "values[2]": {"0.12"}, "reason": {"Audits (invented)."}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("save: %d", r.StatusCode)
	}
	before := state()
	if !strings.Contains(before, "1 of 4 experts has") || !strings.Contains(before, "this question in round 2 so far.") {
		t.Fatalf("before the reveal the room's state reads %q", before)
	}
	reveal("0.0413")
	got := state()
	if strings.Contains(got, "yet") || strings.Contains(got, "so far") {
		t.Errorf("after the reveal the room still waits for answers: %q", got)
	}
	if !strings.Contains(got, "Answers to this question closed when its true value was shown, after 1 of 4 experts had") {
		t.Errorf("after the reveal the room's state reads %q", got)
	}
}

func TestFrozenProgressWords(t *testing.T) {
	for _, c := range []struct {
		n, of int
		verb  string
		want  string
	}{
		{0, 4, "revised", "Answers to this question closed when its true value was shown; no expert had revised it in round 2."},
		{1, 4, "revised", "Answers to this question closed when its true value was shown, after 1 of 4 experts had revised it in round 2."},
		{2, 5, "answered or revised", "Answers to this question closed when its true value was shown, after 2 of 5 experts had answered or revised it in round 2."},
	} {
		if got := frozenProgress(c.n, c.of, c.verb, 2); got != c.want {
			t.Errorf("frozenProgress(%d, %d, %q) = %q, want %q", c.n, c.of, c.verb, got, c.want)
		}
	}
}

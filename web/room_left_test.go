package web

import (
	"context"
	"html"
	"net/http"
	"net/url"
	"strconv"
	"strings"
	"testing"
)

// After an expert who had answered is revoked, the room's letters skip
// theirs (TestRevokeKeepsTheOtherExpertsLetters): the projector read
// "Expert A, Expert C, Expert D" with no word of B. The header now says a
// letter is missing and why, naming nobody, on the picture and on the
// reasons display; an expert revoked without an answer takes no letter
// and changes nothing.
func TestRoomSaysALetterIsMissing(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	wp := workshopPath(ws.ID)
	for _, step := range []url.Values{{"action": {"close"}}, {"action": {"open"}, "reason": {"Round 2 (invented)."}}} {
		if r, _ := h.post(wp+"/round", step); r.StatusCode != http.StatusSeeOther {
			t.Fatalf("round %v: %d", step, r.StatusCode)
		}
	}
	q := qs[0]
	room := roomPath(ws.ID, q.ID)
	pages := []string{room, reasonsPath(room, 1)}
	const missing = "One expert who had answered no longer takes part, so one letter is missing; the others keep theirs."
	read := func(p string) string {
		t.Helper()
		r, body := h.get(p)
		if r.StatusCode != http.StatusOK {
			t.Fatalf("%s: %d", p, r.StatusCode)
		}
		return strings.Join(strings.Fields(html.UnescapeString(body)), " ")
	}
	for _, p := range pages {
		if body := read(p); strings.Contains(body, "letter is missing") || !strings.Contains(body, "Shown: every expert's answer as round 1 closed, without names.") {
			t.Errorf("%s before any revocation: a letter said missing, or the panel not said whole", p)
		}
	}
	revs, err := h.db.LatestRevisions(context.Background(), q.ID, 1)
	if err != nil {
		t.Fatal(err)
	}
	answered := map[int64]bool{}
	for _, rv := range revs {
		answered[rv.ExpertID] = true
	}
	revoke := func(id int64) {
		t.Helper()
		p := wp + "/experts/" + strconv.FormatInt(id, 10) + "/revoke"
		if r, _ := h.post(p, url.Values{"confirm": {"yes"}, "reason": {"Left the workshop (invented)."}}); r.StatusCode != http.StatusSeeOther {
			t.Fatalf("revoke: %d", r.StatusCode)
		}
	}
	// The demo's fourth expert had not answered question 1: no letter.
	for _, e := range es {
		if !answered[e.ID] {
			revoke(e.ID)
			break
		}
	}
	for _, p := range pages {
		if body := read(p); strings.Contains(body, "letter is missing") {
			t.Errorf("%s: an expert without an answer revoked, and a letter is said missing", p)
		}
	}
	var gone []string
	for _, e := range es {
		if answered[e.ID] {
			revoke(e.ID)
			gone = append(gone, e.Name)
			break
		}
	}
	for _, p := range pages {
		body := read(p)
		if !strings.Contains(body, "Shown: the answers of the experts still on the panel as round 1 closed, without names. "+missing) {
			t.Errorf("%s after a revocation does not say %q", p, missing)
		}
		for _, name := range gone {
			if strings.Contains(body, name) {
				t.Errorf("%s names the revoked expert %s", p, name)
			}
		}
	}
}

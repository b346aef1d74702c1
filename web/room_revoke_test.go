package web

import (
	"maps"
	"net/http"
	"net/url"
	"strconv"
	"testing"
)

// An expert revoked while round 2 is open leaves the feedback at once,
// and the others keep their letters: the room had lettered only the
// active experts, so every letter after the revoked one's moved, and the
// projector's "Expert B" became another expert's curve and reason while
// the room was discussing it, as did the experts' own pages.
func TestRevokeKeepsTheOtherExpertsLetters(t *testing.T) {
	h, ws, qs, es, links := seeded(t)
	wp := workshopPath(ws.ID)
	q := qs[0]
	for _, step := range []url.Values{{"action": {"close"}}, {"action": {"open"}, "reason": {"Round 2 (invented)."}}} {
		if r, _ := h.post(wp+"/round", step); r.StatusCode != http.StatusSeeOther {
			t.Fatalf("round %v: %d", step, r.StatusCode)
		}
	}
	_, body := h.get(roomPath(ws.ID, q.ID))
	before := labelMedians(body)
	// Three of the demo's four experts answered question 1 in round 1.
	if len(before) != 3 {
		t.Fatalf("the room shows %v, want three experts' curves", before)
	}
	page := func(i int) map[string]string {
		_, body := h.get(links[i].Path + "q/" + strconv.FormatInt(q.ID, 10))
		return labelMedians(body)
	}
	// The expert lettered A, found as the one whose page lacks it.
	first := -1
	for i := range links {
		if _, ok := page(i)["You"]; ok {
			if _, ok := page(i)["Expert A"]; !ok {
				first = i
			}
		}
	}
	if first < 0 {
		t.Fatal("no expert's page lacks Expert A")
	}
	revoke := wp + "/experts/" + strconv.FormatInt(es[first].ID, 10) + "/revoke"
	if r, _ := h.post(revoke, url.Values{"confirm": {"yes"}, "reason": {"Left the workshop (invented)."}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("revoke: %d", r.StatusCode)
	}
	want := maps.Clone(before)
	delete(want, "Expert A")
	_, body = h.get(roomPath(ws.ID, q.ID))
	if after := labelMedians(body); !maps.Equal(after, want) {
		t.Errorf("after Expert A was revoked the room shows %v; before it showed %v, so it should show %v", after, before, want)
	}
	for i := range links {
		if i == first {
			continue
		}
		for label, med := range page(i) {
			if label != "You" && want[label] != med {
				t.Errorf("%s's page shows %s with median %s; the room showed it with %s", es[i].Name, label, med, want[label])
			}
		}
	}
}

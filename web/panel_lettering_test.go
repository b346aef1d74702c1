package web

import (
	"html"
	"net/http"
	"regexp"
	"strings"
	"testing"
)

// panelIntroText is the sentence above the round-2 panel.
var panelIntroText = regexp.MustCompile(`(?s)<h2>What the other experts said</h2>\s*<p>(.*?)</p>`)

// The round-2 panel letters the other experts as the room view does, so an
// expert sees "Expert B, Expert C" and no "Expert A" beside their own curve,
// "You". The words above the picture say that the letters are the other
// experts', as on the facilitator's screen, and name the missing one as
// theirs; an expert who was not in the panel fed back is told of no
// letter of theirs.
func TestPanelSaysTheMissingLetterIsYours(t *testing.T) {
	g := newExpertRig(t, "Ada Quell", "Bruno Ferrante", "Chiara Osei", "Dario Brook")
	for i := range 3 {
		if r, _ := g.post(g.qpath(i, g.q)+"/save", quantiles("0.05", "0.2", "0.4")); r.StatusCode != http.StatusSeeOther {
			t.Fatalf("save: %d", r.StatusCode)
		}
	}
	g.secondRound()
	intro := func(i int) (string, []string) {
		t.Helper()
		_, page := g.get(g.qpath(i, g.q))
		m := panelIntroText.FindStringSubmatch(page)
		if m == nil {
			t.Fatalf("expert %d: no panel", i)
		}
		return html.UnescapeString(m[1]), otherLabel.FindAllString(wideOnly(page), -1)
	}
	const lettering = "Your own curve is marked “You”; the letters are the other experts', as on the facilitator's screen in the room, where yours is Expert "
	said, labels := intro(0)
	if len(labels) != 2 {
		t.Fatalf("Ada's panel letters %d other experts, want 2", len(labels))
	}
	if !strings.Contains(said, lettering) {
		t.Errorf("Ada's panel does not say whose the letters are:\n%s", said)
	}
	// Each of the three misses a different letter: their own.
	missing := map[string]bool{}
	for i := range 3 {
		said, labels := intro(i)
		seen := strings.Join(labels, " ")
		for _, l := range []string{"Expert A", "Expert B", "Expert C"} {
			if !strings.Contains(seen, ">"+l+"<") {
				missing[l] = true
				if !strings.Contains(said, "where yours is "+l+".") {
					t.Errorf("expert %d's page misses %s but does not name it as theirs:\n%s", i, l, said)
				}
			}
		}
	}
	if len(missing) != 3 {
		t.Errorf("the three experts' pages miss the letters %v, want each its own", missing)
	}
	// Dario answers only in round 2: his curve is "You", but no letter of
	// the round-1 panel is his.
	if r, _ := g.post(g.qpath(3, g.q)+"/save", quantiles("0.05", "0.2", "0.4")); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("save: %d", r.StatusCode)
	}
	said, labels = intro(3)
	if len(labels) != 3 {
		t.Fatalf("Dario's panel letters %d other experts, want 3", len(labels))
	}
	if !strings.Contains(said, "Your own curve is marked “You”; the letters are the other experts'") || strings.Contains(said, "yours is") {
		t.Errorf("Dario, not in the panel fed back, is told of a missing letter, or not whose the letters are:\n%s", said)
	}
}

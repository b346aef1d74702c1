package web

import (
	"net/http"
	"net/url"
	"regexp"
	"strconv"
	"testing"
)

// legendSample is a legend's line and its label; lineLook reads the
// line's colour and dashes.
var (
	legendSample = regexp.MustCompile(`<line class="legend-sample legend-expert"([^>]*)></line>\s*<text class="legend-label"[^>]*>(Expert [A-Z]+|You)</text>`)
	lineLook     = regexp.MustCompile(`stroke="([^"]*)"|stroke-dasharray="([^"]*)"`)
)

// legendLooks maps each expert curve's label in a page's (wide) picture
// to its line: colour and dashes.
func legendLooks(body string) map[string]string {
	out := map[string]string{}
	for _, m := range legendSample.FindAllStringSubmatch(wideOnly(body), -1) {
		look := ""
		for _, a := range lineLook.FindAllStringSubmatch(m[1], -1) {
			look += a[0] + " "
		}
		out[m[2]] = look
	}
	return out
}

// A letter is one line wherever it is drawn. The projector drew the
// panel's curves in their order (Expert A blue and solid, B orange and
// dashed, …), and each expert's page drew its own "You" first and the
// others after it, one letter missing: "Expert B" was orange on the
// projector and blue or green on the experts' screens, so "the orange
// dashed curve" named a different expert on every screen in the room.
// Each letter now keeps its line everywhere, and "You" is drawn in the
// line of the expert's own letter on the projector.
func TestALetterIsOneLineOnEveryScreen(t *testing.T) {
	h, ws, qs, es, links := seeded(t)
	wp := workshopPath(ws.ID)
	q := qs[0]
	for _, step := range []url.Values{{"action": {"close"}}, {"action": {"open"}, "reason": {"Round 2 (invented)."}}} {
		if r, _ := h.post(wp+"/round", step); r.StatusCode != http.StatusSeeOther {
			t.Fatalf("round %v: %d", step, r.StatusCode)
		}
	}
	_, body := h.get(roomPath(ws.ID, q.ID))
	room := legendLooks(body)
	if len(room) != 3 {
		t.Fatalf("the room's legend has %v, want three experts", room)
	}
	yours := 0
	for i, l := range links {
		_, page := h.get(l.Path + "q/" + strconv.FormatInt(q.ID, 10))
		mine := legendLooks(page)
		if len(mine) == 0 {
			t.Fatalf("%s's page has no legend", es[i].Name)
		}
		seen := map[string]bool{}
		for label, look := range mine {
			seen[look] = true
			if label == "You" {
				continue
			}
			if room[label] != look {
				t.Errorf("%s's page draws %s as %q; the projector as %q", es[i].Name, label, look, room[label])
			}
		}
		if len(seen) != len(mine) {
			t.Errorf("%s's page draws two curves alike: %v", es[i].Name, mine)
		}
		you, ok := mine["You"]
		if !ok {
			continue
		}
		for label, look := range room {
			if _, shown := mine[label]; !shown {
				yours++
				if you != look {
					t.Errorf("%s's own curve is drawn %q; their letter, %s, on the projector %q", es[i].Name, you, label, look)
				}
			}
		}
	}
	// Three of the four answered in round 1, each missing their own letter.
	if yours != 3 {
		t.Errorf("%d experts' pages miss a letter of the room's, want 3", yours)
	}
}

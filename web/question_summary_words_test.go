package web

import (
	"net/http"
	"strings"
	"testing"
)

// The question's panel writes its quantity, units, bounds and format as
// a line of words with a space before each "·": templ dropped the space
// after the units, "first-year failure proportion, HX-40 (proportion of
// units)· bounds 0 to 1", on the page the facilitator shows beside the
// room view.
func TestQuestionSummarySpacesItsParts(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	r, body := h.get(questionPath(ws.ID, qs[0].ID))
	if r.StatusCode != http.StatusOK {
		t.Fatalf("panel: %d", r.StatusCode)
	}
	text := strings.Join(strings.Fields(stripTags(body)), " ")
	const want = "first-year failure proportion, HX-40 (proportion of units) · bounds 0 to 1 · asked as"
	if !strings.Contains(text, want) {
		i := strings.Index(text, "(proportion of units)")
		t.Errorf("the panel's summary reads %q, want %q", text[max(0, i-40):min(len(text), i+80)], want)
	}
}

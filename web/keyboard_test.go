package web

import (
	"context"
	"net/http"
	"regexp"
	"strconv"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// A question whose values may be negative (a change in temperature, a
// margin) asked for them with a phone's decimal keypad, which on an
// iPhone has no minus key: an expert there could type no negative value
// at all. Its value boxes ask for the full keyboard; a proportion's and
// the confidence keep the decimal keypad, chips the numeric one.
func TestNegativeValuesGetAKeyboardWithAMinus(t *testing.T) {
	h, ws, qs, _, links := seeded(t)
	ctx := context.Background()
	add := func(q workshop.Question) workshop.Question {
		t.Helper()
		q.WorkshopID = ws.ID
		if err := h.db.AddQuestion(ctx, &q); err != nil {
			t.Fatal(err)
		}
		return q
	}
	change := add(workshop.Question{Wording: "Invented: by how many degrees will the hall's mean temperature change?", Quantity: "temperature change",
		Units: "°C", Lower: -10, Upper: 10, Format: workshop.FormatQuantiles, Probs: workshop.ProbsDefault})
	margin := add(workshop.Question{Wording: "Invented: what margin will the bid carry?", Quantity: "margin",
		Units: "points", Lower: -5, Upper: 20, Format: workshop.FormatInterval})
	chips := add(workshop.Question{Wording: "Invented: place your chips.", Quantity: "share", Lower: 0, Upper: 1,
		Format: workshop.FormatChips, BinEdges: workshop.DefaultBinEdges(0, 1), Chips: workshop.DefaultChips})
	box := regexp.MustCompile(`<input type="text" inputmode="([a-z]*)" autocomplete="off" id="(f-[a-z0-9-]+)"`)
	for _, c := range []struct {
		q    workshop.Question
		want map[string]string
	}{
		{qs[0], map[string]string{"f-values-0": "decimal", "f-values-1": "decimal", "f-values-2": "decimal"}},
		{change, map[string]string{"f-values-0": "text", "f-values-1": "text", "f-values-2": "text"}},
		{margin, map[string]string{"f-lowest": "text", "f-highest": "text", "f-best": "text", "f-confidence": "decimal"}},
		{chips, map[string]string{"f-counts-0": "numeric", "f-counts-7": "numeric"}},
	} {
		res, body := h.get(links[2].Path + "q/" + strconv.FormatInt(c.q.ID, 10))
		if res.StatusCode != http.StatusOK {
			t.Fatalf("%s: %d", c.q.Quantity, res.StatusCode)
		}
		got := map[string]string{}
		for _, m := range box.FindAllStringSubmatch(body, -1) {
			got[m[2]] = m[1]
		}
		for id, want := range c.want {
			if got[id] != want {
				t.Errorf("%s (bounds %g to %g): #%s asks for inputmode %q, want %q", c.q.Quantity, c.q.Lower, c.q.Upper, id, got[id], want)
			}
		}
	}
}

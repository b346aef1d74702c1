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

// The facilitator's boxes for values that may be below 0 ask a phone for
// the full keyboard too: a question's bounds (a temperature change from
// −10), its true value on the question form and on the calibration page
// when the bounds go below 0, and the quick priors' mean and interval
// ends; on the decimal keypad a facilitator on a phone could type no
// minus. A proportion's true value on the calibration page keeps the
// keypad.
func TestFacilitatorsNegativeValuesGetAKeyboardWithAMinus(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	ctx := context.Background()
	change := workshop.Question{WorkshopID: ws.ID, Wording: "Invented: by how many degrees will the hall's mean temperature change?", Quantity: "temperature change",
		Units: "°C", Lower: -10, Upper: 10, Format: workshop.FormatQuantiles, Probs: workshop.ProbsDefault, Calibration: true}
	if err := h.db.AddQuestion(ctx, &change); err != nil {
		t.Fatal(err)
	}
	box := regexp.MustCompile(`<input type="text" inputmode="([a-z]*)" autocomplete="off" id="([a-z0-9_-]+)"`)
	modes := func(path string) map[string]string {
		t.Helper()
		res, body := h.get(path)
		if res.StatusCode != http.StatusOK {
			t.Fatalf("%s: %d", path, res.StatusCode)
		}
		got := map[string]string{}
		for _, m := range box.FindAllStringSubmatch(body, -1) {
			got[m[2]] = m[1]
		}
		return got
	}
	wsPath := "/w/" + strconv.FormatInt(ws.ID, 10)
	calibration := map[string]string{seedInputID(change.ID, "true_value"): "text"}
	for _, q := range qs {
		if q.Calibration && q.IsProportion() {
			calibration[seedInputID(q.ID, "true_value")] = "decimal"
		}
	}
	if len(calibration) < 2 {
		t.Fatal("the demo has no calibration question on a proportion")
	}
	for path, want := range map[string]map[string]string{
		wsPath + "/q/" + strconv.FormatInt(change.ID, 10) + "/edit": {"f-lower": "text", "f-upper": "text", "f-true_value": "text"},
		quickPriorsPath(ws.ID): {"f-c_mean": "text", "f-c_low": "text", "f-c_high": "text", "f-c_coverage": "decimal", "f-c_sd": "decimal"},
		calibrationPath(ws.ID): calibration,
	} {
		got := modes(path)
		for id, w := range want {
			if got[id] != w {
				t.Errorf("%s: #%s asks for inputmode %q, want %q", path, id, got[id], w)
			}
		}
	}
}

// The consensus judgement on a question's panel, the values the panel
// agreed, asks a phone for the full keyboard where they may be below 0,
// as the expert's and the facilitator's other boxes do: it asked for the
// decimal keypad whatever the bounds, so a consensus of −2 °C could not
// be typed on an iPhone. A proportion's keeps the keypad.
func TestConsensusValuesBelowZeroGetAKeyboardWithAMinus(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	change := workshop.Question{WorkshopID: ws.ID, Wording: "Invented: by how many degrees will the hall's mean temperature change?", Quantity: "temperature change",
		Units: "°C", Lower: -10, Upper: 10, Format: workshop.FormatQuantiles, Probs: workshop.ProbsDefault}
	if err := h.db.AddQuestion(context.Background(), &change); err != nil {
		t.Fatal(err)
	}
	box := regexp.MustCompile(`<input type="text" inputmode="([a-z]*)" autocomplete="off" id="(cf-values-[0-9])"`)
	for _, c := range []struct {
		q    workshop.Question
		want string
	}{{change, "text"}, {qs[0], "decimal"}} {
		res, body := h.get(questionPath(ws.ID, c.q.ID))
		if res.StatusCode != http.StatusOK {
			t.Fatalf("Q%d: %d", c.q.Position, res.StatusCode)
		}
		ms := box.FindAllStringSubmatch(body, -1)
		if len(ms) != len(c.q.Probs) {
			t.Fatalf("Q%d: %d consensus boxes, want %d", c.q.Position, len(ms), len(c.q.Probs))
		}
		for _, m := range ms {
			if m[1] != c.want {
				t.Errorf("Q%d (bounds %g to %g): #%s asks for inputmode %q, want %q", c.q.Position, c.q.Lower, c.q.Upper, m[2], m[1], c.want)
			}
		}
	}
}

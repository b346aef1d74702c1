package web

import (
	"context"
	"html"
	"net/http"
	"net/url"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// A save in a closed round leaves what was sent on the page, where the fit
// can still be tried, as the value boxes do; the refusal says that nothing
// there is kept. It said "Your values are kept below" above chips that
// could still be moved, and moving them kept nothing. Chips are spoken of
// as chips on the board.
func TestClosedRoundSaysNothingOnThePageIsKept(t *testing.T) {
	g := newExpertRig(t)
	if err := g.db.SetRound(context.Background(), g.ws.ID, 1, false, "break for discussion"); err != nil {
		t.Fatal(err)
	}
	chips := url.Values{"counts[1]": {"8"}, "counts[2]": {"7"}, "counts[3]": {"5"}}
	for _, c := range []struct {
		name, path string
		form       url.Values
		want       string
		movable    string // what shows the values can still be changed on the page
	}{
		{"chips", g.qpath(0, g.qc), chips,
			"Round 1 is closed, so your chips were not saved. They are still on the board below, where you can move them to try the fit, but nothing here is kept",
			`class="chips-board" data-chips="20" hidden`},
		{"quantiles", g.qpath(0, g.q), quantiles("0.05", "0.2", "0.4"),
			"Round 1 is closed, so your answer was not saved. Your values are still in the form below, where you can change them to try the fit, but nothing here is kept",
			`name="values[1]" value="0.2"`},
	} {
		resp, body := g.post(c.path+"/save", c.form)
		if resp.StatusCode != http.StatusConflict {
			t.Fatalf("%s: save in a closed round answered %d", c.name, resp.StatusCode)
		}
		text := html.UnescapeString(body)
		if !strings.Contains(text, c.want) || strings.Contains(text, "kept below") {
			t.Errorf("%s: the refusal does not say that nothing on the page is kept", c.name)
		}
		// The board is not made read-only, nor the boxes: the fit can be tried.
		if !strings.Contains(body, c.movable) || strings.Contains(body, " readonly") || strings.Contains(body, "data-readonly") {
			t.Errorf("%s: the values can no longer be changed to try the fit", c.name)
		}
	}
	if n := len(g.revisions()); n != 0 {
		t.Errorf("%d revisions saved in a closed round", n)
	}
}

// The facilitator's entry page answers a save in a closed round as the
// expert's page does, in the facilitator's words: the judgement is the
// expert's, still on the page to try the fit, and nothing there is kept.
// It said "nothing was saved. The values are kept below." while the
// values stayed editable and nothing on the page was kept.
func TestClosedRoundEntrySaysNothingOnThePageIsKept(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	ctx := context.Background()
	qc := workshop.Question{WorkshopID: ws.ID, Wording: "Place 20 chips on the share of valves that stick (invented).",
		Quantity: "Sticking share", Lower: 0, Upper: 1, Format: workshop.FormatChips,
		BinEdges: []float64{0, 0.1, 0.2, 0.3, 0.5, 1}, Chips: 20}
	if err := h.db.AddQuestion(ctx, &qc); err != nil {
		t.Fatal(err)
	}
	if err := h.db.SetRound(ctx, ws.ID, 1, false, ""); err != nil {
		t.Fatal(err)
	}
	priya := es[2]
	before, _ := h.db.Revisions(ctx, ws.ID)
	for _, c := range []struct {
		name    string
		q       workshop.Question
		form    url.Values
		want    string
		movable string
	}{
		{"quantiles", qs[0], url.Values{"channel": {"phone"}, "values[0]": {"0.01"}, "values[1]": {"0.03"}, "values[2]": {"0.09"}},
			"Round 1 is closed, so Priya Raman's answer was not saved. Their values are still in the form below, where you can change them to try the fit, " +
				"but nothing here is kept: note them down if you want them when you open the next round.",
			`value="0.03"`},
		{"chips", qc, url.Values{"channel": {"phone"}, "counts[1]": {"8"}, "counts[2]": {"7"}, "counts[3]": {"5"}},
			"Round 1 is closed, so Priya Raman's chips were not saved. They are still on the board below, where you can move them to try the fit, " +
				"but nothing here is kept: note where they are if you want them when you open the next round.",
			`class="chips-board" data-chips="20"`},
	} {
		r, body := h.post(entryPath(ws.ID, c.q.ID, priya.ID)+"/save", c.form)
		if r.StatusCode != http.StatusConflict {
			t.Fatalf("%s: entry in a closed round answered %d", c.name, r.StatusCode)
		}
		text := html.UnescapeString(body)
		if !strings.Contains(text, c.want) || strings.Contains(text, "kept below") {
			t.Errorf("%s: the refusal does not say that nothing on the page is kept", c.name)
		}
		if !strings.Contains(body, c.movable) || strings.Contains(body, " readonly") || strings.Contains(body, "data-readonly") {
			t.Errorf("%s: the values can no longer be changed to try the fit", c.name)
		}
	}
	if after, _ := h.db.Revisions(ctx, ws.ID); len(after) != len(before) {
		t.Error("a refused entry was saved")
	}
}

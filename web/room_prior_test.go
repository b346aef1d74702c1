package web

import (
	"context"
	"html"
	"net/http"
	"net/url"
	"regexp"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// The agreed prior reaches the projector: the room view of a question
// with an agreed prior links its prior display (?show=prior), which draws
// the prior's curve, says its median and 90% interval, and shows the
// caution the app shows wherever an agreed prior is shown; a prior
// recorded later replaces it there. A question without one, a calibration
// question whose answers are held back, and a prior taken from one
// expert's answer alone show no prior.
func TestRoomShowsTheAgreedPrior(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	ctx := context.Background()
	read := func(p string) string {
		t.Helper()
		r, body := h.get(p)
		if r.StatusCode != http.StatusOK {
			t.Fatalf("%s: %d", p, r.StatusCode)
		}
		return body
	}
	// The page's words, without its tags.
	words := func(body string) string {
		return strings.Join(strings.Fields(html.UnescapeString(regexp.MustCompile(`<[^>]*>`).ReplaceAllString(body, ""))), " ")
	}
	agree := func(q workshop.Question, form url.Values) workshop.AgreedPrior {
		t.Helper()
		form.Set("rationale", "Agreed in the room (invented).")
		form.Set("confirm_open", "on")
		if r, body := h.post(questionPath(ws.ID, q.ID)+"/agree", form); r.StatusCode != http.StatusSeeOther {
			t.Fatalf("agree on question %d: %d %s", q.ID, r.StatusCode, body)
		}
		ps, err := h.db.AgreedPriors(ctx, ws.ID)
		if err != nil {
			t.Fatal(err)
		}
		return ps[len(ps)-1]
	}
	// The words the display must say of prior a: its points as the
	// facilitator's panel writes them (pointsIn), of the stored Beta.
	says := func(a workshop.AgreedPrior) []string {
		d := a.Dist
		ps := pointsIn(d.Lower, d.Upper, d.Quantile(0.05), d.Quantile(0.5), d.Quantile(0.95))
		return []string{
			"Median " + ps[1] + " (proportion of units): by the agreed prior, the first-year failure proportion, HX-40 is as likely to lie below " + ps[1] + " as above it.",
			"90% interval " + ps[0] + " to " + ps[2] + ": a 90% chance that it lies between the two, 5% that it lies below " + ps[0] + " and 5% above " + ps[2] + ".",
			"as Beta(α = " + sv(d.Alpha) + ", β = " + sv(d.Beta.Beta) + ") on [0, 1]",
			"Caution. An elicited prior is documented judgement, not data.",
		}
	}
	const lead = "agreed prior: <a id=\"room-prior-link\""
	// A question without a prior: no link, and a display that says so.
	extra := h.addQuantileQuestion(t, ws.ID, "Added without a prior (invented)?", "spares used")
	room := roomPath(ws.ID, extra.ID)
	if body := read(room); strings.Contains(body, "room-prior-link") {
		t.Error("the room links an agreed prior on a question without one")
	}
	if body := read(room + "?show=prior"); !strings.Contains(words(body), "No prior has been agreed for this question yet.") || strings.Contains(body, "banner-caution") {
		t.Error("the prior display of a question without one does not say so, or shows the caution")
	}

	// The demo's question 1 has its consensus prior; a new one from the
	// pool replaces it on the display.
	q1 := qs[0]
	room = roomPath(ws.ID, q1.ID)
	for _, p := range []string{room, reasonsPath(room, 1)} {
		if body := read(p); !strings.Contains(body, lead) || !strings.Contains(body, `href="`+room+`?show=prior"`) {
			t.Errorf("%s does not link the agreed prior", p)
		}
	}
	demo, err := h.db.AgreedPriors(ctx, ws.ID)
	if err != nil || len(demo) != 1 {
		t.Fatalf("the demo's agreed priors: %v, %v", demo, err)
	}
	body := read(room + "?show=prior")
	if !strings.Contains(body, `class="banner banner-caution"`) || !strings.Contains(body, "curve-density curve-agreed") {
		t.Error("the prior display draws no agreed curve, or shows no caution")
	}
	for _, want := range says(demo[0]) {
		if !strings.Contains(words(body), want) {
			t.Errorf("the prior display of the demo's prior does not say %q", want)

		}
	}
	pooled := agree(q1, url.Values{"source": {"pool"}})
	if pooled.Dist == demo[0].Dist {
		t.Fatal("the pool's prior is the demo's: the test cannot tell them apart")
	}
	body = words(read(room + "?show=prior"))
	for _, want := range says(pooled) {
		if !strings.Contains(body, want) {
			t.Errorf("the prior display after a new agreement does not say %q", want)
		}
	}
	if old := says(demo[0])[0]; strings.Contains(body, old) {
		t.Error("the prior display still says the replaced prior's median")
	}

	// A calibration question held back: its prior would show the panel.
	q2 := qs[1]
	agree(q2, url.Values{"source": {"pool"}})
	if body := read(roomPath(ws.ID, q2.ID)); strings.Contains(body, "room-prior-link") {
		t.Error("the room links the prior of a question whose answers are held back")
	}
	if body := words(read(roomPath(ws.ID, q2.ID) + "?show=prior")); strings.Contains(body, "Beta(") || !strings.Contains(body, "held back until its true value is shown") {
		t.Error("the prior display of a held-back question shows a prior, or does not say why not")
	}

	// Question 3, revealed, had one answer: a prior from its pool is that
	// answer.
	if err := h.db.SetTrueValue(ctx, qs[2].ID, *qs[2].TrueValue, true, "Revealed (invented)."); err != nil {
		t.Fatal(err)
	}
	if one := agree(qs[2], url.Values{"source": {"pool"}}); len(one.Pooled) != 1 {
		t.Fatalf("question 3's prior pooled %v, want its one answer", one.Pooled)
	}
	if body := words(read(roomPath(ws.ID, qs[2].ID) + "?show=prior")); strings.Contains(body, "Beta(") || !strings.Contains(body, "taken from one expert's answer alone") {
		t.Error("the prior display shows a prior taken from one expert's answer")
	}
	// Round 1 closed: the room shows the answers as it closed, and says
	// so; the prior display shows the prior, not the answers, and does
	// not say it shows them.
	if r, _ := h.post(workshopPath(ws.ID)+"/round", url.Values{"action": {"close"}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("close: %d", r.StatusCode)
	}
	const shown = "Shown: every expert's answer as round 1 closed"
	if !strings.Contains(words(read(room)), shown) {
		t.Errorf("the room of question 1 does not say %q", shown)
	}
	if strings.Contains(words(read(room+"?show=prior")), shown) {
		t.Errorf("the prior display says %q", shown)
	}
	// The address: show=prior takes no page, and a display the room view
	// does not have is refused naming both it has.
	for p, want := range map[string]string{
		room + "?show=prior&page=2": "page: pages only the reasons display (show=reasons).",
		room + "?show=names":        `show: takes only "reasons" (the reasons display) or "prior" (the agreed prior).`,
	} {
		r, body := h.get(p)
		if r.StatusCode != http.StatusBadRequest || !strings.Contains(html.UnescapeString(body), want) {
			t.Errorf("%s: %d %q, want 400 saying %q", p, r.StatusCode, body, want)
		}
	}
}

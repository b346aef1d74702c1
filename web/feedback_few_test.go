package web

import (
	"context"
	"html"
	"net/http"
	"strings"
	"testing"
)

// An expert's round feedback shows the other experts' answers only when
// at least two others had answered by the round's close (othersShown),
// as the room view shows a panel only from two answers: a panel of two
// experts labelled the one other curve "Expert B", with its reason and a
// pool of the two beside the reader's own, and so showed one named
// colleague's answer. The page, the page a no-script "Show the fit"
// returns and a refused save all follow the one rule, and say instead
// how many others answered and why nothing is shown.
func TestRoundFeedbackShowsNoLoneOtherAnswer(t *testing.T) {
	g := newExpertRig(t, "Ada Quell", "Bruno Ferrante", "Chiara Osei")
	const brunoWhy = "Bruno's reason: the depot's own returns (invented)."
	save := func(i int, reason string, vals ...string) {
		t.Helper()
		f := quantiles(vals...)
		f.Set("reason", reason)
		if resp, body := g.post(g.qpath(i, g.q)+"/save", f); resp.StatusCode != http.StatusSeeOther {
			t.Fatalf("expert %d save: %d %s", i, resp.StatusCode, body)
		}
	}
	// A second question, which Ada alone answers.
	q2 := g.q
	q2.ID, q2.Position = 0, 2
	if err := g.db.AddQuestion(context.Background(), &q2); err != nil {
		t.Fatal(err)
	}
	save(0, "Ada's reason (invented).", "0.03", "0.07", "0.16")
	save(1, brunoWhy, "0.02", "0.08", "0.2")
	if resp, _ := g.post(g.qpath(0, q2)+"/save", quantiles("0.1", "0.2", "0.4")); resp.StatusCode != http.StatusSeeOther {
		t.Fatalf("Ada's save of question 2: %d", resp.StatusCode)
	}
	g.secondRound()

	const one = "Only one other expert had answered this question when round 1 closed. " +
		"The other experts' answers are shown here only once at least two of them have answered by a round's close, so that no expert's answer is shown on its own."
	const none = "No other expert had answered this question when round 1 closed."
	// The three pages an expert is shown with the feedback.
	pages := func(i int) map[string]string {
		t.Helper()
		_, page := g.get(g.qpath(i, g.q))
		_, tried := g.post(g.qpath(i, g.q)+"/preview", quantiles("0.03", "0.07", "0.16"))
		refused, body := g.post(g.qpath(i, g.q)+"/save", quantiles("0.2", "0.1", "0.3"))
		if refused.StatusCode != http.StatusUnprocessableEntity {
			t.Fatalf("a save of values that do not increase: %d", refused.StatusCode)
		}
		return map[string]string{"page": html.UnescapeString(page), "show the fit": html.UnescapeString(tried), "refused save": html.UnescapeString(body)}
	}
	shows := func(body string) bool {
		return strings.Contains(body, `data-label="Expert `) || strings.Contains(body, "curve-pool")
	}
	// Ada and Bruno each read one other answer; Chiara, who had not
	// answered, reads both.
	for i, why := range map[int]string{0: brunoWhy, 1: "Ada's reason (invented)."} {
		for what, body := range pages(i) {
			if shows(body) || strings.Contains(body, why) {
				t.Errorf("expert %d's %s shows the one other answer (its curve, the pool or its reason)", i, what)
			}
			if !strings.Contains(body, one) {
				t.Errorf("expert %d's %s does not say why no other answer is shown", i, what)
			}
		}
	}
	for what, body := range pages(2) {
		if !shows(body) || !strings.Contains(body, brunoWhy) || strings.Contains(body, "other expert had answered") {
			t.Errorf("Chiara's %s, with two others' answers, does not show them", what)
		}
	}
	// Question 2: nobody else answered, and the page says so.
	if _, body := g.get(g.qpath(0, q2)); !strings.Contains(html.UnescapeString(body), none) || shows(body) {
		t.Error("Ada's page of a question only she answered does not say no other expert had")
	}

	// Chiara answers in round 2: from round 3 Ada reads two others.
	save(2, "Chiara's reason (invented).", "0.04", "0.1", "0.25")
	ctx := context.Background()
	if err := g.db.SetRound(ctx, g.ws.ID, 2, false, "discussion"); err != nil {
		t.Fatal(err)
	}
	if err := g.db.SetRound(ctx, g.ws.ID, 3, true, "third round"); err != nil {
		t.Fatal(err)
	}
	if _, body := g.get(g.qpath(0, g.q)); !shows(body) || strings.Contains(body, "other expert had answered") {
		t.Error("in round 3 Ada does not read the two others' answers")
	}
}

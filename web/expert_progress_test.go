package web

import (
	"context"
	"html"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// TestExpertHomeSaysWhereTheExpertStands: an expert's list of 25
// questions on a phone ran some 6,000 px, the first one still waiting for
// an answer found only by reading every tag. The home page says how many
// of the questions have the expert's answer, and links the first one that
// has none and can still take one; once all have one, it says so.
func TestExpertHomeSaysWhereTheExpertStands(t *testing.T) {
	g := newExpertRig(t)
	ctx := context.Background()
	save := func(q workshop.Question, a workshop.Answer) {
		t.Helper()
		f, err := q.Fit(a)
		if err != nil {
			t.Fatal(err)
		}
		rv := workshop.Revision{QuestionID: q.ID, ExpertID: g.experts[0].ID, Answer: a, Kept: &f}
		if err := g.db.SaveRevision(ctx, &rv); err != nil {
			t.Fatal(err)
		}
	}
	home := func() string {
		t.Helper()
		code, body := g.get("/e/" + g.tokens[0] + "/")
		if code != 200 {
			t.Fatalf("home: status %d", code)
		}
		return body
	}
	link := func(q workshop.Question) string {
		return `The next to answer: <a href="` + g.qpath(0, q) + `">Question ` + strconv.Itoa(q.Position) + ", " + html.EscapeString(q.Quantity) + "</a>."
	}
	if body := home(); !strings.Contains(body, "You have answered 0 of the 5 questions.") || !strings.Contains(body, link(g.q)) {
		t.Errorf("before any answer the home page does not say where the expert stands (want %q)", link(g.q))
	}
	save(g.q, workshop.Answer{Values: []float64{0.05, 0.1, 0.2}})
	save(g.qcal, workshop.Answer{Values: []float64{0.2, 0.4, 0.6}})
	if body := home(); !strings.Contains(body, "You have answered 2 of the 5 questions.") || !strings.Contains(body, link(g.qi)) {
		t.Errorf("with questions 1 and 3 answered the home page does not lead to question 2 (want %q)", link(g.qi))
	}
	save(g.qi, workshop.Answer{Lowest: 0.05, Highest: 0.3, Best: 0.12, Confidence: 0.8})
	save(g.qc, workshop.Answer{Counts: []int{4, 8, 5, 2, 1}})
	save(g.qs, workshop.Answer{Values: []float64{15, 22, 35}})
	body := home()
	if !strings.Contains(body, "You have answered all 5 questions. You can revise any of them while the round is open.") {
		t.Error("with every question answered the home page does not say so")
	}
	if strings.Contains(body, "The next to answer") {
		t.Error("with every question answered the home page still points to a next one")
	}
	if err := g.db.SetRound(ctx, g.ws.ID, 1, false, ""); err != nil {
		t.Fatal(err)
	}
	if body := home(); strings.Contains(body, "You have answered") {
		t.Error("a closed round's home page counts answers as if they could still be given")
	}
	if err := g.db.SetRound(ctx, g.ws.ID, 2, true, "Invented: round 2"); err != nil {
		t.Fatal(err)
	}
	save(g.q, workshop.Answer{Values: []float64{0.05, 0.12, 0.2}})
	if body := home(); !strings.Contains(body, "You have answered all 5 questions, 1 of them in round 2.") {
		t.Error("in round 2 the home page does not say how many answers were saved in it")
	}
}

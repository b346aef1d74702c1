package web

import (
	"context"
	"html"
	"net/http"
	"regexp"
	"strings"
	"testing"
)

// roundNext is the text of the sentence on an expert's home page that
// says what a later round asks of them.
var roundNextText = regexp.MustCompile(`(?s)<p class="round-next">(.*?)</p>`)

// Round 2's home page promises the other experts' answers only where the
// question pages show them: a calibration question's panel is held back
// until its true value is shown, and "On each question's page you can now
// read what the other experts said" was untrue of it. The home page does
// not say which questions those are, nor name them calibration questions;
// once no question's panel is held, the promise is whole again.
func TestRoundTwoHomePromisesOnlyThePanelsShown(t *testing.T) {
	// Three experts answer, so that each reads two others' answers
	// (othersShown).
	g := newExpertRig(t, "Ada Quell", "Bruno Ferrante", "Chiara Osei")
	for i := range 3 {
		for _, q := range []struct{ path string }{{g.qpath(i, g.q)}, {g.qpath(i, g.qcal)}} {
			if r, _ := g.post(q.path+"/save", quantiles("0.1", "0.3", "0.6")); r.StatusCode != http.StatusSeeOther {
				t.Fatalf("save: %d", r.StatusCode)
			}
		}
	}
	g.secondRound()
	home := func() string {
		t.Helper()
		_, body := g.get("/e/" + g.tokens[0] + "/")
		m := roundNextText.FindStringSubmatch(body)
		if m == nil {
			t.Fatal("round 2's home page says nothing of what the round asks")
		}
		if strings.Contains(strings.ToLower(body), "calibration") {
			t.Error("round 2's home page names calibration questions")
		}
		return html.UnescapeString(m[1])
	}
	said := home()
	if strings.Contains(said, "without their names.") {
		t.Errorf("with a panel held back, the home page promises every question's panel: %q", said)
	}
	if !strings.Contains(said, "except where the page says their answers stay hidden until the question's true value is shown") {
		t.Errorf("the home page does not say that some panels stay hidden: %q", said)
	}
	// The calibration question's page says so, as the home page promises.
	if _, page := g.get(g.qpath(0, g.qcal)); !strings.Contains(page, heldSentence) {
		t.Error("the held question's page does not say its panel is hidden")
	}
	if err := g.db.SetTrueValue(context.Background(), g.qcal.ID, hiddenTruth, true, "shown (invented)"); err != nil {
		t.Fatal(err)
	}
	if said := home(); !strings.Contains(said, "On each question's page you can now read what the other experts said in round 1, without their names.") {
		t.Errorf("with no panel held back, the home page does not promise every question's panel: %q", said)
	}
}

// Where every question's panel is held back, the home page promises none.
func TestRoundTwoHomeWithEveryPanelHeld(t *testing.T) {
	v := expertHomeView{Round: 2, Open: true, Held: 2, Questions: make([]expertQuestionItem, 2)}
	if said := v.roundNext(); strings.Contains(said, "you can now read") || !strings.Contains(said, "stay hidden") {
		t.Errorf("every panel held back: %q", said)
	}
}

// Nor does it promise the answers where too few other experts answered
// for their page to show them (othersShown): on a panel of two every
// question page says only that one other expert had answered, under a
// home page that promised what the other experts said.
func TestRoundTwoHomePromisesNoLoneAnswer(t *testing.T) {
	g := newExpertRig(t, "Ada Quell", "Bruno Ferrante", "Chiara Osei")
	// Question 1: Ada and Bruno answer; question 2 (held back until its
	// true value is shown): all three.
	for i := range 3 {
		if i < 2 {
			if r, _ := g.post(g.qpath(i, g.q)+"/save", quantiles("0.1", "0.3", "0.6")); r.StatusCode != http.StatusSeeOther {
				t.Fatalf("save: %d", r.StatusCode)
			}
		}
		if r, _ := g.post(g.qpath(i, g.qcal)+"/save", quantiles("0.1", "0.3", "0.6")); r.StatusCode != http.StatusSeeOther {
			t.Fatalf("save: %d", r.StatusCode)
		}
	}
	g.secondRound()
	home := func(i int) string {
		t.Helper()
		_, body := g.get("/e/" + g.tokens[i] + "/")
		m := roundNextText.FindStringSubmatch(body)
		if m == nil {
			t.Fatal("round 2's home page says nothing of what the round asks")
		}
		return html.UnescapeString(m[1])
	}
	// Ada: question 1 shows one other answer, so none; question 2 is
	// held; nobody else answered the others.
	const except = "On each question's page you can now read what the other experts said in round 1, without their names, except where the page says why their answers are not shown."
	if said := home(0); !strings.Contains(said, except) {
		t.Errorf("Ada, whose page of question 1 holds back Bruno's answer, is told: %q", said)
	}
	// Chiara reads Ada's and Bruno's answers to question 1: only the held
	// question is left out.
	if said := home(2); strings.Contains(said, "why their answers are not shown") || !strings.Contains(said, "except where the page says their answers stay hidden until the question's true value is shown") {
		t.Errorf("Chiara, who reads two others' answers, is told: %q", said)
	}
	// Shown, question 2 is no longer held; Ada's question 1 still is.
	if err := g.db.SetTrueValue(context.Background(), g.qcal.ID, hiddenTruth, true, "shown (invented)"); err != nil {
		t.Fatal(err)
	}
	if said := home(0); !strings.Contains(said, except) {
		t.Errorf("Ada is told: %q", said)
	}
	if said := home(2); !strings.Contains(said, "On each question's page you can now read what the other experts said in round 1, without their names. ") {
		t.Errorf("Chiara, with no answer held back, is told: %q", said)
	}
}

// Where every question's page holds back the one other answer, the home
// page promises none.
func TestRoundTwoHomeWithEveryLoneAnswerHeldBack(t *testing.T) {
	v := expertHomeView{Round: 2, Open: true, Held: 1, Few: 1, Questions: make([]expertQuestionItem, 2)}
	if said := v.roundNext(); strings.Contains(said, "you can now read") || !strings.Contains(said, "each page says why") {
		t.Errorf("every question's others' answers held back: %q", said)
	}
}

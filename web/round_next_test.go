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
	g := newExpertRig(t, "Ada Quell", "Bruno Ferrante")
	for i := range 2 {
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

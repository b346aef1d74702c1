package web

import (
	"html"
	"net/http"
	"strings"
	"testing"
)

// ownCurveWords promise the expert's own curve in the round feedback;
// notYetWords are said instead to an expert with no answer.
const (
	ownCurveWords = "With them are your current curve and the equal-weight pool"
	notYetWords   = "You have not saved an answer to this question yet: it is worth settling your own judgement before you read theirs."
)

// The round feedback promises the expert's own curve only when it draws
// one: an expert with no answer yet is told to settle their own judgement
// first, and that their curve appears once they save.
func TestFeedbackWordsFollowTheExpertsOwnAnswer(t *testing.T) {
	// Ada, Bruno and Dario answer, so that each reads two others'
	// answers (othersShown); Chiara does not.
	g := newExpertRig(t, "Ada Quell", "Bruno Ferrante", "Chiara Osei", "Dario Ruiz")
	for i, a := range [][]string{{"0.05", "0.2", "0.4"}, {"0.02", "0.08", "0.2"}, nil, {"0.04", "0.12", "0.3"}} {
		if a == nil {
			continue
		}
		if resp, _ := g.post(g.qpath(i, g.q)+"/save", quantiles(a...)); resp.StatusCode != http.StatusSeeOther {
			t.Fatalf("expert %d save: %d", i, resp.StatusCode)
		}
	}
	g.secondRound()
	page := func(i int) string {
		_, body := g.get(g.qpath(i, g.q))
		return html.UnescapeString(body)
	}
	ada := page(0)
	if !strings.Contains(ada, ownCurveWords) || strings.Contains(ada, notYetWords) || !strings.Contains(ada, `data-label="You"`) {
		t.Error("Ada, who answered, is not told her own curve is drawn with the panel")
	}
	// Chiara answered nothing in round 1.
	chiara := page(2)
	if !strings.Contains(chiara, "What the other experts said") {
		t.Fatal("Chiara sees no panel in round 2")
	}
	if strings.Contains(chiara, ownCurveWords) || strings.Contains(chiara, "your current curve") || strings.Contains(chiara, `data-label="You"`) {
		t.Error("Chiara, with no answer, is promised her own curve")
	}
	for _, want := range []string{"With them is the equal-weight pool", notYetWords, "Once you save, your curve appears here beside them"} {
		if !strings.Contains(chiara, want) {
			t.Errorf("Chiara's feedback lacks %q", want)
		}
	}
	// Once she saves, her curve is there and the words say so.
	if resp, _ := g.post(g.qpath(2, g.q)+"/save", quantiles("0.1", "0.3", "0.5")); resp.StatusCode != http.StatusSeeOther {
		t.Fatal("Chiara's save failed")
	}
	if chiara = page(2); !strings.Contains(chiara, ownCurveWords) || strings.Contains(chiara, notYetWords) {
		t.Error("after her save Chiara's feedback does not speak of her curve")
	}
}

// The large panel's spread says the same.
func TestSpreadWordsFollowTheExpertsOwnAnswer(t *testing.T) {
	mine := expertQuestionView{FeedbackRound: 1, OwnCurve: true, History: []historyRow{{Round: 1}}}
	none := expertQuestionView{FeedbackRound: 1}
	if got := mine.spreadIntro(); !strings.HasPrefix(got, "Your current curve with the equal-weight pool") || strings.Contains(got, "not saved") {
		t.Errorf("with an answer: %q", got)
	}
	if got := none.spreadIntro(); !strings.HasPrefix(got, "The equal-weight pool of the whole panel as round 1 closed") ||
		strings.Contains(got, "Your current") || !strings.Contains(got, notYetWords) {
		t.Errorf("without an answer: %q", got)
	}
	// The pool is said in plain words on both pictures.
	for _, got := range []string{mine.spreadIntro(), none.spreadIntro(), mine.panelIntro(), none.panelIntro()} {
		if !strings.Contains(got, "The pool is every expert's curve averaged, each counting the same.") {
			t.Errorf("the equal-weight pool is not explained: %q", got)
		}
	}
	// The lines of the spread are said in the words of the expert's own
	// picture, not "from their 5th to their 95th percentile", and the
	// curves are the ones that best match each expert's answers, not
	// "fitted".
	for _, got := range []string{mine.spreadIntro(), none.spreadIntro()} {
		if want := "each runs from the 5% point to the 95% point of that expert's curve, with a dot at its middle (the median), the lowest middle at the top."; !strings.Contains(got, want) {
			t.Errorf("the spread's lines are not said in the picture's words: %q", got)
		}
	}
	for _, got := range []string{mine.spreadIntro(), none.spreadIntro(), mine.panelIntro(), none.panelIntro()} {
		for _, jargon := range []string{"percentile", "fitted"} {
			if strings.Contains(got, jargon) {
				t.Errorf("the words above the panel say %q: %q", jargon, got)
			}
		}
	}
	// After a reveal an expert who never answered cannot save any more.
	none.Frozen = true
	if got := none.spreadIntro(); strings.Contains(got, "Once you save") || !strings.Contains(got, "You gave no answer to this question before its true value was shown.") {
		t.Errorf("without an answer, after the reveal: %q", got)
	}
}

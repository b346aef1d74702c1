package web

import (
	"context"
	"html"
	"strconv"
	"strings"
	"testing"
)

// A question whose answers are final (its true value shown), which the
// expert never answered, says so in a sentence where the answer would be:
// it showed empty inputs, locked, under a disabled button, on the
// expert's page in an open round, a closed one and an archived workshop
// alike, and on the facilitator's entry page, which also called the
// absent answer final.
func TestFinalQuestionWithoutAnAnswerSaysSo(t *testing.T) {
	h, ws, qs, es, links := seeded(t)
	ctx := context.Background()
	q := qs[1] // a calibration question the demo's Priya Raman has not answered
	if err := h.db.SetTrueValue(ctx, q.ID, *q.TrueValue, true, "Shown (invented)."); err != nil {
		t.Fatal(err)
	}
	own := links[2].Path + "q/" + strconv.FormatInt(q.ID, 10)
	entry := entryPath(ws.ID, q.ID, es[2].ID)
	check := func(when string) {
		t.Helper()
		for _, c := range []struct{ path, sentence string }{
			{own, "You gave no answer to this question."},
			{entry, "Priya Raman gave no answer to this question."},
		} {
			_, page := h.get(c.path)
			page = html.UnescapeString(page)
			if !strings.Contains(page, c.sentence) {
				t.Errorf("%s, %s: the page does not say %q", c.path, when, c.sentence)
			}
			for _, wrong := range []string{`name="values[0]"`, "readonly", "Answers to this question are final</button>", "answer below is final", "choose <em>Show the fit</em>"} {
				if strings.Contains(page, wrong) {
					t.Errorf("%s, %s: the page shows %q", c.path, when, wrong)
				}
			}
		}
	}
	check("round open")
	if err := h.db.SetRound(ctx, ws.ID, ws.Round, false, "Break (invented)."); err != nil {
		t.Fatal(err)
	}
	check("round closed")
	if err := h.db.SetArchived(ctx, ws.ID, true, "Finished (invented)."); err != nil {
		t.Fatal(err)
	}
	check("archived")

	// An expert who answered still reads their final answer.
	_, page := h.get(links[0].Path + "q/" + strconv.FormatInt(q.ID, 10))
	if !strings.Contains(page, `name="values[0]"`) || !strings.Contains(page, "readonly") || strings.Contains(page, "gave no answer") {
		t.Error("an expert who answered does not see their final answer")
	}
}

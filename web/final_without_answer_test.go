package web

import (
	"context"
	"html"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
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

// The expert's own list of questions tagged a question they never
// answered "not answered yet" beside "true value shown: answers final",
// and in an archived workshop, where no answer can come. It now says
// "you gave no answer" there, as the question's own page does; in an
// open round and a closed one it still says "yet".
func TestExpertHomeSaysYetOnlyWhereAnAnswerMayCome(t *testing.T) {
	h, ws, qs, _, links := seeded(t)
	ctx := context.Background()
	open, final := qs[0], qs[1] // the demo's Priya Raman has answered neither
	home := links[2].Path
	// tag is the tag of q's item on Priya's list.
	tag := func(q workshop.Question) string {
		t.Helper()
		_, page := h.get(home)
		href := home + "q/" + strconv.FormatInt(q.ID, 10)
		_, item, ok := strings.Cut(page, `href="`+href+`"`)
		if !ok {
			t.Fatalf("%s: no item for Q%d", home, q.Position)
		}
		item, _, _ = strings.Cut(item, "</li>")
		return item
	}
	const yet, none = "not answered yet", "you gave no answer"
	if got := tag(final); !strings.Contains(got, yet) || strings.Contains(got, none) {
		t.Fatalf("open round, true value not shown: Q%d's item says %q, want %q", final.Position, got, yet)
	}
	if err := h.db.SetTrueValue(ctx, final.ID, *final.TrueValue, true, "Shown (invented)."); err != nil {
		t.Fatal(err)
	}
	if got := tag(final); !strings.Contains(got, none) || strings.Contains(got, yet) {
		t.Errorf("answers final: Q%d's item says %q, want %q", final.Position, got, none)
	}
	if got := tag(open); !strings.Contains(got, yet) {
		t.Errorf("open round, another question: Q%d's item says %q, want %q", open.Position, got, yet)
	}
	if err := h.db.SetRound(ctx, ws.ID, ws.Round, false, "Break (invented)."); err != nil {
		t.Fatal(err)
	}
	if got := tag(open); !strings.Contains(got, yet) {
		t.Errorf("round closed: Q%d's item says %q, want %q", open.Position, got, yet)
	}
	if err := h.db.SetArchived(ctx, ws.ID, true, "Finished (invented)."); err != nil {
		t.Fatal(err)
	}
	for _, q := range []workshop.Question{open, final} {
		if got := tag(q); !strings.Contains(got, none) || strings.Contains(got, yet) {
			t.Errorf("archived: Q%d's item says %q, want %q", q.Position, got, none)
		}
	}
}

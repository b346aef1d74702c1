package web

import (
	"context"
	"html"
	"net/http"
	"net/url"
	"regexp"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/answersheet"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// A sheet row correcting an expert's answer of the open round, its reason
// cell empty, keeps the reasoning saved with that answer, as the entry
// form does: it left the expert's current answer, the one the feedback,
// the reasons page and the room show, without its reasoning. A reasoning
// withheld from the feedback is not kept (saved again, it would be
// shown), and the preview says which row keeps what. The same sheet
// imported again is then unchanged.
func TestSheetCorrectionRowKeepsTheReasoning(t *testing.T) {
	g := newSheetRig(t)
	ctx := context.Background()
	own := func(e workshop.Expert, reason string) workshop.Revision {
		rv := workshop.Revision{QuestionID: g.qs[0].ID, ExpertID: e.ID, Reason: reason,
			Answer: workshop.Answer{Values: []float64{0.02, 0.06, 0.15}}}
		if err := g.h.db.SaveRevision(ctx, &rv); err != nil {
			t.Fatal(err)
		}
		return rv
	}
	own(g.experts[0], "Inspection logs, 2019 to 2024 (invented).")
	withheld := own(g.experts[1], "Names a contractor (invented).")
	if err := g.h.db.SetReasonWithheld(ctx, withheld.ID, true, "It names a firm (invented)."); err != nil {
		t.Fatal(err)
	}
	sheet := "expert,question,q05,q50,q95,reason\nAda Quell,Q1,0.02,0.07,0.15,\nBruno Ferrante,Q1,0.02,0.07,0.15,\nChiara Osei,Q1,0.01,0.03,0.08,\n"
	r, body := g.postSheet(t, "corrected.csv", sheet)
	if r.StatusCode != http.StatusOK || !strings.Contains(body, "Inspection logs, 2019 to 2024 (invented). <span class=\"muted\">(the reason cell is empty: kept from their current answer)</span>") ||
		!strings.Contains(body, "none: the reasoning of their current answer is withheld from the feedback, so it is not kept") {
		t.Fatalf("the preview does not say what each row keeps: %d %s", r.StatusCode, body)
	}
	key := regexp.MustCompile(`name="key" value="([0-9a-f]+)"`).FindStringSubmatch(body)
	if key == nil {
		t.Fatal("no key")
	}
	if r, _ := g.h.post(sheetPath(g.ws.ID)+"/confirm", url.Values{"key": {key[1]}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("confirm: %d", r.StatusCode)
	}
	cur := workshop.Current(g.revisions(t), nil)
	for i, want := range []string{"Inspection logs, 2019 to 2024 (invented).", "", ""} {
		rv := cur[workshop.Key{Question: g.qs[0].ID, Expert: g.experts[i].ID}]
		if rv.EnteredBy != workshop.ByFacilitator || rv.Reason != want || rv.ReasonWithheld {
			t.Errorf("%s's current answer: by %s, reason %q (withheld %v); want %q", g.experts[i].Name, rv.EnteredBy, rv.Reason, rv.ReasonWithheld, want)
		}
	}
	if r, body := g.postSheet(t, "corrected.csv", sheet); r.StatusCode != http.StatusOK || !strings.Contains(body, "Nothing to save:</strong> all 3 rows") {
		t.Errorf("the sheet again: %d %s", r.StatusCode, body)
	}
	// What the room shows once the round closes: the reasons page.
	if r, body := g.h.post(workshopPath(g.ws.ID)+"/round", url.Values{"action": {"close"}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("close the round: %d %s", r.StatusCode, body)
	}
	if _, room := g.h.get(questionPath(g.ws.ID, g.qs[0].ID) + "/room?show=reasons"); !strings.Contains(room, "Inspection logs, 2019 to 2024 (invented).") ||
		strings.Contains(room, "Names a contractor") {
		t.Errorf("the room's reasons:\n%s", room)
	}
}

// The upload page says, before a sheet is chosen, that unchanged rows
// are left out and that an empty reason cell in a correction keeps the
// reasoning: a facilitator reading only the columns' help expected a
// sheet imported again to be refused, and an empty cell to clear it.
func TestSheetPageSaysWhatARowKeeps(t *testing.T) {
	g := newSheetRig(t)
	_, body := g.h.get(sheetPath(g.ws.ID))
	for _, want := range []string{
		"A row that repeats the expert's current answer of this round is left out, so a sheet can be imported again after a row is put right.",
		"Left empty in a row that corrects the expert's answer of this round, the reasoning saved with that answer is kept.",
	} {
		if !strings.Contains(html.UnescapeString(body), want) {
			t.Errorf("the upload page does not say %q", want)
		}
	}
}

// A reasoning withheld from the feedback between the preview and its
// confirmation saves nothing and shows the preview again as it now
// reads: confirmed, the row saved without the reasoning the preview
// said it kept, with no new answer to tell it by.
func TestSheetReasoningWithheldMeanwhileSavesNothing(t *testing.T) {
	g := newSheetRig(t)
	ctx := context.Background()
	rv := workshop.Revision{QuestionID: g.qs[0].ID, ExpertID: g.experts[0].ID, Reason: "Inspection logs (invented).",
		Answer: workshop.Answer{Values: []float64{0.02, 0.06, 0.15}}}
	if err := g.h.db.SaveRevision(ctx, &rv); err != nil {
		t.Fatal(err)
	}
	key := g.previewSheet(t, "corrected.csv", "expert,question,q05,q50,q95,reason\nAda Quell,Q1,0.02,0.07,0.15,\n", "paper_form")
	if err := g.h.db.SetReasonWithheld(ctx, rv.ID, true, "It names a firm (invented)."); err != nil {
		t.Fatal(err)
	}
	before := len(g.revisions(t))
	r, body := g.h.post(sheetPath(g.ws.ID)+"/confirm", url.Values{"key": {key}})
	body = html.UnescapeString(body)
	if r.StatusCode != http.StatusConflict || !strings.Contains(body, "Nothing was saved: a reasoning was withheld from the feedback or shown again since you checked the sheet.") ||
		!strings.Contains(body, "Row 2: the reasoning of Ada Quell's current answer to Q1 was withheld from the feedback.") ||
		!strings.Contains(body, "none: the reasoning of their current answer is withheld from the feedback, so it is not kept") {
		t.Errorf("confirmed after the reasoning was withheld: %d %s", r.StatusCode, body)
	}
	if n := len(g.revisions(t)); n != before {
		t.Fatalf("saved %d revisions", n-before)
	}
}

// A row whose clear_reason cell says yes saves the expert's answer
// without reasoning, as the entry form does when the facilitator empties
// its box: an empty reason cell keeps the current answer's reasoning, so
// the sheet had no way to take it out. A row that repeats the values
// only to clear the reasoning is a change, not an unchanged row; the
// same sheet again is then unchanged. A clear_reason cell of another
// word, or with a reasoning beside it, is refused naming the cell and
// the rule, nothing saved.
func TestSheetRowClearsTheReasoning(t *testing.T) {
	g := newSheetRig(t)
	ctx := context.Background()
	for _, e := range g.experts[:2] {
		rv := workshop.Revision{QuestionID: g.qs[0].ID, ExpertID: e.ID, Reason: "Copied onto the wrong form (invented).",
			Answer: workshop.Answer{Values: []float64{0.02, 0.06, 0.15}}}
		if err := g.h.db.SaveRevision(ctx, &rv); err != nil {
			t.Fatal(err)
		}
	}
	before := len(g.revisions(t))
	for _, c := range []struct{ row, field, rule string }{
		{"Ada Quell,Q1,0.02,0.07,0.15,,maybe\n", "row 2, column clear_reason", string(answersheet.RuleClearReason)},
		{"Ada Quell,Q1,0.02,0.07,0.15,Logs (invented).,yes\n", "row 2, column reason", string(answersheet.RuleReasonCleared)},
	} {
		r, body := g.postSheet(t, "cleared.csv", "expert,question,q05,q50,q95,reason,clear_reason\n"+c.row)
		if r.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, c.field+": "+c.rule) {
			t.Errorf("%q: %d, want 422 naming %s: %s", c.row, r.StatusCode, c.field, c.rule)
		}
	}
	if n := len(g.revisions(t)); n != before {
		t.Fatalf("refused sheets saved %d revisions", n-before)
	}
	sheet := "expert,question,q05,q50,q95,reason,clear_reason\nAda Quell,Q1,0.02,0.07,0.15,,yes\nBruno Ferrante,Q1,0.02,0.06,0.15,,TRUE\n"
	r, body := g.postSheet(t, "cleared.csv", sheet)
	if r.StatusCode != http.StatusOK || strings.Count(body, "none: its clear_reason cell says to save it without reasoning") != 2 ||
		strings.Contains(body, `id="sheet-unchanged"`) {
		t.Fatalf("the preview does not say both rows clear the reasoning: %d %s", r.StatusCode, body)
	}
	key := regexp.MustCompile(`name="key" value="([0-9a-f]+)"`).FindStringSubmatch(body)
	if key == nil {
		t.Fatal("no key")
	}
	if r, _ := g.h.post(sheetPath(g.ws.ID)+"/confirm", url.Values{"key": {key[1]}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("confirm: %d", r.StatusCode)
	}
	revs := g.revisions(t)
	if len(revs) != before+2 {
		t.Fatalf("saved %d revisions, want 2", len(revs)-before)
	}
	cur := workshop.Current(revs, nil)
	for _, e := range g.experts[:2] {
		if rv := cur[workshop.Key{Question: g.qs[0].ID, Expert: e.ID}]; rv.Reason != "" || rv.EnteredBy != workshop.ByFacilitator {
			t.Errorf("%s's current answer keeps reasoning %q (by %s)", e.Name, rv.Reason, rv.EnteredBy)
		}
	}
	if r, body := g.postSheet(t, "cleared.csv", sheet); r.StatusCode != http.StatusOK || !strings.Contains(body, "Nothing to save:</strong> both rows") {
		t.Errorf("the sheet again: %d %s", r.StatusCode, body)
	}
}

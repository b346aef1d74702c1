package web

import (
	"context"
	"html"
	"net/http"
	"net/url"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// The entry page of an archived workshop invites the facilitator to
// choose Show the fit, as the expert's own page does; its preview was
// refused (409, "nothing in an archived workshop can be changed") though
// it saves nothing. It now draws the fit, with and without the script,
// and still saves nothing; the save is still refused.
func TestArchivedEntryPageShowsTheFit(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	ctx := context.Background()
	q := qs[0]
	priya := es[2] // the demo's Priya Raman has answered nothing
	entry := entryPath(ws.ID, q.ID, priya.ID)
	if err := h.db.SetArchived(ctx, ws.ID, true, "Finished (invented)."); err != nil {
		t.Fatal(err)
	}
	_, page := h.get(entry)
	if !strings.Contains(page, "choose <em>Show the fit</em>") {
		t.Fatal("the archived workshop's entry page no longer invites Show the fit")
	}
	before, _ := h.db.Revisions(ctx, ws.ID)
	form := url.Values{"channel": {"paper_form"}, "values[0]": {"0.01"}, "values[1]": {"0.03"}, "values[2]": {"0.09"}}
	r, frag := h.post(entry+"/preview?fragment=1", form)
	if r.StatusCode != http.StatusOK || !strings.Contains(html.UnescapeString(frag), "What Priya Raman's numbers imply") || !strings.Contains(frag, "Beta(α = ") {
		t.Errorf("the archived entry page's live preview: %d, want 200 with the fit", r.StatusCode)
	}
	// Without the script the button posts the whole form.
	r, page = h.post(entry+"/preview", form)
	if r.StatusCode != http.StatusOK || !strings.Contains(page, "Beta(α = ") || !strings.Contains(page, "Q1 for Priya Raman") {
		t.Errorf("the archived entry page's preview without the script: %d, want 200 with the page and the fit", r.StatusCode)
	}
	if r, _ := h.post(entry+"/save", form); r.StatusCode != http.StatusConflict {
		t.Errorf("a save in an archived workshop: %d, want 409", r.StatusCode)
	}
	// Nor does a path that only ends like a preview get through.
	if r, _ := h.post(questionPath(ws.ID, q.ID)+"/agree/preview", url.Values{}); r.StatusCode != http.StatusConflict {
		t.Errorf("another POST ending in /preview in an archived workshop: %d, want 409", r.StatusCode)
	}
	if after, _ := h.db.Revisions(ctx, ws.ID); len(after) != len(before) {
		t.Errorf("%d revisions saved in an archived workshop", len(after)-len(before))
	}
}

// The entry page said "You are entering this judgement on … behalf" for
// an expert whose access was revoked, in an archived workshop and on a
// question whose answers are final, where nothing can be entered. Each
// case now says what the page holds, and the revoked one why.
func TestEntryPageSaysWhenNothingCanBeEntered(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	ctx := context.Background()
	q := qs[0]
	priya := es[2]
	entry := entryPath(ws.ID, q.ID, priya.ID)
	const entering = "You are entering this judgement on Priya Raman's behalf"
	const holds = "What Priya Raman saved on this question, and anything you entered for them, is in the history below."
	read := func(path string) string {
		t.Helper()
		_, page := h.get(path)
		return html.UnescapeString(page)
	}
	if page := read(entry); !strings.Contains(page, entering) || strings.Contains(page, holds) {
		t.Fatal("the entry page of an open round does not say the facilitator is entering the judgement")
	}
	// A closed round opens again: the page is still where it is entered.
	if err := h.db.SetRound(ctx, ws.ID, ws.Round, false, "Break (invented)."); err != nil {
		t.Fatal(err)
	}
	if page := read(entry); !strings.Contains(page, entering) {
		t.Error("the entry page of a closed round no longer says what it is for")
	}

	final := qs[1] // a calibration question
	if err := h.db.SetTrueValue(ctx, final.ID, *final.TrueValue, true, "Shown (invented)."); err != nil {
		t.Fatal(err)
	}
	for _, path := range []string{entryPath(ws.ID, final.ID, priya.ID), entryPath(ws.ID, final.ID, es[0].ID)} {
		if page := read(path); strings.Contains(page, "You are entering this judgement") {
			t.Errorf("%s, answers final: the page says the facilitator is entering the judgement", path)
		}
	}

	if err := h.db.RevokeExpert(ctx, priya.ID, "Left the panel (invented)."); err != nil {
		t.Fatal(err)
	}
	page := read(entry)
	if strings.Contains(page, entering) || !strings.Contains(page, "Priya Raman's access is revoked, so nothing can be entered on their behalf.") ||
		strings.Contains(page, "is in the history below") {
		t.Error("the entry page of a revoked expert, who saved nothing, does not say that nothing can be entered for them alone")
	}
	if strings.Count(page, "access is revoked") != 2 { // the sentence and the preview's invitation
		t.Errorf("the entry page of a revoked expert says %d times that their access is revoked", strings.Count(page, "access is revoked"))
	}
	// The demo's Ines Varga answered.
	if err := h.db.RevokeExpert(ctx, es[0].ID, "Left the panel (invented)."); err != nil {
		t.Fatal(err)
	}
	page = read(entryPath(ws.ID, q.ID, es[0].ID))
	if !strings.Contains(page, "Ines Varga's access is revoked, so nothing can be entered on their behalf. "+
		"What they saved on this question, and anything you entered for them, is in the history below.") {
		t.Error("the entry page of a revoked expert who answered does not say what its history holds")
	}

	if err := h.db.SetArchived(ctx, ws.ID, true, "Finished (invented)."); err != nil {
		t.Fatal(err)
	}
	page = read(entryPath(ws.ID, q.ID, es[1].ID))
	if strings.Contains(page, "You are entering this judgement") || !strings.Contains(page, "What Tomas Lindqvist saved on this question") {
		t.Error("the archived workshop's entry page says the facilitator is entering the judgement")
	}
}

// An empty history said "No saved answers yet." on the expert's page and
// the entry page even where no answer will come: on a question whose
// answers are final and in an archived workshop. There it now says that
// no answer was saved; in an open or a closed round it still says "yet".
func TestEmptyHistorySaysYetOnlyWhereAnAnswerMayCome(t *testing.T) {
	h, ws, qs, es, links := seeded(t)
	ctx := context.Background()
	priya := es[2] // the demo's Priya Raman has answered nothing
	own := func(q int64) string { return links[2].Path + "q/" + strconv.FormatInt(q, 10) }
	const yet, none = "No saved answers yet.", "No answer was saved."
	check := func(when, want string, qids ...int64) {
		t.Helper()
		for _, q := range qids {
			for _, path := range []string{own(q), entryPath(ws.ID, q, priya.ID)} {
				_, page := h.get(path)
				if !strings.Contains(page, want) || strings.Contains(page, map[string]string{yet: none, none: yet}[want]) {
					t.Errorf("%s, %s: the empty history does not say %q alone", path, when, want)
				}
			}
		}
	}
	open, final := qs[0].ID, qs[1].ID // qs[1] is a calibration question
	check("round open", yet, open, final)
	if err := h.db.SetTrueValue(ctx, final, *qs[1].TrueValue, true, "Shown (invented)."); err != nil {
		t.Fatal(err)
	}
	check("round open", yet, open)
	check("answers final", none, final)
	if err := h.db.SetRound(ctx, ws.ID, ws.Round, false, "Break (invented)."); err != nil {
		t.Fatal(err)
	}
	check("round closed", yet, open)
	if err := h.db.SetArchived(ctx, ws.ID, true, "Finished (invented)."); err != nil {
		t.Fatal(err)
	}
	check("archived", none, open, final)
}

// The facilitator's page of one expert said "no answer yet" beside a
// question whose true value was shown and in an archived workshop,
// where no answer will come, and offered "Enter or revise" beside the
// final question. It now says that no answer was saved, as the expert's
// own page does, and offers nothing there; in an open round and a closed
// one it still says "yet".
func TestExpertsPageSaysYetOnlyWhereAnAnswerMayCome(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	ctx := context.Background()
	priya := es[2] // the demo's Priya Raman has answered nothing
	page := expertPagePath(ws.ID, priya.ID)
	open, final := qs[0], qs[1] // qs[1] is a calibration question
	cell := func(q workshop.Question) string {
		t.Helper()
		_, body := h.get(page)
		_, rest, ok := strings.Cut(body, `<th scope="row">Q`+strconv.Itoa(q.Position)+" ")
		if !ok {
			t.Fatalf("%s: no row for Q%d", page, q.Position)
		}
		row, _, _ := strings.Cut(rest, "</tr>")
		return row
	}
	const yet = "no answer yet"
	if r := cell(open); !strings.Contains(r, yet) {
		t.Fatalf("open round: the row says %q, want %q", r, yet)
	}
	if err := h.db.SetTrueValue(ctx, final.ID, *final.TrueValue, true, "Shown (invented)."); err != nil {
		t.Fatal(err)
	}
	if r := cell(final); !strings.Contains(r, "no answer was saved before the true value was shown") || strings.Contains(r, "Enter or revise") {
		t.Errorf("answers final: the row says %q, want that no answer was saved before the true value was shown, and no way to enter one", r)
	}
	if r := cell(open); !strings.Contains(r, yet) || !strings.Contains(r, "Enter or revise") {
		t.Errorf("open round, another question: the row says %q, want %q and the way to enter it", r, yet)
	}
	if err := h.db.SetRound(ctx, ws.ID, ws.Round, false, "Break (invented)."); err != nil {
		t.Fatal(err)
	}
	if r := cell(open); !strings.Contains(r, yet) {
		t.Errorf("round closed: the row says %q, want %q", r, yet)
	}
	if err := h.db.SetArchived(ctx, ws.ID, true, "Finished (invented)."); err != nil {
		t.Fatal(err)
	}
	for _, q := range []workshop.Question{open, final} {
		if r := cell(q); !strings.Contains(r, "no answer was saved") || strings.Contains(r, yet) {
			t.Errorf("archived, Q%d: the row says %q, want that no answer was saved", q.Position, r)
		}
	}
}

// The entry page of a revoked expert in an open round said "Round 1 is
// open: judgements can be entered and revised." just below the banner
// saying nothing can be entered for them, and asked how the judgement
// reached the facilitator and for the expert's reasoning, which only a
// save keeps. It now says the round is open for the other experts and
// asks for neither, here and in an archived workshop; the values and
// Show the fit stay. An expert with access is asked as before.
func TestRevokedEntryPageOffersOnlyWhatCanBeUsed(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	ctx := context.Background()
	q := qs[0]
	priya, tomas := es[2], es[1]
	const enterable = "judgements can be entered and revised"
	saveParts := []string{`id="f-channel"`, "How it reached you", `id="f-reason"`, "The expert's reasoning"}
	read := func(path string) string {
		t.Helper()
		_, page := h.get(path)
		return html.UnescapeString(page)
	}
	page := read(entryPath(ws.ID, q.ID, priya.ID))
	for _, want := range append([]string{enterable, "Show the fit", `name="values[0]"`}, saveParts...) {
		if !strings.Contains(page, want) {
			t.Fatalf("open round, access: the entry page lacks %q", want)
		}
	}
	if err := h.db.RevokeExpert(ctx, priya.ID, "Left the panel (invented)."); err != nil {
		t.Fatal(err)
	}
	page = read(entryPath(ws.ID, q.ID, priya.ID))
	if strings.Contains(page, enterable) || !strings.Contains(page, "Round 1 is open for the other experts.") {
		t.Error("open round, access revoked: the round's line does not say the round is open for the other experts alone")
	}
	for _, part := range saveParts {
		if strings.Contains(page, part) {
			t.Errorf("open round, access revoked: the entry page still offers %q, which only a save uses", part)
		}
	}
	if !strings.Contains(page, "Show the fit") || !strings.Contains(page, `name="values[0]"`) {
		t.Error("open round, access revoked: the values and Show the fit are gone")
	}
	if err := h.db.SetRound(ctx, ws.ID, ws.Round, false, "Break (invented)."); err != nil {
		t.Fatal(err)
	}
	if page = read(entryPath(ws.ID, q.ID, priya.ID)); strings.Contains(page, "until the next round opens") || !strings.Contains(page, "Round 1 is closed.") {
		t.Error("closed round, access revoked: the round's line says something can be entered when the next round opens")
	}
	if err := h.db.SetArchived(ctx, ws.ID, true, "Finished (invented)."); err != nil {
		t.Fatal(err)
	}
	page = read(entryPath(ws.ID, q.ID, tomas.ID))
	for _, part := range saveParts {
		if strings.Contains(page, part) {
			t.Errorf("archived: the entry page still offers %q, which only a save uses", part)
		}
	}
}

// The overview's table of who has answered what said "no answer yet"
// beside a question whose true value was shown and in an archived
// workshop, where no answer will come. Its cells now say that no answer
// was saved, as the facilitator's page of one expert does; in an open
// round and a closed one they still say "yet".
func TestOverviewSaysYetOnlyWhereAnAnswerMayCome(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	ctx := context.Background()
	wp := workshopPath(ws.ID)
	open, final := qs[0], qs[1] // qs[1] is a calibration question
	// cell is Priya Raman's cell for q: the demo's Priya has answered
	// neither question.
	cell := func(q workshop.Question) string {
		t.Helper()
		_, body := h.get(wp)
		_, table, ok := strings.Cut(body, `<section id="answered"`)
		if !ok {
			t.Fatalf("%s: no table of who has answered what", wp)
		}
		_, row, ok := strings.Cut(table, `<th scope="row">Priya Raman`)
		if !ok {
			t.Fatalf("%s: no row for Priya Raman", wp)
		}
		row, _, _ = strings.Cut(row, "</tr>")
		row = strings.NewReplacer(`<span class="nowrap">`, "", "</span>", "").Replace(row)
		cells := strings.Split(row, "<td")[1:]
		if len(cells) < q.Position {
			t.Fatalf("%s: Priya's row has %d cells, want Q%d's", wp, len(cells), q.Position)
		}
		return cells[q.Position-1]
	}
	const yet = "no answer yet"
	if c := cell(final); !strings.Contains(c, yet) {
		t.Fatalf("open round, calibration question not yet shown: the cell says %q, want %q", c, yet)
	}
	if err := h.db.SetTrueValue(ctx, final.ID, *final.TrueValue, true, "Shown (invented)."); err != nil {
		t.Fatal(err)
	}
	if c := cell(final); !strings.Contains(c, "no answer was saved (true value shown)") || strings.Contains(c, yet) {
		t.Errorf("answers final: the cell says %q, want that no answer was saved, the true value shown", c)
	}
	if c := cell(open); !strings.Contains(c, yet) {
		t.Errorf("open round, another question: the cell says %q, want %q", c, yet)
	}
	if err := h.db.SetRound(ctx, ws.ID, ws.Round, false, "Break (invented)."); err != nil {
		t.Fatal(err)
	}
	if c := cell(open); !strings.Contains(c, yet) {
		t.Errorf("round closed: the cell says %q, want %q", c, yet)
	}
	// Through a revoked link no answer can come: "no answer yet" beside
	// a revoked expert promised one.
	priya := -1
	es, _ := h.db.Experts(ctx, ws.ID)
	for i, e := range es {
		if e.Name == "Priya Raman" {
			priya = i
		}
	}
	if err := h.db.RevokeExpert(ctx, es[priya].ID, "Left the panel (invented)."); err != nil {
		t.Fatal(err)
	}
	if c := cell(open); !strings.Contains(c, ">no answer (access revoked)<") || strings.Contains(c, yet) {
		t.Errorf("access revoked: the cell says %q, want that no answer comes through a revoked link", c)
	}
	if err := h.db.SetArchived(ctx, ws.ID, true, "Finished (invented)."); err != nil {
		t.Fatal(err)
	}
	for _, q := range []workshop.Question{open, final} {
		if c := cell(q); !strings.Contains(c, ">no answer was saved<") {
			t.Errorf("archived, Q%d: the cell says %q, want that no answer was saved", q.Position, c)
		}
	}
}

// The question's panel said "no answer yet" in its table of judgements
// beside an expert who never answered a question whose true value was
// shown, or any question of an archived workshop, where no answer will
// come. It says what the facilitator's other pages say.
func TestPanelSaysYetOnlyWhereAnAnswerMayCome(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	ctx := context.Background()
	open, final := qs[0], qs[1] // qs[1] is a calibration question
	// row is Priya Raman's row of q's judgements table: the demo's
	// Priya has answered neither question.
	row := func(q workshop.Question) string {
		t.Helper()
		_, body := h.get(questionPath(ws.ID, q.ID))
		_, table, ok := strings.Cut(body, `<section id="judgements">`)
		if !ok {
			t.Fatalf("Q%d's panel has no table of judgements", q.Position)
		}
		_, r, ok := strings.Cut(table, "Priya Raman")
		if !ok {
			t.Fatalf("Q%d's table of judgements has no row for Priya Raman", q.Position)
		}
		r, _, _ = strings.Cut(r, "</tr>")
		return r
	}
	const yet = "no answer yet"
	for _, q := range []workshop.Question{open, final} {
		if r := row(q); !strings.Contains(r, yet) {
			t.Fatalf("open round, Q%d: the row says %q, want %q", q.Position, r, yet)
		}
	}
	if err := h.db.SetTrueValue(ctx, final.ID, *final.TrueValue, true, "Shown (invented)."); err != nil {
		t.Fatal(err)
	}
	if r := row(final); !strings.Contains(r, "no answer was saved before the true value was shown") || strings.Contains(r, yet) {
		t.Errorf("answers final: the row says %q, want that no answer was saved before the true value was shown", r)
	}
	if r := row(open); !strings.Contains(r, yet) {
		t.Errorf("open round, a question still open: the row says %q, want %q", r, yet)
	}
	if err := h.db.SetArchived(ctx, ws.ID, true, "Finished (invented)."); err != nil {
		t.Fatal(err)
	}
	for _, q := range []workshop.Question{open, final} {
		if r := row(q); !strings.Contains(r, "no answer was saved") || strings.Contains(r, yet) {
			t.Errorf("archived, Q%d: the row says %q, want that no answer was saved", q.Position, r)
		}
	}
}

package web

import (
	"context"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// The report, which hands the agreed prior to the project lead, says when
// that prior implies near-certainty (α + β above elicit.NearCertaintyESS,
// as the quick-priors page and the fits warn): Beta(2e5, 8e5) is worth a
// million observed trials, and the report listed it without a word.
func TestReportFlagsANearCertainAgreedPrior(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	if err := h.db.AgreePrior(context.Background(), &workshop.AgreedPrior{QuestionID: qs[0].ID, Source: workshop.PriorFromPool,
		Dist: elicit.Unit(elicit.Beta{Alpha: 2e5, Beta: 8e5}), Rationale: "invented", RoundOpen: true}); err != nil {
		t.Fatal(err)
	}
	_, body := h.get(workshopPath(ws.ID) + "/report")
	i := strings.Index(body, "Agreed priors")
	if i < 0 {
		t.Fatal("no agreed priors section")
	}
	section := body[i:min(len(body), i+6000)]
	if !strings.Contains(section, "worth about 1000000 observed trials") || !strings.Contains(section, "near-certainty") {
		t.Error("the report's agreed priors do not flag a prior worth a million trials")
	}
	// Under the table, named by its question; the narrow "Made from"
	// cell only points to it.
	if !strings.Contains(section, `<li class="warning">Q`+strconv.Itoa(qs[0].Position)+" "+qs[0].Quantity+": ") ||
		!strings.Contains(section, "see the warning below") {
		t.Error("the prior's warning is not listed under the table, named by its question, with a pointer in its row")
	}
	if cell := section[strings.Index(section, `data-label="Made from"`):]; strings.Index(cell, "</td>") > strings.Index(cell, "observed trials") {
		t.Error("the warning's words are in the narrow Made from cell")
	}
}

// The report lists the questions still without an agreed prior as a
// sentence: "Q4 repair time, Q5 leaking sites.", without the space the
// template's line breaks put before each comma and the full stop.
func TestReportListsPendingQuestionsAsASentence(t *testing.T) {
	h, ws, _, _, _ := seeded(t)
	for _, q := range []workshop.Question{
		{WorkshopID: ws.ID, Wording: "Repair time (invented)?", Quantity: "repair time", Lower: 2, Upper: 50, Format: workshop.FormatQuantiles, Probs: workshop.ProbsDefault},
		{WorkshopID: ws.ID, Wording: "Leaking sites (invented)?", Quantity: "leaking sites", Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: workshop.ProbsDefault},
	} {
		if err := h.db.AddQuestion(context.Background(), &q); err != nil {
			t.Fatal(err)
		}
	}
	_, body := h.get(workshopPath(ws.ID) + "/report")
	i := strings.Index(body, "No prior agreed yet:")
	if i < 0 {
		t.Fatal("no list of questions without an agreed prior")
	}
	text := strings.Join(strings.Fields(stripTags(body[i:min(len(body), i+400)])), " ")
	if !strings.Contains(text, "repair time, Q") || !strings.Contains(text, "leaking sites.") {
		t.Errorf("pending questions read %q", text[:min(len(text), 120)])
	}
}

// stripTags drops HTML tags, keeping the text between them.
func stripTags(s string) string {
	var b strings.Builder
	in := false
	for _, r := range s {
		switch {
		case r == '<':
			in = true
		case r == '>':
			in = false
		case !in:
			b.WriteRune(r)
		}
	}
	return b.String()
}

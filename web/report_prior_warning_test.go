package web

import (
	"context"
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
}

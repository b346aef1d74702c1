package e2e

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"testing"

	"github.com/chromedp/chromedp"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// TestReportWarningsReadOnEveryScreen: the report's fit warnings, grouped
// by kind (each kind's meaning once, then each expert's particulars), fit
// a phone and a projector: the page does not scroll sideways and no cell
// of the tail misses' table runs past the screen's edge; a revoked
// expert's row carries its mark. Screenshots of
// the question's section at 390 and 1366 px go to $PARLEY_SCREENSHOTS.
// The panel's answers are invented.
func TestReportWarningsReadOnEveryScreen(t *testing.T) {
	site, d := startDemo(t)
	ctx := context.Background()
	w := d.w
	for i := 0; i < 5; i++ {
		e := workshop.Expert{WorkshopID: w.ID, Name: "Invented reviewer " + strconv.Itoa(i+1), Affiliation: "Invented utility"}
		if err := site.DB.AddExpert(ctx, &e, []byte(fmt.Sprintf("report-warnings-%d", i))); err != nil {
			t.Fatal(err)
		}
	}
	es, _ := site.DB.Experts(ctx, w.ID)
	q := workshop.Question{WorkshopID: w.ID, Wording: "What fraction of the new seals fail in their first year? (invented)",
		Quantity: "first-year seal failures", Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95}}
	if err := site.DB.AddQuestion(ctx, &q); err != nil {
		t.Fatal(err)
	}
	answers := [][]float64{
		{0.06, 0.15, 0.38}, {0.06, 0.15, 0.42}, {0.06, 0.15, 0.45}, {0.05, 0.1, 0.4}, {0.8, 0.95, 0.98}, // an outer value missed
		{0.0495, 0.05, 0.0505}, // near-certainty
		{0.13, 0.15, 0.3},      // its 95% value missed (a gap of 0.05 exactly, not above: elicit.PoorFit)
		{0.0002, 0.004, 0.09},  // J-shaped, and its 95% value missed
		{0.06, 0.15, 0.35},     // no warning
	}
	for i, vs := range answers {
		rv := workshop.Revision{QuestionID: q.ID, ExpertID: es[i].ID, Answer: workshop.Answer{Values: vs}}
		if err := site.DB.SaveRevision(ctx, &rv); err != nil {
			t.Fatal(err)
		}
	}
	// The last, revoked after answering, stays in the table of final
	// judgements, marked as out of the pool.
	if err := site.DB.RevokeExpert(ctx, es[len(answers)-1].ID, "invented: left the panel"); err != nil {
		t.Fatal(err)
	}
	wsURL := site.URL + "/w/" + strconv.FormatInt(w.ID, 10)
	section := "#report-q" + strconv.FormatInt(q.ID, 10)
	fac := signedInFacilitator(t, site)
	shots := newScreenshots(t)
	for _, width := range []int64{390, 1366} {
		fac.viewport(width, 900, width == 390)
		fac.open(wsURL + "/report")
		fac.sees(fmt.Sprintf("report at %d px", width), "Outer value missed: 7 of 9 experts", "Near-certainty: 1 of 9 experts", "J-shaped fit: 1 of 9 experts", "revoked, not pooled")
		fits(t, fac, "report", width)
		if cut := eval[[]string](fac, "tail misses' cells", fmt.Sprintf(`Array.from(document.querySelectorAll(".table-tails td, .warning-group")).filter(e => e.getClientRects().length && e.getBoundingClientRect().right > %d + 0.5).slice(0, 3).map(e => e.textContent.trim())`, width)); len(cut) > 0 {
			t.Errorf("at %d px the warnings run past the screen: %q", width, cut)
		}
		shot, cancel := context.WithTimeout(fac.ctx, stepTimeout)
		png, err := chromedp.Run(shot, chromedp.Screenshot(chromedp.CSS(section)))
		cancel()
		if err != nil {
			t.Fatalf("screenshot the question at %d px: %v", width, err)
		}
		if err := os.WriteFile(filepath.Join(shots.dir, "report-warnings-"+strconv.FormatInt(width, 10)+".png"), png, 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

package e2e

import (
	"context"
	"net/http"
	"strconv"
	"testing"

	"github.com/chromedp/chromedp"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// TestSheetUnchangedRowsInBrowser: a sheet imported again with one row
// put right, on a phone and a laptop. The preview saves that row alone,
// with the reasoning its empty reason cell keeps from the expert's
// current answer, and lists the unchanged row below the save button;
// every cell of both tables is a labelled line on a phone, nothing
// scrolls sideways, and axe-core finds no serious violation. Saved, the
// overview counts the row left out; the sheet again offers nothing to
// save.
func TestSheetUnchangedRowsInBrowser(t *testing.T) {
	site, d := startDemo(t)
	ctx := context.Background()
	axe := axeSource(t)
	text := priyaByPhone
	savePhoneSheet(t, site, d, "monday.csv", text)
	var ines workshop.Expert
	for _, e := range d.experts {
		if e.Name == "Ines Varga" {
			ines = e
		}
	}
	own := workshop.Revision{QuestionID: d.qs[0].ID, ExpertID: ines.ID, Reason: "Counts from the 2023 inspections (invented).",
		Answer: workshop.Answer{Values: []float64{0.01, 0.04, 0.1}}}
	if err := site.DB.SaveRevision(ctx, &own); err != nil {
		t.Fatal(err)
	}
	shots := newScreenshots(t)
	fac := signedInFacilitator(t, site)
	again := text + "Ines Varga,Q1,0.01,0.045,0.1,\n"
	check := func(width int64) {
		fac.open(d.url + "/answers/import")
		fac.fill(`form[enctype="multipart/form-data"]`, "sheet", again)
		fac.load("check the sheet", chromedp.Click(chromedp.CSS(`form[enctype="multipart/form-data"] button[type=submit]`)))
	}
	for _, width := range []int64{1366, 390} {
		w := strconv.FormatInt(width, 10)
		fac.viewport(width, 900, width < 1000)
		check(width)
		fac.sees("preview", "This judgement will be saved in round", "one row repeats its expert's current answer and is listed below the button",
			"Counts from the 2023 inspections (invented). (the reason cell is empty: kept from their current answer)",
			"One row unchanged, not saved again", "your entry of ")
		if below := eval[bool](fac, "the unchanged rows' place", `document.querySelector("form[action$='/confirm'] button[type=submit]").getBoundingClientRect().bottom <= document.getElementById("sheet-unchanged").getBoundingClientRect().top`); !below {
			t.Errorf("preview at %d px: the unchanged rows are not below the save button", width)
		}
		fits(t, fac, "preview", width)
		oneLineTimes(t, fac, "preview", true)
		// A fitted Beta reads whole: at 1366 px the rows' eight columns
		// broke "Beta(3.682," from "63.3)".
		if broken := eval[[]string](fac, "fitted Betas on one line", `Array.from(document.querySelectorAll('#sheet-rows td[data-label="Fitted Beta"]')).filter(e => {
			const r = document.createRange(); r.selectNodeContents(e);
			return new Set(Array.from(r.getClientRects()).filter(b => b.width > 0).map(b => Math.round(b.top))).size > 1;
		}).map(e => e.textContent.trim())`); len(broken) > 0 {
			t.Errorf("preview at %d px breaks a fitted Beta over lines: %q", width, broken)
		}
		if width < 600 {
			if bare := eval[[]string](fac, "the unchanged rows' labels", `Array.from(document.querySelectorAll("#sheet-unchanged tbody td")).filter(c => c.getClientRects().length && !c.dataset.label).map(c => c.innerText.trim())`); len(bare) > 0 {
				t.Errorf("preview at %d px: cells without a label: %q", width, bare)
			}
		}
		accessible(t, fac, axe, "sheet preview with unchanged rows at "+w+" px")
		shots.take(fac, "sheet-unchanged-preview-"+w)
	}
	fac.load("save the sheet", chromedp.Click(chromedp.CSS(`form[action$="/confirm"] button[type=submit]`)))
	fac.sees("sheet saved", "Answer sheet saved.", "1 judgement, row 3 of a sheet", "One row repeated its expert's current answer and was not saved again.")
	shots.take(fac, "sheet-unchanged-saved-390")
	for _, width := range []int64{390, 1366} {
		w := strconv.FormatInt(width, 10)
		fac.viewport(width, 900, width < 1000)
		if st := fac.open(d.url + "/answers/import"); st != http.StatusOK {
			t.Fatalf("upload page: %d", st)
		}
		check(width)
		fac.sees("nothing to save", "Nothing to save: both rows of the sheet repeat their experts' current answers of round", "2 rows unchanged, not saved again")
		if n := fac.count(`form[action$="/confirm"] button[type=submit]`); n != 0 {
			t.Errorf("nothing to save at %d px, yet %d save buttons", width, n)
		}
		fits(t, fac, "nothing to save", width)
		accessible(t, fac, axe, "sheet with nothing to save at "+w+" px")
		shots.take(fac, "sheet-unchanged-nothing-"+w)
	}
}

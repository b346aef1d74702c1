package e2e

import (
	"context"
	"fmt"
	"net/http"
	"strconv"
	"strings"
	"testing"

	"github.com/chromedp/chromedp"
	"github.com/parley-elicit/parley/elicit/answersheet"
	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/web"
)

// priyaByPhone is an answer sheet of one row: Priya's answer to the
// demo's Q1, read out by phone (invented).
const priyaByPhone = "expert,question,q05,q50,q95,reason\nPriya Raman,Q1,0.02,0.05,0.12,Read out by phone from her notes (invented).\n"

// savePhoneSheet reads text as an answer sheet for the demo d and saves
// its rows as taken by phone, from the file named name, which it returns.
func savePhoneSheet(t *testing.T, s *site, d demo, name, text string) answersheet.File {
	t.Helper()
	file := answersheet.File{Name: name, Text: text}
	rows, err := answersheet.Read(strings.NewReader(text), d.qs, d.experts)
	if err != nil {
		t.Fatal(err)
	}
	if err := web.SaveSheet(context.Background(), s.DB, d.w, rows, workshop.ChannelPhone, file); err != nil {
		t.Fatal(err)
	}
	return file
}

// TestSheetImportInTheLogInBrowser: an imported answer sheet's line in
// the decision log and the report, with its file's 64-figure SHA-256,
// fits a phone's screen and a laptop's without scrolling sideways; so
// does the upload page with the columns of the demo's questions.
func TestSheetImportInTheLogInBrowser(t *testing.T) {
	site, d := startDemo(t)
	w, qs := d.w, d.qs
	file := savePhoneSheet(t, site, d, "hx40-phone-answers-round1-final-version-2.csv", priyaByPhone)
	shots := newScreenshots(t)
	fac := signedInFacilitator(t, site)
	base := site.URL + "/w/" + strconv.FormatInt(w.ID, 10)
	for _, width := range []int64{1366, 390} {
		fac.viewport(width, 900, width < 1000)
		for _, page := range []string{"/log", "/report"} {
			if st := fac.open(base + page); st != http.StatusOK {
				t.Fatalf("%s: %d", page, st)
			}
			fac.sees(page, "Judgements imported from an answer sheet", "1 judgement, row 2 of hx40-phone-answers-round1-final-version-2.csv (SHA-256 "+file.SHA256()+")")
			fits(t, fac, page, width)
			oneLineTerm(t, fac, page, width, "SHA-256")
			logReadsWhole(t, fac, page, width)
			if page == "/report" {
				historyReadsWhole(t, fac, page, width)
			}
			shots.take(fac, "sheet-import"+strings.ReplaceAll(page, "/", "-")+"-"+strconv.FormatInt(width, 10))
		}
		// The question's history names the sheet and row beside the entry.
		q1 := base + "/q/" + strconv.FormatInt(qs[0].ID, 10)
		if st := fac.open(q1); st != http.StatusOK {
			t.Fatalf("panel: %d", st)
		}
		fac.sees("panel", "facilitator, by phone (answer sheet hx40-phone-answers-round1-final-version-2.csv, row 2)")
		fits(t, fac, "panel", width)
		shots.take(fac, "sheet-panel-"+strconv.FormatInt(width, 10))
		// The upload page lists each question's columns and a header.
		if st := fac.open(base + "/answers/import"); st != http.StatusOK {
			t.Fatalf("upload page: %d", st)
		}
		fac.sees("upload page", "This workshop's columns", "q25,q50,q75", "expert,question,q05,q50,q95,q25,q75,reason")
		fits(t, fac, "upload page", width)
		// The header to start from breaks between its columns, never
		// inside a name: at 390 px it read "re" over "ason".
		if cut := eval[[]string](fac, "the header's columns", `Array.from(document.querySelectorAll("#sheet-header code")).flatMap(c => Array.from(c.childNodes)).filter(n => n.nodeType === Node.TEXT_NODE && n.textContent.trim()).flatMap(n => n.textContent.split(",").map((w, i, all) => ({n, w, at: all.slice(0, i).join(",").length + (i ? 1 : 0)}))).filter(({n, w, at}) => {
			if (!w) return false;
			const r = document.createRange(); r.setStart(n, at); r.setEnd(n, at + w.length);
			return new Set(Array.from(r.getClientRects()).filter(b => b.width > 0).map(b => Math.round(b.top))).size > 1;
		}).map(({w}) => w)`); len(cut) > 0 {
			t.Errorf("upload page at %d px: the header breaks inside %q", width, cut)
		}
		shots.take(fac, "sheet-upload-"+strconv.FormatInt(width, 10))
		// Its preview of a row that follows Ines Varga's own answer.
		fac.fill(`form[enctype="multipart/form-data"]`, "sheet", "expert,question,q05,q50,q95,reason\nInes Varga,Q1,0.01,0.04,0.1,From her paper form of Monday (invented).\n")
		fac.load("check the sheet", chromedp.Click(chromedp.CSS(`form[enctype="multipart/form-data"] button[type=submit]`)))
		fac.sees("sheet preview", "Nothing is saved yet", "1 row follows an answer the expert saved themselves", "Ines Varga's own answer of ")
		fits(t, fac, "sheet preview", width)
		oneLineTimes(t, fac, "sheet preview", true)
		if width < 600 {
			// On a phone each row is a block of labelled lines: as eight
			// columns in a box scrolled sideways, the Follows column the
			// warning above points to was a word wide.
			if side := eval[int](fac, "the preview's rows", `Array.from(document.querySelectorAll("#sheet-rows tbody tr")).filter(r => new Set(Array.from(r.cells).filter(c => c.getClientRects().length).map(c => Math.round(c.getBoundingClientRect().left))).size > 1).length`); side > 0 {
				t.Errorf("sheet preview at %d px: %d rows lay their cells side by side", width, side)
			}
			if bare := eval[[]string](fac, "the preview's labels", `Array.from(document.querySelectorAll("#sheet-rows tbody td")).filter(c => c.getClientRects().length && !c.dataset.label).map(c => c.innerText.trim())`); len(bare) > 0 {
				t.Errorf("sheet preview at %d px: cells without a label: %q", width, bare)
			}
		}
		shots.take(fac, "sheet-preview-"+strconv.FormatInt(width, 10))
		if width == 390 {
			// Saved: the overview says what, with the file's SHA-256.
			fac.load("save the sheet", chromedp.Click(chromedp.CSS(`form[action$="/confirm"] button[type=submit]`)))
			fac.sees("sheet saved", "Answer sheet saved.", "1 judgement, row 2 of a sheet")
			for _, w := range []int64{390, 1366} {
				fac.viewport(w, 900, w < 1000)
				fits(t, fac, "sheet saved", w)
				oneLineTerm(t, fac, "sheet saved", w, "SHA-256")
				shots.take(fac, "sheet-saved-"+strconv.FormatInt(w, 10))
			}
			// Said once: the overview reloaded says nothing of the sheet.
			fac.load("reload the overview", chromedp.Reload())
			if strings.Contains(fac.text(), "Answer sheet saved.") {
				t.Error("the overview reloaded says again that the sheet was saved")
			}
		}
	}
}

// oneLineTerm checks that every occurrence of term on the page stands on
// one line: "SHA-256" broke at its hyphen in the report's log on a phone,
// "SHA-" over "256". The words themselves must stay as written (a
// screen reader and a copy read "SHA-256"), so the check reads the
// page's text nodes, where a span kept them whole without changing them.
func oneLineTerm(t *testing.T, p *person, where string, width int64, term string) {
	t.Helper()
	lines := eval[[]int](p, "lines of "+term, fmt.Sprintf(`(() => {
		const out = [], term = %q, w = document.createTreeWalker(document.body, NodeFilter.SHOW_TEXT);
		for (let n; (n = w.nextNode()); ) {
			for (let i = n.data.indexOf(term); i >= 0; i = n.data.indexOf(term, i + 1)) {
				const r = document.createRange(); r.setStart(n, i); r.setEnd(n, i + term.length);
				out.push(new Set(Array.from(r.getClientRects()).filter(b => b.width > 0).map(b => Math.round(b.top))).size);
			}
		}
		return out;
	})()`, term))
	if len(lines) == 0 {
		t.Errorf("%s at %d px: no %q on the page", where, width, term)
	}
	for i, n := range lines {
		if n != 1 {
			t.Errorf("%s at %d px: %q number %d is written on %d lines", where, width, term, i+1, n)
		}
	}
}

// logReadsWhole checks the decision log (its own page's, or the report's
// copy) reads at the person's width: on a phone each decision is a block
// of lines, not cells side by side, and no word breaks over lines (a
// break after a hyphen is a break between words; the 64 figures of a
// SHA-256 may break). The report's copy was a table on a phone, its
// detail squeezed until "judgement" read "judge" over "ment".
func logReadsWhole(t *testing.T, p *person, where string, width int64) {
	t.Helper()
	tablesReadWhole(t, p, where, width, "log", `(() => {
		const h = Array.from(document.querySelectorAll("h1, h2")).find(h => h.textContent.trim() === "Decision log");
		return [(h.closest("section") || document).querySelector("table")];
	})()`)
}

// historyReadsWhole checks the report's revision history as logReadsWhole
// checks the log: on a phone its six columns lay the stated values, the
// fitted Beta and the reason past the screen's edge, to be scrolled to
// one question's table at a time.
func historyReadsWhole(t *testing.T, p *person, where string, width int64) {
	t.Helper()
	if n := eval[int](p, "the revision history's tables", `document.querySelectorAll(".table-history").length`); n == 0 {
		t.Fatalf("%s: no revision history", where)
	}
	tablesReadWhole(t, p, where, width, "revision history", `Array.from(document.querySelectorAll(".table-history"))`)
}

// tablesReadWhole checks the tables the script expression lists (an
// array): on a phone each row is a block of lines, its cells one above
// the other, and at every width no word breaks over lines.
func tablesReadWhole(t *testing.T, p *person, where string, width int64, what, tables string) {
	t.Helper()
	if width < 600 {
		if side := eval[int](p, "the "+what+"'s rows", tables+`.flatMap(t => Array.from(t.tBodies[0].rows)).filter(r => new Set(Array.from(r.cells).filter(c => c.getClientRects().length).map(c => Math.round(c.getBoundingClientRect().left))).size > 1).length`); side > 0 {
			t.Errorf("%s at %d px: %d of the %s's rows lay their cells side by side", where, width, side, what)
		}
	}
	broken := eval[[]string](p, "the "+what+"'s words", `(() => {
		const out = [];
		for (const table of `+tables+`) {
			const w = document.createTreeWalker(table, NodeFilter.SHOW_TEXT);
			for (let n; (n = w.nextNode()); ) {
				for (const m of n.data.matchAll(/[^\s\-\u2010-\u2014]+/g)) {
					if (m[0].length > 40) continue;
					const r = document.createRange(); r.setStart(n, m.index); r.setEnd(n, m.index + m[0].length);
					const lines = Array.from(r.getClientRects()).filter(b => b.width > 0).map(b => Math.round(b.top));
					if (new Set(lines).size > 1) out.push(m[0]);
				}
			}
		}
		return out.slice(0, 6);
	})()`)
	if len(broken) > 0 {
		t.Errorf("%s at %d px: the %s breaks words over lines: %q", where, width, what, broken)
	}
}

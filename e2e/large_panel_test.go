package e2e

import (
	"context"
	"fmt"
	"net/http"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"testing"

	"github.com/chromedp/cdproto/cdp"
	"github.com/chromedp/cdproto/page"
	"github.com/chromedp/chromedp"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// TestLargePanelPages opens a 60-expert question as the facilitator at a
// phone's width and at a projector's: the question, its reasons, its
// whole history and the report fit the screen, pass axe-core, and draw
// the strip of intervals, one row per expert (invented panel); printed,
// the strip's median dots and intervals are inked.
func TestLargePanelPages(t *testing.T) {
	const n = 60
	s := startSite(t)
	ws, q := largePanel(t, s, n)
	axe := axeSource(t)
	shots := newScreenshots(t)
	fac := signedInFacilitator(t, s)
	base := s.URL + "/w/" + strconv.FormatInt(ws.ID, 10)
	qp := base + "/q/" + strconv.FormatInt(q.ID, 10)
	for _, pg := range []struct{ name, url string }{
		{"large-panel", qp}, {"large-panel-reasons", qp + "/reasons"}, {"large-panel-history", qp + "/history"}, {"large-panel-report", base + "/report"},
	} {
		for _, w := range []int64{390, 1366} {
			fac.viewport(w, 844, w < 600)
			if st := fac.open(pg.url); st != http.StatusOK {
				t.Errorf("%s: status %d", pg.name, st)
				continue
			}
			fits(t, fac, pg.name, w)
			accessible(t, fac, axe, fmt.Sprintf("%s at %d px", pg.name, w))
			shots.take(fac, fmt.Sprintf("%s-%d", pg.name, w))
			if pg.name == "large-panel" || pg.name == "large-panel-report" {
				// One interval per expert in each layout's strip.
				if got := fac.count(".spread-intervals"); got != 2 {
					t.Errorf("%s at %d px: %d strips, want the wide and the compact one", pg.name, w, got)
				}
				rows := eval[int](fac, "rows of the shown strip", `Array.from(document.querySelectorAll("path.spread-intervals")).filter(p => p.getClientRects().length).map(p => (p.getAttribute("d").match(/M/g) || []).length)[0] || 0`)
				if rows != n {
					t.Errorf("%s at %d px: the visible strip has %d rows, want %d", pg.name, w, rows, n)
				}
			}
		}
	}
	fac.viewport(1366, 844, false)
	fac.open(qp)
	fac.sees("the large panel", "The 60 experts", "The whole history", "Read them and withhold any that names a person")

	// The strip's medians are zero-length path segments with round caps,
	// which a PDF paints as dots only if the printer keeps them. Print the
	// report with everything hidden but the medians, then with everything
	// hidden but the intervals, and count the ink.
	raster, err := exec.LookPath("pdftoppm")
	if err != nil {
		t.Logf("SKIPPING the strip's print check: pdftoppm not found (%v); .ci/run installs poppler-utils", err)
		return
	}
	fac.open(base + "/report")
	ink := func(only string) int {
		t.Helper()
		eval[bool](fac, "show only "+only, fmt.Sprintf(`(() => {
			for (const e of document.querySelectorAll("body *")) e.style.visibility = "hidden";
			for (const e of document.querySelectorAll(%q)) e.style.visibility = "visible";
			return true;
		})()`, only))
		var pdf []byte
		fac.do("print to PDF", chromedp.Func(func(ctx context.Context, tg *chromedp.Target) error {
			res, err := cdp.Call(ctx, tg, page.PrintToPDF, page.PrintToPDFParams{PaperWidth: 8.27, PaperHeight: 11.69})
			pdf = res.Data
			return err
		}))
		dir := t.TempDir()
		path := filepath.Join(dir, "strip.pdf")
		if err := os.WriteFile(path, pdf, 0o644); err != nil {
			t.Fatal(err)
		}
		if out, err := exec.Command(raster, "-r", "200", "-gray", path, filepath.Join(dir, "page")).CombinedOutput(); err != nil {
			t.Fatalf("pdftoppm: %v\n%s", err, out)
		}
		files, _ := filepath.Glob(filepath.Join(dir, "page-*.pgm"))
		dark := 0
		for _, f := range files {
			_, _, pix := readPGM(t, f)
			for _, v := range pix {
				if v < 200 {
					dark++
				}
			}
		}
		return dark
	}
	// At 200 dpi a median's dot (2.2 units of the strip's 640, across a
	// card narrower than the page) is about 3.5 px across: at least 3
	// inked pixels each. A printer that drops zero-length segments
	// leaves none.
	dots, lines := ink("path.spread-medians"), ink("path.spread-intervals")
	t.Logf("printed strip: %d inked pixels of medians, %d of intervals, for %d experts", dots, lines, n)
	if dots < 3*n {
		t.Errorf("the printed strip's medians leave %d inked pixels, want at least %d (a dot per expert)", dots, 3*n)
	}
	if lines < 3*n {
		t.Errorf("the printed strip's intervals leave %d inked pixels, want at least %d", lines, 3*n)
	}
}

// largePanel adds an invented workshop of one question answered by n
// experts, each with a reason.
func largePanel(t *testing.T, s *site, n int) (workshop.Workshop, workshop.Question) {
	t.Helper()
	return largePanelWith(t, s, n, nil)
}

// largePanelWith is largePanel with the question changed by set before it
// is saved (nil: as it is). The medians spread evenly from 0.04 towards
// 0.24.
func largePanelWith(t *testing.T, s *site, n int, set func(*workshop.Question)) (workshop.Workshop, workshop.Question) {
	t.Helper()
	return sealPanel{title: "Invented: a large reliability panel", set: set,
		median: func(i int) float64 { return 0.04 + 0.2*float64(i)/float64(n) },
		reason: "Invented: field returns of a similar seal, site %d."}.add(t, s, n)
}

// TestLargePanelCellsKeepDatesAndValuesWhole: a large panel's tables
// of judgements and of revisions, with a reason in every row, broke a
// cell inside what is read as one thing: "2026-12-" over "03 11:11 UTC"
// at 1366 px, and "95%:" over its value "0.078" at 1366 and at 390 px. A
// cell may break between them, never inside a time or a named value.
func TestLargePanelCellsKeepDatesAndValuesWhole(t *testing.T) {
	s := startSite(t)
	ws, q := largePanel(t, s, 24)
	fac := signedInFacilitator(t, s)
	qp := s.URL + "/w/" + strconv.FormatInt(ws.ID, 10) + "/q/" + strconv.FormatInt(q.ID, 10)
	for _, w := range []int64{1366, 390} {
		fac.viewport(w, 900, w < 600)
		for _, pg := range []struct{ name, url, table string }{
			{"the question's judgements", qp, "#judgements"}, {"the whole history", qp + "/history", "#history"},
		} {
			fac.open(pg.url)
			if n := fac.count(pg.table + " tbody tr"); n < 24 {
				t.Fatalf("%s at %d px: %d rows", pg.name, w, n)
			}
			broken := eval[[]string](fac, "the cells' times and values", `(() => {
				const lines = r => new Set(Array.from(r.getClientRects()).filter(b => b.width > 0).map(b => Math.round(b.top))).size;
				const out = [];
				for (const td of document.querySelectorAll(`+strconv.Quote(pg.table+" tbody td")+`)) {
					const w = document.createTreeWalker(td, NodeFilter.SHOW_TEXT);
					for (let n = w.nextNode(); n; n = w.nextNode()) {
						const re = /\d{4}-\d\d-\d\d \d\d:\d\d(:\d\d)? UTC|\d+%:\s[^;\s]+/g;
						for (let m; (m = re.exec(n.textContent)); ) {
							const r = document.createRange();
							r.setStart(n, m.index); r.setEnd(n, m.index + m[0].length);
							if (lines(r) > 1) out.push(m[0]);
						}
					}
				}
				return out;
			})()`)
			if len(broken) > 0 {
				t.Errorf("%s at %d px breaks %d times or values over two lines, the first %q", pg.name, w, len(broken), broken[0])
			}
		}
	}
}

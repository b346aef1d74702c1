package e2e

import (
	"context"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// TestOverviewCellsKeepTheirCountWhole: on the projector (1366 px) the
// invented demo's who-answered-what table broke "answered (1 save)" as
// "answered (1" over "save)". A cell may wrap before its count, never
// inside it.
func TestOverviewCellsKeepTheirCountWhole(t *testing.T) {
	_, d, fac := facilitatorOnDemo(t)
	for _, w := range []int64{1366, 390} {
		fac.viewport(w, 900, w < 600)
		fac.open(d.url + "/")
		broken := eval[[]string](fac, "the answer cells' counts", `Array.from(document.querySelectorAll("#answered tbody td")).filter(td => {
			const w = document.createTreeWalker(td, NodeFilter.SHOW_TEXT);
			const r = document.createRange();
			let started = false;
			for (let n = w.nextNode(); n; n = w.nextNode()) {
				const i = started ? 0 : n.textContent.indexOf("(");
				if (i < 0) continue;
				if (!started) { r.setStart(n, i); started = true; }
				r.setEnd(n, n.textContent.length);
			}
			if (!started) return false;
			return new Set(Array.from(r.getClientRects()).filter(b => b.width > 0).map(b => Math.round(b.top))).size > 1;
		}).map(td => td.innerText)`)
		if len(broken) > 0 {
			t.Errorf("at %d px the overview breaks a cell's count over two lines: %q", w, broken)
		}
		if n := fac.count("#answered tbody td"); n == 0 {
			t.Fatalf("at %d px the overview has no answer cells", w)
		}
	}
}

// TestDemoTablesOnAPhone: on a phone, the facilitator's tables of many
// columns ran past the screen's edge. The page of one demo expert's
// answers cut each row's "Enter or revise" link in half ("En / or /
// rev"); question 1's panel squeezed the eleven columns of each expert's
// judgement and fit (Ole Brandt's row a hand's height of blank cells
// beside his warning) and pushed its pool's percentiles and its
// revisions' answers off screen; the overview hid its questions' links
// and its experts' "Revoke…" and "New link…" buttons; the calibration
// page its pools of the target questions. On a phone each row is now a
// block of labelled lines.
func TestDemoTablesOnAPhone(t *testing.T) {
	site, d := startDemo(t)
	es, qs, wsURL := d.experts, d.qs, d.url
	fac := signedInFacilitator(t, site)
	fac.viewport(390, 844, true)
	shots := newScreenshots(t)
	for _, c := range []struct{ name, url, table string }{
		{"an expert's answers", wsURL + "/experts/" + strconv.FormatInt(es[0].ID, 10), "main table"},
		{"question 1's judgements", wsURL + "/q/" + strconv.FormatInt(qs[0].ID, 10), "#judgements table"},
		{"question 1's pool", wsURL + "/q/" + strconv.FormatInt(qs[0].ID, 10), "table.table-pool"},
		{"question 1's revisions", wsURL + "/q/" + strconv.FormatInt(qs[0].ID, 10), "#history table"},
		{"the overview's questions", wsURL + "/", "table.table-questions"},
		{"the overview's panel", wsURL + "/", "table.table-roster"},
		{"the pools the calibration page compares", wsURL + "/calibration", "#compare table"},
		{"the report's panel", wsURL + "/report", "table.table-roster"},
	} {
		fac.open(c.url)
		if n := fac.count(c.table + " tbody tr"); n < 2 {
			t.Errorf("%s: %d rows", c.name, n)
		}
		cut := eval[[]string](fac, "the table's cells", `Array.from(document.querySelectorAll(`+strconv.Quote(c.table+" td, "+c.table+" th")+`)).filter(c => c.getClientRects().length && c.getBoundingClientRect().right > 390.5).map(c => c.innerText.trim())`)
		if len(cut) > 0 {
			t.Errorf("%s at 390 px: the table runs past the screen: %q", c.name, cut)
		}
		if side := eval[int](fac, "the rows' cells", `Array.from(document.querySelectorAll(`+strconv.Quote(c.table+" tbody tr")+`)).filter(r => new Set(Array.from(r.cells).filter(c => c.getClientRects().length).map(c => Math.round(c.getBoundingClientRect().left))).size > 1).length`); side > 0 {
			t.Errorf("%s at 390 px: %d rows lay their cells side by side", c.name, side)
		}
		// Stacked, a cell after a row's first says what it is: a bare
		// "active" or "Water utility (invented)" under a name reads as
		// nothing in particular.
		if bare := eval[[]string](fac, "unlabelled cells", `Array.from(document.querySelectorAll(`+strconv.Quote(c.table+" tbody tr")+`)).flatMap(r => Array.from(r.cells).slice(1).filter(c => c.getClientRects().length && c.innerText.trim() && c.colSpan < 2 && !c.dataset.label && !c.querySelector("form, a, button")).map(c => c.innerText.trim()))`); len(bare) > 0 {
			t.Errorf("%s at 390 px: cells without a label: %q", c.name, bare)
		}
		shots.take(fac, "demo-table-"+strings.NewReplacer(" ", "-", "'", "").Replace(c.name)+"-390")
	}
}

// TestStudyComparisonKeepsEachBetaWhole: at 1366 px the demo's study page
// broke "Beta(2.022, 40.59)" after its comma in the table of priors
// compared, with room to spare in the columns beside it. A Beta is read
// whole.
func TestStudyComparisonKeepsEachBetaWhole(t *testing.T) {
	site, d := startDemo(t)
	qs := d.qs
	fac := signedInFacilitator(t, site)
	for _, w := range []int64{1366, 390} {
		fac.viewport(w, 900, w < 600)
		fac.open(d.url + "/q/" + strconv.FormatInt(qs[0].ID, 10) + "/study?trials=100")
		broken := eval[[]string](fac, "the Betas compared", `Array.from(document.querySelectorAll(".compare-table td")).filter(td => td.textContent.trim().startsWith("Beta(")).filter(td => {
			const r = document.createRange(); r.selectNodeContents(td);
			return new Set(Array.from(r.getClientRects()).filter(b => b.width > 0).map(b => Math.round(b.top))).size > 1;
		}).map(td => td.textContent.trim())`)
		if n := fac.count(".compare-table td"); n == 0 {
			t.Fatalf("at %d px the study page compares no priors", w)
		}
		if len(broken) > 0 {
			t.Errorf("at %d px the priors compared break a Beta over lines: %q", w, broken)
		}
	}
}

// TestSteadinessPictureOnAPhone: on a phone the demo's steadiness picture
// (the calibration page's "How steady the weighted pool is") was drawn
// 34rem wide inside a box that scrolled sideways, its "largest shift"
// column off the screen's edge. It has a compact drawing now, as the
// other pictures do: every row's label and shift on the screen, none
// smaller than 11 px, nothing to scroll.
func TestSteadinessPictureOnAPhone(t *testing.T) {
	_, d, fac := facilitatorOnDemo(t)
	fac.viewport(390, 844, true)
	fac.open(d.url + "/calibration")
	if n := fac.count(".chart-steadiness .steady-shift"); n == 0 {
		t.Fatal("the calibration page has no steadiness picture")
	}
	if scroll := eval[[]string](fac, "the picture's boxes", `Array.from(document.querySelectorAll(".chart-steadiness, .chart-steadiness *")).filter(e => e.getClientRects().length && e.scrollWidth > e.clientWidth + 1 && !(e instanceof SVGElement)).map(e => e.tagName + "." + e.className + " " + e.scrollWidth + ">" + e.clientWidth)`); len(scroll) > 0 {
		t.Errorf("at 390 px the steadiness picture scrolls sideways: %q", scroll)
	}
	shown := eval[[]string](fac, "the rows' words", `Array.from(document.querySelectorAll(".chart-steadiness .steady-label, .chart-steadiness .steady-shift")).filter(e => e.getClientRects().length).map(e => { const b = e.getBoundingClientRect(); return (b.left >= 0 && b.right <= 390.5 ? "" : "off the screen: ") + (b.height < 11 ? "under 11 px: " : "") + e.textContent.trim(); })`)
	if len(shown) < 10 {
		t.Fatalf("the picture shows %d row labels and shifts: %q", len(shown), shown)
	}
	for _, s := range shown {
		if strings.HasPrefix(s, "off the screen") || strings.HasPrefix(s, "under 11 px") {
			t.Errorf("at 390 px the steadiness picture writes a label or a shift %s", s)
		}
	}
	shots := newScreenshots(t)
	shots.take(fac, "demo-steadiness-390")
}

// TestInlineFormButtonsSitLevelWithTheirField: at the projector the
// calibration page's "Score again" and the panel's entry form's button sat
// level with their field's label, half a line above the box they act on
// (the buttons' own alignment overrode the row's). Each inline form's
// button now ends level with its field's input or list.
func TestInlineFormButtonsSitLevelWithTheirField(t *testing.T) {
	_, d, fac := facilitatorOnDemo(t)
	fac.viewport(1366, 900, false)
	for _, page := range []string{d.url + "/calibration", d.url + "/q/" + strconv.FormatInt(d.qs[0].ID, 10)} {
		fac.open(page)
		gaps := eval[[]float64](fac, "inline forms' buttons against their fields", `Array.from(document.querySelectorAll("form.form-inline")).map(f => {
			const b = f.querySelector("button"), box = f.querySelector("input[type=text], select");
			return b && box ? Math.abs(b.getBoundingClientRect().bottom - box.getBoundingClientRect().bottom) : -1;
		})`)
		if len(gaps) == 0 {
			t.Fatalf("%s has no inline form", page)
		}
		for i, g := range gaps {
			if g < 0 || g > 2 {
				t.Errorf("%s: inline form %d's button ends %.1f px from its field's box", page, i, g)
			}
		}
	}
	// The correction form's "Save the correction" and "Cancel" sit side
	// by side, at the projector and on a phone: stacked, Cancel read as
	// a second step of the form.
	for _, w := range []int64{1366, 390} {
		fac.viewport(w, 900, w < 500)
		fac.open(d.url + "/q/" + strconv.FormatInt(d.qs[0].ID, 10) + "/edit")
		gap := eval[float64](fac, "the correction form's buttons", `(() => {
			const f = document.querySelector('form[action$="/edit"]');
			const save = f.querySelector("button[type=submit]"), cancel = Array.from(f.querySelectorAll("a.button")).find(a => a.textContent.trim() === "Cancel");
			return save && cancel ? Math.abs(save.getBoundingClientRect().top - cancel.getBoundingClientRect().top) : -1;
		})()`)
		if gap < 0 || gap > 2 {
			t.Errorf("at %d px the correction form's Save and Cancel are not side by side (tops %.1f px apart)", w, gap)
		}
	}
}

// TestRoundsCardKeepsItsButtonApart: with round 1 of the invented demo
// closed, the "Open round 2" button sat against the "Closed round 1 by
// mistake?" line under it, at the projector and on a phone, so that the
// line read as the button's caption. They stand apart now.
func TestRoundsCardKeepsItsButtonApart(t *testing.T) {
	site, d := startDemo(t)
	if err := site.DB.SetRound(context.Background(), d.w.ID, 1, false, ""); err != nil {
		t.Fatal(err)
	}
	fac := signedInFacilitator(t, site)
	for _, w := range []int64{1366, 390} {
		fac.viewport(w, 900, w < 600)
		fac.open(d.url + "/")
		gap := eval[float64](fac, "the gap under the round's button", `(() => {
			const b = document.querySelector("#rounds form button[type=submit]"), s = document.querySelector("#rounds details summary");
			return b && s ? s.getBoundingClientRect().top - b.getBoundingClientRect().bottom : -1;
		})()`)
		if gap < 12 {
			t.Errorf("at %d px the rounds card's button ends %.1f px above the line under it; want 12 px or more", w, gap)
		}
	}
}

// TestWorkshopListKeepsEachDateWhole: on a phone the workshop list broke
// its Created column inside the date, "2026-12-" over "03 15:31 UTC". A
// date and time is read as one thing: it stays on one line and on the
// screen at every width. On a phone each workshop is a block of lines,
// its title, its round and when it was created, as the wider tables are.
func TestWorkshopListKeepsEachDateWhole(t *testing.T) {
	site, _ := startDemo(t)
	ctx := context.Background()
	w := workshop.Workshop{Title: "Leak rate after the 2026 relining of the northern trunk main (invented)"}
	if err := site.DB.CreateWorkshop(ctx, &w); err != nil {
		t.Fatal(err)
	}
	fac := signedInFacilitator(t, site)
	shots := newScreenshots(t)
	for _, width := range append(append([]int64{}, phoneWidths...), 1366) {
		fac.viewport(width, 900, width < 600)
		fac.open(site.URL + "/")
		broken := eval[[]string](fac, "the list's dates", `(() => {
			const out = [];
			for (const td of document.querySelectorAll("main table td")) {
				const w = document.createTreeWalker(td, NodeFilter.SHOW_TEXT);
				for (let n = w.nextNode(); n; n = w.nextNode()) {
					const re = /\d{4}-\d\d-\d\d \d\d:\d\d UTC/g;
					for (let m; (m = re.exec(n.textContent)); ) {
						const r = document.createRange();
						r.setStart(n, m.index); r.setEnd(n, m.index + m[0].length);
						if (new Set(Array.from(r.getClientRects()).filter(b => b.width > 0).map(b => Math.round(b.top))).size > 1) out.push(m[0] + " over two lines");
						const main = td.closest("main"), edge = main.getBoundingClientRect().right - parseFloat(getComputedStyle(main).paddingRight);
						if (r.getBoundingClientRect().right > Math.min(edge, document.documentElement.clientWidth) + 0.5) out.push(m[0] + " past the edge, at " + Math.round(r.getBoundingClientRect().right) + " px");
					}
				}
			}
			return out;
		})()`)
		if n := fac.count("main table tbody tr"); n != 2 {
			t.Fatalf("at %d px the list shows %d workshops, want 2", width, n)
		}
		if len(broken) > 0 {
			t.Errorf("at %d px the workshop list breaks or cuts a date: %q", width, broken)
		}
		fits(t, fac, "the workshop list", width)
		if width == 390 || width == 1366 {
			shots.take(fac, "workshop-list-"+strconv.FormatInt(width, 10))
		}
	}
}

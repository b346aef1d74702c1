package e2e

import (
	"context"
	"fmt"
	"net/http"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// rareDecimal is a rare event's value written as a long plain decimal.
var rareDecimal = regexp.MustCompile(`\b0\.000\d{3,}`)

// exponent is a number written with an exponent ("5.055e-5").
var exponent = regexp.MustCompile(`\d(?:\.\d+)?e[-+]?\d+`)

// TestRareEventChartTablesOnAPhone: the tables of numbers under the
// pictures (the fit's stated against fitted values, each curve's 5%,
// median and 95%, the medians' spread) fit the screen at 360, 390 and
// 1366 px when a rare event's values are long plain decimals
// ("0.00004089"): no table scrolls sideways inside its box, no cell
// lies past the screen's edge, and each curve's three percentiles stand
// on one line or on three, not two and one, on the expert's question page with the
// judgement 0.00002, 0.00005, 0.00012 saved, the facilitator's entry
// page for it, the question's panel, its room view and its study page,
// in round 2.
func TestRareEventChartTablesOnAPhone(t *testing.T) {
	site, d := startDemo(t)
	ctx := context.Background()
	q := d.qs[0]
	priya := -1
	for i, e := range d.experts {
		vs := [][]float64{{0.00003, 0.0001, 0.00025}, {0.00005, 0.00015, 0.0004}, {0.00004, 0.00012, 0.0003}}[i%3]
		if e.Name == "Priya Raman" {
			priya, vs = i, []float64{0.00002, 0.00005, 0.00012}
		}
		rv := workshop.Revision{QuestionID: q.ID, ExpertID: e.ID, Answer: workshop.Answer{Values: vs}, Reason: "Rare in the field (invented)."}
		if err := site.DB.SaveRevision(ctx, &rv); err != nil {
			t.Fatal(err)
		}
	}
	if priya < 0 {
		t.Fatal("no Priya in the demo")
	}
	agreeRarePrior(t, site, q)
	// Round 1 closes and round 2 opens: the room shows the panel, and the
	// expert's page the other experts' curves beside her own fit.
	if err := site.DB.SetRound(ctx, d.w.ID, 1, false, "Round 1 discussed (invented)."); err != nil {
		t.Fatal(err)
	}
	if err := site.DB.SetRound(ctx, d.w.ID, 2, true, "A second round (invented)."); err != nil {
		t.Fatal(err)
	}
	shots := newScreenshots(t)
	br := startBrowser(t)
	fac := br.person("facilitator")
	signIn(t, site, fac)
	expert := br.person("Priya Raman (on a phone)")
	qURL := d.url + "/q/" + strconv.FormatInt(q.ID, 10)
	pages := []struct {
		name string
		p    *person
		url  string
	}{
		{"expert", expert, site.URL + linkOf(t, d.links, "Priya Raman") + "q/" + strconv.FormatInt(q.ID, 10)},
		{"entry", fac, qURL + "/enter/" + strconv.FormatInt(d.experts[priya].ID, 10)},
		{"panel", fac, qURL},
		{"room", fac, qURL + "/room"},
		{"study", fac, qURL + "/study"},
	}
	for _, pg := range pages {
		for _, w := range []int64{360, 390, 1366} {
			where := fmt.Sprintf("%s at %d px", pg.name, w)
			pg.p.viewport(w, 900, w < 600)
			if st := pg.p.open(pg.url); st != http.StatusOK {
				t.Fatalf("%s: %d", where, st)
			}
			tables := eval[[]string](pg.p, "the tables under the pictures", `(() => {
				const out = [];
				document.querySelectorAll(".chart-table").forEach((tb, i) => {
					if (!tb.getClientRects().length) return;
					tb.setAttribute("data-shot", String(i));
					const box = tb.closest(".chart-with-table");
					if (box) box.setAttribute("data-shot-box", String(i));
					out.push(String(i) + " " + tb.innerText.replace(/\s+/g, " ").trim().slice(0, 300));
				});
				return out;
			})()`)
			if len(tables) == 0 {
				t.Errorf("%s: no table of numbers under a picture is shown", where)
			}
			if long := strings.Join(tables, " | "); !rareDecimal.MatchString(long) {
				t.Errorf("%s: no rare event's long decimal in the tables, so nothing is tested: %q", where, long)
			}
			// Every number in plain decimals, as the expert typed hers.
			if exp := exponent.FindAllString(strings.Join(tables, " | "), -1); len(exp) > 0 {
				t.Errorf("%s: a table under a picture writes %q with an exponent", where, exp)
			}
			wide := chartTablesScrolling(pg.p)
			for _, s := range wide {
				t.Errorf("%s: %s", where, s)
			}
			cut := eval[[]string](pg.p, "cells past the screen", `[...document.querySelectorAll(".chart-table :is(th, td, caption)")].filter(c => {
				if (!c.getClientRects().length) return false;
				const r = c.getBoundingClientRect();
				return r.width > 0 && (r.right > `+strconv.FormatInt(w, 10)+` + 0.5 || r.left < -0.5);
			}).map(c => c.innerText.trim() + " (" + Math.round(c.getBoundingClientRect().left) + " to " + Math.round(c.getBoundingClientRect().right) + " px)").slice(0, 6)`)
			if len(cut) > 0 {
				t.Errorf("%s: cells lie past the screen: %q", where, cut)
			}
			// A table whose headings are hidden (a phone's blocks of lines)
			// names each number: by its label, or by its row's heading.
			unnamed := eval[[]string](pg.p, "numbers without their names", `[...document.querySelectorAll(".chart-table")].filter(tb => tb.getClientRects().length && (!tb.tHead || !tb.tHead.getClientRects().length)).flatMap(tb => [...tb.querySelectorAll("td")].filter(c => c.getClientRects().length && c.innerText.trim() && getComputedStyle(c, "::before").content === "none" && ![...c.parentElement.children].some(h => h.tagName === "TH" && h.getClientRects().length))).map(c => c.innerText.trim()).slice(0, 6)`)
			if len(unnamed) > 0 {
				t.Errorf("%s: numbers shown without their column's name: %q", where, unnamed)
			}
			// Each curve's 5%, median and 95% read evenly: all three on one
			// line or each on its own, never two on a line and the third
			// alone on the next.
			uneven := eval[[]string](pg.p, "curves' percentiles split unevenly", `[...document.querySelectorAll(".chart-table-curves tbody tr")].filter(tr => tr.getClientRects().length).flatMap(tr => {
				const tops = [...tr.querySelectorAll("td[data-label]")].filter(c => c.getClientRects().length).map(c => Math.round(c.getBoundingClientRect().top));
				tops.sort((a, b) => a - b);
				const lines = tops.filter((y, i) => i === 0 || y - tops[i - 1] > 3).length;
				return lines === 1 || lines === tops.length ? [] : [(tr.querySelector("th") || tr).innerText.trim().split("\n")[0] + ": " + tops.length + " values on " + lines + " lines (" + [...tr.querySelectorAll("td[data-label]")].map(c => c.dataset.label + " " + c.innerText.trim()).join(", ") + ")"];
			}).slice(0, 4)`)
			for _, u := range uneven {
				t.Errorf("%s: %s", where, u)
			}
			for _, tb := range tables {
				n, _, _ := strings.Cut(tb, " ")
				shots.part(pg.p, `.chart-table[data-shot="`+n+`"]`, fmt.Sprintf("chart-table-%s-%s-%d", pg.name, n, w))
				// The table with its picture, as the page sets them.
				shots.part(pg.p, `[data-shot-box="`+n+`"]`, fmt.Sprintf("chart-table-%s-%s-%d-with-picture", pg.name, n, w))
			}
		}
	}
}

// chartTablesScrolling names each visible table of numbers under a
// picture (.chart-table) that scrolls sideways, in itself or in a box
// around it that scrolls: on a phone its last columns lie behind a
// scroll that a reader may never find.
func chartTablesScrolling(p *person) []string {
	return eval[[]string](p, "tables under the pictures scrolling sideways", `(() => {
		const out = [];
		for (const tb of document.querySelectorAll(".chart-table")) {
			if (!tb.getClientRects().length) continue;
			for (let b = tb; b && b !== document.body; b = b.parentElement) {
				if (b !== tb && !["auto", "scroll"].includes(getComputedStyle(b).overflowX)) continue;
				if (b.scrollWidth > b.clientWidth + 1) out.push("“" + (tb.caption ? tb.caption.innerText.trim() : tb.className) + "” scrolls sideways: " + (b === tb ? "the table" : "its box ." + b.className.trim().split(/\s+/).join(".")) + " holds " + b.scrollWidth + " px in " + b.clientWidth);
			}
		}
		return out;
	})()`)
}

package e2e

import (
	"context"
	"fmt"
	"net/http"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
	"github.com/chromedp/chromedp/kb"

	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/web"
	"github.com/parley-elicit/parley/web/chart"
)

// phoneWidths are the narrow screens every page must fit (issue 12).
var phoneWidths = []int64{360, 390, 414}

// deviceRig is a workshop with every answer format (an invented survey of
// a district's water mains): a proportion at 5/50/95, a four-value
// interval, chips, a repair time in days, and a calibration question.
type deviceRig struct {
	site    *site
	ws      workshop.Workshop
	qs      []workshop.Question
	links   map[string]string // expert name → private link
	experts []workshop.Expert
}

func newDeviceRig(t *testing.T) *deviceRig {
	t.Helper()
	s := startSite(t)
	ctx := context.Background()
	g := &deviceRig{site: s, links: map[string]string{}}
	g.ws = workshop.Workshop{Title: "Water mains survey (invented)", Purpose: "Invented: priors for the condition of a district's cast-iron mains.", Invented: true}
	if err := s.DB.CreateWorkshop(ctx, &g.ws); err != nil {
		t.Fatal(err)
	}
	truth := 0.18
	g.qs = []workshop.Question{
		{Wording: "What proportion of the district's cast-iron mains will burst at least once in the next five years?", Quantity: "five-year burst proportion",
			Units: "proportion of mains", Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: workshop.ProbsDefault},
		{Wording: "What proportion of the mains have lost more than a quarter of their wall?", Quantity: "wall-loss proportion",
			Units: "proportion of mains", Lower: 0, Upper: 1, Format: workshop.FormatInterval},
		{Wording: "Where does the proportion of mains with internal corrosion lie? Place your chips.", Quantity: "corrosion proportion",
			Lower: 0, Upper: 1, Format: workshop.FormatChips, BinEdges: workshop.DefaultBinEdges(0, 1), Chips: workshop.DefaultChips},
		{Wording: "How many days does a burst main take to repair, from report to water back on?", Quantity: "repair time", Units: "days",
			Lower: 0, Upper: 30, Format: workshop.FormatQuantiles, Probs: workshop.ProbsQuartiles},
		{Wording: "What proportion of last year's inspected mains needed a new lining?", Quantity: "relined proportion",
			Units: "proportion of mains", Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: workshop.ProbsDefault, Calibration: true, TrueValue: &truth},
	}
	for i := range g.qs {
		g.qs[i].WorkshopID = g.ws.ID
		if err := s.DB.AddQuestion(ctx, &g.qs[i]); err != nil {
			t.Fatal(err)
		}
	}
	for _, n := range []string{"Amara Osei (invented)", "Bjorn Dahl (invented)", "Carmen Ruiz (invented)"} {
		tok, hash, err := web.NewExpertToken()
		if err != nil {
			t.Fatal(err)
		}
		e := workshop.Expert{WorkshopID: g.ws.ID, Name: n, Affiliation: "Water utility (invented)"}
		if err := s.DB.AddExpert(ctx, &e, hash); err != nil {
			t.Fatal(err)
		}
		g.experts = append(g.experts, e)
		g.links[n] = s.URL + "/e/" + tok + "/"
	}
	// Two experts have answered everything, so the third sees a panel.
	answers := [][]workshop.Answer{
		{{Values: []float64{0.02, 0.06, 0.15}}, {Lowest: 0.05, Highest: 0.3, Best: 0.12, Confidence: 0.8}, {Counts: []int{2, 6, 7, 5, 2, 1, 1, 0}},
			{Values: []float64{1.5, 3, 6}}, {Values: []float64{0.1, 0.2, 0.35}}},
		{{Values: []float64{0.04, 0.09, 0.2}, Percent: true}, {Lowest: 0.1, Highest: 0.4, Best: 0.2, Confidence: 0.7}, {Counts: []int{0, 3, 8, 8, 3, 2, 0, 0}},
			{Values: []float64{2, 4, 8}}, {Values: []float64{0.12, 0.16, 0.22}}},
	}
	for i, as := range answers {
		for j, a := range as {
			rv := workshop.Revision{QuestionID: g.qs[j].ID, ExpertID: g.experts[i].ID, Answer: a, Reason: "From the district's own burst log (invented)."}
			if err := s.DB.SaveRevision(ctx, &rv); err != nil {
				t.Fatal(err)
			}
		}
	}
	return g
}

// carmensLink is the rig's expert Carmen's private link.
func (g *deviceRig) carmensLink() string { return g.links["Carmen Ruiz (invented)"] }

// carmensPage is the address of Carmen's own page of the rig's question
// i (from 0).
func (g *deviceRig) carmensPage(i int) string {
	return g.carmensLink() + "q/" + strconv.FormatInt(g.qs[i].ID, 10)
}

// carmenIn starts a browser with Carmen's own context in it, named for
// how she reaches the pages (on a phone, keyboard only, ...).
func carmenIn(t *testing.T, how string) *person {
	t.Helper()
	return startBrowser(t).person("Carmen (" + how + ")")
}

// twentieths are the edges of twenty equal bins over [0, 1].
func twentieths() []float64 {
	edges := make([]float64, 21)
	for i := range edges {
		edges[i] = float64(i) / 20
	}
	return edges
}

func (g *deviceRig) wsURL() string { return g.site.URL + "/w/" + strconv.FormatInt(g.ws.ID, 10) }

// fits checks the page at the person's current width: no sideways
// scroll of the page, on a phone no table of numbers under a picture
// scrolling sideways, and every visible picture keeps its labels and
// markers inside its box with text at 11 px or more.
func fits(t *testing.T, p *person, where string, width int64) {
	t.Helper()
	if sw := eval[int64](p, "page width", `document.documentElement.scrollWidth`); sw > width {
		wide := eval[[]string](p, "what is too wide", fmt.Sprintf(`Array.from(document.querySelectorAll("body *")).filter(e => e.getBoundingClientRect().right > %d + 0.5 && !e.closest(".table, .chart-table, .table-scroll, .map-scroll, .chart")).slice(-4).map(e => e.tagName + "." + e.className + " " + Math.round(e.getBoundingClientRect().right))`, width))
		t.Errorf("%s at %d px: the page scrolls sideways (%d px wide): %v", where, width, sw, wide)
	}
	// An expert's own history, and each expert's final judgement in the
	// report, are blocks of labelled lines on a phone: no cell reaches past
	// the screen's edge.
	if cut := eval[[]string](p, "own history's cells", fmt.Sprintf(`Array.from(document.querySelectorAll(".table-mine td, .table-fits td")).filter(e => e.getClientRects().length && e.getBoundingClientRect().right > %d + 0.5).slice(0, 3).map(e => e.textContent.trim())`, width)); len(cut) > 0 {
		t.Errorf("%s at %d px: a table's cells run past the screen: %q", where, width, cut)
	}
	// What the page's width skips above must be reachable in its own box:
	// every part of a table or picture in a box that scrolls lies within
	// the box's scrolling reach. A box that scrolls for its table
	// (.table-scroll, .map-scroll, the region a keyboard reaches) holds
	// all of it; on a phone the answer sheet's preview had a table that
	// scrolled inside such a box, which kept the screen's width, and the
	// columns past the edge were out of the box's reach.
	if out := eval[[]string](p, "scroll boxes' reach", `(() => {
		const out = [];
		for (const box of document.querySelectorAll(".table-scroll, .map-scroll, .table, .chart-table")) {
			if (!box.getClientRects().length) continue;
			const own = box.matches(".table-scroll, .map-scroll");
			if (!own && !["auto", "scroll"].includes(getComputedStyle(box).overflowX)) continue;
			const b = box.getBoundingClientRect(), reach = b.left + box.clientLeft - box.scrollLeft + box.scrollWidth + 1;
			const cut = Array.from(box.querySelectorAll("*")).filter(e => e.getClientRects().length && e.getBoundingClientRect().right > reach);
			if (cut.length) out.push((box.getAttribute("aria-label") || box.className) + ": " + (cut[cut.length - 1].textContent.trim().slice(0, 40) || cut[cut.length - 1].tagName) + " reaches " + Math.round(cut[cut.length - 1].getBoundingClientRect().right) + " px, the box scrolls to " + Math.round(reach) + " px");
		}
		return out;
	})()`); len(out) > 0 {
		t.Errorf("%s at %d px: content out of its scroll box's reach: %q", where, width, out)
	}
	// On a phone no table of numbers under a picture scrolls sideways:
	// its last column (a curve's 95% point) lay behind a scroll an
	// expert may never find.
	if width < 600 {
		for _, s := range chartTablesScrolling(p) {
			t.Errorf("%s at %d px: a table under a picture, %s", where, width, s)
		}
	}
	oneLineTimes(t, p, fmt.Sprintf("%s at %d px", where, width), false)
	// On a phone a history (the expert's own, and the one on the
	// facilitator's entry page) is a block of labelled lines per save: the
	// cells of a row stand one under another, not squeezed side by side.
	if width < 600 {
		if side := eval[int](p, "histories' rows", `Array.from(document.querySelectorAll("section.history tbody tr")).filter(r => new Set(Array.from(r.cells).filter(c => c.getClientRects().length).map(c => Math.round(c.getBoundingClientRect().left))).size > 1).length`); side > 0 {
			t.Errorf("%s at %d px: %d history rows lay their cells side by side", where, width, side)
		}
	}
	// A picture's key keeps each icon beside its words: the words after an
	// icon start to its right, level with it, not on the next line.
	if apart := eval[[]string](p, "key icons", `Array.from(document.querySelectorAll(".chart-key-icon")).filter(i => i.getClientRects().length).filter(i => {
		const w = document.createTreeWalker(i.closest(".chart-key"), NodeFilter.SHOW_TEXT);
		w.currentNode = i;
		let t = w.nextNode();
		while (t && !t.textContent.trim()) t = w.nextNode();
		if (!t) return false;
		const r = document.createRange(); r.selectNodeContents(t);
		const first = r.getClientRects()[0], all = r.getBoundingClientRect(), icon = i.getBoundingClientRect(), mid = (icon.top + icon.bottom) / 2;
		return !first || mid < all.top - 2 || mid > all.bottom + 2 || first.left < icon.right - 1;
	}).map(i => i.closest(".chart-key").textContent.trim().slice(0, 60))`); len(apart) > 0 {
		t.Errorf("%s at %d px: a key's icon is apart from its words: %q", where, width, apart)
	}
	// A link drawn as a button is one box: broken over two lines, its
	// border ran round each line's piece of it.
	if broken := eval[[]string](p, "buttons' boxes", `Array.from(document.querySelectorAll("a.button")).filter(a => a.getClientRects().length > 1).map(a => a.textContent.trim())`); len(broken) > 0 {
		t.Errorf("%s at %d px: a button broken over lines: %q", where, width, broken)
	}
	// Each value's label stands apart from the box above it, so that an
	// expert does not read it as that box's.
	if close := eval[[]string](p, "the answer form's spacing", `(() => {
		const out = [];
		const fields = Array.from(document.querySelectorAll(".answer-form > fieldset > .field, .answer-form > fieldset > .unit-choice")).filter(f => f.getClientRects().length);
		for (let i = 1; i < fields.length; i++) {
			const above = Array.from(fields[i-1].querySelectorAll("input, select")).pop();
			const label = fields[i].querySelector("label, legend");
			if (!above || !label) continue;
			const gap = label.getBoundingClientRect().top - above.getBoundingClientRect().bottom;
			if (gap < 9) out.push(label.textContent.trim() + " (" + gap.toFixed(1) + " px)");
		}
		// A refused save's "Nothing was saved" stands apart from the first
		// value's label under it, so that it does not read as that value's
		// own message.
		for (const sum of document.querySelectorAll(".answer-form .form-error-summary")) {
			const next = sum.nextElementSibling, label = next && next.querySelector("label, legend");
			if (!label || !sum.getClientRects().length || !label.getClientRects().length) continue;
			const gap = label.getBoundingClientRect().top - sum.getBoundingClientRect().bottom;
			if (gap < 9) out.push(label.textContent.trim() + " under “" + sum.textContent.trim() + "” (" + gap.toFixed(1) + " px)");
		}
		return out;
	})()`); len(close) > 0 {
		t.Errorf("%s at %d px: a label sits against the box above it: %q", where, width, close)
	}
	// The chips board: every button at least 24 px each way (WCAG 2.5.8),
	// every bin's range in at most two lines.
	if small := eval[[]string](p, "the chips board's targets", `(() => {
		const out = [];
		for (const b of document.querySelectorAll(".chips-add, .chips-take")) {
			const r = b.getBoundingClientRect();
			if (r.width && (r.width < 24 || r.height < 24)) out.push(b.getAttribute("aria-label") + " " + Math.round(r.width) + "×" + Math.round(r.height) + " px");
		}
		for (const l of document.querySelectorAll(".chips-range")) {
			const range = document.createRange();
			range.selectNodeContents(l);
			const lines = new Set(Array.from(range.getClientRects()).map(r => Math.round(r.top))).size;
			if (lines > 2) out.push("the range " + l.textContent + " in " + lines + " lines");
		}
		return out.slice(0, 4);
	})()`); len(small) > 0 {
		t.Errorf("%s at %d px: the chips board is too cramped to use: %q", where, width, small)
	}
	// On a phone what an expert taps on the answer form is at least 44 px
	// each way (a radio button through its label, which selects it).
	if width < 600 {
		if small := eval[[]string](p, "the answer form's targets", `Array.from(document.querySelectorAll(".answer-form input:not([type=hidden]):not([type=radio]), .answer-form select, .answer-form button, .answer-form .field-check label, .banner-saved .button")).filter(e => e.getClientRects().length).filter(e => { const r = e.getBoundingClientRect(); return r.width < 43.5 || r.height < 43.5; }).slice(0, 6).map(e => (e.getAttribute("aria-label") || e.textContent.trim() || e.name || e.tagName).slice(0, 40) + " " + Math.round(e.getBoundingClientRect().width) + "×" + Math.round(e.getBoundingClientRect().height) + " px")`); len(small) > 0 {
			t.Errorf("%s at %d px: targets on the answer form under 44 px: %q", where, width, small)
		}
	}
	problems := eval[[]string](p, "pictures' boxes", `(() => {
		const out = [];
		for (const svg of document.querySelectorAll("svg.chart-svg")) {
			if (!svg.getClientRects().length || getComputedStyle(svg).display === "none") continue;
			if (svg.closest(".map-scroll, .chart-weight-map, .chart-steadiness")) continue; // drawn wide, scrolled inside
			const vb = svg.viewBox.baseVal;
			const scale = svg.getBoundingClientRect().width / vb.width;
			for (const el of svg.querySelectorAll("text, circle")) {
				if (el.closest("title, desc")) continue;
				let b;
				try { b = el.getBBox(); } catch (e) { continue; }
				if (b.width === 0 && b.height === 0) continue;
				const m = el.transform && el.transform.baseVal.consolidate();
				if (m) continue; // rotated titles sit in the margin by construction
				if (b.x < vb.x - 1 || b.y < vb.y - 1 || b.x + b.width > vb.x + vb.width + 1 || b.y + b.height > vb.y + vb.height + 1) {
					out.push("outside its box: " + (el.textContent || el.getAttribute("class")) + " at " + Math.round(b.x) + "," + Math.round(b.y) + " in " + vb.width + "×" + vb.height);
				}
				if (el.tagName === "text") {
					const px = parseFloat(getComputedStyle(el).fontSize) * scale;
					if (px < 10.95) out.push("text at " + px.toFixed(1) + " px: " + el.textContent);
				}
			}
		}
		return out.slice(0, 8);
	})()`)
	for _, pr := range problems {
		t.Errorf("%s at %d px: %s", where, width, pr)
	}
}

// axeSource is axe-core, installed by .ci/run with npm from
// e2e/axe/package.json (pinned).
func axeSource(t *testing.T) string {
	t.Helper()
	_, file, _, _ := runtime.Caller(0)
	b, err := os.ReadFile(filepath.Join(filepath.Dir(file), "axe", "node_modules", "axe-core", "axe.min.js"))
	if err != nil {
		t.Skipf("SKIPPING ACCESSIBILITY CHECKS: axe-core is not installed (%v). Run `npm ci --prefix e2e/axe`; .ci/run does.", err)
	}
	return string(b)
}

// axeTimeout bounds injecting and running axe-core, heavier than a
// person's step: CI failed once at stepTimeout while other tests loaded
// both cores.
const axeTimeout = time.Minute

// accessible runs axe-core on the page and fails on every serious or
// critical violation.
func accessible(t *testing.T, p *person, axe, where string) {
	t.Helper()
	if !eval[bool](p, "axe present", `typeof window.axe === "object"`) {
		evalWithin[bool](p, "inject axe", axe+";true", axeTimeout)
	}
	found := evalWithin[[]string](p, "run axe", `axe.run(document, {resultTypes: ["violations"]}).then(r => r.violations
		.filter(v => v.impact === "serious" || v.impact === "critical")
		.map(v => v.impact + " " + v.id + ": " + v.help + " — " + v.nodes.slice(0, 3).map(n => n.target.join(" ")).join(" | ")))`, axeTimeout)
	for _, f := range found {
		t.Errorf("%s: %s", where, f)
	}
}

// TestEveryPageOnAPhone opens every expert page, in round 1 and round 2,
// and the facilitator's pages, at 360, 390 and 414 px and at 1366 px:
// none scrolls sideways, no picture cuts a label or marker or draws text
// under 11 px, and axe-core finds no serious or critical violation.
func TestEveryPageOnAPhone(t *testing.T) {
	g := newDeviceRig(t)
	axe := axeSource(t)
	shots := newScreenshots(t)
	// About thirty pages at four widths, each checked for layout and
	// twice by axe-core: some 90 s on an idle machine, and up to three
	// times that beside the other packages' tests under -race.
	br := startBrowserFor(t, 2*browserTimeout)
	fac := br.person("facilitator")
	signIn(t, g.site, fac)
	carmen := br.person("Carmen (on a phone)")
	link := g.carmensLink()
	qURL := func(i int) string { return link + "q/" + strconv.FormatInt(g.qs[i].ID, 10) }

	expertPages := func(state string) map[string]string {
		m := map[string]string{"home": link}
		for i, q := range g.qs {
			m[fmt.Sprintf("Q%d %s", i+1, q.Format)] = qURL(i)
		}
		return m
	}
	check := func(p *person, name, url string, widths []int64, axeToo bool) {
		for _, w := range widths {
			p.viewport(w, 844, w < 600)
			if st := p.open(url); st != http.StatusOK {
				t.Errorf("%s: status %d", name, st)
				continue
			}
			fits(t, p, name, w)
			if axeToo && (w == 390 || w == 1366) {
				accessible(t, p, axe, fmt.Sprintf("%s at %d px", name, w))
			}
			if w == 390 {
				shots.take(p, "device-"+strings.NewReplacer(" ", "-", "/", "-").Replace(name)+"-390")
			}
		}
	}
	widths := append(append([]int64{}, phoneWidths...), 1366)

	// Round 1: Carmen answers each format on her phone.
	for name, url := range expertPages("round 1") {
		check(carmen, "expert round 1 "+name, url, widths, true)
	}
	// A first answer typed in percentages, read back as such.
	carmen.viewport(390, 844, true)
	carmen.open(qURL(0))
	carmen.do("choose percentages", chromedp.Click(chromedp.CSS(`#f-unit-percent`)))
	typeValues(carmen, "3", "7", "16")
	carmen.waitFor("the read-back in percentages", `document.getElementById("preview").innerText.includes("Read as 0.03 (3%), 0.07 (7%) and 0.16 (16%).")`)
	saveAnswer(t, carmen)
	carmen.sees("saved in percentages", "5% chance below 3%; 50% below 7%; 95% below 16%", "Next: Question 2")
	// The confidence as a fraction is refused with help; as a percentage it is taken.
	carmen.open(qURL(1))
	for _, f := range [][2]string{{"lowest", "0.08"}, {"highest", "0.35"}, {"best", "0.15"}, {"confidence", "0.8"}} {
		carmen.fill(`form.answer-form`, f[0], f[1])
	}
	if st := carmen.load("save a fractional confidence", chromedp.Click(chromedp.CSS(`form.answer-form button[formaction$="/save"]`))); st != http.StatusUnprocessableEntity {
		t.Errorf("a confidence of 0.8: status %d, want 422", st)
	}
	carmen.sees("confidence refused", "did you mean 80%?")
	carmen.fill(`form.answer-form`, "confidence", "80%")
	saveAnswer(t, carmen)
	// Every broken field is marked at once.
	carmen.open(qURL(3))
	typeValues(carmen, "9", "4", "40")
	if st := carmen.load("save a judgement with two broken fields", chromedp.Click(chromedp.CSS(`form.answer-form button[formaction$="/save"]`))); st != http.StatusUnprocessableEntity {
		t.Errorf("two broken fields: status %d", st)
	}
	if n := carmen.count(`.field-invalid .field-error`); n != 2 {
		t.Errorf("%d fields marked, want both broken ones (decreasing, and above 30 days)", n)
	}

	// Chips by tapping and by keyboard, fitted as the plain form fits them.
	carmen.open(qURL(2))
	carmen.waitFor("the chips board", `!document.querySelector(".chips-board").hidden`)
	tap := func(bin int, times int) {
		for k := 0; k < times; k++ {
			carmen.do("tap bin", chromedp.Click(chromedp.CSS(fmt.Sprintf(".chips-bin:nth-child(%d) .chips-add", bin+1))))
		}
	}
	tap(1, 3)
	tap(2, 6)
	carmen.do("focus bin 4", chromedp.Focus(chromedp.CSS(`.chips-bin:nth-child(4)`)))
	for k := 0; k < 5; k++ {
		carmen.do("place by keyboard", chromedp.KeyEvent(kb.ArrowUp))
	}
	carmen.do("move left by keyboard", chromedp.KeyEvent(kb.ArrowLeft))
	carmen.do("place one more", chromedp.KeyEvent("+"))
	carmen.do("take one away", chromedp.KeyEvent("-"))
	carmen.do("and the first bin by a tap on its stack", chromedp.Click(chromedp.CSS(`.chips-bin:nth-child(1) .chips-stack`)))
	if s := carmen.text(); !strings.Contains(s, "15 of 24 chips placed, 9 left") {
		t.Errorf("the board's count is wrong:\n%s", clip(s, 1500))
	}
	announced := eval[string](carmen, "the announcement", `document.querySelector(".chips-status").textContent`)
	if !strings.Contains(announced, "left to place") {
		t.Errorf("the board announces %q", announced)
	}
	fits(t, carmen, "chips board", 390)
	shots.take(carmen, "device-chips-board-390")
	for k := 0; k < 9; k++ {
		tap(4, 1)
	}
	saveAnswer(t, carmen)
	revs, _ := g.site.DB.Revisions(context.Background(), g.ws.ID)
	chipsRev := revs[len(revs)-1]
	want := []int{1, 3, 6, 5, 9, 0, 0, 0}
	if fmt.Sprint(chipsRev.Answer.Counts) != fmt.Sprint(want) {
		t.Fatalf("the board saved %v, want %v", chipsRev.Answer.Counts, want)
	}
	plain, err := g.qs[2].Fit(workshop.Answer{Counts: want})
	if err != nil {
		t.Fatal(err)
	}
	carmen.sees("the board's fit", fmt.Sprintf("Beta(α = %s", fmtFour(plain.Dist.Alpha)))
	// Its words say what her chips put below each edge: she typed no
	// chances.
	carmen.sees("the board's fit in the chips' words", "your chips put 4.17% below", "your chips below each edge")
	shots.part(carmen, "#preview", "device-chips-fit-390")

	// Facilitator pages in round 1.
	facPages := map[string]string{
		"workshops":    g.site.URL + "/",
		"overview":     g.wsURL(),
		"panel Q1":     g.wsURL() + "/q/" + strconv.FormatInt(g.qs[0].ID, 10),
		"panel chips":  g.wsURL() + "/q/" + strconv.FormatInt(g.qs[2].ID, 10),
		"calibration":  g.wsURL() + "/calibration",
		"log":          g.wsURL() + "/log",
		"report":       g.wsURL() + "/report",
		"new question": g.wsURL() + "/questions/new",
		"correct Q2":   g.wsURL() + "/q/" + strconv.FormatInt(g.qs[1].ID, 10) + "/edit",
		"entry":        g.wsURL() + "/q/" + strconv.FormatInt(g.qs[0].ID, 10) + "/enter/" + strconv.FormatInt(g.experts[2].ID, 10),
		"sheet":        g.wsURL() + "/answers/import",
		"expert view":  g.wsURL() + "/experts/" + strconv.FormatInt(g.experts[0].ID, 10),
		"study Q1":     g.wsURL() + "/q/" + strconv.FormatInt(g.qs[0].ID, 10) + "/study?trials=60&threshold=0.1&confidence=0.9",
		"study days":   g.wsURL() + "/q/" + strconv.FormatInt(g.qs[3].ID, 10) + "/study",
		"quick priors": g.wsURL() + "/quick-priors?construction=interval&c_low=1&c_high=8&c_coverage=0.9&question=" + strconv.FormatInt(g.qs[3].ID, 10),
	}
	for name, url := range facPages {
		check(fac, "facilitator "+name, url, widths, true)
	}

	// Round 2: the panel on the phone.
	fac.viewport(1366, 900, false)
	fac.open(g.wsURL())
	fac.fill(`#rounds form`, "reason", "Round 1 discussed (invented).")
	fac.load("close round 1", chromedp.Click(chromedp.CSS(`#rounds form button[type=submit]`)))
	check(carmen, "expert round 1 closed, Q1", qURL(0), []int64{390}, true)
	check(fac, "room view, round 1 closed", g.wsURL()+"/q/"+strconv.FormatInt(g.qs[0].ID, 10)+"/room", []int64{390, 1366}, true)
	check(fac, "room view's reasons display, round 1 closed", g.wsURL()+"/q/"+strconv.FormatInt(g.qs[0].ID, 10)+"/room?show=reasons", []int64{390, 1366}, true)
	// The record fingerprint at round 1's close, on the log and the room view.
	check(fac, "facilitator log, round 1 closed", facPages["log"], []int64{390, 1366}, true)
	fac.viewport(1366, 900, false)
	for name, url := range map[string]string{"log": facPages["log"], "room": g.wsURL() + "/q/" + strconv.FormatInt(g.qs[0].ID, 10) + "/room"} {
		fac.open(url)
		fac.sees(name+" after round 1 closed", "Record fingerprint after round 1 closed:")
		shots.take(fac, "device-fingerprint-"+name+"-round-1-closed-1366")
	}
	fac.viewport(1366, 900, false)
	fac.open(g.wsURL())
	fac.fill(`#rounds form`, "reason", "A second round (invented).")
	fac.load("open round 2", chromedp.Click(chromedp.CSS(`#rounds form button[type=submit]`)))
	for name, url := range expertPages("round 2") {
		check(carmen, "expert round 2 "+name, url, widths, true)
	}
	carmen.viewport(390, 844, true)
	carmen.open(qURL(0))
	carmen.sees("round 2 feedback on a phone", "What the other experts said", "Their reasons", "From the district's own burst log (invented).")
	shots.take(carmen, "device-expert-round2-Q1-390")
	// The same page on a laptop: her fit with its words, and the panel
	// under it in the same words.
	carmen.viewport(1366, 900, false)
	carmen.open(qURL(0))
	shots.take(carmen, "device-expert-round2-Q1-1366")
	check(fac, "facilitator panel, round 2", facPages["panel Q1"], []int64{390, 1366}, true)
}

// TestKeyboardAndCrowdedChips walks the expert's pages by keyboard alone
// at 390 and 1366 px, and the facilitator's overview, checking each focus
// ring (focusSeen); and answers a question of twenty bins, the most a
// question may have, on the narrowest phone. It takes the expert's pages
// at 1366 px for review too.
func TestKeyboardAndCrowdedChips(t *testing.T) {
	g := newDeviceRig(t)
	q := workshop.Question{WorkshopID: g.ws.ID, Wording: "Where does the proportion of hydrants that leak at the spindle lie? Place your chips.",
		Quantity: "leaking-hydrant proportion", Lower: 0, Upper: 1, Format: workshop.FormatChips, BinEdges: twentieths(), Chips: 40}
	if err := g.site.DB.AddQuestion(context.Background(), &q); err != nil {
		t.Fatal(err)
	}
	shots := newScreenshots(t)
	br := startBrowser(t)
	carmen := br.person("Carmen (on a phone)")
	link := g.carmensLink()
	qURL := func(i int) string { return link + "q/" + strconv.FormatInt(g.qs[i].ID, 10) }
	crowded := link + "q/" + strconv.FormatInt(q.ID, 10)

	// By keyboard alone, every control shows its focus, on the phone and
	// on a laptop, in each format.
	for _, w := range []int64{390, 1366} {
		carmen.viewport(w, 844, w < 600)
		for _, i := range []int{0, 1, 2} {
			carmen.open(qURL(i))
			focusSeen(t, carmen, fmt.Sprintf("expert Q%d by keyboard at %d px", i+1, w))
		}
	}
	// The reason's count of characters left describes the box and is
	// announced only near the limit, not at every keystroke.
	carmen.viewport(390, 844, true)
	carmen.open(qURL(0))
	carmen.do("type a reason", chromedp.SendKeys(chromedp.CSS("#f-reason"), "abc"))
	count := func() []string {
		return eval[[]string](carmen, "the reason's count", `(() => {
			const ta = document.getElementById("f-reason"), note = document.getElementById("f-reason-count");
			const live = Array.from(document.querySelectorAll("[aria-live]")).filter(e => e.closest(".field") === ta.closest(".field")).map(e => e.id + ":" + e.textContent.trim());
			return [String((ta.getAttribute("aria-describedby") || "").split(" ").includes("f-reason-count")), note.textContent, live.join(" | ")];
		})()`)
	}
	if got := count(); got[0] != "true" || got[1] != "3997 of 4000 characters left" || got[2] != ":" {
		t.Errorf("after three letters the count reads %q, described %s, and tells a screen reader %q (want nothing)", got[1], got[0], got[2])
	}
	eval[bool](carmen, "a long reason", `(() => { const ta = document.getElementById("f-reason"); ta.value = "x".repeat(3700); ta.dispatchEvent(new Event("input", {bubbles: true})); return true; })()`)
	if got := count(); got[2] != ":300 of 4000 characters left." {
		t.Errorf("near the limit a screen reader is told %q, want 300 of 4000 left", got[2])
	}
	// A paste past the limit is kept whole (a maxlength cut it without a
	// word) and the count says how far over it is; a character outside
	// the Basic Multilingual Plane counts once, as the server counts it.
	kept := eval[int](carmen, "a reason past the limit", `(() => { const ta = document.getElementById("f-reason"); ta.value = "x".repeat(4098) + "😀\n"; ta.dispatchEvent(new Event("input", {bubbles: true})); return ta.value.length; })()`)
	if got := count(); kept != 4101 || got[1] != "100 characters over the limit of 4000: please shorten it before saving" || got[2] != ":Over the limit of 4000 characters: please shorten it before saving." {
		t.Errorf("a reason 100 characters over: the box keeps %d UTF-16 units (want 4101), the count reads %q and tells a screen reader %q", kept, got[1], got[2])
	}
	if over := eval[bool](carmen, "the count marked over", `document.getElementById("f-reason-count").classList.contains("text-count-over")`); !over {
		t.Error("a count over the limit is not marked")
	}
	shots.take(carmen, "device-expert-reason-over-390")

	carmen.viewport(1366, 900, false)
	carmen.open(link)
	shots.take(carmen, "device-expert-home-1366")
	for i := range g.qs {
		carmen.open(qURL(i))
		shots.take(carmen, fmt.Sprintf("device-expert-Q%d-%s-1366", i+1, g.qs[i].Format))
	}

	// Twenty bins on the narrowest phone: the board turns on its side, a
	// row per bin, placed by tap and by keyboard.
	carmen.viewport(360, 780, true)
	carmen.open(crowded)
	carmen.waitFor("the chips board on its side", `document.querySelector(".chips-board.chips-rows") !== null`)
	carmen.do("tap the last bin twice", chromedp.Click(chromedp.CSS(`.chips-bin:nth-child(20) .chips-add`)), chromedp.Click(chromedp.CSS(`.chips-bin:nth-child(20) .chips-add`)))
	carmen.do("focus the first bin", chromedp.Focus(chromedp.CSS(`.chips-bin:nth-child(1)`)))
	carmen.do("to the last bin and one more chip", chromedp.KeyEvent(kb.End), chromedp.KeyEvent(kb.ArrowUp))
	if v := carmen.value(`#f-counts-19`); v != "3" {
		t.Errorf("twenty bins on a phone: the last bin holds %q after two taps and a key, want 3", v)
	}
	fits(t, carmen, "twenty bins on a phone", 360)
	shots.take(carmen, "device-chips-twenty-bins-360")
	// Every chip in one bin still shows, inside its bin: forty in a row
	// of the board on its side (at 360 and 1366 px), and all 24 of the
	// eight-bin board in an upright column.
	allInOne := func(url string, bin, chips int, widths ...int64) {
		carmen.open(url)
		eval[bool](carmen, "place every chip in one bin", fmt.Sprintf(`(() => { for (let i = 0; i < 60; i++) document.querySelector(".chips-bin:nth-child(%d) .chips-add").click(); return true; })()`, bin))
		for _, w := range widths {
			carmen.viewport(w, 844, w < 600)
			sel := fmt.Sprintf(".chips-bin:nth-child(%d) .chips-stack", bin)
			outside := eval[int](carmen, "chips outside their bin", fmt.Sprintf(`(() => {
				const stack = document.querySelector(%q), s = stack.getBoundingClientRect();
				return Array.from(stack.querySelectorAll(".chip")).filter(c => { const r = c.getBoundingClientRect(); return r.right > s.right + 0.5 || r.top < s.top - 0.5 || r.width < 1 || r.height < 1; }).length;
			})()`, sel))
			if drawn := carmen.count(sel + " .chip"); outside > 0 || drawn != chips {
				t.Errorf("%d chips in one bin at %d px: %d drawn, %d of them outside the bin", chips, w, drawn, outside)
			}
		}
	}
	allInOne(crowded, 20, 40, 360, 1366)
	allInOne(qURL(2), 1, workshop.DefaultChips, 1366)

	fac := br.person("facilitator")
	signIn(t, g.site, fac)
	fac.viewport(1366, 900, false)
	fac.open(g.wsURL())
	focusSeen(t, fac, "facilitator overview by keyboard")
}

// fmtFour writes x as the pages do, four significant figures.
func fmtFour(x float64) string { return chart.FormatValue(x) }

// focusSeen walks the page by the keyboard alone, from its top, and
// checks that every control Tab reaches shows a focus ring (WCAG 2.4.7)
// of at least 2 px whose colour stands at 3:1 or more against what lies
// just outside it (1.4.11). It returns the controls in the order reached.
// The skip link is left out: it is itself what appears on focus, a white
// box with its own border, over the masthead.
func focusSeen(t *testing.T, p *person, where string) []string {
	t.Helper()
	eval[bool](p, "start from the top", `document.activeElement && document.activeElement.blur(); window.scrollTo(0, 0); true`)
	var order []string
	seen := map[string]bool{}
	for range 60 {
		p.do("press Tab", chromedp.KeyEvent(kb.Tab))
		got := eval[[]string](p, "the focused control", `(() => {
			const el = document.activeElement;
			if (!el || el === document.body) return [];
			const name = (el.tagName.toLowerCase() + (el.id ? "#" + el.id : "") + " " + (el.getAttribute("aria-label") || el.textContent || el.value || "").trim().slice(0, 30)).trim();
			const key = name + "@" + Math.round(el.getBoundingClientRect().top + scrollY) + "," + Math.round(el.getBoundingClientRect().left);
			if (el.classList.contains("skip-link")) return [key, name, ""];
			const cs = getComputedStyle(el);
			const w = cs.outlineStyle === "none" ? 0 : parseFloat(cs.outlineWidth) || 0;
			if (w < 2) return [key, name, "no focus ring (outline " + cs.outlineStyle + " " + cs.outlineWidth + ")"];
			const rgb = c => (c.match(/[\d.]+/g) || []).map(Number);
			const lum = c => { const v = rgb(c).slice(0, 3).map(x => { x /= 255; return x <= 0.03928 ? x / 12.92 : Math.pow((x + 0.055) / 1.055, 2.4); }); return 0.2126 * v[0] + 0.7152 * v[1] + 0.0722 * v[2]; };
			const r = el.getBoundingClientRect();
			const off = parseFloat(cs.outlineOffset) || 0;
			// What lies just outside the ring, at the middle of its left edge
			// (inside the element for a ring drawn inside it).
			let x = r.left - off - w - 1, y = r.top + r.height / 2;
			if (off < 0) x = r.left - off + 1;
			let under = null;
			for (const e of document.elementsFromPoint(Math.max(0, x), y)) {
				if (off >= 0 && (e === el || el.contains(e))) continue;
				under = e; break;
			}
			let bg = "rgb(255, 255, 255)";
			for (let e = under; e; e = e.parentElement) {
				const c = getComputedStyle(e).backgroundColor;
				const a = rgb(c)[3];
				if (c !== "transparent" && a !== 0) { bg = c; break; }
			}
			const a = lum(cs.outlineColor), b = lum(bg);
			const ratio = (Math.max(a, b) + 0.05) / (Math.min(a, b) + 0.05);
			return [key, name, ratio < 3 ? "focus ring " + cs.outlineColor + " on " + bg + ": contrast " + ratio.toFixed(2) + ":1" : ""];
		})()`)
		if len(got) == 0 || seen[got[0]] {
			break
		}
		seen[got[0]] = true
		order = append(order, got[1])
		if got[2] != "" {
			t.Errorf("%s: %s: %s", where, got[1], got[2])
		}
	}
	if len(order) < 3 {
		t.Errorf("%s: the keyboard reached only %q", where, order)
	}
	return order
}

package e2e

import (
	"fmt"
	"net/http"
	"regexp"
	"sort"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
	"github.com/chromedp/chromedp/kb"

	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/web"
)

// liveWithin is the bound: a facilitator's page shows a change
// within two seconds of it.
const liveWithin = 2 * time.Second

// TestRoomAndLiveInBrowser runs the invented demo as a facilitator would
// with a projector: the overview follows an expert's save without a
// reload; round 1 closes; the room view of each question shows the
// anonymised panel (no names, no weights, no hidden true value) under
// the labels the experts then see in round 2, moves between questions by
// keyboard, and follows round-2 saves live.
func TestRoomAndLiveInBrowser(t *testing.T) {
	site, d := startDemo(t)
	links, qs, experts, wsURL := d.links, d.qs, d.experts, d.url+"/"
	if len(links) != 4 {
		t.Fatalf("seed demo: %d links, want 4", len(links))
	}
	shots := newScreenshots(t)
	br := startBrowser(t)
	fac := br.person("facilitator")
	signIn(t, site, fac)

	// The overview follows an expert's save without a reload. In the demo
	// Priya has not answered question 1.
	fac.viewport(1366, 900, false)
	fac.open(wsURL)
	fac.liveConnected("the live stream to connect")
	cell := `(() => { const row = Array.from(document.querySelectorAll("#answered tbody tr")).find(r => r.innerText.startsWith("Priya Raman")); return row ? row.cells[1].innerText : "<no row>"; })()`
	if got := eval[string](fac, "Priya's cell before", cell); got != "no answer yet" {
		t.Fatalf("Priya's question-1 cell reads %q before her save", got)
	}
	// Question 1's panel, open in a second tab, lists the reasons the
	// facilitator may withhold before round 2 shows them.
	panel := fac.tab("question 1's panel")
	panel.viewport(1366, 900, false)
	panel.open(wsURL + "q/" + strconv.FormatInt(qs[0].ID, 10))
	panel.liveConnected("the panel's live stream")
	const priyasReason = "Supplier audits found two line faults (invented)."
	withholdable := `Array.from(document.querySelectorAll("#reasons li")).some(li => li.innerText.includes(` + strconv.Quote(priyasReason) + `) && li.querySelector("form button"))`
	if eval[bool](panel, "Priya's reason before her save", withholdable) {
		t.Fatalf("the panel lists Priya's reason before she gave it")
	}
	priya := br.person("Priya Raman")
	openQuestion(t, priya, site.URL+linkOf(t, links, "Priya Raman"), 1)
	typeValues(priya, "0.02", "0.05", "0.12")
	priya.fill(`form.answer-form`, "reason", priyasReason)
	saveAnswer(t, priya)
	saved := time.Now()
	if err := fac.poll(liveWithin, cell+` === "answered (1 save)"`); err != nil {
		t.Fatalf("the overview did not show Priya's save within %v: %v (cell reads %q)", liveWithin, err, eval[string](fac, "cell", cell))
	}
	t.Logf("the overview showed the save %v after it", time.Since(saved).Round(time.Millisecond))
	shots.take(fac, "room-01-live-overview-1366")
	// The reason arrives on the panel, with its Withhold button, without
	// a reload: the facilitator can keep it from the feedback at once.
	if err := panel.poll(liveWithin, withholdable); err != nil {
		t.Errorf("question 1's panel did not list Priya's new reason to withhold within %v: %v", liveWithin, err)
	}
	shots.take(panel, "room-01b-live-panel-reasons-1366")

	// A typo in question 1's wording is corrected along the way: its
	// answers keep their meaning, so only the text may change, and the
	// decision log keeps the old wording.
	fac.open(wsURL + "q/" + strconv.FormatInt(qs[0].ID, 10) + "/edit")
	fac.sees("correction form", "Correct question 1", "so its bounds, format")
	fac.fill(`form[action$="/edit"]`, "wording", "Of the HX-40 inverters installed next spring, what proportion will need a replacement or a main-board repair within 12 months? (Invented.)")
	fac.fill(`form[action$="/edit"]`, "reason", "Clearer wording after a question from the panel (invented).")
	if st := fac.load("save the correction", chromedp.Click(chromedp.CSS(`form[action$="/edit"] button[type=submit]`))); st != http.StatusOK {
		t.Fatalf("correction: %d", st)
	}
	fac.sees("panel after the correction", "will need a replacement or a main-board repair within 12 months")
	fac.open(wsURL + "log")
	fac.sees("decision log", "Question corrected", "Clearer wording after a question from the panel (invented).", "(need a replacement or a main-board repair)")
	fac.open(wsURL)

	// Close round 1: the room now shows the panel as it closed.
	fac.fill(`#rounds form`, "reason", "Discussion of round 1 (invented).")
	if st := fac.load("close round 1", chromedp.Click(chromedp.CSS(`#rounds form button[type=submit]`))); st != http.StatusOK {
		t.Fatalf("close round 1: %d", st)
	}
	// The projector is the facilitator's second window: the same session.
	room := fac.tab("projector")
	room.viewport(1920, 1080, false)
	q1 := qs[0]
	roomURL := func(q workshop.Question) string {
		return wsURL + "q/" + strconv.FormatInt(q.ID, 10) + "/room"
	}
	if st := room.open(roomURL(q1)); st != http.StatusOK {
		t.Fatalf("room view: %d", st)
	}
	room.sees("room view of question 1", "Q1:", "will need a replacement or a main-board repair within 12 months", "as round 1 closed", "Where the medians lie", "Expert A", "Expert B", "Expert C", "Expert D",
		"Supplier audits found two line faults (invented).")
	noLeaks(t, room, experts, qs)
	// Nothing on the room view leaves it: its only links are room
	// views, its neighbours' and its own reasons and prior displays'.
	hrefs := eval[[]string](room, "the room's links", `Array.from(document.querySelectorAll("a[href]")).map(a => a.getAttribute("href"))`)
	for _, h := range hrefs {
		if !regexp.MustCompile(`/q/\d+/room(\?show=reasons(&page=\d+)?|\?show=prior)?$`).MatchString(h) && !strings.HasPrefix(h, "#") {
			t.Errorf("the room view links out of itself: %q", h)
		}
	}
	if n := room.count(`form`); n != 0 {
		t.Errorf("the room view carries %d forms", n)
	}
	// A line through the medians strip does not cut an expert's letter:
	// each letter stands on a white halo drawn under it.
	if halo := eval[string](room, "a letter's halo", `(() => {
		const l = document.querySelector(".chart-medians .chart-wide .median-label");
		if (!l) return "no letter";
		const s = getComputedStyle(l);
		return s.paintOrder + " " + s.stroke + " " + s.strokeWidth;
	})()`); !strings.HasPrefix(halo, "stroke") || !strings.Contains(halo, "rgb(255, 255, 255)") {
		t.Errorf("the medians strip's letters have no halo: %q", halo)
	}
	// projector checks the room view as it stands at w×h: it fits the
	// screen, its notes are set in at least notes px, its picture's tick
	// labels in tick px and the medians' strip in strip px, Priya's reason
	// stands beside it; shot names the screenshot.
	projector := func(w, h int, notes, tick, strip float64, shot string) {
		t.Helper()
		screen := fmt.Sprintf("%d×%d", w, h)
		fitsScreen(t, room, w, h)
		notesReadable(t, room, screen, notes)
		pictureFills(t, room, screen, tick, strip)
		reasonsBeside(t, room, screen, priyasReason)
		shots.take(room, shot)
	}
	projector(1920, 1080, 17, 14, 17, "room-02-question-1-1920x1080")
	roomLabels := curveMedians(t, room)
	// An older projector: 1366×768. The picture's notes (the axis zoomed
	// in, a density cut at the top) were its 12-unit small print, under
	// 10 px here.
	room.viewport(1366, 768, false)
	room.open(roomURL(q1))
	projector(1366, 768, 16, 14, 16, "room-02b-question-1-1366x768")
	// A 1280×720 projector, the smallest in common use: the wording takes
	// three lines and the notes wrap, and the view still fits. The
	// picture's width sets its size here: with 5/8 of the width its tick
	// labels were 13.7 px; with 16/25 they reach 14, the median strip's
	// staying at 15.
	room.viewport(1280, 720, false)
	room.open(roomURL(q1))
	projector(1280, 720, 16, 14, 15, "room-02c-question-1-1280x720")
	// The facilitator looking at the room view on a phone: the page flows
	// in one column and scrolls, and no part is drawn over another (held
	// to the screen's height, the picture, the notes and the medians'
	// strip overlapped).
	room.viewport(390, 844, true)
	room.open(roomURL(q1))
	fits(t, room, "the room view on a phone", 390)
	if over := overlappingParts(room); len(over) > 0 {
		t.Errorf("the room view on a phone draws parts over one another: %q", over)
	}
	if m := measurePicture(t, room); m.UnderTitle > 20 {
		t.Errorf("on a phone %.0f px stand empty under the room's picture's axis title, before its legend", m.UnderTitle)
	}
	shots.take(room, "room-02d-question-1-390")
	room.viewport(1920, 1080, false)
	room.open(roomURL(q1))

	// Keys move between the questions' room views.
	room.do("press the right arrow", chromedp.KeyEvent(kb.ArrowRight))
	room.waitFor("question 2's room view", fmt.Sprintf(`location.pathname.endsWith("/q/%d/room") && document.readyState === "complete"`, qs[1].ID))
	room.sees("room view of question 2", "Q2:")
	noLeaks(t, room, experts, qs)
	shots.take(room, "room-03-question-2-1920x1080")
	room.do("press Page Up", chromedp.KeyEvent(kb.PageUp))
	room.waitFor("back to question 1", fmt.Sprintf(`location.pathname.endsWith("/q/%d/room") && document.readyState === "complete"`, q1.ID))

	// Round 2: each expert's feedback uses the room's labels for the
	// others, and leaves out their own.
	fac.open(wsURL)
	fac.fill(`#rounds form`, "reason", "The panel discussed the spread (invented).")
	if st := fac.load("open round 2", chromedp.Click(chromedp.CSS(`#rounds form button[type=submit]`))); st != http.StatusOK {
		t.Fatalf("open round 2: %d", st)
	}
	for _, l := range links {
		ex := br.person(l.Name)
		openQuestion(t, ex, site.URL+l.Path, 1)
		mine := curveMedians(t, ex)
		missing := 0
		for label, med := range roomLabels {
			got, ok := mine[label]
			if !ok {
				missing++
				continue
			}
			if got != med {
				t.Errorf("%s's round-2 page shows %s with median %s; the room shows %s", l.Name, label, got, med)
			}
		}
		if missing != 1 || len(mine) != len(roomLabels)-1+1 { // the others, and "You"
			t.Errorf("%s's page labels %v; the room labels %v: want every label but their own", l.Name, keys(mine), keys(roomLabels))
		}
	}

	// The room follows round-2 saves live.
	room.open(roomURL(q1))
	room.liveConnected("the room's stream")
	room.sees("round 2 room", "No expert has revised this question in round 2 yet.")
	ines := br.person("Ines Varga again")
	openQuestion(t, ines, site.URL+linkOf(t, links, "Ines Varga"), 1)
	typeValues(ines, "0.02", "0.045", "0.1")
	saveAnswer(t, ines)
	if err := room.poll(liveWithin, `document.body.innerText.includes("1 of 4 experts has revised this question in round 2 so far.")`); err != nil {
		t.Fatalf("the room did not show the round-2 save within %v: %v", liveWithin, err)
	}
	// The panel itself stays as round 1 closed, as the experts see it.
	if again := curveMedians(t, room); fmt.Sprint(again) != fmt.Sprint(roomLabels) {
		t.Errorf("a round-2 save changed the room's round-1 panel: %v → %v", roomLabels, again)
	}
	noLeaks(t, room, experts, qs)
}

func linkOf(t *testing.T, links []web.DemoLink, name string) string {
	t.Helper()
	for _, l := range links {
		if l.Name == name {
			return l.Path
		}
	}
	t.Fatalf("no demo link for %s", name)
	return ""
}

// noLeaks fails when the room view's page (text and markup) names an
// expert, shows a weight, or a true value not yet revealed.
func noLeaks(t *testing.T, p *person, experts []workshop.Expert, qs []workshop.Question) {
	t.Helper()
	html := eval[string](p, "the page's markup", `document.documentElement.outerHTML`)
	text := p.text()
	for _, e := range experts {
		for _, part := range strings.Fields(e.Name) {
			if strings.Contains(html, part) {
				t.Errorf("%s: the room view names %q (of %s)", p.url(), part, e.Name)
			}
		}
	}
	// The experts' own "Equal-weight pool" is the only weight named.
	if m := regexp.MustCompile(`(?i)(^|[^-])\bweights?\b|performance`).FindString(strings.ReplaceAll(text, "Equal-weight pool", "")); m != "" {
		t.Errorf("%s: the room view speaks of weights: %q", p.url(), m)
	}
	for _, q := range qs {
		if q.TrueValue != nil && !q.Revealed {
			if strings.Contains(html, strconv.FormatFloat(*q.TrueValue, 'f', -1, 64)) {
				t.Errorf("%s: the room view shows question %d's hidden true value %v", p.url(), q.Position, *q.TrueValue)
			}
		}
	}
	if strings.Contains(strings.ToLower(text), "calibration") {
		t.Errorf("%s: the room view says which questions are calibration questions", p.url())
	}
}

// fitsScreen fails when the page scrolls sideways or down, or its main
// picture does not fit the screen's height. Once a round closes the room
// view carries the record's fingerprint too, a line that pushed the
// picture's notes and the keys below a 1366×768 projector's edge.
func fitsScreen(t *testing.T, p *person, w, h int) {
	t.Helper()
	if sw := eval[int](p, "page width", `document.documentElement.scrollWidth`); sw > w {
		t.Errorf("the page is %d px wide on a %d px screen", sw, w)
	}
	if sh := eval[int](p, "page height", `document.documentElement.scrollHeight`); sh > h {
		t.Errorf("the page is %d px tall on a %d px screen: the room scrolls", sh, h)
	}
	bottom := eval[float64](p, "picture's bottom", `(Array.from(document.querySelectorAll(".room-chart svg.chart-svg")).find(e => e.getClientRects().length > 0) || {getBoundingClientRect: () => ({bottom: 0})}).getBoundingClientRect().bottom`)
	if bottom <= 0 || bottom > float64(h) {
		t.Errorf("the room's picture ends at %.0f px on a %d px screen", bottom, h)
	}
}

// curveMedians reads each labelled curve's median from the picture's
// table of percentiles: label → median as printed.
func curveMedians(t *testing.T, p *person) map[string]string {
	t.Helper()
	rows := eval[[][]string](p, "the curves' medians", `Array.from(document.querySelectorAll("table.chart-table tbody tr")).
		filter(r => r.querySelector("th") && /^(Expert [A-Z]+|You)/.test(r.querySelector("th").textContent.trim())).
		map(r => [r.querySelector("th").textContent.trim().split(/\s+/).slice(0, 2).join(" ").replace(/^You.*/, "You"), r.cells[3].textContent.trim()])`)
	m := map[string]string{}
	for _, r := range rows {
		m[r[0]] = r[1]
	}
	return m
}

func keys(m map[string]string) []string {
	var out []string
	for k := range m {
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}

// notesReadable fails unless the room's picture says what its axes leave
// out (the demo's question 1 is zoomed in and has a spike cut at the
// top) in text of at least px pixels, and none of it in the picture's
// small print.
func notesReadable(t *testing.T, p *person, screen string, px float64) {
	t.Helper()
	type note struct {
		Text string  `json:"text"`
		Size float64 `json:"size"`
	}
	notes := eval[[]note](p, "the picture's notes", `Array.from(document.querySelectorAll(".room-chart-notes li")).map(li => ({text: li.innerText, size: parseFloat(getComputedStyle(li).fontSize)}))`)
	var all []string
	for _, n := range notes {
		all = append(all, n.Text)
		if n.Size < px {
			t.Errorf("on a %s screen the room's note %q is %.1f px, want at least %.0f", screen, n.Text, n.Size, px)
		}
	}
	joined := strings.Join(all, " ")
	for _, want := range []string{"Zoomed in: the axis stops at", "The density rises above the top of the chart"} {
		if !strings.Contains(joined, want) {
			t.Errorf("on a %s screen the room view does not say %q under its picture; its notes: %q", screen, want, all)
		}
	}
	if small := eval[int](p, "notes in the picture", `Array.from(document.querySelectorAll(".room-chart svg text.chart-note")).filter(e => e.getClientRects().length > 0 && getComputedStyle(e).display !== "none").length`); small != 0 {
		t.Errorf("on a %s screen the room's picture still draws %d notes in its small print", screen, small)
	}
}

// pictureMeasure is the room's picture as drawn on the screen, in CSS px.
type pictureMeasure struct {
	TickPx     float64 `json:"tickPx"`     // an x tick label's font
	UnderTitle float64 `json:"underTitle"` // empty height under the x axis's title before what the picture draws below it
	ToNotes    float64 `json:"toNotes"`    // empty height between the picture's lowest text and the notes under it
	Spare      float64 `json:"spare"`      // the column's height left under the picture and its notes
}

func measurePicture(t *testing.T, p *person) pictureMeasure {
	t.Helper()
	return eval[pictureMeasure](p, "the room's picture on screen", `(() => {
		const svg = Array.from(document.querySelectorAll(".room-chart svg.chart-svg")).find(e => e.getClientRects().length);
		const shown = e => e.getClientRects().length && getComputedStyle(e).display !== "none";
		const texts = Array.from(svg.querySelectorAll("text")).filter(shown).map(e => e.getBoundingClientRect());
		const title = Math.max(...Array.from(svg.querySelectorAll("text.axis-title:not(.axis-title-y)")).filter(shown).map(e => e.getBoundingClientRect().bottom));
		const below = texts.filter(r => r.top >= title - 1);
		const lowest = Math.max(...texts.map(r => r.bottom));
		const notes = document.querySelector(".room-chart-notes");
		const end = notes ? notes.getBoundingClientRect().bottom : lowest;
		return {
			tickPx: parseFloat(getComputedStyle(svg.querySelector(".tick-label")).fontSize) * svg.getScreenCTM().a,
			underTitle: below.length ? Math.min(...below.map(r => r.top)) - title : 0,
			toNotes: notes ? notes.getBoundingClientRect().top - lowest : 0,
			spare: document.querySelector(".room-chart").getBoundingClientRect().bottom - end,
		};
	})()`)
}

// pictureFills fails unless the room's picture uses the projector's
// height: no empty band under its axis's title (the notes' room, where
// the page writes them itself) or between it and its notes (a picture
// held to 66vh), little of the column left under them, and tick labels of
// at least px on the screen, the median strip's beside it of at least
// stripPx, and no part of the view and no two of its pictures' words
// drawn over one another. The picture is as large as the column's width
// or what the header and notes leave of the height allows.
func pictureFills(t *testing.T, p *person, screen string, px, stripPx float64) {
	t.Helper()
	m := measurePicture(t, p)
	t.Logf("on a %s screen the room's tick labels are %.1f px", screen, m.TickPx)
	if m.TickPx < px {
		t.Errorf("on a %s screen the room's picture writes its tick labels at %.1f px, want at least %.1f", screen, m.TickPx, px)
	}
	if m.UnderTitle > 20 {
		t.Errorf("on a %s screen %.0f px stand empty under the picture's axis title", screen, m.UnderTitle)
	}
	// The median strip beside it: its wide drawing, in a side column of
	// 440 to 590 px, wrote its labels at about 12 px on 1280 and 1366 px
	// projectors.
	strip := eval[float64](p, "the median strip's tick labels on screen", `(() => {
		const svg = Array.from(document.querySelectorAll(".room-side .chart-medians svg.chart-svg")).find(e => e.getClientRects().length);
		return svg ? parseFloat(getComputedStyle(svg.querySelector(".tick-label")).fontSize) * svg.getScreenCTM().a : 0;
	})()`)
	t.Logf("on a %s screen the median strip's tick labels are %.1f px", screen, strip)
	if strip < stripPx {
		t.Errorf("on a %s screen the median strip writes its tick labels at %.1f px, want at least %.1f", screen, strip, stripPx)
	}
	if over := overlappingParts(p); len(over) > 0 {
		t.Errorf("on a %s screen the room view draws parts over one another: %q", screen, over)
	}
	if over := overlappingWords(p); len(over) > 0 {
		t.Errorf("on a %s screen the room's pictures draw words over one another or outside themselves: %q", screen, over)
	}
	if m.ToNotes > 24 {
		t.Errorf("on a %s screen %.0f px stand empty between the picture and its notes", screen, m.ToNotes)
	}
	if h := eval[float64](p, "the screen's height", `window.innerHeight`); m.Spare > 0.1*h {
		t.Errorf("on a %s screen the picture and its notes leave %.0f px of their column empty", screen, m.Spare)
	}
}

// overlappingParts names the room view's parts drawn over one another:
// its header, each shown picture, the notes, the side and the keys.
func overlappingParts(p *person) []string {
	return eval[[]string](p, "parts drawn over one another", `(() => {
		const parts = [[".room-head", document.querySelector(".room-head")]].
			concat(Array.from(document.querySelectorAll(".room-chart svg.chart-svg")).map((e, i) => ["picture " + i, e])).
			concat([".room-chart-notes", ".room-side", ".room-nav"].map(sel => [sel, document.querySelector(sel)])).
			filter(([, e]) => e && e.getClientRects().length);
		const out = [];
		for (let i = 0; i < parts.length; i++) for (let j = i + 1; j < parts.length; j++) {
			const a = parts[i][1].getBoundingClientRect(), b = parts[j][1].getBoundingClientRect();
			if (a.top < b.bottom - 1 && b.top < a.bottom - 1 && a.left < b.right - 1 && b.left < a.right - 1) out.push(parts[i][0] + " over " + parts[j][0]);
		}
		return out;
	})()`)
}

// overlappingWords names the words of the room's shown pictures (the
// curves and the median strip) drawn over one another within a picture,
// or reaching outside it.
func overlappingWords(p *person) []string {
	return eval[[]string](p, "words drawn over one another", `(() => {
		const out = [];
		const pics = Array.from(document.querySelectorAll(".room-view svg.chart-svg")).filter(e => e.getClientRects().length && getComputedStyle(e).display !== "none");
		for (const svg of pics) {
			const box = svg.getBoundingClientRect();
			const words = Array.from(svg.querySelectorAll("text")).filter(e => e.getClientRects().length && getComputedStyle(e).display !== "none" && e.textContent.trim() !== "");
			const rects = words.map(e => e.getBoundingClientRect());
			for (let i = 0; i < words.length; i++) {
				const a = rects[i];
				// A word's box is its font's line, a fifth of its size
				// above its capitals: that much may stand above or below.
				const em = parseFloat(getComputedStyle(words[i]).fontSize) * svg.getScreenCTM().a, v = 1 + 0.2 * em;
				if (a.left < box.left - 1 || a.right > box.right + 1 || a.top < box.top - v || a.bottom > box.bottom + v) out.push(words[i].textContent + " outside its picture");
				for (let j = i + 1; j < words.length; j++) {
					const b = rects[j];
					if (a.top < b.bottom - 1 && b.top < a.bottom - 1 && a.left < b.right - 1 && b.left < a.right - 1) out.push(words[i].textContent + " over " + words[j].textContent);
				}
			}
		}
		return out;
	})()`)
}

// TestRoomFootBarOnAPhone: on a phone the room's foot bar holds the links
// to the previous and next question alone, each on one line and tall
// enough to tap (44 px); the line about the keys, which a phone has none
// of, had squeezed each link onto three lines. At 1366 px it is there.
func TestRoomFootBarOnAPhone(t *testing.T) {
	_, d, fac := facilitatorOnDemo(t)
	room := d.url + "/q/" + strconv.FormatInt(d.qs[1].ID, 10) + "/room"
	type link struct {
		Text   string
		Height float64
		Lines  int
	}
	for _, w := range []int64{390, 1366} {
		fac.viewport(w, 844, w < 600)
		if st := fac.open(room); st != http.StatusOK {
			t.Fatalf("%d px: room view: %d", w, st)
		}
		keys := fac.visible(".room-keys")
		if keys != (w > 600) {
			t.Errorf("%d px: the line about the keys is shown: %v", w, keys)
		}
		if w > 600 {
			continue
		}
		links := eval[[]link](fac, "the foot bar's links", `Array.from(document.querySelectorAll(".room-nav a")).map(a => {
			const r = document.createRange(); r.selectNodeContents(a);
			return {text: a.innerText, height: a.getBoundingClientRect().height,
				lines: new Set(Array.from(r.getClientRects()).filter(b => b.width > 0).map(b => Math.round(b.top))).size};
		})`)
		if len(links) != 2 {
			t.Fatalf("%d px: the foot bar has %d links, want previous and next: %+v", w, len(links), links)
		}
		for _, l := range links {
			if l.Lines != 1 || l.Height < 44 {
				t.Errorf("%d px: the link %q takes %d lines and is %.0f px tall; want one line, at least 44 px", w, l.Text, l.Lines, l.Height)
			}
		}
	}
}

// TestRoomPictureStandsUnderItsHeader: the room's picture stood under a
// blank band, some 40 px on a phone and 24 px on a 1920×1080 projector,
// the room its drawings keep above the plots for a revealed true value's
// label, which neither the demo's question nor a large panel's (20
// experts, chart.Spread) has. Now the picture's first mark (the top tick
// label) stands within 16 px of the header's foot on a phone (its margin
// and a few px of the drawing's own), at 360 and 390 px, and within the
// header's margin (1vh) and 12 px on a projector, at 1024×768, 1366×768
// and 1920×1080; every label inside its picture, nothing off the screen.
func TestRoomPictureStandsUnderItsHeader(t *testing.T) {
	site, d, fac := facilitatorOnDemo(t)
	shots := newScreenshots(t)
	fac.open(d.url + "/")
	fac.postFromPage(d.url+"/round", "action=close")
	ws, q := largePanelWith(t, site, 20, nil)
	largeRoom := roomAfterRoundOne(t, site, ws, q)
	const band = `(() => {
		const head = document.querySelector(".room-head").getBoundingClientRect();
		const svg = Array.from(document.querySelectorAll(".room-chart svg.chart-svg")).find(e => e.getClientRects().length > 0);
		let top = Infinity;
		for (const e of svg.querySelectorAll("text, line, path, rect")) {
			if (e.closest("title, desc")) continue;
			const r = e.getBoundingClientRect();
			if (r.width > 0 || r.height > 0) top = Math.min(top, r.top);
		}
		return top - head.bottom;
	})()`
	for _, room := range []struct{ name, shot, url string }{
		{"the demo's room", "demo", d.url + "/q/" + strconv.FormatInt(d.qs[0].ID, 10) + "/room"},
		{"a large panel's room", "large", largeRoom},
	} {
		fac.open(room.url)
		for _, w := range []int64{360, phoneWidth} {
			fac.viewport(w, phoneHeight, true)
			if b := eval[float64](fac, "the band above the picture", band); b > 16 {
				t.Errorf("%s at %d px: the picture starts %.0f px under its header", room.name, w, b)
			}
			fits(t, fac, room.name, w)
			shots.take(fac, fmt.Sprintf("room-phone-top-%s-%d", room.shot, w))
		}
		for _, sz := range [][2]int64{{1024, 768}, {1366, 768}, {1920, 1080}} {
			fac.viewport(sz[0], sz[1], false)
			b := eval[float64](fac, "the band above the picture", band)
			t.Logf("%s at %d×%d: the picture starts %.1f px under its header", room.name, sz[0], sz[1], b)
			if most := float64(sz[1])/100 + 12; b > most {
				t.Errorf("%s at %d×%d: the picture starts %.0f px under its header, want at most %.0f", room.name, sz[0], sz[1], b, most)
			}
			fitsScreen(t, fac, int(sz[0]), int(sz[1]))
			shots.take(fac, fmt.Sprintf("room-top-%s-%d", room.shot, sz[0]))
		}
	}
}

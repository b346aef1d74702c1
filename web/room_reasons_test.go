package web

import (
	"context"
	"fmt"
	"html"
	"net/http"
	"net/url"
	"regexp"
	"sort"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// reasonsPanel is an invented workshop of two questions; the first
// answered by n experts, each with a reason, expert 0's as long as a
// reason may be (input.MaxLongText), and round 1 closed. It returns the
// first question's room and every reason given.
func reasonsPanel(t *testing.T, n int) (*harness, workshop.Workshop, []workshop.Question, []string) {
	t.Helper()
	h := newHarness(t)
	h.signIn()
	ctx := context.Background()
	ws := workshop.Workshop{Title: "Invented: a panel with many reasons", Invented: true}
	if err := h.db.CreateWorkshop(ctx, &ws); err != nil {
		t.Fatal(err)
	}
	var qs []workshop.Question
	for i := 0; i < 2; i++ {
		q := workshop.Question{WorkshopID: ws.ID, Wording: "What share of the new seals will fail in their first year? (Invented.)",
			Quantity: "failure share " + strconv.Itoa(i+1), Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: workshop.ProbsDefault}
		if err := h.db.AddQuestion(ctx, &q); err != nil {
			t.Fatal(err)
		}
		qs = append(qs, q)
	}
	var reasons []string
	for i := 0; i < n; i++ {
		e, _ := h.addExpert(ws, fmt.Sprintf("Invented engineer %02d", i+1))
		why := fmt.Sprintf("Invented: field returns of a similar seal at site %d, and the maker's bench tests.", i+1)
		if i == 0 {
			long := "Invented: the long view. "
			for k := 1; len([]rune(long)) < input.MaxLongText-40; k++ {
				long += "Point " + strconv.Itoa(k) + ": the seals of this kind wore faster in dusty sites. "
			}
			why = strings.TrimSpace(long)
		}
		m := 0.04 + 0.2*float64(i)/float64(n)
		rv := workshop.Revision{QuestionID: qs[0].ID, ExpertID: e.ID, Answer: workshop.Answer{Values: []float64{m / 2, m, 1.8 * m}}, Reason: why}
		f, err := qs[0].Fit(rv.Answer)
		if err != nil {
			t.Fatal(err)
		}
		rv.Kept = &f
		if err := h.db.SaveRevision(ctx, &rv); err != nil {
			t.Fatal(err)
		}
		reasons = append(reasons, why)
	}
	if r, _ := h.post(workshopPath(ws.ID)+"/round", url.Values{"action": {"close"}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("close round 1: %d", r.StatusCode)
	}
	return h, ws, qs, reasons
}

var (
	reasonItem = regexp.MustCompile(`<li(?: data-long)?><strong>(Expert [A-Z]+)( \(continued\))?</strong>: ([^<]*)<span class="room-reasons-cont">([^<]*)</span></li>`)
	roomNext   = regexp.MustCompile(`<a id="room-next" rel="next" href="([^"]*)">([^<]*)</a>`)
	roomPrev   = regexp.MustCompile(`<a id="room-prev" rel="prev" href="([^"]*)">([^<]*)</a>`)
	reasonsH2  = regexp.MustCompile(`<h2 id="room-reasons-heading">([^<]*)</h2>`)
)

// TestRoomPagesItsReasons: a room of 20 experts, each with a reason, one
// of them as long as a reason may be. Beside the picture the side column
// counts them and links to the reasons display; its pages, from one to
// the next by their links, show every reason once under its letter (the
// long one cut between pages at a word, marked as continued, and whole
// when its parts are joined), and lead back to the picture and on to the
// next question. A withheld reason is on no page; a calibration
// question held back shows none; a malformed address is refused naming
// its field, and a page past the last says so.
func TestRoomPagesItsReasons(t *testing.T) {
	h, ws, qs, reasons := reasonsPanel(t, 20)
	room := roomPath(ws.ID, qs[0].ID)

	_, body := h.get(room)
	if !strings.Contains(body, `20 reasons: <a id="room-reasons-link" href="`+room+`?show=reasons">show them</a>`) {
		t.Fatalf("the room's side does not count the 20 reasons with a link to them")
	}
	if strings.Contains(body, `class="room-reasons"`) || strings.Contains(body, "field returns of a similar seal") {
		t.Error("the room still lists the reasons beside the picture")
	}

	got, pages := readReasonsPages(t, h, room)
	t.Logf("20 reasons in %d pages", pages)
	if pages < 2 {
		t.Errorf("20 reasons, one of 4,000 characters, took %d page", pages)
	}
	want := append([]string(nil), reasons...)
	sort.Strings(want)
	if strings.Join(got, "\n") != strings.Join(want, "\n") {
		t.Errorf("the pages show\n%q\nwant every reason once:\n%q", got, want)
	}

	// A withheld reason is on no page, and the count follows.
	revs, _ := h.db.Revisions(context.Background(), ws.ID)
	var first workshop.Revision
	for _, rv := range revs {
		if rv.Reason == reasons[1] {
			first = rv
		}
	}
	if r, _ := h.post(questionPath(ws.ID, qs[0].ID)+"/reasons/"+strconv.FormatInt(first.ID, 10),
		url.Values{"action": {"withhold"}, "withhold_reason": {"Names a site's owner (invented)."}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("withhold: %d", r.StatusCode)
	}
	if _, body := h.get(room); !strings.Contains(body, "19 reasons: ") {
		t.Error("the side does not count 19 reasons once one is withheld")
	}
	got, _ = readReasonsPages(t, h, room)
	for _, g := range got {
		if g == reasons[1] {
			t.Error("a withheld reason is on the reasons display")
		}
	}
	if len(got) != 19 {
		t.Errorf("the pages show %d reasons, want 19", len(got))
	}

	// An address the room view does not take.
	for _, tc := range []struct{ query, field string }{
		{"show=names", "show:"}, {"page=2", "page:"}, {"show=reasons&page=0", "page:"}, {"show=reasons&page=two", "page:"},
		{"show=reasons&page=-1", "page:"}, {"show=reasons&show=reasons", "show:"}, {"expert=3", "expert:"},
	} {
		r, body := h.get(room + "?" + tc.query)
		if r.StatusCode != http.StatusBadRequest || !strings.Contains(body, tc.field) {
			t.Errorf("?%s: %d %q, want 400 naming %s", tc.query, r.StatusCode, body, tc.field)
		}
	}
	// A page past the last (reasons withheld while it was shown) says
	// so, and shows no reason.
	r, body := h.get(room + "?show=reasons&page=99")
	if r.StatusCode != http.StatusOK || !strings.Contains(body, "there is no page 99") || reasonItem.MatchString(body) {
		t.Errorf("page 99: %d, %q", r.StatusCode, body)
	}

	// A calibration question held back until its reveal shows no
	// reasons on the display either.
	tv := 0.1
	q := workshop.Question{WorkshopID: ws.ID, Wording: "Held back (invented).", Quantity: "share", Lower: 0, Upper: 1,
		Format: workshop.FormatQuantiles, Probs: workshop.ProbsDefault, Calibration: true, TrueValue: &tv}
	if err := h.db.AddQuestion(context.Background(), &q); err != nil {
		t.Fatal(err)
	}
	if _, body := h.get(roomPath(ws.ID, q.ID) + "?show=reasons"); !strings.Contains(body, "held back until its true value is shown") || reasonItem.MatchString(body) {
		t.Error("the reasons display of a held-back question does not say it is held back")
	}
}

// readReasonsPages reads the room's reasons display from its first page
// to its last by the links, checking each page's heading and links, and
// returns the reasons shown (the parts of one joined), sorted, and the
// number of pages.
func readReasonsPages(t *testing.T, h *harness, room string) ([]string, int) {
	t.Helper()
	var got []string
	cont := ""
	path := room + "?show=reasons"
	page := 0
	for path != "" {
		page++
		r, body := h.get(path)
		if r.StatusCode != http.StatusOK {
			t.Fatalf("%s: %d", path, r.StatusCode)
		}
		if !strings.Contains(body, "<title>Room view, reasons · Q1 ") {
			t.Errorf("%s is not titled as the room's reasons", path)
		}
		heading := reasonsH2.FindStringSubmatch(body)
		if heading == nil || !strings.Contains(heading[1], "page "+strconv.Itoa(page)+" of ") {
			t.Errorf("%s is headed %q", path, heading)
		}
		prev := roomPrev.FindStringSubmatch(body)
		wantPrev := room
		if page > 1 {
			wantPrev = room + "?show=reasons&amp;page=" + strconv.Itoa(page-1)
			if page == 2 {
				wantPrev = room + "?show=reasons"
			}
		}
		if prev == nil || prev[1] != wantPrev {
			t.Errorf("%s: its previous link is %q, want %q", path, prev, wantPrev)
		}
		if !strings.Contains(body, `<a id="room-picture-link" href="`+room+`">back to the picture</a>`) {
			t.Errorf("%s does not lead back to the picture", path)
		}
		// Nothing leads out of the room views (roomLink).
		for _, m := range regexp.MustCompile(`href="([^"]+)"`).FindAllStringSubmatch(body, -1) {
			if !roomLink.MatchString(html.UnescapeString(m[1])) && !strings.HasPrefix(m[1], "/static/") && !strings.HasPrefix(m[1], "#") {
				t.Errorf("%s links to %s", path, m[1])
			}
		}
		items := reasonItem.FindAllStringSubmatch(body, -1)
		if len(items) == 0 {
			t.Fatalf("%s shows no reason", path)
		}
		for i, it := range items {
			text := html.UnescapeString(it[3])
			if (it[2] != "") != (i == 0 && cont != "") {
				t.Errorf("%s: %s is marked continued: %q", path, it[1], it[2])
			}
			if cont != "" {
				text = cont + " " + text
				cont = ""
			}
			if it[4] != "" {
				if it[4] != " (continues on the next page)" || i != len(items)-1 {
					t.Errorf("%s: %s ends %q", path, it[1], it[4])
				}
				cont = text
				continue
			}
			got = append(got, text)
		}
		next := roomNext.FindStringSubmatch(body)
		switch {
		case next != nil && next[2] == "next reasons →":
			path = html.UnescapeString(next[1])
		case next != nil && strings.HasSuffix(next[1], "/room"):
			path = ""
		default:
			t.Fatalf("%s: its next link is %q", path, next)
		}
		if page > 30 {
			t.Fatal("more than 30 pages")
		}
	}
	if cont != "" {
		t.Errorf("the last page leaves a reason to continue: %q", cont)
	}
	sort.Strings(got)
	return got, page
}

// TestDemoRoomKeepsItsReasonsBeside: the invented demo's panel of four
// keeps its reasons beside the picture, with no link to a display.
func TestDemoRoomKeepsItsReasonsBeside(t *testing.T) {
	h, ws, qs, _, links := seeded(t)
	const plain = "Supplier audits found two line faults (invented)."
	if r, _ := h.post(links[2].Path+"q/"+strconv.FormatInt(qs[0].ID, 10)+"/save", url.Values{"values[0]": {"0.02"}, "values[1]": {"0.05"}, "values[2]": {"0.12"}, "reason": {plain}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("save with a reason: %d", r.StatusCode)
	}
	if r, _ := h.post(workshopPath(ws.ID)+"/round", url.Values{"action": {"close"}}); r.StatusCode != http.StatusSeeOther {
		t.Fatal("close")
	}
	_, body := h.get(roomPath(ws.ID, qs[0].ID))
	if !regexp.MustCompile(`<ul class="room-reasons"><li><strong>Expert [A-Z]</strong>: ` + regexp.QuoteMeta(plain)).MatchString(body) {
		t.Error("the demo's room does not list its reason beside the picture")
	}
	// The link is carried for room.js, hidden: the list is the server's
	// choice, and a page without script shows it alone.
	if !strings.Contains(body, `data-beside="list"`) || !strings.Contains(body, `<p class="room-reasons-more" hidden>`) || strings.Contains(body, `<div class="room-reasons-beside" hidden>`) {
		t.Error("the demo's room shows its link to the reasons display, or hides its reason")
	}
}

// A wording of up to three lines of the room's title type keeps it; a
// longer one is set in the state line's type while it takes three lines
// there, else in the side table's (wordingType). The heights follow:
// never more than three title lines' worth up to about six lines of
// text (the e2e TestLongWordingKeepsTheSideOnScreen sees the side
// column end on the screen under them).
func TestLongWordingIsSetSmaller(t *testing.T) {
	const sentence = "Of the new pump seals fitted at the four invented sites next spring, what share will fail within their first year? "
	title := wordingSizes[0].vw * wordingLineHeight
	for _, c := range []struct {
		repeat int
		class  string
	}{{1, "room-question"}, {2, "room-question"}, {3, "room-question room-question-long"}, {5, "room-question room-question-longer"}} {
		w := "Q1: " + strings.TrimSpace(strings.Repeat(sentence, c.repeat))
		v := roomView{Question: workshop.Question{Position: 1, Wording: w[len("Q1: "):]}}
		if got := v.wordingClass(); got != c.class {
			t.Errorf("%d characters: class %q, want %q", len(w), got, c.class)
		}
		if h := wordingHeight(w); h > wordingMaxLines*title+1e-9 {
			t.Errorf("%d characters: %.2fvw high, more than three title lines (%.2fvw)", len(w), h, wordingMaxLines*title)
		}
	}
}

// TestRoomCarriesReasonsALargerScreenMayHold: the server lays the side
// out for the smallest projector, and four reasons of about two lines
// there go to the reasons display; a larger screen's side holds them
// (room.js decides, on the screen), so the page carries the list, hidden,
// beside the link, which a page without script shows. Twenty such
// reasons are more than any projector's side holds: the page carries
// only the link.
func TestRoomCarriesReasonsALargerScreenMayHold(t *testing.T) {
	const why = "Invented: site %d's returns of the older seal ran high in the hot months."
	panel := func(n int) roomView {
		v := roomView{Question: workshop.Question{Position: 1, Wording: "What share of the new seals will fail in their first year? (Invented.)"}}
		for i := range n {
			v.Reasons = append(v.Reasons, feedbackReason{Label: "Expert " + string(rune('A'+i)), Reason: fmt.Sprintf(why, i+1)})
		}
		layOutReasons(&v, "/w/1/q/1/room", false, 0)
		return v
	}
	render := func(v roomView) string {
		var b strings.Builder
		if err := roomPage(v).Render(context.Background(), &b); err != nil {
			t.Fatal(err)
		}
		return b.String()
	}
	four := panel(4)
	if four.Beside || !four.Listed {
		t.Fatalf("four reasons of two lines: beside on the smallest projector %v, carried for a larger screen %v; want false, true", four.Beside, four.Listed)
	}
	body := render(four)
	for _, want := range []string{`data-beside="link"`, `<p class="room-reasons-more">4 reasons: <a id="room-reasons-link"`, `<div class="room-reasons-beside" hidden><h2>Reasons</h2>`, html.EscapeString(fmt.Sprintf(why, 4))} {
		if !strings.Contains(body, want) {
			t.Errorf("four reasons: the room's side lacks %q", want)
		}
	}
	twenty := panel(20)
	if twenty.Beside || twenty.Listed {
		t.Errorf("twenty reasons of two lines: beside %v, carried %v; want neither", twenty.Beside, twenty.Listed)
	}
	if body := render(twenty); strings.Contains(body, "room-reasons-beside") || !strings.Contains(body, "20 reasons: ") {
		t.Error("twenty reasons: the page carries the list, or not the link")
	}
	// No reasons: no heading over an empty list, and no link.
	if body := render(panel(0)); strings.Contains(body, "<h2>Reasons</h2>") || strings.Contains(body, "room-reasons") {
		t.Error("no reasons: the room's side carries a list or a link to them")
	}
}

// TestRoomWithoutReasonsWritesNoBesideWord: a panel that gave no reasons
// wrote data-beside="" on the side column, a word that says nothing
// (room.js places only a side with a list and a link, room.css hides
// only a side with a list). The attribute is now left out; the side is
// there with its median strip, and nothing of the reasons is.
func TestRoomWithoutReasonsWritesNoBesideWord(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	if r, _ := h.post(workshopPath(ws.ID)+"/round", url.Values{"action": {"close"}}); r.StatusCode != http.StatusSeeOther {
		t.Fatal("close")
	}
	_, body := h.get(roomPath(ws.ID, qs[0].ID))
	if !strings.Contains(body, `<section class="room-side"`) || !strings.Contains(body, "Where the medians lie") {
		t.Fatal("the demo's room after round 1 shows no side column with its median strip")
	}
	for _, not := range []string{"data-beside", `class="room-reasons-more"`, `class="room-reasons-beside"`} {
		if strings.Contains(body, not) {
			t.Errorf("the room of a panel that gave no reasons carries %s", not)
		}
	}
}

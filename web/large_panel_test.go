package web

import (
	"context"
	"fmt"
	"github.com/parley-elicit/parley/web/chart/charttest"
	"net/http"
	"net/url"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// seedLargePanel seeds a signed-in harness with one quantile question and n
// experts who each answered it with a reason (invented judgements).
func seedLargePanel(t *testing.T, n int) (*harness, workshop.Workshop, workshop.Question, []workshop.Revision) {
	t.Helper()
	return seedLargePanelWith(t, n, nil)
}

// seedLargePanelWith is seedLargePanel with the question changed by set
// before it is saved (nil: as it is).
func seedLargePanelWith(t *testing.T, n int, set func(*workshop.Question)) (*harness, workshop.Workshop, workshop.Question, []workshop.Revision) {
	t.Helper()
	h := newHarness(t)
	h.signIn()
	ctx := context.Background()
	ws := workshop.Workshop{Title: "Invented: a large panel", Invented: true}
	if err := h.db.CreateWorkshop(ctx, &ws); err != nil {
		t.Fatal(err)
	}
	q := workshop.Question{WorkshopID: ws.ID, Wording: "What share of invented gaskets leak in year one?", Quantity: "Leak share",
		Units: "proportion", Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95}}
	if set != nil {
		set(&q)
	}
	if err := h.db.AddQuestion(ctx, &q); err != nil {
		t.Fatal(err)
	}
	var revs []workshop.Revision
	for i := 0; i < n; i++ {
		e := workshop.Expert{WorkshopID: ws.ID, Name: fmt.Sprintf("Panellist %03d", i)}
		if err := h.db.AddExpert(ctx, &e, []byte("large-"+strconv.Itoa(i))); err != nil {
			t.Fatal(err)
		}
		m := 0.1 + 0.5*float64(i)/float64(n)
		rv := workshop.Revision{QuestionID: q.ID, ExpertID: e.ID, Reason: fmt.Sprintf("Invented reason %03d.", i),
			Answer: workshop.Answer{Values: []float64{m / 2, m, m + 0.2}}}
		f, err := q.Fit(rv.Answer)
		if err != nil {
			t.Fatal(err)
		}
		rv.Kept = &f
		if err := h.db.SaveRevision(ctx, &rv); err != nil {
			t.Fatal(err)
		}
		revs = append(revs, rv)
	}
	return h, ws, q, revs
}

// TestLargePanelForTheFacilitator: beyond overlayLimit pooled experts the
// facilitator's panel and the report draw the strip of intervals (one row
// per expert) under the pool, not one curve per expert; the panel page
// shows only the latest saves and links to the whole history and to the
// reasons, which keep their withhold forms on a page of their own.
func TestLargePanelForTheFacilitator(t *testing.T) {
	const n = 40
	h, ws, q, revs := seedLargePanel(t, n)
	qp := questionPath(ws.ID, q.ID)
	res, page := h.get(qp)
	if res.StatusCode != http.StatusOK {
		t.Fatalf("panel: %d", res.StatusCode)
	}
	if rows := charttest.SpreadRows(page); len(rows) != n {
		t.Errorf("the panel's strip has %d rows, want one per expert (%d)", len(rows), n)
	}
	if c := strings.Count(page, "curve-cdf curve-expert"); c != 0 {
		t.Errorf("the panel overlays %d expert curves; a large panel should not", c)
	}
	for _, want := range []string{"The " + strconv.Itoa(n) + " experts&#39; medians run from", "The experts&#39; medians", `href="` + qp + `/history"`, `href="` + qp + `/reasons"`} {
		if !strings.Contains(page, want) {
			t.Errorf("panel lacks %q", want)
		}
	}
	if strings.Contains(page, "other experts&#39; medians") {
		t.Error("the facilitator's strip speaks of 'other experts'")
	}
	if c := strings.Count(page, "Invented reason "); c != historyTail {
		t.Errorf("the panel page shows %d saves, want the latest %d", c, historyTail)
	}
	if !strings.Contains(page, "Invented reason 039.") || strings.Contains(page, "Invented reason 000.") {
		t.Error("the panel page should show the latest saves, not the first")
	}
	if strings.Contains(page, `name="withhold_reason"`) {
		t.Error("the large panel's page carries the withhold forms; they belong on the reasons page")
	}

	_, hist := h.get(qp + "/history")
	if c := strings.Count(hist, "Invented reason "); c != n {
		t.Errorf("the history page shows %d saves, want all %d", c, n)
	}
	_, reasons := h.get(qp + "/reasons")
	if c := strings.Count(reasons, `name="withhold_reason"`); c != n {
		t.Errorf("the reasons page has %d withhold forms, want %d", c, n)
	}
	// Withholding from the reasons page comes back to it; a refusal is
	// shown there too.
	rp := qp + "/reasons/" + strconv.FormatInt(revs[3].ID, 10)
	res, _ = h.post(rp, url.Values{"action": {"withhold"}, "withhold_reason": {"Names a supplier (invented)."}})
	if res.StatusCode != http.StatusSeeOther || res.Header.Get("Location") != qp+"/reasons" {
		t.Errorf("withhold: %d to %q, want 303 to the reasons page", res.StatusCode, res.Header.Get("Location"))
	}
	res, body := h.post(rp, url.Values{"action": {"release"}, "withhold_reason": {""}})
	if res.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, "needs a reason of its own") || !strings.Contains(body, `name="withhold_reason"`) {
		t.Errorf("a release without a reason: %d; want 422 on the reasons page with the message", res.StatusCode)
	}

	_, report := h.get(workshopPath(ws.ID) + "/report")
	if rows := charttest.SpreadRows(report); len(rows) != n {
		t.Errorf("the report's strip has %d rows, want %d", len(rows), n)
	}
	if c := strings.Count(report, "curve-cdf curve-expert"); c != 0 {
		t.Errorf("the report overlays %d expert curves", c)
	}
	if !strings.Contains(report, "Weights: equal, 2.5% each for the 40 experts pooled.") {
		t.Error("the report does not state equal weights in one line")
	}
	// The panel is summed up at the top; the roster closes the record.
	roster, log, first := strings.Index(report, `id="panel-roster"`), strings.Index(report, "<h2>Decision log</h2>"), strings.Index(report, `class="report-question"`)
	if !strings.Contains(report, "40 experts. Their names, affiliations and expertise are in the") {
		t.Error("the report's panel section does not sum the panel up")
	}
	if roster < 0 || log < 0 || roster < log || strings.Count(report, `class="table table-compact table-roster"`) != 1 {
		t.Errorf("the roster is not once, after the decision log (roster at %d, log at %d)", roster, log)
	}
	if i := strings.Index(report, `table-roster`); i < first {
		t.Error("the roster comes before the questions")
	}
}

// TestReportRosterStaysAtTheTopOfASmallPanel: up to overlayLimit experts
// the roster is the panel section itself.
func TestReportRosterStaysAtTheTopOfASmallPanel(t *testing.T) {
	h, ws, _, _ := seedLargePanel(t, overlayLimit)
	_, report := h.get(workshopPath(ws.ID) + "/report")
	roster, first := strings.Index(report, `table-roster`), strings.Index(report, `class="report-question"`)
	if roster < 0 || roster > first || strings.Contains(report, `id="panel-roster"`) {
		t.Errorf("a small panel's roster is not in the panel section (at %d, first question at %d)", roster, first)
	}
}

// TestSmallPanelOverlaysCurves: up to overlayLimit experts every curve is
// drawn, with names, and the lists stay on the panel page.
func TestSmallPanelOverlaysCurves(t *testing.T) {
	h, ws, q, _ := seedLargePanel(t, overlayLimit)
	qp := questionPath(ws.ID, q.ID)
	_, page := h.get(qp)
	if c := strings.Count(page, "curve-cdf curve-expert"); c < overlayLimit {
		t.Errorf("%d expert curves drawn, want every one of %d", c, overlayLimit)
	}
	if charttest.SpreadRows(page) != nil {
		t.Error("a small panel draws the strip")
	}
	if c := strings.Count(page, `name="withhold_reason"`); c != overlayLimit {
		t.Errorf("%d withhold forms on a small panel's page, want %d", c, overlayLimit)
	}
}

// TestHistoryPageHasOneHeading: the whole-history page was headed
// "Revision history: Q1 …" and, right under it, "Revision history of this
// question" again. The page has one heading naming the history; the
// question's own page keeps its section's heading.
func TestHistoryPageHasOneHeading(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	qp := questionPath(ws.ID, qs[0].ID)
	heading := regexp.MustCompile(`(?s)<h[1-6][^>]*>(.*?)</h[1-6]>`)
	for _, c := range []struct {
		path string
		want int
	}{{qp + "/history", 1}, {qp, 1}} {
		_, body := h.get(c.path)
		n := 0
		for _, m := range heading.FindAllStringSubmatch(body, -1) {
			if strings.Contains(strings.ToLower(m[1]), "history") {
				n++
			}
		}
		if n != c.want {
			t.Errorf("%s: %d headings name the history, want %d", c.path, n, c.want)
		}
	}
	if _, body := h.get(qp + "/history"); !strings.Contains(body, "<h1>Revision history: Q") || !strings.Contains(body, `<table class="table table-compact table-revisions">`) {
		t.Error("the history page lacks its heading or its table")
	}
}

// An archived workshop's pages do not lead to what the archive refuses:
// a large panel's link to its reasons offers to read them, not to
// withhold them, and a calibration page without calibration questions
// does not send the facilitator to the question form to add one.
func TestArchivedPagesLeadToNothingRefused(t *testing.T) {
	h, ws, q, _ := seedLargePanel(t, 40)
	wp := workshopPath(ws.ID)
	if r, _ := h.post(wp+"/archive", url.Values{"action": {"archive"}, "archive_reason": {"Finished (invented)."}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("archive: %d", r.StatusCode)
	}
	if _, page := h.get(questionPath(ws.ID, q.ID)); strings.Contains(page, "withhold any") || !strings.Contains(page, `href="`+questionPath(ws.ID, q.ID)+`/reasons"`) {
		t.Error("the archived panel's link to its reasons offers to withhold them, or is gone")
	}
	if _, page := h.get(calibrationPath(ws.ID)); strings.Contains(page, `href="`+wp+`/questions/new"`) || !strings.Contains(page, "This workshop has no calibration questions") {
		t.Error("the archived calibration page sends the facilitator to add a calibration question, or does not say it has none")
	}
}

package web

import (
	"net/http"
	"net/url"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

// The record opens with every target question's agreed prior in one
// table, before anything else, with the very numbers the JSON export
// carries (elicit.RecordPrior); a target question without one says so, and
// calibration questions are not listed.
func TestReportOpensWithTheAgreedPriors(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	qp := questionPath(ws.ID, qs[0].ID)
	if res, body := h.post(qp+"/agree", url.Values{"source": {"pool"}, "confirm_open": {"on"}, "rationale": {"Summary-table rationale (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("agree: %d %s", res.StatusCode, body)
	}
	_, report := h.get(workshopPath(ws.ID) + "/report")
	start := strings.Index(report, `id="agreed-priors"`)
	end := strings.Index(report, "Purpose and decision")
	if start < 0 || end < start {
		t.Fatalf("the summary of agreed priors is missing or not first (at %d, purpose at %d)", start, end)
	}
	summary := report[start:end]
	_, body := h.get(workshopPath(ws.ID) + "/export.json")
	rec, err := elicit.ParseRecord(strings.NewReader(body))
	if err != nil {
		t.Fatal(err)
	}
	a := rec.Questions[0].AgreedPrior
	if a == nil {
		t.Fatal("no agreed prior in the export")
	}
	for _, want := range []string{"Q1: " + htmlEscape(qs[0].Quantity), "Beta(" + fv(a.Dist.Alpha) + ", " + fv(a.Dist.Beta.Beta) + ")",
		fv(a.Mean), fv(a.Percentiles.P05), fv(a.Percentiles.P50), fv(a.Percentiles.P95),
		"linear pool (its single Beta)", "while round 1 was open", "Summary-table rationale (invented).", a.At.UTC().Format("2006-01-02")} {
		if !strings.Contains(summary, want) {
			t.Errorf("the summary lacks %q", want)
		}
	}
	targets := 0
	for _, q := range qs {
		if q.Calibration {
			if strings.Contains(summary, htmlEscape(q.Quantity)) {
				t.Errorf("the summary lists calibration question %d", q.Position)
			}
			continue
		}
		targets++
	}
	agreed := strings.Count(summary, "<tr>") - 1 - strings.Count(summary, "No prior agreed yet.")
	if agreed != 1 || strings.Count(summary, "<tr>")-1 != targets {
		t.Errorf("the summary has %d rows with %d agreed; want %d rows, 1 agreed", strings.Count(summary, "<tr>")-1, agreed, targets)
	}
	// The caution is on the page once: the banner, not a second copy for print.
	if n := strings.Count(report, "documented judgement") + strings.Count(report, "documented expert judgement"); n != 1 {
		t.Errorf("the caution appears %d times", n)
	}
}

package web

import (
	"context"
	"encoding/csv"
	"net/http"
	"net/url"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// The record opens with every target question's agreed prior in one
// table, before anything else, with the very numbers the JSON export
// carries (record.Prior); a target question without one says so, and
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
	rec, err := record.Parse(strings.NewReader(body))
	if err != nil {
		t.Fatal(err)
	}
	a := rec.Questions[0].AgreedPrior
	if a == nil {
		t.Fatal("no agreed prior in the export")
	}
	for _, want := range []string{"Q1: " + htmlEscape(qs[0].Quantity), "Beta(" + fv(a.Dist.Alpha) + ", " + fv(a.Dist.Beta.Beta) + ")",
		fv(a.Mean), fv(a.Percentiles.P05), fv(a.Percentiles.P50), fv(a.Percentiles.P95),
		"equal-weight pool (its single Beta)", "while round 1 was open", "Summary-table rationale (invented).", a.At.UTC().Format("2006-01-02")} {
		if !strings.Contains(summary, want) {
			t.Errorf("the summary lacks %q", want)
		}
	}
	rows := strings.Count(summary, "<tr role=\"row\">") - 1
	if rows != 1 {
		t.Errorf("the summary has %d rows, want 1 (the one agreed prior)", rows)
	}
	for _, q := range qs {
		if q.Calibration && strings.Contains(summary, htmlEscape(q.Quantity)) {
			t.Errorf("the summary lists calibration question %d", q.Position)
		}
	}
	// The caution is on the page once: the banner, not a second copy for print.
	if n := strings.Count(report, "documented judgement") + strings.Count(report, "documented expert judgement"); n != 1 {
		t.Errorf("the caution appears %d times", n)
	}
}

// The agreed priors as a download: the exact header, a row for the one
// agreed prior with the JSON export's numbers, formula-looking text
// guarded, and a row for nothing else.
func TestPriorsCSVDownload(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	qp := questionPath(ws.ID, qs[0].ID)
	if res, body := h.post(qp+"/agree", url.Values{"source": {"pool"}, "confirm_open": {"on"}, "rationale": {"=SUM(A1), \"pool\" as it stood (invented)"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("agree: %d %s", res.StatusCode, body)
	}
	res, body := h.get(workshopPath(ws.ID) + "/priors.csv")
	if res.StatusCode != http.StatusOK || res.Header.Get("Content-Type") != "text/csv; charset=utf-8" ||
		!strings.Contains(res.Header.Get("Content-Disposition"), `filename="parley-workshop-`) || !strings.Contains(res.Header.Get("Content-Disposition"), `-priors.csv"`) {
		t.Fatalf("priors.csv: %d %v", res.StatusCode, res.Header)
	}
	rows, err := csv.NewReader(strings.NewReader(body)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if strings.Join(rows[0], ",") != "question_id,quantity,units,lower,upper,alpha,beta,mean,sd,q05,q50,q95,source,rationale,agreed_at,invented,caution,warnings,retired,pool_changed" || len(rows) != 2 {
		t.Fatalf("priors.csv rows %q", rows)
	}
	_, js := h.get(workshopPath(ws.ID) + "/export.json")
	rec, err := record.Parse(strings.NewReader(js))
	if err != nil {
		t.Fatal(err)
	}
	a := rec.Questions[0].AgreedPrior
	g := func(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }
	want := []string{strconv.FormatInt(qs[0].ID, 10), qs[0].Quantity, qs[0].Units, g(a.Dist.Lower), g(a.Dist.Upper), g(a.Dist.Alpha), g(a.Dist.Beta.Beta),
		g(a.Mean), g(a.SD), g(a.Percentiles.P05), g(a.Percentiles.P50), g(a.Percentiles.P95), "pool", `'=SUM(A1), "pool" as it stood (invented)`}
	for i, w := range want {
		if rows[1][i] != w {
			t.Errorf("%s = %q, want %q", rows[0][i], rows[1][i], w)
		}
	}
	// Linked from the workshop page and the report.
	for _, page := range []string{workshopPath(ws.ID) + "/", workshopPath(ws.ID) + "/report"} {
		if _, b := h.get(page); !strings.Contains(b, `href="`+workshopPath(ws.ID)+`/priors.csv"`) {
			t.Errorf("%s does not link the priors CSV", page)
		}
	}
}

// A revoked expert's judgement stays in the report's table of final
// judgements, marked as the panel marks it, since the pool beside it
// leaves them out ("33.3% each for the 3 experts pooled" under four rows).
func TestReportMarksARevokedExpertNotPooled(t *testing.T) {
	h, ws, _, es, _ := seeded(t)
	var gone workshop.Expert
	for _, e := range es {
		if e.Name == "Ole Brandt" { // answered Q1 in the invented demo
			gone = e
		}
	}
	if err := h.db.RevokeExpert(context.Background(), gone.ID, "invented: left the panel"); err != nil {
		t.Fatal(err)
	}
	_, report := h.get(workshopPath(ws.ID) + "/report")
	// Q1's table is the report's first.
	table := report[strings.Index(report, "Each expert's final judgement"):]
	table = table[:strings.Index(table, "</table>")]
	rows := strings.Split(table, "<tr")
	marked := 0
	for _, row := range rows {
		if strings.Contains(row, "revoked, not pooled") {
			marked++
			if !strings.Contains(row, gone.Name) {
				t.Errorf("the mark is on another expert's row: %s", row)
			}
		}
	}
	if marked != 1 {
		t.Errorf("%d rows marked revoked, want 1 (%s's)", marked, gone.Name)
	}
	if !strings.Contains(report, "for the 3 experts pooled") {
		t.Error("the pool should name 3 experts pooled")
	}
}

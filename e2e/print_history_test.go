package e2e

import (
	"context"
	"encoding/xml"
	"fmt"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/web"
)

// TestReportHistoryPrintsReasonsAcrossThePage: the report's revision
// history printed each save as six columns, and the five columns of facts
// took their narrowest widths (the time alone 171 of A4's 695 px), leaving
// the reason the width of its longest word: a reason of three sentences
// ran down 15 to 20 lines, and an invented workshop of 30 experts, 25
// questions and 1,290 saves printed its history on 630 pages. On A4 and
// Letter a reason of about 300 characters must take at most 5 lines.
func TestReportHistoryPrintsReasonsAcrossThePage(t *testing.T) {
	poppler(t, "pdftotext")
	const reason = "Kestrel: the invented inspection logs show blockages clustered at the older stone culverts. " +
		"I weighed the storm records more heavily than the maintenance schedule, which slipped twice last year. " +
		"After the discussion I moved my median towards the panel's, but kept my upper value: Osprey."
	s := startSite(t)
	ctx := context.Background()
	ws := workshop.Workshop{Title: "Invented: culvert blockages", Invented: true, Purpose: "Invented: a prior for the share of culverts blocked."}
	must := func(err error) {
		t.Helper()
		if err != nil {
			t.Fatal(err)
		}
	}
	must(s.DB.CreateWorkshop(ctx, &ws))
	q := workshop.Question{WorkshopID: ws.ID, Wording: "Invented: what share of the culverts will be blocked after the next storm?",
		Quantity: "blocked share", Units: "proportion", Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: workshop.ProbsDefault}
	must(s.DB.AddQuestion(ctx, &q))
	for i := range 3 {
		_, hash, err := web.NewExpertToken()
		must(err)
		e := workshop.Expert{WorkshopID: ws.ID, Name: fmt.Sprintf("Bartholomew Ashworth-Pemberton %d (invented)", i+1)}
		must(s.DB.AddExpert(ctx, &e, hash))
		rv := workshop.Revision{QuestionID: q.ID, ExpertID: e.ID, Reason: reason,
			Answer: workshop.Answer{Values: []float64{0.05 + 0.01*float64(i), 0.15, 0.4}}}
		f, err := q.Fit(rv.Answer)
		must(err)
		rv.Kept = &f
		must(s.DB.SaveRevision(ctx, &rv))
	}
	fac := signedInFacilitator(t, s)
	fac.open(s.URL + "/w/" + strconv.FormatInt(ws.ID, 10) + "/report")
	dir := t.TempDir()
	for _, pp := range papers {
		pdf := fac.printPDF(pp, filepath.Join(dir, "report-history-"+pp.name+".pdf"))
		lines := reasonLines(t, pdf, "Kestrel:", "Osprey.")
		if lines == 0 {
			t.Fatalf("%s: the reason is not on paper", pp.name)
		}
		if lines > 5 {
			t.Errorf("%s: a reason of %d characters takes %d lines on paper; want at most 5", pp.name, len(reason), lines)
		}
	}
}

// reasonLines counts the lines of print from the word start to the word
// end (their first appearance on one page of pdf, read by pdftotext
// -bbox); 0 when no page has both.
func reasonLines(t *testing.T, pdf, start, end string) int {
	t.Helper()
	out, err := exec.Command("pdftotext", "-bbox", pdf, "-").Output()
	if err != nil {
		t.Fatalf("pdftotext -bbox: %v", err)
	}
	type word struct {
		YMin float64 `xml:"yMin,attr"`
		Text string  `xml:",chardata"`
	}
	var doc struct {
		Pages []struct {
			Words []word `xml:"word"`
		} `xml:"body>doc>page"`
	}
	// pdftotext writes an XHTML page; its head is not needed.
	body := string(out)
	if i := strings.Index(body, "<body>"); i >= 0 {
		body = "<html>" + body[i:]
	}
	dec := xml.NewDecoder(strings.NewReader(body))
	dec.Strict = false
	if err := dec.Decode(&doc); err != nil {
		t.Fatalf("read pdftotext -bbox: %v", err)
	}
	for _, pg := range doc.Pages {
		tops, in := map[int]bool{}, false
		for _, w := range pg.Words {
			if w.Text == start {
				in = true
			}
			if in {
				tops[int(w.YMin+0.5)] = true
			}
			if in && w.Text == end {
				return len(tops)
			}
		}
	}
	return 0
}

package web

import (
	"context"
	"encoding/json"
	"html"
	"net/http"
	"net/url"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/answersheet"
	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// A judgement the facilitator enters on an expert's behalf is a decision
// a reviewer of the record must see: the decision log and the report's
// copy of it give it a line of its own, naming the question, the expert,
// the round, how it reached the facilitator, its time and its reason,
// between the decisions before and after it. Judgements imported from an
// answer sheet keep their one line for the sheet, and the expert's own
// saves get none.
func TestDecisionLogShowsAnEntryOnAnExpertsBehalf(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	ctx := context.Background()
	q, priya := qs[0], es[2]
	reason := "Read from her paper form after the session (invented)."
	form := url.Values{"channel": {"paper_form"}, "values[0]": {"0.01"}, "values[1]": {"0.03"}, "values[2]": {"0.09"}, "reason": {reason}}
	if r, _ := h.post(entryPath(ws.ID, q.ID, priya.ID)+"/save", form); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("save: %d", r.StatusCode)
	}
	// A decision after it, to place the entry's line between.
	if err := h.db.SetRound(ctx, ws.ID, ws.Round, false, "End of the morning session."); err != nil {
		t.Fatal(err)
	}
	revs, _ := h.db.Revisions(ctx, ws.ID)
	rv := revs[len(revs)-1]
	if rv.EnteredBy != workshop.ByFacilitator {
		t.Fatalf("the last revision was entered by %q", rv.EnteredBy)
	}
	when := rv.At.UTC().Format("2006-01-02 15:04:05 UTC")
	detail := "Priya Raman's judgement for round 1, entered by the facilitator from a paper form."

	// The JSON record carries everything the line says.
	_, raw := h.get(workshopPath(ws.ID) + "/export.json")
	var rec record.Record
	if err := json.Unmarshal([]byte(raw), &rec); err != nil {
		t.Fatal(err)
	}
	last := rec.Revisions[len(rec.Revisions)-1].Revision
	if last.EnteredBy != workshop.ByFacilitator || last.Channel != workshop.ChannelPaperForm || last.ExpertID != priya.ID ||
		last.QuestionID != q.ID || last.Round != 1 || !last.At.Equal(rv.At) || last.Reason != reason {
		t.Fatalf("the export's revision %+v", last)
	}

	_, logPage := h.get(workshopPath(ws.ID) + "/log")
	_, report := h.get(workshopPath(ws.ID) + "/report")
	for name, body := range map[string]string{"log": logPage, "report": report} {
		if i := strings.Index(body, "<h2>Decision log</h2>"); name == "report" && i >= 0 {
			body = body[i:]
		}
		at := strings.Index(body, "Judgement entered on an expert&#39;s behalf")
		if at < 0 {
			t.Errorf("%s: no line for the judgement entered on Priya Raman's behalf", name)
			continue
		}
		row := body[strings.LastIndex(body[:at], "<tr"):]
		row = row[:strings.Index(row, "</tr>")]
		// The reason saved with the judgement is the expert's reasoning,
		// labelled so that it does not read as the facilitator's reason
		// for a decision, as the column holds on every other line.
		for _, want := range []string{when, "Q1 " + html.EscapeString(q.Quantity), html.EscapeString("Priya Raman's reasoning, entered with the judgement: “" + reason + "”"), html.EscapeString(detail)} {
			if !strings.Contains(row, want) {
				t.Errorf("%s: the entry's line lacks %q: %s", name, want, row)
			}
		}
		// Oldest first: after the experts joined, before the round closed.
		if joined, closed := strings.LastIndex(body, "joined the panel"), strings.LastIndex(body, "Round 1 closed"); !(joined < at && at < closed) {
			t.Errorf("%s: the entry's line is out of order (joined %d, entry %d, closed %d)", name, joined, at, closed)
		}
		if n := strings.Count(body, "Judgement entered on an expert&#39;s behalf"); n != 1 {
			t.Errorf("%s: %d lines for one entry", name, n)
		}
	}
}

// An answer sheet's judgements have the sheet's line, not one each.
func TestDecisionLogKeepsASheetToItsOwnLine(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	ctx := context.Background()
	text := "expert,question,q05,q50,q95,reason\nPriya Raman,Q1,0.02,0.05,0.12,By phone (invented).\n"
	rows, err := answersheet.Read(strings.NewReader(text), qs, es)
	if err != nil {
		t.Fatal(err)
	}
	if err := SaveSheet(ctx, h.db, ws, rows, workshop.ChannelPhone, answersheet.File{Name: "phone.csv", Text: text}); err != nil {
		t.Fatal(err)
	}
	_, body := h.get(workshopPath(ws.ID) + "/log")
	if !strings.Contains(body, "Judgements imported from an answer sheet") || strings.Contains(body, "Judgement entered on an expert&#39;s behalf") {
		t.Error("a sheet's judgement is not on the sheet's line alone")
	}
}

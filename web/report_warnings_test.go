package web

import (
	"context"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// The report groups a question's fit warnings by kind: each kind's
// meaning and what to do is written once, then each expert's particulars
// (for a tail miss: the outer value, both chances beyond it and the
// ratio, the very numbers of the fit's own message). In a panel of 200
// the report had repeated one sentence a hundred times per question. The
// expert's page and the facilitator's panel keep the whole message.
// The judgements are invented.
func TestReportGroupsFitWarningsByKind(t *testing.T) {
	h, ws, _, es, _ := seeded(t)
	ctx := context.Background()
	q := workshop.Question{WorkshopID: ws.ID, Wording: "What fraction of the seals fail in the first year? (invented)",
		Quantity: "Seal failures", Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95}}
	if err := h.db.AddQuestion(ctx, &q); err != nil {
		t.Fatal(err)
	}
	answers := [][]float64{
		{0.06, 0.15, 0.38},     // the fit puts 0.939% above 0.38: about 5.3 times less
		{0.06, 0.15, 0.42},     // 0.212% above 0.42: about 24 times less
		{0.0495, 0.05, 0.0505}, // near-certainty
		{0.06, 0.15, 0.35},     // no warning
	}
	var fits []elicit.Fit
	for i, vs := range answers {
		rv := workshop.Revision{QuestionID: q.ID, ExpertID: es[i].ID, Answer: workshop.Answer{Values: vs}}
		if err := h.db.SaveRevision(ctx, &rv); err != nil {
			t.Fatal(err)
		}
		f, err := q.Fit(rv.Answer)
		if err != nil {
			t.Fatal(err)
		}
		fits = append(fits, f)
	}
	if !hasCode(fits[0].Warnings, elicit.WarnTailMisfit) || !hasCode(fits[1].Warnings, elicit.WarnTailMisfit) ||
		!hasCode(fits[2].Warnings, elicit.WarnNearCertainty) || len(fits[3].Warnings) != 0 {
		t.Fatalf("the test's answers do not draw the warnings it needs: %+v", fits)
	}
	_, report := h.get(workshopPath(ws.ID) + "/report")
	sec := reportSection(t, report, q.ID)

	lead := "puts more than " + strconv.Itoa(elicit.TailRatioLimit) + " times the chance the expert put there, or less than a third of it"
	if n := strings.Count(sec, lead); n != 1 {
		t.Errorf("the tail misses' meaning is written %d times, want once", n)
	}
	if !strings.Contains(sec, "Outer value missed: 2 of 4 experts") || !strings.Contains(sec, "Near-certainty: 1 of 4 experts") {
		t.Error("the kinds of warning are not titled with how many experts have them")
	}
	// The message's own sentence is not repeated expert by expert.
	if strings.Contains(sec, "Its probability gaps are small") {
		t.Error("the report still writes each tail miss's whole message")
	}
	// Each expert's particulars: the numbers of the fit's message.
	for i, row := range []string{
		"<tr><td>" + htmlEscape(es[0].Name) + "</td><td>above 0.38</td><td>5%</td><td>0.939%</td><td>5.3 times less</td></tr>",
		"<tr><td>" + htmlEscape(es[1].Name) + "</td><td>above 0.42</td><td>5%</td><td>0.212%</td><td>24 times less</td></tr>",
	} {
		if !strings.Contains(sec, row) {
			t.Errorf("the report lacks %s's tail miss %s", es[i].Name, row)
		}
		for _, n := range []string{"0.939% of the chance above 0.38", "0.212% of the chance above 0.42"}[i : i+1] {
			if !strings.Contains(fits[i].Warnings[0].Message, n) {
				t.Errorf("the fit's message %q no longer says %q", fits[i].Warnings[0].Message, n)
			}
		}
	}
	ess := strconv.FormatFloat(fits[2].Dist.Alpha+fits[2].Dist.Beta.Beta, 'f', 0, 64)
	if !strings.Contains(sec, "<li>"+htmlEscape(es[2].Name)+": α\u00a0+\u00a0β\u00a0=\u00a0"+ess+"</li>") {
		t.Errorf("the report lacks %s's α + β of %s", es[2].Name, ess)
	}
	if strings.Contains(sec, htmlEscape(es[3].Name)+": ") {
		t.Errorf("the report lists a warning for %s, whose fit has none", es[3].Name)
	}
	// The facilitator's panel keeps each expert's whole message.
	_, panel := h.get(questionPath(ws.ID, q.ID))
	for _, f := range fits[:2] {
		if !strings.Contains(panel, htmlEscape(f.Warnings[0].Message)) {
			t.Errorf("the panel lacks the message %q", f.Warnings[0].Message)
		}
	}
}

// reportSection is the part of the report about question id, from its
// section to the next question's.
func reportSection(t *testing.T, report string, id int64) string {
	t.Helper()
	i := strings.Index(report, `id="report-q`+strconv.FormatInt(id, 10)+`"`)
	if i < 0 {
		t.Fatalf("the report has no section for question %d", id)
	}
	sec := report[i:]
	if j := strings.Index(sec[1:], `<section class="report-question`); j >= 0 {
		sec = sec[:j+1]
	}
	return sec
}

// A poor fit's gap reads above the limit its lead names (0.05): a gap of
// 0.05003 is not written "0.050" (worked by hand).
func TestPoorFitGapReadsAboveTheLimit(t *testing.T) {
	for gap, want := range map[float64]string{0.05003: "0.05003", 0.0612: "0.061", 0.05000001: "0.05000001", 0.3: "0.300"} {
		if got := gapText(gap); got != want {
			t.Errorf("gapText(%v) = %q, want %q", gap, got, want)
		}
	}
}

// The final-judgement table's stated values keep each probability with
// its value when a phone's narrow column wraps them.
func TestStatedLineKeepsPairsTogether(t *testing.T) {
	got := statedLine(&record.Fit{Probs: []float64{0.05, 0.5, 0.95}, Stated: []float64{0.02, 0.06, 0.2}}, false)
	if want := "5%:\u00a00.02; 50%:\u00a00.06; 95%:\u00a00.2"; got != want {
		t.Errorf("statedLine = %q, want %q", got, want)
	}
}

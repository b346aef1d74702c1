package web

import (
	"context"
	"net/http"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// The facilitator's pages write elicit's warnings with α and β: the
// panel's judgement table and the quick priors, for a proportion (worth
// so many observed trials, α + β above the limit) and for a question in
// days (α + β itself, no trials). The numbers are elicit's own.
func TestWarningsWriteAlphaAndBeta(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	ctx := context.Background()
	days := workshop.Question{WorkshopID: ws.ID, Wording: "How many days does a pump repair take? (invented)",
		Quantity: "Repair time", Units: "days", Lower: 0, Upper: 30, Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95}}
	if err := h.db.AddQuestion(ctx, &days); err != nil {
		t.Fatal(err)
	}
	// An expert nearly certain on each question (invented answers).
	var sums []string
	for _, c := range []struct {
		q      workshop.Question
		values []float64
	}{{qs[0], []float64{0.0495, 0.05, 0.0505}}, {days, []float64{9.9, 10, 10.1}}} {
		rv := workshop.Revision{QuestionID: c.q.ID, ExpertID: es[0].ID, Answer: workshop.Answer{Values: c.values}}
		if err := h.db.SaveRevision(ctx, &rv); err != nil {
			t.Fatal(err)
		}
		fit, err := c.q.Fit(rv.Answer)
		if err != nil {
			t.Fatal(err)
		}
		if !hasCode(fit.Warnings, elicit.WarnNearCertainty) {
			t.Fatalf("Q%d: the test's answer draws no near-certainty warning: %+v", c.q.Position, fit.Warnings)
		}
		sum := strconv.FormatFloat(fit.Dist.Alpha+fit.Dist.Beta.Beta, 'f', 0, 64)
		want := "worth about " + sum + " observed trials (α + β above " + strconv.Itoa(elicit.NearCertaintyESS) + ")"
		if !c.q.IsProportion() {
			want = "prior has α + β of about " + sum + " (above " + strconv.Itoa(elicit.NearCertaintyESS) + ")"
		}
		_, body := h.get(questionPath(ws.ID, c.q.ID))
		checkWarningWords(t, "panel Q"+strconv.Itoa(c.q.Position), body, want, c.q.IsProportion())
		sums = append(sums, sum)
	}
	// The report words the warning once per question and gives each
	// expert's α + β (reportView.fitWarningGroups).
	_, report := h.get(workshopPath(ws.ID) + "/report")
	for i, q := range []workshop.Question{qs[0], days} {
		sec := reportSection(t, report, q.ID)
		limit := strconv.Itoa(elicit.NearCertaintyESS)
		want := "α\u00a0+\u00a0β is above " + limit
		if q.IsProportion() {
			want = "worth more than " + limit + " observed trials (α\u00a0+\u00a0β above " + limit + ")"
		}
		checkWarningWords(t, "report Q"+strconv.Itoa(q.Position), sec, want, q.IsProportion())
		checkWarningWords(t, "report Q"+strconv.Itoa(q.Position), sec, es[0].Name+": α\u00a0+\u00a0β\u00a0=\u00a0"+sums[i], q.IsProportion())
	}

	// A U-shaped mean and SD, and a very narrow interval, on each scale.
	qp := quickPriorsPath(ws.ID)
	for _, c := range []struct {
		q     workshop.Question
		query string
		in    elicit.ConstructionInput
	}{
		{qs[0], "&construction=mean_sd&c_mean=0.5&c_sd=0.45", elicit.ConstructionInput{Method: elicit.MethodMeanSD, Mean: 0.5, SD: 0.45, Upper: 1}},
		{days, "&construction=mean_sd&c_mean=15&c_sd=13.5", elicit.ConstructionInput{Method: elicit.MethodMeanSD, Mean: 15, SD: 13.5, Upper: 30}},
		{qs[0], "&construction=interval&c_low=0.049&c_high=0.051&c_coverage=0.9", elicit.ConstructionInput{Method: elicit.MethodIntervalMoments, Low: 0.049, High: 0.051, Coverage: 0.9, Upper: 1}},
		{days, "&construction=interval&c_low=9.9&c_high=10.1&c_coverage=0.9", elicit.ConstructionInput{Method: elicit.MethodIntervalMoments, Low: 9.9, High: 10.1, Coverage: 0.9, Upper: 30}},
	} {
		con, err := elicit.Construct(c.in)
		if err != nil {
			t.Fatal(err)
		}
		var want string
		switch {
		case hasCode(con.Warnings, elicit.WarnUShaped):
			want = "(α = " + strconv.FormatFloat(con.Dist.Alpha, 'g', 3, 64) + " and β = " + strconv.FormatFloat(con.Dist.Beta.Beta, 'g', 3, 64) + " are both below 1)"
		case hasCode(con.Warnings, elicit.WarnNearCertainty) && c.q.IsProportion():
			want = "worth about " + strconv.FormatFloat(con.Dist.Alpha+con.Dist.Beta.Beta, 'f', 0, 64) + " observed trials (α + β above"
		case hasCode(con.Warnings, elicit.WarnNearCertainty):
			want = "prior has α + β of about " + strconv.FormatFloat(con.Dist.Alpha+con.Dist.Beta.Beta, 'f', 0, 64) + " (above"
		default:
			t.Fatalf("%s: the test's construction draws no warning to check", c.query)
		}
		res, body := h.get(qp + "?question=" + strconv.FormatInt(c.q.ID, 10) + c.query)
		if res.StatusCode != http.StatusOK {
			t.Fatalf("%s: %d", c.query, res.StatusCode)
		}
		checkWarningWords(t, "quick priors "+c.query, body, want, c.q.IsProportion())
	}
}

func hasCode(ws []elicit.Warning, code elicit.WarningCode) bool {
	for _, w := range ws {
		if w.Code == code {
			return true
		}
	}
	return false
}

func checkWarningWords(t *testing.T, page, body, want string, proportion bool) {
	t.Helper()
	if !strings.Contains(body, htmlEscape(want)) {
		t.Errorf("%s lacks %q", page, want)
	}
	for _, ascii := range []string{"alpha+beta", "(alpha ", " beta 0", " beta 1"} {
		if strings.Contains(body, ascii) {
			t.Errorf("%s writes %q", page, ascii)
		}
	}
	if !proportion && strings.Contains(body, "observed trials") {
		t.Errorf("%s speaks of observed trials on a question that is not a proportion", page)
	}
}

// A fit whose 5% point lies 5.0e-18 above a bound of 10 is written "10"
// (elicit.TestFitPointsBeyondDoubleAreSaid, R 4.2.2's qbeta): the
// facilitator's panel gives elicit's warning with the distance, and the
// report groups it under its own title with each expert's particulars.
func TestPointWrittenAsABoundOnThePanelAndReport(t *testing.T) {
	h, ws, _, es, _ := seeded(t)
	ctx := context.Background()
	q := workshop.Question{WorkshopID: ws.ID, Wording: "How many days does a gasket swap take? (invented)",
		Quantity: "Swap time", Units: "days", Lower: 10, Upper: 20, Format: workshop.FormatQuantiles, Probs: []float64{0.4, 0.5, 0.9}}
	if err := h.db.AddQuestion(ctx, &q); err != nil {
		t.Fatal(err)
	}
	rv := workshop.Revision{QuestionID: q.ID, ExpertID: es[0].ID, Answer: workshop.Answer{Values: []float64{10.00001, 10.1, 16}}}
	if err := h.db.SaveRevision(ctx, &rv); err != nil {
		t.Fatal(err)
	}
	want := "The fitted 5% point lies about 5.0e-18 above the lower bound, 10: nearer the bound than the computer"
	if _, body := h.get(questionPath(ws.ID, q.ID)); !strings.Contains(body, want) {
		t.Errorf("the panel lacks %q", want)
	}
	_, report := h.get(workshopPath(ws.ID) + "/report")
	sec := reportSection(t, report, q.ID)
	for _, w := range []string{"Point written as a bound", "so the report writes it as the bound itself", es[0].Name, want} {
		if !strings.Contains(sec, w) {
			t.Errorf("the report's section lacks %q:\n%s", w, sec)
		}
	}
}

// A fitted point close to a bound keeps its own side of it on the
// facilitator's pages, as on the expert's: 0.9997, 0.9999 and 0.999985
// at 5/50/95 fit a 95% point of 0.9999833 (`parley fit`), which four
// figures wrote as "1", the bound, in the panel's fits, its pool and
// single Beta, and the report.
func TestFacilitatorPointsKeepOffTheBound(t *testing.T) {
	h, ws, _, es, _ := seeded(t)
	ctx := context.Background()
	q := workshop.Question{WorkshopID: ws.ID, Wording: "What share of relays close on demand? (invented)",
		Quantity: "Closing share", Units: "proportion", Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95}}
	if err := h.db.AddQuestion(ctx, &q); err != nil {
		t.Fatal(err)
	}
	for _, e := range es[:2] {
		rv := workshop.Revision{QuestionID: q.ID, ExpertID: e.ID, Answer: workshop.Answer{Values: []float64{0.9997, 0.9999, 0.999985}}}
		if err := h.db.SaveRevision(ctx, &rv); err != nil {
			t.Fatal(err)
		}
	}
	cellOne := regexp.MustCompile(`data-label="(5%|50%|95%|Mean)">\s*(≈ )?1\s*(\*)?\s*<`)
	_, panel := h.get(questionPath(ws.ID, q.ID))
	if m := cellOne.FindAllString(panel, -1); len(m) > 0 {
		t.Errorf("the panel writes points inside (0, 1) as 1: %q", m)
	}
	if !strings.Contains(panel, ">0.99998<") {
		t.Error("the panel does not write the fitted 95% point 0.99998")
	}
	_, report := h.get(workshopPath(ws.ID) + "/report")
	sec := reportSection(t, report, q.ID)
	// The stated 0.999985 (0.99999 to five figures) and the fitted
	// 0.99998 keep off 1 too.
	if strings.Contains(sec, "95%:\u00a01<") || !strings.Contains(sec, "95%:\u00a00.99999<") || !strings.Contains(sec, "<td>0.99998</td>") {
		t.Error("the report writes the stated 95% value or the fitted 95% point as 1")
	}
}

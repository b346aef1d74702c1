package web

import (
	"context"
	"html"
	"math"
	"net/http"
	"net/url"
	"os"
	"regexp"
	"sort"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// repeatedIDs lists the ids a page gives more than one element.
func repeatedIDs(body string) []string {
	seen := map[string]int{}
	for _, m := range regexp.MustCompile(`\sid="([^"]*)"`).FindAllStringSubmatch(body, -1) {
		seen[m[1]]++
	}
	var twice []string
	for id, n := range seen {
		if n > 1 {
			twice = append(twice, id)
		}
	}
	sort.Strings(twice)
	return twice
}

// An id is one a page. The study page's data form and planning form both
// have a field named trials, and both took the id f-trials: the label
// "Planned number of trials" named the data form's field (a tap on it
// put the cursor in the data form), and the planned trials had no label.
// The assurance's heading and its picture were both "assurance", and the
// report's question and its picture both "report-qN".
func TestStudyAndReportGiveEachIDOnce(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	sp := studyPath(ws.ID, qs[0].ID)
	if res, body := h.post(sp+"/data", url.Values{"successes": {"3"}, "trials": {"120"},
		"source": {"Site log (invented)"}, "observed_on": {"2026-03-31"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("record data: %d %s", res.StatusCode, body)
	}
	plan := sp + "?trials=200&direction=below&threshold=0.08&confidence=0.95&length=0.04"
	for _, page := range []string{sp, plan, workshopPath(ws.ID) + "/report"} {
		res, body := h.get(page)
		if res.StatusCode != http.StatusOK {
			t.Fatalf("%s: %d", page, res.StatusCode)
		}
		if twice := repeatedIDs(body); len(twice) > 0 {
			t.Errorf("%s gives these ids to more than one element: %q", page, twice)
		}
	}
	// The planned trials' label names the planning form's field.
	_, body := h.get(plan)
	_, form, ok := strings.Cut(body, `<form method="get" action="`+sp+`#plan"`)
	if !ok {
		t.Fatal("the study page has no planning form")
	}
	form, _, _ = strings.Cut(form, "</form>")
	m := regexp.MustCompile(`<label for="([^"]+)">Planned number of trials</label>`).FindStringSubmatch(form)
	if m == nil {
		t.Fatal("the planning form has no label for the planned trials")
	}
	if !strings.Contains(form, `id="`+m[1]+`" name="trials" value="200"`) {
		t.Errorf("the label of the planned trials names %q, which is not the planning form's trials field", m[1])
	}
	// A refused number of trials is said beside the planning form's field.
	_, body = h.get(sp + "?trials=0")
	if !regexp.MustCompile(`id="f-plan-trials" name="trials" value="0"\s+aria-invalid="true" aria-describedby="err-trials"`).MatchString(body) ||
		strings.Count(body, `id="err-trials"`) != 1 {
		t.Error("a refused number of trials is not tied to the planning form's field")
	}
}

// A plan's address names the prior it is planned under by a key that
// stays when the list of priors changes. The choices were numbered by
// their place in the list, so the address of a plan under the agreed
// prior (a bookmark, a link sent to a colleague) planned under the
// performance-weight pool once one more expert had answered.
func TestPlanAddressKeepsItsPriorWhenAnExpertAnswers(t *testing.T) {
	h, ws, qs, _, links := seeded(t)
	sp := studyPath(ws.ID, qs[0].ID)
	_, body := h.get(sp)
	opt := regexp.MustCompile(`<option value="([^"]+)"[^>]*>Agreed prior: `).FindStringSubmatch(body)
	if opt == nil {
		t.Fatal("no agreed prior to plan under")
	}
	plan := sp + "?prior=" + url.QueryEscape(opt[1]) + "&trials=100"
	if _, body := h.get(plan); !strings.Contains(body, "<h3>Planned under: Agreed prior, ") {
		t.Fatal("the plan is not under the agreed prior")
	}
	// Priya Raman, who had not answered the first question, answers it.
	var priya string
	for _, l := range links {
		if l.Name == "Priya Raman" {
			priya = l.Path
		}
	}
	if priya == "" {
		t.Fatal("the demo has no Priya Raman")
	}
	answer := url.Values{"values[0]": {"0.02"}, "values[1]": {"0.05"}, "values[2]": {"0.1"}, "reason": {"Invented: the supplier audit."}}
	if res, body := h.post(priya+"q/"+strconv.FormatInt(qs[0].ID, 10)+"/save", answer); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("Priya's answer: %d %s", res.StatusCode, body)
	}
	if _, body := h.get(sp); !strings.Contains(body, ">Priya Raman: Beta(") {
		t.Fatal("Priya's fit is not among the priors")
	}
	res, body := h.get(plan)
	if res.StatusCode != http.StatusOK || !strings.Contains(body, "<h3>Planned under: Agreed prior, ") {
		i := strings.Index(body, "<h3>Planned under:")
		t.Errorf("the same address plans under another prior: %d %.80s", res.StatusCode, body[max(i, 0):])
	}
}

// The comparison of priors ends with the uniform Beta(1, 1), the posterior
// the data give alone: beside it the lead sees how far the panel's
// judgement moves the conclusion. Its numbers are R's
// (testdata/r/uniform_reference.R, R 4.2.2: qbeta and the shortest
// interval by optimize), for data recorded as one batch.
func TestStudyComparesWithTheUniformPrior(t *testing.T) {
	raw, err := os.ReadFile("../testdata/r/uniform_reference.csv")
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(string(raw)), "\n")
	if !strings.HasPrefix(lines[0], "# R version") || len(lines) < 3 {
		t.Fatalf("uniform_reference.csv does not name the R that made it: %q", lines[0])
	}
	number := regexp.MustCompile(`[0-9][0-9.e+-]*`)
	near := func(shown string, want float64) bool {
		got, err := strconv.ParseFloat(shown, 64)
		return err == nil && (got == want || math.Abs(got-want) <= 5e-4*math.Abs(want))
	}
	for _, line := range lines[2:] {
		f := strings.Split(line, ",")
		want := make([]float64, len(f))
		for i, s := range f {
			want[i], _ = strconv.ParseFloat(s, 64)
		}
		h, ws, qs, _, _ := seeded(t)
		sp := studyPath(ws.ID, qs[0].ID)
		if res, body := h.post(sp+"/data", url.Values{"successes": {f[0]}, "trials": {f[1]},
			"source": {"Site log (invented)"}, "observed_on": {"2026-03-31"}}); res.StatusCode != http.StatusSeeOther {
			t.Fatalf("record %s in %s: %d %s", f[0], f[1], res.StatusCode, body)
		}
		_, body := h.get(sp)
		_, observed, ok := strings.Cut(body, "<h3>For the recorded data</h3>")
		if !ok {
			t.Fatal("no comparison for the recorded data")
		}
		observed, _, _ = strings.Cut(observed, "</table>")
		_, row, ok := strings.Cut(observed, `<th scope="row">`+htmlEscape(referenceName)+`</th>`)
		if !ok {
			t.Fatalf("%s in %s: the comparison has no row for the uniform prior", f[0], f[1])
		}
		row, _, _ = strings.Cut(row, "</tr>")
		cells := regexp.MustCompile(`<td[^>]*>([^<]*)</td>`).FindAllStringSubmatch(row, -1)
		if len(cells) != 6 || cells[0][1] != "Beta(1, 1)" || cells[1][1] != "Beta("+f[2]+", "+f[3]+")" {
			t.Fatalf("%s in %s: the uniform prior's row reads %q", f[0], f[1], cells)
		}
		eq, hd := number.FindAllString(cells[3][1], -1), number.FindAllString(cells[4][1], -1)
		if !near(cells[2][1], want[4]) || len(eq) != 2 || !near(eq[0], want[5]) || !near(eq[1], want[6]) ||
			len(hd) != 2 || !near(hd[0], want[7]) || !near(hd[1], want[8]) {
			t.Errorf("%s in %s: the uniform prior's posterior reads mean %s, %s, %s; R gives %v", f[0], f[1], cells[2][1], cells[3][1], cells[4][1], want[4:])
		}
		// It is a row of the comparison, not a prior to plan under (it
		// may judge success, TestStudyJudgesSuccessUnderAnAnalysisPrior).
		_, planUnder, _ := strings.Cut(body, `<select id="f-prior"`)
		planUnder, _, _ = strings.Cut(planUnder, "</select>")
		if planUnder == "" || strings.Contains(planUnder, `<option value="uniform"`) {
			t.Error("the uniform prior is offered to plan under")
		}
	}
}

// The day data were observed, 2026-03-31, can be typed on a phone: its
// field asked for the decimal keypad (inputmode="decimal"), which on an
// iPhone has the digits and a decimal point and no hyphen. The counts
// keep the keypad.
func TestObservedDayTakesAHyphenOnAPhone(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	_, body := h.get(studyPath(ws.ID, qs[0].ID))
	field := regexp.MustCompile(`<input[^>]*name="observed_on"[^>]*>`).FindString(body)
	if field == "" {
		t.Fatal("the data form has no field for the day observed")
	}
	if m := regexp.MustCompile(`inputmode="(\w+)"`).FindStringSubmatch(field); m != nil {
		t.Errorf("the day observed asks for the %s keypad, which has no hyphen on an iPhone: %s", m[1], field)
	}
	for _, name := range []string{"successes", "trials"} {
		if !regexp.MustCompile(`<input type="text" inputmode="decimal"[^>]*name="` + name + `"`).MatchString(body) {
			t.Errorf("the %s lost the decimal keypad", name)
		}
	}
}

// The words above the comparison name the priors its rows are: they
// named the pools under equal and performance weights whatever the rows
// were, so the pool under custom weights in force, a row of its own,
// went unnamed.
func TestComparisonSaysWhichPriorsItUpdates(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	sp := studyPath(ws.ID, qs[0].ID)
	hint := func() string {
		_, body := h.get(sp + "?trials=100")
		_, after, _ := strings.Cut(body, `<section id="compare" class="card">`)
		_, after, _ = strings.Cut(after, `<p class="hint">`)
		words, _, _ := strings.Cut(after, "</p>")
		return strings.Join(strings.Fields(html.UnescapeString(words)), " ")
	}
	want := "The same data update each expert's own fit, the equal-weight pool, the performance-weight pool (suggested) and the agreed prior; each pool enters by its single Beta."
	if got := hint(); !strings.HasPrefix(got, want) {
		t.Errorf("the comparison under equal weights says %q, want %q", got, want)
	}
	// The table's last column, "Data's weight", is said in words.
	if got := hint(); !strings.Contains(got, "The data's weight is their share of the posterior mean, n / (α + β + n)") {
		t.Errorf("the comparison does not say what the data's weight is: %q", got)
	}
	if err := h.db.SetWeights(context.Background(), &workshop.Weights{WorkshopID: ws.ID, Scheme: workshop.WeightsCustom, Reason: "Invented: audits.",
		ByExpert: map[int64]float64{es[0].ID: 3, es[1].ID: 1, es[2].ID: 1, es[3].ID: 1}}); err != nil {
		t.Fatal(err)
	}
	_, body := h.get(sp + "?trials=100")
	if !strings.Contains(body, `<th scope="row">Custom-weight pool (in force)</th>`) {
		t.Fatal("no row for the pool under the custom weights in force")
	}
	want = "The same data update each expert's own fit, the equal-weight pool, the custom-weight pool (in force), the performance-weight pool (suggested) and the agreed prior; each pool enters by its single Beta."
	if got := hint(); !strings.HasPrefix(got, want) {
		t.Errorf("the comparison under custom weights says %q, want %q", got, want)
	}
}

// Without an agreed prior a study is planned, unless another prior is
// asked for, under the pool of the weights in force. It was planned
// under the last prior offered, the performance-weight pool even when
// only suggested: the demo's second question, under equal weights, was
// planned under performance weights that gave one expert all the weight.
func TestStudyWithoutAnAgreedPriorPlansUnderThePoolInForce(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	sp := studyPath(ws.ID, qs[1].ID)
	planned := func() string {
		_, body := h.get(sp)
		m := regexp.MustCompile(`<h3>Planned under: ([^,<]+),`).FindStringSubmatch(body)
		if m == nil {
			t.Fatal("the study page plans under no prior")
		}
		return html.UnescapeString(m[1])
	}
	if _, body := h.get(sp); !strings.Contains(body, ">Performance-weight pool (suggested): Beta(") || strings.Contains(body, "Agreed prior: Beta(") {
		t.Fatal("the demo's second question no longer offers a suggested performance-weight pool without an agreed prior")
	}
	if got := planned(); got != "Equal-weight pool" {
		t.Errorf("under equal weights the study is planned under %q", got)
	}
	if err := h.db.SetWeights(context.Background(), &workshop.Weights{WorkshopID: ws.ID, Scheme: workshop.WeightsCustom, Reason: "Invented: audits.",
		ByExpert: map[int64]float64{es[0].ID: 3, es[1].ID: 1, es[2].ID: 1, es[3].ID: 1}}); err != nil {
		t.Fatal(err)
	}
	if got := planned(); got != "Custom-weight pool (in force)" {
		t.Errorf("under custom weights the study is planned under %q", got)
	}
	// With an agreed prior, under it (the demo's first question).
	_, body := h.get(studyPath(ws.ID, qs[0].ID))
	if !strings.Contains(body, "<h3>Planned under: Agreed prior, ") {
		t.Error("the first question is not planned under its agreed prior")
	}
}

// Custom weights in force under which no pool forms (the one expert they
// weigh has left; the others, weighed 0, count for nothing): the study
// is planned under the equal-weight pool, not under the performance
// weights only suggested, which it was as the last prior offered.
func TestStudyPlansUnderTheEqualPoolWhenThePoolInForceDoesNotForm(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	ctx := context.Background()
	if err := h.db.SetWeights(ctx, &workshop.Weights{WorkshopID: ws.ID, Scheme: workshop.WeightsCustom, Reason: "Invented: audits.",
		ByExpert: map[int64]float64{es[0].ID: 1, es[1].ID: 0, es[2].ID: 0, es[3].ID: 0}}); err != nil {
		t.Fatal(err)
	}
	if err := h.db.RevokeExpert(ctx, es[0].ID, "Invented: left the project."); err != nil {
		t.Fatal(err)
	}
	_, body := h.get(studyPath(ws.ID, qs[1].ID))
	if !strings.Contains(body, ">Performance-weight pool (suggested): Beta(") || strings.Contains(body, "Custom-weight pool (in force): Beta(") {
		t.Fatal("the demo's second question no longer offers a suggested performance-weight pool and no pool under the custom weights")
	}
	m := regexp.MustCompile(`<h3>Planned under: ([^,<]+),`).FindStringSubmatch(body)
	if m == nil || html.UnescapeString(m[1]) != "Equal-weight pool" {
		t.Errorf("planned under %v; want the equal-weight pool", m)
	}
}

// An address from before the priors were named by key numbers its prior
// (prior=0): the plan is refused with a message that says why and asks
// for the prior again, not the bare "must be one of the offered choices",
// and no plan is drawn under a guess.
func TestNumberedPriorAddressSaysToChooseAgain(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	sp := studyPath(ws.ID, qs[0].ID)
	res, body := h.get(sp + "?prior=0&trials=60")
	if res.StatusCode != http.StatusUnprocessableEntity {
		t.Fatalf("status %d, want 422", res.StatusCode)
	}
	if want := html.EscapeString(string(ruleNumberedPrior)); !strings.Contains(body, want) {
		t.Errorf("the page does not say %q: %.3000s", ruleNumberedPrior, body)
	}
	if strings.Contains(body, "<h3>Planned under: ") {
		t.Error("a plan was drawn for a numbered prior")
	}
	// A key that is not a number keeps the general message.
	if _, body := h.get(sp + "?prior=expert-x&trials=60"); !strings.Contains(body, string(ruleChoice)) || strings.Contains(body, "earlier version") {
		t.Errorf("an unknown key: want %q alone", ruleChoice)
	}
}

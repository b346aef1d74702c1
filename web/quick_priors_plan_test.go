package web

import (
	"html"
	"net/http"
	"net/url"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

// planLinks are the quick-priors page's links to a study plan judged
// under a prior it made, unescaped.
func planLinks(body string) []string {
	var out []string
	for _, m := range regexp.MustCompile(`<a href="([^"]*/study\?[^"]*)">Plan a study analysed under`).FindAllStringSubmatch(body, -1) {
		out = append(out, html.UnescapeString(m[1]))
	}
	return out
}

// A prior made on the quick-priors page for a proportion links to the
// study page's plan with that prior as the study's analysis prior (a
// Beta of the lead's own), its α and β exactly as made: a sceptical prior
// set from an interval feeds the plan without being typed again.
func TestQuickPriorFeedsTheStudysAnalysisPrior(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	q := qs[0]
	agreeSample(t, h, q.ID, 2, 40, "about 2 in 40 (invented)")
	if !q.IsProportion() {
		t.Fatalf("the demo's first question is not a proportion: %+v", q)
	}
	qp := quickPriorsPath(ws.ID) + "?question=" + strconv.FormatInt(q.ID, 10)
	_, body := h.get(qp + "&construction=interval&c_low=0.1&c_high=0.3&c_coverage=0.9")
	links := planLinks(body)
	if len(links) != 2 {
		t.Fatalf("the interval's two methods: %d plan links, want 2", len(links))
	}
	_, body = h.get(qp + "&construction=mean_sd&c_mean=0.2&c_sd=0.05")
	links = planLinks(body)
	if len(links) != 1 {
		t.Fatalf("mean and SD: %d plan links, want 1", len(links))
	}
	c, err := elicit.Construct(elicit.ConstructionInput{Method: elicit.MethodMeanSD, Mean: 0.2, SD: 0.05, Upper: 1})
	if err != nil {
		t.Fatal(err)
	}
	u, err := url.Parse(links[0])
	if err != nil {
		t.Fatal(err)
	}
	if u.Path != studyPath(ws.ID, q.ID) || u.Fragment != "plan" {
		t.Errorf("link goes to %s#%s, want the study page's plan", u.Path, u.Fragment)
	}
	a, _ := strconv.ParseFloat(u.Query().Get("analysis_alpha"), 64)
	b, _ := strconv.ParseFloat(u.Query().Get("analysis_beta"), 64)
	if u.Query().Get("analysis") != ownAnalysis || a != c.Dist.Alpha || b != c.Dist.Beta.Beta {
		t.Errorf("link carries analysis %q, Beta(%v, %v); want own, Beta(%v, %v) exactly", u.Query().Get("analysis"), a, b, c.Dist.Alpha, c.Dist.Beta.Beta)
	}
	// Followed with a success criterion added, as the lead would on the
	// page, the plan is judged under that Beta: the assurance is
	// elicit.AssuranceUnder's with the agreed Beta(2, 38) as the design
	// prior and the made Beta as the analysis prior.
	qv := u.Query()
	qv.Set("threshold", "0.1")
	qv.Set("direction", "below")
	qv.Set("confidence", "0.8")
	res, page := h.get(u.Path + "?" + qv.Encode())
	if res.StatusCode != http.StatusOK {
		t.Fatalf("the plan from the link: status %d", res.StatusCode)
	}
	want, err := elicit.AssuranceUnder(elicit.Beta{Alpha: 2, Beta: 38}, c.Dist.Beta, defaultPlanTrials,
		elicit.SuccessCriterion{Threshold: 0.1, Direction: elicit.DirectionBelow, Confidence: 0.8})
	if err != nil {
		t.Fatal(err)
	}
	text := strings.Join(strings.Fields(html.UnescapeString(stripTags(page))), " ")
	shown := "and " + pct(want.Assurance) + " at " + strconv.Itoa(defaultPlanTrials) + "."
	if want.Assurance == 0 || !strings.Contains(text, "your own analysis prior, "+betaText(c.Dist.Beta)) || !strings.Contains(text, shown) {
		t.Errorf("the plan from the link is not judged under %s: %q shown: %v", betaText(c.Dist.Beta), shown, strings.Contains(text, shown))
	}
	// The study page points the other way, to where such a Beta is made.
	_, page = h.get(studyPath(ws.ID, q.ID))
	if !strings.Contains(page, `href="`+quickPriorsPath(ws.ID)+`"`) {
		t.Error("the study page's own analysis prior does not point to the quick priors")
	}
}

// The study page's link to the quick priors carries its plan, and the
// prior made there links back to that plan (its prior planned under,
// trials and success criterion) with the prior as the analysis prior,
// where it went back to a fresh plan of 100 trials. The quick-priors page
// reached from the link asks nothing yet and offers the study's question.
func TestQuickPriorsComeBackToThePlan(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	q := qs[0]
	agreeSample(t, h, q.ID, 2, 40, "about 2 in 40 (invented)")
	plan := url.Values{"prior": {"agreed"}, "trials": {"150"}, "threshold": {"0.1"}, "direction": {"below"}, "confidence": {"0.8"}}
	res, body := h.get(studyPath(ws.ID, q.ID) + "?" + plan.Encode())
	if res.StatusCode != http.StatusOK {
		t.Fatalf("the plan: %d", res.StatusCode)
	}
	m := regexp.MustCompile(`<a href="([^"]*/quick-priors\?[^"]*)">quick priors</a>`).FindStringSubmatch(body)
	if m == nil {
		t.Fatalf("no link to the quick priors with the plan: %.3000s", body)
	}
	quick := html.UnescapeString(m[1])
	res, body = h.get(quick)
	if res.StatusCode != http.StatusOK || strings.Contains(body, "Nothing was made") {
		t.Fatalf("the quick priors from the plan: %d, refused: %v", res.StatusCode, strings.Contains(body, "Nothing was made"))
	}
	if !strings.Contains(body, `<option value="`+strconv.FormatInt(q.ID, 10)+`" selected>`) {
		t.Error("the study's question is not the one chosen")
	}
	if !regexp.MustCompile(`<input type="hidden" name="plan" value="[^"]*trials=150`).MatchString(body) {
		t.Error("the construction form does not carry the plan")
	}
	if !strings.Contains(html.UnescapeString(body), "You came from Q1's study plan: a prior made here for Q1 links back to that plan as its analysis prior.") {
		t.Error("the page does not say its priors link back to the plan")
	}
	// The form sent, as the browser sends it: the hidden plan with the
	// construction's fields.
	u, _ := url.Parse(quick)
	form := u.Query()
	form.Set("construction", "mean_sd")
	form.Set("c_mean", "0.2")
	form.Set("c_sd", "0.05")
	_, body = h.get(u.Path + "?" + form.Encode())
	links := planLinks(body)
	if len(links) != 1 {
		t.Fatalf("%d plan links, want 1", len(links))
	}
	back, err := url.Parse(links[0])
	if err != nil {
		t.Fatal(err)
	}
	got := back.Query()
	for k := range plan {
		if got.Get(k) != plan.Get(k) {
			t.Errorf("the link back has %s=%q, want %q as planned", k, got.Get(k), plan.Get(k))
		}
	}
	if got.Get("analysis") != ownAnalysis || got.Get("analysis_alpha") == "" {
		t.Errorf("the link back does not name the prior made: %v", got)
	}
	res, page := h.get(back.Path + "?" + back.RawQuery)
	text := strings.Join(strings.Fields(html.UnescapeString(stripTags(page))), " ")
	if res.StatusCode != http.StatusOK || !strings.Contains(text, "Planned under: Agreed prior") {
		t.Errorf("the plan from the link back: %d, not under the agreed prior: %.1500s", res.StatusCode, text)
	}
	// A plan address of another question, or of another site, is not
	// carried: the link goes to a fresh plan.
	for _, other := range []string{studyPath(ws.ID, qs[1].ID) + "?trials=150", "https://example.org" + studyPath(ws.ID, q.ID) + "?trials=150"} {
		form.Set("plan", other)
		_, body = h.get(u.Path + "?" + form.Encode())
		if l := planLinks(body); len(l) != 1 || strings.Contains(l[0], "trials=150") {
			t.Errorf("plan %q carried: %v", other, l)
		}
	}
}

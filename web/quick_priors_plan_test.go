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

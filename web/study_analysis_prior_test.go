package web

import (
	"html"
	"net/http"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

// TestStudyJudgesSuccessUnderAnAnalysisPrior: the planning form's "Analysed
// under" takes the uniform as the analysis prior while the
// outcomes' chances stay the agreed prior's. Planned under Beta(2, 38)
// with 100 trials and P(θ < 0.08 | data) ≥ 0.95, the study then succeeds
// on at most 3 successes, not 4, and its assurance is 43.2%, not 54%
// (SciPy, testdata/scipy/two_prior_plan_reference.py: 0.43240,
// against plan_reference.py's 0.54026 with one prior). The page says
// which prior judges and which gives the chances; an analysis prior not
// offered is refused naming the field.
func TestStudyJudgesSuccessUnderAnAnalysisPrior(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	agreeSample(t, h, qs[0].ID, 2, 40, "about 2 in 40 (invented)")
	sp := studyPath(ws.ID, qs[0].ID)
	goal := "&trials=100&threshold=0.08&direction=below&confidence=0.95"
	res, body := h.get(sp + "?analysis=uniform" + goal)
	if res.StatusCode != http.StatusOK {
		t.Fatalf("plan: %d", res.StatusCode)
	}
	text := html.UnescapeString(body)
	for _, want := range []string{
		"the posterior taken under the uniform prior (no judgement), Beta(1, 1), the prior the study's analysis will use; each outcome's chance comes from the agreed prior.",
		">43.2%<", "at most 3 successes in 100 trials",
		`<option value="uniform" selected>Uniform: Beta(1, 1)</option>`,
	} {
		if !strings.Contains(text, want) {
			t.Errorf("plan judged under the uniform lacks %q", want)
		}
	}
	// The sample size's intervals under the uniform: 188 trials for 95%
	// equal-tailed intervals 0.06 wide on average (SciPy,
	// two_prior_plan_reference.py), where the agreed prior analysed under
	// itself needs 140 (plan_reference.py).
	_, body = h.get(sp + "?analysis=uniform&trials=100&length=0.06&level=0.95&criterion=alc&interval=equal")
	text = html.UnescapeString(body)
	for _, want := range []string{"188 trials", "The intervals are of the posterior under the uniform prior (no judgement), Beta(1, 1), the prior the study's analysis will use; each outcome's chance comes from the agreed prior."} {
		if !strings.Contains(text, want) {
			t.Errorf("sample size analysed under the uniform lacks %q", want)
		}
	}
	if _, body := h.get(sp + "?trials=100&length=0.06&level=0.95&criterion=alc&interval=equal"); !strings.Contains(body, "140 trials") {
		t.Error("the sample size analysed under the agreed prior itself is not 140 trials")
	}
	// One prior in both parts, as before.
	_, body = h.get(sp + "?" + goal[1:])
	text = html.UnescapeString(body)
	if !strings.Contains(text, "54%") || !strings.Contains(text, "at most 4 successes in 100 trials") || strings.Contains(text, "the posterior taken under") {
		t.Error("the plan without an analysis prior is not the one-prior plan")
	}
	if res, body := h.get(sp + "?analysis=sceptic" + goal); res.StatusCode != http.StatusUnprocessableEntity || !hasFieldError(body, "analysis") {
		t.Errorf("an analysis prior not offered: status %d, message beside it: %v", res.StatusCode, hasFieldError(body, "analysis"))
	}
}

// TestStudyAnalysedUnderABetaOfYourOwn: "A Beta of your own" takes the
// analysis prior's α and β as typed: Beta(1, 1) typed gives the uniform's
// plan (SciPy, two_prior_plan_reference.py: 43.2% and 188 trials for the
// agreed Beta(2, 38)), and a sceptical Beta(2, 18) judges success on its
// own posterior (elicit.AssuranceUnder's). Its α and β are refused
// beside their boxes when missing or out of range, and when typed with
// another choice, where they would be left out unsaid.
func TestStudyAnalysedUnderABetaOfYourOwn(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	agreeSample(t, h, qs[0].ID, 2, 40, "about 2 in 40 (invented)")
	sp := studyPath(ws.ID, qs[0].ID)
	goal := "&trials=100&threshold=0.08&direction=below&confidence=0.95"
	res, body := h.get(sp + "?analysis=own&analysis_alpha=1&analysis_beta=1" + goal + "&length=0.06&level=0.95&criterion=alc&interval=equal")
	text := html.UnescapeString(body)
	if res.StatusCode != http.StatusOK || !strings.Contains(text, ">43.2%<") || !strings.Contains(text, "188 trials") ||
		!strings.Contains(text, "the posterior taken under your own analysis prior, Beta(1, 1), the prior the study's analysis will use") {
		t.Errorf("Beta(1, 1) of your own: status %d, the uniform's plan shown: %v", res.StatusCode,
			strings.Contains(text, ">43.2%<") && strings.Contains(text, "188 trials"))
	}
	want, err := elicit.AssuranceUnder(elicit.Beta{Alpha: 2, Beta: 38}, elicit.Beta{Alpha: 2, Beta: 18}, 100,
		elicit.SuccessCriterion{Threshold: 0.08, Direction: elicit.DirectionBelow, Confidence: 0.95})
	if err != nil {
		t.Fatal(err)
	}
	_, body = h.get(sp + "?analysis=own&analysis_alpha=2&analysis_beta=18" + goal)
	if text := html.UnescapeString(body); !strings.Contains(text, ">"+pct(want.Assurance)+"<") || !strings.Contains(text, "your own analysis prior, Beta(2, 18)") {
		t.Errorf("Beta(2, 18) of your own: the page lacks the assurance %s", pct(want.Assurance))
	}
	for _, c := range []struct{ query, field string }{
		{"analysis=own&analysis_beta=1", "analysis_alpha"},
		{"analysis=own&analysis_alpha=0&analysis_beta=1", "analysis_alpha"},
		{"analysis=own&analysis_alpha=1&analysis_beta=1e9", "analysis_beta"},
		{"analysis=own&analysis_alpha=1&analysis_beta=one", "analysis_beta"},
		{"analysis=uniform&analysis_alpha=1", "analysis_alpha"},
		{"analysis_beta=3", "analysis_beta"},
	} {
		if res, body := h.get(sp + "?" + c.query + goal); res.StatusCode != http.StatusUnprocessableEntity || !hasFieldError(body, c.field) {
			t.Errorf("%s: status %d, message beside %s: %v", c.query, res.StatusCode, c.field, hasFieldError(body, c.field))
		}
	}
}

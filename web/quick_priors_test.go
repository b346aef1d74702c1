package web

import (
	"context"
	"net/http"
	"net/url"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/web/chart"
)

// The quick-priors page makes each construction by elicit.Construct, the
// function `parley prior` calls, and shows a central interval by both
// methods side by side with the coverage each achieves and its picture.
func TestQuickPriorsPage(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	qp := quickPriorsPath(ws.ID)
	q := strconv.FormatInt(qs[0].ID, 10)
	res, body := h.get(qp)
	if res.StatusCode != http.StatusOK || !strings.Contains(body, "Quick priors") || !strings.Contains(body, "Caution.") {
		t.Fatalf("quick priors page: %d", res.StatusCode)
	}
	// "Between 3% and 12%, 90% sure", by both methods.
	res, body = h.get(qp + "?question=" + q + "&construction=interval&c_low=0.03&c_high=0.12&c_coverage=0.9")
	if res.StatusCode != http.StatusOK {
		t.Fatalf("interval: %d", res.StatusCode)
	}
	for _, m := range []elicit.ConstructionMethod{elicit.MethodIntervalMoments, elicit.MethodIntervalQuantiles} {
		c, err := elicit.Construct(elicit.ConstructionInput{Method: m, Low: 0.03, High: 0.12, Coverage: 0.9, Upper: 1})
		if err != nil {
			t.Fatal(err)
		}
		for _, want := range []string{`id="result-` + string(m) + `"`, priorLabel(c.Dist), coveragePct(c.CoverageAchieved), htmlEscape(constructionWords(c))} {
			if !strings.Contains(body, want) {
				t.Errorf("%s: page lacks %q", m, want)
			}
		}
	}
	if !strings.Contains(body, `id="quick-interval"`) {
		t.Error("no picture of the two methods")
	}
	// "About 3 in 25": Beta(s, n − s), the convention stated.
	_, body = h.get(qp + "?question=" + q + "&construction=equivalent_sample&c_successes=3&c_trials=25")
	for _, want := range []string{"Beta(3, 22)", "s successes in n imagined trials give Beta(s, n − s)"} {
		if !strings.Contains(body, want) {
			t.Errorf("equivalent sample: page lacks %q", want)
		}
	}
	_, body = h.get(qp + "?question=" + q + "&construction=mean_sd&c_mean=0.1&c_sd=0.05")
	c, _ := elicit.Construct(elicit.ConstructionInput{Method: elicit.MethodMeanSD, Mean: 0.1, SD: 0.05, Upper: 1})
	if !strings.Contains(body, priorLabel(c.Dist)) {
		t.Errorf("mean and sd: page lacks %s", priorLabel(c.Dist))
	}
}

// Every field of the construction refuses bad input with 422 and the
// field named.
func TestQuickPriorsRefuseBadInput(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	qp := quickPriorsPath(ws.ID) + "?question=" + strconv.FormatInt(qs[0].ID, 10) + "&"
	for _, c := range []struct{ query, field string }{
		{"construction=guess", "construction"},
		{"construction=equivalent_sample&c_successes=&c_trials=25", "c_successes"},
		{"construction=equivalent_sample&c_successes=30&c_trials=25", "c_successes"},
		{"construction=equivalent_sample&c_successes=3&c_trials=1e400", "c_trials"},
		{"construction=equivalent_sample&c_successes=3&c_trials=0", "c_trials"},
		{"construction=mean_sd&c_mean=1.5&c_sd=0.1", "c_mean"},
		{"construction=mean_sd&c_mean=0.1&c_sd=0.4", "c_sd"}, // sd² above m(1 − m)
		{"construction=mean_sd&c_mean=0.1&c_sd=-1", "c_sd"},
		{"construction=interval&c_low=0.12&c_high=0.03&c_coverage=0.9", "c_high"},
		{"construction=interval&c_low=0.03&c_high=0.12&c_coverage=1", "c_coverage"},
		// Tails of 5.6e-17, beyond the accuracy envelope: refused on the
		// coverage, not on the high end by the moment match's zero sd.
		{"construction=interval&c_low=0.03&c_high=0.12&c_coverage=0.9999999999999999", "c_coverage"},
		{"construction=interval&c_low=0,03&c_high=0.12&c_coverage=0.9", "c_low"},
		{"construction=interval&c_low=0.03&c_high=1.2&c_coverage=0.9", "c_high"},
	} {
		res, body := h.get(qp + c.query)
		if res.StatusCode != http.StatusUnprocessableEntity || !hasFieldError(body, c.field) {
			t.Errorf("%s: status %d, message beside %q: %v", c.query, res.StatusCode, c.field, hasFieldError(body, c.field))
		}
	}
	if res, body := h.get(quickPriorsPath(ws.ID) + "?question=999&construction=uniform"); res.StatusCode != http.StatusUnprocessableEntity || !hasFieldError(body, "question") {
		t.Errorf("unknown question: %d", res.StatusCode)
	}
}

// A construction recorded as the agreed prior, from the quick-priors page
// and from the question's page, keeps its inputs; the record, the priors
// CSV and the page say which construction made it.
func TestConstructionRecordedAsTheAgreedPrior(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	ctx := context.Background()
	q := strconv.FormatInt(qs[0].ID, 10)
	agree := quickPriorsPath(ws.ID) + "/agree"
	form := url.Values{"question": {q}, "construction": {"interval_quantiles"}, "c_low": {"0.03"}, "c_high": {"0.12"}, "c_coverage": {"0.9"},
		"rationale": {"Between 3% and 12%, 90% sure (invented)."}, "confirm_open": {"on"}}
	// Refused first: no rationale, then a bad end; nothing saved.
	before := h.counts(ws.ID)
	bad := url.Values{}
	for k, v := range form {
		bad[k] = v
	}
	bad.Set("rationale", "")
	if res, body := h.post(agree, bad); res.StatusCode != http.StatusUnprocessableEntity || !hasFieldError(body, "rationale") {
		t.Errorf("without a rationale: %d", res.StatusCode)
	}
	bad.Set("rationale", "r")
	bad.Set("c_high", "0.02")
	if res, body := h.post(agree, bad); res.StatusCode != http.StatusUnprocessableEntity || !hasFieldError(body, "c_high") {
		t.Errorf("high below low: %d", res.StatusCode)
	}
	bad.Set("c_high", "0.12")
	bad.Set("construction", "interval")
	if res, _ := h.post(agree, bad); res.StatusCode != http.StatusUnprocessableEntity {
		t.Errorf("both methods at once: %d", res.StatusCode)
	}
	if h.counts(ws.ID) != before {
		t.Fatal("a refused construction was saved")
	}
	if res, body := h.post(agree, form); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("record the construction: %d %s", res.StatusCode, body)
	}
	in := elicit.ConstructionInput{Method: elicit.MethodIntervalQuantiles, Low: 0.03, High: 0.12, Coverage: 0.9, Upper: 1}
	want, _ := elicit.Construct(in)
	ps, _ := h.db.AgreedPriors(ctx, ws.ID)
	cur := ps[len(ps)-1]
	if cur.Source != workshop.PriorFromConstruction || cur.Construction == nil || *cur.Construction != in || cur.Dist != want.Dist {
		t.Fatalf("stored %+v, want %+v from %+v", cur, want.Dist, in)
	}
	_, panel := h.get(questionPath(ws.ID, qs[0].ID))
	if !strings.Contains(panel, "quick construction: "+htmlEscape(constructionWords(want))) {
		t.Error("the panel does not say which construction made the agreed prior")
	}
	_, js := h.get(workshopPath(ws.ID) + "/export.json")
	rec, err := record.Parse(strings.NewReader(js))
	if err != nil {
		t.Fatal(err)
	}
	if a := rec.Questions[0].AgreedPrior; a == nil || a.Construction == nil || *a.Construction != in {
		t.Fatalf("record's agreed prior %+v", a)
	}
	if _, log := h.get(workshopPath(ws.ID) + "/log"); !strings.Contains(log, "a quick construction, "+htmlEscape(constructionWords(want))) {
		t.Error("the decision log does not say which construction made the prior")
	}
	_, csv := h.get(workshopPath(ws.ID) + "/priors.csv")
	if !strings.Contains(csv, "construction: central 90% interval [0.03, 0.12] by exact quantile match") {
		t.Errorf("the priors CSV's source does not name the construction: %s", csv)
	}

	// From the question's page: "about 3 in 25".
	qp := questionPath(ws.ID, qs[0].ID) + "/agree"
	if res, body := h.post(qp, url.Values{"source": {"construction"}, "construction": {"equivalent_sample"}, "c_successes": {"3"},
		"c_trials": {"2"}, "rationale": {"kept"}, "confirm_open": {"on"}}); res.StatusCode != http.StatusUnprocessableEntity || !hasFieldError(body, "c_successes") {
		t.Errorf("3 in 2 from the panel: %d", res.StatusCode)
	}
	if res, body := h.post(qp, url.Values{"source": {"construction"}, "c_successes": {"3"}, "c_trials": {"25"}, "rationale": {"kept"},
		"confirm_open": {"on"}}); res.StatusCode != http.StatusUnprocessableEntity || !hasFieldError(body, "construction") {
		t.Errorf("no construction chosen: %d", res.StatusCode)
	}
	if res, body := h.post(qp, url.Values{"source": {"construction"}, "construction": {"equivalent_sample"}, "c_successes": {"3"},
		"c_trials": {"25"}, "rationale": {"About 3 in 25 (invented)."}, "confirm_open": {"on"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("construction from the panel: %d %s", res.StatusCode, body)
	}
	ps, _ = h.db.AgreedPriors(ctx, ws.ID)
	if cur := ps[len(ps)-1]; cur.Dist.Alpha != 3 || cur.Dist.Beta.Beta != 22 || cur.Construction == nil || cur.Construction.Method != elicit.MethodEquivalentSample {
		t.Fatalf("from the panel: %+v", cur)
	}
}

// TestQuickIntervalWhenOnlyTheQuantileMatchExists: "between 1% and 90%,
// 50% sure" has no moment match (its midpoint and half-width / z give
// sd² above m(1 − m)), but an exact quantile match does: Beta(0.19534,
// 0.26514), as `parley prior` gives by default (R 4.2: optim over qbeta
// at 0.25 and 0.75 gives 0.1953428, 0.2651380). The page refused the
// whole interval beside the high end; it now shows the quantile match,
// says why the moment match is missing, and records it.
func TestQuickIntervalWhenOnlyTheQuantileMatchExists(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	q := strconv.FormatInt(qs[0].ID, 10)
	res, body := h.get(quickPriorsPath(ws.ID) + "?question=" + q + "&construction=interval&c_low=0.01&c_high=0.9&c_coverage=0.5")
	if res.StatusCode != http.StatusOK {
		t.Fatalf("status %d, want 200", res.StatusCode)
	}
	for _, want := range []string{
		"Beta(0.1953, 0.2651)", // R: 0.1953428, 0.2651380
		"Central interval, moment match: no Beta from this interval. Variance must be below m(1-m)",
		`name="construction" value="interval_quantiles"`,
		"variance 0.435281, m(1-m) = 0.247975)", // six figures, not 0.4352806017203691
	} {
		if !strings.Contains(body, want) && !strings.Contains(body, htmlEscape(want)) {
			t.Errorf("page lacks %q", want)
		}
	}
	if strings.Contains(body, `value="interval_moments">Record`) || hasFieldError(body, "c_high") {
		t.Error("the moment match is offered for recording, or the interval is refused")
	}
	priors := func() int {
		ps, err := h.db.AgreedPriors(context.Background(), ws.ID)
		if err != nil {
			t.Fatal(err)
		}
		return len(ps)
	}
	before := priors()
	res, _ = h.post(quickPriorsPath(ws.ID)+"/agree", url.Values{"question": {q}, "construction": {"interval_quantiles"}, "c_low": {"0.01"},
		"c_high": {"0.9"}, "c_coverage": {"0.5"}, "rationale": {"Wide on purpose (invented)."}, "confirm_open": {"on"}})
	if res.StatusCode != http.StatusSeeOther || priors() != before+1 {
		t.Errorf("recording the quantile match: status %d", res.StatusCode)
	}
}

// TestQuickPriorBeyondDoubleIsSaid: mean 0.5 and sd 0.4999 make
// Beta(2.0006e-4, 2.0006e-4), whose 5% point is about 3.2e-4999 (DLMF
// 8.17.8's leading term, evaluated in R 4.2.2: log10 −4998.5002), shown
// as 0. The page showed "0, 0.5, 1" and nothing else; it now says why,
// with the values, as `parley prior` does.
func TestQuickPriorBeyondDoubleIsSaid(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	q := strconv.FormatInt(qs[0].ID, 10)
	res, body := h.get(quickPriorsPath(ws.ID) + "?question=" + q + "&construction=mean_sd&c_mean=0.5&c_sd=0.4999")
	if res.StatusCode != http.StatusOK {
		t.Fatalf("status %d", res.StatusCode)
	}
	if !strings.Contains(body, htmlEscape("The 5% point is about 3.2e-4999, and the 95% point is about 1 − 3.2e-4999")) {
		t.Errorf("page does not say where the 5%% and 95%% points are:\n%s", body)
	}
}

// TestQuickPriorsWriteOneBetaOneWay: the quick priors page wrote "Beta(3,
// 20000)" over a description that said "= Beta(3, 19997.4)" for the same
// prior, and a coverage the card wrote to three figures to four in the
// words under it. A page writes a Beta, and a percentage, one way: the
// description as the card around it does (sv, pct), on the quick priors
// page, on the question's panel once the prior is agreed, and in the log.
// The record keeps every figure (elicit.Construction.Describe, which
// `parley prior` prints and the priors CSV carries).
func TestQuickPriorsWriteOneBetaOneWay(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	q := strconv.FormatInt(qs[0].ID, 10)
	qp := quickPriorsPath(ws.ID)
	in := elicit.ConstructionInput{Method: elicit.MethodEquivalentSample, Successes: 3, Trials: 20000.4, Upper: 1}
	c, err := elicit.Construct(in)
	if err != nil {
		t.Fatal(err)
	}
	full := strconv.FormatFloat(c.Dist.Beta.Beta, 'g', -1, 64) // 19997.4
	if full == sv(c.Dist.Beta.Beta) {
		t.Fatalf("the case does not tell the two writings apart: %s", full)
	}
	shown := "Beta(" + sv(c.Dist.Alpha) + ", " + sv(c.Dist.Beta.Beta) + ")"
	_, body := h.get(qp + "?question=" + q + "&construction=equivalent_sample&c_successes=3&c_trials=20000.4")
	if !strings.Contains(body, shown) || !strings.Contains(body, "Beta(s, n − s) = "+shown) {
		t.Errorf("the page does not write the description's Beta as its own %s", shown)
	}
	// Written, that is: the plan link's address carries every figure.
	if strings.Contains(stripTags(body), full) {
		t.Errorf("the page writes the Beta's β as %s beside %s", full, shown)
	}
	if !strings.Contains(c.Describe(), "= Beta(3, "+full+")") {
		t.Errorf("the record's words lost their figures: %s", c.Describe())
	}
	// An interval: "it holds" the coverage the card says it achieves.
	_, body = h.get(qp + "?question=" + q + "&construction=interval&c_low=0.03&c_high=0.12&c_coverage=0.9")
	for _, m := range []elicit.ConstructionMethod{elicit.MethodIntervalMoments, elicit.MethodIntervalQuantiles} {
		ic, err := elicit.Construct(elicit.ConstructionInput{Method: m, Low: 0.03, High: 0.12, Coverage: 0.9, Upper: 1})
		if err != nil {
			t.Fatal(err)
		}
		if want := "it holds " + coveragePct(ic.CoverageAchieved); !strings.Contains(body, want) {
			t.Errorf("%s: the description does not say %q, as the card does", m, want)
		}
	}
	// Agreed, the panel and the log word it as the page did (the panel's
	// code snippets for Stan, R, … keep every figure, as code must).
	form := url.Values{"question": {q}, "construction": {"equivalent_sample"}, "c_successes": {"3"}, "c_trials": {"20000.4"},
		"rationale": {"About 3 in 20,000 (invented)."}, "confirm_open": {"on"}}
	if res, body := h.post(qp+"/agree", form); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("record the construction: %d %s", res.StatusCode, body)
	}
	_, panel := h.get(questionPath(ws.ID, qs[0].ID))
	_, log := h.get(workshopPath(ws.ID) + "/log")
	for name, page := range map[string]string{"the panel": panel, "the log": log} {
		if !strings.Contains(page, "= "+shown) || strings.Contains(page, "= Beta(3, "+full+")") {
			t.Errorf("%s does not write the construction's Beta as %s", name, shown)
		}
	}
}

// TestQuickPriorsWriteAPointOneWay: the quick priors card wrote a rare
// event's 5% point "4.089e-5" in its summary and "0.00004089" in the
// percentiles table under its picture, one number two ways. The card,
// and the interval's comparison table, write a prior's mean and
// quantiles as the picture's table and the question's panel do, in plain
// decimals down to 1e-9 (chart.FormatWithin, DEVELOPERS.md's rule for a
// value of a judgement), each the same wherever the page writes it; the
// words under the Beta write the typed inputs as typed (input.Typed),
// where %g wrote a low end of 0.00003 "3e-05".
func TestQuickPriorsWriteAPointOneWay(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	q := strconv.FormatInt(qs[0].ID, 10)
	qp := quickPriorsPath(ws.ID)
	for _, tc := range []struct {
		query string
		in    []elicit.ConstructionInput
	}{
		{"construction=equivalent_sample&c_successes=3&c_trials=20000.4",
			[]elicit.ConstructionInput{{Method: elicit.MethodEquivalentSample, Successes: 3, Trials: 20000.4, Upper: 1}}},
		{"construction=interval&c_low=0.00003&c_high=0.0003&c_coverage=0.9",
			[]elicit.ConstructionInput{{Method: elicit.MethodIntervalMoments, Low: 0.00003, High: 0.0003, Coverage: 0.9, Upper: 1},
				{Method: elicit.MethodIntervalQuantiles, Low: 0.00003, High: 0.0003, Coverage: 0.9, Upper: 1}}},
	} {
		res, body := h.get(qp + "?question=" + q + "&" + tc.query)
		if res.StatusCode != http.StatusOK {
			t.Fatalf("%s: status %d", tc.query, res.StatusCode)
		}
		exponents := 0
		for _, in := range tc.in {
			c, err := elicit.Construct(in)
			if err != nil {
				t.Fatal(err)
			}
			d := c.Dist
			for _, x := range []float64{d.Mean(), d.Quantile(0.05), d.Quantile(0.5), d.Quantile(0.95)} {
				plain := chart.FormatWithin(x, d.Lower, d.Upper, false)
				if strings.Contains(plain, "e") {
					t.Fatalf("%s: %v written %s", in.Method, x, plain)
				}
				if e := chart.FormatValue(x); e != plain {
					exponents++
					if regexp.MustCompile(`(^|[^0-9.])` + regexp.QuoteMeta(e) + `($|[^0-9])`).MatchString(body) {
						t.Errorf("%s: the page writes %s as %s beside %s", in.Method, plain, e, plain)
					}
				}
				if !strings.Contains(body, plain) {
					t.Errorf("%s: the page does not write %s", in.Method, plain)
				}
			}
			// The summary and the picture's percentiles table both write
			// the 5% point.
			if p5 := chart.FormatWithin(d.Quantile(0.05), d.Lower, d.Upper, false); strings.Count(body, p5) < 2 {
				t.Errorf("%s: the 5%% point %s is written %d times, want in the summary and under the picture", in.Method, p5, strings.Count(body, p5))
			}
		}
		if exponents == 0 {
			t.Fatalf("%s: the case does not tell the two writings apart", tc.query)
		}
		// The words say the typed ends as typed: "[3e-05, 0.0003]" stood
		// above a 5% point of 0.00003.
		if strings.Contains(tc.query, "c_low") && !strings.Contains(body, "interval [0.00003, 0.0003]") {
			t.Errorf("%s: the words do not write the interval as typed, [0.00003, 0.0003]", tc.query)
		}
	}
}

// TestASpreadReadsAsThePointsBesideIt: a rare event's prior, Beta(3,
// 20000), had its SD written "8.658e-5" (fv, exponents below 1e-4)
// beside its 5% point "0.00004089" (fvIn, plain decimals down to 1e-9),
// one line in two ways, on every page that writes a prior's SD. Every SD,
// and every mean on the line or in the table of such points, reads as
// the points do (chart.FormatSpread; the study's posterior, a proportion,
// by fvIn on [0, 1]): the quick priors card, the question's panel (the
// pool's table, its best single Beta, the agreed prior), the study page
// (the agreed prior, the posterior, the plan, the comparison of priors)
// and the report (the pool's line, the agreed priors' table, the
// posterior's line).
func TestASpreadReadsAsThePointsBesideIt(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	q := qs[0]
	ctx := context.Background()
	// Four experts judge the rare event (invented values), so the pool
	// and its single Beta are rare too.
	for i, e := range es {
		vs := [][]float64{{0.00003, 0.0001, 0.00025}, {0.00005, 0.00015, 0.0004}, {0.00002, 0.00008, 0.0002}, {0.00004, 0.00012, 0.0003}}[i%4]
		rv := workshop.Revision{QuestionID: q.ID, ExpertID: e.ID, Answer: workshop.Answer{Values: vs}}
		if err := h.db.SaveRevision(ctx, &rv); err != nil {
			t.Fatal(err)
		}
	}
	agreeSample(t, h, q.ID, 3, 20003, "About 3 in 20,000 (invented).")
	sp := studyPath(ws.ID, q.ID)
	if res, body := h.post(sp+"/data", url.Values{"successes": {"0"}, "trials": {"1000"}, "source": {"Site log (invented)"}, "observed_on": {"2026-03-31"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("record data: %d %s", res.StatusCode, body)
	}
	prior := elicit.Beta{Alpha: 3, Beta: 20000}
	post := elicit.Beta{Alpha: 3, Beta: 21000}
	for _, x := range []float64{prior.SD(), post.SD()} {
		if !strings.Contains(chart.FormatValue(x), "e-") {
			t.Fatalf("the case does not tell the two writings apart: %v is %s", x, chart.FormatValue(x))
		}
	}
	// A mean or an SD as the pages label it: in a table cell labelled
	// for a phone, in a row headed by it, or in words ("Mean x, SD y").
	labelled := []*regexp.Regexp{
		regexp.MustCompile(`data-label="(?:SD|Mean)">\s*([^<]*?)\s*<`),
		regexp.MustCompile(`(?:SD|[Mm]ean|Mean, SD)</th>\s*<td class="num">\s*([^<]*?)\s*<`),
		regexp.MustCompile(`\b(?:SD|[Mm]ean)\s+(-?[0-9][0-9.]*(?:e[-+]?[0-9]+)?)`),
	}
	exponent := regexp.MustCompile(`[0-9]e[-+]?[0-9]`)
	for _, page := range []struct {
		name, path string
		min        int      // labelled means and SDs the page writes at least
		want       []string // SDs it writes, plain
	}{
		{"quick priors", quickPriorsPath(ws.ID) + "?question=" + strconv.FormatInt(q.ID, 10) + "&construction=equivalent_sample&c_successes=3&c_trials=20003",
			2, []string{chart.FormatSpread(prior.SD())}},
		{"the panel", questionPath(ws.ID, q.ID), 6, []string{chart.FormatSpread(prior.SD())}},
		{"the study", sp + "?trials=100", 6, []string{chart.FormatSpread(prior.SD()), chart.FormatSpread(post.SD())}},
		{"the report", workshopPath(ws.ID) + "/report", 4, []string{chart.FormatSpread(post.SD())}},
	} {
		res, body := h.get(page.path)
		if res.StatusCode != http.StatusOK {
			t.Fatalf("%s: status %d", page.name, res.StatusCode)
		}
		found := 0
		for _, re := range labelled {
			for _, m := range re.FindAllStringSubmatch(body, -1) {
				found++
				if exponent.MatchString(m[1]) {
					t.Errorf("%s: a mean or an SD in exponent notation: %q", page.name, m[0])
				}
			}
		}
		if found < page.min {
			t.Errorf("%s: %d means and SDs found, want at least %d", page.name, found, page.min)
		}
		for _, w := range page.want {
			if !strings.Contains(body, w) {
				t.Errorf("%s: does not write the SD %s", page.name, w)
			}
		}
	}
}

// The two interval methods' coverages are told apart: the moment match
// of [0.4, 0.6] at 90% is Beta(33.319, 33.319), which holds 89.966% of
// its probability there (R 4.2.2: sd = 0.1/qnorm(0.95), α = β =
// 0.5·(0.25/sd² − 1) = 33.31929318, pbeta(0.6, α, α) − pbeta(0.4, α, α)
// = 0.8996552515; testdata/r/study_review_reference.R), and the exact
// quantile match 90%. Three figures wrote
// both "90%", in the comparison's emphasised row and in "it holds 90%",
// where `parley prior` says 89.97%.
func TestQuickPriorsTellTheCoveragesApart(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	_, body := h.get(quickPriorsPath(ws.ID) + "?question=" + strconv.FormatInt(qs[0].ID, 10) + "&construction=interval&c_low=0.4&c_high=0.6&c_coverage=0.9")
	for _, want := range []string{"<strong>89.97%</strong>", "<strong>90%</strong>", "it holds 89.97%", "it holds 90%"} {
		if !strings.Contains(body, want) {
			t.Errorf("the comparison lacks %q", want)
		}
	}
}

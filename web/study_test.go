package web

import (
	"bufio"
	"context"
	"html"
	"math"
	"net/http"
	"net/url"
	"os"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/web/chart"
)

// studyCounts is what a refused data form must leave unchanged.
func (h *harness) studyCounts(wsID int64) [2]int {
	h.t.Helper()
	ds, err := h.db.StudyData(context.Background(), wsID)
	if err != nil {
		h.t.Fatal(err)
	}
	ev, _ := h.db.Events(context.Background(), wsID)
	return [2]int{len(ds), len(ev)}
}

// Data recorded against the demo's agreed prior accumulate, and the page,
// the JSON record and the report show the update by the functions
// `parley update` calls, with the same numbers.
func TestStudyRecordsDataAndUpdates(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	sp := studyPath(ws.ID, qs[0].ID)
	res, body := h.get(sp)
	if res.StatusCode != http.StatusOK {
		t.Fatalf("study page: %d", res.StatusCode)
	}
	for _, want := range []string{"from the agreed prior to the study", "Caution.", "No data recorded yet.", "Record the data",
		"Planning the study", "What the study may see", `id="predictive"`, "Whose judgement"} {
		if !strings.Contains(body, want) {
			t.Errorf("fresh study page lacks %q", want)
		}
	}
	if _, panel := h.get(questionPath(ws.ID, qs[0].ID)); !strings.Contains(panel, `href="`+sp+`"`) {
		t.Error("the question's panel does not link to its study page")
	}
	for _, b := range []url.Values{
		{"successes": {"3"}, "trials": {"120"}, "source": {"Site log, first quarter (invented)"}, "observed_on": {"2026-03-31"}},
		{"successes": {"5"}, "trials": {"80"}, "source": {"Site log, second quarter (invented)"}, "observed_on": {"2026-06-30"}},
	} {
		if res, body := h.post(sp+"/data", b); res.StatusCode != http.StatusSeeOther {
			t.Fatalf("record data: %d %s", res.StatusCode, body)
		}
	}
	ps, _ := h.db.AgreedPriors(context.Background(), ws.ID)
	prior := ps[len(ps)-1].Dist.Beta
	// What `parley update --alpha A --beta B --successes 8 --trials 200` computes.
	post, _ := elicit.Posterior(prior, 8, 200)
	lo, hi, _ := elicit.EqualTailed(post, 0.95)
	hlo, hhi, _ := elicit.HDI(post, 0.95)
	c, _ := elicit.ConflictCheck(prior, 8, 200)
	_, body = h.get(sp)
	for _, want := range []string{"All 2 batches", "Beta(" + fv(post.Alpha) + ", " + fv(post.Beta) + ")", fv(post.Mean()), fv(post.SD()),
		fv(lo) + " to " + fv(hi), fv(hlo) + " to " + fv(hhi), htmlEscape(workshop.ConflictReading(c)), `id="update-q`,
		"Likelihood of the data, scaled", "For the recorded data", "Site log, second quarter (invented)", "2026-06-30"} {
		if !strings.Contains(body, want) {
			t.Errorf("study page lacks %q", want)
		}
	}
	_, js := h.get(workshopPath(ws.ID) + "/export.json")
	rec, err := record.Parse(strings.NewReader(js))
	if err != nil {
		t.Fatal(err)
	}
	u := rec.Questions[0].Update
	if u == nil || u.Posterior != post || u.Interval != [2]float64{lo, hi} || u.HDI != [2]float64{hlo, hhi} || u.Conflict != c || len(rec.StudyData) != 2 {
		t.Fatalf("record's update %+v, data %+v", u, rec.StudyData)
	}
	_, report := h.get(workshopPath(ws.ID) + "/report")
	for _, want := range []string{"Observed data and the posterior", "Beta(" + fv(post.Alpha) + ", " + fv(post.Beta) + ")", "Site log, first quarter (invented)"} {
		if !strings.Contains(report, want) {
			t.Errorf("report lacks %q", want)
		}
	}
	_, log := h.get(workshopPath(ws.ID) + "/log")
	if !strings.Contains(log, "5 successes in 80 trials") {
		t.Error("the decision log does not say what data were recorded")
	}
}

// Every field of the data form refuses bad input with 422, the field
// named, and nothing saved.
func TestStudyDataRefusesBadInput(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	sp := studyPath(ws.ID, qs[0].ID)
	good := func(over map[string]string) url.Values {
		v := url.Values{"successes": {"3"}, "trials": {"40"}, "source": {"kept source"}, "observed_on": {"2026-01-31"}}
		for k, x := range over {
			v.Set(k, x)
		}
		return v
	}
	for _, c := range []struct {
		name, field string
		form        url.Values
	}{
		{"successes empty", "successes", good(map[string]string{"successes": ""})},
		{"successes negative", "successes", good(map[string]string{"successes": "-1"})},
		{"successes fractional", "successes", good(map[string]string{"successes": "2.5"})},
		{"successes above trials", "successes", good(map[string]string{"successes": "41"})},
		{"trials zero", "trials", good(map[string]string{"trials": "0"})},
		{"trials with separator", "trials", good(map[string]string{"trials": "1,000"})},
		{"trials beyond the limit", "trials", good(map[string]string{"trials": "1000001"})},
		{"source empty", "source", good(map[string]string{"source": "  "})},
		{"source with a control character", "source", good(map[string]string{"source": "a\x07b"})},
		{"source too long", "source", good(map[string]string{"source": strings.Repeat("é", 201)})},
		{"date empty", "observed_on", good(map[string]string{"observed_on": ""})},
		{"date not a day", "observed_on", good(map[string]string{"observed_on": "2026-02-30"})},
		{"date day first", "observed_on", good(map[string]string{"observed_on": "31/01/2027"})},
		{"date in the future", "observed_on", good(map[string]string{"observed_on": "2999-01-01"})},
		{"date with a mistyped year", "observed_on", good(map[string]string{"observed_on": "0026-01-31"})},
	} {
		before := h.studyCounts(ws.ID)
		res, body := h.post(sp+"/data", c.form)
		if res.StatusCode != http.StatusUnprocessableEntity {
			t.Errorf("%s: status %d, want 422", c.name, res.StatusCode)
		}
		if after := h.studyCounts(ws.ID); after != before {
			t.Errorf("%s: something was saved", c.name)
		}
		if !hasFieldError(body, c.field) || !strings.Contains(body, "Nothing was saved") {
			t.Errorf("%s: no message beside %q", c.name, c.field)
		}
		if c.field != "source" && !strings.Contains(body, "kept source") {
			t.Errorf("%s: the typed source is not shown again", c.name)
		}
	}
	// A question without an agreed prior takes no data.
	before := h.studyCounts(ws.ID)
	if res, body := h.post(studyPath(ws.ID, qs[2].ID)+"/data", good(nil)); res.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, "no agreed prior yet") {
		t.Errorf("data without an agreed prior: %d", res.StatusCode)
	}
	if h.studyCounts(ws.ID) != before {
		t.Error("data without an agreed prior were saved")
	}
	// A field sent twice is refused.
	if res, _ := h.post(sp+"/data", url.Values{"successes": {"1", "2"}, "trials": {"40"}, "source": {"x"}, "observed_on": {"2026-01-31"}}); res.StatusCode != http.StatusBadRequest {
		t.Errorf("successes twice: %d", res.StatusCode)
	}
}

// Every field of the planning form refuses bad input with 422 and the
// field named.
func TestStudyPlanRefusesBadInput(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	sp := studyPath(ws.ID, qs[0].ID)
	for _, c := range []struct{ query, field string }{
		{"trials=0", "trials"},
		{"trials=ten", "trials"},
		{"trials=1000001", "trials"},
		{"trials=50&threshold=1.5&confidence=0.9", "threshold"},
		{"trials=50&threshold=0.1&confidence=", "confidence"},
		{"trials=50&threshold=0.1&confidence=0.9&direction=sideways", "direction"},
		{"trials=50&length=0&level=0.95", "length"},
		{"trials=50&length=0.05&level=1", "level"},
		{"trials=50&length=0.05&level=0.95&criterion=best", "criterion"},
		{"trials=50&length=0.05&level=0.95&interval=round", "interval"},
		{"trials=50&prior=99", "prior"},
		{"trials=50&prior=posterior", "prior"}, // offered only once data are recorded
		{"trials=50&length=0.05&level=0.95&criterion=alc&woc_trim=0.05", "woc_trim"},
		{"trials=50&length=0.05&level=0.95&criterion=woc&woc_trim=1", "woc_trim"},
		{"trials=50&length=0.000001&level=0.95&criterion=woc", "length"}, // no n up to 100,000 meets it
		{"trials=50&woc_trim=0.05", "woc_trim"},                          // a trim without a sample size is not dropped in silence
		{"trials=50&level=0.9", "level"},                                 // nor a level (TestStudyPlanLevelNeedsALength)
	} {
		res, body := h.get(sp + "?" + c.query)
		if res.StatusCode != http.StatusUnprocessableEntity || !hasFieldError(body, c.field) {
			t.Errorf("%s: status %d, message beside %q: %v", c.query, res.StatusCode, c.field, hasFieldError(body, c.field))
		}
	}
	if res, _ := h.get(sp + "?trials=5&trials=6"); res.StatusCode != http.StatusBadRequest {
		t.Errorf("trials twice: %d", res.StatusCode)
	}
	// Every mistake is marked at once: the threshold and the length
	// were marked only once the trials were put right.
	res, body := h.get(sp + "?trials=0&threshold=1.5&confidence=0.9&length=0&level=0.95")
	for _, field := range []string{"trials", "threshold", "length"} {
		if res.StatusCode != http.StatusUnprocessableEntity || !hasFieldError(body, field) {
			t.Errorf("three mistakes at once: status %d, message beside %q: %v", res.StatusCode, field, hasFieldError(body, field))
		}
	}
}

// planReference reads testdata/scipy/plan_reference.csv (SciPy's
// brute-force enumeration; script and version in its first line) into
// kind|alpha|beta|n|spec → value.
func planReference(t *testing.T) map[string]float64 {
	t.Helper()
	f, err := os.Open("../testdata/scipy/plan_reference.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	out := map[string]float64{}
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		p := strings.Split(sc.Text(), ",")
		if len(p) < 6 || strings.HasPrefix(p[0], "#") || p[0] == "kind" {
			continue
		}
		v, err := strconv.ParseFloat(p[5], 64)
		if err != nil {
			t.Fatal(err)
		}
		out[strings.Join(p[:5], "|")] = v
	}
	return out
}

// The plan the page computes is `parley plan`'s, by the same elicit
// functions with the same arguments, and meets SciPy's brute force.
func TestStudyPlanMatchesTheCommandLineAndSciPy(t *testing.T) {
	ref := planReference(t)
	prior := elicit.Beta{Alpha: 2, Beta: 38}
	form := newForm(url.Values{"prior": {"0"}, "trials": {"100"}, "threshold": {"0.08"}, "direction": {"below"}, "confidence": {"0.95"},
		"length": {"0.06"}, "level": {"0.95"}, "criterion": {"alc"}, "interval": {"hpd"}})
	p := planStudy(context.Background(), planView{Form: form, Choices: []priorChoice{{Value: "0", Label: "Agreed prior", Prior: prior}}})
	if !form.OK() || !p.Ran {
		t.Fatalf("plan refused: %v", form.Errors)
	}
	// The command line's functions and arguments (cmd/parley/plan.go).
	pmf, _ := elicit.PriorPredictive(prior, 100)
	mean, sd := elicit.PredictiveMoments(prior, 100)
	goal := elicit.SuccessCriterion{Threshold: 0.08, Direction: elicit.DirectionBelow, Confidence: 0.95}
	a, _ := elicit.Assurance(prior, 100, goal)
	curve, _ := elicit.AssuranceCurve(prior, goal, elicit.PlanGrid(100, 40))
	size, _ := elicit.SampleSize(context.Background(), prior, elicit.SampleSizeGoal{Criterion: elicit.CriterionALC, Interval: elicit.IntervalHPD, Level: 0.95, Length: 0.06})
	if len(p.PMF) != len(pmf) || p.PredMean != mean || p.PredSD != sd || *p.Assure != a || len(p.Curve) != len(curve) || p.SizeRes.N != size.N || p.SizeRes.At != size.At {
		t.Fatalf("the page's plan differs from the command line's: %+v", p)
	}
	for i := range pmf {
		if p.PMF[i] != pmf[i] {
			t.Fatalf("P(X = %d): %v, command line %v", i, p.PMF[i], pmf[i])
		}
	}
	for i := range curve {
		if p.Curve[i] != curve[i] {
			t.Fatalf("curve[%d]: %+v, command line %+v", i, p.Curve[i], curve[i])
		}
	}
	// SciPy (testdata/scipy/plan_reference.py): assurance at 100 trials
	// and the smallest n for ALC with 95% HPD intervals of length 0.06.
	if want := ref["assurance|2.0|38.0|100|0.08:below:0.95"]; math.Abs(a.Assurance-want) > 1e-9 {
		t.Errorf("assurance %v, SciPy %v", a.Assurance, want)
	}
	if _, ok := ref["samplesize|2.0|38.0|130|alc:hpd:0.95:0.06:0.0"]; !ok || p.SizeRes.N != 130 {
		t.Errorf("sample size %d, SciPy 130 (row present: %v)", p.SizeRes.N, ok)
	}
	// The trimmed worst outcome: SciPy's smallest n is 103, and the
	// criterion fails again at 106 (the page says so).
	form = newForm(url.Values{"prior": {"0"}, "trials": {"100"}, "length": {"0.1"}, "level": {"0.95"}, "criterion": {"woc"},
		"interval": {"equal"}, "woc_trim": {"0.05"}})
	p = planStudy(context.Background(), planView{Form: form, Choices: []priorChoice{{Value: "0", Prior: prior}}})
	if _, ok := ref["samplesize|2.0|38.0|103|woc:equal:0.95:0.1:0.05"]; !ok || p.SizeRes == nil || p.SizeRes.N != 103 || p.SizeRes.FailsAgainAt != 106 {
		t.Errorf("trimmed WOC: %+v, SciPy 103, failing again at 106 (row present: %v)", p.SizeRes, ok)
	}
	// The predictive at 50 trials against SciPy's betabinom.
	form = newForm(url.Values{"prior": {"0"}, "trials": {"50"}})
	p = planStudy(context.Background(), planView{Form: form, Choices: []priorChoice{{Value: "0", Prior: prior}}})
	for x := 0; x <= 50; x++ {
		want, ok := ref["predictive|2.0|38.0|50|"+strconv.Itoa(x)]
		if ok && math.Abs(p.PMF[x]-want) > 1e-12*math.Max(want, 1e-300)+1e-300 && math.Abs(p.PMF[x]-want)/want > 1e-10 {
			t.Errorf("P(X = %d) %v, SciPy %v", x, p.PMF[x], want)
		}
	}
}

// Through HTTP, the page shows the plan's numbers under the agreed prior.
func TestStudyPlanPage(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	agreeSample(t, h, qs[0].ID, 2, 40, "about 2 in 40 (invented)")
	sp := studyPath(ws.ID, qs[0].ID)
	_, body := h.get(sp)
	// The agreed prior is the last choice and the default.
	i := strings.Index(body, ">Agreed prior: Beta(2, 38)<")
	if i < 0 || !strings.Contains(body[max(0, i-40):i], "selected") {
		t.Fatalf("the agreed prior is not the default choice")
	}
	choice := body[strings.LastIndex(body[:i], `value="`)+7:]
	choice = choice[:strings.Index(choice, `"`)]
	res, body := h.get(sp + "?prior=" + choice + "&trials=100&threshold=0.08&direction=below&confidence=0.95&length=0.06&level=0.95&criterion=alc&interval=hpd")
	if res.StatusCode != http.StatusOK {
		t.Fatalf("plan: %d", res.StatusCode)
	}
	for _, want := range []string{"54%", "130 trials", "at most 4 successes in 100 trials", `id="assurance"`, "planned: 100",
		"This prior is worth about 40 observed trials (2 successes and 38 failures).", "For the planned study"} {
		if !strings.Contains(body, want) {
			t.Errorf("plan page lacks %q", want)
		}
	}
}

// TestPriorAgreedAfterTheDataIsFlagged: a prior agreed after data were
// recorded is updated with them all the same, and the study page and the
// report say that the data may be counted twice.
func TestPriorAgreedAfterTheDataIsFlagged(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	sp := studyPath(ws.ID, qs[0].ID)
	const warn = "This prior was agreed after the data were recorded"
	if res, body := h.post(sp+"/data", url.Values{"successes": {"30"}, "trials": {"40"}, "source": {"Site log (invented)"}, "observed_on": {"2026-03-31"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("record data: %d %s", res.StatusCode, body)
	}
	if _, page := h.get(sp); strings.Contains(page, warn) {
		t.Fatal("the warning shows for a prior agreed before the data")
	}
	agreeAgain(t, h, ws.ID, elicit.Beta{Alpha: 7, Beta: 3}, "Invented: agreed again after the site log came in.")
	if _, page := h.get(sp); !strings.Contains(page, warn) {
		t.Error("the study page does not flag a prior agreed after the data")
	}
	if _, report := h.get(workshopPath(ws.ID) + "/report"); !strings.Contains(report, warn) {
		t.Error("the report does not flag a prior agreed after the data")
	}
}

// A sample size found once is remembered: the same goal under the same
// prior is answered again from memory, and another goal is searched for.
// (That a failed search is not remembered is memo.GetErr's contract,
// tested in internal/memo.)
func TestStudySampleSizeIsRemembered(t *testing.T) {
	prior := elicit.Beta{Alpha: 3, Beta: 57} // invented; not used by other tests
	plan := func(length string) planView {
		form := newForm(url.Values{"prior": {"0"}, "trials": {"100"}, "length": {length}, "level": {"0.9"}, "criterion": {"alc"}, "interval": {"equal"}})
		return planStudy(context.Background(), planView{Form: form, Choices: []priorChoice{{Value: "0", Prior: prior}}})
	}
	// A run before this one (go test -count=2) remembered these goals.
	sampleSizes.Reset()
	before := sampleSizes.Len()
	first := plan("0.07")
	if first.SizeRes == nil {
		t.Fatalf("no sample size: %v", first.Form.Errors)
	}
	if got := sampleSizes.Len(); got != before+1 {
		t.Fatalf("%d sample sizes remembered after a search, want %d", got, before+1)
	}
	again := plan("0.07")
	if again.SizeRes == nil || *again.SizeRes != *first.SizeRes || sampleSizes.Len() != before+1 {
		t.Fatalf("the same goal again: %+v, %d remembered; want the remembered %+v", again.SizeRes, sampleSizes.Len(), first.SizeRes)
	}
	if other := plan("0.06"); other.SizeRes == nil || other.SizeRes.N <= first.SizeRes.N || sampleSizes.Len() != before+2 {
		t.Errorf("a narrower goal: %+v, %d remembered", other.SizeRes, sampleSizes.Len())
	}
}

// TestStudyNotesAJShapedPosterior: the highest-density interval of a
// J-shaped posterior starts at 0; the study page says so and points to
// the equal-tailed interval, as parley update does (elicit.HDINote), and
// says nothing for a posterior with an interior mode.
func TestStudyNotesAJShapedPosterior(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	sp := studyPath(ws.ID, qs[0].ID)
	const note = "The posterior is J-shaped (α = 0.5, at most 1): its density is highest at 0, so the highest-density interval starts at 0"
	if res, body := h.post(sp+"/data", url.Values{"successes": {"0"}, "trials": {"20"}, "source": {"Site log (invented)"}, "observed_on": {"2026-03-31"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("record data: %d %s", res.StatusCode, body)
	}
	_, page := h.get(sp)
	if strings.Contains(html.UnescapeString(page), "The posterior is J-shaped (α") {
		t.Fatal("the note shows for the demo's posterior, whose mode is inside (0, 1)")
	}
	// The comparison's rows each say how to read their own interval: no
	// failure in 20 trials leaves the uniform reference's posterior,
	// Beta(1, 21), highest at 0, and the agreed prior's row no note.
	notes := page[strings.Index(page, `class="hint compare-notes"`):]
	notes = html.UnescapeString(notes[:strings.Index(notes, "</ul>")])
	if !strings.Contains(notes, "Uniform, for reference (no judgement): the posterior is J-shaped (α = 1, at most 1): its density is highest at 0, so the highest-density interval starts at 0") ||
		strings.Contains(notes, "Agreed prior:") {
		t.Errorf("the comparison's notes after 0 in 20:\n%s", notes)
	}
	agreeAgain(t, h, ws.ID, elicit.Beta{Alpha: 0.5, Beta: 10}, "Invented: a prior with its density highest at 0.")
	_, page = h.get(sp)
	if !strings.Contains(html.UnescapeString(page), note) {
		t.Errorf("the study page of posterior Beta(0.5, 30) lacks the note %q", note)
	}
	// The report gives the same interval, 0 to Q(0.95), with the same
	// note; it gave the interval alone.
	if _, report := h.get(workshopPath(ws.ID) + "/report"); !strings.Contains(html.UnescapeString(report), note) {
		t.Errorf("the report of posterior Beta(0.5, 30) lacks the note %q", note)
	}
}

// Agreeing, from the question's page, a prior that the question's
// recorded data could not update is refused beside the form (422), in
// words naming the prior, the data and the posterior, and nothing is
// saved (workshop.CheckPriorUpdate, in the store's transaction).
func TestAgreeingAPriorTheDataCannotUpdate(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	ctx := context.Background()
	for _, batch := range []string{"2026-04-30", "2026-05-31"} {
		if err := h.db.RecordData(ctx, &workshop.StudyData{QuestionID: qs[0].ID, Successes: 300_000, Trials: 300_000,
			Source: "site log (invented)", ObservedOn: batch}); err != nil {
			t.Fatal(err)
		}
	}
	before, _ := h.db.AgreedPriors(ctx, ws.ID)
	res, body := h.post(questionPath(ws.ID, qs[0].ID)+"/agree", url.Values{"source": {"construction"}, "construction": {"equivalent_sample"},
		"c_successes": {"9450000"}, "c_trials": {"9900000"}, "rationale": {"Near-certain (invented)."}, "confirm_open": {"on"}})
	if res.StatusCode != http.StatusUnprocessableEntity {
		t.Fatalf("a prior the data cannot update: %d, want 422", res.StatusCode)
	}
	if want := "updated with the 600000 successes in 600000 trials already recorded would be Beta(1005"; !strings.Contains(html.UnescapeString(body), want) {
		t.Errorf("the refusal does not say %q: %q", want, regexp.MustCompile(`(field-error|form-error)[^>]*>[^<]*`).FindAllString(body, -1))
	}
	if after, _ := h.db.AgreedPriors(ctx, ws.ID); len(after) != len(before) {
		t.Errorf("%d priors after the refusal, want %d", len(after), len(before))
	}
}

// agreeAgain agrees the workshop's last agreed prior again, from the pool,
// as the Beta b: a study page's tests' way to put a prior of a given shape
// on a question that already has data.
func agreeAgain(t *testing.T, h *harness, wsID int64, b elicit.Beta, rationale string) {
	t.Helper()
	ctx := context.Background()
	ps, err := h.db.AgreedPriors(ctx, wsID)
	if err != nil || len(ps) == 0 {
		t.Fatalf("agreed priors: %d, %v", len(ps), err)
	}
	p := ps[len(ps)-1]
	p.ID, p.Rationale, p.Dist.Beta = 0, rationale, b
	p.Source, p.Construction, p.Consensus = workshop.PriorFromPool, nil, nil
	if err := h.db.AgreePrior(ctx, &p); err != nil {
		t.Fatal(err)
	}
}

// The demo's equal-weight pool of Q1 (a sharp expert among vaguer ones)
// has a single Beta far from the pool: its CDF strays from the pool's by
// 0.127 and its standard deviation is 0.79 times the pool's
// (elicit.Pool.BestBeta's warnings). The study page plans under that
// Beta and shows its posterior as the "Equal-weight pool" row, so it
// says, beside the comparison and above a plan under it, that the Beta
// stands in for the pool only roughly. It showed the row without a word.
func TestStudySaysWhereAPoolsBetaStandsInOnlyRoughly(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	sp := studyPath(ws.ID, qs[0].ID)
	_, body := h.get(sp)
	page := html.UnescapeString(body)
	const caveat = "Equal-weight pool: its single Beta stands in for the pool only roughly"
	compare := page[strings.Index(page, `id="compare"`):]
	if !strings.Contains(compare, caveat) || !strings.Contains(compare, "0.127") {
		t.Errorf("the comparison lacks the caveat %q", caveat)
	}
	choice := page[:strings.Index(page, ">Equal-weight pool: Beta(")]
	choice = choice[strings.LastIndex(choice, `value="`)+7:]
	choice = choice[:strings.Index(choice, `"`)]
	_, body = h.get(sp + "?prior=" + choice + "&trials=100")
	plan := html.UnescapeString(body)
	plan = plan[strings.Index(plan, "Planned under: Equal-weight pool"):]
	plan = plan[:strings.Index(plan, "What the study may see")]
	if !strings.Contains(plan, caveat) {
		t.Errorf("the plan under the equal-weight pool lacks the caveat:\n%s", plan)
	}
	// The agreed prior, the plan's default, is no stand-in.
	_, body = h.get(sp + "?trials=100")
	plan = html.UnescapeString(body)
	plan = plan[strings.Index(plan, "<h3>Planned under: "):]
	plan = plan[:strings.Index(plan, "What the study may see")]
	if strings.Contains(plan, "only roughly") {
		t.Errorf("the plan under the agreed prior has a caveat:\n%s", plan)
	}
}

// The predictive table's "at most" column is P(X ≤ x), against SciPy
// 1.10.1's betabinom.cdf (testdata/scipy/update_pool_reference.csv,
// betabinom_cdf rows of Beta(2, 400) and 10 trials), to the figures it
// shows, and a probability short of 1 is not shown as 1: P(X ≤ 2) =
// 0.99996 was "1", as if 3 or more successes could not happen (they
// have probability 4e-5).
func TestPredictiveTableStaysShortOfOne(t *testing.T) {
	f, err := os.Open("../testdata/scipy/update_pool_reference.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	want := map[string]float64{}
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		if rest, ok := strings.CutPrefix(sc.Text(), "betabinom_cdf,2.0,400.0,10,"); ok {
			c := strings.Split(rest, ",")
			v, err := strconv.ParseFloat(c[1], 64)
			if err != nil {
				t.Fatal(err)
			}
			want[c[0]] = v
		}
	}
	if len(want) != 11 {
		t.Fatalf("%d reference rows", len(want))
	}
	pmf, err := elicit.PriorPredictive(elicit.Beta{Alpha: 2, Beta: 400}, 10)
	if err != nil {
		t.Fatal(err)
	}
	rows := predictiveRows(pmf)
	if len(rows) != 3 {
		t.Fatalf("rows %+v", rows)
	}
	for _, r := range rows {
		got, err := strconv.ParseFloat(r.Cum, 64)
		if err != nil {
			t.Fatal(err)
		}
		w := want[r.X]
		if w < 1 && got >= 1 || math.Abs(got-w) > 5e-5*w {
			t.Errorf("P(X ≤ %s) shown %q, SciPy %.8g", r.X, r.Cum, w)
		}
	}
}

// The conflict check's tails are written short of 1 when they are: 33
// successes in 120 trials under the demo's agreed prior
// Beta(2.9505, 55.560) have P(Y ≤ 33) = 0.99997277 by SciPy 1.10.1's
// betabinom.cdf (computed for this test), which the page wrote as "1".
func TestStudyConflictTailStaysShortOfOne(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	sp := studyPath(ws.ID, qs[0].ID)
	if res, body := h.post(sp+"/data", url.Values{"successes": {"33"}, "trials": {"120"}, "source": {"Site log (invented)"}, "observed_on": {"2026-03-31"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("record data: %d %s", res.StatusCode, body)
	}
	_, page := h.get(sp)
	if want := "the chance of 33 or fewer successes in 120 trials was 0.99997,"; !strings.Contains(html.UnescapeString(page), want) {
		i := strings.Index(page, "the chance of 33")
		t.Errorf("the page lacks %q: %s", want, page[i:i+120])
	}
}

// A tail of the conflict check below the smallest double is written as
// such: no success in 1000 trials under Beta(1e6, 1) has P(Y ≤ 0) =
// 10^-3432.6 (R 4.2.2's lbeta, testdata/r/study_review_reference.R; see
// elicit.TailUnderflowWords), computed
// as 0, which the page wrote as "0" (data that could not have happened),
// and the reading, here and in the report, as "two-sided tail
// probability 0".
func TestStudyConflictTailBelowTheSmallestDouble(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	sp := studyPath(ws.ID, qs[0].ID)
	agreeAgain(t, h, ws.ID, elicit.Beta{Alpha: 1e6, Beta: 1}, "Invented: a prior all but sure the proportion is 1.")
	if res, body := h.post(sp+"/data", url.Values{"successes": {"0"}, "trials": {"1000"}, "source": {"Site log (invented)"}, "observed_on": {"2026-03-31"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("record data: %d %s", res.StatusCode, body)
	}
	_, page := h.get(sp)
	page = html.UnescapeString(page)
	for _, want := range []string{"the chance of 0 or fewer successes in 1000 trials was below 1e-300,", "(two-sided tail probability below 1e-300)"} {
		if !strings.Contains(page, want) {
			t.Errorf("the study page lacks %q", want)
		}
	}
	if _, report := h.get(workshopPath(ws.ID) + "/report"); !strings.Contains(html.UnescapeString(report), "(two-sided tail probability below 1e-300)") {
		t.Error("the report's conflict check lacks the tail below 1e-300")
	}
}

// The predictive mean number of successes does not read as every trial:
// 10 trials under Beta(1e7, 1) expect nα/(α + β) = 9.9999990 successes
// (the beta-binomial's mean, Johnson, Kemp & Kotz 2005, §6.7.2; worked by
// hand), which four figures wrote "10", as `parley plan` did; so the
// table's probability of 10 successes.
func TestStudyPredictiveMeanShortOfTheTrials(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	agreeAgain(t, h, ws.ID, elicit.Beta{Alpha: 1e7, Beta: 1}, "Invented: a prior all but sure the proportion is 1.")
	_, page := h.get(studyPath(ws.ID, qs[0].ID) + "?trials=10")
	if want := "9.999999 and SD 0.001;"; !strings.Contains(html.UnescapeString(page), want) {
		i := strings.Index(page, "has mean")
		t.Errorf("the page lacks %q: %s", want, page[i:min(len(page), i+120)])
	}
	// The table's probability of 10 successes, α/(α + 10) = 0.999999000001
	// (B(α + n, 1)/B(α, 1)), read "1" beside it.
	if want := "<tr><td>10</td><td>0.999999</td><td>1</td></tr>"; !strings.Contains(page, want) {
		i := strings.Index(page, "predictive-table")
		t.Errorf("the predictive table lacks %q: %s", want, page[i:min(len(page), i+400)])
	}
}

// A comparison that is due but cannot be worked out says why: a
// follow-up of 2000 trials planned under the posterior after 999000
// recorded trials makes 1001000 trials in all, more than an update takes
// (elicit.MaxUpdateTrials), and the comparison for the planned study was
// left out without a word, below the one for the recorded data.
func TestStudySaysWhyAComparisonIsLeftOut(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	sp := studyPath(ws.ID, qs[0].ID)
	if res, body := h.post(sp+"/data", url.Values{"successes": {"40000"}, "trials": {"999000"}, "source": {"Fleet log (invented)"}, "observed_on": {"2026-03-31"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("record data: %d %s", res.StatusCode, body)
	}
	_, page := h.get(sp + "?prior=posterior&trials=2000")
	page = html.UnescapeString(page)
	if !strings.Contains(page, "For the recorded data") {
		t.Fatal("no comparison for the recorded data")
	}
	i := strings.Index(page, `id="planned-omitted"`)
	if i < 0 {
		t.Fatal("the comparison for the planned study is left out without a word")
	}
	if want := " trials in all, more than the 1000000 trials an update takes."; !strings.Contains(page[i:], "in 1001000"+want) {
		t.Errorf("the note does not say why: %s", page[i:min(len(page), i+200)])
	}
}

// The "at most" column reaches 1 at the last outcome, P(X ≤ n) = 1 by
// definition: summing the probabilities, each with the rounding of its
// log-gamma terms, left 0.99999999 for Beta(3e6, 2) and 1000 trials,
// which the figures that keep a probability short of 1 would show.
func TestPredictiveTableEndsAtOne(t *testing.T) {
	pmf, err := elicit.PriorPredictive(elicit.Beta{Alpha: 3e6, Beta: 2}, 1000)
	if err != nil {
		t.Fatal(err)
	}
	rows := predictiveRows(pmf)
	if last := rows[len(rows)-1]; last.X != "1000" || last.Cum != "1" {
		t.Errorf("last row %+v, want P(X ≤ 1000) = 1", last)
	}
}

// One success and one trial take the singular on the study page, as they
// do on the command line (countOf) and in the assurance picture.
func TestStudyWordsTakeTheSingular(t *testing.T) {
	for _, c := range []struct {
		a    elicit.AssuranceResult
		want string
	}{
		{elicit.AssuranceResult{Trials: 300, SuccessFrom: 0, SuccessTo: 1}, "The study succeeds if it sees at most 1 success in 300 trials."},
		{elicit.AssuranceResult{Trials: 1, SuccessFrom: 1, SuccessTo: 1}, "The study succeeds if it sees at least 1 success in 1 trial."},
		{elicit.AssuranceResult{Trials: 1, SuccessFrom: 2, SuccessTo: 1}, "No outcome of 1 trial meets the criterion."},
	} {
		if got := successWords(c.a); got != c.want {
			t.Errorf("%+v: %q, want %q", c.a, got, c.want)
		}
	}
	h, ws, qs, _, _ := seeded(t)
	sp := studyPath(ws.ID, qs[0].ID)
	if res, body := h.post(sp+"/data", url.Values{"successes": {"1"}, "trials": {"120"}, "source": {"Site log (invented)"}, "observed_on": {"2026-03-31"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("record data: %d %s", res.StatusCode, body)
	}
	_, page := h.get(sp + "?trials=1")
	page = html.UnescapeString(regexp.MustCompile(`\s+`).ReplaceAllString(page, " "))
	for _, want := range []string{"updated with 1 success in 120 trials", "1 success in 120 trials is", "A study of 1 trial would get",
		"the number of successes in 1 trial has", "Posterior under each prior after 1 success in 120 trials"} {
		if !strings.Contains(page, want) {
			t.Errorf("the page lacks %q", want)
		}
	}
	if strings.Contains(page, " 1 successes") || strings.Contains(page, " 1 trials") {
		i := strings.Index(page, " 1 successes")
		if i < 0 {
			i = strings.Index(page, " 1 trials")
		}
		t.Errorf("a plural after 1: %s", page[max(0, i-80):i+40])
	}
	// The report says the same of the agreed prior's update.
	_, report := h.get(workshopPath(ws.ID) + "/report")
	report = html.UnescapeString(regexp.MustCompile(`\s+`).ReplaceAllString(report, " "))
	if !strings.Contains(report, "with 1 success in 120 trials gives the posterior") {
		t.Error("the report does not say 'with 1 success in 120 trials gives the posterior'")
	}
}

// A criterion's value close to its goal is written with the figures that
// keep it on its own side of the goal: "the expected width is 0.06796:
// the goal is not met" beside a goal of 0.067962 would contradict itself.
func TestCriterionValueToldFromItsGoal(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	prior := elicit.Beta{Alpha: 2, Beta: 38}
	agreeAgain(t, h, ws.ID, prior, "Invented: about 2 in 40.")
	goal := elicit.SampleSizeGoal{Criterion: elicit.CriterionALC, Interval: elicit.IntervalEqual, Level: 0.95, Length: 0.1}
	at, err := elicit.CriterionValue(prior, goal, 100)
	if err != nil {
		t.Fatal(err)
	}
	// A goal between the value at 100 trials and its four-figure
	// rounding: written with four figures, the value would sit on the
	// wrong side of the goal.
	four := chart.FormatValue(at.Value)
	r4, _ := strconv.ParseFloat(four, 64)
	if r4 == at.Value {
		t.Fatalf("the value %v has four figures; pick another goal", at.Value)
	}
	length := (at.Value + r4) / 2
	met := "not met"
	if at.Value <= length {
		met = "met"
	}
	sp := studyPath(ws.ID, qs[0].ID)
	_, body := h.get(sp)
	i := strings.Index(body, ">Agreed prior: Beta(2, 38)<")
	if i < 0 {
		t.Fatal("no agreed prior to plan under")
	}
	choice := body[strings.LastIndex(body[:i], `value="`)+7:]
	choice = choice[:strings.Index(choice, `"`)]
	res, body := h.get(sp + "?prior=" + choice + "&trials=100&criterion=alc&interval=equal&level=0.95&length=" + strconv.FormatFloat(length, 'g', -1, 64))
	if res.StatusCode != http.StatusOK {
		t.Fatalf("plan: %d", res.StatusCode)
	}
	body = regexp.MustCompile(`\s+`).ReplaceAllString(body, " ")
	want := "At the planned 100 trials the expected width is " + chart.FormatValueBeside(at.Value, length) + ": the goal is " + met + "."
	if !strings.Contains(body, want) {
		t.Errorf("the page lacks %q", want)
	}
	if strings.Contains(body, "expected width is "+four+":") {
		t.Errorf("the page gives the value as %s, on the wrong side of the goal %v, beside %q", four, length, met)
	}
	if !strings.Contains(body, "at most "+input.Typed(length, false)+" wide") {
		t.Errorf("the page does not give the goal %v as typed", length)
	}
}

// Once data are recorded, a follow-up study can be planned under the
// posterior after them; the agreed prior stays the default. The plan's
// numbers are the posterior's (its worth is α + β of the conjugate
// update, BDA3 §2.4: Beta(2 + 8, 38 + 192) is worth 240 trials), and the
// comparison updates each prior with the recorded data and the planned
// study's typical outcome together.
func TestPlanUnderThePosterior(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	agreeAgain(t, h, ws.ID, elicit.Beta{Alpha: 2, Beta: 38}, "Invented: about 2 in 40.")
	sp := studyPath(ws.ID, qs[0].ID)
	if _, body := h.get(sp); strings.Contains(body, `value="posterior"`) {
		t.Fatal("the posterior is offered before any data are recorded")
	}
	if res, body := h.post(sp+"/data", url.Values{"successes": {"8"}, "trials": {"200"}, "source": {"Site log (invented)"}, "observed_on": {"2026-03-31"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("record data: %d %s", res.StatusCode, body)
	}
	_, body := h.get(sp)
	body = html.UnescapeString(regexp.MustCompile(`\s+`).ReplaceAllString(body, " "))
	if !strings.Contains(body, `<option value="posterior">Posterior after the recorded data: Beta(10, 230)</option>`) {
		t.Error("the plan does not offer the posterior after the recorded data, Beta(10, 230), unselected")
	}
	if !strings.Contains(body, "<h3>Planned under: Agreed prior, Beta(2, 38)</h3>") {
		t.Error("the default plan is not under the agreed prior")
	}
	_, body = h.get(sp + "?prior=posterior&trials=100&threshold=0.08&direction=below&confidence=0.5")
	body = html.UnescapeString(regexp.MustCompile(`\s+`).ReplaceAllString(body, " "))
	pmf, err := elicit.PriorPredictive(elicit.Beta{Alpha: 10, Beta: 230}, 100)
	if err != nil {
		t.Fatal(err)
	}
	typical := elicit.PredictiveQuantile(pmf, 0.5)
	for _, want := range []string{
		"<h3>Planned under: Posterior after the recorded data, Beta(10, 230)</h3>",
		"A follow-up to the recorded 8 successes in 200 trials",
		"This prior is worth about 240 observed trials (10 successes and 230 failures).",
		"For the recorded data together with a typical outcome of the planned 100 trials: " + strconv.Itoa(typical) + " success",
		"Each prior learns from both: " + successesIn(8+typical, 300) + " in all.",
		// A follow-up's outcomes are predicted before its own data, not
		// before any: 8 in 200 are already in its prior.
		"Before the follow-up study's own data, the number of successes in 100 trials",
		"The chance of that, before the follow-up study's own data, with 100 trials",
		"Bars: the probability of each number of successes in 100 trials before the follow-up study's own data, under the posterior after the data already recorded.",
		"The probability, before the follow-up study's own data, under the posterior after the data already recorded, that the study meets",
	} {
		if !strings.Contains(body, want) {
			t.Errorf("the plan under the posterior lacks %q", want)
		}
	}
	if strings.Contains(body, "before any data") || strings.Contains(body, "Before any data") {
		t.Error("the plan under the posterior says its outcomes are predicted before any data")
	}
	_, body = h.get(sp + "?trials=100&threshold=0.08&direction=below&confidence=0.5")
	body = html.UnescapeString(regexp.MustCompile(`\s+`).ReplaceAllString(body, " "))
	for _, want := range []string{"Before any data, the number of successes", "The chance of that, before any data,", "in 100 trials before any data, under the prior."} {
		if !strings.Contains(body, want) {
			t.Errorf("the plan under the agreed prior lacks %q", want)
		}
	}
}

// TestStudySaysWhenThePriorAloneMeetsTheGoal: an agreed prior worth
// 15,360 trials, Beta(460, 14900), has a 95% interval about 0.0054 wide
// (R 4.2: qbeta(0.975, 460, 14900) − qbeta(0.025, 460, 14900) = 0.0053897),
// so a goal of intervals at most 0.04 wide is met before any trial. The
// page said only "the smallest study … has 1 trial"; it now says the
// prior alone meets the goal. Under Beta(2, 38) (0.128 wide) it says
// nothing of the kind.
func TestStudySaysWhenThePriorAloneMeetsTheGoal(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	sp := studyPath(ws.ID, qs[0].ID)
	for _, c := range []struct {
		successes, trials float64
		alone             bool
	}{{460, 15360, true}, {2, 40, false}} {
		agreeSample(t, h, qs[0].ID, c.successes, c.trials, "invented")
		res, body := h.get(sp + "?trials=200&length=0.04&level=0.95&criterion=alc&interval=equal")
		if res.StatusCode != http.StatusOK {
			t.Fatalf("%v in %v: status %d", c.successes, c.trials, res.StatusCode)
		}
		said := strings.Contains(body, "The prior alone, before any trial, already meets this goal (expected width with no data: 0.00539)")
		if said != c.alone {
			t.Errorf("%v in %v: says the prior alone meets the goal: %v, want %v", c.successes, c.trials, said, c.alone)
		}
	}
}

// TestStudyAssurancePairNamesItsPartner: a threshold without a confidence
// (or the reverse) was refused with "is required" beside a field the form
// says may be left empty; the message now says what it is required with.
func TestStudyAssurancePairNamesItsPartner(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	sp := studyPath(ws.ID, qs[0].ID)
	for _, c := range []struct{ query, field, want string }{
		{"trials=50&threshold=0.1&direction=below", "confidence", "is required with a threshold (leave both empty to skip the assurance)"},
		{"trials=50&confidence=0.9&direction=below", "threshold", "is required with a confidence (leave both empty to skip the assurance)"},
	} {
		res, body := h.get(sp + "?" + c.query)
		if res.StatusCode != http.StatusUnprocessableEntity || !hasFieldError(body, c.field) || !strings.Contains(body, c.want) {
			t.Errorf("%s: status %d, beside %q: %v, says %q: %v", c.query, res.StatusCode, c.field, hasFieldError(body, c.field), c.want, strings.Contains(body, c.want))
		}
	}
}

// TestStudyTypicalOutcomeNamesItsPriorInASentence: the sentence read
// "the median of the predictive under Agreed prior (the prior the study is
// planned under)", a label dropped into the middle of a sentence, and then
// "… planned under (Agreed prior).", the label's capital mid-sentence. A
// label of Parley's own now reads "the agreed prior" there, and an
// expert's fit keeps the expert's name as written.
func TestStudyTypicalOutcomeNamesItsPriorInASentence(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	agreeSample(t, h, qs[0].ID, 2, 40, "invented")
	sp := studyPath(ws.ID, qs[0].ID)
	_, body := h.get(sp + "?trials=100")
	if !strings.Contains(body, "the median of the predictive under the agreed prior, the prior the study is planned under.") ||
		strings.Contains(body, "(Agreed prior)") || strings.Contains(body, "under Agreed prior") {
		t.Error("the typical outcome's sentence does not name the agreed prior in lower case")
	}
	// The first choice is the first expert's fit, labelled with their name.
	opt := regexp.MustCompile(`<option value="(expert-\d+)"[^>]*>([^<:]+):`).FindStringSubmatch(body)
	if opt == nil {
		t.Fatal("no first choice of prior")
	}
	name := html.UnescapeString(opt[2])
	_, body = h.get(sp + "?prior=" + opt[1] + "&trials=100")
	if want := "the median of the predictive under " + name + "'s fit, the prior the study is planned under."; !strings.Contains(html.UnescapeString(body), want) {
		t.Errorf("the typical outcome's sentence under an expert's fit lacks %q", want)
	}
	for _, c := range []struct{ label, want string }{
		{"Equal-weight pool", "the equal-weight pool"},
		{"Performance-weight pool (suggested)", "the performance-weight pool (suggested)"},
		{"Posterior after the recorded data", "the posterior after the recorded data"},
	} {
		if got := priorInSentence(c.label, false); got != c.want {
			t.Errorf("priorInSentence(%q) = %q, want %q", c.label, got, c.want)
		}
	}
}

// TestRecordingAPriorSaysDataAreRecorded: a new agreed prior recorded
// after study data is updated with them, and the study page said so only
// afterwards ("the posterior counts them twice"). Both forms that record
// a prior, on the question's page and on the quick priors page, now say
// it before, and say nothing while no data are recorded.
func TestRecordingAPriorSaysDataAreRecorded(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	agreeAgain(t, h, ws.ID, elicit.Beta{Alpha: 2, Beta: 38}, "Invented: about 2 in 40.")
	q := qs[0]
	pages := []string{questionPath(ws.ID, q.ID), quickPriorsPath(ws.ID) + "?question=" + strconv.FormatInt(q.ID, 10) + "&construction=uniform"}
	for _, p := range pages {
		if _, body := h.get(p); strings.Contains(body, `id="data-already-recorded"`) {
			t.Errorf("%s: warns of recorded data before any are recorded", p)
		}
	}
	for _, b := range []url.Values{
		{"successes": {"3"}, "trials": {"120"}, "source": {"Site log (invented)"}, "observed_on": {"2026-03-31"}},
		{"successes": {"5"}, "trials": {"80"}, "source": {"Site log (invented)"}, "observed_on": {"2026-06-30"}},
	} {
		if res, body := h.post(studyPath(ws.ID, q.ID)+"/data", b); res.StatusCode != http.StatusSeeOther {
			t.Fatalf("record data: %d %s", res.StatusCode, body)
		}
	}
	for _, p := range pages {
		_, body := h.get(p)
		if !strings.Contains(body, `id="data-already-recorded"`) ||
			!strings.Contains(body, "Data are already recorded against this question: 8 successes in 200 trials (2 batches).") ||
			!strings.Contains(body, "the posterior counts them twice") {
			t.Errorf("%s: does not say that 8 successes in 200 trials are recorded and would update the new prior", p)
		}
	}
}

// TestDataInTheLogTakeTheirNumber: the decision log wrote a batch of one
// success as "1 successes in 3 trials"; it now takes the singular, in the
// log and in the report's log.
func TestDataInTheLogTakeTheirNumber(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	agreeAgain(t, h, ws.ID, elicit.Beta{Alpha: 2, Beta: 38}, "Invented: about 2 in 40.")
	for _, b := range []url.Values{
		{"successes": {"1"}, "trials": {"3"}, "source": {"Bench (invented)"}, "observed_on": {"2026-03-31"}},
		{"successes": {"0"}, "trials": {"1"}, "source": {"Bench (invented)"}, "observed_on": {"2026-04-30"}},
	} {
		if res, body := h.post(studyPath(ws.ID, qs[0].ID)+"/data", b); res.StatusCode != http.StatusSeeOther {
			t.Fatalf("record data: %d %s", res.StatusCode, body)
		}
	}
	for _, p := range []string{workshopPath(ws.ID) + "/log", workshopPath(ws.ID) + "/report"} {
		_, body := h.get(p)
		for _, want := range []string{"1 success in 3 trials, observed on 2026-03-31", "0 successes in 1 trial, observed on 2026-04-30"} {
			if !strings.Contains(body, want) {
				t.Errorf("%s lacks %q", p, want)
			}
		}
	}
}

// TestStudySaysWhenTheCriterionIsNotEvaluatedAtThePlannedTrials: planned
// beyond elicit.MaxSampleSize trials, the page left out the criterion at
// the planned trials without a word (parley plan warns); it now says so.
func TestStudySaysWhenTheCriterionIsNotEvaluatedAtThePlannedTrials(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	agreeAgain(t, h, ws.ID, elicit.Beta{Alpha: 2, Beta: 38}, "Invented: about 2 in 40.")
	sp := studyPath(ws.ID, qs[0].ID)
	res, body := h.get(sp + "?trials=200000&length=0.04&level=0.95&criterion=alc&interval=equal")
	if res.StatusCode != http.StatusOK || !strings.Contains(body, "At the planned 200000 trials the expected width is not worked out: the criterion is evaluated up to 100000 trials.") {
		t.Errorf("status %d; the page does not say the criterion is not evaluated at 200000 trials", res.StatusCode)
	}
	if _, body := h.get(sp + "?trials=200&length=0.04&level=0.95&criterion=alc&interval=equal"); strings.Contains(body, "size-at-trials-not-evaluated") ||
		!strings.Contains(body, "At the planned 200 trials the expected width is") {
		t.Error("at 200 planned trials the criterion is not given")
	}
}

// TestStudyPlanLevelNeedsALength: a level typed without an interval
// length was taken and dropped in silence (no sample size is worked out
// without a length), where `parley plan --level 0.9` without --length
// exits 2. The page now refuses it the same way, by elicit's one rule
// (CheckSizeSettings): 422, the level named with the rule beside it, no
// plan drawn and nothing saved. A length without a level is taken at
// 0.95, as on the command line; the form as served keeps the level empty,
// so planning without a sample size needs no clearing of it.
func TestStudyPlanLevelNeedsALength(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	sp := studyPath(ws.ID, qs[0].ID)
	before := h.studyCounts(ws.ID)
	rule := htmlEscape(string(elicit.RuleSizeNeedsLength))
	for _, query := range []string{"trials=50&level=0.9", "trials=50&level=0.95&criterion=alc&interval=equal&direction=below", "trials=50&length=&level=0.8"} {
		res, body := h.get(sp + "?" + query)
		if res.StatusCode != http.StatusUnprocessableEntity {
			t.Errorf("%s: status %d, want 422", query, res.StatusCode)
		}
		if !hasFieldError(body, "level") || !strings.Contains(body, rule) {
			t.Errorf("%s: beside the level: %v, says %q: %v", query, hasFieldError(body, "level"), elicit.RuleSizeNeedsLength, strings.Contains(body, rule))
		}
		if strings.Contains(body, "What the study may see") {
			t.Errorf("%s: a plan was drawn from a refused form", query)
		}
	}
	if after := h.studyCounts(ws.ID); after != before {
		t.Errorf("refused plans changed the data and events: %v, then %v", before, after)
	}
	// The served form: the level empty, and submitted as it is (with its
	// choices' defaults) it plans.
	res, body := h.get(sp)
	if res.StatusCode != http.StatusOK || !strings.Contains(body, `name="level" value=""`) {
		t.Errorf("fresh page: %d; the level field is not empty", res.StatusCode)
	}
	if res, body := h.get(sp + "?prior=expert-1&trials=60&direction=below&threshold=&confidence=&length=&level=&criterion=alc&interval=equal&woc_trim="); res.StatusCode != http.StatusOK || !strings.Contains(body, "What the study may see") {
		t.Errorf("the served form without a sample size: %d", res.StatusCode)
	}
	// A length alone: the level 0.95, as `parley plan --length` takes it.
	res, body = h.get(sp + "?trials=60&length=0.06")
	if res.StatusCode != http.StatusOK || !strings.Contains(body, "its equal-tailed 95% intervals are on average at most 0.06 wide") {
		t.Errorf("a length alone: %d, the goal at 95%% in words: %v", res.StatusCode, strings.Contains(body, "95% intervals are on average at most 0.06 wide"))
	}
}

// TestStudyPredictivePictureCoversTheTable: the predictive picture drew
// outcomes by its tails' rule (each tail up to 5e-4 left out) and the table
// beside it listed every outcome of probability 1e-4 or more, so under the
// demo's agreed prior with 200 trials the table ran to 43 successes and
// the picture stopped at 42. Every count the table lists is now drawn:
// the bars of the page's picture span the table's rows.
func TestStudyPredictivePictureCoversTheTable(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	sp := studyPath(ws.ID, qs[0].ID)
	rowRe := regexp.MustCompile(`<tr><td>(\d+)</td>`)
	drawnRe := regexp.MustCompile(`Outcomes from (\d+) to (\d+) are drawn`)
	barRe := regexp.MustCompile(`<rect class="bar[ "]`)
	for _, query := range []string{"trials=200", "trials=100", "trials=20", "prior=expert-1&trials=200", "prior=expert-4&trials=60"} {
		res, body := h.get(sp + "?" + query)
		if res.StatusCode != http.StatusOK {
			t.Fatalf("%s: %d", query, res.StatusCode)
		}
		i := strings.Index(body, `class="chart-table predictive-table"`)
		j := strings.Index(body[i:], "</table>")
		if i < 0 || j < 0 {
			t.Fatalf("%s: no predictive table", query)
		}
		var rows []int
		for _, m := range rowRe.FindAllStringSubmatch(body[i:i+j], -1) {
			x, _ := strconv.Atoi(m[1])
			rows = append(rows, x)
		}
		trials, _ := strconv.Atoi(query[strings.LastIndex(query, "=")+1:])
		lo, hi := 0, trials
		fig := body[strings.Index(body, `<figure class="chart chart-study" id="predictive"`):]
		fig = fig[:strings.Index(fig, "</figure>")]
		if m := drawnRe.FindStringSubmatch(fig); m != nil {
			lo, _ = strconv.Atoi(m[1])
			hi, _ = strconv.Atoi(m[2])
		}
		// One bar per outcome in each of the two drawings (wide, compact).
		if bars := len(barRe.FindAllString(fig, -1)); bars != 2*(hi-lo+1) {
			t.Errorf("%s: %d bars, want one per outcome %d to %d in each drawing", query, bars, lo, hi)
		}
		if len(rows) == 0 || rows[0] < lo || rows[len(rows)-1] > hi {
			t.Errorf("%s: the table lists %v, the picture draws %d to %d", query, rows, lo, hi)
		}
	}
}

// TestStudyPlanLevelStaysAsTyped: a length given without a level is
// planned at 0.95, but the form served back keeps the level as the
// facilitator left it, empty. It was filled with 0.95 by the server, so
// that clearing the length to plan without a sample size, the next step
// the form invites, was refused: "level: applies to the sample size".
func TestStudyPlanLevelStaysAsTyped(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	sp := studyPath(ws.ID, qs[0].ID)
	res, body := h.get(sp + "?prior=expert-1&trials=60&direction=below&threshold=&confidence=&length=0.06&level=&criterion=alc&interval=equal&woc_trim=")
	if res.StatusCode != http.StatusOK || !strings.Contains(body, "95% intervals are on average at most 0.06 wide") {
		t.Fatalf("a length alone: %d, the goal at 95%% in words: %v", res.StatusCode, strings.Contains(body, "95% intervals are on average at most 0.06 wide"))
	}
	if !strings.Contains(body, `name="level" value=""`) {
		t.Errorf("the form served back after a length alone does not keep the level empty")
	}
	// The same form with its length cleared plans without a sample size.
	res, body = h.get(sp + "?prior=expert-1&trials=60&direction=below&threshold=&confidence=&length=&level=&criterion=alc&interval=equal&woc_trim=")
	if res.StatusCode != http.StatusOK || !strings.Contains(body, "What the study may see") {
		t.Errorf("the length cleared: %d", res.StatusCode)
	}
}

// agreeSample agrees, on question qid, the prior worth an invented
// sample of successes in trials (Beta(s, n − s)), as the quick priors
// page records it, while the round is open.
func agreeSample(t *testing.T, h *harness, qid int64, successes, trials float64, rationale string) {
	t.Helper()
	in := elicit.ConstructionInput{Method: elicit.MethodEquivalentSample, Successes: successes, Trials: trials, Upper: 1}
	made, err := elicit.Construct(in)
	if err != nil {
		t.Fatal(err)
	}
	if err := h.db.AgreePrior(context.Background(), &workshop.AgreedPrior{QuestionID: qid, Source: workshop.PriorFromConstruction,
		Dist: made.Dist, Construction: &in, Rationale: rationale, RoundOpen: true}); err != nil {
		t.Fatal(err)
	}
}

// A posterior whose interval ends lie nearer 0 than a double holds
// (Beta(1e-5, 20.99999) after 0 of 20 under the prior Beta(1e-5,
// 0.99999)) is written [0, 0] on the study page and in the report, with
// the warning that says where the ends really lie; it showed [0, 0]
// alone, which reads as a posterior certain of 0.
func TestStudySaysAnIntervalEndHeldAsABound(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	sp := studyPath(ws.ID, qs[0].ID)
	if res, body := h.post(sp+"/data", url.Values{"successes": {"0"}, "trials": {"20"}, "source": {"Site log (invented)"}, "observed_on": {"2026-03-31"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("record data: %d %s", res.StatusCode, body)
	}
	agreeAgain(t, h, ws.ID, elicit.Beta{Alpha: 1e-5, Beta: 0.99999}, "Invented: a prior with nearly all its weight at 0.")
	// The 2.5% point of Beta(1e-5, 20.99999) is about 10^-160,209 (the
	// leading term, ln x = (ln p + ln α + ln B(α, β))/α: DLMF 8.17.8).
	const note = "The 2.5% point is about"
	_, page := h.get(sp)
	// The prior's own 5% and 95% points, "90% between 0 and 0", are
	// said too (the 5% point about 10^-130,000 by the same leading term).
	if !strings.Contains(html.UnescapeString(page), "The 5% point is about") {
		t.Errorf("the study page's agreed prior Beta(1e-5, 0.99999) does not say its 90%% range is held as 0")
	}
	if !strings.Contains(html.UnescapeString(page), note) || !strings.Contains(page, "nearer the bound than the computer") {
		t.Errorf("the study page of posterior Beta(1e-5, 20.99999) does not say its interval's ends are held as 0")
	}
	if _, report := h.get(workshopPath(ws.ID) + "/report"); !strings.Contains(html.UnescapeString(report), note) {
		t.Errorf("the report of posterior Beta(1e-5, 20.99999) does not say its interval's ends are held as 0")
	}
}

// The plan's probabilities and proportions take a % sign, as the quick
// priors' coverage beside them does ("90%" taken there, "95%" refused
// here as not a plain decimal number): the same plan either way.
func TestStudyPlanTakesPercentSigns(t *testing.T) {
	prior := elicit.Beta{Alpha: 2, Beta: 38}
	plan := func(v url.Values) planView {
		form := newForm(v)
		p := planStudy(context.Background(), planView{Form: form, Choices: []priorChoice{{Value: "0", Prior: prior}}})
		if !form.OK() || !p.Ran {
			t.Fatalf("%v refused: %v", v, form.Errors)
		}
		return p
	}
	fractions := plan(url.Values{"prior": {"0"}, "trials": {"100"}, "threshold": {"0.08"}, "direction": {"below"}, "confidence": {"0.95"},
		"length": {"0.1"}, "level": {"0.95"}, "criterion": {"woc"}, "interval": {"equal"}, "woc_trim": {"0.05"}})
	percents := plan(url.Values{"prior": {"0"}, "trials": {"100"}, "threshold": {"8%"}, "direction": {"below"}, "confidence": {"95%"},
		"length": {"10%"}, "level": {"95 %"}, "criterion": {"woc"}, "interval": {"equal"}, "woc_trim": {"5%"}})
	if *fractions.Assure != *percents.Assure || fractions.SizeRes.N != percents.SizeRes.N {
		t.Errorf("with %% signs: assurance %+v, n %d; as fractions %+v, n %d", *percents.Assure, percents.SizeRes.N, *fractions.Assure, fractions.SizeRes.N)
	}
	// A plain 95 stays refused, as the coverage's plain 90 is.
	form := newForm(url.Values{"prior": {"0"}, "trials": {"100"}, "threshold": {"0.08"}, "direction": {"below"}, "confidence": {"95"}})
	planStudy(context.Background(), planView{Form: form, Choices: []priorChoice{{Value: "0", Prior: prior}}})
	if form.Error("confidence") == "" {
		t.Error("a plain 95 is taken as the confidence")
	}
}

// The plan's hints say a % sign is taken, as the fields now take it
// (TestStudyPlanTakesPercentSigns): they said "e.g. 0.95" alone.
func TestStudyPlanHintsSayAPercentSignIsTaken(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	_, body := h.get(studyPath(ws.ID, qs[0].ID))
	for _, hint := range []string{"a proportion, e.g. 0.08 or 8%", "e.g. 0.95 or 95%", "e.g. 0.04 or 4%", "e.g. 0.9 or 90%; 0.95 if left empty", "e.g. 0.05 or 5% (worst outcome only)"} {
		if !strings.Contains(body, hint) {
			t.Errorf("the study page's plan lacks the hint %q", hint)
		}
	}
}

// An agreed prior that is itself the uniform Beta(1, 1) (a prior of no
// judgement, agreed on purpose) is the comparison's reference: no second
// uniform row is added under another name, and the words say the agreed
// prior's row is what the data say alone. The same posterior had stood
// twice, once as "Agreed prior" and once as the reference "no judgement".
func TestStudyUniformAgreedPriorIsTheReference(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	sp := studyPath(ws.ID, qs[0].ID)
	if res, body := h.post(sp+"/data", url.Values{"successes": {"2"}, "trials": {"40"}, "source": {"Site log (invented)"}, "observed_on": {"2026-03-31"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("record data: %d %s", res.StatusCode, body)
	}
	_, page := h.get(sp)
	if n := strings.Count(page, "Uniform, for reference (no judgement)"); n == 0 {
		t.Fatal("the demo's comparison has no uniform reference row")
	}
	agreeAgain(t, h, ws.ID, elicit.Uniform(), "Invented: no judgement, on purpose.")
	_, page = h.get(sp)
	page = html.UnescapeString(page)
	if strings.Contains(page, "Uniform, for reference (no judgement)") {
		t.Error("a uniform agreed prior is compared with a second uniform row")
	}
	if want := "The agreed prior is itself the uniform Beta(1, 1), which carries no judgement: its row is what the data say alone"; !strings.Contains(page, want) {
		t.Errorf("the comparison's words lack %q", want)
	}
	if strings.Contains(page, "The last row, the uniform Beta(1, 1), carries no judgement") {
		t.Error("the words still speak of a last, uniform row")
	}
}

package web

import (
	"context"
	"encoding/csv"
	"errors"
	"io"
	"log/slog"
	"math"
	"net/http"
	"net/url"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// seedPanel is an invented panel on gasket wear with four experts (Bo
// Lindh far too sure of himself), three calibration questions at 5/50/95
// stored without true values, one calibration question at quartiles (left
// out of the scores) and two target questions.
type seedPanel struct {
	h       *harness
	ws      workshop.Workshop
	experts []workshop.Expert
	tokens  []string
	seeds   []workshop.Question // the three 5/50/95 calibration questions
	quart   workshop.Question
	targets []workshop.Question
}

var (
	seedTruths  = []float64{0.3172, 0.5431, 0.2186}
	seedNames   = []string{"Ada Quist", "Bo Lindh", "Cem Arslan", "Dana Roe"}
	seedAnswers = [][][]float64{ // expert → calibration question → 5/50/95
		{{0.15, 0.30, 0.55}, {0.30, 0.50, 0.75}, {0.08, 0.20, 0.40}},
		{{0.60, 0.62, 0.64}, {0.10, 0.12, 0.14}, {0.70, 0.72, 0.74}},
		{{0.05, 0.35, 0.80}, {0.10, 0.45, 0.90}, {0.05, 0.30, 0.70}},
		{{0.25, 0.34, 0.45}, {0.45, 0.56, 0.66}, {0.15, 0.24, 0.33}},
	}
	targetAnswers = [][][]float64{ // expert → target question → 5/50/95
		{{0.02, 0.06, 0.15}, {0.10, 0.20, 0.35}},
		{{0.20, 0.21, 0.22}, {0.50, 0.52, 0.54}},
		{{0.01, 0.10, 0.40}, {0.05, 0.25, 0.60}},
		{{0.03, 0.07, 0.12}, {0.12, 0.20, 0.30}},
	}
)

func newSeedPanel(t *testing.T) *seedPanel {
	t.Helper()
	h := newHarness(t)
	h.signIn()
	ctx := context.Background()
	p := &seedPanel{h: h}
	p.ws = workshop.Workshop{Title: "Gasket wear (invented)", Purpose: "Invented test panel", Invented: true}
	if err := h.db.CreateWorkshop(ctx, &p.ws); err != nil {
		t.Fatal(err)
	}
	add := func(q workshop.Question) workshop.Question {
		q.WorkshopID, q.Lower, q.Upper, q.Format = p.ws.ID, 0, 1, workshop.FormatQuantiles
		if q.Probs == nil {
			q.Probs = []float64{0.05, 0.5, 0.95}
		}
		if err := h.db.AddQuestion(ctx, &q); err != nil {
			t.Fatal(err)
		}
		return q
	}
	p.targets = append(p.targets, add(workshop.Question{Wording: "Share of gaskets worn out in year one?", Quantity: "worn share"}))
	for i := range seedTruths {
		p.seeds = append(p.seeds, add(workshop.Question{Wording: "Seed " + strconv.Itoa(i+1), Quantity: "seed share " + strconv.Itoa(i+1), Calibration: true}))
	}
	p.quart = add(workshop.Question{Wording: "Quartile seed", Quantity: "quartile seed share", Probs: workshop.ProbsQuartiles, Calibration: true})
	p.targets = append(p.targets, add(workshop.Question{Wording: "Share of seals leaking in year one?", Quantity: "leak share"}))
	for i, name := range seedNames {
		token, hash, err := newToken()
		if err != nil {
			t.Fatal(err)
		}
		e := workshop.Expert{WorkshopID: p.ws.ID, Name: name}
		if err := h.db.AddExpert(ctx, &e, hash); err != nil {
			t.Fatal(err)
		}
		p.experts, p.tokens = append(p.experts, e), append(p.tokens, token)
		save := func(q workshop.Question, v []float64) {
			rv := workshop.Revision{QuestionID: q.ID, ExpertID: e.ID, Answer: workshop.Answer{Values: v}}
			if err := h.db.SaveRevision(ctx, &rv); err != nil {
				t.Fatal(err)
			}
		}
		for j, q := range p.seeds {
			save(q, seedAnswers[i][j])
		}
		for j, q := range p.targets {
			save(q, targetAnswers[i][j])
		}
		if i == 0 {
			save(p.quart, []float64{0.3, 0.4, 0.5})
		}
	}
	return p
}

func (p *seedPanel) path() string { return calibrationPath(p.ws.ID) }

// enterTruths enters (and optionally reveals) every true value through the form.
func (p *seedPanel) enterTruths(t *testing.T, reveal bool) {
	t.Helper()
	for i, q := range append(p.seeds, p.quart) {
		v := 0.4410
		if i < len(seedTruths) {
			v = seedTruths[i]
		}
		form := url.Values{"true_value": {strconv.FormatFloat(v, 'g', -1, 64)}}
		if reveal {
			form.Set("reveal", "on")
			form.Set("reason", "answers are in (invented)")
		}
		if res, body := p.h.post(seedPath(p.ws.ID, q.ID), form); res.StatusCode != http.StatusSeeOther {
			t.Fatalf("true value of %s: %d %s", q.Quantity, res.StatusCode, body)
		}
	}
}

// model is ClassicalModel on the test's own answers, built here without
// NewCalibrationSet, with expert names as keys.
func model(t *testing.T, alpha *float64) elicit.Scores {
	t.Helper()
	as, real, bounds := modelInput()
	sc, err := elicit.ClassicalModel(as, real, bounds, elicit.ModelOptions{Alpha: alpha})
	if err != nil {
		t.Fatal(err)
	}
	return sc
}

func modelInput() ([]elicit.SeedAssessment, map[string]float64, map[string][2]float64) {
	var as []elicit.SeedAssessment
	real := map[string]float64{}
	bounds := map[string][2]float64{}
	for j, tv := range seedTruths {
		q := "seed" + strconv.Itoa(j)
		real[q], bounds[q] = tv, [2]float64{0, 1}
		for i, name := range seedNames {
			as = append(as, elicit.SeedAssessment{Expert: name, Question: q, Probs: []float64{0.05, 0.5, 0.95}, Quantiles: seedAnswers[i][j]})
		}
	}
	return as, real, bounds
}

// rowCells returns the cells of the table row headed by label in the
// first table after the element with id.
func rowCells(t *testing.T, body, id, label string) []string {
	t.Helper()
	i := strings.Index(body, `id="`+id+`"`)
	if i < 0 {
		t.Fatalf("no element %q on the page", id)
	}
	j := strings.Index(body[i:], `<th scope="row">`+label+`</th>`)
	if j < 0 {
		t.Fatalf("no row %q in %q", label, id)
	}
	row := body[i+j:]
	row = row[:strings.Index(row, "</tr>")]
	var out []string
	for _, m := range regexp.MustCompile(`<td[^>]*>([^<]*)`).FindAllStringSubmatch(row, -1) {
		out = append(out, strings.TrimSpace(m[1]))
	}
	return out
}

func TestCalibrationPageShowsTheClassicalModel(t *testing.T) {
	p := newSeedPanel(t)
	h := p.h
	res, body := h.get(p.path())
	if res.StatusCode != http.StatusOK {
		t.Fatalf("page: %d", res.StatusCode)
	}
	for _, want := range []string{"Calibration questions", "no true value yet", "Answered by everyone: Ada Quist, Bo Lindh, Cem Arslan and Dana Roe.",
		"The scores appear once every calibration question has a true value: 3 questions still have none.", "Caution."} {
		if !strings.Contains(body, want) {
			t.Errorf("before truths: page lacks %q", want)
		}
	}
	if strings.Contains(body, `id="scores-table"`) {
		t.Fatal("scores shown before the true values are in")
	}

	p.enterTruths(t, false)
	res, body = h.get(p.path())
	if res.StatusCode != http.StatusOK {
		t.Fatalf("page: %d", res.StatusCode)
	}
	sc := model(t, nil)
	for _, e := range sc.Experts {
		got := rowCells(t, body, "scores-table", e.Expert)
		want := []string{"3", fv(e.Calibration), fv(e.Information), pct(e.Weight)}
		if len(got) != 5 || strings.Join(got[:4], "|") != strings.Join(want, "|") {
			t.Errorf("%s: row %v, want %v and why", e.Expert, got, want)
			continue
		}
		// Why: the product that earns the weight, or the cut-off that
		// takes it away.
		why := "earns " + fv(e.Calibration) + " × " + fv(e.Information) + " = " + fv(e.Combined)
		if e.Weight == 0 {
			why = "calibration score " + fv(e.Calibration) + " is below the cut-off " + fv(sc.Alpha)
		}
		if !strings.HasPrefix(got[4], htmlEscape(why)) {
			t.Errorf("%s: why %q, want %q", e.Expert, got[4], why)
		}
	}
	pool := block(body, "scores-table-pool")
	for _, want := range []string{"The performance-weighted pool, scored as if it were an expert on the same 3 questions",
		"calibration score <strong>" + fv(sc.Pooled.Calibration) + "</strong>", "information score <strong>" + fv(sc.Pooled.Information) + "</strong>",
		"calibration × information " + fv(sc.Pooled.Combined)} {
		if !strings.Contains(pool, want) {
			t.Errorf("the weighted pool's scores lack %q: %s", want, pool)
		}
	}
	// The page leads with the weight map, before the tables.
	mapAt, tableAt := strings.Index(body, `id="weight-map"`), strings.Index(body, `id="scores-table"`)
	if mapAt < 0 || tableAt < 0 || mapAt > tableAt || strings.Index(body, `id="seeds"`) < tableAt {
		t.Errorf("order: weight map at %d, scores table at %d, calibration questions at %d", mapAt, tableAt, strings.Index(body, `id="seeds"`))
	}
	for _, want := range []string{"Cut-off α = " + fv(sc.Alpha) + ", optimised",
		"quartile seed share: asked at 25%, 50%, 75%; the scored questions ask at 5%, 50%, 95%",
		"calibration question Q2 seed share 1", "expert Bo Lindh", "How steady the weighted pool is",
		"Target questions: equal weights beside performance weights", "hidden from the experts"} {
		if !strings.Contains(body, htmlEscape(want)) {
			t.Errorf("page lacks %q", want)
		}
	}
	if regexp.MustCompile(`NaN|\bInf\b`).MatchString(body) {
		t.Error("NaN or Inf on the page")
	}
	// Bo misses every time: his weight is 0 with the optimised cut-off.
	for _, e := range sc.Experts {
		if e.Expert == "Bo Lindh" && e.Weight != 0 {
			t.Errorf("overconfident expert has weight %v", e.Weight)
		}
	}

	// Side by side on a target: the equal pool and the performance pool,
	// each LinearPool of the current fits.
	w := sc.Weights()
	for k, q := range p.targets {
		var dists []elicit.ScaledBeta
		var perf []float64
		for i, name := range seedNames {
			f, err := q.Fit(workshop.Answer{Values: targetAnswers[i][k]})
			if err != nil {
				t.Fatal(err)
			}
			dists, perf = append(dists, f.Dist), append(perf, w[name])
		}
		for _, c := range []struct {
			label   string
			weights []float64
		}{{"equal", nil}, {"performance", perf}} {
			pool, err := elicit.LinearPool(dists, c.weights)
			if err != nil {
				t.Fatal(err)
			}
			want := []string{c.label, fv(pool.Mean()), fv(pool.Quantile(0.05)), fv(pool.Quantile(0.5)), fv(pool.Quantile(0.95))}
			re := regexp.MustCompile(`Q` + strconv.Itoa(q.Position) + ` ` + q.Quantity + `</a></th><td data-label="Weights">` + c.label + `</td>((?:<td class="num" data-label="[^"]*">[^<]*</td>){4})`)
			m := re.FindStringSubmatch(body)
			if m == nil {
				t.Errorf("no %s pool row for %s", c.label, q.Quantity)
				continue
			}
			got := regexp.MustCompile(`<td class="num" data-label="[^"]*">([^<]*)</td>`).FindAllStringSubmatch(m[1], -1)
			for n, g := range got {
				if g[1] != want[n+1] {
					t.Errorf("%s, %s pool: cell %d is %s, want %s", q.Quantity, c.label, n, g[1], want[n+1])
				}
			}
		}
	}

	// The robustness rows equal elicit.LeaveOneOut on the same inputs.
	var targets []elicit.RobustnessTarget
	for k, q := range p.targets {
		rt := elicit.RobustnessTarget{Question: q.Quantity, Fits: map[string]elicit.ScaledBeta{}}
		for i, name := range seedNames {
			f, _ := q.Fit(workshop.Answer{Values: targetAnswers[i][k]})
			rt.Fits[name] = f.Dist
		}
		targets = append(targets, rt)
	}
	as, real, bounds := modelInput()
	loo, err := elicit.LeaveOneOut(as, real, bounds, elicit.ModelOptions{}, targets)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range loo.Cases {
		label := "expert " + c.Name
		if c.LeftOut == elicit.LeaveOutQuestion {
			n, _ := strconv.Atoi(strings.TrimPrefix(c.Name, "seed"))
			label = "calibration question Q" + strconv.Itoa(p.seeds[n].Position) + " " + p.seeds[n].Quantity
		}
		// Cells: α, who carries the weight, the pool on each target
		// (5% · 50% · 95%), the largest shift.
		got := rowCells(t, body, "robustness", label)
		if len(got) != 3+len(p.targets) || got[0] != fv(c.Alpha) || got[len(got)-1] != fv(c.Shift) {
			t.Errorf("robustness row %q: %v, want α %s shift %s", label, got, fv(c.Alpha), fv(c.Shift))
			continue
		}
		for k := range p.targets {
			q := c.Percentiles[k]
			if want := fv(q[0]) + " · " + fv(q[1]) + " · " + fv(q[2]); got[2+k] != want {
				t.Errorf("robustness row %q, target %d: %q, want %q", label, k, got[2+k], want)
			}
		}
	}
	if !strings.Contains(block(body, "robustness"), "the largest of all is "+fv(loo.MaxShift)) {
		t.Errorf("largest shift %s not stated", fv(loo.MaxShift))
	}
	// The picture has a panel per target, each with the whole panel's
	// row and one row per rerun, in its wide and its compact drawing.
	for k := range p.targets {
		fig := block(body, "steadiness-"+strconv.Itoa(k+1))
		if n := strings.Count(fig, `class="steady-row`); n != 2*(1+len(loo.Cases)) {
			t.Errorf("steadiness panel %d has %d rows in its two drawings, want %d in each", k+1, n, 1+len(loo.Cases))
		}
	}

	// A fixed cut-off of 0 weights everyone by calibration × information.
	zero := 0.0
	sc0 := model(t, &zero)
	res, body = h.get(p.path() + "?alpha=0")
	if res.StatusCode != http.StatusOK || !strings.Contains(body, "Cut-off α = 0, fixed") {
		t.Fatalf("alpha=0: %d", res.StatusCode)
	}
	for _, e := range sc0.Experts {
		if got := rowCells(t, body, "scores-table", e.Expert); got[3] != pct(e.Weight) {
			t.Errorf("α = 0: %s weight %s, want %s", e.Expert, got[3], pct(e.Weight))
		}
	}
	// Bad cut-offs are refused beside the field.
	for _, bad := range []string{"abc", "NaN", "1.5", "-0.1", "0.9999"} {
		res, body := h.get(p.path() + "?alpha=" + url.QueryEscape(bad))
		if res.StatusCode < 400 || res.StatusCode >= 500 || !hasFieldError(body, "alpha") || strings.Contains(body, `id="scores-table"`) {
			t.Errorf("alpha=%s: %d, message beside alpha %v", bad, res.StatusCode, hasFieldError(body, "alpha"))
		}
	}
}

func TestTrueValueRefusedBesideTheField(t *testing.T) {
	p := newSeedPanel(t)
	h := p.h
	ctx := context.Background()
	q := p.seeds[0]
	cases := []struct {
		name, field string
		form        url.Values
	}{
		{"empty", "true_value", url.Values{"true_value": {""}}},
		{"not a number", "true_value", url.Values{"true_value": {"about 0.3"}}},
		{"decimal comma", "true_value", url.Values{"true_value": {"0,3172"}}},
		{"NaN", "true_value", url.Values{"true_value": {"NaN"}}},
		{"above the upper bound", "true_value", url.Values{"true_value": {"1.0000001"}}},
		{"below the bounds", "true_value", url.Values{"true_value": {"-0.2"}}},
		{"reveal without reason", "reason", url.Values{"true_value": {"0.3172"}, "reveal": {"on"}, "reason": {" "}}},
	}
	for _, c := range cases {
		before := h.counts(p.ws.ID)
		res, body := h.post(seedPath(p.ws.ID, q.ID), c.form)
		if res.StatusCode < 400 || res.StatusCode >= 500 {
			t.Errorf("%s: status %d, want 4xx", c.name, res.StatusCode)
			continue
		}
		if !hasFieldError(body, c.field) || !strings.Contains(body, "Nothing was saved") {
			t.Errorf("%s: no message beside %s", c.name, c.field)
		}
		if typed := c.form.Get("true_value"); typed != "" && !strings.Contains(body, `value="`+htmlEscape(typed)+`"`) {
			t.Errorf("%s: typed value %q not shown again", c.name, typed)
		}
		got, _ := h.db.Question(ctx, q.ID)
		if got.TrueValue != nil || got.Revealed || h.counts(p.ws.ID) != before {
			t.Errorf("%s: something was saved: %+v", c.name, got)
		}
	}
	// A target question has no true value to set.
	before := h.counts(p.ws.ID)
	if res, _ := h.post(seedPath(p.ws.ID, p.targets[0].ID), url.Values{"true_value": {"0.5"}}); res.StatusCode != http.StatusUnprocessableEntity {
		t.Errorf("true value on a target question: %d", res.StatusCode)
	}
	if got, _ := h.db.Question(ctx, p.targets[0].ID); got.TrueValue != nil || h.counts(p.ws.ID) != before {
		t.Error("true value saved on a target question")
	}
	// A good value with reveal is stored and the reveal recorded.
	if res, body := h.post(seedPath(p.ws.ID, q.ID), url.Values{"true_value": {"0.3172"}, "reveal": {"on"}, "reason": {"all in (invented)"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("good value: %d %s", res.StatusCode, body)
	}
	got, _ := h.db.Question(ctx, q.ID)
	if got.TrueValue == nil || *got.TrueValue != 0.3172 || !got.Revealed {
		t.Fatalf("stored %+v", got)
	}
	evs, _ := h.db.Events(ctx, p.ws.ID)
	if last := evs[len(evs)-1]; last.Kind != workshop.EventTruthRevealed || last.Reason != "all in (invented)" || last.QuestionID != q.ID {
		t.Fatalf("last event %+v", last)
	}
	// Changing a revealed value needs a reason and is recorded.
	before = h.counts(p.ws.ID)
	if res, body := h.post(seedPath(p.ws.ID, q.ID), url.Values{"true_value": {"0.3175"}}); res.StatusCode != http.StatusUnprocessableEntity || !hasFieldError(body, "reason") || h.counts(p.ws.ID) != before {
		t.Fatalf("changing a revealed value without reason: %d", res.StatusCode)
	}
	if res, _ := h.post(seedPath(p.ws.ID, q.ID), url.Values{"true_value": {"0.3175"}, "reason": {"typo (invented)"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("changing a revealed value: %d", res.StatusCode)
	}
	evs, _ = h.db.Events(ctx, p.ws.ID)
	if last := evs[len(evs)-1]; last.Kind != workshop.EventTruthRevealed || last.Reason != "typo (invented)" || !strings.Contains(last.Detail, "0.3175") {
		t.Fatalf("change of a revealed value recorded as %+v", last)
	}
	// An observed share of exactly 0 or 1 is a true value too (no unit of a
	// tested batch failed), as parley calibrate takes a realisation on a
	// bound; every expert is then scored with it in their lowest or highest
	// bin, and the page shows the scores.
	for i, v := range []string{"0", "1"} {
		sq := p.seeds[i+1]
		if res, body := h.post(seedPath(p.ws.ID, sq.ID), url.Values{"true_value": {v}}); res.StatusCode != http.StatusSeeOther {
			t.Fatalf("true value %s on a bound: %d %s", v, res.StatusCode, body)
		}
		if got, _ := h.db.Question(ctx, sq.ID); got.TrueValue == nil || fv(*got.TrueValue) != v {
			t.Fatalf("true value %s stored as %+v", v, got.TrueValue)
		}
	}
	res, page := h.get("/w/" + itoa(p.ws.ID) + "/calibration")
	if code := res.StatusCode; code != http.StatusOK || strings.Contains(page, "NaN") || strings.Contains(page, "not available") || !strings.Contains(page, "Calibration") {
		t.Errorf("calibration page with true values on the bounds: %d", res.StatusCode)
	}
	if !strings.Contains(page, "classical model on 3 calibration questions") {
		t.Error("the calibration page does not score the experts on the three questions")
	}
}

func TestPerformanceWeightsChangeThePool(t *testing.T) {
	p := newSeedPanel(t)
	h := p.h
	ctx := context.Background()
	// Not yet possible: the true values are missing.
	before := h.counts(p.ws.ID)
	res, body := h.post(p.path()+"/weights", url.Values{"scheme": {"performance"}, "reason": {"seeds scored (invented)"}})
	if res.StatusCode != http.StatusUnprocessableEntity || !hasFieldError(body, "scheme") || h.counts(p.ws.ID) != before {
		t.Fatalf("performance weights before the truths: %d", res.StatusCode)
	}
	p.enterTruths(t, false)
	qp := questionPath(p.ws.ID, p.targets[0].ID)
	_, panelBefore := h.get(qp)
	// A reason is required.
	before = h.counts(p.ws.ID)
	res, body = h.post(p.path()+"/weights", url.Values{"scheme": {"performance"}, "reason": {""}})
	if res.StatusCode != http.StatusUnprocessableEntity || !hasFieldError(body, "reason") || h.counts(p.ws.ID) != before {
		t.Fatalf("performance weights without reason: %d", res.StatusCode)
	}
	res, body = h.post(p.path()+"/weights", url.Values{"scheme": {"performance"}, "reason": {"Bo missed every seed (invented)"}})
	if res.StatusCode != http.StatusSeeOther {
		t.Fatalf("performance weights: %d %s", res.StatusCode, body)
	}
	wt, _ := h.db.Weights(ctx, p.ws.ID)
	sc := model(t, nil).Weights()
	if wt.Scheme != workshop.WeightsPerformance || wt.Reason != "Bo missed every seed (invented)" {
		t.Fatalf("stored weights %+v", wt)
	}
	for _, e := range p.experts {
		if d := wt.ByExpert[e.ID] - sc[e.Name]; d > 1e-12 || d < -1e-12 {
			t.Errorf("%s: stored weight %v, model %v", e.Name, wt.ByExpert[e.ID], sc[e.Name])
		}
	}
	evs, _ := h.db.Events(ctx, p.ws.ID)
	if last := evs[len(evs)-1]; last.Kind != workshop.EventWeightsSet || last.Reason != wt.Reason {
		t.Fatalf("last event %+v", last)
	}
	// The target question's pool is now the performance-weighted one.
	var dists []elicit.ScaledBeta
	var ws []float64
	for i, name := range seedNames {
		f, _ := p.targets[0].Fit(workshop.Answer{Values: targetAnswers[i][0]})
		dists, ws = append(dists, f.Dist), append(ws, sc[name])
	}
	perf, _ := elicit.LinearPool(dists, ws)
	equal, _ := elicit.LinearPool(dists, nil)
	_, panelAfter := h.get(qp)
	mean := func(v float64) string { return `<td class="num" data-label="Mean">` + fv(v) + `</td>` }
	if !strings.Contains(panelBefore, mean(equal.Mean())) || !strings.Contains(panelAfter, mean(perf.Mean())) ||
		strings.Contains(panelAfter, mean(equal.Mean())) {
		t.Errorf("panel pool mean: want %s before and %s after", fv(equal.Mean()), fv(perf.Mean()))
	}
	_, body = h.get(p.path())
	if !strings.Contains(body, "They are the performance weights shown above.") {
		t.Error("calibration page does not say the performance weights are in force")
	}
	// Back to equal weights from the same form.
	if res, _ := h.post(p.path()+"/weights", url.Values{"scheme": {"equal"}, "reason": {"compare (invented)"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("equal weights: %d", res.StatusCode)
	}
	if wt, _ := h.db.Weights(ctx, p.ws.ID); wt.Scheme != workshop.WeightsEqual {
		t.Fatalf("stored %+v", wt)
	}
}

func TestReportAndExportCarryTheScores(t *testing.T) {
	p := newSeedPanel(t)
	h := p.h
	p.enterTruths(t, false)
	_, body := h.get(workshopPath(p.ws.ID) + "/report")
	if !strings.Contains(body, "No scores in this record: scores are shown once every scored calibration question") {
		t.Error("report does not say why there are no scores before the reveal")
	}
	for _, tv := range seedTruths {
		if strings.Contains(body, fv(tv)) {
			t.Errorf("report shows the unrevealed true value %v", tv)
		}
	}
	p.enterTruths(t, true)
	if res, _ := h.post(p.path()+"/weights", url.Values{"scheme": {"performance"}, "reason": {"scored (invented)"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("weights: %d", res.StatusCode)
	}
	sc := model(t, nil)
	_, body = h.get(workshopPath(p.ws.ID) + "/report")
	for _, e := range sc.Experts {
		got := rowCells(t, body, "performance", e.Expert)
		if len(got) < 5 || got[1] != fv(e.Calibration) || got[3] != pct(e.Weight) {
			t.Errorf("report row %s: %v", e.Expert, got)
		}
	}
	if !strings.Contains(body, "These are the weights in force.") || !strings.Contains(body, "the largest of all is") || !strings.Contains(body, `id="record-weight-map"`) {
		t.Error("report lacks the weights-in-force line or the robustness table")
	}
	res, js := h.get(workshopPath(p.ws.ID) + "/export.json")
	if res.StatusCode != http.StatusOK {
		t.Fatalf("export: %d", res.StatusCode)
	}
	rec, err := record.Parse(strings.NewReader(js))
	if err != nil {
		t.Fatal(err)
	}
	perf := rec.Performance
	if perf == nil || perf.Alpha != sc.Alpha || !perf.InForce || perf.Robustness == nil || len(perf.Experts) != 4 {
		t.Fatalf("exported performance %+v", perf)
	}
	w := sc.Weights()
	for _, e := range perf.Experts {
		if d := e.Weight - w[e.Name]; d > 1e-12 || d < -1e-12 {
			t.Errorf("exported weight of %s %v, model %v", e.Name, e.Weight, w[e.Name])
		}
	}
}

func TestExpertPagesNeverShowTruthsOrScores(t *testing.T) {
	p := newSeedPanel(t)
	h := p.h
	p.enterTruths(t, false)
	if res, _ := h.post(p.path()+"/weights", url.Values{"scheme": {"performance"}, "reason": {"scored (invented)"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("weights: %d", res.StatusCode)
	}
	sc := model(t, nil)
	var secrets []string
	for _, e := range sc.Experts {
		secrets = append(secrets, fv(e.Calibration), fv(e.Information), fv(e.Combined))
	}
	forbidden := []string{"Calibration ×", "calibration score", "Information", "Weight", "Cut-off", "decision maker"}
	anon := newHarnessClient(h)
	questions := append(append(append([]workshop.Question{}, p.seeds...), p.quart), p.targets...)
	check := func(stage string, truthsHidden bool) {
		for i, token := range p.tokens {
			paths := []string{expertPath(token)}
			for _, q := range questions {
				paths = append(paths, expertPath(token)+"q/"+strconv.FormatInt(q.ID, 10))
			}
			for _, path := range paths {
				res, body := anon.get(path)
				if res.StatusCode != http.StatusOK {
					t.Fatalf("%s: GET %s: %d", stage, path, res.StatusCode)
				}
				if truthsHidden {
					for _, tv := range append(seedTruths, 0.4410) {
						if strings.Contains(body, strconv.FormatFloat(tv, 'g', -1, 64)) || strings.Contains(body, fv(tv)) {
							t.Errorf("%s: %s shows the hidden true value %v", stage, path, tv)
						}
					}
				}
				for _, s := range append(secrets, forbidden...) {
					if strings.Contains(body, s) {
						t.Errorf("%s: %s shows %q", stage, path, s)
					}
				}
				for j, name := range seedNames {
					if j != i && strings.Contains(body, name) {
						t.Errorf("%s: %s names another expert, %s", stage, path, name)
					}
				}
			}
		}
	}
	check("before the reveal", true)
	p.enterTruths(t, true)
	check("after the reveal", false)
}

// TestDemoCalibrationScores checks that the invented demo has scores from
// first start and that its overconfident expert earns no weight.
func TestDemoCalibrationScores(t *testing.T) {
	h, ws, _, _, _ := seeded(t)
	res, body := h.get(calibrationPath(ws.ID))
	if res.StatusCode != http.StatusOK || !strings.Contains(body, `id="scores-table"`) {
		t.Fatalf("demo calibration page: %d, scores shown %v", res.StatusCode, strings.Contains(body, `id="scores-table"`))
	}
	if got := rowCells(t, body, "scores-table", "Ole Brandt"); len(got) != 5 || got[0] != "4" || got[3] != "0%" {
		t.Errorf("Ole Brandt's row %v, want 4 questions answered and weight 0%%", got)
	}
	if !strings.Contains(body, "share of returns from capacitor faults: asked at 25%, 50%, 75%") {
		t.Error("the quartile calibration question is not noted as left out")
	}
	if regexp.MustCompile(`NaN|\bInf\b`).MatchString(body) {
		t.Error("NaN or Inf on the demo calibration page")
	}
}

func TestCalibrationCustomAndFixedCutOffWeights(t *testing.T) {
	p := newSeedPanel(t)
	h := p.h
	ctx := context.Background()
	p.enterTruths(t, false)
	custom := url.Values{"scheme": {"custom"}, "reason": {"kept reason (invented)"}}
	for i, e := range p.experts {
		custom.Set(weightField(e.ID), []string{"2", "-1", "1", "1"}[i])
	}
	before := h.counts(p.ws.ID)
	res, body := h.post(p.path()+"/weights", custom)
	if res.StatusCode != http.StatusUnprocessableEntity || !hasFieldError(body, weightField(p.experts[1].ID)) ||
		!strings.Contains(body, "kept reason (invented)") || h.counts(p.ws.ID) != before {
		t.Fatalf("negative custom weight: %d", res.StatusCode)
	}
	custom.Set(weightField(p.experts[1].ID), "0")
	if res, body := h.post(p.path()+"/weights", custom); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("custom weights: %d %s", res.StatusCode, body)
	}
	if wt, _ := h.db.Weights(ctx, p.ws.ID); wt.Scheme != workshop.WeightsCustom || wt.ByExpert[p.experts[0].ID] != 2 || wt.ByExpert[p.experts[1].ID] != 0 {
		t.Fatalf("stored %+v", wt)
	}
	// Performance weights with a fixed cut-off of 0: every expert weighted
	// by calibration × information, and the record reports that cut-off.
	zero := 0.0
	sc := model(t, &zero).Weights()
	res, _ = h.post(p.path()+"/weights", url.Values{"scheme": {"performance"}, "alpha": {"0"}, "reason": {"everyone counts (invented)"}})
	if res.StatusCode != http.StatusSeeOther || res.Header.Get("Location") != p.path()+"?alpha=0#weights" {
		t.Fatalf("fixed cut-off weights: %d %s", res.StatusCode, res.Header.Get("Location"))
	}
	wt, _ := h.db.Weights(ctx, p.ws.ID)
	for _, e := range p.experts {
		if d := wt.ByExpert[e.ID] - sc[e.Name]; d > 1e-12 || d < -1e-12 || sc[e.Name] == 0 {
			t.Errorf("%s: stored %v, model at α = 0 %v", e.Name, wt.ByExpert[e.ID], sc[e.Name])
		}
	}
	p.enterTruths(t, true)
	_, js := h.get(workshopPath(p.ws.ID) + "/export.json")
	rec, err := record.Parse(strings.NewReader(js))
	if err != nil {
		t.Fatal(err)
	}
	if perf := rec.Performance; perf == nil || perf.Alpha != 0 || perf.AlphaRule != workshop.AlphaFixed || !perf.InForce {
		t.Fatalf("exported performance %+v, want the fixed cut-off 0 in force", rec.Performance)
	}
	// A cut-off above every calibration score is refused, nothing saved.
	before = h.counts(p.ws.ID)
	res, body = h.post(p.path()+"/weights", url.Values{"scheme": {"performance"}, "alpha": {"0.99"}, "reason": {"too strict (invented)"}})
	if res.StatusCode != http.StatusUnprocessableEntity || !hasFieldError(body, "alpha") || h.counts(p.ws.ID) != before {
		t.Fatalf("cut-off above every score: %d", res.StatusCode)
	}
}

func TestCalibrationPageWithoutScorableSeeds(t *testing.T) {
	h := newHarness(t)
	h.signIn()
	ws := h.newWorkshop("No seeds (invented)")
	res, body := h.get(calibrationPath(ws.ID))
	if res.StatusCode != http.StatusOK || !strings.Contains(body, "This workshop has no calibration questions.") {
		t.Fatalf("empty workshop: %d", res.StatusCode)
	}
	// A calibration question in chips is listed, noted as left out, and
	// no scores are drawn.
	if res, body := h.post(workshopPath(ws.ID)+"/questions", url.Values{"wording": {"Chips seed"}, "quantity": {"chips seed share"},
		"lower": {"0"}, "upper": {"1"}, "format": {"chips"}, "bin_edges": {"0 0.25 0.5 1"}, "chips": {"10"},
		"calibration": {"on"}, "true_value": {"0.3"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("chips seed: %d %s", res.StatusCode, body)
	}
	_, body = h.get(calibrationPath(ws.ID))
	for _, want := range []string{"chips seed share: asked as chips in bins; the classical model scores answers given as quantiles",
		"There are no answered calibration questions in quantiles to score yet."} {
		if !strings.Contains(body, want) {
			t.Errorf("page lacks %q", want)
		}
	}
	if strings.Contains(body, `id="scores-table"`) {
		t.Error("scores drawn without a scorable question")
	}
	if res, _ := h.get(calibrationPath(999)); res.StatusCode != http.StatusNotFound {
		t.Errorf("missing workshop: %d", res.StatusCode)
	}
}

// A rerun that cannot be done says why in words: never the model's own
// message, which stays in the record.
func TestSteadinessRerunErrorsInWords(t *testing.T) {
	internal := "elicit: assessments: wrong number of entries (need at least 1 assessment, got 0)"
	qs := []workshop.Question{{ID: 7, Position: 2, Quantity: "seed share", Calibration: true, Lower: 0, Upper: 1}}
	rb := &workshop.Robustness{Targets: []int64{7}, Rows: []workshop.RobustnessRow{
		{LeftOut: elicit.LeaveOutQuestion, ID: 7, Label: "Q2", Error: internal},
		{LeftOut: elicit.LeaveOutExpert, ID: 1, Label: "Ada", Error: "elicit: experts: " + string(elicit.RuleNoScoredExperts)},
		{LeftOut: elicit.LeaveOutExpert, ID: 2, Label: "Bo", Alpha: 0.1},
	}}
	s := newSteadiness("steady", rb, qs, map[int64]string{1: "Ada", 2: "Bo"})
	for i, want := range []string{"Leaving out the only scored calibration question leaves nothing to score.",
		"Without this expert, the classical model cannot score the panel.", ""} {
		if s.Rows[i].Error != want {
			t.Errorf("row %d: %q, want %q", i, s.Rows[i].Error, want)
		}
	}
	var b strings.Builder
	if err := steadinessSection(rb, "", qs, map[int64]string{1: "Ada", 2: "Bo"}, false).Render(context.Background(), &b); err != nil {
		t.Fatal(err)
	}
	if strings.Contains(b.String(), "elicit:") || !strings.Contains(b.String(), "leaves nothing to score") {
		t.Errorf("the section shows the model's own words or not the reason:\n%s", b.String())
	}
}

// Scores on true values the experts have not yet been shown are marked
// provisional on the calibration page, since the report and the export
// carry scores only once every true value is shown; after the reveal the
// mark is gone.
func TestScoresOnUnshownTruthsAreProvisional(t *testing.T) {
	p := newSeedPanel(t)
	p.enterTruths(t, false)
	_, body := p.h.get(p.path())
	if !strings.Contains(body, `id="scores-table"`) || !strings.Contains(body, `id="scores-provisional"`) ||
		!strings.Contains(body, htmlEscape("3 calibration questions' true values are not yet shown to the experts, so these scores are provisional")) {
		t.Errorf("scores on unshown truths are not marked provisional")
	}
	p.enterTruths(t, true)
	if _, body := p.h.get(p.path()); strings.Contains(body, `id="scores-provisional"`) {
		t.Error("scores are still marked provisional after every true value is shown")
	}
}

// The optimised cut-off is Ada's and Dana's calibration score, 0.187753,
// which the page writes as 0.1878. Fixed at that figure, the cut-off is
// above their score and they get weight 0; their line must then say so
// with the figures that show it, not "calibration score 0.1878 is below
// the cut-off 0.1878" (chart.FormatValueBeside).
func TestWhyBelowTheCutOffShowsTheDifference(t *testing.T) {
	p := newSeedPanel(t)
	p.enterTruths(t, false)
	opt := model(t, nil)
	typed := fv(opt.Alpha)
	a, err := strconv.ParseFloat(typed, 64)
	if err != nil || !(a > opt.Alpha) {
		t.Fatalf("the case needs the optimised α %v written above itself, got %q", opt.Alpha, typed)
	}
	sc := model(t, &a)
	res, body := p.h.get(p.path() + "?alpha=" + url.QueryEscape(typed))
	if res.StatusCode != http.StatusOK {
		t.Fatalf("page: %d", res.StatusCode)
	}
	dropped := 0
	for _, e := range sc.Experts {
		if e.Calibration != opt.Alpha {
			continue
		}
		dropped++
		if e.Weight != 0 {
			t.Fatalf("%s: weight %v under α = %v above their score %v", e.Expert, e.Weight, a, e.Calibration)
		}
		cells := rowCells(t, body, "scores-table", e.Expert)
		if want := htmlEscape("calibration score 0.18775 is below the cut-off 0.1878, so weight 0"); cells[4] != want {
			t.Errorf("%s: why %q, want %q", e.Expert, cells[4], want)
		}
		// The table's own column says the same.
		if cells[1] != "0.18775" {
			t.Errorf("%s: the calibration column reads %q beside the cut-off 0.1878, want 0.18775", e.Expert, cells[1])
		}
	}
	if dropped != 2 {
		t.Errorf("%d experts at the optimised cut-off, want Ada and Dana", dropped)
	}
	// A fixed cut-off is given as typed, not to four figures.
	if _, body := p.h.get(p.path() + "?alpha=0.18775321"); !strings.Contains(body, "Cut-off α = 0.18775321, fixed by the facilitator") {
		t.Error("the fixed cut-off 0.18775321 is not given as typed")
	}
}

// TestCalibrationCSVIsWhatThePageScores: the calibration page links a
// download of the answers it scores, in the form parley calibrate reads,
// with each question's true value and bounds; the file's rows, scored by
// the classical model, give the page's weights. Before the true values are
// in it answers 409, a bad cut-off 400, and nobody signed out gets it.
func TestCalibrationCSVIsWhatThePageScores(t *testing.T) {
	p := newSeedPanel(t)
	csvPath := p.path() + ".csv"
	if res, body := p.h.get(csvPath); res.StatusCode != http.StatusConflict || !strings.Contains(body, "every calibration question needs its true value") {
		t.Fatalf("before the true values: %d %q", res.StatusCode, body)
	}
	p.enterTruths(t, false)
	_, page := p.h.get(p.path())
	if !strings.Contains(page, `href="`+csvPath+`" download>download the scored answers (CSV)</a>`) {
		t.Errorf("the page does not link the download")
	}
	res, body := p.h.get(csvPath)
	if res.StatusCode != http.StatusOK || res.Header.Get("Content-Type") != "text/csv; charset=utf-8" ||
		!strings.Contains(res.Header.Get("Content-Disposition"), `attachment; filename="parley-workshop-`) {
		t.Fatalf("download: %d %v", res.StatusCode, res.Header)
	}
	if !strings.Contains(body, "# Q2: seed share 1\n") || !strings.Contains(body, "# Score them again with: parley calibrate --input FILE\n") {
		t.Errorf("comment lines missing:\n%s", body)
	}
	r := csv.NewReader(strings.NewReader(body))
	r.Comment = '#'
	rows, err := r.ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if got := strings.Join(rows[0], ","); got != "expert,question,realization,lower,upper,q05,q50,q95" {
		t.Fatalf("header %q", got)
	}
	// Four experts on the three 5/50/95 questions; the quartile seed is
	// left out, as on the page.
	if len(rows) != 1+len(seedNames)*len(seedTruths) {
		t.Fatalf("%d rows:\n%s", len(rows), body)
	}
	var as []elicit.SeedAssessment
	real := map[string]float64{}
	bounds := map[string][2]float64{}
	for _, row := range rows[1:] {
		num := func(i int) float64 {
			v, err := strconv.ParseFloat(row[i], 64)
			if err != nil {
				t.Fatalf("row %v: %v", row, err)
			}
			return v
		}
		real[row[1]] = num(2)
		bounds[row[1]] = [2]float64{num(3), num(4)}
		as = append(as, elicit.SeedAssessment{Expert: row[0], Question: row[1], Probs: []float64{0.05, 0.5, 0.95},
			Quantiles: []float64{num(5), num(6), num(7)}})
	}
	for q, b := range bounds {
		if b != [2]float64{0, 1} {
			t.Errorf("%s: bounds %v, want the question's [0, 1]", q, b)
		}
	}
	fromFile, err := elicit.ClassicalModel(as, real, bounds, elicit.ModelOptions{})
	if err != nil {
		t.Fatal(err)
	}
	want := model(t, nil)
	for i, e := range want.Experts {
		g := fromFile.Experts[i]
		if g.Expert != e.Expert || g.Weight != e.Weight || g.Calibration != e.Calibration || g.Information != e.Information {
			t.Errorf("from the file %+v, the page's model %+v", g, e)
		}
	}

	// A fixed cut-off travels with the link and into the command.
	_, page = p.h.get(p.path() + "?alpha=0.2")
	if !strings.Contains(page, `href="`+csvPath+`?alpha=0.2" download>`) || !strings.Contains(page, "on the file with --alpha 0.2.") {
		t.Errorf("the page's fixed cut-off is not in the download's link and words")
	}
	if _, body := p.h.get(csvPath + "?alpha=0.2"); !strings.Contains(body, "parley calibrate --input FILE --alpha 0.2\n") {
		t.Errorf("fixed cut-off missing from the file's command:\n%s", body)
	}
	if res, body := p.h.get(csvPath + "?alpha=2"); res.StatusCode != http.StatusBadRequest || !strings.Contains(body, "alpha "+string(elicit.RuleUnitInterval)) {
		t.Errorf("alpha=2: %d %q", res.StatusCode, body)
	}

	// Signed out: no file.
	anon := &http.Client{CheckRedirect: func(*http.Request, []*http.Request) error { return http.ErrUseLastResponse }}
	res, err = anon.Get(p.h.ts.URL + csvPath)
	if err != nil {
		t.Fatal(err)
	}
	b, _ := io.ReadAll(res.Body)
	res.Body.Close()
	if res.StatusCode == http.StatusOK || strings.Contains(string(b), "realization") {
		t.Errorf("signed out: %d %q", res.StatusCode, b)
	}
}

// TestCalibrationQuestionOnTheLogScale: the facilitator scores a
// calibration question's information on the log scale, with a reason, on
// the calibration page. The page's scores are then the classical model's
// with that question on the log scale (elicit.ModelOptions.LogScale,
// checked against SciPy in cmd/parley); the change is in the decision
// log; applying performance weights keeps the scale in the weights'
// basis, so the record can score them again. Refusals name the field,
// in words, and change nothing.
func TestCalibrationQuestionOnTheLogScale(t *testing.T) {
	p := newSeedPanel(t)
	h := p.h
	ctx := context.Background()
	p.enterTruths(t, false)
	q := p.seeds[0]
	scalePath := seedPath(p.ws.ID, q.ID) + "/background"
	stored := func() bool {
		t.Helper()
		got, err := h.db.Question(ctx, q.ID)
		if err != nil {
			t.Fatal(err)
		}
		return got.LogScale
	}
	for _, c := range []struct {
		name, field, want string
		form              url.Values
	}{
		{"no reason", "reason", "", url.Values{"background": {"log-uniform"}}},
		{"no such background", "background", "choose the uniform or the log-uniform background", url.Values{"background": {"sideways"}, "reason": {"r"}}},
	} {
		before := h.counts(p.ws.ID)
		res, body := h.post(scalePath, c.form)
		if res.StatusCode != http.StatusUnprocessableEntity || !hasFieldError(body, c.field) || !strings.Contains(body, c.want) {
			t.Errorf("%s: %d, field %s not marked with %q", c.name, res.StatusCode, c.field, c.want)
		}
		if stored() || h.counts(p.ws.ID) != before {
			t.Fatalf("%s: something was saved", c.name)
		}
	}
	res, body := h.post(scalePath, url.Values{"background": {"log-uniform"}, "reason": {"The seed share spreads over orders of magnitude (invented)."}})
	if res.StatusCode != http.StatusSeeOther {
		t.Fatalf("set the log scale: %d\n%s", res.StatusCode, body)
	}
	if !stored() {
		t.Fatal("the log scale is not stored")
	}
	_, body = h.get(p.path())
	if !strings.Contains(body, "<strong>log scale</strong>") {
		t.Error("the question's card does not say it is scored on the log scale")
	}
	// Each true-value field says what it takes: a bound is a true value
	// (an observed share of 0 or 1), except 0 on the log scale.
	for _, want := range []string{"Above 0 and at most 1 (the log scale needs it above 0).", "From 0 to 1, either bound included."} {
		if !strings.Contains(body, want) {
			t.Errorf("the page lacks the hint %q", want)
		}
	}
	if strings.Contains(body, "Strictly between") {
		t.Error("a true-value hint says strictly between its bounds, which take a true value")
	}
	as, real, bounds := modelInput()
	sc, err := elicit.ClassicalModel(as, real, bounds, elicit.ModelOptions{LogScale: map[string]bool{"seed0": true}})
	if err != nil {
		t.Fatal(err)
	}
	plain := model(t, nil)
	for i, e := range sc.Experts {
		if e.Information == plain.Experts[i].Information {
			t.Fatalf("%s: the log scale leaves the information score at %v", e.Expert, e.Information)
		}
		if got := rowCells(t, body, "scores-table", e.Expert); len(got) < 3 || got[2] != fv(e.Information) {
			t.Errorf("%s: row %v, want information %s (log scale)", e.Expert, got, fv(e.Information))
		}
	}
	_, logPage := h.get(workshopPath(p.ws.ID) + "/log")
	if !strings.Contains(logPage, "Calibration scale set") || !strings.Contains(logPage, "scored on the log scale") {
		t.Error("the decision log does not record the scale")
	}
	// A true value of 0 cannot be taken on the log scale, nor the log
	// scale with a true value of 0. The refusal says why: 0 is within the
	// bounds, so "must lie within the question's bounds, 0 to 1" was
	// false.
	if res, body := h.post(seedPath(p.ws.ID, q.ID), url.Values{"true_value": {"0"}}); res.StatusCode != http.StatusUnprocessableEntity ||
		!hasFieldError(body, "true_value") || !strings.Contains(body, "must be above 0 while the question&#39;s information is scored on the log scale") ||
		strings.Contains(body, "must lie within the question&#39;s bounds") {
		t.Errorf("a true value of 0 on the log scale: %d\n%s", res.StatusCode, errorsOn(body))
	}
	q2 := p.seeds[1]
	if res, _ := h.post(seedPath(p.ws.ID, q2.ID), url.Values{"true_value": {"0"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("a true value of 0 on the uniform scale: %d", res.StatusCode)
	}
	res, body = h.post(seedPath(p.ws.ID, q2.ID)+"/background", url.Values{"background": {"log-uniform"}, "reason": {"r"}})
	if res.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, "the log scale needs values above 0, and this question&#39;s true value is 0") {
		t.Errorf("the log scale with a true value of 0: %d\n%s", res.StatusCode, body)
	}
	if res, _ := h.post(seedPath(p.ws.ID, q2.ID), url.Values{"true_value": {strconv.FormatFloat(seedTruths[1], 'g', -1, 64)}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("true value back: %d", res.StatusCode)
	}
	// Performance weights keep the scale in their basis.
	if res, body := h.post(calibrationPath(p.ws.ID)+"/weights", url.Values{"scheme": {"performance"}, "reason": {"Scored (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("apply performance weights: %d\n%s", res.StatusCode, body)
	}
	wt, err := h.db.Weights(ctx, p.ws.ID)
	if err != nil {
		t.Fatal(err)
	}
	if wt.Basis == nil || !wt.Basis.Questions[0].LogScale || wt.Basis.Questions[1].LogScale {
		t.Fatalf("basis questions %+v: the scale is not kept", wt.Basis)
	}
	bas, real2, bounds2, opt, err := wt.Basis.ModelInput()
	if err != nil {
		t.Fatal(err)
	}
	again, err := elicit.ClassicalModel(bas, real2, bounds2, opt)
	if err != nil {
		t.Fatal(err)
	}
	w := again.Weights()
	for _, e := range wt.Basis.Experts {
		if got := w[workshop.SeedExpertKey(e.ExpertID)]; got != e.Weight {
			t.Errorf("basis scored again: expert %d weight %v, stored %v", e.ExpertID, got, e.Weight)
		}
	}
}

// TestCorrectionOfALogScaleQuestionSaysWhy: a correction keeps a
// question's scale (set on the calibration page), and a correction that
// the log scale cannot take (a lower bound below 0, or the question no
// longer a calibration question) is refused naming the field the
// facilitator changed, in words that say where the scale is set, not as
// "log_uniform_background: unknown value", a field the correction's form does not
// have. Nothing is saved.
func TestCorrectionOfALogScaleQuestionSaysWhy(t *testing.T) {
	p := newSeedPanel(t)
	h := p.h
	ctx := context.Background()
	q := workshop.Question{WorkshopID: p.ws.ID, Wording: "Share of relays welded shut (invented)", Quantity: "welded share",
		Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95}, Calibration: true}
	if err := h.db.AddQuestion(ctx, &q); err != nil {
		t.Fatal(err)
	}
	if res, _ := h.post(seedPath(p.ws.ID, q.ID)+"/background", url.Values{"background": {"log-uniform"}, "reason": {"Spread over orders of magnitude (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("set the log scale: %d", res.StatusCode)
	}
	form := func(lower string, calibration bool) url.Values {
		v := url.Values{"wording": {"Share of relays welded shut, corrected (invented)"}, "quantity": {"welded share"}, "lower": {lower}, "upper": {"1"},
			"format": {"quantiles"}, "preset": {"p05_50_95"}, "reason": {"A correction (invented)."}}
		if calibration {
			v.Set("calibration", "on")
			v.Set("true_value", "0.01")
		}
		return v
	}
	for _, c := range []struct {
		name  string
		form  url.Values
		field string
		want  string
	}{
		{"a lower bound below 0", form("-1", true), "lower", "must be at least 0 while the question&#39;s information is scored on the log scale"},
		{"no longer a calibration question", form("0", false), "calibration", "must stay ticked while the question&#39;s information is scored on the log scale: set it back to the uniform scale on the calibration page first"},
	} {
		before := h.counts(p.ws.ID)
		res, body := h.post(questionPath(p.ws.ID, q.ID)+"/edit", c.form)
		if res.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, c.want) || strings.Contains(body, "log_uniform_background") ||
			!strings.Contains(body, "calibration page") || c.field != "" && !hasFieldError(body, c.field) {
			t.Errorf("%s: %d, want field %q marked with %q:\n%s", c.name, res.StatusCode, c.field, c.want, errorsOn(body))
		}
		got, err := h.db.Question(ctx, q.ID)
		if err != nil {
			t.Fatal(err)
		}
		if h.counts(p.ws.ID) != before || got.Lower != 0 || !got.Calibration || !got.LogScale {
			t.Errorf("%s: something was saved: %+v", c.name, got)
		}
	}
	// A correction the scale can take keeps it.
	if res, body := h.post(questionPath(p.ws.ID, q.ID)+"/edit", form("0", true)); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("a correction of the wording: %d\n%s", res.StatusCode, errorsOn(body))
	}
	if got, _ := h.db.Question(ctx, q.ID); !got.LogScale || got.TrueValue == nil || *got.TrueValue != 0.01 {
		t.Errorf("after a correction: %+v", got)
	}
}

// errorsOn is a page's form-level and field errors, for a test's
// message.
func errorsOn(body string) string {
	return strings.Join(regexp.MustCompile(`<[^>]*class="(?:form-error|field-error)"[^>]*>[^<]*`).FindAllString(body, -1), "\n")
}

// A true value or a background posted for a question that is not a
// calibration question (by hand: the page offers neither form for it)
// is refused on a page that says so, and nothing is saved; before, the
// refusal went to a card the calibration page does not show.
func TestNotACalibrationQuestionIsRefusedInWords(t *testing.T) {
	p := newSeedPanel(t)
	h := p.h
	q := p.targets[0]
	for _, c := range []struct {
		path string
		form url.Values
	}{
		{seedPath(p.ws.ID, q.ID), url.Values{"true_value": {"0.2"}, "reveal": {"on"}, "reason": {"r"}}},
		{seedPath(p.ws.ID, q.ID) + "/background", url.Values{"background": {"log-uniform"}, "reason": {"r"}}},
	} {
		before := h.counts(p.ws.ID)
		res, body := h.post(c.path, c.form)
		if res.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, "Q1 (worn share) is not a calibration question") ||
			!strings.Contains(body, "Nothing was saved.") {
			t.Errorf("%s: %d, the page does not say why", c.path, res.StatusCode)
		}
		if h.counts(p.ws.ID) != before {
			t.Errorf("%s: something was saved", c.path)
		}
	}
	got, err := h.db.Question(context.Background(), q.ID)
	if err != nil || got.TrueValue != nil || got.LogScale {
		t.Fatalf("the target question was changed: %+v, %v", got, err)
	}
}

// TestScoringRefusalNamesTheAnswer: when the classical model refuses the
// panel because of one answer, the calibration page and the weights form
// name the calibration question, the expert, the quantile and its value,
// not the rule alone or the model's internal indexes
// (assessments[1].quantiles[2]). The answer is invented: on a question
// scored on the log scale, a 95% quantile one step below the upper bound
// 1e300 has the bound's own logarithm in float64.
func TestScoringRefusalNamesTheAnswer(t *testing.T) {
	h := newHarness(t)
	h.signIn()
	ctx := context.Background()
	ws := workshop.Workshop{Title: "Rare surge counts (invented)", Purpose: "Invented test panel", Invented: true}
	if err := h.db.CreateWorkshop(ctx, &ws); err != nil {
		t.Fatal(err)
	}
	q := workshop.Question{WorkshopID: ws.ID, Wording: "Surges per site-year?", Quantity: "surge rate", Lower: 0, Upper: 1e300,
		Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95}, Calibration: true}
	if err := h.db.AddQuestion(ctx, &q); err != nil {
		t.Fatal(err)
	}
	near := math.Nextafter(1e300, 0)
	answers := map[string][]float64{"Ines": {1e-3, 2e-2, 0.4}, "Tomas": {1e298, 5e299, near}}
	for _, name := range []string{"Ines", "Tomas"} {
		h.expertAnswering(ws.ID, name, []int64{q.ID}, answers[name])
	}
	if err := h.db.SetTrueValue(ctx, q.ID, 0.05, false, ""); err != nil {
		t.Fatal(err)
	}
	if err := h.db.SetLogScale(ctx, q.ID, true, "rates spread over orders of magnitude (invented)"); err != nil {
		t.Fatal(err)
	}
	want := "Tomas&#39;s answer to calibration question Q1 surge rate: its 95% quantile, 9.999999999999999e299" +
		", " + string(elicit.RuleLogScaleTooClose)
	res, body := h.get(calibrationPath(ws.ID))
	if res.StatusCode != http.StatusOK {
		t.Errorf("the calibration page answers %d: nothing was sent to refuse", res.StatusCode)
	}
	if !strings.Contains(body, "The classical model could not score the panel: "+want) {
		t.Errorf("the calibration page does not name the answer that broke the rule:\n%s", excerpt(body, "could not score"))
	}
	// No scores, so nothing to call provisional.
	if strings.Contains(body, "these scores are provisional") {
		t.Error("the page calls scores provisional that the model could not give")
	}
	before := h.counts(ws.ID)
	res, body = h.post(calibrationPath(ws.ID)+"/weights", url.Values{"scheme": {"performance"}, "reason": {"scores are in (invented)"}})
	if res.StatusCode < 400 || res.StatusCode >= 500 || !hasFieldError(body, "scheme") || !strings.Contains(body, want) || strings.Contains(body, "assessments[") {
		t.Errorf("the weights form: %d, does not name the answer beside the scheme:\n%s", res.StatusCode, excerpt(body, "could not score"))
	}
	if h.counts(ws.ID) != before {
		t.Error("a refused weight set was saved")
	}
}

// excerpt is the part of body around the first key, for a failure message.
func excerpt(body, key string) string {
	i := strings.Index(body, key)
	if i < 0 {
		return "(" + strconv.Quote(key) + " not found)"
	}
	return body[max(0, i-200):min(len(body), i+600)]
}

// A refusal of the classical model that is not about the answers is
// written to the server log, as the words on the page ("the details are
// in the server log") say: the weights form and the robustness section
// said so and logged nothing, and the cause was lost.
func TestScoringFailureIsLogged(t *testing.T) {
	var logs strings.Builder
	s := &Server{log: slog.New(slog.NewTextHandler(&logs, nil))}
	d := workshopData{Workshop: workshop.Workshop{ID: 7}}
	if got := s.scoringProblem(errors.New("the optimiser gave no cut-off (invented)"), d); got != "it failed; the details are in the server log" {
		t.Errorf("the page reads %q", got)
	}
	if !strings.Contains(logs.String(), "the optimiser gave no cut-off (invented)") || !strings.Contains(logs.String(), "workshop=7") {
		t.Errorf("the server log lacks the cause: %q", logs.String())
	}
	// A refusal about the answers is the facilitator's to read, not a
	// fault: nothing is logged.
	logs.Reset()
	s.scoringProblem(&elicit.InputError{Field: "questions[\"q1\"]", Rule: elicit.RuleRangeCollapsed}, d)
	if logs.Len() != 0 {
		t.Errorf("a refusal of the answers was logged: %q", logs.String())
	}
}

// The correction form of a calibration question says where its true
// value stands: "hidden from experts" until it is revealed, "shown to the
// experts" after (it said hidden for a value the experts had seen). The
// form offers the true value only while the question has no answers.
func TestCorrectionFormSaysWhetherTheTrueValueIsShown(t *testing.T) {
	h := newHarness(t)
	h.signIn()
	ctx := context.Background()
	ws := workshop.Workshop{Title: "Culvert blockage (invented)", Invented: true}
	if err := h.db.CreateWorkshop(ctx, &ws); err != nil {
		t.Fatal(err)
	}
	q := workshop.Question{WorkshopID: ws.ID, Wording: "Culverts inspected last year?", Quantity: "culverts",
		Lower: 1, Upper: 5000, Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95}, Calibration: true}
	if err := h.db.AddQuestion(ctx, &q); err != nil {
		t.Fatal(err)
	}
	edit := questionPath(ws.ID, q.ID) + "/edit"
	if err := h.db.SetTrueValue(ctx, q.ID, 420, false, ""); err != nil {
		t.Fatal(err)
	}
	if _, body := h.get(edit); !strings.Contains(body, "True value (hidden from experts)") || strings.Contains(body, "shown to the experts") {
		t.Error("before the reveal the correction form does not say the true value is hidden")
	}
	if err := h.db.SetTrueValue(ctx, q.ID, 420, true, "the inspection report (invented)"); err != nil {
		t.Fatal(err)
	}
	if _, body := h.get(edit); !strings.Contains(body, "True value (shown to the experts)") || strings.Contains(body, "hidden from experts") {
		t.Error("after the reveal the correction form does not say the true value is shown")
	}
}

// The steadiness table and pictures write a shift as the page writes its
// other values, in plain decimals: a rerun that moved the pool by a
// ten-millionth of the range read "1e-7".
func TestSteadinessShiftsInPlainDecimals(t *testing.T) {
	qs := []workshop.Question{{ID: 7, Position: 1, Quantity: "invented share", Lower: 0, Upper: 1}}
	pool := workshop.Percentiles{P05: 0.2, P50: 0.3, P95: 0.4}
	moved := workshop.Percentiles{P05: 0.2, P50: 0.3000001, P95: 0.4}
	rb := &workshop.Robustness{Targets: []int64{7}, Full: []workshop.TargetPool{{QuestionID: 7, Percentiles: pool}}, Largest: 1e-7,
		Rows: []workshop.RobustnessRow{{LeftOut: elicit.LeaveOutExpert, ID: 2, Label: "Bo", Alpha: 0.1,
			Weights: []workshop.ExpertWeight{{ExpertID: 1, Weight: 1}}, Pools: []workshop.TargetPool{{QuestionID: 7, Percentiles: moved}},
			Shifts: []float64{1e-7}, Shift: 1e-7}}}
	names := map[int64]string{1: "Ada", 2: "Bo"}
	s := newSteadiness("steady", rb, qs, names)
	if s.Rows[0].Shift != "0.0000001" || s.Largest != "0.0000001" {
		t.Errorf("the table's shift %q, the largest %q; want 0.0000001", s.Rows[0].Shift, s.Largest)
	}
	var b strings.Builder
	if err := steadinessSection(rb, "", qs, names, false).Render(context.Background(), &b); err != nil {
		t.Fatal(err)
	}
	if html := b.String(); strings.Contains(html, "1e-7") || !strings.Contains(html, `data-value="1e-07">0.0000001</text>`) ||
		!strings.Contains(html, "The largest is 0.0000001, without Bo.") {
		t.Errorf("the section writes a shift with an exponent:\n%s", html)
	}
}

// TestCustomWeightsComeBackAsTyped: the weights form shows the custom
// weights in force as the pages write numbers, every figure kept: a
// weight of 0.00001 came back in its box as "1e-05" (%g).
func TestCustomWeightsComeBackAsTyped(t *testing.T) {
	p := newSeedPanel(t)
	h := p.h
	custom := url.Values{"scheme": {"custom"}, "reason": {"a small say (invented)"}}
	for i, e := range p.experts {
		custom.Set(weightField(e.ID), []string{"0.00001", "0", "1", "123456789"}[i])
	}
	if res, body := h.post(p.path()+"/weights", custom); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("custom weights: %d %s", res.StatusCode, body)
	}
	_, page := h.get(p.path())
	for i, e := range p.experts {
		want := []string{"0.00001", "0", "1", "123456789"}[i]
		m := regexp.MustCompile(`name="` + regexp.QuoteMeta(weightField(e.ID)) + `" value="([^"]*)"`).FindStringSubmatch(page)
		if m == nil || m[1] != want {
			t.Errorf("%s's weight box: %v, want %q", e.Name, m, want)
		}
	}
}

// TestPoolOnFewerQuestionsIsSaidSo: a fixed cut-off that keeps only an
// expert who skipped a calibration question leaves the weighted pool
// without an answer there; the page says the pool's scores rest on fewer
// questions instead of "the same". Eli (invented) answers two of the three
// scored questions, one true value in each middle bin: s = (0, ½, ½, 0),
// 2·N·I = 4 ln(1/0.9) and C = 0.936 (chi-square tail on 3 degrees of
// freedom, by the formula of elicit.ClassicalModel), above every other
// expert's, so α = 0.9 keeps only him.
func TestPoolOnFewerQuestionsIsSaidSo(t *testing.T) {
	p := newSeedPanel(t)
	h := p.h
	h.expertAnswering(p.ws.ID, "Eli Moss", []int64{p.seeds[0].ID, p.seeds[1].ID}, []float64{0.2, 0.35, 0.5}, []float64{0.3, 0.5, 0.7})
	p.enterTruths(t, false)
	_, body := h.get(p.path() + "?alpha=0.9")
	pool := block(body, "scores-table-pool")
	if !strings.Contains(pool, "on only 2 of the 3 questions (no expert at or above the cut-off answered the other one, so the pool has no answer there):") {
		t.Errorf("fixed cut-off keeping only Eli: %s", pool)
	}
	// Optimised, the cut-off is chosen among pools scored on all three.
	_, body = h.get(p.path())
	if pool := block(body, "scores-table-pool"); !strings.Contains(pool, "on the same 3 questions") {
		t.Errorf("optimised: %s", pool)
	}
}

package web

import (
	"context"
	"math"
	"net/http"
	"net/url"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// TestRecordReproducesEachPool runs the invented gasket panel through the
// facilitator's forms: true values revealed, performance weights applied
// (set A), a prior agreed from the pool, an expert's later change of
// mind, custom weights (set B), then performance weights with a fixed
// cut-off of 0 (set C). The export record must reproduce, from its own
// stored calibration answers and true values alone, the weights of A and
// C by elicit.ClassicalModel, the agreed prior from the pool under A
// (LinearPool of the fits of the revisions it names as pooled, which are
// those standing at the agreement, then BestBeta), and the current pool
// under C.
func TestRecordReproducesEachPool(t *testing.T) {
	p := newSeedPanel(t)
	h := p.h
	ctx := context.Background()
	p.enterTruths(t, true)
	setWeights := func(form url.Values) {
		t.Helper()
		if res, body := h.post(p.path()+"/weights", form); res.StatusCode != http.StatusSeeOther {
			t.Fatalf("weights %v: %d %s", form, res.StatusCode, body)
		}
	}
	setWeights(url.Values{"scheme": {"performance"}, "reason": {"scored (invented)"}})
	target := p.targets[0]
	if res, body := h.post(questionPath(p.ws.ID, target.ID)+"/agree", url.Values{"source": {"pool"},
		"rationale": {"the weighted pool (invented)"}, "confirm_open": {"on"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("agree: %d %s", res.StatusCode, body)
	}
	// Cem changes his mind on the target after the agreement.
	rv := workshop.Revision{QuestionID: target.ID, ExpertID: p.experts[2].ID, Answer: workshop.Answer{Values: []float64{0.02, 0.08, 0.2}}}
	if err := h.db.SaveRevision(ctx, &rv); err != nil {
		t.Fatal(err)
	}
	custom := url.Values{"scheme": {"custom"}, "reason": {"a comparison (invented)"}}
	for i, e := range p.experts {
		custom.Set(weightField(e.ID), []string{"3", "0", "1.5", "1"}[i])
	}
	setWeights(custom)
	setWeights(url.Values{"scheme": {"performance"}, "alpha": {"0"}, "reason": {"everyone by their scores (invented)"}})

	res, js := h.get(workshopPath(p.ws.ID) + "/export.json")
	if res.StatusCode != http.StatusOK {
		t.Fatalf("export: %d", res.StatusCode)
	}
	rec, err := record.Parse(strings.NewReader(js))
	if err != nil {
		t.Fatal(err)
	}
	// The import's validation forms each pooled prior's pool again, under
	// performance weights too, and takes the record as exported.
	if err := rec.Validate(); err != nil {
		t.Fatalf("the exported record does not validate: %v", err)
	}
	hist := rec.WeightHistory
	if len(hist) != 3 || hist[0].Basis == nil || hist[1].Basis != nil || hist[2].Basis == nil || rec.Weights.ID != hist[2].ID {
		t.Fatalf("history %+v, in force %d", hist, rec.Weights.ID)
	}
	// Custom weights are kept as typed.
	if b := hist[1].ByExpert; b[p.experts[0].ID] != 3 || b[p.experts[2].ID] != 1.5 || hist[1].Reason != "a comparison (invented)" {
		t.Errorf("custom set %+v", hist[1])
	}
	if hist[0].Basis.AlphaRule != workshop.AlphaOptimised || hist[2].Basis.AlphaRule != workshop.AlphaFixed || hist[2].Basis.Alpha != 0 {
		t.Errorf("cut-off rules %s %v, %s %v", hist[0].Basis.AlphaRule, hist[0].Basis.Alpha, hist[2].Basis.AlphaRule, hist[2].Basis.Alpha)
	}
	revisions := map[int64]record.Revision{}
	for _, rv := range rec.Revisions {
		revisions[rv.ID] = rv
	}
	// reproduce recomputes a set's weights by expert ID from its basis
	// only: the stored answers, true values and bounds, and cut-off rule.
	reproduce := func(set workshop.Weights) map[int64]float64 {
		t.Helper()
		b := set.Basis
		var as []elicit.SeedAssessment
		for _, a := range b.CalibrationAnswers {
			// The stored answer is the revision the record carries.
			if rv := revisions[a.RevisionID]; rv.ExpertID != a.ExpertID || rv.QuestionID != a.QuestionID || !sameFloats(rv.Answer.Values, a.Quantiles) {
				t.Errorf("set %d: answer %+v is not revision %+v", set.ID, a, rv.Revision)
			}
			as = append(as, elicit.SeedAssessment{Expert: "e" + itoa(a.ExpertID), Question: "q" + itoa(a.QuestionID), Probs: b.Probs, Quantiles: a.Quantiles})
		}
		truths, bounds := map[string]float64{}, map[string][2]float64{}
		for i, q := range b.Questions {
			if q.TrueValue == nil || *q.TrueValue != seedTruths[i] {
				t.Fatalf("set %d: question %d stored true value %v, want %v", set.ID, q.QuestionID, q.TrueValue, seedTruths[i])
			}
			truths["q"+itoa(q.QuestionID)], bounds["q"+itoa(q.QuestionID)] = *q.TrueValue, [2]float64{q.Lower, q.Upper}
		}
		opt := elicit.ModelOptions{Overshoot: b.Overshoot}
		if b.AlphaRule == workshop.AlphaFixed {
			opt.Alpha = &b.Alpha
		}
		sc, err := elicit.ClassicalModel(as, truths, bounds, opt)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(sc.Alpha-b.Alpha) > 1e-12 {
			t.Errorf("set %d: cut-off %v, stored %v", set.ID, sc.Alpha, b.Alpha)
		}
		byName := map[string]elicit.ExpertScore{}
		for _, e := range sc.Experts {
			byName[e.Expert] = e
		}
		out := map[int64]float64{}
		total := 0.0
		for _, v := range set.ByExpert {
			total += v
		}
		for _, e := range b.Experts {
			got := byName["e"+itoa(e.ExpertID)]
			for _, c := range [][2]float64{{got.Calibration, e.Calibration}, {got.Information, e.Information}, {got.Weight, e.Weight}, {got.Weight, set.ByExpert[e.ExpertID] / total}} {
				if math.Abs(c[0]-c[1]) > 1e-12 {
					t.Errorf("set %d, expert %d: recomputed %v, stored %v", set.ID, e.ExpertID, c[0], c[1])
				}
			}
			out[e.ExpertID] = got.Weight
		}
		// The same weights as ClassicalModel on the test's own inputs.
		model := model(t, opt.Alpha).Weights()
		for i, e := range p.experts {
			if math.Abs(out[e.ID]-model[seedNames[i]]) > 1e-12 {
				t.Errorf("set %d: %s %v, the test's own model %v", set.ID, seedNames[i], out[e.ID], model[seedNames[i]])
			}
		}
		return out
	}
	// pool is LinearPool of the given fits (by expert ID) with weights w.
	pool := func(fits map[int64]elicit.ScaledBeta, w map[int64]float64) elicit.Pool {
		t.Helper()
		var dists []elicit.ScaledBeta
		var ws []float64
		for _, e := range p.experts {
			if d, ok := fits[e.ID]; ok {
				dists, ws = append(dists, d), append(ws, w[e.ID])
			}
		}
		pl, err := elicit.LinearPool(dists, ws)
		if err != nil {
			t.Fatal(err)
		}
		return pl
	}

	// The agreed prior from the pool names set A and is the best single
	// Beta of the pool of the fits standing when it was agreed.
	var rq record.Question
	for _, q := range rec.Questions {
		if q.ID == target.ID {
			rq = q
		}
	}
	if len(rq.PriorHistory) != 1 {
		t.Fatalf("priors %+v", rq.PriorHistory)
	}
	ap := rq.PriorHistory[0]
	if ap.WeightSetID != hist[0].ID {
		t.Fatalf("prior agreed under set %d, want %d", ap.WeightSetID, hist[0].ID)
	}
	// The prior names the revisions it pooled (pooled_revisions): each
	// expert's latest on the question at the agreement, which a reviewer
	// would otherwise have to infer from the times.
	latest := map[int64]int64{}
	for _, rv := range rec.Revisions {
		if rv.QuestionID == target.ID && !rv.At.After(ap.At) {
			latest[rv.ExpertID] = rv.ID
		}
	}
	if len(ap.Pooled) != len(p.experts) || len(latest) != len(p.experts) {
		t.Fatalf("pooled revisions %v, the experts' latest at the agreement %v", ap.Pooled, latest)
	}
	then := map[int64]elicit.ScaledBeta{}
	for _, id := range ap.Pooled {
		rv, ok := revisions[id]
		if !ok || rv.QuestionID != target.ID || latest[rv.ExpertID] != id || rv.Fit == nil {
			t.Fatalf("pooled revision %d is not an expert's latest on the target at the agreement: %+v", id, rv.Revision)
		}
		then[rv.ExpertID] = rv.Fit.Dist
	}
	rep, err := pool(then, reproduce(hist[0])).BestBeta()
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(rep.Dist.Alpha-ap.Dist.Alpha) > 1e-9*ap.Dist.Alpha || math.Abs(rep.Dist.Beta.Beta-ap.Dist.Beta.Beta) > 1e-9*ap.Dist.Beta.Beta {
		t.Errorf("agreed prior Beta(%v, %v); reproduced Beta(%v, %v)", ap.Dist.Alpha, ap.Dist.Beta.Beta, rep.Dist.Alpha, rep.Dist.Beta.Beta)
	}

	// The current pool is set C's weights on the current fits.
	now := map[int64]elicit.ScaledBeta{}
	for _, cf := range rq.CurrentFits {
		now[cf.ExpertID] = cf.Fit.Dist
	}
	cur := pool(now, reproduce(hist[2]))
	if rq.Pool == nil {
		t.Fatal("no current pool")
	}
	for _, c := range [][2]float64{{cur.Mean(), rq.Pool.Mean}, {cur.Quantile(0.05), rq.Pool.Percentiles.P05}, {cur.Quantile(0.5), rq.Pool.Percentiles.P50}, {cur.Quantile(0.95), rq.Pool.Percentiles.P95}} {
		if math.Abs(c[0]-c[1]) > 1e-9 {
			t.Errorf("current pool: reproduced %v, recorded %v", c[0], c[1])
		}
	}
	// Cem's later answer moved the pool away from the agreed prior, so the
	// reproduction above is not the current state read twice.
	if math.Abs(pool(now, reproduce(hist[0])).Mean()-pool(then, reproduce(hist[0])).Mean()) < 1e-6 {
		t.Error("the pool did not move after the agreement; the test proves nothing about the history")
	}
}

func sameFloats(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

func itoa(n int64) string { return strconv.FormatInt(n, 10) }

// TestReportShowsTheScoresBehindAppliedWeights: performance weights
// applied before the true values are revealed used to leave the report
// with "No scores in this record"; now it shows the scores stored with
// the weights, with the hidden true values still left out, and lists
// every weight set with what it was made from.
func TestReportShowsTheScoresBehindAppliedWeights(t *testing.T) {
	p := newSeedPanel(t)
	h := p.h
	p.enterTruths(t, false)
	if res, body := h.post(p.path()+"/weights", url.Values{"scheme": {"performance"}, "reason": {"scored (invented)"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("weights: %d %s", res.StatusCode, body)
	}
	_, body := h.get(workshopPath(p.ws.ID) + "/report")
	if strings.Contains(body, "No scores in this record") {
		t.Error("report says there are no scores although performance weights were applied")
	}
	sc := model(t, nil)
	for _, e := range sc.Experts {
		got := rowCells(t, body, "performance", e.Expert)
		if len(got) < 5 || got[0] != "3" || got[1] != fv(e.Calibration) || got[2] != fv(e.Information) || got[3] != pct(e.Weight) {
			t.Errorf("report row %s: %v", e.Expert, got)
		}
	}
	for _, want := range []string{"The performance weights in force were applied", "which were stored with them",
		"Scores on the current answers are not in this record: scores are shown once every scored calibration question",
		"true value withheld until revealed", "Pool weights over time", "scored (invented)"} {
		if !strings.Contains(body, htmlEscape(want)) {
			t.Errorf("report lacks %q", want)
		}
	}
	for _, tv := range seedTruths {
		if strings.Contains(body, fv(tv)) {
			t.Errorf("report shows the unrevealed true value %v", tv)
		}
	}
	_, js := h.get(workshopPath(p.ws.ID) + "/export.json")
	for _, tv := range seedTruths {
		if strings.Contains(js, strconv.FormatFloat(tv, 'g', -1, 64)) {
			t.Errorf("export carries the unrevealed true value %v", tv)
		}
	}
	// Once revealed, the record's basis carries the true values.
	p.enterTruths(t, true)
	_, body = h.get(workshopPath(p.ws.ID) + "/report")
	for _, tv := range seedTruths {
		if !strings.Contains(body, "true value "+fv(tv)) {
			t.Errorf("report does not give the revealed true value %v beside its question", tv)
		}
	}
}

// TestQuestionExportUnderPerformanceWeights: one target question's JSON
// record carries the calibration evidence behind the weights and imports
// as a valid record; its CSV lists only that question's revisions.
func TestQuestionExportUnderPerformanceWeights(t *testing.T) {
	p := newSeedPanel(t)
	h := p.h
	p.enterTruths(t, true)
	if res, body := h.post(p.path()+"/weights", url.Values{"scheme": {"performance"}, "reason": {"scored (invented)"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("weights: %d %s", res.StatusCode, body)
	}
	qp := questionPath(p.ws.ID, p.targets[0].ID)
	_, js := h.get(qp + "/export.json")
	rec, err := record.Parse(strings.NewReader(js))
	if err != nil {
		t.Fatalf("one question's record does not parse: %v", err)
	}
	// The target's 4 answers, the 12 the basis scored, and the quartile
	// seed's one answer, which the basis left out but its freeze names.
	if len(rec.WeightHistory) != 1 || rec.WeightHistory[0].Basis == nil || len(rec.Revisions) != 4+12+1 {
		t.Fatalf("question record: %d sets, %d revisions; want the basis and 4 + 12 + 1 revisions", len(rec.WeightHistory), len(rec.Revisions))
	}
	// One question's record as Parley wrote it before it kept that
	// answer still reads, and imports: it has no chain and none of the
	// seed's events, and its answers up to the freeze are those scored.
	scored := map[int64]bool{}
	for _, a := range rec.WeightHistory[0].Basis.CalibrationAnswers {
		scored[a.RevisionID] = true
	}
	earlier := rec
	earlier.Revisions, earlier.Events = nil, nil
	for _, rv := range rec.Revisions {
		if rv.QuestionID == p.targets[0].ID || scored[rv.ID] {
			earlier.Revisions = append(earlier.Revisions, rv)
		}
	}
	// It kept only the target's events and the workshop's.
	for _, e := range rec.Events {
		if e.QuestionID == 0 || e.QuestionID == p.targets[0].ID {
			earlier.Events = append(earlier.Events, e)
		}
	}
	var buf strings.Builder
	if err := earlier.WriteJSON(&buf); err != nil || len(earlier.Revisions) != 4+12 {
		t.Fatalf("the earlier record: %v, %d revisions", err, len(earlier.Revisions))
	}
	if back, err := record.Parse(strings.NewReader(buf.String())); err != nil {
		t.Errorf("one question's record from before its seed's freeze was kept does not read: %v", err)
	} else if _, err := h.db.Import(context.Background(), back); err != nil {
		t.Errorf("one question's record from before its seed's freeze was kept does not import: %v", err)
	}
	res, csv := h.get(qp + "/export.csv")
	if rows := strings.Count(strings.TrimSpace(csv), "\n"); res.StatusCode != http.StatusOK || rows != 4 {
		t.Fatalf("question CSV: %d, %d rows; want the target's 4", res.StatusCode, rows)
	}
}

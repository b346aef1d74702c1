package web

import (
	"context"
	"html"
	"net/http/httptest"
	"regexp"
	"slices"
	"sort"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// The three callers of workshop.PanelState read the same workshop alike:
// the facilitator's panel (questionState), the round feedback
// (panelThrough) and the export record pool the same experts with the
// same fits, and give the same pool, the same 5/50/95% points and the
// same single Beta. The workshop is real: answers saved through the
// experts' forms into SQLite, one expert revoked, round 1 closed.
func TestThreeCallersShareOnePanelState(t *testing.T) {
	names := []string{"Ada Quell", "Bruno Ferrante", "Chiara Osei", "Dmitri Lund", "Esi Aboagye"}
	g := newExpertRig(t, names...)
	answers := [][]string{{"0.05", "0.2", "0.4"}, {"0.02", "0.08", "0.2"}, {"0.1", "0.3", "0.5"}, {"0.2", "0.35", "0.6"}, {"0.03", "0.1", "0.3"}}
	for i, a := range answers {
		for _, q := range []workshop.Question{g.q, g.qs} {
			vals := a
			if q.ID == g.qs.ID { // on the scale of days, 10 to 50
				vals = []string{"15", strconv.Itoa(20 + 2*i), "40"}
			}
			if resp, _ := g.post(g.qpath(i, q)+"/save", quantiles(vals...)); resp.StatusCode != 303 {
				t.Fatalf("expert %d saves: %d", i, resp.StatusCode)
			}
		}
	}
	ctx := context.Background()
	must := func(err error) {
		t.Helper()
		if err != nil {
			t.Fatal(err)
		}
	}
	must(g.db.RevokeExpert(ctx, g.experts[3].ID, "left the panel"))
	must(g.db.SetRound(ctx, g.ws.ID, 1, false, "discussion"))
	must(g.db.SetRound(ctx, g.ws.ID, 2, true, "second round"))
	ws, err := g.db.Workshop(ctx, g.ws.ID)
	must(err)

	for _, q := range []workshop.Question{g.q, g.qs} {
		facilitator, fb, rec := threeViews(t, g, ws, q)
		// The experts each caller pools, with their fits.
		fromPanel := map[int64]elicit.ScaledBeta{}
		for _, row := range facilitator.Rows {
			if row.Pooled {
				fromPanel[row.Expert.ID] = row.Fit.Dist
			}
		}
		fromFeedback := map[int64]elicit.ScaledBeta{}
		for _, m := range fb.members {
			fromFeedback[m.expertID] = m.dist
		}
		fromRecord := map[int64]elicit.ScaledBeta{}
		for _, w := range rec.Pool.Weights {
			for _, cf := range rec.CurrentFits {
				if cf.ExpertID == w.ExpertID {
					fromRecord[w.ExpertID] = cf.Fit.Dist
				}
			}
		}
		if len(fromPanel) != 4 || !sameDists(fromPanel, fromFeedback) || !sameDists(fromPanel, fromRecord) {
			t.Fatalf("Q%d pooled fits: panel %v, feedback %v, record %v", q.Position, fromPanel, fromFeedback, fromRecord)
		}
		if _, revoked := fromPanel[g.experts[3].ID]; revoked {
			t.Errorf("Q%d: the revoked expert is pooled", q.Position)
		}
		// One pool: its points, moments and single Beta.
		fbPoints, err := fb.pool.QuantileSet(workshop.PoolProbs)
		must(err)
		rp := rec.Pool.Percentiles
		for i, want := range []float64{rp.P05, rp.P50, rp.P95} {
			if facilitator.PoolQs[i].Value != want || fbPoints[i].Value != want {
				t.Errorf("Q%d point %d: panel %v, feedback %v, record %v", q.Position, i, facilitator.PoolQs[i].Value, fbPoints[i].Value, want)
			}
		}
		if facilitator.Pool.Mean() != rec.Pool.Mean || fb.pool.Mean() != rec.Pool.Mean || facilitator.Pool.SD() != rec.Pool.SD {
			t.Errorf("Q%d pool mean: panel %v, feedback %v, record %v", q.Position, facilitator.Pool.Mean(), fb.pool.Mean(), rec.Pool.Mean)
		}
		if facilitator.Rep == nil || rec.Pool.BestBeta == nil || facilitator.Rep.Dist != rec.Pool.BestBeta.Dist {
			t.Errorf("Q%d single Beta: panel %+v, record %+v", q.Position, facilitator.Rep, rec.Pool.BestBeta)
		}
	}

	// A revision in round 2 reaches the panel and the record at once, and
	// the feedback in round 3; under custom weights the panel and the
	// record share out the pool alike, while the feedback keeps equal
	// weights.
	if resp, _ := g.post(g.qpath(0, g.q)+"/save", quantiles("0.06", "0.15", "0.3")); resp.StatusCode != 303 {
		t.Fatal("round 2 save failed")
	}
	must(g.db.SetWeights(ctx, &workshop.Weights{WorkshopID: ws.ID, Scheme: workshop.WeightsCustom, Reason: "audits",
		ByExpert: map[int64]float64{g.experts[0].ID: 3, g.experts[1].ID: 1, g.experts[2].ID: 0, g.experts[4].ID: 4}}))
	// The feedback read afresh, as by a server restarted mid-round, not
	// the one remembered before the round-2 save.
	g.s.feedbacks.Reset()
	facilitator, fb, rec := threeViews(t, g, ws, g.q)
	shares := map[int64]float64{}
	for _, row := range facilitator.Rows {
		if row.Pooled {
			shares[row.Expert.ID] = row.Share
		}
	}
	for _, w := range rec.Pool.Weights {
		if shares[w.ExpertID] != w.Weight {
			t.Errorf("expert %d: panel share %v, record %v", w.ExpertID, shares[w.ExpertID], w.Weight)
		}
	}
	if want := 3.0 / 8; shares[g.experts[0].ID] != want {
		t.Errorf("Ada's share %v, want 3/8", shares[g.experts[0].ID])
	}
	if facilitator.PoolQs[1].Value != rec.Pool.Percentiles.P50 || facilitator.Rep.Dist != rec.Pool.BestBeta.Dist {
		t.Error("under custom weights the panel and the record differ")
	}
	adaNow, err := g.q.Fit(workshop.Answer{Values: []float64{0.06, 0.15, 0.3}})
	must(err)
	for _, m := range fb.members {
		if m.expertID == g.experts[0].ID && m.dist == adaNow.Dist {
			t.Error("a round-2 revision reached the round-2 feedback")
		}
	}
	roster, err := g.db.Experts(ctx, ws.ID)
	must(err)
	equal := workshop.PanelState(workshop.PanelInput{Question: g.q, Experts: roster, Revisions: g.revisions(),
		Weights: workshop.Weights{}, Through: 1})
	if m, _ := fb.pool.QuantileSet(workshop.PoolProbs); m[1] != equal.Points[1] {
		t.Errorf("feedback median %+v, the equal-weight panel through round 1 %+v", m[1], equal.Points[1])
	}
}

// threeViews reads question q through each caller: the facilitator's
// panel, the feedback as round 1 closed and the record.
func threeViews(t *testing.T, g *expertRig, ws workshop.Workshop, q workshop.Question) (questionState, *feedback, record.Question) {
	t.Helper()
	ctx := context.Background()
	d, err := g.s.readWorkshopData(ctx, ws)
	if err != nil {
		t.Fatal(err)
	}
	fb, err := g.s.panelThrough(httptest.NewRequest("GET", "/", nil), ws, q, 1)
	if err != nil || fb == nil {
		t.Fatalf("feedback: %v, %v", fb, err)
	}
	rec, err := g.s.record(ctx, ws)
	if err != nil {
		t.Fatal(err)
	}
	for _, rq := range rec.Questions {
		if rq.ID == q.ID {
			if rq.Pool == nil {
				t.Fatalf("record: Q%d has no pool: %s", q.Position, rq.PoolError)
			}
			return d.state(q), fb, rq
		}
	}
	t.Fatalf("record: no question %d", q.ID)
	return questionState{}, nil, record.Question{}
}

func sameDists(a, b map[int64]elicit.ScaledBeta) bool {
	if len(a) != len(b) {
		return false
	}
	for id, d := range a {
		if b[id] != d {
			return false
		}
	}
	return true
}

// The round-2 page of an expert shows the other experts under the labels
// of the salted feedback order (panelOrder), not of their ids: each
// expert gives a reason naming themselves, and the page must put each
// reason beside the label its author's place in the salted order gives.
// Sorting the feedback by expert id, name or time of answer fails it.
func TestRoundTwoFeedbackFollowsTheSaltedOrder(t *testing.T) {
	names := []string{"Ada Quell", "Bruno Ferrante", "Chiara Osei", "Dmitri Lund", "Esi Aboagye", "Farid Haddad", "Greta Lind", "Hiro Sato"}
	g := newExpertRig(t, names...)
	for i := range names {
		for _, q := range []workshop.Question{g.q, g.qs} {
			vals := []string{"0.02", strconv.FormatFloat(0.05+0.03*float64(i), 'f', 2, 64), "0.6"}
			if q.ID == g.qs.ID {
				vals = []string{"12", strconv.Itoa(20 + i), "45"}
			}
			form := quantiles(vals...)
			form.Set("reason", "reason of expert R"+strconv.Itoa(i))
			if resp, _ := g.post(g.qpath(i, q)+"/save", form); resp.StatusCode != 303 {
				t.Fatalf("expert %d saves: %d", i, resp.StatusCode)
			}
		}
	}
	ctx := context.Background()
	g.secondRound()
	salt, err := g.db.PanelSalt(ctx, g.ws.ID)
	if err != nil {
		t.Fatal(err)
	}
	reasonRE := regexp.MustCompile(`<li><strong>(Expert [A-Z]+)</strong> <span class="muted">\(round 1\)</span>: reason of expert R(\d+)</li>`)
	discriminating := 0
	for _, q := range []workshop.Question{g.q, g.qs} {
		// The salted order, and the order by id it must not be.
		order := make([]int, len(names))
		for i := range order {
			order[i] = i
		}
		sort.Slice(order, func(a, b int) bool {
			return panelOrder(salt, q.ID, g.experts[order[a]].ID) < panelOrder(salt, q.ID, g.experts[order[b]].ID)
		})
		byID := make([]int, len(names))
		for i := range byID {
			byID[i] = i
		}
		if !slices.Equal(order, byID) {
			discriminating++
		}
		want := map[string]int{} // label → expert
		for place, i := range order {
			want[panelLabel(place)] = i
		}
		_, page := g.get(g.qpath(0, q))
		got := reasonRE.FindAllStringSubmatch(html.UnescapeString(page), -1)
		if len(got) != len(names)-1 {
			t.Fatalf("Q%d: %d reasons on the round-2 page, want the %d other experts'", q.Position, len(got), len(names)-1)
		}
		var labels []string
		for _, m := range got {
			author, _ := strconv.Atoi(m[2])
			if author == 0 {
				t.Errorf("Q%d: the expert's own reason is among the others'", q.Position)
			}
			if want[m[1]] != author {
				t.Errorf("Q%d: %s is beside expert R%d's reason; the salted order puts R%d there", q.Position, m[1], author, want[m[1]])
			}
			labels = append(labels, m[1])
		}
		if !slices.IsSortedFunc(labels, func(a, b string) int { return compareLabels(a, b) }) {
			t.Errorf("Q%d: reasons listed as %v, not in the panel's order", q.Position, labels)
		}
		ownLabel := panelLabel(slices.Index(order, 0))
		if strings.Contains(wideOnly(page), `>`+ownLabel+`</text>`) {
			t.Errorf("Q%d: the expert's own letter %s labels a curve on their page", q.Position, ownLabel)
		}
	}
	if discriminating == 0 {
		t.Fatal("both questions' salted orders equal the order by id (chance about 1 in 10^9): the test proves nothing")
	}
}

// compareLabels orders "Expert A" … "Expert Z", "Expert AA" … as the
// panel numbers them.
func compareLabels(a, b string) int {
	if len(a) != len(b) {
		return len(a) - len(b)
	}
	return strings.Compare(a, b)
}

package web

import (
	"context"
	"encoding/json"
	"math"
	"net/http"
	"net/url"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// A prior agreed from the panel's consensus judgement is shown with the
// judgement itself and how far the agreed Beta is from it, wherever its
// origin is written: the question's panel, the report (current and
// superseded agreements) and the decision log, on its page and in the
// report. The export carries the judgement as typed.
func TestConsensusPriorShowsItsJudgement(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	q := qs[0]
	qp := questionPath(ws.ID, q.ID)
	// Invented consensus judgement for the demo's first question; the
	// demo's own consensus prior comes first and is superseded.
	if res, body := h.post(qp+"/agree", url.Values{"source": {"consensus"}, "confirm_open": {"on"}, "rationale": {"Agreed after the discussion (invented)."},
		"values[0]": {"0.021"}, "values[1]": {"0.052"}, "values[2]": {"0.13"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("agree consensus: %d %s", res.StatusCode, body)
	}
	ps, err := h.db.AgreedPriors(context.Background(), ws.ID)
	if err != nil || len(ps) != 2 || ps[1].Consensus == nil {
		t.Fatalf("agreed priors %+v, %v", ps, err)
	}
	// The gap by its definition, max |F(xᵢ) − pᵢ| over the stated points,
	// with the stored Beta's CDF.
	gapOf := func(p workshop.AgreedPrior) float64 {
		g := 0.0
		for i, x := range p.Consensus.Values {
			g = math.Max(g, math.Abs(p.Dist.CDF(x)-q.Probs[i]))
		}
		return g
	}
	words := func(p workshop.AgreedPrior) string {
		var parts []string
		for i, x := range p.Consensus.Values {
			parts = append(parts, pct(q.Probs[i])+":\u00a0"+fv(x))
		}
		return "consensus judgement (" + strings.Join(parts, "; ") + "), largest probability gap " + fv(gapOf(p))
	}
	now, before := words(ps[1]), words(ps[0])
	if !strings.Contains(now, "5%:\u00a00.021; 50%:\u00a00.052; 95%:\u00a00.13") {
		t.Fatalf("the test's own wording is off: %q", now)
	}
	if g := gapOf(ps[1]); !(g > 0 && g < 0.05) {
		t.Fatalf("gap %v: the test's judgement should fit closely but not exactly", g)
	}

	_, panel := h.get(qp)
	_, report := h.get(workshopPath(ws.ID) + "/report")
	_, log := h.get(workshopPath(ws.ID) + "/log")
	for _, c := range []struct {
		page, body string
		want       []string
	}{
		{"panel", panel, []string{now}},
		{"report", report, []string{now, before}},
		{"log", log, []string{now, before}},
	} {
		for _, w := range c.want {
			if !strings.Contains(c.body, htmlEscape(w)) {
				t.Errorf("%s lacks %q", c.page, w)
			}
		}
	}
	// The report's decision log too: the current prior's words appear in
	// its summary, its log and nowhere else.
	if n := strings.Count(report, htmlEscape(now)); n != 2 {
		t.Errorf("report shows the current consensus %d times, want 2 (agreed prior, decision log)", n)
	}

	// The export already carries the judgement as typed.
	_, body := h.get(workshopPath(ws.ID) + "/export.json")
	var rec struct {
		Questions []struct {
			ID          int64 `json:"id"`
			AgreedPrior *struct {
				Consensus *struct {
					Values []float64 `json:"values"`
				} `json:"consensus"`
			} `json:"agreed_prior"`
		} `json:"questions"`
	}
	if err := json.Unmarshal([]byte(body), &rec); err != nil {
		t.Fatal(err)
	}
	found := false
	for _, rq := range rec.Questions {
		if rq.ID == q.ID {
			found = rq.AgreedPrior != nil && rq.AgreedPrior.Consensus != nil &&
				len(rq.AgreedPrior.Consensus.Values) == 3 && rq.AgreedPrior.Consensus.Values[2] == 0.13
		}
	}
	if !found {
		t.Error("the export lacks the consensus judgement")
	}
}

package web

import (
	"context"
	"encoding/json"
	"net/http"
	"net/url"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// TestHugeWeightsShowTheirShares: four custom weights of 1e308 each are
// four equal shares, 25% each, in the facilitator's panel, the decision
// log and the export. Summing the raw weights would overflow to +Inf and
// show every share as 0 (issue 13, item 8); elicit.Shares divides by the
// largest weight first. Expected value: 1e308 / (4 × 1e308) = 1/4 by
// hand.
func TestHugeWeightsShowTheirShares(t *testing.T) {
	h, ws, q, es := answeredByAll(t)
	qp := questionPath(ws.ID, q.ID)
	form := url.Values{"scheme": {"custom"}, "reason": {"Weights at the edge of float64 (invented)"}}
	for _, e := range es {
		form.Set(weightField(e.ID), "1e308")
	}
	if res, body := h.post(qp+"/weights", form); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("set weights: %d %s", res.StatusCode, body)
	}

	_, panel := h.get(qp)
	if n := strings.Count(panel, `<td class="num" data-label="Weight in pool">25%</td>`); n != 4 {
		t.Errorf("the panel shows %d shares of 25%%, want 4", n)
	}
	if strings.Contains(panel, `<td class="num" data-label="Weight in pool">0%</td>`) {
		t.Error("the panel shows a share of 0%")
	}

	_, log := h.get(workshopPath(ws.ID) + "/log")
	want := "as shares of the pool: "
	for i, e := range es {
		if i > 0 {
			want += ", "
		}
		want += htmlEscape(e.Name) + " 25%"
	}
	if !strings.Contains(log, want) {
		t.Errorf("the decision log lacks %q", want)
	}

	_, body := h.get(workshopPath(ws.ID) + "/export.json")
	var rec record.Record
	if err := json.Unmarshal([]byte(body), &rec); err != nil {
		t.Fatal(err)
	}
	for _, rq := range rec.Questions {
		if rq.ID != q.ID {
			continue
		}
		if rq.Pool == nil || len(rq.Pool.Weights) != 4 {
			t.Fatalf("export: pool %+v", rq.Pool)
		}
		for _, w := range rq.Pool.Weights {
			if w.Weight != 0.25 {
				t.Errorf("export: expert %d has weight %v, want 0.25", w.ExpertID, w.Weight)
			}
		}
	}
}

// TestLogWritesSharesAsThePanel: the decision log writes each expert's
// share of the pool as the panel's "Weight in pool" column does. Custom
// weights 1, 1, 1 and 0.01 are shares 1/3.01 = 33.2% and 0.01/3.01 =
// 0.332% (by hand); the log wrote them 0.33 and 0.00, telling the
// reader the fourth expert did not count at all.
func TestLogWritesSharesAsThePanel(t *testing.T) {
	h, ws, q, es := answeredByAll(t)
	qp := questionPath(ws.ID, q.ID)
	form := url.Values{"scheme": {"custom"}, "reason": {"One expert nearly left out (invented)"}}
	for i, e := range es {
		w := "1"
		if i == 3 {
			w = "0.01"
		}
		form.Set(weightField(e.ID), w)
	}
	if res, body := h.post(qp+"/weights", form); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("set weights: %d %s", res.StatusCode, body)
	}
	_, panel := h.get(qp)
	for _, share := range []string{"33.2%", "0.332%"} {
		if !strings.Contains(panel, `<td class="num" data-label="Weight in pool">`+share+`</td>`) {
			t.Errorf("the panel does not show the share %s", share)
		}
	}
	_, log := h.get(workshopPath(ws.ID) + "/log")
	want := "as shares of the pool: " + htmlEscape(es[0].Name) + " 33.2%, " + htmlEscape(es[1].Name) + " 33.2%, " +
		htmlEscape(es[2].Name) + " 33.2%, " + htmlEscape(es[3].Name) + " 0.332%."
	if !strings.Contains(log, want) {
		t.Errorf("the decision log lacks %q", want)
	}
}

// A weight for an expert the workshop does not have is refused, not
// dropped: a stale page or a mistyped script would otherwise set weights
// it did not mean.
func TestWeightForAnUnknownExpertRefused(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	qp := questionPath(ws.ID, qs[0].ID)
	before := h.counts(ws.ID)
	form := url.Values{"scheme": {"custom"}, "reason": {"A stale page (invented)"}, "weights[99999]": {"1"}}
	for _, e := range es {
		form.Set(weightField(e.ID), "1")
	}
	res, body := h.post(qp+"/weights", form)
	if res.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, "weights[99999]: no expert of this workshop has this number") {
		t.Errorf("unknown expert's weight: %d", res.StatusCode)
	}
	if after := h.counts(ws.ID); after != before {
		t.Errorf("saved: %v, then %v", before, after)
	}
}

// answeredByAll is the seeded demo with a question that all four of its
// experts answered, so the panel's shares of the pool are the weight
// set's.
func answeredByAll(t *testing.T) (*harness, workshop.Workshop, workshop.Question, []workshop.Expert) {
	t.Helper()
	h, ws, qs, es, _ := seeded(t)
	if len(es) != 4 {
		t.Fatalf("the demo has %d experts, want 4", len(es))
	}
	revs, err := h.db.Revisions(context.Background(), ws.ID)
	if err != nil {
		t.Fatal(err)
	}
	for _, cand := range qs {
		who := map[int64]bool{}
		for _, rv := range revs {
			if rv.QuestionID == cand.ID {
				who[rv.ExpertID] = true
			}
		}
		if len(who) == 4 {
			return h, ws, cand, es
		}
	}
	t.Fatal("no demo question has answers from all four experts")
	return nil, workshop.Workshop{}, workshop.Question{}, nil
}

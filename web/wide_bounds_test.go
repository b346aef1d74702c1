package web

import (
	"context"
	"encoding/json"
	"net/http"
	"net/url"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/record"
)

// Bounds as wide as the rules allow (±1e300) keep every number finite:
// the variance of such a quantity is beyond float64's range, so the SDs
// are computed on the unit scale and scaled once. Two experts answer a
// question on [−1e300, 1e300] and one on [0, 1e300]; the panel, the JSON
// export and the priors CSV carry no NaN or Inf.
func TestWidestBoundsStayFinite(t *testing.T) {
	h, ws, _, es, _ := seeded(t)
	ctx := context.Background()
	wp := workshopPath(ws.ID)
	for _, b := range [][2]string{{"-1e300", "1e300"}, {"0", "1e300"}} {
		if r, body := h.post(wp+"/questions", url.Values{"wording": {"How large, on a very wide scale (invented)?"},
			"quantity": {"very wide quantity " + b[0]}, "units": {"units"}, "lower": {b[0]}, "upper": {b[1]},
			"format": {"quantiles"}, "preset": {"p05_50_95"}}); r.StatusCode != http.StatusSeeOther {
			t.Fatalf("question on [%s, %s]: %d %s", b[0], b[1], r.StatusCode, body)
		}
	}
	qs, _ := h.db.Questions(ctx, ws.ID)
	answers := map[float64][2][]string{
		-1e300: {{"-5e299", "-1e299", "3e299"}, {"-2e299", "2e299", "6e299"}},
		0:      {{"1e299", "3e299", "6e299"}, {"2e299", "5e299", "8e299"}},
	}
	for _, q := range qs[len(qs)-2:] {
		vals := answers[q.Lower]
		for k, v := range vals {
			form := url.Values{"channel": {"phone"}, "values[0]": {v[0]}, "values[1]": {v[1]}, "values[2]": {v[2]},
				"reason": {"A judgement on a very wide scale (invented)."}}
			if r, body := h.post(entryPath(ws.ID, q.ID, es[k].ID)+"/save", form); r.StatusCode != http.StatusSeeOther {
				t.Fatalf("entry on [%v, %v]: %d %s", q.Lower, q.Upper, r.StatusCode, body)
			}
		}
		qp := questionPath(ws.ID, q.ID)
		r, panel := h.get(qp)
		if r.StatusCode != http.StatusOK {
			t.Fatalf("panel: %d", r.StatusCode)
		}
		for _, bad := range []string{"NaN", "Inf", "not available"} {
			if strings.Contains(panel, bad) {
				t.Errorf("the panel on [%v, %v] shows %q", q.Lower, q.Upper, bad)
			}
		}
		if r, body := h.post(qp+"/agree", url.Values{"source": {"pool"}, "confirm_open": {"on"},
			"rationale": {"The pool on a very wide scale (invented)."}}); r.StatusCode != http.StatusSeeOther {
			t.Fatalf("agree: %d %s", r.StatusCode, body)
		}
	}
	r, raw := h.get(wp + "/export.json")
	if r.StatusCode != http.StatusOK {
		t.Fatalf("export.json: %d %s", r.StatusCode, raw)
	}
	var rec record.Record
	if err := json.Unmarshal([]byte(raw), &rec); err != nil {
		t.Fatal(err)
	}
	n := 0
	for _, q := range rec.Questions {
		if q.Upper != 1e300 {
			continue
		}
		n++
		if q.Pool == nil || q.AgreedPrior == nil {
			t.Fatalf("question on [%v, %v]: pool %v, agreed prior %v (%s)", q.Lower, q.Upper, q.Pool, q.AgreedPrior, q.PoolError)
		}
		// An SD on these bounds is a sizeable share of their width:
		// positive, finite, below the width.
		if sd := q.AgreedPrior.SD; !(sd > 1e297 && sd < q.Upper-q.Lower) {
			t.Errorf("agreed prior on [%v, %v]: sd %v", q.Lower, q.Upper, sd)
		}
	}
	if n != 2 {
		t.Errorf("%d wide questions in the export, want 2", n)
	}
	r, csv := h.get(wp + "/priors.csv")
	if r.StatusCode != http.StatusOK || strings.Contains(csv, "Inf") || strings.Contains(csv, "NaN") {
		t.Errorf("priors.csv: %d\n%s", r.StatusCode, csv)
	}
}

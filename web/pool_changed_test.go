package web

import (
	"net/http"
	"net/url"
	"strconv"
	"strings"
	"testing"
)

// A prior agreed from the pool stays the single Beta of the pool as it
// was; when the panel moves under it, the panel, the report and the
// study page say so beside it, naming what moved, instead of showing it
// under a pool it no longer represents with the same pool's name.
func TestAgreedPoolPriorSaysThePoolChanged(t *testing.T) {
	h, ws, qs, es, links := seeded(t)
	qp := questionPath(ws.ID, qs[0].ID)
	const lead = "The pool has changed since this prior was agreed"
	notices := func() (panel, report, study string) {
		t.Helper()
		_, p := h.get(qp)
		_, r := h.get(workshopPath(ws.ID) + "/report")
		_, st := h.get(studyPath(ws.ID, qs[0].ID))
		pick := func(body string) string {
			i := strings.Index(body, lead)
			if i < 0 {
				return ""
			}
			return body[i : i+strings.Index(body[i:], "<")]
		}
		return pick(p), pick(r), pick(st)
	}

	if res, body := h.post(qp+"/agree", url.Values{"source": {"pool"}, "confirm_open": {"on"}, "rationale": {"The pool (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("agree the pool: %d %s", res.StatusCode, body)
	}
	if p, r, st := notices(); p != "" || r != "" || st != "" {
		t.Fatalf("just agreed, the pool is the one agreed; the pages say %q, %q, %q", p, r, st)
	}

	// Tomas revises; Ole's access is revoked; other weights are set.
	if res, _ := h.post(links[1].Path+"q/"+strconv.FormatInt(qs[0].ID, 10)+"/save",
		url.Values{"values[0]": {"0.01"}, "values[1]": {"0.06"}, "values[2]": {"0.2"}, "reason": {"Rethought the tail (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("Tomas revises: %d", res.StatusCode)
	}
	p, r, st := notices()
	for _, got := range []string{p, r, st} {
		if !strings.Contains(got, "revised since: Tomas Lindqvist") || strings.Contains(got, "Ole") || strings.Contains(got, "weights") {
			t.Errorf("after Tomas revised: %q", got)
		}
	}
	if res, _ := h.post(expertActionPath(ws.ID, es[3].ID, "revoke"), url.Values{"confirm": {"yes"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("revoke Ole: %d", res.StatusCode)
	}
	wf := url.Values{"scheme": {"custom"}, "reason": {"Invented."}}
	for i, e := range es {
		wf.Set(weightField(e.ID), []string{"2", "1", "1", "1"}[i])
	}
	if res, body := h.post(qp+"/weights", wf); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("set weights: %d %s", res.StatusCode, body)
	}
	p, r, st = notices()
	for _, got := range []string{p, r, st} {
		if !strings.Contains(got, "revised since: Tomas Lindqvist; no longer in the pool: Ole Brandt; other weights are in force") {
			t.Errorf("after Ole was revoked and weights set: %q", got)
		}
	}

	// Agreed again, the prior stands for the pool as it now is.
	if res, body := h.post(qp+"/agree", url.Values{"source": {"pool"}, "confirm_open": {"on"}, "rationale": {"Again (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("agree again: %d %s", res.StatusCode, body)
	}
	if p, r, st := notices(); p != "" || r != "" || st != "" {
		t.Fatalf("agreed again; the pages still say %q, %q, %q", p, r, st)
	}
}

// Weights applied again as they stood do not change the pool: a prior
// agreed under equal weights (none set) stays the pool's after equal
// weights are applied, and the pages say nothing of a change.
func TestEqualWeightsAppliedAgainLeaveThePool(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	qp := questionPath(ws.ID, qs[0].ID)
	if res, body := h.post(qp+"/agree", url.Values{"source": {"pool"}, "confirm_open": {"on"}, "rationale": {"The pool (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("agree the pool: %d %s", res.StatusCode, body)
	}
	if res, body := h.post(qp+"/weights", url.Values{"scheme": {"equal"}, "reason": {"Equal, said aloud (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("equal weights: %d %s", res.StatusCode, body)
	}
	for _, page := range []string{qp, studyPath(ws.ID, qs[0].ID), workshopPath(ws.ID) + "/report"} {
		if _, body := h.get(page); strings.Contains(body, "The pool has changed since this prior was agreed") {
			t.Errorf("%s says the pool changed", page)
		}
	}
}

// An expert the custom weights leave out (weight 0) counts for nothing
// in the pool: a late expert answering under the weights a prior from
// the pool was agreed under does not change it. The pages said "now in
// the pool: Lena" beside the warning that her judgements count for
// nothing in the pools.
func TestLateExpertWeighedZeroLeavesThePool(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	qp := questionPath(ws.ID, qs[0].ID)
	wf := url.Values{"scheme": {"custom"}, "reason": {"Invented."}}
	for i, e := range es {
		wf.Set(weightField(e.ID), []string{"2", "1", "1", "1"}[i])
	}
	if res, body := h.post(qp+"/weights", wf); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("set weights: %d %s", res.StatusCode, body)
	}
	if res, body := h.post(qp+"/agree", url.Values{"source": {"pool"}, "confirm_open": {"on"}, "rationale": {"The pool (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("agree the pool: %d %s", res.StatusCode, body)
	}
	_, link := h.addExpert(ws, "Lena Okafor (invented)")
	if res, _ := h.post(expertPath(link)+"q/"+strconv.FormatInt(qs[0].ID, 10)+"/save",
		url.Values{"values[0]": {"0.01"}, "values[1]": {"0.06"}, "values[2]": {"0.2"}, "reason": {"Invented."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("Lena answers: %d", res.StatusCode)
	}
	for _, page := range []string{qp, studyPath(ws.ID, qs[0].ID), workshopPath(ws.ID) + "/report"} {
		_, body := h.get(page)
		if strings.Contains(body, "The pool has changed since this prior was agreed") {
			t.Errorf("%s says the pool changed when only an expert weighed 0 answered", page)
		}
		if page != studyPath(ws.ID, qs[0].ID) && !strings.Contains(body, "Lena Okafor (invented) joined the panel") {
			t.Errorf("%s does not say Lena has weight 0", page)
		}
	}
}

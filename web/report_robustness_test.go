package web

import (
	"net/http"
	"net/url"
	"strings"
	"testing"
)

// TestReportPrintsRobustnessWhereWeightsRestOnIt: the printed report
// carries the robustness reruns of the performance weights only where
// something rests on them: while they are in force, or once a prior was
// agreed from the pool under them. Under equal weights it says in a line
// that they are left out and where they are (in a workshop of 30 experts
// and 25 questions they were some 70 printed pages of reruns of a pool
// nothing used).
func TestReportPrintsRobustnessWhereWeightsRestOnIt(t *testing.T) {
	p := newSeedPanel(t)
	h := p.h
	p.enterTruths(t, true)
	report := func() string {
		t.Helper()
		res, body := h.get(workshopPath(p.ws.ID) + "/report")
		if res.StatusCode != http.StatusOK {
			t.Fatalf("report: %d", res.StatusCode)
		}
		return body
	}
	const reruns, leftOut = `<h3 id="robustness">`, `id="robustness-left-out"`
	if body := report(); strings.Contains(body, reruns) || !strings.Contains(body, leftOut) {
		t.Errorf("equal weights: reruns printed %v, the line saying they are left out %v", strings.Contains(body, reruns), strings.Contains(body, leftOut))
	}
	weigh := func(scheme string) {
		t.Helper()
		if res, body := h.post(p.path()+"/weights", url.Values{"scheme": {scheme}, "reason": {"invented"}}); res.StatusCode != http.StatusSeeOther {
			t.Fatalf("weights %s: %d %s", scheme, res.StatusCode, body)
		}
	}
	weigh("performance")
	if body := report(); !strings.Contains(body, reruns) || strings.Contains(body, leftOut) {
		t.Error("performance weights in force: the reruns are not printed")
	}
	// A prior agreed from the pool under them keeps the reruns in the
	// report after the weights go back to equal.
	qp := questionPath(p.ws.ID, p.targets[0].ID)
	if res, body := h.post(qp+"/agree", url.Values{"source": {"pool"}, "confirm_open": {"on"}, "rationale": {"The performance-weighted pool (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("agree the pool: %d %s", res.StatusCode, body)
	}
	weigh("equal")
	if body := report(); !strings.Contains(body, reruns) || strings.Contains(body, leftOut) {
		t.Error("a prior agreed from the performance-weighted pool: the reruns are not printed")
	}
}

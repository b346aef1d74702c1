package web

import (
	"net/http"
	"net/url"
	"strings"
	"testing"
)

// The overview's list of questions writes each question's bounds as the
// question's panel does (fvBounds), on one line: it wrote them with Go's
// %g, "0 to 1e+06" for a count of hours up to a million and "1 to 1" for
// bounds of 1 and 1.00001, and broke "0 to 10000" over two lines.
func TestOverviewWritesBoundsAsThePanelDoes(t *testing.T) {
	h, ws, _, _, _ := seeded(t)
	wp := workshopPath(ws.ID)
	for _, b := range [][2]string{{"0", "1000000"}, {"1", "1.00001"}} {
		if r, body := h.post(wp+"/questions", url.Values{"wording": {"How many, on these bounds (invented)?"},
			"quantity": {"bounded quantity " + b[1]}, "units": {"hours"}, "lower": {b[0]}, "upper": {b[1]},
			"format": {"quantiles"}, "preset": {"p05_50_95"}}); r.StatusCode != http.StatusSeeOther {
			t.Fatalf("question on [%s, %s]: %d %s", b[0], b[1], r.StatusCode, body)
		}
	}
	r, body := h.get(wp)
	if r.StatusCode != http.StatusOK {
		t.Fatalf("overview: %d", r.StatusCode)
	}
	for _, want := range []string{"0\u00a0to\u00a01000000", "1\u00a0to\u00a01.00001", "0\u00a0to\u00a01<"} {
		if !strings.Contains(body, want) {
			t.Errorf("the overview does not write the bounds %q", want)
		}
	}
	if strings.Contains(body, "e+06") {
		t.Errorf("the overview writes a bound with an exponent: %q", excerpt(body, "e+06"))
	}
}

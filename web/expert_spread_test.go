package web

import (
	"fmt"
	"github.com/parley-elicit/parley/web/chart/charttest"
	"net/http"
	"strings"
	"testing"
)

// TestLargePanelDrawsSpread checks that a round-2 page for a panel of 201
// experts shows the other 200 as a spread of intervals, not 200 overlaid
// curves, and stays small.
func TestLargePanelDrawsSpread(t *testing.T) {
	names := make([]string, 201)
	for i := range names {
		names[i] = fmt.Sprintf("Panellist %03d", i)
	}
	g := newExpertRig(t, names...)
	for i := range names {
		m := 0.1 + 0.6*float64(i)/float64(len(names))
		a := quantiles(fmt.Sprintf("%.4f", m/3), fmt.Sprintf("%.4f", m), fmt.Sprintf("%.4f", m+0.2))
		if resp, _ := g.post(g.qpath(i, g.q)+"/save", a); resp.StatusCode != http.StatusSeeOther {
			t.Fatalf("expert %d save: %d", i, resp.StatusCode)
		}
	}
	g.secondRound()
	_, page := g.get(g.qpath(0, g.q))
	if n := len(charttest.SpreadRows(wideOnly(page))); n != 200 {
		t.Errorf("%d intervals in the spread, want 200 (every other expert)", n)
	}
	start, end := strings.Index(page, "What the other experts said"), strings.Index(page, "Your history")
	if start < 0 || end < start {
		t.Fatal("no panel section before the history")
	}
	if n := strings.Count(wideOnly(page[start:end]), "curve-cdf curve-expert"); n != 1 {
		t.Errorf("%d expert CDF curves, want 1 (the asking expert's own)", n)
	}
	for _, want := range []string{`data-label="You"`, "Equal-weight pool", "The other 200 experts&#39; medians run from",
		// In the words of the expert's own fit above it.
		"One line per other expert, from the 5% point to the 95% point of their curve", "<caption>Each curve&#39;s 5%, middle (median) and 95% points</caption>"} {
		if !strings.Contains(page, want) {
			t.Errorf("page lacks %q", want)
		}
	}
	for _, leak := range []string{"Panellist 1", `data-label="Expert 1"`} {
		if strings.Contains(page, leak) {
			t.Errorf("page shows %q", leak)
		}
	}
	if strings.Contains(page, "NaN") {
		t.Error("page shows NaN")
	}
	const bound = 200 << 10
	t.Logf("page is %d bytes", len(page))
	if len(page) > bound {
		t.Errorf("page is %d bytes, want under %d", len(page), bound)
	}
}

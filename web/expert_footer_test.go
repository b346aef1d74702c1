package web

import (
	"strings"
	"testing"
)

// TestExpertFooterNamesNoDistribution: the footer under every page said
// "structured expert elicitation of Beta priors", on the expert's pages
// too, where no word is statistical jargon. The facilitator's pages keep
// it.
func TestExpertFooterNamesNoDistribution(t *testing.T) {
	g := newExpertRig(t)
	for _, path := range []string{"/e/" + g.tokens[0] + "/", g.qpath(0, g.q), g.qpath(0, g.qc)} {
		code, body := g.get(path)
		if code != 200 {
			t.Fatalf("%s: status %d", path, code)
		}
		_, foot, ok := strings.Cut(body, `<footer class="footer">`)
		if !ok {
			t.Fatalf("%s: no footer", path)
		}
		if strings.Contains(foot, "Beta") || strings.Contains(foot, "prior") {
			t.Errorf("%s: the expert's footer reads %q", path, foot)
		}
		if !strings.Contains(foot, "every save is a new revision") {
			t.Errorf("%s: the footer lost its promise: %q", path, foot)
		}
	}
}

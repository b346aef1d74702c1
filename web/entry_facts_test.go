package web

import (
	"regexp"
	"strings"
	"testing"
)

// TestEntryPageFactsKeepTheirSpaces: the line under the question on the
// facilitator's entry page read "five-year burst proportion (proportion
// of mains)· between 0 and 1", the units' bracket against the dot.
func TestEntryPageFactsKeepTheirSpaces(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	for _, q := range qs {
		_, body := h.get(entryPath(ws.ID, q.ID, es[2].ID))
		m := regexp.MustCompile(`(?s)<p class="muted">(.*?)</p>`).FindStringSubmatch(body)
		if m == nil {
			t.Fatalf("Q%d: no facts line", q.Position)
		}
		line := strings.Join(strings.Fields(m[1]), " ")
		if !strings.Contains(line, " · between ") || strings.Contains(line, ")·") {
			t.Errorf("Q%d: the facts read %q", q.Position, line)
		}
	}
}

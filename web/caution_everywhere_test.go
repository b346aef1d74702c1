package web

import (
	"net/http"
	"net/url"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/record"
)

// Wherever an agreed prior's Beta is shown, the short caution is shown
// with it (the brief's rule for priors that feed decisions). The decision
// log writes each agreement's Beta, and showed it without the caution.
func TestCautionWhereverAnAgreedPriorIsShown(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	qp := questionPath(ws.ID, qs[0].ID)
	if res, body := h.post(qp+"/agree", url.Values{"source": {"pool"}, "confirm_open": {"on"}, "rationale": {"Caution check (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("agree: %d %s", res.StatusCode, body)
	}
	_, body := h.get(workshopPath(ws.ID) + "/export.json")
	rec, err := record.Parse(strings.NewReader(body))
	if err != nil {
		t.Fatal(err)
	}
	a := rec.Questions[0].AgreedPrior
	if a == nil {
		t.Fatal("no agreed prior in the export")
	}
	beta := "Beta(" + sv(a.Dist.Alpha) + ", " + sv(a.Dist.Beta.Beta) + ")"
	base := workshopPath(ws.ID)
	pages := []string{"/", base, base + "/log", base + "/report", base + "/calibration", base + "/quick-priors",
		qp, qp + "/study", qp + "/history", qp + "/reasons", base + "/experts/" + strconv.FormatInt(es[0].ID, 10)}
	shown := 0
	for _, p := range pages {
		res, page := h.get(p)
		if res.StatusCode != http.StatusOK {
			t.Errorf("%s: status %d", p, res.StatusCode)
			continue
		}
		if !strings.Contains(page, beta) {
			continue
		}
		shown++
		if !strings.Contains(page, `class="banner banner-caution"`) {
			t.Errorf("%s shows the agreed prior %s without the caution", p, beta)
		}
	}
	if shown < 3 {
		t.Errorf("the agreed prior %s is shown on only %d pages: the test reads the wrong words", beta, shown)
	}
}

package web

import (
	"net/http"
	"net/url"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

// block is the HTML of the element with id (up to its closing </div>),
// or "" when the page has none.
func block(body, id string) string {
	i := strings.Index(body, `id="`+id+`"`)
	if i < 0 {
		return ""
	}
	rest := body[i:]
	if j := strings.Index(rest, "</div>"); j >= 0 {
		return rest[:j]
	}
	return rest
}

// strengthCodes are the warning codes listed in the block with id.
func strengthCodes(body, id string) map[string]bool {
	out := map[string]bool{}
	for _, m := range regexp.MustCompile(`data-code="([a-z_]+)"`).FindAllStringSubmatch(block(body, id), -1) {
		out[m[1]] = true
	}
	return out
}

var allStrengthWarnings = []elicit.WarningCode{elicit.WarnFewCalibrationQuestions, elicit.WarnOneExpertDominates, elicit.WarnUnequalCalibrationAnswers}

// TestCalibrationWarningsOnTheDemo: the invented demo scores four
// calibration questions, its optimised cut-off gives Ines Varga all the
// weight, and Tomas Lindqvist and Priya Raman answered three questions
// where the others answered four. Each of these is said on the
// calibration page and on a question's panel (where performance weights
// are offered), and, once the facilitator has revealed the true values
// and applied performance weights, on the panel (in force), in the report
// and in the export record.
func TestCalibrationWarningsOnTheDemo(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	wantText := []string{
		"Only 4 calibration questions were scored; Cooke &amp; Goossens (2008) recommend about 10.",
		"Ines Varga has 100% of the weight (more than 90%)",
		"(Ines Varga 4, Tomas Lindqvist 3, Priya Raman 3, Ole Brandt 4)",
	}
	check := func(where, body, id, lead string) {
		t.Helper()
		codes := strengthCodes(body, id)
		for _, c := range allStrengthWarnings {
			if !codes[string(c)] {
				t.Errorf("%s: no %s warning in #%s", where, c, id)
			}
		}
		b := block(body, id)
		for _, w := range append(wantText, htmlEscape(lead)) {
			if !strings.Contains(b, w) {
				t.Errorf("%s: #%s lacks %q:\n%s", where, id, w, b)
			}
		}
	}
	res, body := h.get(calibrationPath(ws.ID))
	if res.StatusCode != http.StatusOK {
		t.Fatalf("calibration page: %d", res.StatusCode)
	}
	check("calibration page", body, "strength", "How far these scores can carry weights:")
	target := questionPath(ws.ID, qs[0].ID)
	_, body = h.get(target)
	check("panel, weights offered", body, "strength", "Performance weights from the calibration page would rest on weak ground:")

	// Reveal every calibration question's true value and apply the
	// performance weights, as a facilitator would.
	for _, q := range qs {
		if !q.Calibration {
			continue
		}
		form := url.Values{"true_value": {strconv.FormatFloat(*q.TrueValue, 'g', -1, 64)}, "reveal": {"on"}, "reason": {"answers in (invented)"}}
		if res, body := h.post(seedPath(ws.ID, q.ID), form); res.StatusCode != http.StatusSeeOther {
			t.Fatalf("reveal %s: %d %s", q.Quantity, res.StatusCode, body)
		}
	}
	if res, body := h.post(calibrationPath(ws.ID)+"/weights", url.Values{"scheme": {"performance"}, "reason": {"scored (invented)"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("performance weights: %d %s", res.StatusCode, body)
	}
	_, body = h.get(target)
	check("panel, weights in force", body, "strength", "The performance weights in force rest on weak ground:")
	_, body = h.get(workshopPath(ws.ID) + "/report")
	check("report", body, "record-strength", "How far these scores can carry weights:")

	_, js := h.get(workshopPath(ws.ID) + "/export.json")
	rec, err := elicit.ParseRecord(strings.NewReader(js))
	if err != nil {
		t.Fatal(err)
	}
	if rec.Performance == nil {
		t.Fatalf("no performance section: %s", rec.PerformanceNote)
	}
	got := map[elicit.WarningCode]string{}
	for _, w := range rec.Performance.Warnings {
		got[w.Code] = w.Message
	}
	for _, c := range allStrengthWarnings {
		if got[c] == "" {
			t.Errorf("export: no %s warning in %v", c, rec.Performance.Warnings)
		}
	}
	// Equal weights in force: the panel speaks of the offer again.
	if res, _ := h.post(calibrationPath(ws.ID)+"/weights", url.Values{"scheme": {"equal"}, "reason": {"compare (invented)"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("equal weights: %d", res.StatusCode)
	}
	_, body = h.get(target)
	check("panel, equal weights in force", body, "strength", "Performance weights from the calibration page would rest on weak ground:")
}

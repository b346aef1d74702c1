package web

import (
	"net/http"
	"net/url"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// block is the HTML of the element with id, up to its own closing tag
// (nested elements of the same name are counted), or "" when the page
// has none.
func block(body, id string) string {
	i := strings.Index(body, `id="`+id+`"`)
	if i < 0 {
		return ""
	}
	start := strings.LastIndex(body[:i], "<")
	name := strings.FieldsFunc(body[start+1:i], func(r rune) bool { return r == ' ' || r == '>' })[0]
	// An opening tag is "<name" followed by a space or ">", so "<p" does
	// not match "<path".
	opening := func(from int) int {
		for k := from; ; {
			o := strings.Index(body[k:], "<"+name)
			if o < 0 {
				return -1
			}
			if c := body[k+o+len(name)+1]; c == ' ' || c == '>' {
				return k + o - from
			}
			k += o + 1
		}
	}
	depth := 0
	for j := start; j < len(body); {
		open, end := opening(j), strings.Index(body[j:], "</"+name+">")
		switch {
		case end < 0:
			return body[start:]
		case open >= 0 && open < end:
			depth++
			j += open + len(name) + 1
		default:
			depth--
			j += end + len(name) + 3
			if depth == 0 {
				return body[start:j]
			}
		}
	}
	return body[start:]
}

// strengthCodes are the warning codes listed in the block with id.
func strengthCodes(body, id string) map[string]bool {
	out := map[string]bool{}
	for _, m := range regexp.MustCompile(`data-code="([a-z_]+)"`).FindAllStringSubmatch(block(body, id), -1) {
		out[m[1]] = true
	}
	return out
}

var allStrengthWarnings = []elicit.WarningCode{workshop.WarnFewCalibrationQuestions, workshop.WarnOneExpertDominates, workshop.WarnUnequalCalibrationAnswers}

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
	rec, err := record.Parse(strings.NewReader(js))
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

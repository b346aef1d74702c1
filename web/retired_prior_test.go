package web

import (
	"encoding/csv"
	"net/http"
	"net/url"
	"strings"
	"testing"
)

// A target question retired after its prior was agreed: the report's
// table of agreed priors leaves it out and says so, and the agreed-priors
// CSV, which keeps its row since the record keeps the prior, marks it
// retired. The report said "This workshop has no target questions, only
// calibration questions" while the CSV beside it carried the retired
// question's prior, unmarked, for a project lead to take into a study.
func TestRetiredQuestionsPriorIsMarked(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	wp := workshopPath(ws.ID)
	// The demo's one target question, Q1, comes with an agreed prior.
	if res, body := h.post(questionPath(ws.ID, qs[0].ID)+"/retire", url.Values{"action": {"retire"}, "retire_reason": {"Asked twice (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("retire Q1: %d %s", res.StatusCode, body)
	}
	_, body := h.get(wp + "/report")
	i := strings.Index(body, `id="agreed-priors"`)
	summary := body[i : i+strings.Index(body[i:], "</section>")]
	if strings.Contains(summary, "no target questions") || !strings.Contains(summary, "Every target question of this workshop is retired.") ||
		!strings.Contains(summary, "Not listed: Q1 (first-year failure proportion, HX-40), retired, with its agreed prior kept under the question below.") {
		t.Errorf("the report's agreed priors, Q1 retired:\n%s", summary)
	}
	_, text := h.get(wp + "/priors.csv")
	rows, err := csv.NewReader(strings.NewReader(text)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 2 || rows[0][len(rows[0])-2] != "retired" || rows[1][len(rows[1])-2] != "true" {
		t.Errorf("priors.csv, Q1 retired: %q", rows)
	}
	// Brought back, it is listed again, and the CSV says it is in use.
	if res, body := h.post(questionPath(ws.ID, qs[0].ID)+"/retire", url.Values{"action": {"restore"}, "retire_reason": {"Needed after all (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("restore Q1: %d %s", res.StatusCode, body)
	}
	_, body = h.get(wp + "/report")
	if strings.Contains(body, "Not listed:") || !strings.Contains(body, "1 of 1 target question has an agreed prior") {
		t.Error("the report, Q1 brought back: still not listed")
	}
	_, text = h.get(wp + "/priors.csv")
	if rows, _ = csv.NewReader(strings.NewReader(text)).ReadAll(); len(rows) != 2 || rows[1][len(rows[1])-2] != "false" {
		t.Errorf("priors.csv, Q1 brought back: %q", rows)
	}
}

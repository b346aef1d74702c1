package web

import (
	"context"
	"html"
	"net/http"
	"net/url"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// A calibration question's true value, typed in the question's own form,
// takes a % sign on bounds 0 to 1, as the calibration page and the
// experts' answers do (31.72% is 0.3172); it was refused there as not a
// plain decimal number. On other bounds a % sign is refused naming the
// field, and nothing is saved.
func TestQuestionFormTrueValueTakesAPercentSign(t *testing.T) {
	h, ws, _, _, _ := seeded(t)
	ctx := context.Background()
	add := func(quantity, lower, upper, truth string) (*http.Response, string) {
		return h.post(workshopPath(ws.ID)+"/questions", url.Values{"wording": {"Invented: " + quantity + "?"}, "quantity": {quantity},
			"lower": {lower}, "upper": {upper}, "format": {"quantiles"}, "preset": {"p05_50_95"}, "calibration": {"on"}, "true_value": {truth}})
	}
	if r, body := add("share of returns (invented)", "0", "1", "31.72%"); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("a true value of 31.72%% on [0, 1]: %d %s", r.StatusCode, body)
	}
	before, _ := h.db.Questions(ctx, ws.ID)
	var saved *workshop.Question
	for i, q := range before {
		if q.Quantity == "share of returns (invented)" {
			saved = &before[i]
		}
	}
	if saved == nil || saved.TrueValue == nil || *saved.TrueValue != 0.3172 {
		t.Fatalf("saved %+v, want the true value 0.3172", saved)
	}
	r, body := add("hours to repair (invented)", "0", "100", "31.72%")
	if r.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, html.EscapeString(string(workshop.RulePercentHere))) {
		t.Errorf("a %% true value on [0, 100]: %d, want 422 saying %q", r.StatusCode, workshop.RulePercentHere)
	}
	if after, _ := h.db.Questions(ctx, ws.ID); len(after) != len(before) {
		t.Errorf("a refused question was saved: %d questions, then %d", len(before), len(after))
	}
}

package web

import (
	"context"
	"net/url"
	"strconv"
	"strings"
	"testing"
)

// A level, confidence or coverage the user typed is written back as typed:
// 0.9999 is 99.99%, where three significant figures wrote "at least
// 100%", a posterior probability no data reach, and "100% intervals".
func TestTypedLevelsReadAsTyped(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	_, body := h.get(studyPath(ws.ID, qs[0].ID) + "?prior=expert-1&trials=50&threshold=0.1&direction=below&confidence=0.9999&length=0.3&level=0.9999")
	for _, want := range []string{"is below 0.1 is at least 99.99%", "equal-tailed 99.99% intervals"} {
		if !strings.Contains(body, want) {
			t.Errorf("study page lacks %q", want)
		}
	}
	if strings.Contains(body, "at least 100%") || strings.Contains(body, "100% intervals") {
		t.Error("study page writes a typed 0.9999 as 100%")
	}
	_, body = h.get(quickPriorsPath(ws.ID) + "?question=" + strconv.FormatInt(qs[0].ID, 10) + "&construction=interval&c_low=0.01&c_high=0.3&c_coverage=0.9999")
	if !strings.Contains(body, `<th scope="row">Coverage asked</th><td class="num">99.99%</td>`) {
		t.Error("quick priors page does not write the coverage asked, 0.9999, as 99.99%")
	}
}

// The planning form is a question, not a record: a refused plan says
// nothing was planned, not "Nothing was saved" (nothing ever is).
func TestRefusedPlanSaysNothingWasPlanned(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	res, body := h.get(studyPath(ws.ID, qs[0].ID) + "?trials=50&threshold=1&confidence=0.9")
	if res.StatusCode != 422 {
		t.Fatalf("refused plan: %d", res.StatusCode)
	}
	if !strings.Contains(body, "Nothing was planned. Correct the marked fields and try again.") || strings.Contains(body, "Nothing was saved") {
		t.Error("a refused plan does not say that nothing was planned")
	}
}

// Recording "the interval" (both methods at once, which the page's own
// buttons never send: each records one method) is refused beside the
// buttons with its rule, and nothing is saved; the page said only
// "Correct the marked fields" and marked none.
func TestQuickAgreeBothMethodsIsRefusedBesideTheButtons(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	before, _ := h.db.AgreedPriors(context.Background(), ws.ID)
	res, body := h.post(quickPriorsPath(ws.ID)+"/agree", url.Values{"question": {strconv.FormatInt(qs[0].ID, 10)},
		"construction": {"interval"}, "c_low": {"0.03"}, "c_high": {"0.12"}, "c_coverage": {"0.9"},
		"rationale": {"invented"}, "confirm_open": {"on"}})
	if res.StatusCode != 422 {
		t.Fatalf("status %d", res.StatusCode)
	}
	if !strings.Contains(body, `id="err-construction"`) || !strings.Contains(body, "record one method") {
		t.Error("the refusal is not shown beside the record buttons")
	}
	if after, _ := h.db.AgreedPriors(context.Background(), ws.ID); len(after) != len(before) {
		t.Error("a prior was recorded")
	}
}

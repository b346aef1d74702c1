package web

import (
	"net/http"
	"net/url"
	"strings"
	"testing"
)

// The live preview says what stops the fit beside the field's label. The
// four-value confidence, asked as a question, read "No fit yet. How sure
// are you that the true value lies between your lowest and highest?: Type
// the confidence as a percentage: did you mean 80%?." on a phone whose
// keyboard typed 0,8.
func TestPreviewProblemReadsAsASentence(t *testing.T) {
	g := newExpertRig(t)
	_, body := g.post(g.qpath(0, g.qi)+"/preview?fragment=1", url.Values{"lowest": {"0.05"}, "highest": {"0.3"}, "best": {"0.12"}, "confidence": {"0,8"}})
	want := "No fit yet. “How sure are you that the true value lies between your lowest and highest?”: Type the confidence as a percentage: did you mean 80%?</p>"
	if !strings.Contains(body, want) {
		t.Errorf("the preview says %.400s; want %q", body, want)
	}
	resp, body := g.post(g.qpath(0, g.q)+"/preview?fragment=1", quantiles("0.05", "0.01", "0.4"))
	if resp.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, "chance of being lower") || strings.Contains(body, "”:") || !strings.Contains(body, "value.</p>") {
		t.Errorf("a label that is not a question: %.400s", body)
	}
}

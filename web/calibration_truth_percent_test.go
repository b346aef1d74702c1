package web

import (
	"context"
	"net/http"
	"net/url"
	"strings"
	"testing"
)

// A calibration question's true value on a proportion takes a % sign, as
// the experts' answers to it do (workshop.ParseAnswerNumber): a
// facilitator reading "31.72%" off a report typed it and was told it
// "must be a plain decimal number". The value stored is the proportion.
func TestTrueValueOfAProportionTakesAPercentSign(t *testing.T) {
	p := newSeedPanel(t)
	q := p.seeds[0]
	res, body := p.h.post(seedPath(p.ws.ID, q.ID), url.Values{"true_value": {"31.72%"}})
	if res.StatusCode != http.StatusSeeOther {
		t.Fatalf("31.72%%: %d, refused beside the field %v", res.StatusCode, hasFieldError(body, "true_value"))
	}
	qs, err := p.h.db.Questions(context.Background(), p.ws.ID)
	if err != nil {
		t.Fatal(err)
	}
	for _, got := range qs {
		if got.ID == q.ID && (got.TrueValue == nil || *got.TrueValue != 0.3172) {
			t.Fatalf("stored true value %v, want 0.3172", got.TrueValue)
		}
	}
	// Beyond 100% it is outside the bounds, refused, nothing saved.
	before := p.h.counts(p.ws.ID)
	if res, body := p.h.post(seedPath(p.ws.ID, q.ID), url.Values{"true_value": {"131.72%"}}); res.StatusCode != http.StatusUnprocessableEntity || !hasFieldError(body, "true_value") {
		t.Errorf("131.72%%: %d", res.StatusCode)
	}
	if p.h.counts(p.ws.ID) != before {
		t.Error("a refused true value changed the workshop")
	}
}

// The field says so, on a proportion only.
func TestTrueValueHintSaysAPercentSignIsRead(t *testing.T) {
	p := newSeedPanel(t)
	_, body := p.h.get(p.path())
	if !strings.Contains(body, "With a % sign it is a percentage: 12.5% is 0.125.") {
		t.Error("the true-value hint of a proportion does not say a % sign is read")
	}
}

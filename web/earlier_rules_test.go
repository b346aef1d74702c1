package web

import (
	"context"
	"html"
	"net/http"
	"os"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/record"
)

// An answer an earlier build saved under looser rules (three values a
// hair above 0, 4.9e-324 to 1.5e-323, in testdata/records, saved through
// a build that took it) imports unfitted (record.EarlierRule): the
// facilitator's page of its question names the expert's answer as one
// that could not be fitted, saved by an earlier version, and says today's
// rule; the expert's page gives it back in the form; the room view and
// the report are drawn without it. The import had refused the whole
// record.
func TestAnAnswerSavedUnderEarlierRulesIsShownUnfitted(t *testing.T) {
	h := newHarness(t)
	h.signIn()
	ctx := context.Background()
	f, err := os.Open("../testdata/records/demo_7c8c05c_tiny.json")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rec, err := record.Parse(f)
	if err != nil {
		t.Fatalf("the record of an earlier build: %v", err)
	}
	id, err := h.db.Import(ctx, rec)
	if err != nil {
		t.Fatal(err)
	}
	qs, err := h.db.Questions(ctx, id)
	if err != nil {
		t.Fatal(err)
	}
	res, body := h.get(questionPath(id, qs[0].ID))
	if res.StatusCode != http.StatusOK {
		t.Fatalf("question page: %d", res.StatusCode)
	}
	want := "could not be fitted: saved by an earlier version of Parley, whose rules took it; today's rules refuse it: the 5% value " +
		string(elicit.RuleValueNearBound) + " (5e-324 on (0, 1))"
	if !strings.Contains(body, html.EscapeString(want)) {
		t.Errorf("the question page does not say %q", want)
	}
	// The expert, given a new link, finds the answer as saved in the form,
	// to put right (a preview or a save of it is refused by today's rule,
	// as any answer is).
	experts, err := h.db.Experts(ctx, id)
	if err != nil {
		t.Fatal(err)
	}
	token, hash, err := newToken()
	if err != nil {
		t.Fatal(err)
	}
	if err := h.db.ReissueToken(ctx, experts[0].ID, hash, "a new link after the import (invented)"); err != nil {
		t.Fatal(err)
	}
	res, body = h.get("/e/" + token + "/q/" + strconv.FormatInt(qs[0].ID, 10))
	if res.StatusCode != http.StatusOK || strings.Contains(body, "NaN") || !strings.Contains(body, `value="5e-324"`) {
		t.Errorf("the expert's question page: %d, or it does not give the saved 5e-324 (4.9e-324 as typed), or NaN on it", res.StatusCode)
	}
	for _, path := range []string{roomPath(id, qs[0].ID), workshopPath(id) + "/report"} {
		if res, body := h.get(path); res.StatusCode != http.StatusOK || strings.Contains(body, "NaN") {
			t.Errorf("%s: %d, or NaN on the page", path, res.StatusCode)
		}
	}
}

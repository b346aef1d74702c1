package web

import (
	"net/http"
	"net/url"
	"strings"
	"testing"
)

// TestRefusedSheetSaysWhatToCorrect: a sheet refused for a row or a
// column marks no field of the form, and its page said "Correct the
// marked fields" above a form with nothing marked. It says to correct the
// sheet, as it does for a sheet refused as a whole (its columns not
// separated by commas, said at the top of the page); a refusal beside a
// field (no sheet at all) keeps the form's words.
func TestRefusedSheetSaysWhatToCorrect(t *testing.T) {
	const correctTheSheet = "Nothing was saved. Correct the sheet and check it again."
	g := newSheetRig(t)
	for _, c := range []struct {
		name, sheet, want, not string
	}{
		{"a cell beyond the header", "expert,question,q05,q50,q95\nAda Quell,Q1,0.02,0,06,0.15\n", correctTheSheet, nothingSavedSummary},
		{"no sheet", "", nothingSavedSummary, correctTheSheet},
		{"semicolons", "expert;question;q05;q50;q95\nAda Quell;Q1;0,02;0,06;0,15\n", correctTheSheet, nothingSavedSummary},
	} {
		t.Run(c.name, func(t *testing.T) {
			r, body := g.h.post(sheetPath(g.ws.ID), url.Values{"sheet": {c.sheet}, "channel": {"file"}})
			if r.StatusCode != http.StatusUnprocessableEntity {
				t.Fatalf("status %d, want 422", r.StatusCode)
			}
			if !strings.Contains(body, c.want) || strings.Contains(body, c.not) {
				t.Errorf("the page does not say %q alone", c.want)
			}
		})
	}
}

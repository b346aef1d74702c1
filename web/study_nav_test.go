package web

import (
	"context"
	"net/http"
	"regexp"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// Every in-page link of the study page leads to a section the page draws:
// on a question whose bounds are not [0, 1] the page has no data, update,
// planning or comparison sections, so it must not offer links to them.
func TestStudyPageLinksOnlyToItsSections(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	q := workshop.Question{WorkshopID: ws.ID, Wording: "Mean repair time of a unit, in hours (invented)?", Quantity: "repair time",
		Units: "hours", Lower: 2, Upper: 50, Format: workshop.FormatQuantiles, Probs: workshop.ProbsDefault}
	if err := h.db.AddQuestion(context.Background(), &q); err != nil {
		t.Fatal(err)
	}
	anchor := regexp.MustCompile(`href="#([a-z0-9-]+)"`)
	for _, qq := range []workshop.Question{qs[0], q} {
		res, body := h.get(studyPath(ws.ID, qq.ID))
		if res.StatusCode != http.StatusOK {
			t.Fatalf("Q%d study page: %d", qq.Position, res.StatusCode)
		}
		links := 0
		for _, m := range anchor.FindAllStringSubmatch(body, -1) {
			if m[1] == "main" {
				continue // the skip link
			}
			links++
			if !strings.Contains(body, `id="`+m[1]+`"`) {
				t.Errorf("Q%d (bounds %v to %v): the page links to #%s, which it does not draw", qq.Position, qq.Lower, qq.Upper, m[1])
			}
		}
		if qq.IsProportion() && links < 4 {
			t.Errorf("Q%d: %d in-page links, want the four sections'", qq.Position, links)
		}
	}
}

// The comparison picture says which interval its lines are, as the table
// beside it does: the posterior's 95% equal-tailed interval
// (workshop.UpdateLevel, elicit.EqualTailed), not just "interval".
func TestStudyComparisonNamesItsInterval(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	_, body := h.get(studyPath(ws.ID, qs[0].ID) + "?trials=60")
	if !strings.Contains(body, `id="compare-planned`) {
		t.Fatal("no comparison picture for the planned study")
	}
	want := "Each line is the posterior's 95% equal-tailed interval under one prior"
	if !strings.Contains(body, htmlEscape(want)) {
		t.Errorf("the comparison picture does not say %q", want)
	}
}

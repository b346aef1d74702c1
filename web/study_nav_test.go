package web

import (
	"context"
	"net/http"
	"regexp"
	"slices"
	"strings"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit"
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

// A prior agreed after the data, so certain that prior and data together
// pass the accuracy limit of a Beta (α or β above 1e7), leaves the update
// uncomputed; the page says so in words for the project lead, naming the
// prior, the data and the limit, not in the package's message
// ("elicit: successes: … (posterior alpha 1.0399999999999998e+07)").
// Such an agreement is refused now (TestAgreeingAPriorTheDataCannotUpdate);
// a record written before that check may still hold one, and is imported.
func TestStudyUpdateBeyondTheLimitReads(t *testing.T) {
	h, old, qs, _, _ := seeded(t)
	ctx := context.Background()
	if err := h.db.AgreePrior(ctx, &workshop.AgreedPrior{QuestionID: qs[0].ID, Source: workshop.PriorFromPool,
		Dist: elicit.Unit(elicit.Beta{Alpha: 9.99e6, Beta: 9.99e6}), Rationale: "near-certain (invented)", RoundOpen: true}); err != nil {
		t.Fatal(err)
	}
	rec, err := h.db.Record(ctx, old.ID, time.Now())
	if err != nil {
		t.Fatal(err)
	}
	rec.StudyData = append(rec.StudyData, workshop.StudyData{ID: 1, QuestionID: qs[0].ID, Successes: 400_000, Trials: 400_000,
		Source: "site log (invented)", ObservedOn: "2026-05-31", At: rec.Questions[0].AgreedPrior.At.Add(-time.Hour)})
	rec.Fingerprint, rec.Chain = "", nil // a record from before the chain, too
	id, err := h.db.Import(ctx, rec)
	if err != nil {
		t.Fatal(err)
	}
	ws, err := h.db.Workshop(ctx, id)
	if err != nil {
		t.Fatal(err)
	}
	qs, err = h.db.Questions(ctx, id)
	if err != nil {
		t.Fatal(err)
	}
	for _, page := range []string{studyPath(ws.ID, qs[0].ID), workshopPath(ws.ID) + "/report", workshopPath(ws.ID) + "/export.json"} {
		res, body := h.get(page)
		if res.StatusCode != http.StatusOK {
			t.Fatalf("%s: %d", page, res.StatusCode)
		}
		for _, want := range []string{"The agreed prior Beta(9990000, 9990000) cannot be updated with the 400000 successes in 400000 trials recorded",
			"the posterior would be Beta(10390000, 9990000)", "at most 1e7"} {
			if !strings.Contains(body, want) {
				t.Errorf("%s lacks %q", page, want)
			}
		}
		if strings.Contains(body, "elicit:") {
			t.Errorf("%s shows the package's message", page)
		}
	}
}

// The menu marks the page it leads to as current, and a page within its
// section (a question's panel within the overview) as in it; the study
// page has no item of its own, so it marks none: it marked "Overview",
// which told a screen reader and the eye that the study was the overview.
func TestMenuMarksTheCurrentPage(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	link := regexp.MustCompile(`<a class="nav-link[^"]*" href="([^"]*)"([^>]*)>([^<]*)</a>`)
	base := workshopPath(ws.ID)
	for _, c := range []struct {
		page, want, current string // want: the item marked; current: its aria-current
	}{
		{studyPath(ws.ID, qs[0].ID), "", ""},
		{studyPath(ws.ID, qs[0].ID) + "?trials=60", "", ""},
		{base, "Overview", "page"},
		{questionPath(ws.ID, qs[0].ID), "Overview", "true"},
		{base + "/quick-priors", "Quick priors", "page"},
		{base + "/report", "Report", "page"},
	} {
		res, body := h.get(c.page)
		if res.StatusCode != http.StatusOK {
			t.Fatalf("%s: %d", c.page, res.StatusCode)
		}
		nav, _, ok := strings.Cut(body[strings.Index(body, `<nav class="nav"`)+1:], "</nav>")
		if !ok {
			t.Fatalf("%s: no menu", c.page)
		}
		var marked []string
		for _, m := range link.FindAllStringSubmatch(nav, -1) {
			attr := regexp.MustCompile(`aria-current="([a-z]+)"`).FindStringSubmatch(m[2])
			isCurrent := strings.Contains(m[0], `nav-link current"`)
			if (attr != nil) != isCurrent {
				t.Errorf("%s: %q is marked current to the eye (%v) but not in aria-current (%q), or the other way round", c.page, m[3], isCurrent, m[2])
			}
			if attr != nil {
				marked = append(marked, m[3])
				if m[3] == c.want && attr[1] != c.current {
					t.Errorf("%s: %q has aria-current=%q, want %q", c.page, m[3], attr[1], c.current)
				}
			}
		}
		if want := []string{c.want}; c.want == "" && len(marked) > 0 || c.want != "" && !slices.Equal(marked, want) {
			t.Errorf("%s: the menu marks %q as current, want %q", c.page, marked, c.want)
		}
	}
}

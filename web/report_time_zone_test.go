package web

import (
	"context"
	"net/http"
	"regexp"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// Every time the report writes carries its zone, as "… UTC": the table
// of every save gave its times bare ("2026-03-02 09:41:07") beside the
// withdrawal line's "… UTC", and the agreed priors' table gave a date
// alone, which a reader east or west of Greenwich could take for a day
// of their own. A date with no time is not a time the report writes.
func TestEveryTimeInTheReportCarriesItsZone(t *testing.T) {
	h, ws, _, _, _ := seeded(t)
	ctx := context.Background()
	// Beyond the demo: a withdrawn save and a weight set, each of which
	// the report dates.
	revs, err := h.db.Revisions(ctx, ws.ID)
	if err != nil {
		t.Fatal(err)
	}
	if err := h.db.WithdrawRevision(ctx, ws.ID, revs[len(revs)-1].ID, "entered for the wrong expert (invented)"); err != nil {
		t.Fatal(err)
	}
	if err := h.db.SetWeights(ctx, &workshop.Weights{WorkshopID: ws.ID, Scheme: workshop.WeightsEqual, Reason: "equal again (invented)"}); err != nil {
		t.Fatal(err)
	}
	res, body := h.get(workshopPath(ws.ID) + "/report")
	if res.StatusCode != http.StatusOK {
		t.Fatalf("report: %d", res.StatusCode)
	}
	i, j := strings.Index(body, "<main"), strings.Index(body, "</main>")
	if i < 0 || j < i {
		t.Fatal("the report has no main")
	}
	// Each element's text apart, as a reader sees a table's cells.
	text := shownText(regexp.MustCompile(`<[^>]*>`).ReplaceAllString(body[i:j], " "))
	times := regexp.MustCompile(`\d{4}-\d{2}-\d{2}( \d{2}:\d{2}(:\d{2})?)?( UTC)?`).FindAllStringSubmatchIndex(text, -1)
	// The history's saves, the agreed prior, the log's events (among them
	// the withdrawal and the weights) and the line saying when the report
	// was made, at least.
	if len(times) < len(revs)+5 {
		t.Fatalf("the report writes %d times; the demo has %d saves", len(times), len(revs))
	}
	for _, added := range []string{"entered for the wrong expert (invented)", "equal again (invented)"} {
		if !strings.Contains(text, added) {
			t.Errorf("the report does not show %q", added)
		}
	}
	bare := 0
	for _, m := range times {
		if m[2] < 0 || m[6] < 0 {
			if bare++; bare <= 3 {
				t.Errorf("the report writes %q without its time or zone: %s…", text[m[0]:m[1]], text[m[0]:min(len(text), m[1]+60)])
			}
		}
	}
	if bare > 3 {
		t.Errorf("and %d more", bare-3)
	}
}

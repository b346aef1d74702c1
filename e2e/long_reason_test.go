package e2e

import (
	"context"
	"fmt"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// TestLongReasonInTheFeedbackFitsAPhone: another expert's reason that
// holds a long unbroken word (an address, pasted) is shown to the panel
// in round 2. On a phone it ran past the screen, and the whole page
// scrolled sideways to 1,134 px; it now breaks inside the word.
func TestLongReasonInTheFeedbackFitsAPhone(t *testing.T) {
	g := newDeviceRig(t)
	shots := newScreenshots(t)
	br := startBrowser(t)
	ctx := context.Background()
	address := "https://records.example.invalid/" + strings.Repeat("burstlog", 12) + "/2024"
	rv := workshop.Revision{QuestionID: g.qs[0].ID, ExpertID: g.experts[0].ID, Answer: workshop.Answer{Values: []float64{0.02, 0.06, 0.15}}, Reason: "See " + address}
	if err := g.site.DB.SaveRevision(ctx, &rv); err != nil {
		t.Fatal(err)
	}
	if err := g.site.DB.SetRound(ctx, g.ws.ID, 1, false, "discussed (invented)"); err != nil {
		t.Fatal(err)
	}
	if err := g.site.DB.SetRound(ctx, g.ws.ID, 2, true, "a second round (invented)"); err != nil {
		t.Fatal(err)
	}
	carmen := br.person("Carmen (on a phone)")
	for _, w := range []int64{360, 390, 1366} {
		carmen.viewport(w, 844, w < 600)
		carmen.open(g.carmensPage(0))
		carmen.sees("round 2's reasons", address[:40])
		fits(t, carmen, "round 2 with a long reason", w)
		shots.take(carmen, fmt.Sprintf("long-reason-round-2-%d", w))
	}
}

package e2e

import (
	"context"
	"net/http"
	"strconv"
	"testing"

	"github.com/parley-elicit/parley/web/chart"
)

// TestRoomFollowsItsRulesLive: the projector's room view keeps its rules
// as the workshop changes under it, without a reload. On the invented
// demo's question 1 (three answers when round 1 closed): an answerer
// revoked in another tab, and the room says a letter is missing; a
// second, and the lone answer left is held back (no curve, the rule
// said); on the prior display, a new agreement replaces the prior's
// median and interval.
func TestRoomFollowsItsRulesLive(t *testing.T) {
	site, d := startDemo(t)
	ctx := context.Background()
	q := d.qs[0]
	if err := site.DB.SetRound(ctx, d.w.ID, 1, false, "Round 1 discussed (invented)."); err != nil {
		t.Fatal(err)
	}
	revs, err := site.DB.LatestRevisions(ctx, q.ID, 1)
	if err != nil || len(revs) != 3 {
		t.Fatalf("the demo's answers to question 1: %d, %v", len(revs), err)
	}
	fac := signedInFacilitator(t, site)
	room := fac.tab("projector")
	room.viewport(1366, 768, false)
	roomURL := d.url + "/q/" + strconv.FormatInt(q.ID, 10) + "/room"
	if st := room.open(roomURL); st != http.StatusOK {
		t.Fatalf("room view: %d", st)
	}
	room.sees("the room of question 1", "Expert A", "Expert B", "Expert C", "Shown: every expert's answer as round 1 closed")
	revoke := func(i int) {
		fac.postFromPage(d.url+"/experts/"+strconv.FormatInt(revs[i].ExpertID, 10)+"/revoke", "confirm=yes&reason=Left+the+workshop+(invented).")
	}
	revoke(0)
	room.waitFor("the missing letter said", `document.querySelector(".room-state").innerText.includes("One expert who had answered no longer takes part, so one letter is missing; the others keep theirs.")
		&& document.querySelectorAll(".room-chart .curve-density.curve-expert").length > 0`)
	revoke(1)
	room.waitFor("the lone answer held back", `document.body.innerText.includes("Only one expert still on the panel had answered this question when round 1 closed.")
		&& !document.querySelector(".curve-density") && !document.querySelector(".chart-medians")`)

	// The prior display follows a new agreement.
	if st := room.open(roomURL + "?show=prior"); st != http.StatusOK {
		t.Fatalf("prior display: %d", st)
	}
	room.sees("the demo's prior", "The agreed prior", "90% interval", "Caution.")
	fac.postFromPage(d.url+"/q/"+strconv.FormatInt(q.ID, 10)+"/agree",
		"source=consensus&values%5B0%5D=0.03&values%5B1%5D=0.08&values%5B2%5D=0.2&rationale=Agreed+in+the+room+(invented).")
	ps, err := site.DB.AgreedPriors(ctx, d.w.ID)
	if err != nil || len(ps) != 2 {
		t.Fatalf("agreed priors: %d, %v", len(ps), err)
	}
	dist := ps[1].Dist
	// As the facilitator's panel writes a prior's points.
	pts := chart.FormatRangeWithin([]float64{dist.Quantile(0.05), dist.Quantile(0.5), dist.Quantile(0.95)}, dist.Lower, dist.Upper, false)
	room.waitFor("the new prior's median and interval", `document.querySelector(".room-prior").innerText.includes("Median `+pts[1]+` ")
		&& document.querySelector(".room-prior").innerText.includes("90% interval `+pts[0]+` to `+pts[2]+`")
		&& !!document.querySelector(".room-prior .banner-caution")`)
}

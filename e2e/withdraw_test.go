package e2e

import (
	"context"
	"fmt"
	"strconv"
	"testing"

	"github.com/chromedp/chromedp"
)

// The facilitator withdraws a judgement in the browser, at 1366 and
// 390 px: "Withdraw…" beside it in the question's history opens the page
// that says what follows; sent without a reason it is refused beside the
// field; with one, the history marks the judgement withdrawn with the
// reason. axe-core finds no violation of any impact on the page or the
// history.
func TestWithdrawInBrowser(t *testing.T) {
	site, d := startDemo(t)
	axe := axeSource(t)
	ctx := context.Background()
	q := d.qs[0]
	latest, err := site.DB.LatestRevisions(ctx, q.ID, 1)
	if err != nil || len(latest) < 2 {
		t.Fatalf("the demo's answers to Q1: %v, %v", latest, err)
	}
	b := startBrowser(t)
	fac := b.person("facilitator")
	signIn(t, site, fac)
	qp := d.url + "/q/" + strconv.FormatInt(q.ID, 10)
	noViolation := func(where string) {
		t.Helper()
		if !eval[bool](fac, "axe present", `typeof window.axe === "object"`) {
			evalWithin[bool](fac, "inject axe", axe+";true", axeTimeout)
		}
		for _, f := range evalWithin[[]string](fac, "run axe", `axe.run(document, {resultTypes: ["violations"]}).then(r => r.violations
			.map(v => v.impact + " " + v.id + ": " + v.help + " — " + v.nodes.slice(0, 4).map(n => n.target.join(" ")).join(" | ")))`, axeTimeout) {
			t.Errorf("%s: %s", where, f)
		}
	}
	for i, w := range []int64{1366, 390} {
		rv := latest[i]
		fac.viewport(w, 900, w < 600)
		fac.open(qp)
		link := fmt.Sprintf(`#history a[href$="/revisions/%d/withdraw"]`, rv.ID)
		fac.load("open the withdrawal", chromedp.Click(chromedp.CSS(link)))
		fac.sees("withdrawal page", "Withdraw", "It stays in the record, marked as withdrawn with your reason")
		noViolation(fmt.Sprintf("withdrawal page at %d px", w))
		fac.load("send without a reason", chromedp.Click(chromedp.CSS(`form[action$="/withdraw"] button.button-danger`)))
		fac.sees("refused withdrawal", "Nothing was saved", "is required")
		why := fmt.Sprintf("Entered against the wrong expert, case %d (invented).", i+1)
		fac.fill(`form[action$="/withdraw"]`, "reason", why)
		fac.load("withdraw", chromedp.Click(chromedp.CSS(`form[action$="/withdraw"] button.button-danger`)))
		fac.sees("history after the withdrawal", "Judgement withdrawn.", why)
		if n := fac.count(link); n != 0 {
			t.Errorf("at %d px the history still offers to withdraw the withdrawn judgement", w)
		}
		noViolation(fmt.Sprintf("question page with a withdrawn judgement at %d px", w))
	}
}

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
// reason. The expert's page, the entry page and the revoke page list or
// count it, marked as the history marks it. axe-core finds no violation
// of any impact on any of these pages.
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
	shots := newScreenshots(t)
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
		shots.take(fac, fmt.Sprintf("withdrawn-history-%d", w))

		expert := d.url + "/experts/" + strconv.FormatInt(rv.ExpertID, 10)
		fac.open(expert)
		fac.sees("the expert's page", "1 judgement withdrawn", "Withdrawn judgements", "withdrawn", why)
		fits(t, fac, "the expert's page", w)
		noViolation(fmt.Sprintf("expert's page with a withdrawn judgement at %d px", w))
		shots.take(fac, fmt.Sprintf("withdrawn-expert-%d", w))
		fac.open(qp + "/enter/" + strconv.FormatInt(rv.ExpertID, 10))
		fac.sees("the entry page", "withdrawn", why)
		if n := fac.count("table.table-mine s"); n != 1 {
			t.Errorf("at %d px the entry page's history strikes %d judgements through, want 1", w, n)
		}
		fits(t, fac, "the entry page", w)
		noViolation(fmt.Sprintf("entry page with a withdrawn judgement at %d px", w))
		shots.take(fac, fmt.Sprintf("withdrawn-entry-%d", w))
		fac.open(d.url + "#roster")
		fac.load("revoke…", chromedp.Click(chromedp.CSS(fmt.Sprintf(`form[action$="/experts/%d/revoke"] button.button-danger`, rv.ExpertID))))
		fac.sees("the revoke page", "One of them is withdrawn and counts for nothing already")
		noViolation(fmt.Sprintf("revoke page at %d px", w))
		shots.take(fac, fmt.Sprintf("withdrawn-revoke-%d", w))
	}
}

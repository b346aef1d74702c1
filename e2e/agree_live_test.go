package e2e

import (
	"context"
	"net/http"
	"slices"
	"strconv"
	"strings"
	"testing"

	"github.com/chromedp/chromedp"
)

// TestAgreeThePoolShownAfterALiveUpdateInBrowser: the prior agreed from
// the pool is the pool on the facilitator's screen. The agree form's
// record of the pool it shows stands in the live part of the panel, tied
// to the form by its form attribute, so when an expert's answer arrives
// and the panel redraws its pool, the record moves with it, and the
// first click records the new pool (with the new answer in it). Had the
// record stayed in the form, outside the live part, the click would be
// refused as a pool changed since the page was drawn.
func TestAgreeThePoolShownAfterALiveUpdateInBrowser(t *testing.T) {
	site, d := startDemo(t)
	ctx := context.Background()
	links, w, qs := d.links, d.w, d.qs
	br := startBrowser(t)
	fac := br.person("facilitator")
	shots := newScreenshots(t)
	signIn(t, site, fac)
	fac.viewport(1366, 900, false)
	panel := site.URL + "/w/" + strconv.FormatInt(w.ID, 10) + "/q/" + strconv.FormatInt(qs[0].ID, 10)
	if st := fac.open(panel); st != http.StatusOK {
		t.Fatalf("panel: %d", st)
	}
	fac.liveConnected("the live stream to connect")
	const seen = `document.querySelector("#panel-live input[name=pool_seen][form=agree-form]").value`
	before := eval[string](fac, "the pool shown", seen)
	fac.fill(`#agree-form`, "rationale", "The pool as the room saw it (invented).")

	// Priya, who had not answered question 1, saves now.
	priya := br.person("Priya Raman")
	openQuestion(t, priya, site.URL+linkOf(t, links, "Priya Raman"), 1)
	typeValues(priya, "0.02", "0.05", "0.12")
	saveAnswer(t, priya)
	// The facilitator looks up at the redrawn pool (focus leaves the
	// rationale, which stays as typed).
	fac.do("look at the pool", chromedp.Blur(chromedp.CSS(`#agree-form [name=rationale]`)))
	if err := fac.poll(liveWithin, seen+` !== `+strconv.Quote(before)); err != nil {
		t.Fatalf("the pool shown did not follow Priya's answer within %v: %v", liveWithin, err)
	}
	fac.do("choose the pool", chromedp.Click(chromedp.CSS(`#agree-form input[name=source][value=pool]`)))
	if fac.count(`#f-confirm_open`) > 0 {
		fac.do("confirm the open round", chromedp.Click(chromedp.CSS(`#f-confirm_open`)))
	}
	if st := fac.load("record the prior", chromedp.Click(chromedp.CSS(`#agree-form button[type=submit]`))); st != http.StatusOK {
		t.Fatalf("record the prior: %d", st)
	}
	if txt := fac.text(); !strings.Contains(txt, "The pool as the room saw it (invented).") || strings.Contains(txt, "The pool changed after this page showed it") {
		t.Fatalf("after recording: %s", clip(txt, 1500))
	}
	ps, err := site.DB.AgreedPriors(ctx, w.ID)
	if err != nil || len(ps) == 0 {
		t.Fatalf("agreed priors: %v", err)
	}
	revs, _ := site.DB.Revisions(ctx, w.ID)
	priyas := revs[len(revs)-1]
	if last := ps[len(ps)-1]; last.Rationale != "The pool as the room saw it (invented)." || !slices.Contains(last.Pooled, priyas.ID) {
		t.Fatalf("the prior recorded is %+v; Priya's answer is revision %d", last, priyas.ID)
	}

	// A page drawn before a change it never heard of (no script, or a
	// stream that was away): the click is refused, says why, keeps the
	// rationale and shows the pool as it stands.
	for _, width := range []int64{1366, 390} {
		fac.viewport(width, 900, width < 1000)
		fac.open(panel)
		fac.do("a pool shown before a change", chromedp.Evaluate[chromedp.Void](`document.querySelector("[name=pool_seen]").value = "w0 r1"`))
		fac.fill(`#agree-form`, "rationale", "Agreed from an old page (invented).")
		fac.do("choose the pool", chromedp.Click(chromedp.CSS(`#agree-form input[name=source][value=pool]`)))
		if fac.count(`#f-confirm_open`) > 0 {
			fac.do("confirm the open round", chromedp.Click(chromedp.CSS(`#f-confirm_open`)))
		}
		if st := fac.load("record from an old page", chromedp.Click(chromedp.CSS(`#agree-form button[type=submit]`))); st != http.StatusUnprocessableEntity {
			t.Fatalf("a pool changed since the page: %d", st)
		}
		fac.sees("the refusal", "The pool changed after this page showed it")
		fits(t, fac, "the panel with an agreed prior", width)
		if v := fac.value(`#agree-form [name=rationale]`); v != "Agreed from an old page (invented)." {
			t.Errorf("the rationale after the refusal reads %q", v)
		}
		fac.do("show the refusal", chromedp.Evaluate[chromedp.Void](`document.querySelector("#agree-form .form-error, #agree-form .field-error").scrollIntoView({block: "center"})`))
		shots.take(fac, "agree-pool-changed-"+strconv.FormatInt(width, 10))
	}
	if n, _ := site.DB.AgreedPriors(ctx, w.ID); len(n) != len(ps) {
		t.Errorf("a refused agreement recorded a prior")
	}
}

package e2e

import (
	"context"
	"net/http"
	"strconv"
	"strings"
	"testing"

	"github.com/chromedp/chromedp"
)

// TestRefusedSaveSurvivesReloadAndBack: a refused save came back at the
// address .../save, the answer of a post. A reload, or a phone bringing
// the tab back, asked to "Confirm Form Resubmission", and so did Back
// after the corrected answer was saved. The page now stands at the
// question's own address: a reload opens it afresh with what was typed
// put back, and Back after the save shows the saved answer.
func TestRefusedSaveSurvivesReloadAndBack(t *testing.T) {
	g := newDeviceRig(t)
	shots := newScreenshots(t)
	br := startBrowser(t)
	carmen := br.person("Carmen (on a phone)")
	q4 := g.carmensPage(3)
	save := `form.answer-form button[formaction$="/save"]`
	carmen.viewport(390, 844, true)
	carmen.open(q4)
	typeValues(carmen, "2", "3..5", "6")
	carmen.fill(`form.answer-form`, "reason", "From the repair log (invented).")
	if st := carmen.load("save with a value typed with two points", chromedp.Click(chromedp.CSS(save))); st != http.StatusUnprocessableEntity {
		t.Fatalf("status %d, want 422", st)
	}
	if u := carmen.url(); u != q4 {
		t.Errorf("the refused save stands at %s, want the question's address %s", u, q4)
	}
	// What she types next rides along too.
	carmen.fill(`form.answer-form`, "values[2]", "7")
	if st := carmen.load("reload the refused page", chromedp.Reload()); st != http.StatusOK {
		t.Errorf("reload: status %d, want the question page's 200", st)
	}
	got := []string{carmen.value(`[name="values[0]"]`), carmen.value(`[name="values[1]"]`), carmen.value(`[name="values[2]"]`), carmen.value(`[name=reason]`)}
	if strings.Join(got, "|") != "2|3..5|7|From the repair log (invented)." {
		t.Errorf("after a reload the form holds %q, want what was typed", got)
	}
	shots.take(carmen, "refused-reload-390")
	carmen.fill(`form.answer-form`, "values[1]", "3.5")
	saveAnswer(t, carmen)
	carmen.back(t)
	if u := carmen.url(); u != q4 {
		t.Fatalf("Back after the save leads to %s, showing %q; want the question's page", u, clip(carmen.text(), 200))
	}
	if v := carmen.value(`[name="values[1]"]`); v != "3.5" {
		t.Errorf("Back after the save shows %q as the median, want the saved 3.5", v)
	}
	carmen.sees("Back after the save", "Your history on this question", "25% chance below 2; 50% below 3.5; 75% below 7")
	shots.take(carmen, "refused-back-after-save-390")

	// The facilitator's entry page alike.
	fac := br.person("facilitator")
	signIn(t, g.site, fac)
	fac.viewport(390, 844, true)
	entry := g.wsURL() + "/q/" + strconv.FormatInt(g.qs[3].ID, 10) + "/enter/" + strconv.FormatInt(g.experts[1].ID, 10)
	fac.open(entry)
	typeValues(fac, "1", "2", "5")
	if st := fac.load("save without a channel", chromedp.Click(chromedp.CSS(save))); st != http.StatusUnprocessableEntity {
		t.Fatalf("entry without a channel: status %d, want 422", st)
	}
	fac.do("choose the channel", chromedp.SetValue(chromedp.CSS(`#f-channel`), "phone"), chromedp.Func(func(ctx context.Context, tg *chromedp.Target) error {
		_, err := chromedp.Evaluate[bool](`document.getElementById("f-channel").dispatchEvent(new Event("input", {bubbles: true}))`)(ctx, tg)
		return err
	}))
	if st := fac.load("reload the refused entry", chromedp.Reload()); st != http.StatusOK || fac.url() != entry {
		t.Errorf("reload of the refused entry: status %d at %s", st, fac.url())
	}
	if got := fac.value(`#f-channel`) + "|" + fac.value(`[name="values[2]"]`); got != "phone|5" {
		t.Errorf("after a reload the entry holds %q, want the channel chosen and the values typed", got)
	}
}

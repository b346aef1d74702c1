package e2e

import (
	"net/http"
	"strconv"
	"testing"

	"github.com/chromedp/chromedp"
)

// TestRefusedAnswerFocusesTheFirstMarkedField: a refused save comes back
// as a new page, which showed its top with the focus on nothing, the
// field to put right a screen below on a phone. The first marked field
// now has the focus and is in view, on the expert's page and on the
// facilitator's entry page.
func TestRefusedAnswerFocusesTheFirstMarkedField(t *testing.T) {
	g := newDeviceRig(t)
	shots := newScreenshots(t)
	br := startBrowser(t)
	carmen := br.person("Carmen (on a phone)")
	link := g.links["Carmen Ruiz (invented)"]
	focused := func(p *person, where, want string) {
		t.Helper()
		got := eval[[]float64](p, "the focused field", `(() => {
			const e = document.activeElement, r = e.getBoundingClientRect();
			return [e.id === "`+want+`" ? 1 : 0, r.top, r.bottom, innerHeight];
		})()`)
		id := eval[string](p, "the focused field's id", `document.activeElement.id || document.activeElement.tagName`)
		if got[0] != 1 {
			t.Errorf("%s: the focus is on %s, want #%s", where, id, want)
		} else if got[1] < 0 || got[2] > got[3] {
			t.Errorf("%s: #%s has the focus but stands at %.0f-%.0f px of a %.0f px screen", where, want, got[1], got[2], got[3])
		}
	}
	carmen.viewport(390, 844, true)
	carmen.open(link + "q/" + strconv.FormatInt(g.qs[3].ID, 10))
	typeValues(carmen, "2", "3,5", "")
	if st := carmen.load("save with a comma and a gap", chromedp.Click(chromedp.CSS(`form.answer-form button[formaction$="/save"]`))); st != http.StatusUnprocessableEntity {
		t.Fatalf("status %d, want 422", st)
	}
	focused(carmen, "the expert's refused save", "f-values-1")
	shots.take(carmen, "refused-focus-expert-390")
	// A page that refused nothing leaves the focus alone.
	carmen.open(link + "q/" + strconv.FormatInt(g.qs[3].ID, 10))
	if tag := eval[string](carmen, "the focus on a fresh page", `document.activeElement.tagName`); tag != "BODY" {
		t.Errorf("a fresh question page puts the focus on %s", tag)
	}

	fac := br.person("facilitator")
	signIn(t, g.site, fac)
	fac.viewport(390, 844, true)
	fac.open(g.wsURL() + "/q/" + strconv.FormatInt(g.qs[0].ID, 10) + "/enter/" + strconv.FormatInt(g.experts[2].ID, 10))
	typeValues(fac, "0.02", "0.05", "0.12")
	if st := fac.load("save without a channel", chromedp.Click(chromedp.CSS(`form.answer-form button[formaction$="/save"]`))); st != http.StatusUnprocessableEntity {
		t.Fatalf("status %d, want 422", st)
	}
	focused(fac, "the entry without a channel", "f-channel")
	shots.take(fac, "refused-focus-entry-390")
	fac.viewport(1366, 768, false)
	shots.take(fac, "refused-focus-entry-1366")
}

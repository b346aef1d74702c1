package e2e

import (
	"net/http"
	"strconv"
	"strings"
	"testing"

	"github.com/chromedp/chromedp"
	"github.com/chromedp/chromedp/kb"
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
	link := g.carmensLink()
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
	typeValues(carmen, "2", "3..5", "")
	if st := carmen.load("save with two points and a gap", chromedp.Click(chromedp.CSS(`form.answer-form button[formaction$="/save"]`))); st != http.StatusUnprocessableEntity {
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

// TestRefusedChipsFocusTheBoard: chips placed in one bin, by keyboard,
// and saved: the refusal ("Put chips in at least three bins") marks no
// box, so the page came back at its top with the focus on nothing, the
// message a screen below on a phone, and Tab started again from the
// masthead. The board's first column has the focus now, described by the
// message, both in view.
func TestRefusedChipsFocusTheBoard(t *testing.T) {
	g := newDeviceRig(t)
	carmen := carmenIn(t, "keyboard only")
	link := g.carmensLink()
	shots := newScreenshots(t)
	for _, w := range []int64{390, 1366} {
		carmen.viewport(w, 844, w < 600)
		carmen.open(link + "q/" + strconv.FormatInt(g.qs[2].ID, 10))
		carmen.do("focus the board", chromedp.Focus(chromedp.CSS(`.chips-bin[tabindex="0"]`)))
		for k := 0; k < 24; k++ {
			carmen.do("place a chip", chromedp.KeyEvent(kb.ArrowUp))
		}
		carmen.do("to the save button", chromedp.Focus(chromedp.CSS(`form.answer-form button[formaction$="/save"]`)))
		if st := carmen.load("save every chip in one bin", chromedp.KeyEvent(kb.Enter)); st != http.StatusUnprocessableEntity {
			t.Fatalf("at %d px: status %d, want 422", w, st)
		}
		carmen.waitFor("the board", `!document.querySelector(".chips-board").hidden`)
		got := eval[[]string](carmen, "the focus", `(() => {
			const e = document.activeElement, r = e.getBoundingClientRect();
			const by = (e.getAttribute("aria-describedby") || "").split(" ").map(id => document.getElementById(id)).filter(x => x).map(x => x.innerText).join(" ");
			const m = document.querySelector(".answer-form .form-error").getBoundingClientRect();
			const seen = b => b.top >= -1 && b.bottom <= innerHeight + 1;
			return [e.className || e.tagName, String(seen(r) && seen(m)), by, r.top + "-" + r.bottom + ", message " + m.top + "-" + m.bottom + ", screen " + innerHeight];
		})()`)
		if got[0] != "chips-bin" {
			t.Errorf("at %d px after a refused save of chips the focus is on %s, want the board's column", w, got[0])
			continue
		}
		if got[1] != "true" {
			t.Errorf("at %d px the focused column or the message is out of view (column %s)", w, got[3])
		}
		if !strings.Contains(got[2], "at least three bins") {
			t.Errorf("at %d px the focused column is described by %q, want the refusal", w, got[2])
		}
		shots.take(carmen, "refused-chips-focus-"+strconv.FormatInt(w, 10))
	}
}

// TestRefusedFacilitatorFormsFocusTheMarkedField: the facilitator, by
// keyboard, sent the weights without a reason, the agreed prior without
// a rationale, and the next round without a reason. Each refused form
// came back as a page shown from its top with the focus on nothing, the
// marked field two or three screens down. The marked field has the
// focus now, in view with its message.
func TestRefusedFacilitatorFormsFocusTheMarkedField(t *testing.T) {
	site, d := startDemo(t)
	br := startBrowser(t)
	fac := br.person("facilitator (keyboard only)")
	signIn(t, site, fac)
	panel := d.url + "/q/" + strconv.FormatInt(d.qs[0].ID, 10)
	refused := func(w int64, what, page, button, want string) {
		t.Helper()
		fac.open(page)
		fac.do("to "+what, chromedp.Focus(chromedp.CSS(button)))
		if st := fac.load("send "+what, chromedp.KeyEvent(kb.Enter)); st != http.StatusUnprocessableEntity {
			t.Fatalf("at %d px %s: status %d, want 422", w, what, st)
		}
		got := eval[[]string](fac, "the focus", `(() => {
			const e = document.activeElement, f = e.closest(".field") || e, r = f.getBoundingClientRect();
			const by = (e.getAttribute("aria-describedby") || "").split(" ").map(id => document.getElementById(id)).filter(x => x).map(x => x.innerText).join(" ");
			return [e.id || e.tagName, String(r.top >= -1 && r.bottom <= innerHeight + 1), by];
		})()`)
		if got[0] != want {
			t.Errorf("at %d px %s refused: the focus is on %s, want #%s", w, what, got[0], want)
			return
		}
		if got[1] != "true" {
			t.Errorf("at %d px %s refused: #%s has the focus but its field is out of view", w, what, want)
		}
		if !strings.Contains(got[2], "required") {
			t.Errorf("at %d px %s refused: #%s is described by %q, not its message", w, what, want, got[2])
		}
	}
	for _, w := range []int64{390, 1366} {
		fac.viewport(w, 844, w < 600)
		refused(w, "the weights without a reason", panel, `#pool button[type=submit]`, "f-reason")
		refused(w, "the agreed prior without a rationale", panel, `#agreed button[type=submit]`, "f-rationale")
	}
	fac.open(d.url)
	fac.load("close round 1", chromedp.Click(chromedp.CSS(`#rounds form button[type=submit]`)))
	for _, w := range []int64{390, 1366} {
		fac.viewport(w, 844, w < 600)
		refused(w, "the next round without a reason", d.url, `#rounds form button[type=submit]`, "f-reason")
	}
}

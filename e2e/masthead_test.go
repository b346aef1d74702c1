package e2e

import (
	"context"
	"fmt"
	"net/http"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// TestMastheadKeepsOneRow: a workshop with the longest title the form
// takes keeps the facilitator's navigation in one row at a desk and on a
// projector, the title cut with an ellipsis (and whole in its tooltip and
// in the page's heading) rather than pushing "Sign out" onto a row of its
// own; on a phone the title has one line of its own.
func TestMastheadKeepsOneRow(t *testing.T) {
	s := startSite(t)
	title := strings.TrimSpace(strings.Repeat("Invented panel on first-year inverter failures ", 5))[:input.MaxShortText]
	ws := workshop.Workshop{Title: title, Purpose: "Invented: the masthead with a long title.", Invented: true}
	if err := s.DB.CreateWorkshop(context.Background(), &ws); err != nil {
		t.Fatal(err)
	}
	shots := newScreenshots(t)
	fac := startBrowser(t).person("facilitator")
	signIn(t, s, fac)
	url := s.URL + "/w/" + strconv.FormatInt(ws.ID, 10) + "/"
	for _, w := range []int64{1024, 1280, 1366, 1920} {
		fac.viewport(w, 800, false)
		if st := fac.open(url); st != http.StatusOK {
			t.Fatalf("overview at %d px: status %d", w, st)
		}
		fits(t, fac, "overview with a long title", w)
		rows := eval[[]string](fac, "the masthead's rows", `(() => {
			const tops = new Set();
			const out = [];
			for (const el of document.querySelectorAll(".masthead .brand, .masthead .nav > *")) {
				const r = el.getBoundingClientRect();
				if (!r.height) continue;
				// The middle of each item: items of one row share it to a pixel or two.
				const mid = Math.round((r.top + r.bottom) / 2 / 4);
				if (!tops.has(mid)) { tops.add(mid); out.push(el.textContent.trim().slice(0, 24) + " at " + Math.round(r.top)); }
			}
			return out;
		})()`)
		if len(rows) != 1 {
			t.Errorf("at %d px the masthead's items lie on %d rows: %q", w, len(rows), rows)
		}
		if cut := eval[bool](fac, "the title cut", `(() => { const e = document.querySelector(".nav-workshop"); return e.scrollWidth > e.clientWidth; })()`); !cut {
			t.Errorf("at %d px the 200-character title is not cut (the test's premise)", w)
		}
		if tip := eval[string](fac, "the title's tooltip", `document.querySelector(".nav-workshop").title`); tip != title {
			t.Errorf("at %d px the cut title's tooltip is %q, want the whole title", w, tip)
		}
		shots.take(fac, fmt.Sprintf("masthead-long-title-%d", w))
	}
	fac.viewport(390, 844, true)
	fac.open(url)
	fits(t, fac, "overview with a long title", 390)
	// On a phone the title has a line of its own, cut at its end: the
	// page's heading below carries it whole.
	if lines := eval[float64](fac, "the title's lines on a phone", `(() => { const e = document.querySelector(".nav-workshop"); return e.getBoundingClientRect().height / parseFloat(getComputedStyle(e).fontSize); })()`); !(lines < 2.4) {
		t.Errorf("on a phone the title is %.1f times its font size tall: more than one line", lines)
	}
	shots.take(fac, "masthead-long-title-390")
}

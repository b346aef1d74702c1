package e2e

import (
	"context"
	"strconv"
	"testing"

	"github.com/parley-elicit/parley/web"
)

// TestOverviewCellsKeepTheirCountWhole: on the projector (1366 px) the
// invented demo's who-answered-what table broke "answered (1 save)" as
// "answered (1" over "save)". A cell may wrap before its count, never
// inside it.
func TestOverviewCellsKeepTheirCountWhole(t *testing.T) {
	site := startSite(t)
	ctx := context.Background()
	if _, err := web.SeedDemo(ctx, site.DB); err != nil {
		t.Fatal(err)
	}
	ws, _ := site.DB.Workshops(ctx)
	br := startBrowser(t)
	fac := br.person("facilitator")
	signIn(t, site, fac)
	for _, w := range []int64{1366, 390} {
		fac.viewport(w, 900, w < 600)
		fac.open(site.URL + "/w/" + strconv.FormatInt(ws[0].ID, 10) + "/")
		broken := eval[[]string](fac, "the answer cells' counts", `Array.from(document.querySelectorAll("#answered tbody td")).filter(td => {
			const w = document.createTreeWalker(td, NodeFilter.SHOW_TEXT);
			const r = document.createRange();
			let started = false;
			for (let n = w.nextNode(); n; n = w.nextNode()) {
				const i = started ? 0 : n.textContent.indexOf("(");
				if (i < 0) continue;
				if (!started) { r.setStart(n, i); started = true; }
				r.setEnd(n, n.textContent.length);
			}
			if (!started) return false;
			return new Set(Array.from(r.getClientRects()).filter(b => b.width > 0).map(b => Math.round(b.top))).size > 1;
		}).map(td => td.innerText)`)
		if len(broken) > 0 {
			t.Errorf("at %d px the overview breaks a cell's count over two lines: %q", w, broken)
		}
		if n := fac.count("#answered tbody td"); n == 0 {
			t.Fatalf("at %d px the overview has no answer cells", w)
		}
	}
}

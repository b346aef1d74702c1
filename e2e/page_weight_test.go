package e2e

import (
	"fmt"
	"testing"
)

// TestExpertPagesAreLightOnASlowLink: an expert on a phone over a slow
// link opens her questions one after another. Each page fetched its
// stylesheets and scripts again in full, some 90 kB beside 5 kB of page
// (measured: 95 kB for the first question, as much again for the next).
// The assets now come gzipped and are kept: the first page costs under
// 40 kB all told, and the next pages' assets come from the phone's cache.
// Each preview, fetched at every pause in her typing, cost 23 kB of
// picture and words; gzipped it costs under 8 kB.
func TestExpertPagesAreLightOnASlowLink(t *testing.T) {
	site, d := startDemo(t)
	br := startBrowser(t)
	link := site.URL + linkOf(t, d.links, "Priya Raman")
	priya := br.person("Priya (on a phone)")
	priya.viewport(390, 844, true)
	// bytes is what the page cost over the network: the page itself and
	// each asset, 0 for one the browser kept.
	const bytes = `(() => {
		const nav = performance.getEntriesByType("navigation")[0].transferSize;
		const assets = performance.getEntriesByType("resource").filter(e => new URL(e.name).pathname.startsWith("/static/"));
		return {page: nav, assets: assets.reduce((n, e) => n + e.transferSize, 0), names: assets.map(e => new URL(e.name).pathname + " " + e.transferSize)};
	})()`
	type cost struct {
		Page   int      `json:"page"`
		Assets int      `json:"assets"`
		Names  []string `json:"names"`
	}
	priya.open(link)
	first := eval[cost](priya, "what the home page cost", bytes)
	if first.Page+first.Assets > 40000 {
		t.Errorf("her home page cost %d bytes (page %d, assets %d: %v); want under 40000 on a slow link", first.Page+first.Assets, first.Page, first.Assets, first.Names)
	}
	for i := range 2 {
		priya.open(fmt.Sprintf("%sq/%d", link, d.qs[i].ID))
		c := eval[cost](priya, "what the question cost", bytes)
		// The question page adds the preview's and the chips' scripts,
		// fetched once on the first question.
		if i > 0 && c.Assets > 0 {
			t.Errorf("question %d fetched its assets again: %d bytes (%v); want them from the phone's cache", i+1, c.Assets, c.Names)
		}
		t.Logf("question %d: page %d bytes, assets %d bytes", i+1, c.Page, c.Assets)
	}
	// Each pause in her typing fetches the fit's picture and words.
	typeValues(priya, "0.02", "0.05", "0.13")
	previews := `performance.getEntriesByType("resource").filter(e => e.name.includes("/preview?fragment=1")).map(e => e.transferSize)`
	priya.waitFor("the preview's fetch", previews+`.length > 0 && !document.querySelector("#preview[aria-busy]")`)
	for _, n := range eval[[]int](priya, "what the previews cost", previews) {
		if n > 8000 {
			t.Errorf("a preview cost %d bytes; want under 8000 on a slow link", n)
		}
	}
}

package e2e

import (
	"strings"
	"testing"
)

// TestLivePreviewIsAnnouncedInBrief: the live preview was itself a polite
// live region, so at every pause in typing a screen reader read out all
// of it again: the read-backs, both layouts' descriptions of the picture
// and every label on its axes, some 3,800 characters, and for chips at
// every chip placed. The fit is now announced in brief, in a line of its
// own: what the values imply taken together and any warning, or what
// stops the fit.
func TestLivePreviewIsAnnouncedInBrief(t *testing.T) {
	g := newDeviceRig(t)
	carmen := carmenIn(t, "with a screen reader")
	carmen.open(g.carmensPage(0))
	// Everything a screen reader reads out politely when it changes.
	const spoken = `Array.from(document.querySelectorAll("[aria-live=polite], [aria-live=assertive]")).filter(e => e.closest("form.answer-form") === null).map(e => e.textContent.replace(/\s+/g, " ").trim()).join(" | ")`
	if n := carmen.count(`#preview[aria-live], #preview [aria-live]`); n != 0 {
		t.Errorf("the preview holds %d live regions: each update is read out whole", n)
	}
	typeValues(carmen, "0.03", "0.07", "0.16")
	carmen.waitFor("the fit", `document.querySelectorAll("#preview svg.chart-wide circle.stated").length === 3 && !document.querySelector("#preview[aria-busy=true]")`)
	said := eval[string](carmen, "what is said", spoken)
	if !strings.Contains(said, "Taken together") || !strings.Contains(said, "Beta(α = ") {
		t.Errorf("the fit is not announced in brief; the live regions hold %q", clip(said, 600))
	}
	if len(said) > 600 {
		t.Errorf("the live regions hold %d characters after a fit: %q", len(said), clip(said, 800))
	}
	// Values that stop the fit: what stops it is said.
	typeValues(carmen, "0.03", "0.2", "0.16")
	carmen.waitFor("the problem", `!!document.querySelector("#preview .preview-problem") && !document.querySelector("#preview[aria-busy=true]")`)
	problem := eval[string](carmen, "the problem", `document.querySelector("#preview .preview-problem").textContent.trim()`)
	if said := eval[string](carmen, "what is said", spoken); !strings.Contains(said, problem) {
		t.Errorf("the preview shows %q, the live regions say %q", problem, clip(said, 600))
	}
}

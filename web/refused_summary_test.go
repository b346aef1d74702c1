package web

import (
	"net/url"
	"strings"
	"testing"
)

// TestChipsRefusedAsAWholeMarkNoField: chips in two bins were refused
// with "Put chips in at least three bins…", and under it "Nothing was
// saved. Correct the marked fields and send again." No field was
// marked: the expert, and a screen reader, looked for one in vain. The
// summary points to the message above it when no field is marked, and
// keeps its words when one is.
func TestChipsRefusedAsAWholeMarkNoField(t *testing.T) {
	g := newExpertRig(t)
	_, body := g.post(g.qpath(0, g.qc)+"/save", url.Values{"counts[1]": {"8"}, "counts[2]": {"7"}})
	if !strings.Contains(body, "Put chips in at least three bins") {
		t.Fatalf("the spread rule is not said:\n%s", shownError(body, "f-counts-1"))
	}
	if strings.Contains(body, "Correct the marked fields") {
		t.Error("chips refused as a whole send the expert to marked fields, and none is marked")
	}
	if !strings.Contains(body, nothingSavedAsSaid) {
		t.Errorf("chips refused as a whole do not say %q", nothingSavedAsSaid)
	}
	// A field marked: the summary names the marked fields.
	_, body = g.post(g.qpath(0, g.qc)+"/save", url.Values{"counts[1]": {"8"}, "counts[2]": {"x"}, "counts[3]": {"5"}})
	if !strings.Contains(body, nothingSavedSummary) {
		t.Errorf("a marked chips box is not summed up as %q", nothingSavedSummary)
	}
}

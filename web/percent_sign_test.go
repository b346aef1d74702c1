package web

import (
	"context"
	"net/http"
	"net/url"
	"regexp"
	"strings"
	"testing"
)

// shownBox is what a box reads on the page: its value, and the sign
// beside it when there is one ("9 %").
func shownBox(t *testing.T, body, id string) string {
	t.Helper()
	m := regexp.MustCompile(`<input[^>]*id="` + regexp.QuoteMeta(id) + `"[^>]*value="([^"]*)"[^>]*>\s*(?:<span class="input-suffix"(?: data-unit-suffix)?( hidden)?>([^<]*)</span>)?`).FindStringSubmatch(body)
	if m == nil {
		t.Fatalf("no box %s on the page", id)
	}
	if m[2] != "" { // a sign the page hides until the unit choice shows it
		return strings.TrimSpace(m[1])
	}
	return strings.TrimSpace(m[1] + " " + m[3])
}

// A value typed with its own % sign under the percentage choice is shown
// back beside the box's "%" once, not as "9% %", and means what it meant:
// after a refused save, after a preview without script, after a save, and
// when a final answer is shown again. The confidence box, whose "%" stands
// beside it in every unit, does the same, except for a confidence of 1% or
// less, which without its sign would be refused as a likely 80%: it keeps
// its own sign and the box shows none beside it.
func TestTypedPercentSignShownOnce(t *testing.T) {
	g := newExpertRig(t)
	pct := func(vals ...string) url.Values {
		f := quantiles(vals...)
		f.Set("unit", "percent")
		return f
	}
	// Refused: the values do not increase.
	_, body := g.post(g.qpath(0, g.q)+"/save", pct("9%", "5%", " 20 % "))
	for id, want := range map[string]string{"f-values-0": "9 %", "f-values-1": "5 %", "f-values-2": "20 %"} {
		if got := shownBox(t, body, id); got != want {
			t.Errorf("after a refused save %s reads %q, want %q", id, got, want)
		}
	}
	// The same values sent again from the page mean what they meant.
	_, body = g.post(g.qpath(0, g.q)+"/preview", pct(shownValue(body, "f-values-0"), "15", "20"))
	if !strings.Contains(body, "Read as 0.09 (9%)") {
		t.Errorf("9 sent back under the percentage choice is not read as 9%%")
	}
	// A preview without script draws the form again.
	_, body = g.post(g.qpath(0, g.q)+"/preview", pct("9%", "15%", "30%"))
	if got := shownBox(t, body, "f-values-0"); got != "9 %" {
		t.Errorf("after a preview f-values-0 reads %q, want \"9 %%\"", got)
	}
	// Saved, then shown again.
	if r, _ := g.post(g.qpath(0, g.q)+"/save", pct("9%", "15%", "30%")); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("save: %d", r.StatusCode)
	}
	_, body = g.get(g.qpath(0, g.q))
	if got := shownBox(t, body, "f-values-0"); got != "9 %" {
		t.Errorf("after a save f-values-0 reads %q, want \"9 %%\"", got)
	}
	// The confidence.
	interval := func(conf string) url.Values {
		return url.Values{"lowest": {"0.5"}, "highest": {"0.1"}, "best": {"0.2"}, "confidence": {conf}}
	}
	_, body = g.post(g.qpath(0, g.qi)+"/save", interval("80%"))
	if got := shownBox(t, body, "f-confidence"); got != "80 %" {
		t.Errorf("a confidence typed 80%% reads %q, want \"80 %%\"", got)
	}
	_, body = g.post(g.qpath(0, g.qi)+"/save", interval("0.8%"))
	if got := shownBox(t, body, "f-confidence"); got != "0.8%" {
		t.Errorf("a confidence typed 0.8%% reads %q, want \"0.8%%\" with no sign beside it", got)
	}
	// A final answer shown again.
	if r, _ := g.post(g.qpath(0, g.qcal)+"/save", pct("9%", "15%", "30%")); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("save: %d", r.StatusCode)
	}
	if err := g.db.SetTrueValue(context.Background(), g.qcal.ID, hiddenTruth, true, "shown (invented)"); err != nil {
		t.Fatal(err)
	}
	_, body = g.get(g.qpath(0, g.qcal))
	if got := shownBox(t, body, "f-values-0"); got != "9 %" {
		t.Errorf("a final answer's f-values-0 reads %q, want \"9 %%\"", got)
	}
}

// A confidence of 1% or less typed with a decimal comma, "0,8%", keeps
// its own sign as "0.8%" does: shown back as "0,8" beside the box's "%",
// it was sent again as 0,8, read as 0.8 and refused as a likely 80%.
func TestTypedPercentSignKeptOnASmallConfidenceWithAComma(t *testing.T) {
	g := newExpertRig(t)
	interval := url.Values{"lowest": {"0.5"}, "highest": {"0.1"}, "best": {"0.2"}, "confidence": {"0,8%"}}
	_, body := g.post(g.qpath(0, g.qi)+"/save", interval)
	if got := shownBox(t, body, "f-confidence"); got != "0,8%" {
		t.Errorf("a confidence typed 0,8%% reads %q, want \"0,8%%\" with no sign beside it", got)
	}
	_, body = g.post(g.qpath(0, g.qi)+"/save", url.Values{"lowest": {"0.5"}, "highest": {"0.1"}, "best": {"0.2"}, "confidence": {"80,5%"}})
	if got := shownBox(t, body, "f-confidence"); got != "80,5 %" {
		t.Errorf("a confidence typed 80,5%% reads %q, want \"80,5 %%\"", got)
	}
}

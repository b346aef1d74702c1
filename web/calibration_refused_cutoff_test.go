package web

import (
	"context"
	"math"
	"net/http"
	"net/url"
	"regexp"
	"strings"
	"testing"
)

// A cut-off the page refuses (above every expert's calibration score, or
// not a number) gives no performance weights, so the target questions'
// comparison has no performance pool to show. It said "every expert who
// answered this question has performance weight 0", which is not so: no
// weights were formed at all.
func TestRefusedCutOffMakesNoClaimAboutThePerformancePool(t *testing.T) {
	p := newSeedPanel(t)
	p.enterTruths(t, false)
	for _, a := range []string{"0.99", "50%"} {
		res, body := p.h.get(p.path() + "?alpha=" + url.QueryEscape(a))
		if res.StatusCode != http.StatusBadRequest {
			t.Fatalf("alpha %s: %d, want 400", a, res.StatusCode)
		}
		if strings.Contains(body, "has performance weight 0") {
			t.Errorf("alpha %s: the comparison says every expert has performance weight 0, though no weights were formed", a)
		}
		if !strings.Contains(body, noPerformancePool) {
			t.Errorf("alpha %s: the comparison does not say why it has no performance pool", a)
		}
		if got := strings.Count(body, noPerformancePool); got != len(p.targets) {
			t.Errorf("alpha %s: %d rows say why, want one per target question (%d)", a, got, len(p.targets))
		}
	}
	// With the cut-off accepted the performance pools are shown.
	_, body := p.h.get(p.path())
	if strings.Contains(body, noPerformancePool) {
		t.Error("the performance pools are missing with the cut-off optimised")
	}
}

// A cut-off above every expert's calibration score is the cut-off's
// fault, refused beside its field; the page said "The classical model
// could not score the panel: must not exceed …", as if the panel were.
func TestCutOffAboveEveryScoreIsTheCutOffsRefusal(t *testing.T) {
	p := newSeedPanel(t)
	p.enterTruths(t, false)
	res, body := p.h.get(p.path() + "?alpha=0.99")
	if res.StatusCode != http.StatusBadRequest || !hasFieldError(body, "alpha") {
		t.Fatalf("alpha 0.99: %d, field error %v", res.StatusCode, hasFieldError(body, "alpha"))
	}
	if strings.Contains(body, "could not score the panel") {
		t.Error("a cut-off above every score is said to be the panel's failure")
	}
	if !strings.Contains(body, "No scores with the cut-off typed below") {
		t.Error("the page does not say the scores wait on the cut-off")
	}
}

// A fixed cut-off is written as typed, in plain decimals; a tiny one
// typed as 1e-320 was written with 320 zeros, one unbroken line that ran
// off a phone's screen and a projector's.
func TestTinyFixedCutOffIsWrittenShort(t *testing.T) {
	p := newSeedPanel(t)
	p.enterTruths(t, false)
	res, body := p.h.get(p.path() + "?alpha=1e-320")
	if res.StatusCode != http.StatusOK {
		t.Fatalf("alpha 1e-320: %d", res.StatusCode)
	}
	if strings.Contains(body, strings.Repeat("0", 40)) {
		t.Error("the cut-off 1e-320 is written with hundreds of zeros")
	}
	if !strings.Contains(body, "Cut-off α = 1e-320, fixed by the facilitator") {
		t.Error("the cut-off 1e-320 is not written as 1e-320")
	}
	// An ordinary cut-off keeps its plain decimals, as typed.
	if _, body := p.h.get(p.path() + "?alpha=0.00005"); !strings.Contains(body, "Cut-off α = 0.00005, fixed by the facilitator") {
		t.Error("the cut-off 0.00005 is not written as typed")
	}
}

// A cut-off typed as -0 is the cut-off 0 and is written so: the sentence
// said "Cut-off α = -0".
func TestNegativeZeroCutOffIsWrittenZero(t *testing.T) {
	p := newSeedPanel(t)
	p.enterTruths(t, false)
	_, body := p.h.get(p.path() + "?alpha=-0")
	if strings.Contains(body, "α = -0") || !strings.Contains(body, "Cut-off α = 0, fixed by the facilitator") {
		t.Error("the cut-off -0 is not written as 0")
	}
}

// Performance weights set with the cut-off typed as -0 store the cut-off
// 0: the record's JSON said "alpha": -0.
func TestNegativeZeroCutOffIsStoredZero(t *testing.T) {
	p := newSeedPanel(t)
	p.enterTruths(t, false)
	res, _ := p.h.post(p.path()+"/weights", url.Values{"scheme": {"performance"}, "alpha": {"-0"}, "reason": {"everyone counts (invented)"}})
	if res.StatusCode != http.StatusSeeOther {
		t.Fatalf("weights with the cut-off -0: %d", res.StatusCode)
	}
	wt, err := p.h.db.Weights(context.Background(), p.ws.ID)
	if err != nil || wt.Basis == nil {
		t.Fatalf("stored %+v, %v", wt, err)
	}
	if math.Signbit(wt.Basis.Alpha) {
		t.Errorf("the stored cut-off is %v", wt.Basis.Alpha)
	}
}

// Without scores (a cut-off refused) the page has no robustness section,
// and its contents list no longer links one: the link led nowhere.
func TestContentsLinkOnlySectionsOnThePage(t *testing.T) {
	p := newSeedPanel(t)
	p.enterTruths(t, false)
	for _, q := range []string{"", "?alpha=0.99"} {
		_, body := p.h.get(p.path() + q)
		nav := body[strings.Index(body, `class="page-contents`):]
		nav = nav[:strings.Index(nav, "</nav>")]
		for _, m := range regexp.MustCompile(`href="#([a-z-]+)"`).FindAllStringSubmatch(nav, -1) {
			if !strings.Contains(body, `id="`+m[1]+`"`) {
				t.Errorf("alpha %q: the contents link #%s, which is not on the page", q, m[1])
			}
		}
	}
}

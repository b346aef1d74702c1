package e2e

import (
	"context"
	"fmt"
	"strconv"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// TestNoAxeViolationOfAnyImpact runs axe-core on the pages an expert and
// the facilitator use, at 390 and 1366 px, and fails on every violation,
// minor and moderate ones too (TestEveryPageOnAPhone fails on serious and
// critical ones). At 1366 px four tables had a column header with no
// text (the overview's questions, the panel's pool, the facilitator's
// page of one expert, the quick priors' comparison): a screen reader
// read the links and the rows' names under a header that said nothing.
func TestNoAxeViolationOfAnyImpact(t *testing.T) {
	g := newDeviceRig(t)
	axe := axeSource(t)
	br := startBrowserFor(t, 3*browserTimeout)
	fac := br.person("facilitator")
	signIn(t, g.site, fac)
	carmen := br.person("Carmen (expert)")
	link := g.carmensLink()
	q := func(i int) string { return strconv.FormatInt(g.qs[i].ID, 10) }
	noViolation := func(p *person, where string) {
		t.Helper()
		if !eval[bool](p, "axe present", `typeof window.axe === "object"`) {
			evalWithin[bool](p, "inject axe", axe+";true", axeTimeout)
		}
		found := evalWithin[[]string](p, "run axe", `axe.run(document, {resultTypes: ["violations"]}).then(r => r.violations
			.map(v => v.impact + " " + v.id + ": " + v.help + " — " + v.nodes.slice(0, 4).map(n => n.target.join(" ")).join(" | ")))`, axeTimeout)
		for _, f := range found {
			t.Errorf("%s: %s", where, f)
		}
	}
	// An agreed prior on Q1, for the room view's prior display.
	in := elicit.ConstructionInput{Method: elicit.MethodEquivalentSample, Successes: 2, Trials: 30, Upper: 1}
	made, err := elicit.Construct(in)
	if err != nil {
		t.Fatal(err)
	}
	if err := g.site.DB.AgreePrior(context.Background(), &workshop.AgreedPrior{QuestionID: g.qs[0].ID, Source: workshop.PriorFromConstruction,
		Dist: made.Dist, Construction: &in, Rationale: "Two bursts in thirty mains (invented).", RoundOpen: true}); err != nil {
		t.Fatal(err)
	}
	facPages := map[string]string{
		"workshops":    g.site.URL + "/",
		"overview":     g.wsURL(),
		"panel Q1":     g.wsURL() + "/q/" + q(0),
		"panel chips":  g.wsURL() + "/q/" + q(2),
		"room view":    g.wsURL() + "/q/" + q(0) + "/room",
		"room prior":   g.wsURL() + "/q/" + q(0) + "/room?show=prior",
		"calibration":  g.wsURL() + "/calibration",
		"log":          g.wsURL() + "/log",
		"report":       g.wsURL() + "/report",
		"new question": g.wsURL() + "/questions/new",
		"correct Q2":   g.wsURL() + "/q/" + q(1) + "/edit",
		"entry":        g.wsURL() + "/q/" + q(0) + "/enter/" + strconv.FormatInt(g.experts[2].ID, 10),
		"sheet":        g.wsURL() + "/answers/import",
		"expert view":  g.wsURL() + "/experts/" + strconv.FormatInt(g.experts[0].ID, 10),
		"study Q1":     g.wsURL() + "/q/" + q(0) + "/study",
		"quick priors": g.wsURL() + "/quick-priors?construction=interval&c_low=1&c_high=8&c_coverage=0.9&question=" + q(3),
	}
	for _, w := range []int64{390, 1366} {
		fac.viewport(w, 844, w < 600)
		carmen.viewport(w, 844, w < 600)
		for name, u := range facPages {
			fac.open(u)
			noViolation(fac, fmt.Sprintf("facilitator %s at %d px", name, w))
		}
		carmen.open(link)
		noViolation(carmen, fmt.Sprintf("expert home at %d px", w))
		for i := range g.qs {
			carmen.open(link + "q/" + q(i))
			noViolation(carmen, fmt.Sprintf("expert Q%d (%s) at %d px", i+1, g.qs[i].Format, w))
		}
	}
}

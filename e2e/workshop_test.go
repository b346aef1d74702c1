package e2e

import (
	"context"
	"encoding/json"
	"fmt"
	"math"
	"net/http"
	"regexp"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// The whole workshop as the people in the room do it, in a real browser.
// The scenario is invented: a panel judging the proportion of pumps of an
// invented model that fail in their first year, and the proportion of
// invented field sites where a repair holds for six months.
func TestWorkshopInBrowser(t *testing.T) {
	site := startSite(t)
	b := startBrowser(t)
	shots := newScreenshots(t)

	fac := b.person("facilitator")
	signIn(t, site, fac)

	wsURL := createWorkshop(t, site, fac)
	addQuestion(t, fac, wsURL, question{
		wording:  "Of the pumps of model K-7 installed this year, what proportion will fail within their first year? (invented scenario)",
		quantity: "first-year failure proportion",
		units:    "proportion of pumps",
		preset:   "p05_50_95",
	})
	addQuestion(t, fac, wsURL, question{
		wording:  "At the invented field sites, what proportion of seal repairs will still hold after six months?",
		quantity: "six-month repair survival",
		units:    "proportion of repairs",
		preset:   "quartiles",
	})
	fac.sees("overview with questions", "first-year failure proportion", "quantiles at 5%, 50%, 95%",
		"six-month repair survival", "quantiles at 25%, 50%, 75%")

	linkA := addExpert(t, fac, wsURL, "Ada Invented", "Invented Pumps Ltd")
	linkB := addExpert(t, fac, wsURL, "Bo Example", "Example Field Services")
	if linkA == linkB {
		t.Fatalf("both experts got the same private link %s", linkA)
	}
	fac.open(wsURL)
	fac.sees("roster", "Ada Invented", "Bo Example", "0 of 2")
	shots.take(fac, "01-facilitator-workshop")

	// The experts, each on their own device.
	ada, bo := b.person("Ada"), b.person("Bo")
	ada.open(site.URL + "/")
	ada.sees("a facilitator page in an expert's browser", "Facilitator sign-in")

	ada.open(linkA)
	ada.sees("expert home", "Ada Invented", "Pump reliability panel (invented)", "Round 1 is open",
		"first-year failure proportion", "six-month repair survival", "not answered yet")
	notShown(t, ada, "expert home", "Bo Example", "Start with the failure question.")

	openQuestion(t, ada, linkA, 1)
	ada.sees("expert question", "Of the pumps of model K-7", "The value with a 5% chance of being lower", "Show the fit")
	if n := ada.count(previewCircles); n != 0 {
		t.Errorf("Ada: %d stated points drawn before any value was typed", n)
	}
	typeValues(ada, "0.02", "0.05", "0.12")
	first := livePreview(t, ada, 3, nil, "above 0.12")
	risingLeftToRight(t, ada, first)
	ada.sees("fit preview", "What your numbers imply", "1 in 20 chance the value is below 0.02", "above 0.12")
	ada.fill(`form.answer-form`, "values[2]", "0.2")
	second := livePreview(t, ada, 3, first, "above 0.2")
	ada.sees("fit preview after a change", "above 0.2")
	if second[2] == first[2] {
		t.Errorf("Ada: the 95%% point did not move when its value went from 0.12 to 0.2: %v then %v", first, second)
	}
	saveAnswer(t, ada)
	if n := ada.count(previewCircles); n != 3 {
		t.Errorf("Ada: the saved page draws %d stated points, want 3", n)
	}
	ada.sees("history after saving", "Your history on this question", "0.02")
	shots.take(ada, "03-expert-question-fit")
	oneLineTimes(t, ada, "the expert's history", true)

	// Question 2 by the "Show the fit" button, which draws the fit in
	// place (without scripts it posts the form: TestShowTheFitStaysOnThePage).
	openQuestion(t, ada, linkA, 2)
	typeValues(ada, "0.5", "0.65", "0.75")
	ada.do("show the fit", chromedp.Click(chromedp.CSS(`form.answer-form button:not([formaction])`)))
	ada.waitFor("the fit shown", fmt.Sprintf(`document.querySelectorAll(%q).length === 3 && document.getElementById("preview").innerText.includes("above 0.75")`, previewCircles))
	if v := ada.value(`[name="values[1]"]`); v != "0.65" {
		t.Errorf("Ada: after Show the fit the median field holds %q, want the typed 0.65", v)
	}
	saveAnswer(t, ada)

	// Bo types a judgement whose values go down: refused beside the field.
	openQuestion(t, bo, linkB, 1)
	typeValues(bo, "0.3", "0.2", "0.1")
	bo.waitFor("the live preview's problem", `!!document.querySelector("#preview .preview-problem")`)
	if n := bo.count(previewCircles); n != 0 {
		t.Errorf("Bo: a decreasing judgement still draws %d points", n)
	}
	if st := bo.load("save a decreasing judgement", chromedp.Click(chromedp.CSS(`form.answer-form button[formaction$="/save"]`))); st != http.StatusUnprocessableEntity {
		t.Errorf("Bo: saving decreasing values: status %d, want 422", st)
	}
	bo.sees("refused judgement", "Nothing was saved")
	msg := eval[string](bo, "the message beside the field", `(() => {
		const e = document.querySelector(".field-invalid .field-error");
		return e ? e.closest(".field").querySelector("label").innerText + " | " + e.innerText : "";
	})()`)
	if msg == "" {
		t.Errorf("Bo: no message beside a field after a decreasing judgement:\n%s", clip(bo.text(), 2000))
	} else {
		t.Logf("Bo sees beside the field: %s", msg)
	}
	if v := bo.value(`[name="values[0]"]`); v != "0.3" {
		t.Errorf("Bo: the refused form lost the typed value: %q", v)
	}
	shots.take(bo, "04-expert-invalid-judgement")
	if n := revisionsOf(t, site, bo.name, 0); n != 0 {
		t.Fatalf("a refused judgement was saved (%d revisions)", n)
	}
	typeValues(bo, "0.03", "0.08", "0.25")
	livePreview(t, bo, 3, nil, "above 0.25")
	saveAnswer(t, bo)
	// Question 2 by keyboard alone: Tab from field to field, Enter shows
	// the fit.
	openQuestion(t, bo, linkB, 2)
	bo.do("focus the first value", chromedp.Focus(chromedp.CSS(`[name="values[0]"]`)))
	bo.do("type by keyboard", chromedp.KeyEvent("0.6\t"), chromedp.KeyEvent("0.7\t"), chromedp.KeyEvent("0.8"))
	if v := bo.value(`[name="values[2]"]`); v != "0.8" {
		t.Errorf("Bo: Tab did not lead from the first value to the third: the 75%% field holds %q", v)
	}
	bo.do("press Enter", chromedp.KeyEvent("\r"))
	bo.waitFor("the fit after Enter", fmt.Sprintf(`document.querySelectorAll(%q).length === 3`, previewCircles))
	if n := revisionsOf(t, site, bo.name, 1); n != 0 {
		t.Errorf("Enter in the form saved the answer (%d revisions); it should only show the fit", n)
	}
	saveAnswer(t, bo)

	// Phone width: the expert's page fits a 390-pixel screen.
	bo.viewport(phoneWidth, phoneHeight, true)
	openQuestion(t, bo, linkB, 1)
	if w := eval[int](bo, "page width", `document.documentElement.scrollWidth`); w > phoneWidth {
		wide := eval[string](bo, "what is too wide", fmt.Sprintf(`Array.from(document.querySelectorAll("body *")).filter(e => e.getBoundingClientRect().right > %d).slice(0, 5).map(e => e.tagName.toLowerCase() + (e.className && e.className.baseVal === undefined ? "." + e.className : "") + (e.closest("section") ? " in section." + e.closest("section").className : "") + " right=" + Math.round(e.getBoundingClientRect().right)).join("; ")`, phoneWidth))
		t.Errorf("Bo's question page is %d px wide on a %d px phone: it scrolls sideways (widest: %s)", w, phoneWidth, wide)
	}
	shots.take(bo, "05-expert-question-phone")
	bo.viewport(desktopWidth, desktopHeight, false)

	// Round 1 closes; saving stops; round 2 opens with a reason.
	fac.open(wsURL)
	fac.sees("who answered", "2 of 2", "answered (1 save)")
	fac.load("close round 1", chromedp.Click(chromedp.CSS(`#rounds button[type=submit]`)))
	fac.sees("closed round", "Round 1 (closed)", "Open round 2")
	openQuestion(t, ada, linkA, 1)
	ada.sees("closed round", "Round 1 is closed", "Saving is closed for this round")
	if n := ada.count(`button[formaction$="/save"]`); n != 0 {
		t.Errorf("Ada can still press save in a closed round")
	}
	// The closed button does not look like the dark one that saves.
	if bg := eval[string](ada, "the closed button's colour", `(() => {
		const b = [...document.querySelectorAll("form.answer-form button.button[disabled]")].find(b => b.textContent.includes("Saving is closed"));
		return b ? getComputedStyle(b).backgroundColor : "none";
	})()`); !strings.HasPrefix(bg, "rgb(230, 227, 220") {
		t.Errorf("the closed round's save button has background %q, want the pale disabled one", bg)
	}
	if st := fac.load("open round 2 without a reason", chromedp.Click(chromedp.CSS(`#rounds button[type=submit]`))); st != http.StatusUnprocessableEntity {
		t.Errorf("opening a round without a reason: status %d, want 422", st)
	}
	fac.sees("round refused", "is required", "Round 1 (closed)")
	fac.fill(`#rounds form`, "reason", "The panel discussed the spread of the 95% values.")
	fac.load("open round 2", chromedp.Click(chromedp.CSS(`#rounds button[type=submit]`)))
	fac.sees("round 2", "Round 2 (open)", "Who has answered what in round 2")
	shots.take(fac, "08-facilitator-workshop-round2")

	// Ada revises. One other expert (Bo) answered, so her page shows no
	// other answer, which would be his under a letter, and says why.
	openQuestion(t, ada, linkA, 1)
	ada.sees("round 2 feedback", "Round 2 is open", "What the other experts said",
		"Only one other expert had answered this question when round 1 closed.", "so that no expert's answer is shown on its own")
	if n := ada.count(`.panel-feedback svg`); n != 0 {
		t.Errorf("Ada: %d panel pictures in round 2 with one other answer, want none", n)
	}
	notShown(t, ada, "round 2 feedback", "Bo Example", "Example Field Services")
	shots.take(ada, "06-expert-round2-panel")
	before := ada.circles(previewCircles)
	ada.fill(`form.answer-form`, "values[2]", "0.15")
	livePreview(t, ada, 3, before, "above 0.15")
	ada.fill(`form.answer-form`, "reason", "After the discussion I expect fewer late failures.")
	saveAnswer(t, ada)
	ada.sees("history", "After the discussion I expect fewer late failures.")

	// The facilitator's question panel: both experts by name, the pool.
	fac.open(wsURL)
	fac.load("open question 1's panel", chromedp.Click(chromedp.CSS(`#questions tbody tr:nth-child(1) a[href*="/q/"]`)))
	fac.sees("question panel", "first-year failure proportion", "Ada Invented", "Bo Example",
		"Linear opinion pool", "Equal-weight pool", "Best single Beta", "After the discussion I expect fewer late failures.")
	if n := fac.count(`#chart svg`); n < 1 {
		t.Errorf("facilitator: no overlaid picture on the question panel")
	}
	shots.take(fac, "02-facilitator-question-panel")

	// Agreeing without a rationale is refused and saves nothing.
	agree := `form[action$="/agree"]`
	fac.do("choose the pool's Beta", chromedp.Click(chromedp.CSS(agree+` input[name=source][value=pool]`)))
	if st := fac.load("agree without a rationale", chromedp.Click(chromedp.CSS(agree+` button[type=submit]`))); st != http.StatusUnprocessableEntity {
		t.Errorf("agreeing without a rationale: status %d, want 422", st)
	}
	fac.sees("agreement refused", "Rationale (required)", "is required")
	if ps := agreedPriors(t, site); len(ps) != 0 {
		t.Fatalf("a refused agreement was saved: %+v", ps)
	}
	rationale := "The panel accepts the pool: the two experts' medians differ, and the pool keeps both views (invented)."
	fac.do("choose the pool's Beta", chromedp.Click(chromedp.CSS(agree+` input[name=source][value=pool]`)))
	fac.fill(agree, "rationale", rationale)
	// Round 2 is still open: the prior is refused until the facilitator
	// confirms it, and then the record says so.
	if st := fac.load("agree while the round is open", chromedp.Click(chromedp.CSS(agree+` button[type=submit]`))); st != http.StatusUnprocessableEntity {
		t.Errorf("agreeing while the round is open, unconfirmed: status %d, want 422", st)
	}
	fac.sees("open-round confirmation", "Round 2 is still open, so experts can still change their answers")
	if ps := agreedPriors(t, site); len(ps) != 0 {
		t.Fatalf("an unconfirmed agreement was saved: %+v", ps)
	}
	fac.do("confirm the open round", chromedp.Click(chromedp.CSS(agree+` input[name=confirm_open]`)))
	if st := fac.load("record the agreed prior", chromedp.Click(chromedp.CSS(agree+` button[type=submit]`))); st != http.StatusOK {
		t.Fatalf("record the agreed prior: status %d\n%s", st, clip(fac.text(), 2000))
	}
	fac.sees("agreed prior", "Rationale: "+rationale, "single Beta representing the equal-weight pool", "agreed in round 2",
		"Agreed while round 2 was still open")
	if ps := agreedPriors(t, site); len(ps) != 1 || !ps[0].RoundOpen {
		t.Fatalf("the prior agreed while the round was open is not marked so: %+v", ps)
	}

	// Question 2: the panel agrees a consensus judgement in discussion.
	// Values that go down are refused beside the field, nothing saved.
	fac.open(wsURL)
	fac.load("open question 2's panel", chromedp.Click(chromedp.CSS(`#questions tbody tr:nth-child(2) a[href*="/q/"]`)))
	fac.sees("question 2 panel", "six-month repair survival", "No prior has been agreed for this question yet.")
	consensus := func(values ...string) {
		for i, v := range values {
			fac.fill(agree, fmt.Sprintf("values[%d]", i), v)
		}
	}
	fac.do("choose the consensus", chromedp.Click(chromedp.CSS(agree+` input[name=source][value=consensus]`)))
	consensus("0.7", "0.6", "0.8")
	fac.fill(agree, "rationale", "The group agreed these quartiles after the discussion (invented).")
	if st := fac.load("agree a decreasing consensus", chromedp.Click(chromedp.CSS(agree+` button[type=submit]`))); st != http.StatusUnprocessableEntity {
		t.Errorf("a decreasing consensus judgement: status %d, want 422", st)
	}
	if msg := eval[string](fac, "the consensus message", `(document.querySelector('form[action$="/agree"] .field-invalid .field-error') || {innerText: ""}).innerText`); !strings.Contains(msg, "Must be larger than") {
		t.Errorf("no message beside the consensus field that breaks the rule; got %q", msg)
	}
	if v := fac.value(agree + ` [name="values[0]"]`); v != "0.7" {
		t.Errorf("the refused consensus lost its typed value: %q", v)
	}
	if n := len(agreedPriors(t, site)); n != 1 {
		t.Fatalf("after a refused consensus there are %d agreed priors, want the 1 of question 1", n)
	}
	fac.do("choose the consensus", chromedp.Click(chromedp.CSS(agree+` input[name=source][value=consensus]`)))
	consensus("0.55", "0.68", "0.78")
	fac.fill(agree, "rationale", "The group agreed these quartiles after the discussion (invented).")
	fac.do("confirm the open round", chromedp.Click(chromedp.CSS(agree+` input[name=confirm_open]`)))
	if st := fac.load("agree the consensus", chromedp.Click(chromedp.CSS(agree+` button[type=submit]`))); st != http.StatusOK {
		t.Fatalf("agree the consensus: status %d\n%s", st, clip(fac.text(), 2000))
	}
	fac.sees("consensus agreed", "Beta fitted to the panel's consensus judgement", "The group agreed these quartiles")

	// The printable report, and the export linked from it, downloaded
	// with the facilitator's own session.
	fac.open(wsURL + "report")
	fac.sees("report", "Pump reliability panel (invented)", rationale, "Ada Invented", "Bo Example",
		"After the discussion I expect fewer late failures.", "documented judgement")
	shots.take(fac, "07-report")
	exportURL := eval[string](fac, "the JSON link", `(Array.from(document.querySelectorAll("a")).find(a => /JSON/.test(a.innerText)) || {href: ""}).href`)
	if exportURL == "" {
		t.Fatalf("the report has no link to the JSON record")
	}
	raw := eval[string](fac, "download the JSON export", fmt.Sprintf(`fetch(%q, {credentials: "same-origin"}).then(r => r.ok ? r.text() : Promise.reject(new Error("status " + r.status)))`, exportURL))
	checkExport(t, site, []byte(raw), rationale, map[string][]float64{
		"Ada Invented/0": {0.02, 0.05, 0.15},
		"Bo Example/0":   {0.03, 0.08, 0.25},
		"Ada Invented/1": {0.5, 0.65, 0.75},
		"Bo Example/1":   {0.6, 0.7, 0.8},
	})
	// An expert's browser cannot fetch it.
	leak := eval[string](ada, "fetch the export as an expert", fmt.Sprintf(`fetch(%q).then(r => r.text())`, exportURL))
	if strings.HasPrefix(strings.TrimSpace(leak), "{") {
		t.Errorf("an expert's browser downloaded the facilitator's export")
	}
	// The decision log says what the facilitator decided, and why.
	fac.open(wsURL + "log")
	fac.sees("decision log", "The panel discussed the spread of the 95% values.", rationale,
		"The group agreed these quartiles after the discussion (invented).")
	shots.take(fac, "09-decision-log")
	oneLineTimes(t, fac, "the decision log", true)
	fac.open(wsURL + "report")
	fac.media("print")
	if fac.visible(`form`) || fac.visible(`nav`) {
		t.Errorf("the printed report still shows the navigation or a form")
	}
	if !fac.visible(`svg`) {
		t.Errorf("the printed report has no picture")
	}
	fac.media("")
}

// agreedPriors reads every agreed prior of the workshop from the file.
func agreedPriors(t *testing.T, site *site) []workshop.AgreedPrior {
	t.Helper()
	ws, err := site.DB.Workshops(context.Background())
	if err != nil || len(ws) != 1 {
		t.Fatalf("workshops: %v, %v", ws, err)
	}
	ps, err := site.DB.AgreedPriors(context.Background(), ws[0].ID)
	if err != nil {
		t.Fatal(err)
	}
	return ps
}

// exported is the part of the JSON export the test checks, decoded by its
// wire names (not by elicit's own types, so a renamed field fails here).
type exported struct {
	Caution string `json:"caution"`
	Experts []struct {
		ID   int64  `json:"id"`
		Name string `json:"name"`
	} `json:"experts"`
	Questions []struct {
		ID          int64 `json:"id"`
		CurrentFits []struct {
			ExpertID int64 `json:"expert_id"`
			Round    int   `json:"round"`
			Fit      *struct {
				Dist   exportedBeta `json:"dist"`
				Stated []float64    `json:"stated"`
			} `json:"fit"`
		} `json:"current_fits"`
		Pool *struct {
			Mean     float64 `json:"mean"`
			SD       float64 `json:"sd"`
			BestBeta *struct {
				Dist exportedBeta `json:"dist"`
			} `json:"best_beta"`
		} `json:"pool"`
		AgreedPrior *exportedPrior `json:"agreed_prior"`
	} `json:"questions"`
	Revisions []json.RawMessage `json:"revisions"`
}

type exportedPrior struct {
	Source    string       `json:"source"`
	Dist      exportedBeta `json:"dist"`
	Consensus *struct {
		Values []float64 `json:"values"`
	} `json:"consensus"`
	Rationale string `json:"rationale"`
	Round     int    `json:"round"`
	Snippets  []struct {
		Code string `json:"code"`
	} `json:"snippets"`
}

type exportedBeta struct {
	Alpha float64 `json:"alpha"`
	Beta  float64 `json:"beta"`
	Lower float64 `json:"lower"`
	Upper float64 `json:"upper"`
}

// checkExport compares the downloaded export with what elicit computes
// from the judgements stored in the database file, and the stored
// judgements with what the experts typed (typed["name/question index"]).
func checkExport(t *testing.T, site *site, raw []byte, rationale string, typed map[string][]float64) {
	t.Helper()
	var got exported
	if err := json.Unmarshal(raw, &got); err != nil {
		t.Fatalf("the JSON export does not parse: %v\n%s", err, clip(string(raw), 500))
	}
	ctx := context.Background()
	ws, err := site.DB.Workshops(ctx)
	if err != nil || len(ws) != 1 {
		t.Fatalf("workshops: %v, %v", ws, err)
	}
	qs, _ := site.DB.Questions(ctx, ws[0].ID)
	es, _ := site.DB.Experts(ctx, ws[0].ID)
	revs, err := site.DB.Revisions(ctx, ws[0].ID)
	if err != nil {
		t.Fatal(err)
	}
	if len(got.Revisions) != len(revs) || len(revs) != 5 {
		t.Errorf("export has %d revisions, the file %d; the scenario saved 5", len(got.Revisions), len(revs))
	}
	if !strings.Contains(got.Caution, "judgement") {
		t.Errorf("export caution: %q", got.Caution)
	}
	if len(got.Questions) != len(qs) || len(qs) != 2 {
		t.Fatalf("export has %d questions, the file %d", len(got.Questions), len(qs))
	}
	names := map[int64]string{}
	for _, e := range es {
		names[e.ID] = e.Name
	}
	for qi, q := range qs {
		gq := got.Questions[qi]
		if gq.ID != q.ID {
			t.Fatalf("export question %d has id %d, want %d", qi, gq.ID, q.ID)
		}
		// The current judgement is each expert's latest revision.
		latest := map[int64]workshop.Revision{}
		for _, r := range revs {
			if r.QuestionID == q.ID {
				latest[r.ExpertID] = r
			}
		}
		var dists []elicit.ScaledBeta
		for _, e := range es {
			r, ok := latest[e.ID]
			if !ok {
				t.Fatalf("no stored answer of %s to question %d", e.Name, qi+1)
			}
			key := fmt.Sprintf("%s/%d", e.Name, qi)
			if !floatsEqual(r.Answer.Values, typed[key]) {
				t.Errorf("stored values of %s: %v, typed %v", key, r.Answer.Values, typed[key])
			}
			want, err := q.Fit(r.Answer)
			if err != nil {
				t.Fatalf("elicit cannot fit the stored answer of %s: %v", key, err)
			}
			dists = append(dists, want.Dist)
			found := false
			for _, cf := range gq.CurrentFits {
				if cf.ExpertID != e.ID {
					continue
				}
				found = true
				if cf.Fit == nil {
					t.Errorf("export: no fit for %s", key)
					continue
				}
				near(t, key+" alpha", cf.Fit.Dist.Alpha, want.Dist.Alpha)
				near(t, key+" beta", cf.Fit.Dist.Beta, want.Dist.Beta.Beta)
				ref := rFits[key]
				nearRef(t, key+" alpha against R", cf.Fit.Dist.Alpha, ref[0], 1e-3)
				nearRef(t, key+" beta against R", cf.Fit.Dist.Beta, ref[1], 1e-3)
				if !floatsEqual(cf.Fit.Stated, typed[key]) {
					t.Errorf("export: stated values of %s: %v, typed %v", key, cf.Fit.Stated, typed[key])
				}
			}
			if !found {
				t.Errorf("export: no current fit for %s", key)
			}
		}
		// Equal weights: nobody set any in the scenario.
		pool, err := elicit.LinearPool(dists, nil)
		if err != nil {
			t.Fatalf("question %d: pool: %v", qi+1, err)
		}
		if gq.Pool == nil {
			t.Fatalf("export: no pool for question %d", qi+1)
		}
		near(t, fmt.Sprintf("Q%d pool mean", qi+1), gq.Pool.Mean, pool.Mean())
		near(t, fmt.Sprintf("Q%d pool sd", qi+1), gq.Pool.SD, pool.SD())
		nearRef(t, fmt.Sprintf("Q%d pool mean against R", qi+1), gq.Pool.Mean, rPoolMean[qi], 1e-4)
		// The pool mean of a linear pool is the weighted mean of the
		// components' means (definition of a mixture; common practice).
		mixMean := (dists[0].Mean() + dists[1].Mean()) / 2
		near(t, fmt.Sprintf("Q%d pool mean as the mean of the means", qi+1), gq.Pool.Mean, mixMean)
		if qi == 1 {
			checkConsensus(t, q, gq.AgreedPrior)
			continue
		}
		rep, err := pool.BestBeta()
		if err != nil {
			t.Fatalf("best single Beta of the pool: %v", err)
		}
		ap := gq.AgreedPrior
		if ap == nil {
			t.Fatalf("export: no agreed prior for question 1")
		}
		if ap.Source != string(workshop.PriorFromPool) || ap.Rationale != rationale || ap.Round != 2 {
			t.Errorf("export agreed prior: source %q, round %d, rationale %q", ap.Source, ap.Round, ap.Rationale)
		}
		near(t, "agreed alpha", ap.Dist.Alpha, rep.Dist.Alpha)
		near(t, "agreed beta", ap.Dist.Beta, rep.Dist.Beta.Beta)
		nearRef(t, "agreed alpha against R", ap.Dist.Alpha, rBestBeta[0], 1e-3)
		nearRef(t, "agreed beta against R", ap.Dist.Beta, rBestBeta[1], 1e-3)
		nearRef(t, "Q1 pool sd against R", gq.Pool.SD, rPoolSD, 1e-4)
		if ap.Dist.Lower != 0 || ap.Dist.Upper != 1 {
			t.Errorf("agreed prior bounds [%v, %v], want [0, 1]", ap.Dist.Lower, ap.Dist.Upper)
		}
		if len(ap.Snippets) == 0 || !strings.Contains(ap.Snippets[0].Code, "beta(") {
			t.Errorf("export: agreed prior snippets %+v", ap.Snippets)
		}
		t.Logf("agreed prior Beta(%.4g, %.4g) from a pool of Beta(%.4g, %.4g) and Beta(%.4g, %.4g)",
			ap.Dist.Alpha, ap.Dist.Beta, dists[0].Alpha, dists[0].Beta.Beta, dists[1].Alpha, dists[1].Beta.Beta)
	}
}

// checkConsensus checks question 2's agreed prior: the Beta elicit fits
// to the typed consensus quartiles, and R's.
func checkConsensus(t *testing.T, q workshop.Question, ap *exportedPrior) {
	t.Helper()
	if ap == nil {
		t.Fatalf("export: no agreed prior for question 2")
	}
	if ap.Source != string(workshop.PriorFromConsensus) || ap.Consensus == nil || !floatsEqual(ap.Consensus.Values, []float64{0.55, 0.68, 0.78}) {
		t.Fatalf("export: question 2's prior: source %q, consensus %+v", ap.Source, ap.Consensus)
	}
	want, err := q.Fit(workshop.Answer{Values: ap.Consensus.Values})
	if err != nil {
		t.Fatal(err)
	}
	near(t, "consensus alpha", ap.Dist.Alpha, want.Dist.Alpha)
	near(t, "consensus beta", ap.Dist.Beta, want.Dist.Beta.Beta)
	nearRef(t, "consensus alpha against R", ap.Dist.Alpha, rConsensus[0], 1e-3)
	nearRef(t, "consensus beta against R", ap.Dist.Beta, rConsensus[1], 1e-3)
}

// Reference values computed outside the project, in R 4.2.2 for this
// scenario: each fit by optim (Nelder–Mead from a grid of starts over the
// mean and α+β, then BFGS) over (log α, log β) minimising
// Σ (pbeta(xᵢ, α, β) − pᵢ)², the least-squares criterion of O'Hagan et
// al. 2006, §6.4; the pool mean as the mean of the two Beta means; the
// pool SD from the mixture's second moment; the best single Beta of
// question 1's pool by the same least squares at the pool's quantiles
// k/100, k = 1…99, found with uniroot on the mixture CDF.
var (
	rFits = map[string][2]float64{
		"Ada Invented/0": {4.082464871, 71.390988844}, // 5/50/95% at 0.02, 0.05, 0.15
		"Bo Example/0":   {3.640118001, 38.297653692}, // 5/50/95% at 0.03, 0.08, 0.25
		"Ada Invented/1": {4.350290072, 2.592772774},  // quartiles 0.5, 0.65, 0.75
		"Bo Example/1":   {6.634857992, 2.978119789},  // quartiles 0.6, 0.7, 0.8
	}
	rPoolMean = [2]float64{0.07044473991, 0.6583822105}
	rPoolSD   = 0.03905092981
	rBestBeta = [2]float64{3.179853931, 42.7035154}
	// question 2's consensus quartiles 0.55, 0.68, 0.78
	rConsensus = [2]float64{5.160231741, 2.644221762}
)

// nearRef compares got with an outside reference to a relative tolerance.
func nearRef(t *testing.T, what string, got, want, rel float64) {
	t.Helper()
	if math.IsNaN(got) || math.Abs(got-want) > rel*math.Abs(want) {
		t.Errorf("%s: got %.10g, reference %.10g (relative tolerance %g)", what, got, want, rel)
	}
}

// near compares exported numbers with elicit's to 1e-9 relative: the
// export writes float64 through encoding/json, which round-trips exactly,
// so anything looser would hide a different computation.
func near(t *testing.T, what string, got, want float64) {
	t.Helper()
	if math.IsNaN(got) || math.Abs(got-want) > 1e-9*math.Max(1, math.Abs(want)) {
		t.Errorf("%s: export %v, elicit %v", what, got, want)
	}
}

func floatsEqual(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

// risingLeftToRight checks that the stated points of increasing
// probabilities are drawn left to right and, on the CDF, bottom to top
// (SVG y grows downwards).
func risingLeftToRight(t *testing.T, p *person, pts []point) {
	t.Helper()
	for i := 1; i < len(pts); i++ {
		if !(pts[i].X > pts[i-1].X && pts[i].Y < pts[i-1].Y) {
			t.Errorf("%s: stated points are not drawn rising left to right: %v", p.name, pts)
			return
		}
	}
}

// notShown fails when any phrase is visible on the page.
func notShown(t *testing.T, p *person, where string, phrases ...string) {
	t.Helper()
	body := p.text()
	for _, s := range phrases {
		if strings.Contains(body, s) {
			t.Errorf("%s: %s: page shows %q, which this person must not see", p.name, where, s)
		}
	}
}

// revisionsOf counts the saved revisions of the expert named name on
// question index qi (0-based), read from the database file itself.
func revisionsOf(t *testing.T, site *site, name string, qi int) int {
	t.Helper()
	ctx := context.Background()
	ws, err := site.DB.Workshops(ctx)
	if err != nil || len(ws) != 1 {
		t.Fatalf("workshops: %v, %v", ws, err)
	}
	qs, err := site.DB.Questions(ctx, ws[0].ID)
	if err != nil || len(qs) <= qi {
		t.Fatalf("questions: %v, %v", qs, err)
	}
	es, err := site.DB.Experts(ctx, ws[0].ID)
	if err != nil {
		t.Fatal(err)
	}
	revs, err := site.DB.Revisions(ctx, ws[0].ID)
	if err != nil {
		t.Fatal(err)
	}
	n := 0
	for _, r := range revs {
		for _, e := range es {
			if e.ID == r.ExpertID && strings.HasPrefix(e.Name, name) && r.QuestionID == qs[qi].ID {
				n++
			}
		}
	}
	return n
}

// signIn opens the one-time address and expects the workshop list, with
// the secret gone from the address bar.
func signIn(t *testing.T, site *site, fac *person) {
	t.Helper()
	fac.open(site.SignIn)
	// signin.js moves the secret into the form and posts it; the server
	// answers with the workshop list.
	fac.do("wait for the workshop list after sign-in", chromedp.WaitVisible(chromedp.CSS(`form[action="/workshops"]`)))
	if u := fac.url(); strings.Contains(u, "#") || strings.Contains(u, "signin") {
		t.Errorf("after sign-in the address bar shows %q; want the workshop list without the secret", u)
	}
	fac.sees("workshop list", "Workshops", "New workshop", "Create workshop")
}

// createWorkshop fills the new-workshop form and returns the workshop's
// address.
func createWorkshop(t *testing.T, site *site, fac *person) string {
	t.Helper()
	form := `form[action="/workshops"]`
	// A missing title is refused beside the field, typed values kept.
	fac.fill(form, "purpose", "Invented demo: a prior for the first-year failure proportion of a new pump.")
	if st := fac.load("submit a workshop without title", chromedp.Click(chromedp.CSS(form+` button[type=submit]`))); st != http.StatusUnprocessableEntity {
		t.Errorf("workshop without a title: status %d, want 422", st)
	}
	fac.sees("workshop form refused", "Title (required)", "is required", "Nothing was saved")
	if n := fac.count(`.field-invalid [name="title"], [name="title"][aria-invalid="true"]`); n != 1 {
		t.Errorf("the title field is not marked invalid (found %d)", n)
	}
	if v := eval[string](fac, "purpose kept", `document.querySelector('form[action="/workshops"] [name=purpose]').value`); !strings.Contains(v, "first-year failure") {
		t.Errorf("purpose not kept after refusal: %q", v)
	}
	ws, err := site.DB.Workshops(fac.ctx)
	if err != nil || len(ws) != 0 {
		t.Fatalf("a refused workshop was saved: %v, %v", ws, err)
	}

	fac.fill(form, "title", "Pump reliability panel (invented)")
	fac.fill(form, "decision", "The maintenance budget for next year's spare pumps (invented).")
	fac.fill(form, "notes", "Start with the failure question.")
	if st := fac.load("create the workshop", chromedp.Click(chromedp.CSS(form+` button[type=submit]`))); st != http.StatusOK {
		t.Fatalf("create workshop: status %d", st)
	}
	fac.sees("new workshop's page", "Pump reliability panel (invented)", "Round 1 (open)",
		"The maintenance budget for next year's spare pumps (invented).", "No questions yet.")
	u := fac.url()
	if !regexp.MustCompile(`/w/\d+/?$`).MatchString(u) {
		t.Fatalf("after creating a workshop the address is %q, want /w/ID/", u)
	}
	return strings.TrimSuffix(u, "/") + "/"
}

type question struct {
	wording, quantity, units, preset string
}

// addQuestion follows the overview's "Add a question" link and fills the
// form.
func addQuestion(t *testing.T, fac *person, wsURL string, q question) {
	t.Helper()
	fac.open(wsURL)
	fac.load("follow Add a question", chromedp.Click(chromedp.CSS(`a[href$="/questions/new"]`)))
	fac.sees("question form", "Add a question", "Wording the experts read", "Lower bound", "Upper bound")
	form := `form[action$="/questions"]`
	fac.fill(form, "wording", q.wording)
	fac.fill(form, "quantity", q.quantity)
	fac.fill(form, "units", q.units)
	fac.do("choose probabilities", chromedp.SetValue(chromedp.CSS(form+` select[name=preset]`), q.preset))
	if st := fac.load("add the question", chromedp.Click(chromedp.CSS(form+` button[type=submit]`))); st != http.StatusOK {
		t.Fatalf("add question %q: status %d", q.quantity, st)
	}
	fac.sees("overview after adding a question", q.quantity)
}

// addExpert adds an expert to the roster and reads their private link off
// the page, the way a facilitator copies it.
func addExpert(t *testing.T, fac *person, wsURL, name, affiliation string) string {
	t.Helper()
	fac.open(wsURL)
	form := `form[action$="/experts"]`
	fac.fill(form, "name", name)
	fac.fill(form, "affiliation", affiliation)
	if st := fac.load("add expert "+name, chromedp.Click(chromedp.CSS(form+` button[type=submit]`))); st != http.StatusOK {
		t.Errorf("add expert %s: status %d, want 200 after the redirect", name, st)
	}
	// The link is on the page the form redirected to: reloading it shows
	// the link again and adds nobody.
	before := panelSize(t, fac)
	fac.load("reload the link page", chromedp.Reload())
	if after := panelSize(t, fac); after != before {
		t.Errorf("reloading the link page changed the panel from %d to %d experts", before, after)
	}
	body := fac.text()
	if !strings.Contains(body, "Private link for "+name) {
		t.Fatalf("no private link shown for %s:\n%s", name, clip(body, 2000))
	}
	link := expertLink.FindString(body)
	if link == "" {
		t.Fatalf("no readable private link for %s on the page:\n%s", name, clip(body, 2000))
	}
	return link
}

// livePreviewWait is how long the live preview may take after the last
// key (its script waits 350 ms for typing to pause); generous, because CI
// runs every package's tests at once on few cores.
const livePreviewWait = 10 * time.Second

// previewCircles is the selector of the stated points in the fit preview.
const previewCircles = `#preview svg.chart-wide circle.stated`

// openQuestion follows the link to question n (1-based) from the
// expert's home page.
func openQuestion(t *testing.T, ex *person, link string, n int) {
	t.Helper()
	ex.open(link)
	sel := chromedp.CSS(fmt.Sprintf(`.question-list li:nth-child(%d) a[href*="/q/"]`, n))
	if st := ex.load(fmt.Sprintf("open question %d", n), chromedp.Click(sel)); st != http.StatusOK {
		t.Fatalf("%s: question %d: status %d", ex.name, n, st)
	}
	ex.sees("question page", fmt.Sprintf("Question %d", n))
}

// typeValues types the expert's values into the quantile fields.
func typeValues(ex *person, values ...string) {
	for i, v := range values {
		ex.fill(`form.answer-form`, fmt.Sprintf("values[%d]", i), v)
	}
}

// livePreview waits for the live preview to draw n stated points that
// differ from before (nil before: any points). When no live picture
// comes, the expert's fallback is the "Show the fit" button; that is
// clicked so the scenario can go on, but the missing live preview is an
// error.
//
// The preview must also say shows, a phrase of the read-back of the last
// value typed, so a picture of a half-typed judgement is not taken for
// the final one.
func livePreview(t *testing.T, ex *person, n int, before []point, shows string) []point {
	t.Helper()
	beforeJSON, _ := json.Marshal(before)
	expr := fmt.Sprintf(`(() => {
		const cs = Array.from(document.querySelectorAll(%q)).map(c => ({x: parseFloat(c.getAttribute("cx")), y: parseFloat(c.getAttribute("cy"))}));
		const p = document.getElementById("preview");
		return cs.length === %d && JSON.stringify(cs) !== %q && !!p && p.innerText.includes(%q) && !document.querySelector("#preview[aria-busy=true]");
	})()`, previewCircles, n, string(beforeJSON), shows)
	if err := ex.poll(livePreviewWait, expr); err != nil {
		t.Errorf("%s: the live preview did not redraw %d stated points within %v of typing (%v); using the Show the fit button", ex.name, n, livePreviewWait, err)
		ex.do("show the fit", chromedp.Click(chromedp.CSS(`form.answer-form button:not([formaction])`)))
		ex.waitFor("the fit after Show the fit", expr)
	}
	return ex.circles(previewCircles)
}

// saveAnswer clicks "Save this answer" and expects the saved page.
func saveAnswer(t *testing.T, ex *person) {
	t.Helper()
	// A value typed just before starts the live preview (preview.js, 350
	// ms after typing stops), whose picture changed the page's height
	// under the button as the click landed: once in CI the click met no
	// button and no page loaded. The preview now keeps the room it has
	// taken (TestSaveStaysPutWhileThePreviewRedraws); the save still waits
	// for it to settle, so that what is saved is what the preview showed.
	time.Sleep(400 * time.Millisecond)
	if err := ex.poll(stepTimeout, `!document.querySelector('[aria-busy="true"]')`); err != nil {
		t.Fatalf("%s: the preview did not settle before the save: %v", ex.name, err)
	}
	if st := ex.load("save", chromedp.Click(chromedp.CSS(`form.answer-form button[formaction$="/save"]`))); st != http.StatusOK {
		t.Fatalf("%s: save: status %d\n%s", ex.name, st, clip(ex.text(), 2000))
	}
	ex.sees("after saving", "Saved.")
}

// panelSize is the number of experts on the first workshop's panel.
func panelSize(t *testing.T, p *person) int {
	t.Helper()
	return eval[int](p, "count the panel", `document.querySelectorAll("#roster tbody tr").length`)
}

// oneLineTimes checks that every time on the page (".when") is on one
// line: at 1366 px a table's columns squeezed "UTC" onto a line of its
// own. Some, when the page must show a time.
func oneLineTimes(t *testing.T, p *person, where string, some bool) {
	t.Helper()
	broken := eval[[]string](p, "times on one line", `Array.from(document.querySelectorAll(".when")).filter(e => {
		const r = document.createRange(); r.selectNodeContents(e);
		return new Set(Array.from(r.getClientRects()).map(x => Math.round(x.top))).size > 1;
	}).map(e => e.textContent.trim())`)
	if n := eval[int](p, "times", `document.querySelectorAll(".when").length`); some && n == 0 {
		t.Errorf("%s shows no time", where)
	}
	if len(broken) > 0 {
		t.Errorf("%s breaks a time over lines: %q", where, broken)
	}
}

package e2e

import (
	"context"
	"math"
	"net/url"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// followingFacilitator starts the invented demo with the expert called
// name in a browser context of their own on their home, the facilitator
// signed in on page (under the workshop; "{expert}" stands for the
// expert's id) once it follows the workshop, and another tab of the
// facilitator's on the overview. It returns the expert's id and link.
func followingFacilitator(t *testing.T, name, page string) (d demo, s *site, fac, other, ex *person, id int64, link string) {
	t.Helper()
	s, d = startDemo(t)
	br := startBrowser(t)
	for _, e := range d.experts {
		if e.Name == name {
			id = e.ID
		}
	}
	for _, l := range d.links {
		if l.Name == name {
			link = s.URL + l.Path
		}
	}
	if id == 0 || link == "" {
		t.Fatalf("the demo has no expert %q", name)
	}
	ex = br.person("expert")
	ex.open(link)
	fac = br.person("facilitator")
	signIn(t, s, fac)
	other = fac.tab("another tab")
	other.open(d.url + "/")
	fac.viewport(1366, 900, false)
	fac.open(d.url + strings.ReplaceAll(page, "{expert}", strconv.FormatInt(id, 10)))
	fac.liveConnected("the stream")
	// The page as loaded: a reload would lose this.
	eval[bool](fac, "mark the page", `window.loadedOnce = true`)
	return d, s, fac, other, ex, id, link
}

// latestRevision is the id of expert's latest revision of question q.
func latestRevision(t *testing.T, s *site, expert, q int64) int64 {
	t.Helper()
	revs, err := s.DB.ExpertRevisions(context.Background(), expert)
	if err != nil {
		t.Fatal(err)
	}
	var id int64
	for _, rv := range revs {
		if rv.QuestionID == q && rv.ID > id {
			id = rv.ID
		}
	}
	if id == 0 {
		t.Fatalf("expert %d has no revision of question %d", expert, q)
	}
	return id
}

// follows waits for expr on p's page, which must come by the page's
// stream, not by a reload.
func follows(t *testing.T, p *person, what, expr string) {
	t.Helper()
	if err := p.poll(liveWithin+3*time.Second, expr); err != nil {
		t.Fatalf("%s: the page did not follow: %v\n%s", what, err, clip(p.text(), 2500))
	}
	if !eval[bool](p, "the page not reloaded", `window.loadedOnce === true`) {
		t.Fatalf("%s: the page was loaded again, not followed", what)
	}
}

// saveAs posts an answer of 5/50/95% values to question q from the
// expert's own page of it.
func saveAs(ex *person, link string, q int64, values [3]string, reason string) {
	path := link + "q/" + strconv.FormatInt(q, 10)
	ex.open(path)
	f := url.Values{"reason": {reason}}
	for i, v := range values {
		f.Set("values["+strconv.Itoa(i)+"]", v)
	}
	ex.postFromPage(path+"/save", f.Encode())
}

// twoShots takes the page at 1366 and 390 px, and leaves it at 1366.
func twoShots(shots *screenshots, p *person, name string) {
	shots.take(p, name+"-1366")
	p.viewport(phoneWidth, phoneHeight, true)
	shots.take(p, name+"-390")
	p.viewport(1366, 900, false)
}

// The facilitator's page for one expert stood still: the expert's save
// from their own browser, a judgement withdrawn and the link ended in
// another tab each waited for a reload. It follows the workshop now.
func TestFacilitatorsExpertPageFollowsTheWorkshop(t *testing.T) {
	d, site, fac, other, ex, ines, link := followingFacilitator(t, "Ines Varga", "/experts/{expert}")
	shots := newScreenshots(t)
	q := d.qs[0]
	twoShots(shots, fac, "fac-expert-before")

	// Ines saves from her own browser: her answer comes into the table.
	saveAs(ex, link, q.ID, [3]string{"0.0111", "0.0777", "0.2222"}, "Revised after the discussion (invented).")
	follows(t, fac, "Ines's save", `document.querySelector("#expert-answers-live").innerText.includes("0.0777")`)
	twoShots(shots, fac, "fac-expert-saved")

	// Withdrawn in another tab: the table counts it, the withdrawn
	// judgements list it with the reason, and her earlier answer stands.
	rv := latestRevision(t, site, ines, q.ID)
	const why = "Typed into the wrong question (invented)."
	other.postFromPage(d.url+"/q/"+strconv.FormatInt(q.ID, 10)+"/revisions/"+strconv.FormatInt(rv, 10)+"/withdraw", url.Values{"reason": {why}}.Encode())
	follows(t, fac, "the withdrawal", `document.querySelector("#expert-answers-live").innerText.includes("1 judgement withdrawn") && !document.querySelector("#expert-answers-live").innerText.includes("0.0777")`)
	fac.sees("the withdrawal", "Withdrawn judgements", why)
	fac.do("the withdrawn list in view", chromedp.ScrollIntoView(chromedp.CSS("#withdrawn")))
	twoShots(shots, fac, "fac-expert-withdrawn")

	// The link ended in another tab: the page says so, and offers no
	// entry on her behalf.
	other.postFromPage(d.url+"/experts/"+strconv.FormatInt(ines, 10)+"/revoke", "confirm=yes&reason=Left+the+panel+%28invented%29.")
	follows(t, fac, "the link ended", `!!document.querySelector("#expert-state-live .tag-closed") && document.querySelectorAll("#expert-answers-live a[href*='/enter/']").length === 0`)
	fac.sees("the link ended", "Ines Varga's link is ended: no answers arrive from them unless you give them a new one.")
	fac.do("the top in view", chromedp.ScrollIntoView(chromedp.CSS("h1")))
	twoShots(shots, fac, "fac-expert-revoked")
	fac.noScriptErrors("the expert's page followed")
}

// The calibration page stood still: an expert's save and a withdrawal
// left the scores as they were, a true value revealed and a weight set in
// another tab left the page saying the old ones, until a reload. It
// follows the workshop now, and a true value's form being filled in is
// left as typed throughout.
func TestCalibrationPageFollowsTheWorkshop(t *testing.T) {
	d, site, fac, other, ex, ole, link := followingFacilitator(t, "Ole Brandt", "/calibration")
	shots := newScreenshots(t)
	// Hidden true values of questions Ole answered, which his scores
	// count.
	revs, err := site.DB.ExpertRevisions(context.Background(), ole)
	if err != nil {
		t.Fatal(err)
	}
	answered := map[int64]bool{}
	for _, rv := range revs {
		answered[rv.QuestionID] = true
	}
	var seeds []workshop.Question
	for _, q := range d.qs {
		if q.Calibration && q.TrueValue != nil && !q.Revealed && answered[q.ID] {
			seeds = append(seeds, q)
		}
	}
	if len(seeds) < 2 {
		t.Fatalf("the demo has %d hidden true values, want two", len(seeds))
	}
	typedIn, changed := seeds[0], seeds[1]
	// A draft in one calibration question's true-value form.
	form := `form[action$="/calibration/q/` + strconv.FormatInt(typedIn.ID, 10) + `"]`
	const draft = "Checked against the (invented) inspection log; a draft."
	fac.fill(form, "reason", draft)
	draftKept := func(when string) {
		t.Helper()
		if got := eval[string](fac, "the draft", `document.querySelector('`+form+` textarea[name=reason]').value`); got != draft {
			t.Errorf("%s: the draft reads %q", when, got)
		}
	}
	scores := func() string {
		return eval[string](fac, "the scores", `document.querySelector("#scores-table").innerText`)
	}
	before := scores()
	twoShots(shots, fac, "fac-calibration-before")

	// Ole, whose narrow ranges miss every true value, answers one of them
	// with a range that holds it: his calibration score moves.
	tv := *changed.TrueValue
	saveAs(ex, link, changed.ID, [3]string{strconv.FormatFloat(tv/2, 'f', 4, 64), strconv.FormatFloat(tv, 'f', 4, 64), strconv.FormatFloat(min(1, tv*2), 'f', 4, 64)}, "Looked again (invented).")
	follows(t, fac, "Ole's save", `document.querySelector("#scores-table").innerText !== `+strconv.Quote(before))
	draftKept("Ole's save")
	twoShots(shots, fac, "fac-calibration-saved")

	// Withdrawn in another tab: the scores are as before.
	rv := latestRevision(t, site, ole, changed.ID)
	other.postFromPage(d.url+"/q/"+strconv.FormatInt(changed.ID, 10)+"/revisions/"+strconv.FormatInt(rv, 10)+"/withdraw", "reason=Not+his+answer+%28invented%29.")
	follows(t, fac, "the withdrawal", `document.querySelector("#scores-table").innerText === `+strconv.Quote(before))
	draftKept("the withdrawal")

	// The other question's true value revealed in another tab.
	card := "#seed-" + strconv.FormatInt(changed.ID, 10) + "-facts"
	if fac.count(card) != 1 {
		t.Fatalf("no %s on the calibration page", card)
	}
	other.postFromPage(d.url+"/calibration/q/"+strconv.FormatInt(changed.ID, 10), url.Values{
		"true_value": {strconv.FormatFloat(tv, 'g', -1, 64)}, "reveal": {"on"}, "reason": {"Shown after round 1 (invented)."}}.Encode())
	follows(t, fac, "the reveal", `document.querySelector(`+strconv.Quote(card)+`).innerText.includes("revealed to the experts")`)
	draftKept("the reveal")
	shots.part(fac, "#seed-"+strconv.FormatInt(changed.ID, 10), "fac-calibration-revealed-card-1366")
	shots.part(fac, "#seed-"+strconv.FormatInt(typedIn.ID, 10), "fac-calibration-draft-card-1366")

	// Performance weights set in another tab: the account says so.
	other.postFromPage(d.url+"/calibration/weights", "scheme=performance&reason=Classical+model+weights+%28invented%29.")
	follows(t, fac, "the weights set", `document.querySelector("#weights-account-live").innerText.includes("performance weights set")`)
	draftKept("the weights set")
	fac.do("the weights in view", chromedp.ScrollIntoView(chromedp.CSS("#weights")))
	twoShots(shots, fac, "fac-calibration-weights")
	shots.part(fac, "#weights", "fac-calibration-weights-part-1366")
	fac.viewport(phoneWidth, phoneHeight, true)
	shots.part(fac, "#weights-account-live", "fac-calibration-weights-account-390")
	shots.part(fac, ".live-status", "fac-calibration-status-390")
	fac.viewport(1366, 900, false)
	fac.noScriptErrors("the calibration page followed")
}

// The calibration page's weights form stands in its not-ready layout
// (after the calibration questions) or its ready one (after the scores).
// A page that became ready while the facilitator typed in the not-ready
// form held that form and put in the ready one too: two forms, with the
// same ids, stood on the page. Then the whole layout waited for the typed
// words, and the contents links, the steadiness and the comparison of
// pools stood stale (or missing) until they were sent or taken back. Now
// the layout changes at once, both ways, and the form being typed is
// carried into it as it is: its words, its choice, the focus and the
// caret, one form on the page.
func TestCalibrationPageChangesLayoutAsAWhole(t *testing.T) {
	site, d := startDemo(t)
	// A calibration question without its true value (as one imported
	// without it stands): the scores wait.
	waiting := func(what string) workshop.Question {
		q := workshop.Question{WorkshopID: d.w.ID,
			Wording:  "(Invented.) What share of the (invented) " + what + " passed its burn-in?",
			Quantity: what + " pass share", Units: "proportion of units",
			Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95},
			Calibration: true}
		if err := site.DB.AddQuestion(context.Background(), &q); err != nil {
			t.Fatal(err)
		}
		return q
	}
	added := waiting("trial batch")
	fac := signedInFacilitator(t, site)
	other := fac.tab("another tab")
	other.open(d.url + "/")
	fac.viewport(1366, 900, false)
	fac.open(d.url + "/calibration")
	fac.liveConnected("the stream")
	eval[bool](fac, "mark the page", `window.loadedOnce = true`)
	shots := newScreenshots(t)
	if fac.count("#scores-table") != 0 || fac.count("#calibration-tail-live #weights-form-live") != 1 {
		t.Fatalf("the page does not wait for the true value:\n%s", clip(fac.text(), 2000))
	}

	// The facilitator picks weights of their own and types a reason in
	// the not-ready form, the caret left inside the words.
	const typed = "Equal until the scores are in (invented)."
	const reason = `#weights-form-live textarea[name=reason]`
	eval[bool](fac, "pick weights I set", `document.querySelector("#weights-form-live input[name=scheme][value=custom]").checked = true`)
	fac.fill("#weights-form-live form", "reason", typed)
	eval[bool](fac, "the caret", `(() => { const r = document.querySelector("`+reason+`"); r.focus(); r.setSelectionRange(6, 11); r.scrollIntoView({block: "center"}); return true; })()`)
	const formState = `(() => { const r = document.querySelector("` + reason + `"); return [r.value, String(document.activeElement === r), r.selectionStart + "-" + r.selectionEnd, String(document.querySelector("#weights-form-live input[name=scheme][value=custom]").checked)]; })()`
	want := []string{typed, "true", "6-11", "true"}
	const dupes = `(() => { const seen = {}, twice = []; document.querySelectorAll("[id]").forEach(e => { if (seen[e.id]) twice.push(e.id); seen[e.id] = true; }); return twice; })()`
	// Where the words being typed stand on the screen, in px.
	const onScreen = `document.querySelector("` + reason + `").getBoundingClientRect().top`
	var stood float64
	// The form's words for performance weights follow the page as it is
	// typed in: they said the weights wait for the scores beside the
	// scores, and offered the scores above where there were none.
	asTyped := func(when, layout, choice string) {
		t.Helper()
		if got := eval[string](fac, "the performance choice", `document.querySelector("#weights-form-live input[value=performance]").labels[0].innerText`); !strings.Contains(got, choice) {
			t.Errorf("%s: the performance choice reads %q; want %q in it", when, got, choice)
		}
		// Unless the page, shorter, ends before they could stand there.
		const atEnd = `window.scrollY + window.innerHeight >= document.documentElement.scrollHeight - 1`
		if at := eval[float64](fac, "the words on the screen", onScreen); math.Abs(at-stood) > 1 && !(at > stood && eval[bool](fac, "the page's end", atEnd)) {
			t.Errorf("%s: the words being typed moved on the screen from %.0f px to %.0f px", when, stood, at)
		}
		if got := eval[[]string](fac, "the form as typed", formState); strings.Join(got, "|") != strings.Join(want, "|") {
			t.Errorf("%s: the form reads (words, focus, caret, own weights) %q; want %q", when, got, want)
		}
		if twice := eval[[]string](fac, "ids on the page twice", dupes); len(twice) != 0 {
			t.Errorf("%s: ids twice on the page: %v", when, twice)
		}
		if n := fac.count(`form[action$="/calibration/weights"]`); n != 1 {
			t.Errorf("%s: %d weights forms on the page", when, n)
		}
		if fac.count(layout+" #weights-form-live") != 1 {
			t.Errorf("%s: the weights form is not in %s", when, layout)
		}
	}
	twoShots(shots, fac, "fac-calibration-not-ready")
	// The focus back in the words after the phone's width.
	eval[bool](fac, "the caret", `(() => { const r = document.querySelector("`+reason+`"); r.focus(); r.setSelectionRange(6, 11); r.scrollIntoView({block: "center"}); return true; })()`)

	// The last true value entered in another tab: the page is ready, all
	// of it at once, with the form as typed where the ready page has it,
	// kept where it stood on the screen.
	stood = eval[float64](fac, "the words on the screen", onScreen)
	other.postFromPage(d.url+"/calibration/q/"+strconv.FormatInt(added.ID, 10), "true_value=0.62&reason=From+the+batch+sheet+%28invented%29.")
	follows(t, fac, "the true value", `document.querySelector("#seed-`+strconv.FormatInt(added.ID, 10)+`-facts").innerText.includes("0.62")`)
	asTyped("the page became ready while the weights were typed", "#calibration-lead-live", "from the scores above")
	ready := map[string]string{
		"the contents links":         `#calibration-lead-live nav.page-contents a[href="#robustness"]`,
		"the scores":                 `#calibration-lead-live #scores #scores-table`,
		"the steadiness":             `#calibration-lead-live #robustness table`,
		"the comparison of pools":    `#calibration-lead-live #compare table`,
		"the account of the weights": `#calibration-lead-live #weights #weights-account-live`,
	}
	for what, css := range ready {
		if fac.count(css) != 1 {
			t.Errorf("the page became ready while the weights were typed: %s not shown (%s)", what, css)
		}
	}
	if fac.count("#calibration-tail-live *") != 0 || strings.Contains(fac.text(), "The scores appear once") {
		t.Errorf("the page became ready while the weights were typed: the not-ready layout stands:\n%s", clip(fac.text(), 3000))
	}
	twoShots(shots, fac, "fac-calibration-ready-typed")
	shots.part(fac, "#weights", "fac-calibration-ready-typed-weights-1366")
	eval[bool](fac, "the caret", `(() => { const r = document.querySelector("`+reason+`"); r.focus(); r.setSelectionRange(6, 11); r.scrollIntoView({block: "center"}); return true; })()`)

	// Another calibration question without its true value, and a change
	// in another tab: the page waits for the scores again, at once, and
	// shows none of the scores' sections it had.
	waiting("spare batch")
	stood = eval[float64](fac, "the words on the screen", onScreen)
	other.postFromPage(d.url+"/calibration/weights", "scheme=equal&reason=Equal+for+now+%28invented%29.")
	follows(t, fac, "the page waiting again", `document.body.innerText.includes("The scores appear once")`)
	asTyped("the page stopped being ready while the weights were typed", "#calibration-tail-live", "once the scores can be computed")
	for what, css := range ready {
		if fac.count(css) != 0 {
			t.Errorf("the page stopped being ready while the weights were typed: %s still shown (%s)", what, css)
		}
	}
	if n := fac.count("#robustness, #compare, nav.page-contents"); n != 0 {
		t.Errorf("the page stopped being ready: %d of the ready page's sections stand", n)
	}
	twoShots(shots, fac, "fac-calibration-waiting-typed")
	shots.part(fac, "#weights", "fac-calibration-waiting-typed-weights-1366")

	// The words taken back, the choice put back and the focus moved on:
	// the form is the page's own again, and one.
	eval[bool](fac, "clear the form", `(() => { const r = document.querySelector("`+reason+`"); r.focus(); r.value = ""; document.querySelectorAll("#weights-form-live input[name=scheme]").forEach(i => { i.checked = i.defaultChecked; }); r.closest("#weights-form-live").setAttribute("data-typed-in", ""); r.blur(); return true; })()`)
	follows(t, fac, "the form left", `!!document.querySelector("#calibration-tail-live #weights-form-live") && !document.querySelector("#weights-form-live[data-typed-in]")`)
	if twice := eval[[]string](fac, "ids on the page twice", dupes); len(twice) != 0 {
		t.Errorf("the form left: ids twice on the page: %v", twice)
	}
	if n := fac.count(`form[action$="/calibration/weights"]`); n != 1 {
		t.Errorf("the form left: %d weights forms on the page", n)
	}
	fac.noScriptErrors("the layout changed")
}

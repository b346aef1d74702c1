package e2e

import (
	"fmt"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
)

// followingExpert starts the invented demo with the facilitator signed in
// on its overview, and the expert of link i in a browser context of their
// own on their home, or on the demo's first question where onQuestion,
// once the page follows the workshop.
func followingExpert(t *testing.T, i int, onQuestion bool) (demo, *person, *person) {
	t.Helper()
	site, d := startDemo(t)
	br := startBrowser(t)
	fac := br.person("facilitator")
	signIn(t, site, fac)
	fac.open(d.url + "/")
	ex := br.person("expert")
	ex.viewport(1366, 900, false)
	page := site.URL + d.links[i].Path
	if onQuestion {
		page += "q/" + strconv.FormatInt(d.qs[0].ID, 10)
	}
	ex.open(page)
	ex.liveConnected("the stream")
	return d, fac, ex
}

// saveButton reads the expert's save button: enabled or disabled, and its
// words.
const saveButton = `(() => { const b = document.querySelector("#save-live button"); return b ? (b.disabled ? "disabled: " : "enabled: ") + b.innerText.trim() : "none"; })()`

// typeDraft types a draft on ex's answer form, saving nothing: the value
// box named names[i] gets 0.(i+1)17 and the reasoning a line. It returns
// what it typed, by field name.
func typeDraft(ex *person, names []string) map[string]string {
	ex.t.Helper()
	draft := map[string]string{}
	for i, n := range names {
		draft[n] = fmt.Sprintf("0.%d17", i+1)
		ex.fill("form.answer-form", n, draft[n])
	}
	draft["reason"] = "A draft, typed and not saved (invented)."
	ex.fill("form.answer-form", "reason", draft["reason"])
	return draft
}

// An expert typing a draft learned that the facilitator had closed their
// round only when Save was refused, and saw round 2's feedback only after
// a reload. The question's page follows its round now, without touching
// the form: the round closed, the page says so above the save button,
// which says why it does not save, and the draft stays in its boxes;
// round 2 opened, the page says so and offers the other experts' answers,
// shown on the expert's word, the draft still there.
// endFirstLink has the facilitator end the first expert's link and waits
// for ex, that expert's open page, to say it no longer works.
func endFirstLink(t *testing.T, d demo, fac, ex *person) {
	t.Helper()
	var expert int64
	for _, e := range d.experts {
		if e.Name == d.links[0].Name {
			expert = e.ID
		}
	}
	fac.postFromPage(d.url+"/experts/"+strconv.FormatInt(expert, 10)+"/revoke", "confirm=yes&reason=Left+the+panel+%28invented%29.")
	if err := ex.poll(liveWithin+3*time.Second, `document.documentElement.getAttribute("data-live") === "gone"`); err != nil {
		t.Fatalf("the link ended: the expert's page did not notice: %v\n%s", err, clip(ex.text(), 2000))
	}
	ex.sees("the link ended", "This link no longer works: the facilitator has ended it or given you a new one.")
}

func TestExpertPageFollowsItsRound(t *testing.T) {
	d, fac, ex := followingExpert(t, 0, true)
	shots := newScreenshots(t)

	// A draft: every value box and the reasoning typed, nothing saved.
	names := eval[[]string](ex, "the value boxes", `Array.from(document.querySelectorAll("form.answer-form input[type=text]")).map(i => i.name)`)
	if len(names) == 0 {
		t.Fatal("the question's page has no value boxes")
	}
	draft := typeDraft(ex, names)
	const typed = `(() => { const m = {}; document.querySelectorAll("form.answer-form input[type=text], form.answer-form textarea").forEach(f => { m[f.name] = f.value; }); return m; })()`
	// noticeShots keeps the page at 1366 px and on a phone, with the live
	// notice scrolled into view and kept on its own.
	noticeShots := func(page, notice string) {
		shots.take(ex, "expert-live-"+page+"-1366")
		ex.viewport(phoneWidth, phoneHeight, true)
		ex.do("the notice in view", chromedp.ScrollIntoView(chromedp.CSS("#live-notice")))
		shots.take(ex, "expert-live-"+page+"-390")
		shots.part(ex, "#live-notice", "expert-live-"+notice+"-390")
	}
	draftKept := func(when string) {
		t.Helper()
		got := eval[map[string]string](ex, "the draft", typed)
		for n, v := range draft {
			if got[n] != v {
				t.Errorf("%s: the draft's %s reads %q, typed %q", when, n, got[n], v)
			}
		}
	}

	// The notice is a live region that stays on the page, so a screen
	// reader announces what comes into it (one put in anew may go unsaid).
	eval[bool](ex, "note the notice's region", `!!(window.noticeRegion = document.querySelector("#live-notice"))`)
	fac.postFromPage(d.url+"/round", "action=close&round=1")
	if err := ex.poll(liveWithin+3*time.Second, `document.querySelector("#live-notice").innerText.includes("The facilitator has closed round 1.")`); err != nil {
		t.Fatalf("the round closed: the expert's page did not say so: %v\n%s", err, clip(ex.text(), 2000))
	}
	if !eval[bool](ex, "the notice's region", `window.noticeRegion === document.querySelector("#live-notice") && window.noticeRegion.getAttribute("role") === "status" && !window.noticeRegion.querySelector("[role=status]")`) {
		t.Error("the round closed: the notice came in a new element, not into the live region the page had")
	}
	ex.sees("the round closed", "stays there, but it cannot be saved now", "Round 1 is closed.")
	if got := eval[string](ex, "the save button", saveButton); got != "disabled: Saving is closed for this round" {
		t.Errorf("the round closed: the save button is %q", got)
	}
	draftKept("the round closed")
	noticeShots("closed", "closed-notice")
	ex.viewport(1366, 900, false)

	fac.postFromPage(d.url+"/round", "action=open&round=2&reason=Round+2+%28invented%29.")
	if err := ex.poll(liveWithin+3*time.Second, `document.querySelector("#live-notice").innerText.includes("The facilitator has opened round 2.")`); err != nil {
		t.Fatalf("round 2 opened: the expert's page did not say so: %v\n%s", err, clip(ex.text(), 2000))
	}
	ex.sees("round 2 opened", "What the other experts said in round 1 can now be shown on this page", "Round 2 is open")
	if ex.count("#feedback-live .panel-feedback") != 0 {
		t.Errorf("round 2 opened: the feedback was put in under the expert, not offered")
	}
	if got := eval[string](ex, "the save button", saveButton); got != "enabled: Save this answer" {
		t.Errorf("round 2 opened: the save button is %q", got)
	}
	draftKept("round 2 opened")
	noticeShots("round2-offer", "round2-notice")

	ex.do("show the feedback", chromedp.Click(chromedp.CSS(`[data-live-show="feedback-live"]`)))
	ex.waitFor("the feedback shown", `!!document.querySelector("#feedback-live .panel-feedback")`)
	ex.sees("the feedback shown", "What the other experts said")
	draftKept("the feedback shown")
	shots.take(ex, "expert-live-round2-feedback-390")
	ex.viewport(1366, 900, false)
	shots.take(ex, "expert-live-round2-feedback-1366")

	// The link ended: the page says it no longer works, and saves
	// nothing; the draft stays.
	endFirstLink(t, d, fac, ex)
	if got := eval[string](ex, "the save button", saveButton); got != "disabled: Saving is closed: this link no longer works" {
		t.Errorf("the link ended: the save button is %q", got)
	}
	draftKept("the link ended")
	ex.do("the notice in view", chromedp.ScrollIntoView(chromedp.CSS("#live-notice")))
	noticeShots("gone", "gone-notice")
	ex.noScriptErrors("the round followed")
}

// The expert's home followed nothing: a question added, a round closed or
// opened, the workshop archived or brought back, their link ended, each
// waited for a reload. It follows the workshop now, on the link's stream.
func TestExpertHomeFollowsTheWorkshop(t *testing.T) {
	d, fac, ex := followingExpert(t, 1, false)
	shots := newScreenshots(t)
	follows := func(what, expr string) {
		t.Helper()
		if err := ex.poll(liveWithin+3*time.Second, expr); err != nil {
			t.Fatalf("%s: the expert's home did not follow: %v\n%s", what, err, clip(ex.text(), 2000))
		}
	}
	items := ex.count(".question-list li")

	fac.postFromPage(d.url+"/questions", "wording=How+many+in+100+spares+arrive+damaged%3F+%28invented%29&quantity=share+damaged&lower=0&upper=1&format=quantiles&preset=p05_50_95")
	follows("a question added", fmt.Sprintf(`document.querySelectorAll(".question-list li").length === %d && document.body.innerText.includes("How many in 100 spares arrive damaged?")`, items+1))

	fac.postFromPage(d.url+"/round", "action=close&round=1")
	follows("the round closed", `document.querySelector("#home-state-live").innerText.includes("Round 1 is closed.")`)
	fac.postFromPage(d.url+"/round", "action=open&round=2&reason=Round+2+%28invented%29.")
	follows("round 2 opened", `document.querySelector("#home-state-live").innerText.includes("Round 2 is open") && !!document.querySelector("#home-state-live .round-next")`)

	fac.postFromPage(d.url+"/archive", "action=archive&archive_reason=Done+%28invented%29.")
	follows("the workshop archived", `!!document.querySelector("#home-state-live .banner-finished") && document.body.innerText.includes("The facilitator has closed this workshop after round 2.")`)
	shots.take(ex, "expert-home-archived-1366")
	ex.viewport(phoneWidth, phoneHeight, true)
	shots.take(ex, "expert-home-archived-390")
	ex.viewport(1366, 900, false)

	fac.postFromPage(d.url+"/archive", "action=restore&archive_reason=One+more+look+%28invented%29.")
	follows("the workshop brought back", `!document.querySelector("#home-state-live .banner-finished") && document.querySelector("#home-state-live").innerText.includes("Round 2 is closed.")`)

	var expert int64
	for _, e := range d.experts {
		if e.Name == d.links[1].Name {
			expert = e.ID
		}
	}
	fac.postFromPage(d.url+"/experts/"+strconv.FormatInt(expert, 10)+"/revoke", "confirm=yes&reason=Left+the+panel+%28invented%29.")
	follows("the link ended", `document.documentElement.getAttribute("data-live") === "gone"`)
	ex.sees("the link ended", "This link no longer works: the facilitator has ended it or given you a new one, so your questions cannot be opened from it.")
	// The questions' links, which now lead only to a refusal, are put away.
	if n := eval[int](ex, "the questions' links shown", `Array.from(document.querySelectorAll(".question-list a")).filter(a => a.offsetParent !== null).length`); n != 0 {
		t.Errorf("the link ended: %d links to questions still shown", n)
	}
	// Whoever holds the device next learns nothing of whose link it was:
	// not the expert's name (the greeting), not what they answered or when
	// (the list's tags), on the screen or anywhere in the page.
	page := eval[string](ex, "the page", `document.documentElement.outerHTML`)
	for _, what := range []string{d.links[1].Name, "Signed in by your private link", "answered this round", "answer stands", "not answered yet"} {
		if strings.Contains(page, what) {
			t.Errorf("the link ended: the page still holds %q:\n%s", what, clip(ex.text(), 2000))
		}
	}
	shots.take(ex, "expert-home-gone-1366")
	ex.viewport(phoneWidth, phoneHeight, true)
	shots.take(ex, "expert-home-gone-390")
	ex.noScriptErrors("the home followed")
}

// A question the facilitator withdraws (retires) while an expert has it
// open with a draft: the page's own fetch is answered 410, and the page
// says in the server's words that the question was withdrawn and takes
// no answers, the save button is disabled and says why, the draft stays,
// and the page stops following.
func TestExpertPageFollowsItsQuestionWithdrawn(t *testing.T) {
	d, fac, ex := followingExpert(t, 0, true)
	q := d.qs[0]
	ex.fill("form.answer-form", "reason", "A draft, typed and not saved (invented).")

	fac.postFromPage(d.url+"/q/"+strconv.FormatInt(q.ID, 10)+"/retire", "action=retire&retire_reason=Asked+twice+%28invented%29.")
	if err := ex.poll(liveWithin+3*time.Second, `document.documentElement.getAttribute("data-live") === "gone"`); err != nil {
		t.Fatalf("the question withdrawn: the expert's page did not notice: %v\n%s", err, clip(ex.text(), 2000))
	}
	ex.sees("the question withdrawn", "Question withdrawn.", "The facilitator has withdrawn this question, so it takes no answers.", "Anything you typed stays here.")
	if got := eval[string](ex, "the save button", saveButton); got != "disabled: Saving is closed: the question was withdrawn" {
		t.Errorf("the question withdrawn: the save button is %q", got)
	}
	if got := eval[string](ex, "the draft", `document.querySelector("form.answer-form textarea[name=reason]").value`); got != "A draft, typed and not saved (invented)." {
		t.Errorf("the question withdrawn: the draft's reasoning reads %q", got)
	}
	ex.noScriptErrors("the question withdrawn")
}

// An expert's question page, open when their link was ended, kept the
// draft (by design: it can be copied to the new link) but also their
// saved history, the note that their answer was saved, the round's line
// about their answer and the label asking why they revised: whoever held
// the phone next learned whose answers these were. Once the link ends,
// only the draft and the words saying the link no longer works stay.
func TestExpertPageForgetsTheExpertOnceItsLinkEnds(t *testing.T) {
	d, fac, ex := followingExpert(t, 0, true)
	shots := newScreenshots(t)
	const boxes = `Array.from(document.querySelectorAll("form.answer-form input[type=text]")).map(i => i.name)`
	names := eval[[]string](ex, "the value boxes", boxes)
	if len(names) == 0 {
		t.Fatal("the question's page has no value boxes")
	}
	// A saved answer, so the page has a history naming it.
	for i, n := range names {
		ex.fill("form.answer-form", n, fmt.Sprintf("0.%d05", i+1))
	}
	ex.fill("form.answer-form", "reason", "Saved reasoning, to be forgotten (invented).")
	ex.do("save", chromedp.Click(chromedp.CSS("#save-live button")))
	ex.waitFor("the answer saved", `!!document.querySelector("#saved") && document.querySelectorAll("#history-live tbody tr").length > 0`)
	ex.liveConnected("the stream")

	// A draft typed over it, not saved.
	draft := typeDraft(ex, names)
	// The fit shown is the draft's, as the expert typed it.
	ex.waitFor("the draft's fit", `document.querySelector("#preview").innerText.includes("Read as 0.117")`)

	endFirstLink(t, d, fac, ex)
	const typed = `(() => { const m = {}; document.querySelectorAll("form.answer-form input[type=text], form.answer-form textarea").forEach(f => { m[f.name] = f.value; }); return m; })()`
	got := eval[map[string]string](ex, "the draft", typed)
	for n, v := range draft {
		if got[n] != v {
			t.Errorf("the link ended: the draft's %s reads %q, typed %q", n, got[n], v)
		}
	}
	// Nothing of whose link it was, on the screen or anywhere in the page:
	// not the name, not the saved answer or its reasoning, not that one
	// was saved, not the question's history or the round's line about it.
	page := eval[string](ex, "the page", `document.documentElement.outerHTML`)
	for _, what := range []string{
		d.links[0].Name,
		"Saved reasoning, to be forgotten",
		"Your history on this question",
		"Saved. Your answer is recorded",
		"Why you revised",
		"0.105",
		"Round 1 is open",
		"What the other experts said",
		"your questions",
	} {
		if i := strings.Index(page, what); i >= 0 {
			t.Errorf("the link ended: the page still holds %q: …%s…", what, page[max(0, i-300):min(len(page), i+100)])
		}
	}
	shots.take(ex, "expert-question-gone-1366")
	ex.viewport(phoneWidth, phoneHeight, true)
	shots.take(ex, "expert-question-gone-390")
	ex.noScriptErrors("the link ended")
}

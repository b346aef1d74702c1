package e2e

import (
	"context"
	"fmt"
	"strconv"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
)

// TestArchiveFollowsALiveChange: a workshop archived in one tab left the
// others as they were: the overview without its banner, offering to add a
// question, to edit the details, to add an expert and to archive the
// workshop, and a question's panel offering to retire the question, set
// weights and record a prior, each a form the server now refuses; brought
// back, the banner and "Bring the workshop back" stayed. They follow the
// workshop now, as the Rounds card does. A fold the facilitator opened
// (the details' form) stays open as changes arrive.
func TestArchiveFollowsALiveChange(t *testing.T) {
	_, d, fac := facilitatorOnDemo(t)
	shots := newScreenshots(t)
	fac.viewport(1366, 900, false)
	fac.open(d.url + "/")
	panel := fac.tab("the panel")
	panel.viewport(1366, 900, false)
	panel.open(d.url + "/q/" + strconv.FormatInt(d.qs[0].ID, 10))
	for _, p := range []*person{fac, panel} {
		p.liveConnected("the stream")
	}
	other := fac.tab("another tab")
	other.open(d.url + "/")

	// What an open workshop offers, and what an archived one does not.
	const overviewOpen = `(() => {
		const t = s => (document.querySelector(s) || {innerText: ""}).innerText;
		return {
			banner: t("#archived-live").includes("This workshop is archived"),
			archiveForm: t("#finish").includes("Archive the workshop"),
			restoreForm: t("#finish").includes("Bring the workshop back"),
			addQuestion: t("#questions").includes("Add a question"),
			correct: t("#questions").includes("Correct"),
			editDetails: !!document.querySelector('#about form[action$="/edit"]'),
			addExpert: !!document.querySelector('#roster form[action$="/experts"]'),
			revoke: !!document.querySelector('#roster form[action$="/revoke"]'),
		};
	})()`
	const panelOpen = `(() => ({
		retire: !!document.querySelector('form[action$="/retire"]'),
		weights: !!document.querySelector('form[action$="/weights"]'),
		agree: !!document.querySelector('form[action$="/agree"]'),
		enter: !!document.querySelector('form[action$="/enter"]'),
		archivedWords: document.querySelector(".live-status").innerText.includes("The workshop is archived"),
		banner: document.getElementById("question-state-live").innerText.includes("This workshop is archived: nothing in it can be changed until you bring it back"),
	}))()`
	type overviewState struct {
		Banner, ArchiveForm, RestoreForm, AddQuestion, Correct, EditDetails, AddExpert, Revoke bool
	}
	type panelState struct {
		Retire, Weights, Agree, Enter, ArchivedWords, Banner bool
	}
	openOverview := overviewState{ArchiveForm: true, AddQuestion: true, Correct: true, EditDetails: true, AddExpert: true, Revoke: true}
	archivedOverview := overviewState{Banner: true, RestoreForm: true}
	openPanel := panelState{Retire: true, Weights: true, Agree: true, Enter: true}
	archivedPanel := panelState{ArchivedWords: true, Banner: true}
	follows := func(what string, wantO overviewState, wantP panelState) {
		t.Helper()
		o := fmt.Sprintf(`JSON.stringify(%s) === JSON.stringify(%s)`, overviewOpen, jsState(wantO.Banner, wantO.ArchiveForm, wantO.RestoreForm, wantO.AddQuestion, wantO.Correct, wantO.EditDetails, wantO.AddExpert, wantO.Revoke,
			"banner", "archiveForm", "restoreForm", "addQuestion", "correct", "editDetails", "addExpert", "revoke"))
		if err := fac.poll(liveWithin+3*time.Second, o); err != nil {
			t.Errorf("%s: the overview did not follow: it offers %+v, want %+v", what, eval[overviewState](fac, "the overview", overviewOpen), wantO)
		}
		p := fmt.Sprintf(`JSON.stringify(%s) === JSON.stringify(%s)`, panelOpen, jsState(wantP.Retire, wantP.Weights, wantP.Agree, wantP.Enter, wantP.ArchivedWords, wantP.Banner,
			"retire", "weights", "agree", "enter", "archivedWords", "banner"))
		if err := panel.poll(liveWithin+3*time.Second, p); err != nil {
			t.Errorf("%s: the panel did not follow: it offers %+v, want %+v", what, eval[panelState](panel, "the panel", panelOpen), wantP)
		}
	}
	follows("before", openOverview, openPanel)

	other.postFromPage(d.url+"/archive", "action=archive&archive_reason=Done+%28invented%29.")
	follows("archived in another tab", archivedOverview, archivedPanel)
	shots.take(fac, "archive-live-overview-1366")
	shots.take(panel, "archive-live-panel-1366")
	fac.viewport(phoneWidth, phoneHeight, true)
	shots.take(fac, "archive-live-overview-390")
	fac.viewport(1366, 900, false)
	panel.viewport(phoneWidth, phoneHeight, true)
	shots.take(panel, "archive-live-panel-390")
	panel.viewport(1366, 900, false)

	other.postFromPage(d.url+"/archive", "action=restore&archive_reason=One+more+round+%28invented%29.")
	// Brought back, its round stays closed: nothing to enter for an
	// expert until the next round opens.
	restoredPanel := openPanel
	restoredPanel.Enter = false
	follows("brought back in another tab", openOverview, restoredPanel)

	// The details' form, opened by hand, stays open over a change.
	fac.do("open the details' form", chromedp.Click(chromedp.CSS(`#about details summary`)))
	eval[bool](fac, "forget the last refresh", `document.documentElement.removeAttribute("data-live-updated"), true`)
	other.postFromPage(d.url+"/round", "action=open&round=2&reason=Second+round+%28invented%29.")
	if err := fac.poll(liveWithin+3*time.Second, `document.documentElement.hasAttribute("data-live-updated")`); err != nil {
		t.Fatalf("the overview did not follow round 2 opened: %v", err)
	}
	if !eval[bool](fac, "the details' form", `document.querySelector("#about details").open`) {
		t.Errorf("the details' form opened by hand closed on a live change")
	}
}

// jsState writes a JavaScript object of the named booleans, in order.
func jsState(vals ...any) string {
	n := len(vals) / 2
	s := "{"
	for i := 0; i < n; i++ {
		if i > 0 {
			s += ","
		}
		s += fmt.Sprintf("%s: %v", vals[n+i], vals[i])
	}
	return s + "}"
}

// TestEmptyWorkshopOverviewFollowsALiveChange: the overview of a new
// workshop, without an expert or a question yet, held no stream (its
// status line lived in the table of who answered what), so an expert
// added or the workshop archived in another tab never reached it.
func TestEmptyWorkshopOverviewFollowsALiveChange(t *testing.T) {
	site := startSite(t)
	fac := signedInFacilitator(t, site)
	fac.viewport(1366, 900, false)
	fac.postFromPage("/workshops", "title=Empty+for+now+%28invented%29")
	wss, err := site.DB.Workshops(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	var address string
	for _, w := range wss {
		if w.Title == "Empty for now (invented)" {
			address = site.URL + "/w/" + strconv.FormatInt(w.ID, 10)
		}
	}
	if address == "" {
		t.Fatal("the new workshop was not saved")
	}
	fac.open(address + "/")
	fac.liveConnected("the overview's stream")
	shots := newScreenshots(t)
	shots.take(fac, "empty-overview-1366")
	fac.viewport(phoneWidth, phoneHeight, true)
	shots.take(fac, "empty-overview-390")
	fac.viewport(1366, 900, false)
	other := fac.tab("another tab")
	other.open(address + "/")
	other.postFromPage(address+"/experts", "name=Ada+Okafor+%28invented%29")
	if err := fac.poll(liveWithin+3*time.Second, `document.getElementById("roster").innerText.includes("Ada Okafor (invented)")`); err != nil {
		t.Errorf("the empty workshop's overview did not follow an expert added in another tab: %v", err)
	}
	other.postFromPage(address+"/archive", "action=archive&archive_reason=Made+by+mistake+%28invented%29.")
	if err := fac.poll(liveWithin+3*time.Second, `document.getElementById("archived-live").innerText.includes("This workshop is archived")`); err != nil {
		t.Errorf("the empty workshop's overview did not follow its archive in another tab: %v", err)
	}
}

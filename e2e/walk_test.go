package e2e

import (
	"fmt"
	"net/http"
	"os"
	"os/exec"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
)

// TestFirstTimeWalk is a workshop of the facilitator's own (not the demo),
// walked by three people who meet Parley for the first time: the
// facilitator, an expert on a phone and the project lead who receives the
// record. Invented scenario: a panel judging a new vaccine-cold-chain
// fridge's alarm faults.
func TestFirstTimeWalk(t *testing.T) {
	site := startSite(t)
	b := startBrowserFor(t, 4*time.Minute)
	shots := newScreenshots(t)
	// Each page at 1366 and 390 px, for a person to look at: only when
	// they are kept ($PARLEY_SCREENSHOTS), since the walk's checks do not
	// read them and a full page at 390 px takes a while.
	looked := os.Getenv("PARLEY_SCREENSHOTS") != ""
	both := func(p *person, name string, phone bool) {
		t.Helper()
		if !looked {
			return
		}
		shots.take(p, name+"-1366")
		p.viewport(phoneWidth, phoneHeight, phone)
		shots.take(p, name+"-390")
		if !phone {
			p.viewport(1366, 768, false)
		}
	}

	phoneShot := func(p *person, name string) {
		t.Helper()
		if looked {
			shots.take(p, name)
		}
	}

	fac := b.person("facilitator")
	fac.viewport(1366, 768, false)
	signIn(t, site, fac)
	both(fac, "w01-workshops", false)

	form := `form[action="/workshops"]`
	fac.fill(form, "title", "Fridge alarm panel (invented)")
	fac.fill(form, "purpose", "Invented: priors for the alarm fault rate of a new vaccine fridge.")
	fac.fill(form, "decision", "How many spare alarm boards to stock (invented).")
	if st := fac.load("create", chromedp.Click(chromedp.CSS(form+` button[type=submit]`))); st != http.StatusOK {
		t.Fatalf("create: %d", st)
	}
	wsURL := strings.TrimSuffix(fac.url(), "/") + "/"
	both(fac, "w02-new-workshop", false)

	qf := `form[action$="/questions"]`
	// addQuestion fills the question form's words, lets more fill the
	// rest (nil: quantiles at 5/50/95) and adds it.
	addQuestion := func(name, wording, quantity, units string, more func()) {
		fac.open(wsURL + "questions/new")
		if name == "q1" {
			both(fac, "w03-question-form", false)
		}
		fac.fill(qf, "wording", wording)
		fac.fill(qf, "quantity", quantity)
		fac.fill(qf, "units", units)
		if more != nil {
			more()
		}
		if st := fac.load("add "+name, chromedp.Click(chromedp.CSS(qf+` button[type=submit]`))); st != http.StatusOK {
			t.Fatalf("%s: %d\n%s", name, st, clip(fac.text(), 2000))
		}
	}
	// Q1: quantiles at 5/50/95 (the expert types percentages).
	addQuestion("q1", "Of the fridges of the new model installed this year, what share will raise a false alarm in their first month? (invented)",
		"false-alarm share", "share of fridges", nil)
	// Q2: chips in bins.
	addQuestion("q2", "Of the alarm boards returned under warranty, what share have a faulty sensor? (invented)",
		"faulty-sensor share", "share of returned boards", func() {
			fac.do("chips", chromedp.Click(chromedp.CSS(qf+` input[name=format][value=chips]`)))
			fac.fill(qf, "chips", "20")
		})
	// Q3: a calibration question, four-value interval.
	addQuestion("q3", "Last year, what share of the old model's fridges raised a false alarm in their first month? (invented; the true value is known)",
		"old model's false-alarm share", "share of fridges", func() {
			fac.do("interval", chromedp.Click(chromedp.CSS(qf+` input[name=format][value=interval]`)))
			fac.do("calibration", chromedp.Click(chromedp.CSS(qf+` input[name=calibration]`)))
			fac.fill(qf, "true_value", "0.07")
		})
	// Q4: a calibration question in quantiles, which the classical model scores.
	addQuestion("q4", "Last year, what share of the old model's alarm boards came back under warranty? (invented; the true value is known)",
		"old model's board return share", "share of boards", func() {
			fac.do("calibration", chromedp.Click(chromedp.CSS(qf+` input[name=calibration]`)))
			fac.fill(qf, "true_value", "0.3")
		})
	both(fac, "w04-overview-questions", false)

	links := map[string]string{}
	for _, n := range []string{"Ana Example", "Ben Invented", "Cai Sample"} {
		links[n] = addExpert(t, fac, wsURL, n, "Invented Cold Chain Ltd")
		if n == "Ana Example" {
			both(fac, "w05-link-page", false)
		}
	}
	fac.open(wsURL)
	both(fac, "w06-overview-roster", false)

	// The expert on a phone, for the first time.
	ana := b.person("Ana")
	ana.viewport(phoneWidth, phoneHeight, true)
	if st := ana.open(links["Ana Example"]); st != http.StatusOK {
		t.Fatalf("ana home %d", st)
	}
	phoneShot(ana, "x01-home-390")
	openQuestion(t, ana, links["Ana Example"], 1)
	phoneShot(ana, "x02-q1-empty-390")
	ana.do("percent", chromedp.Click(chromedp.CSS(`label[for=f-unit-percent]`)))
	typeValues(ana, "2", "6", "15")
	livePreview(t, ana, 3, nil, "15%")
	phoneShot(ana, "x03-q1-preview-390")
	saveAnswer(t, ana)
	phoneShot(ana, "x04-q1-saved-390")
	openQuestion(t, ana, links["Ana Example"], 2)
	ana.waitFor("the chips board", `!document.querySelector(".chips-board").hidden`)
	phoneShot(ana, "x05-q2-empty-390")
	for i, n := range []int{2, 6, 6, 3, 2, 1, 0, 0} {
		for k := 0; k < n; k++ {
			ana.do("place a chip", chromedp.Click(chromedp.CSS(fmt.Sprintf(`.chips-bin:nth-child(%d) .chips-add`, i+1))))
		}
	}
	phoneShot(ana, "x06-q2-chips-390")
	saveAnswer(t, ana)
	phoneShot(ana, "x07-q2-saved-390")
	openQuestion(t, ana, links["Ana Example"], 3)
	phoneShot(ana, "x08-q3-empty-390")
	for k, v := range map[string]string{"lowest": "0.02", "highest": "0.15", "best": "0.06", "confidence": "80"} {
		ana.fill(`form.answer-form`, k, v)
	}
	ana.do("show the fit", chromedp.Click(chromedp.CSS(`form.answer-form button:not([formaction])`)))
	time.Sleep(time.Second)
	phoneShot(ana, "x09-q3-fit-390")
	saveAnswer(t, ana)
	phoneShot(ana, "x10-q3-saved-390")
	openQuestion(t, ana, links["Ana Example"], 4)
	typeValues(ana, "15%", "25%", "40%")
	saveAnswer(t, ana)
	ana.open(links["Ana Example"])
	phoneShot(ana, "x11-home-done-390")

	// Ben and Cai answer at their desks.
	for name, vals := range map[string][][]string{
		"Ben Invented": {{"0.03", "0.08", "0.2"}, {"0", "3", "5", "6", "4", "2", "0", "0"}, {"0.04", "0.2", "0.09", "90"}, {"0.2", "0.28", "0.4"}},
		"Cai Sample":   {{"0.01", "0.03", "0.07"}, {"4", "8", "5", "2", "1", "0", "0", "0"}, {"0.05", "0.1", "0.07", "70"}, {"0.05", "0.1", "0.15"}},
	} {
		ex := b.person(name)
		ex.viewport(1366, 768, false)
		openQuestion(t, ex, links[name], 1)
		typeValues(ex, vals[0]...)
		saveAnswer(t, ex)
		openQuestion(t, ex, links[name], 2)
		ex.waitFor("the chips board", `!document.querySelector(".chips-board").hidden`)
		for i, v := range vals[1] {
			n := 0
			fmt.Sscan(v, &n)
			for k := 0; k < n; k++ {
				ex.do("place a chip", chromedp.Click(chromedp.CSS(fmt.Sprintf(`.chips-bin:nth-child(%d) .chips-add`, i+1))))
			}
		}
		saveAnswer(t, ex)
		openQuestion(t, ex, links[name], 3)
		for k, i := range map[string]int{"lowest": 0, "highest": 1, "best": 2, "confidence": 3} {
			v := vals[2][i]
			if i == 3 {
				v += "%"
			}
			ex.fill(`form.answer-form`, k, v)
		}
		ex.fill(`form.answer-form`, "reason", "Field returns of the old model, as I remember them (invented).")
		saveAnswer(t, ex)
		openQuestion(t, ex, links[name], 4)
		typeValues(ex, vals[3]...)
		saveAnswer(t, ex)
	}

	// Round 1 closes; the facilitator discusses.
	fac.open(wsURL)
	both(fac, "w07-overview-answered", false)
	fac.load("close round 1", chromedp.Click(chromedp.CSS(`#rounds button[type=submit]`)))
	both(fac, "w08-overview-closed", false)
	fac.open(wsURL + "q/1")
	fac.sees("a closed round's panel", "Round 1 is closed: judgements can be entered on an expert's behalf again once you open the next round")
	both(fac, "w09-panel-q1", false)
	if looked {
		shots.part(fac, "#enter", "w09a-panel-enter-closed")
	}
	fac.open(wsURL + "experts/1")
	both(fac, "w09b-expert-page-closed", false)
	fac.open(wsURL + "q/2")
	both(fac, "w10-panel-q2", false)
	fac.open(wsURL + "q/3")
	both(fac, "w11-panel-q3", false)
	fac.open(wsURL + "q/1/room")
	both(fac, "w12-room-q1", false)
	fac.open(wsURL)
	fac.fill(`#rounds form`, "reason", "The panel discussed why the 95% values differ so much.")
	fac.load("open round 2", chromedp.Click(chromedp.CSS(`#rounds button[type=submit]`)))
	both(fac, "w13-overview-round2", false)

	// Ana in round 2.
	ana.open(links["Ana Example"])
	phoneShot(ana, "x12-home-round2-390")
	openQuestion(t, ana, links["Ana Example"], 1)
	ana.sees("round 2 feedback", "What the other experts said", "You", "Equal-weight pool")
	notShown(t, ana, "round 2 feedback", "Ben Invented", "Cai Sample")
	phoneShot(ana, "x13-q1-round2-390")
	openQuestion(t, ana, links["Ana Example"], 2)
	phoneShot(ana, "x14-q2-round2-390")
	openQuestion(t, ana, links["Ana Example"], 3)
	phoneShot(ana, "x15-q3-round2-390")
	openQuestion(t, ana, links["Ana Example"], 1)
	typeValues(ana, "2", "5", "12")
	ana.fill(`form.answer-form`, "reason", "The others' lower medians persuaded me.")
	saveAnswer(t, ana)
	phoneShot(ana, "x16-q1-revised-390")

	// Calibration and weights.
	fac.open(wsURL + "calibration")
	both(fac, "w14-calibration", false)
	// reveal shows calibration question n's true value to the panel, as
	// planned, through its form on the calibration page.
	reveal := func(n int) {
		seed := fmt.Sprintf(`form[action$="/calibration/q/%d"]`, n)
		fac.do("reveal", chromedp.Click(chromedp.CSS(seed+` input[name=reveal]`)))
		fac.fill(seed, "reason", "Shown after round 2 opened, as planned.")
		fac.load("save true value", chromedp.Click(chromedp.CSS(seed+` button[type=submit]`)))
	}
	reveal(3)
	both(fac, "w15-calibration-revealed", false)
	reveal(4)
	wf := `form[action$="/calibration/weights"]`
	fac.do("performance", chromedp.Click(chromedp.CSS(wf+` input[name=scheme][value=performance]`)))
	if fac.count(wf) == 1 {
		fac.fill(wf, "reason", "The panel agreed to weight by calibration.")
		fac.load("set performance weights", chromedp.Click(chromedp.CSS(wf+` button[type=submit]`)))
		fac.sees("performance weights set", "They are the performance weights shown above.")
		both(fac, "w16-calibration-weights", false)
	} else {
		t.Errorf("no performance weights form on the calibration page")
	}
	ana.open(links["Ana Example"])
	openQuestion(t, ana, links["Ana Example"], 3)
	phoneShot(ana, "x17-q3-revealed-390")
	fac.open(wsURL + "q/2/room")
	both(fac, "w15a-room-q2", false)
	fac.open(wsURL + "q/4/room")
	both(fac, "w15b-room-q4", false)

	// Agree a prior on Q1 from the pool.
	fac.open(wsURL + "q/1")
	both(fac, "w17-panel-q1-round2", false)
	agree := `form[action$="/agree"]`
	fac.do("choose the pool's Beta", chromedp.Click(chromedp.CSS(agree+` input[name=source][value=pool]`)))
	fac.fill(agree, "rationale", "The panel accepts the performance-weight pool (invented).")
	if fac.count(agree+` input[name=confirm_open]`) > 0 {
		fac.do("confirm the open round", chromedp.Click(chromedp.CSS(agree+` input[name=confirm_open]`)))
	}
	if st := fac.load("record the agreed prior", chromedp.Click(chromedp.CSS(agree+` button[type=submit]`))); st != http.StatusOK {
		t.Fatalf("record the agreed prior: status %d\n%s", st, clip(fac.text(), 2000))
	}
	both(fac, "w18-panel-q1-agreed", false)
	fac.open(wsURL)
	fac.fill(`#rounds form`, "reason", "Round 2 done.")
	fac.load("close round 2", chromedp.Click(chromedp.CSS(`#rounds button[type=submit]`)))
	both(fac, "w19-overview-closed2", false)

	// The project lead: report, study page, export.
	fac.open(wsURL + "report")
	fac.sees("report", "single Beta", "Left out of the scores", "Q3 old model's false-alarm share: asked as a four-value interval")
	both(fac, "l01-report", false)
	fac.open(wsURL + "q/1/study")
	both(fac, "l02-study", false)
	fac.open(wsURL + "log")
	both(fac, "l03-log", false)
	for _, path := range []string{"export.json", "export.csv", "priors.csv", "calibration.csv", "q/1/export.json"} {
		st := eval[int](fac, "fetch "+path, fmt.Sprintf(`fetch(%q).then(r => r.status)`, wsURL+path))
		if st != http.StatusOK {
			t.Errorf("%s: status %d", path, st)
		}
		if looked {
			body := eval[string](fac, "read "+path, fmt.Sprintf(`fetch(%q).then(r => r.text())`, wsURL+path))
			_ = os.WriteFile(shots.dir+"/"+strings.ReplaceAll(path, "/", "-"), []byte(body), 0o644)
		}
	}
	fac.open(wsURL + "q/3")
	fac.sees("an interval calibration question's panel", "Left out of the calibration scores: it is asked as a four-value interval")
	shots.part(fac, "#agree-form", "w20-q3-consensus-form")
	shots.part(fac, "section.card", "w21-q3-summary")
	fac.open(wsURL + "report")
	pdf := fac.printPDF(papers[0], shots.dir+"/l04-report.pdf")
	// The printed report keeps the lead of a warning box with its
	// warnings: on A4 "How far these scores can carry weights:" ended
	// page 1, its one warning on page 2.
	if _, err := exec.LookPath("pdftotext"); err == nil {
		pages := strings.Split(strings.TrimRight(pdfText(t, pdf), "\f\n "), "\f")
		for i, pg := range pages[:len(pages)-1] {
			lines := strings.Split(strings.TrimRight(pg, "\n "), "\n")
			if last := strings.Join(strings.Fields(lines[len(lines)-1]), " "); strings.HasSuffix(last, ":") {
				t.Errorf("A4: page %d of %d ends with the lead %q, its text on the next page", i+1, len(pages), last)
			}
		}
	}

	// The workshop is archived; the expert comes back to their link.
	fac.open(wsURL)
	fac.fill(`form[action$="/archive"]`, "archive_reason", "Workshop done (invented).")
	fac.load("archive", chromedp.Click(chromedp.CSS(`form[action$="/archive"] button[type=submit]`)))
	both(fac, "w22-archived", false)
	ana.open(links["Ana Example"])
	ana.sees("archived workshop", "nothing more can be saved")
	phoneShot(ana, "x18-home-archived-390")
	openQuestion(t, ana, links["Ana Example"], 1)
	phoneShot(ana, "x19-q1-archived-390")
}

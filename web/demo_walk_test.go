package web

import (
	"context"
	"net/http"
	"net/url"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/record"
)

// The tests here come from walking the invented demo as its users would:
// an expert on a phone, the facilitator at a projector. Each checks the
// words or the figures of one thing that read badly on the demo's pages.

// figuresAfter returns the number written after each lead on body, in
// order.
func figuresAfter(t *testing.T, body string, leads ...string) []string {
	t.Helper()
	var out []string
	for _, lead := range leads {
		m := regexp.MustCompile(regexp.QuoteMeta(lead) + `([0-9][0-9.e-]*[0-9])`).FindStringSubmatch(body)
		if m == nil {
			t.Fatalf("the page has no number after %q", lead)
		}
		out = append(out, m[1])
	}
	return out
}

// TestSingleBetaGapReadsTheSameTwice: the demo's question 1 panel says
// how far the pool's single Beta is from the pool twice, in the pool's
// hint and in the warning under it. It wrote "at most 0.1271" above
// "differ by up to 0.127": one distance, two numbers, and a facilitator
// asks which one is right. Both carry the four figures every other
// probability gap on the panel carries (an expert's "largest probability
// gap", the agreed prior's).
func TestSingleBetaGapReadsTheSameTwice(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	_, body := h.get(workshopPath(ws.ID) + "/q/" + strconv.FormatInt(qs[0].ID, 10))
	got := figuresAfter(t, body, "The single Beta&#39;s CDF is at most ", "their CDFs differ by up to ")
	if got[0] != got[1] {
		t.Errorf("the panel writes the single Beta's distance from the pool as %s and as %s", got[0], got[1])
	}
	if n := len(strings.TrimLeft(strings.ReplaceAll(got[1], "0.", ""), "0")); n != 4 {
		t.Errorf("the warning writes the distance as %s, not to four figures", got[1])
	}
	// The study page's caveat on planning under the pool names the same
	// distance.
	_, study := h.get(workshopPath(ws.ID) + "/q/" + strconv.FormatInt(qs[0].ID, 10) + "/study")
	if s := figuresAfter(t, study, "their CDFs differ by up to "); s[0] != got[0] {
		t.Errorf("the study page writes the distance as %s, the panel as %s", s[0], got[0])
	}
}

// TestWeightMapWritesTheTablesScores: on the demo's calibration page the
// weight map's words said "cut-off α = 0.839" and "Ines Varga:
// calibration 0.839, information 0.208" just above a table and a sentence
// that say 0.8392 and 0.2078. The map now writes each expert's scores,
// and the cut-off, with the table's figures.
func TestWeightMapWritesTheTablesScores(t *testing.T) {
	h, ws, _, es, _ := seeded(t)
	_, body := h.get(calibrationPath(ws.ID))
	row := regexp.MustCompile(`<th scope="row">([^<]+)</th>\s*<td class="num" data-label="answered">\d+</td>\s*<td class="num" data-label="calibration">([^<]+)</td>\s*<td class="num" data-label="information">([^<]+)</td>`)
	rows := row.FindAllStringSubmatch(body, -1)
	if len(rows) != len(es) {
		t.Fatalf("the scores table has %d expert rows, want %d", len(rows), len(es))
	}
	for _, r := range rows {
		want := r[1] + ": calibration " + r[2] + ", information " + r[3] + ","
		if !strings.Contains(body, want) {
			t.Errorf("the weight map's words lack %q, the table's scores", want)
		}
	}
	alpha := figuresAfter(t, body, "Cut-off α = ")[0]
	for _, want := range []string{"cut-off α = " + alpha + "<", "Experts left of the cut-off α = " + alpha + " get weight 0"} {
		if !strings.Contains(body, want) {
			t.Errorf("the weight map lacks %q, the cut-off the sentence under it gives", want)
		}
	}
}

// TestSteadinessNamesTheLargestShiftAsTheTableDoes: the demo's steadiness
// picture said "The largest is 0.011, without Ines Varga." over a table
// whose largest shift is 0.01113, beside two other rows that also read
// 0.011 in the picture: which was the largest could not be told. The
// picture's words write it with the table's figures.
func TestSteadinessNamesTheLargestShiftAsTheTableDoes(t *testing.T) {
	h, ws, _, _, _ := seeded(t)
	_, body := h.get(calibrationPath(ws.ID))
	got := figuresAfter(t, body, "The largest is ", "the largest of all is ")
	if got[0] != got[1] {
		t.Errorf("the demo's one target question: the picture's largest shift reads %s, the table's %s", got[0], got[1])
	}
}

// TestCalibrationQuestionsSayWhoHasAnswered: the demo's calibration
// questions said "Answered by: Ines Varga, Tomas Lindqvist, Priya Raman,
// Ole Brandt. Not yet: nobody." (a placeholder's words) and "Revealing
// freezes the answers: Tomas Lindqvist, Priya Raman have not answered".
// They read as sentences now.
func TestCalibrationQuestionsSayWhoHasAnswered(t *testing.T) {
	h, ws, _, _, _ := seeded(t)
	_, body := h.get(calibrationPath(ws.ID))
	for _, want := range []string{
		"Answered by everyone: Ines Varga, Tomas Lindqvist, Priya Raman and Ole Brandt.",          // Q4 to Q6
		"Answered by Ines Varga and Ole Brandt. Not yet: Tomas Lindqvist and Priya Raman.",        // Q2
		"Answered by Tomas Lindqvist. Not yet: Ines Varga, Priya Raman and Ole Brandt.",           // Q3
		"Revealing freezes the answers: Tomas Lindqvist and Priya Raman have not answered",        // Q2
		"Revealing freezes the answers: Ines Varga, Priya Raman and Ole Brandt have not answered", // Q3
	} {
		if !strings.Contains(body, want) {
			t.Errorf("the calibration page lacks %q", want)
		}
	}
	if strings.Contains(body, "nobody") {
		t.Error("the calibration page says \"nobody\" where everyone has answered")
	}
}

func TestWordList(t *testing.T) {
	for _, c := range []struct {
		in   []string
		want string
	}{{nil, ""}, {[]string{"A"}, "A"}, {[]string{"A", "B"}, "A and B"}, {[]string{"A", "B", "C"}, "A, B and C"}} {
		if got := wordList(c.in); got != c.want {
			t.Errorf("wordList(%q) = %q, want %q", c.in, got, c.want)
		}
	}
}

// TestSpikeNoteListsTheCurvesAsProse: on the demo's question 1, Ole
// Brandt's spike and the pool rise above the density axis; the note under
// the picture said "for Ole Brandt, Equal-weight pool", which reads as
// one curve's name, then "for Ole Brandt and Equal-weight pool", as if the
// pool were a person.
func TestSpikeNoteListsTheCurvesAsProse(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	_, body := h.get(workshopPath(ws.ID) + "/q/" + strconv.FormatInt(qs[0].ID, 10))
	if want := "(cut at 80) for Ole Brandt and the equal-weight pool."; !strings.Contains(body, want) {
		t.Errorf("the panel's picture lacks %q", want)
	}
}

// TestExpertHomeSaysWhatALaterRoundAsks: in the demo's round 2 an
// expert's home said only "Round 2 is open: you can enter and revise your
// answers", beside grey tags reading "answered in an earlier round": it
// did not say where the other experts' answers are, nor that an answer
// left alone still counts.
func TestExpertHomeSaysWhatALaterRoundAsks(t *testing.T) {
	h, ws, _, _, links := seeded(t)
	const next = "an answer you leave as it is stays your judgement"
	if _, body := h.get(links[0].Path); strings.Contains(body, next) {
		t.Error("round 1's home speaks of a later round")
	}
	for _, f := range []url.Values{{"action": {"close"}}, {"action": {"open"}, "reason": {"Discussed (invented)."}}} {
		if res, _ := h.post(workshopPath(ws.ID)+"/round", f); res.StatusCode != http.StatusSeeOther {
			t.Fatalf("round %v: %d", f, res.StatusCode)
		}
	}
	_, body := h.get(links[0].Path)
	// An answer from round 1 is tagged as the one that stands, not in the
	// grey of "not answered yet".
	for _, want := range []string{"what the other experts said in round 1, without their names", next, `<span class="tag tag-kept">your round 1 answer stands</span>`} {
		if !strings.Contains(body, want) {
			t.Errorf("round 2's home lacks %q", want)
		}
	}
}

// TestUnshownTrueValuesCountedAlike: the demo's calibration page said "5
// calibration questions' true values are not yet shown" and its report
// "(4 not yet)": the page counted question 3, which asks at other
// probabilities and is left out of the scores, so its true value holds
// nothing back. Both count the questions the scores wait on.
func TestUnshownTrueValuesCountedAlike(t *testing.T) {
	h, ws, _, _, _ := seeded(t)
	_, page := h.get(calibrationPath(ws.ID))
	_, report := h.get(workshopPath(ws.ID) + "/report")
	pm := regexp.MustCompile(`(\d+) calibration questions&#39; true values are not yet shown`).FindStringSubmatch(page)
	rm := regexp.MustCompile(`true value is revealed \((\d+) not yet\)`).FindStringSubmatch(report)
	if pm == nil || rm == nil {
		t.Fatalf("the page's count %v, the report's %v", pm, rm)
	}
	if pm[1] != rm[1] || pm[1] != "4" {
		t.Errorf("the calibration page counts %s true values not yet shown, the report %s; the demo's scores wait on 4", pm[1], rm[1])
	}
	for _, want := range []string{"once the true value of every scored calibration question is shown"} {
		if !strings.Contains(page, want) {
			t.Errorf("the calibration page lacks %q", want)
		}
	}
	if want := "every scored calibration question&#39;s true value is revealed"; !strings.Contains(report, want) {
		t.Errorf("the report lacks %q", want)
	}
}

// TestQuestionFormMarksTheWordingRequiredAsTheOthers: the question form
// marked its quantity "(required)" beside the label, as every other form
// does, but its wording by a hint starting "Required." under the box.
// And every form marks a required field the same way: a one-line field
// wrote "(required)" in quieter type after its name, a text box wrote it
// in the label's own bold, so "Quantity (required)" and "Wording the
// experts read (required)" looked like two kinds of rule.
func TestQuestionFormMarksTheWordingRequiredAsTheOthers(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	label := regexp.MustCompile(`(?s)<label[^>]*>(.*?)</label>`)
	const mark = `<span class="required">(required)</span>`
	q := workshopPath(ws.ID) + "/q/" + strconv.FormatInt(qs[0].ID, 10)
	for _, path := range []string{workshopPath(ws.ID) + "/questions/new", q + "/edit", q, workshopPath(ws.ID), workshopPath(ws.ID) + "/calibration", "/"} {
		_, body := h.get(path)
		n, wording := 0, false
		for _, m := range label.FindAllStringSubmatch(body, -1) {
			if !strings.Contains(m[1], "(required)") {
				continue
			}
			n++
			wording = wording || strings.Contains(m[1], "Wording the experts read")
			if strings.Count(m[1], "(required)") != 1 || !strings.Contains(m[1], mark) {
				t.Errorf("%s: a required field's label does not mark it as the others do: %s", path, strings.Join(strings.Fields(m[1]), " "))
			}
		}
		if n == 0 {
			t.Errorf("%s: no field marked required; the check read nothing", path)
		}
		if form := strings.HasSuffix(path, "/new") || strings.HasSuffix(path, "/edit"); form && (!wording || strings.Contains(body, "Required. Ask about")) {
			t.Errorf("%s: the wording is not marked required as the other fields are", path)
		}
	}
}

// TestRosterButtonsSayTheyAsk: on the overview's panel "Revoke…" says by
// its ellipsis that it asks before it acts; "New link", beside it, asks
// too (a new link ends the expert's working one) but did not say so.
func TestRosterButtonsSayTheyAsk(t *testing.T) {
	h, ws, _, es, _ := seeded(t)
	_, body := h.get(workshopPath(ws.ID))
	if n := strings.Count(body, ">New link…</button>"); n != len(es) || strings.Contains(body, ">New link</button>") {
		t.Errorf("%d of %d \"New link\" buttons say that they ask first", n, len(es))
	}
	// And it does ask: the button's post answers with a page to confirm,
	// and the link stays as it was.
	res, page := h.post(workshopPath(ws.ID)+"/experts/"+strconv.FormatInt(es[0].ID, 10)+"/reissue", url.Values{})
	if res.StatusCode != http.StatusOK || !strings.Contains(page, "New link for "+es[0].Name) {
		t.Errorf("a new link without confirming: status %d", res.StatusCode)
	}
}

// TestStudyPlanNamesItsPriorAsALabel: the demo's plan was headed "Under
// Agreed prior, Beta(2.951, 55.56)", a sentence with a capital where the
// prior's name (also "Equal-weight pool", "Ines Varga") starts; it is
// headed as the form's "Plan under" field names it.
func TestStudyPlanNamesItsPriorAsALabel(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	_, body := h.get(workshopPath(ws.ID) + "/q/" + strconv.FormatInt(qs[0].ID, 10) + "/study?trials=100")
	if !strings.Contains(body, "<h3>Planned under: Agreed prior, Beta(2.951, 55.56)</h3>") || strings.Contains(body, "<h3>Under ") {
		t.Error("the demo's plan is not headed \"Planned under: Agreed prior, Beta(2.951, 55.56)\"")
	}
}

// TestScoresSayWhichCalibrationQuestionsAreLeftOut: the demo has five
// calibration questions, and its calibration page opened with "Cooke's
// classical model on 4 calibration questions" and "Only 4 calibration
// questions were scored", naming question 3, which asks at other
// probabilities, only at the page's foot. The first line says one more
// is left out, and links there.
func TestScoresSayWhichCalibrationQuestionsAreLeftOut(t *testing.T) {
	h, ws, _, _, _ := seeded(t)
	_, body := h.get(calibrationPath(ws.ID))
	if !strings.Contains(body, `One more is <a href="#skipped">left out of the scores</a>.`) || !strings.Contains(body, `id="skipped"`) {
		t.Error("the scores' first line does not say that one calibration question is left out")
	}
}

// TestPanelNamesTheTrueValueInOneSentence: the demo's calibration
// question's panel read "True value (hidden from experts ): 0.0413", a
// space before the bracket; once revealed it read "(hidden from experts ,
// now revealed )".
func TestPanelNamesTheTrueValueInOneSentence(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	panel := workshopPath(ws.ID) + "/q/" + strconv.FormatInt(qs[1].ID, 10)
	if _, body := h.get(panel); !strings.Contains(body, "True value (hidden from the experts): <strong>0.0413</strong>") {
		t.Error("the hidden true value is not named in one sentence")
	}
	if err := h.db.SetTrueValue(context.Background(), qs[1].ID, 0.0413, true, "Answers in (invented)."); err != nil {
		t.Fatal(err)
	}
	if _, body := h.get(panel); !strings.Contains(body, "True value (revealed to the experts): <strong>0.0413</strong>") {
		t.Error("the revealed true value is not named in one sentence")
	}
}

// TestCountsAgreeWithTheirNumbers: the room's progress line read "0 of 4
// experts have revised this question in round 2 so far." (an empty
// table) and "1 of 4 experts have revised"; the report's "1 of 1 target
// questions have an agreed prior"; and an expert's picture named their
// own curve "You" mid-sentence ("for You and Equal-weight pool").
func TestCountsAgreeWithTheirNumbers(t *testing.T) {
	for _, c := range []struct {
		answered, active, round int
		want                    string
	}{
		{0, 4, 2, "No expert has revised this question in round 2 yet."},
		{1, 4, 2, "1 of 4 experts has revised this question in round 2 so far."},
		{3, 4, 2, "3 of 4 experts have revised this question in round 2 so far."},
		{1, 1, 1, "1 of 1 expert has answered this question in round 1 so far."},
	} {
		verb := "answered"
		if c.round > 1 {
			verb = "revised"
		}
		if got := roomProgress(c.answered, c.active, verb, c.round); got != c.want {
			t.Errorf("roomProgress(%d, %d) = %q, want %q", c.answered, c.active, got, c.want)
		}
	}
	qs := []record.Question{{AgreedPrior: &record.Prior{}}}
	if got := agreedCount(qs); got != "1 of 1 target question has an agreed prior" {
		t.Errorf("agreedCount = %q", got)
	}
	if got := agreedCount(append(qs, record.Question{})); got != "1 of 2 target questions has an agreed prior" {
		t.Errorf("agreedCount = %q", got)
	}
	// In round 2 Ole Brandt's own spike rises above the density axis on
	// question 1: his page names it as his curve, and the pool as the
	// sentence above the picture does, without the number the plot stops
	// at, which his page no longer writes on the axis.
	h, ws, qs1, _, links := seeded(t)
	for _, f := range []url.Values{{"action": {"close"}}, {"action": {"open"}, "reason": {"Discussed (invented)."}}} {
		if res, _ := h.post(workshopPath(ws.ID)+"/round", f); res.StatusCode != http.StatusSeeOther {
			t.Fatalf("round %v: %d", f, res.StatusCode)
		}
	}
	_, body := h.get(links[3].Path + "q/" + strconv.FormatInt(qs1[0].ID, 10))
	if strings.Contains(body, "of You") || !strings.Contains(body, "The upper plot stops below the peak of your curve and the equal-weight pool.") {
		t.Errorf("Ole's page does not name his clipped curve as his: %q", regexp.MustCompile(`The upper plot stops[^<]*`).FindString(body))
	}
}

// TestSteadinessPictureWritesTheTablesShifts: the demo's steadiness
// picture wrote each rerun's largest shift to two figures, so three rows
// read 0.011 beside a table saying 0.01109, 0.01109 and 0.01113. The
// picture's column writes the table's figures, in both its drawings.
func TestSteadinessPictureWritesTheTablesShifts(t *testing.T) {
	h, ws, _, _, _ := seeded(t)
	_, body := h.get(calibrationPath(ws.ID))
	cells := func(re string) []string {
		var out []string
		for _, m := range regexp.MustCompile(re).FindAllStringSubmatch(body, -1) {
			out = append(out, m[1])
		}
		return out
	}
	picture := cells(`<text class="steady-shift"[^>]*>([^<]+)</text>`)
	table := cells(`<td class="num" data-label="largest shift">([^<]+)</td>`)
	// The picture is drawn twice, wide and compact (a phone).
	if len(table) < 2 || strings.Join(picture, " ") != strings.Join(append(table, table...), " ") {
		t.Errorf("the demo's one target question: the picture's shifts read %q, the table's %q", picture, table)
	}
}

// TestStudyPictureNamesEachPriorAsTheTableDoes: at 1366 px the demo's
// study page labelled a line of its picture of the priors compared
// "Performance-weight pool…", cut before "(suggested)", beside a table
// naming it in full. A label too long for the picture's column takes two
// lines; read together they are the table's name.
func TestStudyPictureNamesEachPriorAsTheTableDoes(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	_, body := h.get(workshopPath(ws.ID) + "/q/" + strconv.FormatInt(qs[0].ID, 10) + "/study?trials=100")
	table := regexp.MustCompile(`(?s)<table class="table table-compact compare-table">.*?</table>`).FindString(body)
	var names []string
	for _, m := range regexp.MustCompile(`<th scope="row">([^<]+)</th>`).FindAllStringSubmatch(table, -1) {
		names = append(names, m[1])
	}
	if !strings.Contains(strings.Join(names, "|"), "Performance-weight pool (suggested)") {
		t.Fatalf("the demo's priors compared are %q, without the suggested performance-weight pool", names)
	}
	var labels []string
	for _, m := range regexp.MustCompile(`(?s)<text class="interval-label[^"]*"[^>]*>(.*?)</text>`).FindAllStringSubmatch(body, -1) {
		l := regexp.MustCompile(`</tspan>\s*<tspan[^>]*>`).ReplaceAllString(m[1], " ")
		labels = append(labels, strings.TrimSpace(regexp.MustCompile(`<[^>]+>`).ReplaceAllString(l, "")))
	}
	// One picture, drawn wide and compact.
	if want := strings.Join(append(names, names...), "|"); strings.Join(labels, "|") != want {
		t.Errorf("the picture labels its lines %q, the table names its priors %q", labels, names)
	}
}

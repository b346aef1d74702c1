package web

import (
	"context"
	"net/http"
	"net/url"
	"strconv"
	"strings"
	"testing"
)

// TestUnscorableCalibrationQuestionSaysSoBeforeAnswers: a facilitator new
// to Parley asked a calibration question as a four-value interval, the
// experts answered it, and only then did the calibration page say it is
// left out of the scores, with its format fixed by the answers: the
// workshop had no performance weights. The question form says which
// calibration questions are scored before one is added, and the
// question's panel says at once that this one is not, while its format
// can still be corrected.
func TestUnscorableCalibrationQuestionSaysSoBeforeAnswers(t *testing.T) {
	h := newHarness(t)
	h.signIn()
	ws := h.newWorkshop("Unscored seed (invented)")
	_, form := h.get(workshopPath(ws.ID) + "/questions/new")
	if !strings.Contains(form, "Only calibration questions asked as quantiles, at the same probabilities as each other, are scored for performance weights") {
		t.Error("the question form does not say which calibration questions are scored")
	}
	if res, body := h.post(workshopPath(ws.ID)+"/questions", url.Values{"wording": {"Interval seed"}, "quantity": {"interval seed share"},
		"lower": {"0"}, "upper": {"1"}, "format": {"interval"}, "calibration": {"on"}, "true_value": {"0.3"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("interval seed: %d %s", res.StatusCode, body)
	}
	qs, err := h.db.Questions(context.Background(), ws.ID)
	if err != nil || len(qs) != 1 {
		t.Fatalf("questions %v, %v", qs, err)
	}
	_, panel := h.get(questionPath(ws.ID, qs[0].ID))
	if !strings.Contains(panel, "Left out of the calibration scores: it is asked as a four-value interval, and the classical model scores answers given as quantiles.") {
		t.Error("the panel of a calibration question asked as an interval does not say it is left out of the scores")
	}
}

// TestConsensusConfidenceSaysItIsAPercentage: the agreed-prior form's
// consensus judgement on a four-value interval asked "How sure is the
// panel …?" with a bare box, where the expert's own form says "A
// percentage, for example 80 for 80% sure." with a % beside the box; a
// facilitator typing the panel's 0.8 was refused as a likely 80%.
func TestConsensusConfidenceSaysItIsAPercentage(t *testing.T) {
	h := newHarness(t)
	h.signIn()
	ws := h.newWorkshop("Consensus interval (invented)")
	if res, body := h.post(workshopPath(ws.ID)+"/questions", url.Values{"wording": {"Interval question"}, "quantity": {"interval share"},
		"lower": {"0"}, "upper": {"1"}, "format": {"interval"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("interval question: %d %s", res.StatusCode, body)
	}
	qs, err := h.db.Questions(context.Background(), ws.ID)
	if err != nil || len(qs) != 1 {
		t.Fatalf("questions %v, %v", qs, err)
	}
	_, panel := h.get(questionPath(ws.ID, qs[0].ID))
	form := panel[strings.Index(panel, `id="agree-form"`):]
	if !strings.Contains(form, `<span class="hint" id="cf-confidence-hint">A percentage, for example 80 for 80% sure.</span>`) ||
		!strings.Contains(form, `aria-describedby="cf-confidence-hint"`) || !strings.Contains(form, `<span class="input-suffix">%</span>`) {
		t.Error("the consensus confidence does not say it is typed as a percentage")
	}
}

// TestPerformanceWeightsWithNothingToScoreSayWhy: with its one
// calibration question asked as a four-value interval, answered by
// everyone and given its true value, a workshop asking for performance
// weights was told they "need every calibration question answered and
// given its true value", which it had; what they need is a calibration
// question the classical model scores.
func TestPerformanceWeightsWithNothingToScoreSayWhy(t *testing.T) {
	h := newHarness(t)
	h.signIn()
	ws := h.newWorkshop("Nothing to score (invented)")
	if res, body := h.post(workshopPath(ws.ID)+"/questions", url.Values{"wording": {"Interval seed"}, "quantity": {"interval seed share"},
		"lower": {"0"}, "upper": {"1"}, "format": {"interval"}, "calibration": {"on"}, "true_value": {"0.3"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("interval seed: %d %s", res.StatusCode, body)
	}
	_, link := h.addExpert(ws, "Ann Invented")
	qs, err := h.db.Questions(context.Background(), ws.ID)
	if err != nil || len(qs) != 1 {
		t.Fatalf("questions %v, %v", qs, err)
	}
	if res, body := h.post(expertPath(link)+"q/"+strconv.FormatInt(qs[0].ID, 10)+"/save", url.Values{
		"lowest": {"0.1"}, "highest": {"0.5"}, "best": {"0.3"}, "confidence": {"80"}}); res.StatusCode != http.StatusSeeOther && res.StatusCode != http.StatusOK {
		t.Fatalf("answer: %d %s", res.StatusCode, body)
	}
	before := h.counts(ws.ID)
	res, body := h.post(calibrationPath(ws.ID)+"/weights", url.Values{"scheme": {"performance"}, "reason": {"By calibration (invented)."}})
	if res.StatusCode != http.StatusUnprocessableEntity || h.counts(ws.ID) != before {
		t.Fatalf("performance weights with nothing to score: %d", res.StatusCode)
	}
	if !strings.Contains(body, "performance weights need at least one answered calibration question asked in quantiles, and this workshop has none") {
		t.Errorf("the refusal does not say what is missing:\n%s", body[strings.Index(body, `id="weights"`):])
	}
	if strings.Contains(body, "need every calibration question answered and given its true value") {
		t.Error("the refusal asks for what the workshop has")
	}
}

// TestReportFinalJudgementAsGiven: the report's "Each expert's final
// judgement" wrote a four-value interval (lowest 0.1, highest 0.5, best
// 0.3, 80% sure) as "10%: 0.1; 50%: 0.3; 90%: 0.5", which the expert
// never typed, under the same "Stated" as the history below it, which
// writes it as given; and chips as the fractions below each edge.
func TestReportFinalJudgementAsGiven(t *testing.T) {
	h := newHarness(t)
	h.signIn()
	ws := h.newWorkshop("Report as given (invented)")
	for _, q := range []url.Values{
		{"wording": {"Interval question"}, "quantity": {"interval share"}, "lower": {"0"}, "upper": {"1"}, "format": {"interval"}},
		{"wording": {"Chips question"}, "quantity": {"chips share"}, "lower": {"0"}, "upper": {"1"}, "format": {"chips"}, "bin_edges": {"0 0.25 0.5 1"}, "chips": {"10"}},
	} {
		if res, body := h.post(workshopPath(ws.ID)+"/questions", q); res.StatusCode != http.StatusSeeOther {
			t.Fatalf("question: %d %s", res.StatusCode, body)
		}
	}
	_, link := h.addExpert(ws, "Ann Invented")
	qs, err := h.db.Questions(context.Background(), ws.ID)
	if err != nil || len(qs) != 2 {
		t.Fatalf("questions %v, %v", qs, err)
	}
	for i, a := range []url.Values{
		{"lowest": {"0.1"}, "highest": {"0.5"}, "best": {"0.3"}, "confidence": {"80"}},
		{"counts[0]": {"2"}, "counts[1]": {"5"}, "counts[2]": {"3"}},
	} {
		if res, body := h.post(expertPath(link)+"q/"+strconv.FormatInt(qs[i].ID, 10)+"/save", a); res.StatusCode != http.StatusSeeOther && res.StatusCode != http.StatusOK {
			t.Fatalf("answer %d: %d %s", i+1, res.StatusCode, body)
		}
	}
	_, report := h.get(workshopPath(ws.ID) + "/report")
	var fits []string
	for _, part := range strings.Split(report, `class="table table-compact table-fits"`)[1:] {
		fits = append(fits, part[:strings.Index(part, "</table>")])
	}
	if len(fits) != 2 {
		t.Fatalf("%d tables of final judgements, want 2", len(fits))
	}
	for i, want := range []string{"lowest\u00a00.1; highest\u00a00.5; best\u00a00.3; sure\u00a080%", "chips 2, 5, 3"} {
		if !strings.Contains(fits[i], want) {
			t.Errorf("question %d's final judgement is not written as given (%q):\n%s", i+1, want, fits[i])
		}
	}
	if strings.Contains(fits[0], "10%:") {
		t.Error("the interval's final judgement is written as quantiles it never stated")
	}
}

// TestOneScoredCalibrationQuestionInTheSingular: under performance
// weights from one calibration question the calibration page said the
// weights were stored with "the 1 calibration question scored with their
// true values".
func TestOneScoredCalibrationQuestionInTheSingular(t *testing.T) {
	h := newHarness(t)
	h.signIn()
	ws := h.newWorkshop("One seed (invented)")
	if res, body := h.post(workshopPath(ws.ID)+"/questions", url.Values{"wording": {"Seed"}, "quantity": {"seed share"},
		"lower": {"0"}, "upper": {"1"}, "format": {"quantiles"}, "preset": {"p05_50_95"}, "calibration": {"on"}, "true_value": {"0.3"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("seed: %d %s", res.StatusCode, body)
	}
	qs, err := h.db.Questions(context.Background(), ws.ID)
	if err != nil || len(qs) != 1 {
		t.Fatalf("questions %v, %v", qs, err)
	}
	for i, vs := range [][]string{{"0.2", "0.28", "0.4"}, {"0.05", "0.1", "0.15"}} {
		_, link := h.addExpert(ws, []string{"Ann Invented", "Bo Invented"}[i])
		if res, body := h.post(expertPath(link)+"q/"+strconv.FormatInt(qs[0].ID, 10)+"/save", url.Values{
			"values[0]": {vs[0]}, "values[1]": {vs[1]}, "values[2]": {vs[2]}}); res.StatusCode != http.StatusSeeOther && res.StatusCode != http.StatusOK {
			t.Fatalf("answer: %d %s", res.StatusCode, body)
		}
	}
	if res, body := h.post(calibrationPath(ws.ID)+"/weights", url.Values{"scheme": {"performance"}, "reason": {"By calibration (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("performance weights: %d %s", res.StatusCode, body)
	}
	_, page := h.get(calibrationPath(ws.ID))
	if !strings.Contains(page, "the 1 calibration question scored with its true value,") {
		t.Error("one scored calibration question is not written in the singular")
	}
}

// TestLinkPageSaysToCopyBeforeTheNext: a facilitator new to Parley adds
// the panel one expert after another from the link page's own form; each
// page shows only the expert just added, so the earlier links were gone
// from the screen before they were copied. The page says to copy the link
// first.
func TestLinkPageSaysToCopyBeforeTheNext(t *testing.T) {
	h := newHarness(t)
	h.signIn()
	ws := h.newWorkshop("Links (invented)")
	res, _ := h.post(workshopPath(ws.ID)+"/experts", url.Values{"name": {"Ann Invented"}})
	if res.StatusCode != http.StatusSeeOther {
		t.Fatalf("add expert: %d", res.StatusCode)
	}
	_, page := h.get(res.Header.Get("Location"))
	if !strings.Contains(page, "Copy it before you add the next expert: the next page shows only theirs.") {
		t.Error("the link page does not say to copy the link before adding the next expert")
	}
}

// TestClosedRoundPanelOffersNoEntry: while round 1 was closed for the
// discussion, each question's panel offered "Enter or revise" on an
// expert's behalf, which led only to a page saying nothing can be entered
// until the next round opens. The panel says so itself, and where the
// next round is opened.
func TestClosedRoundPanelOffersNoEntry(t *testing.T) {
	h := newHarness(t)
	h.signIn()
	ws := h.newWorkshop("Closed round entry (invented)")
	if res, body := h.post(workshopPath(ws.ID)+"/questions", url.Values{"wording": {"Question"}, "quantity": {"a share"},
		"lower": {"0"}, "upper": {"1"}, "format": {"quantiles"}, "preset": {"p05_50_95"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("question: %d %s", res.StatusCode, body)
	}
	ann, _ := h.addExpert(ws, "Ann Invented")
	qs, err := h.db.Questions(context.Background(), ws.ID)
	if err != nil || len(qs) != 1 {
		t.Fatalf("questions %v, %v", qs, err)
	}
	_, open := h.get(questionPath(ws.ID, qs[0].ID))
	if !strings.Contains(open, "Enter or revise") {
		t.Fatal("an open round's panel offers no entry on an expert's behalf")
	}
	if res, body := h.post(workshopPath(ws.ID)+"/round", url.Values{"action": {"close"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("close round 1: %d %s", res.StatusCode, body)
	}
	_, closed := h.get(questionPath(ws.ID, qs[0].ID))
	if strings.Contains(closed, "Enter or revise") {
		t.Error("a closed round's panel offers to enter a judgement, which the entry page can only refuse")
	}
	if !strings.Contains(closed, "Round 1 is closed: judgements can be entered on an expert's behalf again once you open the next round on the") {
		t.Error("a closed round's panel does not say when judgements can be entered again")
	}
	// The expert's own page offered the same way in beside each question.
	_, page := h.get(expertPagePath(ws.ID, ann.ID))
	if strings.Contains(page, "Enter or revise") {
		t.Error("a closed round's page of one expert offers to enter a judgement, which the entry page can only refuse")
	}
	if !strings.Contains(page, "Round 1 is closed: judgements can be entered on Ann Invented's behalf again once you open the next round on the") {
		t.Error("a closed round's page of one expert does not say when judgements can be entered again")
	}
}

// TestLogSaysAskedAsAFourValueInterval: the decision log said
// "Calibration question, asked as four-value interval."
func TestLogSaysAskedAsAFourValueInterval(t *testing.T) {
	h := newHarness(t)
	h.signIn()
	ws := h.newWorkshop("Log words (invented)")
	if res, body := h.post(workshopPath(ws.ID)+"/questions", url.Values{"wording": {"Interval question"}, "quantity": {"interval share"},
		"lower": {"0"}, "upper": {"1"}, "format": {"interval"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("question: %d %s", res.StatusCode, body)
	}
	if _, log := h.get(workshopPath(ws.ID) + "/log"); !strings.Contains(log, "Target question, asked as a four-value interval.") {
		t.Error("the log does not say the question is asked as a four-value interval")
	}
}

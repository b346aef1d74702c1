package web

import (
	"context"
	"net/http"
	"net/url"
	"strconv"
	"strings"
	"testing"
)

// Walking the invented demo: under weights that give its only answerer
// weight 0 (as the demo's performance weights do Tomas Lindqvist, the one
// expert who answered Q3), a question has no pool, and the panel and the
// report said so in the program's own words, "The pool cannot be formed:
// elicit: weights: weights must not all be zero" (the report without even
// the first half). They say it in the facilitator's: whose weight is 0,
// under which weights, and what makes a pool again.
func TestNoPoolWhenEveryAnswererHasWeightZero(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	q3 := qs[2] // answered by Tomas Lindqvist alone
	if es[1].Name != "Tomas Lindqvist" || !strings.Contains(q3.Quantity, "capacitor") {
		t.Fatalf("the demo changed: %s, Q3 %s", es[1].Name, q3.Quantity)
	}
	form := url.Values{"scheme": {"custom"}, "reason": {"Tomas set aside for the check (invented)."}}
	for i, e := range es {
		form.Set(weightField(e.ID), []string{"1", "0", "1", "1"}[i])
	}
	if res, body := h.post(questionPath(ws.ID, qs[0].ID)+"/weights", form); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("weights: %d %s", res.StatusCode, body)
	}
	_, panel := h.get(questionPath(ws.ID, q3.ID))
	_, report := h.get(workshopPath(ws.ID) + "/report")
	for where, body := range map[string]string{"panel": panel, "report": report} {
		for _, jargon := range []string{"elicit:", "must not all be zero"} {
			if strings.Contains(body, jargon) {
				t.Errorf("the %s says why Q3 has no pool in the program's words (%q)", where, jargon)
			}
		}
	}
	if want := "No pool: every expert who answered this question (Tomas Lindqvist) has weight 0 under the weights you set, and a pool needs some weight."; !strings.Contains(panel, want) {
		t.Errorf("the panel does not say %q", want)
	}
	if want := "No pool: every expert who answered this question (Tomas Lindqvist) has weight 0 under the weights you set, and a pool needs some weight."; !strings.Contains(report, want) {
		t.Errorf("the report does not say %q", want)
	}
	// The answer is still drawn, without a pool: the picture had been
	// left out, and Q3's only answer was a row of numbers.
	if n := strings.Count(wideOnly(panel), `class="curve curve-cdf curve-expert"`); n != 1 || !strings.Contains(panel, `data-label="Tomas Lindqvist"`) {
		t.Errorf("the panel draws %d experts' curves for Q3, want Tomas Lindqvist's", n)
	}
	if strings.Contains(wideOnly(panel), "curve-pool") {
		t.Error("the panel draws a pool for Q3, which has none")
	}
	// Q3's section of the report, up to the next question's.
	_, q3Report, _ := strings.Cut(report, `<section class="report-question" id="report-q`+strconv.FormatInt(q3.ID, 10)+`">`)
	q3Report, _, _ = strings.Cut(q3Report, `<section class="report-question"`)
	if !strings.Contains(wideOnly(q3Report), `data-label="Tomas Lindqvist"`) {
		t.Error("the report draws no curve for Q3's only answer")
	}
	// Revealed, Q3 takes no more answers: only other weights give it a
	// pool, and the panel does not wait for an answer.
	if err := h.db.SetTrueValue(context.Background(), q3.ID, *q3.TrueValue, true, "Revealed for the check (invented)."); err != nil {
		t.Fatal(err)
	}
	_, panel = h.get(questionPath(ws.ID, q3.ID))
	if !strings.Contains(panel, "only other weights give it a pool") || strings.Contains(panel, "when an expert with weight answers it") {
		t.Error("the panel of a revealed question with no pool waits for an answer it cannot take")
	}
}

// The panel and the calibration page wrote the reason of the weights in
// force as “Classical model weights (invented).”. with a second full
// stop after the reason's own, which the report had stopped doing.
func TestWeightsReasonEndsItsSentenceOnce(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	form := url.Values{"scheme": {"custom"}, "reason": {"Ines knows this model best (invented)."}}
	for i, e := range es {
		form.Set(weightField(e.ID), []string{"3", "1", "1", "1"}[i])
	}
	if res, body := h.post(questionPath(ws.ID, qs[0].ID)+"/weights", form); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("weights: %d %s", res.StatusCode, body)
	}
	for _, page := range []string{questionPath(ws.ID, qs[0].ID), workshopPath(ws.ID) + "/calibration", workshopPath(ws.ID) + "/report"} {
		_, body := h.get(page)
		if !strings.Contains(body, "“Ines knows this model best (invented).”") {
			t.Errorf("%s does not quote the weights' reason", page)
		}
		if strings.Contains(body, "(invented).”.") {
			t.Errorf("%s ends the weights' reason with a second full stop", page)
		}
	}
}

// With performance weights in force and round 1 closed, the overview told
// the facilitator that through the next round every expert sees "the
// pool" as it stands: the facilitator's own panel shows the
// performance-weight pool, but the experts' feedback is always the
// equal-weight pool (web/expert.go, newFeedback under WeightsEqual). The
// overview names the pool the experts see.
func TestOverviewNamesThePoolTheExpertsSee(t *testing.T) {
	h, ws, _, _, _ := seeded(t)
	form := url.Values{"scheme": {"performance"}, "reason": {"Classical model weights (invented)."}}
	if res, body := h.post(workshopPath(ws.ID)+"/calibration/weights", form); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("weights: %d %s", res.StatusCode, body)
	}
	if res, body := h.post(workshopPath(ws.ID)+"/round", url.Values{"action": {"close"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("close: %d %s", res.StatusCode, body)
	}
	_, overview := h.get(workshopPath(ws.ID))
	if !strings.Contains(overview, "every expert sees the panel's fitted curves and their equal-weight pool") {
		t.Error("the overview does not say the experts see the equal-weight pool")
	}
}

// Walking the invented demo: once Q2's true value was revealed, which
// freezes its answers, the calibration page still said "Answered by Ines
// Varga and Ole Brandt. Not yet: Tomas Lindqvist and Priya Raman.", as if
// their answers might still come. It says they did not answer.
func TestRevealedCalibrationQuestionSaysWhoDidNotAnswer(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	q2 := qs[1]
	_, page := h.get(workshopPath(ws.ID) + "/calibration")
	if !strings.Contains(page, "Answered by Ines Varga and Ole Brandt. Not yet: Tomas Lindqvist and Priya Raman.") {
		t.Fatal("before the reveal the calibration page does not say who has not answered yet")
	}
	if err := h.db.SetTrueValue(context.Background(), q2.ID, *q2.TrueValue, true, "Revealed for the check (invented)."); err != nil {
		t.Fatal(err)
	}
	_, page = h.get(workshopPath(ws.ID) + "/calibration")
	if strings.Contains(page, "Not yet: Tomas Lindqvist and Priya Raman") {
		t.Error("after the reveal the calibration page still waits for answers the question can no longer take")
	}
	if !strings.Contains(page, "Answered by Ines Varga and Ole Brandt. Tomas Lindqvist and Priya Raman did not answer.") {
		t.Error("after the reveal the calibration page does not say who did not answer")
	}
}

// The panel of a revealed calibration question offered "Enter or revise"
// a judgement on an expert's behalf, which led only to a page saying the
// answers are frozen. The panel says so itself and offers no such form.
func TestRevealedQuestionPanelOffersNoEntry(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	q2 := qs[1]
	enter := `action="` + questionPath(ws.ID, q2.ID) + `/enter"`
	if _, panel := h.get(questionPath(ws.ID, q2.ID)); !strings.Contains(panel, enter) {
		t.Fatal("before the reveal the panel offers no entry on an expert's behalf")
	}
	if err := h.db.SetTrueValue(context.Background(), q2.ID, *q2.TrueValue, true, "Revealed for the check (invented)."); err != nil {
		t.Fatal(err)
	}
	_, panel := h.get(questionPath(ws.ID, q2.ID))
	if strings.Contains(panel, enter) {
		t.Error("the panel of a revealed question offers an entry that can only be refused")
	}
	if !strings.Contains(panel, "which froze its answers") {
		t.Error("the panel of a revealed question does not say its answers are frozen")
	}
}

// The report's summary of agreed priors said a prior from the pool was
// made from the "linear pool (its single Beta)", which a reviewer reads
// as the equal-weight pool; walking the demo, it was the performance-weight
// pool, Ines Varga's judgement alone. It names the pool by its weights.
func TestReportNamesThePoolAPriorCameFrom(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	qp := questionPath(ws.ID, qs[0].ID)
	form := url.Values{"scheme": {"custom"}, "reason": {"Ines knows this model best (invented)."}}
	for i, e := range es {
		form.Set(weightField(e.ID), []string{"3", "1", "1", "1"}[i])
	}
	if res, body := h.post(qp+"/weights", form); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("weights: %d %s", res.StatusCode, body)
	}
	agree := url.Values{"source": {"pool"}, "confirm_open": {"on"}, "rationale": {"The pool under Ines's weight (invented)."}}
	if res, body := h.post(qp+"/agree", agree); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("agree: %d %s", res.StatusCode, body)
	}
	_, report := h.get(workshopPath(ws.ID) + "/report")
	if !strings.Contains(report, "custom-weight pool (its single Beta)") {
		t.Error("the report's summary does not say the prior came from the custom-weight pool")
	}
	// The prior itself, under its question in the report and on the
	// panel, names the pool likewise.
	_, panel := h.get(qp)
	for where, body := range map[string]string{"panel": panel, "report": report} {
		if !strings.Contains(body, "single Beta representing the custom-weight pool") {
			t.Errorf("the %s's agreed prior does not say it represents the custom-weight pool", where)
		}
		if where == "panel" && strings.Contains(body, "single Beta representing the linear pool") {
			t.Errorf("the %s's agreed prior says only \"the linear pool\"", where)
		}
	}
	// So do the decision log's entry, in the log and in the report's
	// copy of it, and the study page: they said "the single Beta
	// representing the linear pool", which reads as equal weights.
	_, log := h.get(workshopPath(ws.ID) + "/log")
	_, study := h.get(studyPath(ws.ID, qs[0].ID))
	for where, body := range map[string]string{"decision log": log, "study page": study} {
		if !strings.Contains(body, "single Beta representing the custom-weight pool") || strings.Contains(body, "representing the linear pool") {
			t.Errorf("the %s does not name the custom-weight pool the prior came from", where)
		}
	}
	if strings.Count(report, "single Beta representing the custom-weight pool") < 2 { // the prior under its question, and the log's entry
		t.Error("the report's copy of the decision log does not name the custom-weight pool")
	}
}

// A cut-off the calibration page refuses before scoring (not a number,
// or outside 0 to 1) left the page saying "The classical model could not
// score the panel: ." with no reason after the colon. It says the cut-off
// is refused, beside its field, and how to go on.
func TestRefusedCutOffSaysWhyThereAreNoScores(t *testing.T) {
	h, ws, _, _, _ := seeded(t)
	for _, alpha := range []string{"abc", "2", "-1", "NaN"} {
		res, body := h.get(workshopPath(ws.ID) + "/calibration?alpha=" + url.QueryEscape(alpha))
		if res.StatusCode != http.StatusBadRequest {
			t.Errorf("cut-off %q: status %d, want 400", alpha, res.StatusCode)
		}
		if strings.Contains(body, "could not score the panel: .") {
			t.Errorf("cut-off %q: the page says the model could not score the panel, and gives no reason", alpha)
		}
		if !strings.Contains(body, "No scores with the cut-off typed below") {
			t.Errorf("cut-off %q: the page does not say the typed cut-off is why there are no scores", alpha)
		}
	}
}

// An archived workshop's overview and panels said they follow "new
// answers as they arrive", which an archived workshop cannot take.
func TestArchivedPagesPromiseNoNewAnswers(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	if res, body := h.post(workshopPath(ws.ID)+"/archive", url.Values{"action": {"archive"}, "archive_reason": {"Finished (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("archive: %d %s", res.StatusCode, body)
	}
	for _, page := range []string{workshopPath(ws.ID), questionPath(ws.ID, qs[0].ID)} {
		_, body := h.get(page)
		if strings.Contains(body, "follows new answers as they arrive") {
			t.Errorf("%s of an archived workshop says it follows new answers", page)
		}
		if !strings.Contains(body, "archived: no answers arrive until it is brought back") {
			t.Errorf("%s of an archived workshop does not say no answers arrive", page)
		}
	}
}

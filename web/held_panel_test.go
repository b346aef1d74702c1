package web

import (
	"context"
	"net/http"
	"net/url"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// heldSentence is the start of what an expert reads where the panel of an
// unrevealed calibration question would be.
const heldSentence = "The other experts' answers to this question stay hidden until the facilitator shows its true value"

// roomHeldSentence is the room view's.
const roomHeldSentence = "The panel&#39;s answers to this question are held back until its true value is shown"

var otherLabel = regexp.MustCompile(`class="legend-label"[^>]*>Expert [A-Z]+</text>`)

// Cooke's classical model scores each expert's own judgement of the
// calibration questions: in round 2 an expert sees no other expert's
// curve, pool or reason on a calibration question whose true value is not
// yet revealed, while the ordinary question's panel is shown as before;
// after the reveal the calibration question's panel is shown too.
func TestRoundTwoHoldsBackTheCalibrationPanelUntilTheReveal(t *testing.T) {
	g := newExpertRig(t, "Ada Quell", "Bruno Ferrante", "Chiara Osei")
	ctx := context.Background()
	save := func(i int, path string, reason string, vals ...string) {
		t.Helper()
		f := quantiles(vals...)
		f.Set("reason", reason)
		if resp, _ := g.post(path+"/save", f); resp.StatusCode != http.StatusSeeOther {
			t.Fatalf("expert %d save to %s: %d", i, path, resp.StatusCode)
		}
	}
	// Ada answers both; Bruno and Chiara answer both with reasons Ada must
	// not read on the calibration question.
	save(0, g.qpath(0, g.q), "", "0.05", "0.2", "0.4")
	save(0, g.qpath(0, g.qcal), "", "0.2", "0.35", "0.6")
	save(1, g.qpath(1, g.q), "ORDINARY-REASON-B", "0.02", "0.08", "0.2")
	save(1, g.qpath(1, g.qcal), "SEED-REASON-B", "0.3", "0.45", "0.7")
	save(2, g.qpath(2, g.q), "ORDINARY-REASON-C", "0.1", "0.3", "0.5")
	save(2, g.qpath(2, g.qcal), "SEED-REASON-C", "0.1", "0.25", "0.5")
	g.secondRound()

	// The ordinary question: the panel as before.
	_, page := g.get(g.qpath(0, g.q))
	if n := len(otherLabel.FindAllString(wideOnly(page), -1)); n != 2 {
		t.Errorf("ordinary question: %d other experts in the legend, want 2", n)
	}
	for _, want := range []string{"ORDINARY-REASON-B", "ORDINARY-REASON-C", "Equal-weight pool"} {
		if !strings.Contains(page, want) {
			t.Errorf("ordinary question in round 2 lacks %q", want)
		}
	}
	if strings.Contains(page, heldSentence) {
		t.Error("the ordinary question says its panel is held back")
	}

	// The calibration question before the reveal: nothing of the others,
	// for the expert who answered and for one who did not.
	for i := range 2 {
		if i == 1 {
			// A fourth expert with no answer yet sees no more.
			g = withoutAnswer(t, g)
		}
		_, page = g.get(g.qpath(0, g.qcal))
		if n := len(otherLabel.FindAllString(page, -1)); n != 0 {
			t.Errorf("calibration question before the reveal (case %d): %d other experts' curves", i, n)
		}
		for _, leak := range []string{"SEED-REASON-B", "SEED-REASON-C", "Equal-weight pool", "curve-pool", "Their reasons", "median-strip"} {
			if strings.Contains(page, leak) {
				t.Errorf("calibration question before the reveal (case %d) shows %q", i, leak)
			}
		}
		if !strings.Contains(page, heldSentence) {
			t.Errorf("calibration question before the reveal (case %d) does not say why the panel is missing", i)
		}
		if strings.Contains(strings.ToLower(page), "calibration") {
			t.Errorf("calibration question before the reveal (case %d) names itself a calibration question", i)
		}
	}

	// After the reveal: the panel as on any other question.
	if err := g.db.SetTrueValue(ctx, g.qcal.ID, hiddenTruth, true, "shown (invented)"); err != nil {
		t.Fatal(err)
	}
	_, page = g.get(g.qpath(0, g.qcal))
	if n := len(otherLabel.FindAllString(wideOnly(page), -1)); n != 3 {
		t.Errorf("calibration question after the reveal: %d other experts in the legend, want 3", n)
	}
	for _, want := range []string{"SEED-REASON-B", "SEED-REASON-C", "Equal-weight pool"} {
		if !strings.Contains(page, want) {
			t.Errorf("calibration question after the reveal lacks %q", want)
		}
	}
	if strings.Contains(page, heldSentence) {
		t.Error("after the reveal the page still says the panel is held back")
	}
}

// withoutAnswer returns the rig with a fourth expert, who has answered
// nothing, in the first place.
func withoutAnswer(t *testing.T, g *expertRig) *expertRig {
	t.Helper()
	tok, hash, err := newToken()
	if err != nil {
		t.Fatal(err)
	}
	e := g.experts[0]
	e.ID, e.Name, e.Affiliation = 0, "Dario Brook", "Affil of Dario Brook"
	if err := g.db.AddExpert(context.Background(), &e, hash); err != nil {
		t.Fatal(err)
	}
	h := *g
	h.tokens = append([]string{tok}, g.tokens...)
	return &h
}

// The room view shows no answers to a calibration question before its
// reveal, says why without the word "calibration", and shows them after;
// the facilitator's own panel shows every answer throughout.
func TestRoomHoldsBackTheCalibrationPanelUntilTheReveal(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	if qs[0].Calibration || !qs[1].Calibration || qs[1].Revealed {
		t.Fatal("the demo's first question is no longer ordinary, or its second no longer an unrevealed calibration question")
	}
	if r, _ := h.post(workshopPath(ws.ID)+"/round", url.Values{"action": {"close"}}); r.StatusCode != http.StatusSeeOther {
		t.Fatal("close")
	}
	room := func(i int) string {
		_, body := h.get(roomPath(ws.ID, qs[i].ID))
		return body
	}
	if body := room(0); len(legendLabels(body)) == 0 || strings.Contains(body, roomHeldSentence) {
		t.Errorf("the ordinary question's room: labels %v, or it says its answers are held back", legendLabels(body))
	}
	body := room(1)
	if l := legendLabels(body); len(l) != 0 {
		t.Errorf("the calibration question's room before the reveal shows %v", l)
	}
	for _, leak := range []string{"Where the medians lie", "Equal-weight pool", "Shown: every expert", "room-reasons"} {
		if strings.Contains(body, leak) {
			t.Errorf("the calibration question's room before the reveal shows %q", leak)
		}
	}
	if !strings.Contains(body, roomHeldSentence) || strings.Contains(strings.ToLower(body), "calibration") {
		t.Error("the calibration question's room does not say, in the room's words, why it shows no answers")
	}
	// The facilitator's panel of the same question names everyone who answered.
	if _, panel := h.get(questionPath(ws.ID, qs[1].ID)); !strings.Contains(panel, es[0].Name) || !strings.Contains(panel, es[3].Name) {
		t.Error("the facilitator's panel of a calibration question does not show every answer")
	}

	if r, _ := h.post(calibrationPath(ws.ID)+"/q/"+strconv.FormatInt(qs[1].ID, 10),
		url.Values{"true_value": {"0.0413"}, "reveal": {"on"}, "reason": {"Shown (invented)."}}); r.StatusCode != http.StatusSeeOther {
		t.Fatal("reveal")
	}
	body = room(1)
	if l := legendLabels(body); strings.Join(l, ",") != "Expert A,Expert B" {
		t.Errorf("the calibration question's room after the reveal shows %v, want the two who answered", l)
	}
	if strings.Contains(body, roomHeldSentence) || !strings.Contains(body, "Where the medians lie") {
		t.Error("after the reveal the room still holds the answers back")
	}
}

// The calibration page tells the facilitator what the experts can tell:
// holding back a calibration question's panel in round 2 shows them which
// questions are calibration questions, so the page no longer says they
// are not told.
func TestCalibrationPageSaysTheHeldPanelShowsTheSeeds(t *testing.T) {
	p := newSeedPanel(t)
	_, body := p.h.get(p.path())
	if strings.Contains(body, "they are not told which") {
		t.Error("the calibration page says experts are not told which questions are calibration questions")
	}
	if !strings.Contains(body, "from round 2 they can tell which they are") {
		t.Error("the calibration page does not say that the held panel shows the calibration questions")
	}
}

// reasonHint is the text of an expert page's hint under the reason box.
var reasonHint = regexp.MustCompile(`id="f-reason-hint">([^<]*)<`)

// The hint under the reason box tells no question apart: in round 1 it
// reads the same on a calibration question as on any other (a different
// hint would tell the experts which questions score them), and it
// promises nothing a held-back panel breaks: before its true value is
// shown, a calibration question's reasons are not shown in the next
// round, so "from the next round the other experts see it" was untrue
// there.
func TestTheReasonHintTellsNoQuestionApart(t *testing.T) {
	g := newExpertRig(t, "Ada Quell", "Bruno Ferrante", "Chiara Osei")
	hint := func(path string) string {
		t.Helper()
		_, page := g.get(path)
		m := reasonHint.FindStringSubmatch(page)
		if m == nil {
			t.Fatalf("%s has no reason hint", path)
		}
		return m[1]
	}
	ordinary, calibration := hint(g.qpath(0, g.q)), hint(g.qpath(0, g.qcal))
	if ordinary != calibration {
		t.Errorf("round 1: the reason hint differs on a calibration question:\n%q\n%q", ordinary, calibration)
	}
	g.secondRound()
	held := hint(g.qpath(0, g.qcal))
	if strings.Contains(strings.ToLower(held), "next round") {
		t.Errorf("round 2, the panel held back: the hint promises the next round: %q", held)
	}
}

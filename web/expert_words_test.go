package web

import (
	"context"
	"errors"
	"html"
	"net/http"
	"net/url"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/answersheet"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// A proportion question takes percentages: 5% always, a plain 5 when the
// form says percentages; the read-back says how each value was read, and
// the saved answer is shown again as typed.
func TestExpertTypesPercentages(t *testing.T) {
	g := newExpertRig(t)
	ctx := context.Background()
	// With the sign, whatever the form's choice.
	_, body := g.post(g.qpath(0, g.q)+"/preview?fragment=1", quantiles("2%", "5%", "12%"))
	if !strings.Contains(body, "Read as 0.02 (2%), 0.05 (5%) and 0.12 (12%).") {
		t.Errorf("the read-back does not say how the percentages were read:\n%s", body)
	}
	// Without it, under the percentage choice.
	form := quantiles("2", "5", "12")
	form.Set("unit", "percent")
	if r, _ := g.post(g.qpath(0, g.q)+"/save", form); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("save in percentages: %d", r.StatusCode)
	}
	revs := g.revisions()
	a := revs[len(revs)-1].Answer
	if !a.Percent || a.Values[0] != 0.02 || a.Values[1] != 0.05 || a.Values[2] != 0.12 {
		t.Fatalf("saved %+v, want 0.02, 0.05, 0.12 typed as percentages", a)
	}
	_, page := g.get(g.qpath(0, g.q))
	if !strings.Contains(page, `value="5"`) || !strings.Contains(page, `id="f-unit-percent" name="unit" value="percent" checked`) ||
		!strings.Contains(page, "5% chance below 2%; 50% below 5%; 95% below 12%") {
		t.Error("the page does not show the saved answer as the expert typed it")
	}
	// A plain 5 under the proportion choice is refused with the likely meaning.
	_, body = g.post(g.qpath(0, g.q)+"/save", quantiles("0.02", "5", "0.12"))
	if msg := shownError(body, "f-values-1"); !strings.Contains(msg, "Did you mean 5%?") {
		t.Errorf("5 as a proportion: %q", msg)
	}
	_ = ctx
}

// The four-value confidence is a percentage: 80 and 80% both mean 80%;
// 0.8 is refused with help; under 50% the preview asks the expert to
// check.
func TestConfidenceAsAPercentage(t *testing.T) {
	g := newExpertRig(t)
	base := url.Values{"lowest": {"0.1"}, "highest": {"0.5"}, "best": {"0.2"}}
	for _, c := range []string{"80", "80%", " 80 % "} {
		f := url.Values{}
		for k, v := range base {
			f[k] = v
		}
		f.Set("confidence", c)
		r, body := g.post(g.qpath(0, g.qi)+"/preview?fragment=1", f)
		if r.StatusCode != http.StatusOK || strings.Contains(body, "sure the value lies between your lowest and highest values, so you think it more likely") {
			t.Errorf("confidence %q: %d", c, r.StatusCode)
		}
	}
	f := url.Values{"lowest": {"0.1"}, "highest": {"0.5"}, "best": {"0.2"}, "confidence": {"40"}}
	if _, body := g.post(g.qpath(0, g.qi)+"/preview?fragment=1", f); !strings.Contains(body, "You are 40% sure the value lies between your lowest and highest values, so you think it more likely lies outside them.") {
		t.Error("a confidence under 50% is not checked in plain words")
	}
}

// Every broken field is marked at once, and the expert's page never
// shows the facilitator's words, interval notation or exponents.
func TestExpertSeesEveryErrorInTheirOwnWords(t *testing.T) {
	g := newExpertRig(t)
	_, body := g.post(g.qpath(0, g.q)+"/save", quantiles("0.5", "0.3", "1.2"))
	if shownError(body, "f-values-1") == "" || shownError(body, "f-values-2") == "" {
		t.Errorf("not every broken field is marked: values[1] %q, values[2] %q", shownError(body, "f-values-1"), shownError(body, "f-values-2"))
	}
	_, body = g.post(g.qpath(0, g.qi)+"/save", url.Values{"lowest": {"0.6"}, "highest": {"abc"}, "best": {"0.2"}, "confidence": {"0.8"}})
	for _, id := range []string{"f-best", "f-highest", "f-confidence"} {
		if shownError(body, id) == "" {
			t.Errorf("%s is not marked", id)
		}
	}
	// A U-shaped fit: the warning speaks to the expert.
	_, body = g.post(g.qpath(0, g.q)+"/preview?fragment=1", quantiles("0.0001", "0.5", "0.9999"))
	text := regexp.MustCompile(`<[^>]*>`).ReplaceAllString(body, " ")
	for _, bad := range []string{"Show the expert", "Check with the expert", "alpha", "(0, 1)", "e-0"} {
		if strings.Contains(text, bad) {
			t.Errorf("the expert's preview says %q", bad)
		}
	}
	if !strings.Contains(body, "piles up at both ends") {
		t.Error("the U-shape warning is not in the expert's words")
	}
	// A tiny value typed is shown again as typed, never as an exponent.
	_, body = g.post(g.qpath(0, g.q)+"/save", quantiles("0.000025", "0.00003", "0.00002"))
	if !strings.Contains(body, `value="0.000025"`) || strings.Contains(body, "2.5e-05") {
		t.Error("a small value is not shown as typed")
	}
}

// Chips: an empty bin holds none; the messages are sentences.
func TestChipsEmptyBinsAndSentences(t *testing.T) {
	g := newExpertRig(t)
	f := url.Values{"counts[0]": {""}, "counts[1]": {"8"}, "counts[2]": {"7"}, "counts[3]": {"5"}, "counts[4]": {""}}
	if r, body := g.post(g.qpath(0, g.qc)+"/save", f); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("chips with empty bins: %d %s", r.StatusCode, shownError(body, "f-counts-0"))
	}
	_, body := g.post(g.qpath(0, g.qc)+"/save", url.Values{"counts[1]": {"8"}, "counts[2]": {"7"}})
	if !strings.Contains(body, "Put chips in at least three bins") {
		t.Error("the spread rule is not a sentence")
	}
	if _, page := g.get(g.qpath(0, g.qc)); !strings.Contains(page, `class="chips-board" data-chips="20"`) || !strings.Contains(page, `inputmode="numeric"`) {
		t.Error("the chips page lacks its board or a numeric keypad")
	}
}

// A first answer asks for the expert's reasoning, later ones why they
// revised; after a save the page leads to the next unanswered question;
// the caution is full on the home page and folded on question pages.
func TestExpertPageWording(t *testing.T) {
	g := newExpertRig(t)
	_, page := g.get(g.qpath(0, g.q))
	if !strings.Contains(page, "Your reasoning (optional)") || strings.Contains(page, "Reason for this revision") {
		t.Error("a first answer is not asked for the expert's reasoning")
	}
	if box := regexp.MustCompile(`<textarea id="f-reason"[^>]*>`).FindString(page); !strings.Contains(box, `data-max-chars="4000"`) || strings.Contains(box, "maxlength") {
		t.Errorf("the reasoning box does not count down to its limit, or cuts a paste at it: %s", box)
	}
	if !strings.Contains(page, `<details class="banner banner-caution caution-folded">`) {
		t.Error("the question page does not fold the caution")
	}
	if _, home := g.get("/e/" + g.tokens[0] + "/"); !strings.Contains(home, `<aside class="banner banner-caution"`) {
		t.Error("the home page does not show the caution in full")
	}
	r, _ := g.post(g.qpath(0, g.q)+"/save", quantiles("0.02", "0.05", "0.12"))
	_, page = g.getWith(r.Header.Get("Location"), r.Cookies())
	if !strings.Contains(page, "Why you revised, or your reasoning (optional)") {
		t.Error("after a first answer the box is not about revising")
	}
	if !strings.Contains(page, "Next: Question 2: Scoring share →") || !strings.Contains(page, `href="`+g.qpath(0, g.qi)+`"`) {
		t.Error("no link to the next unanswered question after saving")
	}
}

// The preview's summary of what stops the fit quotes the field's message
// once, with one full stop, and names the value a value must exceed by
// its label, not by its place on the form ("the value above it", which is
// the smaller one).
func TestNoFitYetReadsAsOneSentence(t *testing.T) {
	g := newExpertRig(t)
	_, frag := g.post(g.qpath(0, g.q)+"/preview?fragment=1", quantiles("0.3", "0.2", "0.4"))
	want := "No fit yet. The value with a 50% chance of being lower (proportion): Must be larger than your 5% value."
	if !strings.Contains(frag, want) {
		t.Errorf("the preview does not say %q:\n%s", want, frag)
	}
	if strings.Contains(frag, "..") || strings.Contains(frag, "value above it") {
		t.Errorf("the preview's summary reads badly:\n%s", frag)
	}
	// A message about the answer as a whole keeps one full stop too.
	_, frag = g.post(g.qpath(0, g.qc)+"/preview?fragment=1", url.Values{"counts[0]": {"20"}})
	if !strings.Contains(frag, "No fit yet:") || strings.Contains(frag, "..") {
		t.Errorf("the chips preview's summary reads badly:\n%s", frag)
	}
}

// The four-value form's read-backs say "you are saying there is a 1 in 10
// chance below your lowest", which the expert did not type: the preview
// first says how their values were read (the best estimate as the median,
// the chance outside the range split evenly), so they can object.
func TestIntervalPreviewSaysHowItWasRead(t *testing.T) {
	g := newExpertRig(t)
	f := url.Values{"lowest": {"0.08"}, "highest": {"0.35"}, "best": {"0.15"}, "confidence": {"80"}}
	_, frag := g.post(g.qpath(0, g.qi)+"/preview?fragment=1", f)
	want := "Parley reads your four values this way: your best estimate as the middle value, as likely to be exceeded as not, " +
		"and the 20% chance left outside your range as split evenly: 10% below your lowest and 10% above your highest."
	if !strings.Contains(frag, want) {
		t.Errorf("the preview does not say how the four values were read:\n%s", frag)
	}
	// The Beta comes last, in statistical terms.
	if !strings.Contains(frag, "In statistical terms the curve is Beta(α = ") {
		t.Errorf("the preview does not name the Beta last:\n%s", frag)
	}
	// Quantile answers need no such sentence.
	if _, frag = g.post(g.qpath(0, g.q)+"/preview?fragment=1", quantiles("0.05", "0.2", "0.4")); strings.Contains(frag, "four values") {
		t.Error("a quantile answer is read as four values")
	}
}

// A link that leads nowhere says to ask the facilitator for a new one.
func TestDeadLinkSaysWhatToDo(t *testing.T) {
	g := newExpertRig(t)
	if err := g.db.RevokeExpert(context.Background(), g.experts[0].ID, "left"); err != nil {
		t.Fatal(err)
	}
	for _, path := range []string{"/e/" + g.tokens[0] + "/", "/e/not-a-token/"} {
		code, body := g.get(path)
		if code != http.StatusNotFound || !strings.Contains(body, "Please ask the facilitator for your current link.") {
			t.Errorf("%s: %d", path, code)
		}
	}
}

// Once the facilitator archives the workshop, an expert's pages do not
// promise a next round: they say the workshop is finished, and a save
// says nothing more can be saved.
func TestArchivedWorkshopIsFinishedForTheExpert(t *testing.T) {
	g := newExpertRig(t)
	if r, _ := g.post(g.qpath(0, g.q)+"/save", quantiles("0.02", "0.05", "0.12")); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("save: %d", r.StatusCode)
	}
	if err := g.db.SetArchived(context.Background(), g.ws.ID, true, "finished (invented)"); err != nil {
		t.Fatal(err)
	}
	finished := "The facilitator has closed this workshop after round 1. You can read your answers; nothing more can be saved."
	for _, p := range []string{"/e/" + g.tokens[0] + "/", g.qpath(0, g.q)} {
		_, page := g.get(p)
		if !strings.Contains(page, finished) || strings.Contains(page, "will open the next round") {
			t.Errorf("%s does not say the workshop is finished:\n%s", p, page)
		}
	}
	r, page := g.post(g.qpath(0, g.q)+"/save", quantiles("0.03", "0.06", "0.12"))
	if r.StatusCode != http.StatusConflict || !strings.Contains(page, "The facilitator has closed this workshop, so your answer was not saved") ||
		strings.Contains(page, "will open the next round") {
		t.Errorf("a save to the finished workshop: %d", r.StatusCode)
	}
}

// An expert who types percentages reads the round-2 panel in
// percentages, as their own fit speaks: its x axis, the percentiles of
// each curve and the note under it; an expert who types proportions reads
// proportions there.
func TestPanelSpeaksInTheExpertsUnit(t *testing.T) {
	g := newExpertRig(t, "Ada Quell", "Bruno Ferrante", "Chiara Osei")
	answers := [][]string{{"3%", "7%", "16%"}, {"0.02", "0.08", "0.2"}, {"0.1", "0.3", "0.5"}}
	for i, a := range answers {
		if resp, _ := g.post(g.qpath(i, g.q)+"/save", quantiles(a...)); resp.StatusCode != http.StatusSeeOther {
			t.Fatalf("expert %d save: %d", i, resp.StatusCode)
		}
	}
	g.secondRound()
	panelOf := func(i int) string {
		_, page := g.get(g.qpath(i, g.q))
		start, end := strings.Index(page, "What the other experts said"), strings.Index(page, "Your history")
		if start < 0 || end < start {
			t.Fatalf("expert %d: no panel before the history", i)
		}
		return page[start:end]
	}
	// The "You" row's median: the percentiles are in the expert's unit.
	youMedian := regexp.MustCompile(`(?s)<th scope="row"[^>]*>You.*?</td>\s*<td[^>]*>[^<]*</td>\s*<td[^>]*>([^<]*)</td>`)
	ada := panelOf(0)
	m := youMedian.FindStringSubmatch(ada)
	if m == nil || !strings.HasSuffix(m[1], "%") {
		t.Errorf("Ada typed percentages, but her panel's own median reads %v", m)
	}
	if !strings.Contains(wideOnly(ada), `data-value="0.1">10%</text>`) {
		t.Error("Ada's panel's x axis is not in percentages")
	}
	if !strings.Contains(ada, "between the bounds 0% and 100%") {
		t.Error("Ada's panel's caption does not give the bounds in percentages")
	}
	bruno := panelOf(1)
	if m := youMedian.FindStringSubmatch(bruno); m == nil || strings.HasSuffix(m[1], "%") {
		t.Errorf("Bruno typed proportions, but his panel's own median reads %v", m)
	}
	if !strings.Contains(bruno, "between the bounds 0 and 1") {
		t.Error("Bruno's panel's caption does not give the bounds as proportions")
	}
}

// The expert's history writes each saved answer in words, so that a value
// typed in percentages is not read against its probability ("5%: 3%").
func TestHistoryInWords(t *testing.T) {
	quant := workshop.Question{Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95}}
	interval := workshop.Question{Lower: 0, Upper: 1, Format: workshop.FormatInterval}
	chips := workshop.Question{Lower: 0, Upper: 1, Format: workshop.FormatChips, BinEdges: []float64{0, 0.1, 0.2, 1}, Chips: 10}
	cases := []struct {
		q    workshop.Question
		a    workshop.Answer
		want string
	}{
		{quant, workshop.Answer{Values: []float64{0.03, 0.07, 0.16}, Percent: true}, "5% chance below 3%; 50% below 7%; 95% below 16%"},
		{quant, workshop.Answer{Values: []float64{0.03, 0.07, 0.16}}, "5% chance below 0.03; 50% below 0.07; 95% below 0.16"},
		{interval, workshop.Answer{Lowest: 0.08, Highest: 0.35, Best: 0.15, Confidence: 0.8, Percent: true}, "between 8% and 35%, 80% sure; best estimate 15%"},
		{chips, workshop.Answer{Counts: []int{2, 7, 1}}, "chips in each bin, lowest first: 2, 7, 1"},
	}
	for _, c := range cases {
		if got := answerInWords(c.q, c.a); got != c.want {
			t.Errorf("%s: got %q, want %q", c.q.Format, got, c.want)
		}
	}
}

// confidenceDoors are the two doors that read a four-value confidence:
// the expert's form on the rig's interval question (the fields it posts
// with confidence c) and the answer sheet (its error for a row of c).
func confidenceDoors(t *testing.T) (*expertRig, func(c string) url.Values, func(c string) error) {
	g := newExpertRig(t)
	form := func(c string) url.Values {
		return url.Values{"lowest": {"0.02"}, "highest": {"0.6"}, "best": {"0.2"}, "confidence": {c}}
	}
	qs := []workshop.Question{g.qi}
	es := []workshop.Expert{g.experts[0]}
	sheet := func(c string) error {
		_, err := answersheet.Read(strings.NewReader("expert,question,lowest,highest,best,confidence\nid:"+
			strconv.FormatInt(g.experts[0].ID, 10)+",id:"+strconv.FormatInt(g.qi.ID, 10)+",0.02,0.6,0.2,"+c+"\n"), qs, es)
		return err
	}
	return g, form, sheet
}

// The largest confidence the form names, 99.9999999998%, is taken by
// every door that reads a confidence: the expert's form and the answer
// sheet (its tails of 1e-12 were refused by 2.2e-17 of float64 rounding,
// beside the message "Must be at most 99.9999999998%"); the next one up
// is refused by both with that message.
func TestTheLargestConfidenceIsTaken(t *testing.T) {
	g, form, sheet := confidenceDoors(t)
	for _, c := range []string{"99.9999999998", "99.9999999998%"} {
		r, body := g.post(g.qpath(0, g.qi)+"/preview", form(c))
		if msg := shownError(body, "f-confidence"); r.StatusCode != http.StatusOK || msg != "" {
			t.Errorf("form, confidence %s: status %d, %q", c, r.StatusCode, msg)
		}
		if err := sheet(c); err != nil {
			t.Errorf("sheet, confidence %s: %v", c, err)
		}
	}
	const over = "99.99999999981"
	if _, body := g.post(g.qpath(0, g.qi)+"/preview", form(over)); !strings.Contains(shownError(body, "f-confidence"), "Must be at most 99.9999999998%") {
		t.Errorf("form, confidence %s: %q", over, shownError(body, "f-confidence"))
	}
	var ie *elicit.InputError
	if err := sheet(over); !errors.As(err, &ie) || ie.Rule != elicit.RuleCentralTails || !strings.Contains(ie.Detail, "at most 99.9999999998") {
		t.Errorf("sheet, confidence %s: %v", over, err)
	}
}

// A value is read back as the expert typed it: a percentage with the
// figures of the same value typed as a proportion (12.35%, not 12.3%),
// a value just short of a bound short of it (0.99996, not 1, which the
// question does not allow), and a rare event's value without an exponent.
func TestValuesReadBackAsTyped(t *testing.T) {
	g := newExpertRig(t)
	if r, _ := g.post(g.qpath(0, g.q)+"/save", quantiles("11.5%", "12.35%", "14.25%")); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("save in percentages: %d", r.StatusCode)
	}
	_, page := g.get(g.qpath(0, g.q))
	for _, want := range []string{
		"Read as 0.115 (11.5%), 0.1235 (12.35%) and 0.1425 (14.25%).",
		"as likely to be below 12.35% as above it",
		"1 in 20 chance the value is above 14.25%.",
		`<td data-label="you said" role="cell">12.35%</td>`,         // the fit's table
		"5% chance below 11.5%; 50% below 12.35%; 95% below 14.25%", // the history
	} {
		if !strings.Contains(page, want) {
			t.Errorf("typed 12.35%% and 14.25%%: the page lacks %q", want)
		}
	}
	f := url.Values{"lowest": {"0.1"}, "highest": {"0.4"}, "best": {"0.2"}, "confidence": {"85.55"}}
	if r, _ := g.post(g.qpath(0, g.qi)+"/save", f); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("save a confidence of 85.55: %d", r.StatusCode)
	}
	if _, page := g.get(g.qpath(0, g.qi)); !strings.Contains(page, "85.55% sure") {
		t.Error("a confidence typed 85.55 is not shown as 85.55%")
	}
	_, body := g.post(g.qpath(0, g.q)+"/preview?fragment=1", quantiles("0.999", "0.9999", "0.99996"))
	for _, want := range []string{"and 0.99996 (99.996%).", "the value is above 0.99996 (proportion)."} {
		if !strings.Contains(body, want) {
			t.Errorf("0.99996 is not read back short of the bound 1: lacks %q\n%s", want, body)
		}
	}
	if strings.Contains(body, " 1 (") || strings.Contains(body, "above 1 ") {
		t.Errorf("a value short of 1 is read back as 1:\n%s", body)
	}
	_, body = g.post(g.qpath(0, g.q)+"/preview?fragment=1", quantiles("0.00001", "0.00002", "0.00005"))
	if !strings.Contains(body, "Read as 0.00001 (0.001%), 0.00002 (0.002%) and 0.00005 (0.005%).") {
		t.Errorf("a rare event's values are not read back as typed:\n%s", body)
	}
	if m := regexp.MustCompile(`\de-\d`).FindString(regexp.MustCompile(`<[^>]*>`).ReplaceAllString(body, " ")); m != "" {
		t.Errorf("the preview of a rare event shows an exponent (%s)", m)
	}
}

// A refused reason is marked as every other field is, tied to its box for
// a screen reader, and said in the expert's words, not the rule's.
func TestReasonRefusedInTheExpertsWords(t *testing.T) {
	g := newExpertRig(t)
	f := quantiles("0.1", "0.2", "0.3")
	f.Set("reason", "From the burst log\x07 (invented).")
	r, body := g.post(g.qpath(0, g.q)+"/save", f)
	if r.StatusCode != http.StatusUnprocessableEntity {
		t.Fatalf("a reason with a control character: %d", r.StatusCode)
	}
	msg := shownError(body, "f-reason")
	if !strings.Contains(msg, "invisible character") || strings.Contains(msg, "control character") || strings.Contains(msg, "U+") {
		t.Errorf("the reason's message: %q", msg)
	}
	box := regexp.MustCompile(`<textarea[^>]*id="f-reason"[^>]*>`).FindString(body)
	if !strings.Contains(box, `aria-invalid="true"`) || !strings.Contains(box, `aria-describedby="f-reason-hint f-reason-error"`) {
		t.Errorf("the reason's box is not tied to its message: %s", box)
	}
	if !regexp.MustCompile(`<div class="field field-invalid">\s*<label for="f-reason"`).MatchString(body) {
		t.Error("the reason's field is not marked as refused")
	}
	// The values fit: their picture stays, without "No fit yet".
	if !strings.Contains(body, "What your numbers imply") || strings.Contains(body, "No fit yet") {
		t.Error("a save refused for its reason alone does not show the values' fit")
	}
	if n := len(g.revisions()); n != 0 {
		t.Errorf("%d revisions saved", n)
	}
	// Unrefused, the box says it is valid and names its hint only.
	_, page := g.get(g.qpath(0, g.q))
	if box := regexp.MustCompile(`<textarea[^>]*id="f-reason"[^>]*>`).FindString(page); !strings.Contains(box, `aria-invalid="false"`) || !strings.Contains(box, `aria-describedby="f-reason-hint"`) {
		t.Errorf("the reason's box at rest: %s", box)
	}
}

// A reason's line breaks count as one character each, as the page counts
// them: a browser sends them as CR LF, so a reason inside the limit on
// the page (3,981 letters and 19 line breaks) was refused as 4,019
// characters long. It is kept with plain newlines. A reason over the
// limit is refused in the expert's words, nothing is saved, and the text
// stays in the box to be shortened.
func TestReasonLineBreaksCountAsOne(t *testing.T) {
	g := newExpertRig(t)
	reason := strings.TrimSuffix(strings.Repeat(strings.Repeat("x", 199)+"\r\n", 20), "\r\n") + "x"
	if n := len(reason) - strings.Count(reason, "\r\n"); n != 4000 {
		t.Fatalf("the reason is %d characters as the page counts them, want 4000", n)
	}
	form := quantiles("0.05", "0.2", "0.4")
	form.Set("reason", reason)
	if resp, body := g.post(g.qpath(0, g.q)+"/save", form); resp.StatusCode != http.StatusSeeOther {
		t.Fatalf("a reason of 4000 characters with line breaks: %d %.300s", resp.StatusCode, regexp.MustCompile(`field-error[^<]*`).FindString(body))
	}
	revs := g.revisions()
	if len(revs) != 1 || revs[0].Reason != strings.ReplaceAll(reason, "\r\n", "\n") {
		t.Fatalf("the reason is not kept with plain newlines: %d revisions", len(revs))
	}
	form.Set("reason", reason+"yz")
	resp, body := g.post(g.qpath(0, g.q)+"/save", form)
	if resp.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, "This is 4002 characters long; the most is 4000. Please shorten it.") {
		t.Fatalf("a reason two characters over: %d %.400s", resp.StatusCode, body)
	}
	if !strings.Contains(body, "xyz</textarea>") {
		t.Error("the refused reason is not kept in its box to be shortened")
	}
	if len(g.revisions()) != 1 {
		t.Error("a refused reason was saved")
	}
}

// TestPointWrittenAsABoundIsSaid: 0.4, 0.5 and 0.9 at 10.00001, 10.1 and
// 16 days on [10, 20] fit a curve whose 5% point lies 5.0e-18 above 10
// (elicit.TestFitPointsBeyondDoubleAreSaid, R 4.2.2's qbeta), which the
// preview can only write as 10. The expert is told so in their own words,
// without the arithmetic of doubles.
func TestPointWrittenAsABoundIsSaid(t *testing.T) {
	g := newExpertRig(t)
	q := workshop.Question{WorkshopID: g.ws.ID, Wording: "How many days does a gasket swap take?",
		Quantity: "Swap time", Units: "days", Lower: 10, Upper: 20, Format: workshop.FormatQuantiles, Probs: []float64{0.4, 0.5, 0.9}}
	if err := g.db.AddQuestion(context.Background(), &q); err != nil {
		t.Fatal(err)
	}
	_, frag := g.post(g.qpath(0, q)+"/preview?fragment=1", quantiles("10.00001", "10.1", "16"))
	want := "Part of the curve that fits your numbers lies so close to 10 that it is written as 10 here, though it lies a hair above. A curve pressed this hard against the edge usually means your values need another look."
	if !strings.Contains(frag, want) {
		t.Errorf("the preview does not say that 10 is written for a point above it:\n%s", frag)
	}
	for _, bad := range []string{"double", "e-18"} {
		if strings.Contains(frag, bad) {
			t.Errorf("the expert's preview says %q:\n%s", bad, frag)
		}
	}
}

// While a round is closed an expert without an answer may still try the
// fit, but the page does not ask for values "before you save": saving is
// closed, and it says so; nor does it offer "your answers" to read when
// there are none. The facilitator's entry page says the same of the save.
func TestClosedRoundDoesNotInviteASave(t *testing.T) {
	g := newExpertRig(t)
	if err := g.db.SetRound(context.Background(), g.ws.ID, 1, false, ""); err != nil {
		t.Fatal(err)
	}
	_, page := g.get(g.qpath(0, g.q))
	if strings.Contains(page, "before you save") || !strings.Contains(page, "Saving is closed for now: nothing tried here is kept.") {
		t.Errorf("in a closed round the question page invites a save:\n%s", page)
	}
	// Nor does it offer "your answers" to read when there are none.
	if strings.Contains(page, "You can read your answers") || !strings.Contains(page, "You have not answered this question yet; you can when the facilitator opens the next round.") {
		t.Errorf("in a closed round the page of an unanswered question offers answers to read:\n%s", page)
	}
	if err := g.db.SetRound(context.Background(), g.ws.ID, 2, true, "second round (invented)"); err != nil {
		t.Fatal(err)
	}
	if _, page := g.get(g.qpath(0, g.q)); !strings.Contains(page, "before you save") || strings.Contains(page, "Saving is closed for now") {
		t.Errorf("in an open round the question page does not invite a save:\n%s", page)
	}
	h, ws, qs, es, _ := seeded(t)
	if r, _ := h.post(workshopPath(ws.ID)+"/round", url.Values{"action": {"close"}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("close: %d", r.StatusCode)
	}
	if _, page := h.get(questionPath(ws.ID, qs[0].ID) + "/enter/" + strconv.FormatInt(es[2].ID, 10)); strings.Contains(page, "before you save") || !strings.Contains(page, "Saving is closed for now") {
		t.Errorf("in a closed round the entry page invites a save:\n%s", page)
	}
}

// A calibration question revealed while the round is closed, which the
// expert never answered, offers no answers to read and no answer in the
// next round: the page said "You can read your answers" above "You gave
// no answer to this question before then".
func TestRevealedUnansweredQuestionOffersNothingToRead(t *testing.T) {
	h, ws, qs, es, links := seeded(t)
	if r, _ := h.post(workshopPath(ws.ID)+"/round", url.Values{"action": {"close"}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("close: %d", r.StatusCode)
	}
	ctx := context.Background()
	revs, _ := h.db.Revisions(ctx, ws.ID)
	for _, q := range qs {
		if !q.Calibration || q.TrueValue == nil {
			continue
		}
		for i, e := range es {
			answered := false
			for _, rv := range revs {
				answered = answered || (rv.QuestionID == q.ID && rv.ExpertID == e.ID)
			}
			if answered || links[i].Name != e.Name {
				continue
			}
			if err := h.db.SetTrueValue(ctx, q.ID, *q.TrueValue, true, "shown to the panel (invented)"); err != nil {
				t.Fatal(err)
			}
			_, page := h.get(links[i].Path + "q/" + strconv.FormatInt(q.ID, 10))
			if !strings.Contains(page, "You gave no answer to this question.") {
				t.Fatalf("the revealed question's page does not say the expert gave no answer:\n%s", page)
			}
			if strings.Contains(page, "You can read your answers") || strings.Contains(page, "you can when the facilitator opens the next round") {
				t.Errorf("the page of a revealed question the expert never answered offers answers to read or a later answer:\n%s", page)
			}
			return
		}
	}
	t.Fatal("the demo has no calibration question an expert left unanswered")
}

// A question whose true value has been shown is final while the round
// goes on for the others: its page said "Round 1 is open: you can enter
// and revise your answers" above "answers to this question can no longer
// be added" (or "your answer below is final"). It says the round is open
// for the expert's other questions, answered or not; the other questions
// still say they can be revised.
func TestFinalQuestionInAnOpenRoundSaysWhatStaysOpen(t *testing.T) {
	g := newExpertRig(t, "Ottilie Marsh", "Pavel Ruskin")
	if r, _ := g.post(g.qpath(0, g.qcal)+"/save", quantiles("0.1", "0.2", "0.4")); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("save: %d", r.StatusCode)
	}
	if err := g.db.SetTrueValue(context.Background(), g.qcal.ID, hiddenTruth, true, "shown (invented)"); err != nil {
		t.Fatal(err)
	}
	const open, final = "you can enter and revise your answers", "Round 1 is open for your other questions; answers to this one are final."
	for i, whose := range []string{"answered", "unanswered"} {
		_, page := g.get(g.qpath(i, g.qcal))
		if strings.Contains(page, open) || !strings.Contains(page, final) {
			t.Errorf("the %s final question's page does not say what stays open:\n%s", whose, page)
		}
	}
	if _, page := g.get(g.qpath(0, g.q)); !strings.Contains(page, "Round 1 is open: "+open) {
		t.Errorf("an open question's page does not say it can be revised:\n%s", page)
	}
}

// In an archived workshop the other experts' curves are there to read,
// not to act on: the page said "Once you save, your curve appears here
// beside them" (or "Use it to reconsider your own judgement") under "The
// facilitator has closed this workshop … nothing more can be saved".
func TestArchivedFeedbackDoesNotInviteASave(t *testing.T) {
	g := newExpertRig(t, "Ottilie Marsh", "Pavel Ruskin", "Quinn Adler")
	ctx := context.Background()
	for i := range 2 {
		if r, _ := g.post(g.qpath(i, g.q)+"/save", quantiles("0.1", "0.2", "0.4")); r.StatusCode != http.StatusSeeOther {
			t.Fatalf("save: %d", r.StatusCode)
		}
	}
	if err := g.db.SetRound(ctx, g.ws.ID, 1, false, ""); err != nil {
		t.Fatal(err)
	}
	if err := g.db.SetRound(ctx, g.ws.ID, 2, true, "second round (invented)"); err != nil {
		t.Fatal(err)
	}
	_, page := g.get(g.qpath(2, g.q))
	if !strings.Contains(page, "Once you save, your curve appears here") {
		t.Fatalf("in an open round the panel does not invite a first answer:\n%s", page)
	}
	if err := g.db.SetArchived(ctx, g.ws.ID, true, "finished (invented)"); err != nil {
		t.Fatal(err)
	}
	for i, who := range []string{"an expert who answered", "an expert who did not"} {
		_, page := g.get(g.qpath(i*2, g.q))
		if !strings.Contains(page, "What the other experts said") {
			t.Fatalf("%s: no panel in the archived workshop:\n%s", who, page)
		}
		for _, wrong := range []string{"Once you save", "Use it to reconsider", "it is worth settling your own judgement"} {
			if strings.Contains(page, wrong) {
				t.Errorf("%s: the archived workshop's panel says %q", who, wrong)
			}
		}
	}
}

// An archived workshop's question page asks for no reasoning: the box
// said "Later in the workshop the other experts may see it" under "nothing
// more can be saved". Nor does a closed round's, whose box kept nothing
// (TestClosedRoundPageShowsTheAnswerAndAsksForNothingToSave).
func TestArchivedWorkshopAsksForNoReasoning(t *testing.T) {
	g := newExpertRig(t)
	ctx := context.Background()
	if err := g.db.SetRound(ctx, g.ws.ID, 1, false, ""); err != nil {
		t.Fatal(err)
	}
	if _, page := g.get(g.qpath(0, g.q)); strings.Contains(page, `id="f-reason"`) {
		t.Errorf("a closed round's page asks for reasoning")
	}
	if err := g.db.SetArchived(ctx, g.ws.ID, true, "finished (invented)"); err != nil {
		t.Fatal(err)
	}
	for _, q := range []workshop.Question{g.q, g.qi, g.qc} {
		_, page := g.get(g.qpath(0, q))
		if strings.Contains(page, `id="f-reason"`) || strings.Contains(page, "Later in the workshop") {
			t.Errorf("%s: the archived workshop's page asks for reasoning", q.Quantity)
		}
		if !strings.Contains(page, "Show the fit") {
			t.Errorf("%s: the archived workshop's page no longer lets the expert try a fit", q.Quantity)
		}
	}
}

// An expert who chose percentages is told the bounds in percentages: a
// value past them said "Must be between 0 and 1 (0% and 100%)", which
// asks for a proportion the form reads as a percentage (0.9 as 0.9%).
func TestBoundsSaidInTheExpertsUnit(t *testing.T) {
	g := newExpertRig(t)
	form := quantiles("2", "5", "200")
	form.Set("unit", "percent")
	_, body := g.post(g.qpath(0, g.q)+"/save", form)
	if msg := shownError(body, "f-values-2"); msg != "Must be between 0% and 100%; you typed 200." {
		t.Errorf("200 typed as a percentage: %q", msg)
	}
	// As proportions, both are said.
	_, body = g.post(g.qpath(0, g.q)+"/save", quantiles("0.02", "0.05", "1.4"))
	if msg := shownError(body, "f-values-2"); !strings.HasPrefix(msg, "Must be between 0 and 1 (0% and 100%); you typed 1.4.") {
		t.Errorf("1.4 typed as a proportion: %q", msg)
	}
}

// A question whose values may be typed as percentages gives its bounds in
// both: an expert who chose percentages read "Possible values: between 0
// and 1" above boxes that take 5 for 5%. Chips, placed not typed, and
// other bounds keep their plain range.
func TestPossibleValuesInBothUnits(t *testing.T) {
	g := newExpertRig(t)
	for _, c := range []struct {
		q    workshop.Question
		want string
	}{
		{g.q, "between 0 and 1 (0% and 100%)</dd>"},
		{g.qi, "between 0 and 1 (0% and 100%)</dd>"},
		{g.qc, "between 0 and 1</dd>"},
		{g.qs, "between 10 and 50</dd>"},
	} {
		if _, page := g.get(g.qpath(0, c.q)); !strings.Contains(page, c.want) {
			t.Errorf("%s: the possible values do not read %q", c.q.Quantity, c.want)
		}
	}
}

// On the expert's page in round 2 their own fit and the other experts'
// panel under it title their upper plots alike, "how likely": the panel
// said "density" under the fit's "how likely".
func TestExpertsPanelTitlesItsPlotsAsTheirFit(t *testing.T) {
	g := newExpertRig(t, "Ada Quell", "Bruno Ferrante", "Chiara Osei")
	for i, a := range [][]string{{"0.03", "0.07", "0.16"}, {"0.02", "0.08", "0.2"}, {"0.04", "0.1", "0.25"}} {
		if resp, _ := g.post(g.qpath(i, g.q)+"/save", quantiles(a...)); resp.StatusCode != http.StatusSeeOther {
			t.Fatalf("expert %d save: %d", i, resp.StatusCode)
		}
	}
	g.secondRound()
	_, page := g.get(g.qpath(0, g.q))
	start := strings.Index(page, "What the other experts said")
	if start < 0 || !strings.Contains(page[:start], `class="chart-with-table chart-fit"`) {
		t.Fatal("no fit before the other experts' panel")
	}
	title := regexp.MustCompile(`class="axis-title axis-title-y"[^>]*>([^<]*)<`)
	for what, part := range map[string]string{"the fit": page[:start], "the panel": page[start:]} {
		var titles []string
		for _, m := range title.FindAllStringSubmatch(part, -1) {
			titles = append(titles, m[1])
		}
		// Both layouts, each an upper and a lower plot.
		if want := "how likely|chance below|how likely|chance below"; strings.Join(titles, "|") != want {
			t.Errorf("%s titles its plots %q, want %q", what, titles, want)
		}
	}
	if strings.Contains(page[start:], "Density (upper plot)") || !strings.Contains(page[start:], "How likely each value of") {
		t.Error("the panel's caption does not name its plots as their titles do")
	}
	// The panel's table is captioned in the words of the fit's own table.
	if !strings.Contains(page[start:], "<caption>Each curve&#39;s 5%, middle (median) and 95% points</caption>") || strings.Contains(page, "Percentiles of each curve") {
		t.Error("the panel's table is not captioned in the fit's words")
	}
}

// What an expert reads around their fit speaks as the picture does (the
// curve that best matches their answers, its 5% point, middle and 95%
// point), where the invitation promised "the Beta distribution they
// imply", the read-backs spoke of "the fitted curve" and closed on "It is
// Beta(α = …, β = …), a Beta distribution", and the history's column read
// "fitted curve". The Beta's parameters stay, last, for the facilitator.
func TestPreviewSpeaksAsItsPicture(t *testing.T) {
	g := newExpertRig(t)
	_, page := g.get(g.qpath(0, g.q))
	if !strings.Contains(page, "to see the curve that best matches them before you save.") || strings.Contains(page, "Beta distribution") {
		t.Error("the invitation before a fit does not speak of the curve that best matches the answers")
	}
	_, frag := g.post(g.qpath(0, g.q)+"/preview?fragment=1", quantiles("0.05", "0.2", "0.4"))
	frag = html.UnescapeString(frag)
	start, end := strings.Index(frag, `<ul class="readbacks">`), strings.Index(frag, "<svg")
	if start < 0 || end < start {
		t.Fatalf("no read-backs before the picture:\n%s", frag)
	}
	var lines []string
	for _, m := range regexp.MustCompile(`<li>([^<]*)</li>`).FindAllStringSubmatch(frag[start:end], -1) {
		lines = append(lines, m[1])
	}
	if len(lines) < 2 {
		t.Fatalf("read-backs %q", lines)
	}
	last := lines[len(lines)-1]
	beta := regexp.MustCompile(` In statistical terms the curve is Beta\(α = [0-9.]+, β = [0-9.]+\)\.$`)
	if !strings.HasPrefix(last, "Taken together, the curve that best matches your answers has its middle (the median) at ") || !beta.MatchString(last) {
		t.Errorf("the closing read-back reads %q", last)
	}
	lines[len(lines)-1] = beta.ReplaceAllString(last, "")
	for _, line := range lines {
		for _, jargon := range []string{"fitted", "Beta", "distribution", "percentile", "α"} {
			if strings.Contains(line, jargon) {
				t.Errorf("a read-back says %q: %q", jargon, line)
			}
		}
	}
	if !strings.Contains(frag[start:end], "The best-matching curve gives") {
		t.Errorf("the read-backs do not say what the best-matching curve gives:\n%q", lines)
	}
	if resp, _ := g.post(g.qpath(0, g.q)+"/save", quantiles("0.05", "0.2", "0.4")); resp.StatusCode != http.StatusSeeOther {
		t.Fatal("save failed")
	}
	_, page = g.get(g.qpath(0, g.q))
	if !strings.Contains(page, `>best-matching curve</th>`) || !strings.Contains(page, `data-label="best-matching curve"`) || strings.Contains(page, "fitted curve") {
		t.Error("the history's column is not the best-matching curve")
	}
}

// An expert who placed chips reads what their chips put below each edge,
// in the picture and in the closing read-back, not that they "gave a
// chance" they never typed; the facilitator entering chips for an expert
// reads the expert's name.
func TestChipsPreviewSpeaksOfChips(t *testing.T) {
	g := newExpertRig(t)
	form := url.Values{}
	for i, c := range []string{"2", "6", "7", "4", "1"} {
		form.Set("counts["+strconv.Itoa(i)+"]", c)
	}
	_, frag := g.post(g.qpath(0, g.qc)+"/preview?fragment=1", form)
	frag = html.UnescapeString(frag)
	for _, want := range []string{
		"How close the curve comes to your chips (the circles on the lower curve): your chips put 10% below 0.1, the curve ",
		"Taken together, the curve that best matches your chips has its middle (the median) at ",
		">your chips below each edge<", ">bin edge<",
		// The heading over the read-backs: "What your numbers imply"
		// stood over a board of chips.
		"What your chips imply",
	} {
		if !strings.Contains(frag, want) {
			t.Errorf("the chips preview lacks %q", want)
		}
	}
	if strings.Contains(frag, "you gave") || strings.Contains(frag, "you said") {
		t.Error("the chips preview says the expert gave chances")
	}
	// The read-backs say what the chips give, not what the expert is
	// "saying": 2 of 20 chips below 0.1.
	if !strings.Contains(frag, "Your chips give a 1 in 10 chance the value is below 0.1.") || strings.Contains(frag, "You are saying") {
		t.Error("the chips read-backs do not say what the chips give")
	}
	// Typed values keep their words.
	_, frag = g.post(g.qpath(0, g.q)+"/preview?fragment=1", quantiles("0.05", "0.2", "0.4"))
	if !strings.Contains(frag, "you gave a chance of 5% below 0.05") || !strings.Contains(frag, "What your numbers imply") || strings.Contains(frag, "chips") {
		t.Error("typed values do not keep their words")
	}
}

// TestChipsWarningsSayToMoveChips: a chips board's warnings advise what
// an expert placing chips can do, move them, where they said "bring your
// outer values in towards your middle one" and "adjust your values" to
// an expert who typed none (invented boards on [0, 0.1, 0.2, 0.3, 0.5, 1]).
func TestChipsWarningsSayToMoveChips(t *testing.T) {
	g := newExpertRig(t)
	for _, c := range []struct {
		counts []string
		want   string
	}{
		{[]string{"9", "1", "0", "0", "10"}, "The curve that fits your chips piles up at both ends: it says the value is most likely close to 0 or to 1, and least likely in between. If that is not what you mean, move chips from the end bins towards the middle."},
		{[]string{"18", "1", "1", "0", "0"}, "The curve that fits your chips is highest right at 0: it says values at the very edge are the most likely. If you expect the value to sit a little away from 0, move a chip or two away from that end."},
		{[]string{"1", "0", "0", "1", "18"}, "A curve pressed this hard against the edge usually means your chips need another look."},
	} {
		form := url.Values{}
		for i, n := range c.counts {
			form.Set("counts["+strconv.Itoa(i)+"]", n)
		}
		_, frag := g.post(g.qpath(0, g.qc)+"/preview?fragment=1", form)
		frag = html.UnescapeString(frag)
		if !strings.Contains(frag, c.want) {
			t.Errorf("chips %v: the warnings lack %q", c.counts, c.want)
		}
		if strings.Contains(frag, "your outer values") || strings.Contains(frag, "adjust your values") || strings.Contains(frag, "your values need") {
			t.Errorf("chips %v: a warning speaks of typed values", c.counts)
		}
	}
}

// The smallest confidence, 0.0000000001% (elicit.MinCentral), is not
// refused for the confidence by the expert's form or the answer sheet;
// below it both say what the least is. A confidence of 1e-13% had been
// taken by the form as a range holding no chance at all.
func TestTheSmallestConfidenceIsNamed(t *testing.T) {
	g, form, sheet := confidenceDoors(t)
	var ie *elicit.InputError
	// Typed below 1 without its sign, a confidence is read as a fraction
	// typed by mistake ("Type the confidence as a percentage"); with its
	// sign it is read as written.
	for _, c := range []string{workshop.ConfidenceMinPercent + "%"} {
		if _, body := g.post(g.qpath(0, g.qi)+"/preview", form(c)); shownError(body, "f-confidence") != "" {
			t.Errorf("form, confidence %s: %q", c, shownError(body, "f-confidence"))
		}
		if err := sheet(c); errors.As(err, &ie) && strings.Contains(err.Error(), "confidence") {
			t.Errorf("sheet, confidence %s: %v", c, err)
		}
	}
	for _, under := range []string{"0.00000000009%", "1e-13%", "1e-300%"} {
		if _, body := g.post(g.qpath(0, g.qi)+"/preview", form(under)); !strings.Contains(shownError(body, "f-confidence"), "Must be at least 0.0000000001%") {
			t.Errorf("form, confidence %s: %q", under, shownError(body, "f-confidence"))
		}
		if err := sheet(under); !errors.As(err, &ie) || ie.Rule != elicit.RuleCentralNarrow || !strings.Contains(ie.Detail, "at least 0.0000000001") {
			t.Errorf("sheet, confidence %s: %v", under, err)
		}
	}
}

// A unit other than the page's two choices is refused, nothing saved,
// with the form's own message: it was read as proportions without a word
// (review, 2026-12-05). No unit at all is a page without the choice, and
// the values are read as typed.
func TestAnUnknownUnitIsRefused(t *testing.T) {
	g := newExpertRig(t)
	saved := func() int {
		revs, err := g.db.Revisions(context.Background(), g.ws.ID)
		if err != nil {
			t.Fatal(err)
		}
		return len(revs)
	}
	form := func(unit string) url.Values {
		return url.Values{"values[0]": {"0.02"}, "values[1]": {"0.06"}, "values[2]": {"0.15"}, "unit": {unit}}
	}
	for _, unit := range []string{"bogus", "Percent", strings.Repeat("p", 4001)} {
		r, body := g.post(g.qpath(0, g.q)+"/save", form(unit))
		if r.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, "Choose how you type your values") || saved() != 0 {
			t.Errorf("unit %.20q: %d, %d saved", unit, r.StatusCode, saved())
		}
	}
	for i, unit := range []string{"", "proportion"} {
		if r, _ := g.post(g.qpath(0, g.q)+"/save", form(unit)); r.StatusCode != http.StatusSeeOther || saved() != i+1 {
			t.Errorf("unit %q: %d, %d saved", unit, r.StatusCode, saved())
		}
	}
}

package web

import (
	"context"
	"html"
	"net/http"
	"net/url"
	"regexp"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// fieldLabelOn is the label a form shows for the field name: the text of
// its <label for>, or, for a field whose own label is a sentence (a radio
// button, the calibration tick), the legend of the fieldset it is in.
func fieldLabelOn(page, name string) (own, legend string) {
	if m := regexp.MustCompile(`<label for="f-` + regexp.QuoteMeta(name) + `">\s*([^<]*)`).FindStringSubmatch(page); m != nil {
		own = html.UnescapeString(strings.TrimSpace(m[1]))
	}
	at := strings.Index(page, `name="`+name+`"`)
	if at < 0 {
		return own, ""
	}
	open := strings.LastIndex(page[:at], "<legend>")
	if open >= 0 && strings.LastIndex(page[:at], "</fieldset>") < open {
		rest := page[open+len("<legend>"):]
		legend = html.UnescapeString(strings.TrimSpace(rest[:strings.Index(rest, "</legend>")]))
	}
	return own, legend
}

// The correction form that no longer offers the fields answers fix names
// a refusal of one by the label the full form gave it: the two lists of
// labels had drifted ("Probabilities" for the custom probabilities the
// full form labels "Custom probabilities").
func TestLockedFieldRefusalsUseTheFullFormsLabels(t *testing.T) {
	h, ws, _, _, _ := seeded(t)
	ctx := context.Background()
	// A question nobody has answered offers every field.
	q := workshop.Question{WorkshopID: ws.ID, Wording: "(Invented.) What share of valves leak?", Quantity: "valve leak share",
		Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: workshop.ProbsDefault}
	if err := h.db.AddQuestion(ctx, &q); err != nil {
		t.Fatal(err)
	}
	_, page := h.get(questionPath(ws.ID, q.ID) + "/edit")
	for _, l := range lockedFields {
		own, legend := fieldLabelOn(page, l.name)
		if !strings.HasPrefix(own, l.label) && legend != l.label {
			t.Errorf("%s: a refusal names it %q; the full form labels it %q (in the fieldset %q)", l.name, l.label, own, legend)
		}
	}
}

// A full correction form opened before the first answer, and sent after
// it with "calibration question" unticked, is refused beside the
// calibration fact in the facilitator's words, as a changed bound is; it
// showed elicit's "calibration: cannot change …" above the form, and the
// summary asked to correct marked fields where none was marked.
func TestStaleFormUntickingCalibrationSaysWhichFieldAndWhy(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	q := qs[1] // a calibration question two experts have answered
	if !q.Calibration {
		t.Fatal("the demo's second question is not a calibration question")
	}
	stale := url.Values{}
	for k, v := range questionValues(q) {
		stale[k] = v
	}
	stale.Del("calibration")
	stale.Set("true_value", "")
	stale.Set("reason", "Not a calibration question after all (invented).")
	r, page := h.post(questionPath(ws.ID, q.ID)+"/edit", stale)
	if r.StatusCode != http.StatusUnprocessableEntity {
		t.Fatalf("status %d, want 422", r.StatusCode)
	}
	if !strings.Contains(page, `id="err-calibration"`) ||
		!strings.Contains(page, "Calibration: "+string(workshop.RuleLockedAfterAnswers)+". An expert answered after this form was opened") {
		t.Error("the refusal does not name the calibration field by its label with the reason")
	}
	if strings.Contains(page, `class="form-error"`) || strings.Contains(page, "calibration: ") {
		t.Error("the refusal is shown above the form in elicit's words")
	}
	checkNoUnmarkedAsk(t, page)
	if got, _ := h.db.Question(context.Background(), q.ID); !got.Calibration {
		t.Error("the question stopped being a calibration question")
	}

	// The stale form changing a bound says the same of the bound.
	stale = url.Values{}
	for k, v := range questionValues(q) {
		stale[k] = v
	}
	stale.Set("upper", "0.9")
	stale.Set("reason", "Narrower (invented).")
	if _, page := h.post(questionPath(ws.ID, q.ID)+"/edit", stale); !strings.Contains(page, "Upper bound: ") {
		t.Error("a changed bound is not named")
	} else {
		checkNoUnmarkedAsk(t, page)
	}
}

// checkNoUnmarkedAsk fails when the locked correction form asks to correct
// marked fields and marks none.
func checkNoUnmarkedAsk(t *testing.T, page string) {
	t.Helper()
	if strings.Contains(page, "Correct the marked fields") && !strings.Contains(page, `aria-invalid="true"`) {
		t.Error(`the page asks to "Correct the marked fields" and marks none`)
	}
	if !strings.Contains(page, "opened before an expert answered") {
		t.Error("the summary does not say why nothing was saved")
	}
}

// On the full form, unticking the calibration of a question whose true
// value the experts have seen is refused beside the tick.
func TestUntickingARevealedCalibrationIsRefusedBesideTheTick(t *testing.T) {
	h, ws, _, _, _ := seeded(t)
	ctx := context.Background()
	tv := 0.2
	q := workshop.Question{WorkshopID: ws.ID, Wording: "(Invented.) What share of last year's pumps leaked?", Quantity: "pump leak share",
		Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: workshop.ProbsDefault, Calibration: true, TrueValue: &tv}
	if err := h.db.AddQuestion(ctx, &q); err != nil {
		t.Fatal(err)
	}
	if err := h.db.SetTrueValue(ctx, q.ID, tv, true, "Shown (invented)."); err != nil {
		t.Fatal(err)
	}
	got, _ := h.db.Question(ctx, q.ID)
	form := url.Values{}
	for k, v := range questionValues(got) {
		form[k] = v
	}
	form.Del("calibration")
	form.Set("true_value", "")
	form.Set("reason", "Not a calibration question (invented).")
	r, page := h.post(questionPath(ws.ID, q.ID)+"/edit", form)
	if r.StatusCode != http.StatusUnprocessableEntity {
		t.Fatalf("status %d, want 422", r.StatusCode)
	}
	if !strings.Contains(page, `<span class="field-error" id="err-calibration" role="alert">`+html.EscapeString(string(workshop.RuleRevealedCalibration))) ||
		!strings.Contains(page, `aria-describedby="err-calibration"`) {
		t.Error("the refusal is not beside the calibration tick")
	}
	if strings.Contains(page, `class="form-error"`) {
		t.Error("the refusal is shown above the form in elicit's words")
	}
}

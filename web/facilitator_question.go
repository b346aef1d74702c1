package web

import (
	"net/http"
	"slices"
	"strconv"
	"strings"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/web/chart"
)

// probPresets are the sets of cumulative probabilities a quantile
// question can ask for, besides a custom list.
var probPresets = []struct {
	Key, Label string
	Probs      []float64
}{
	{"p05_50_95", "5th, 50th and 95th percentiles", workshop.ProbsDefault},
	{"quartiles", "quartiles and median (25th, 50th, 75th)", workshop.ProbsQuartiles},
	{"tertiles", "tertiles and median (33⅓th, 50th, 66⅔th)", workshop.ProbsTertiles},
	{"custom", "custom probabilities", nil},
}

// questionForm is the add-question page, or with Edit the page that
// corrects a question.
type questionForm struct {
	Workshop workshop.Workshop
	Form     *Form
	Edit     *questionEdit
}

// questionEdit is the question being corrected and how many answers it
// has: with any, only its wording, quantity and units may change.
type questionEdit struct {
	Question workshop.Question
	// Recorded is what the record holds against the question: answers
	// and agreed priors, either of which fixes its scale.
	Recorded workshop.Recorded
}

// since says what came after a form opened on a question nobody had
// answered, and fixed its scale: answers, or else an agreed prior.
func (e questionEdit) since() string {
	if e.Recorded.Lock() == workshop.RuleLockedAfterPrior {
		return "a prior was agreed for the question"
	}
	return "an expert answered"
}

func (v questionForm) action() string {
	if v.Edit == nil {
		return workshopPath(v.Workshop.ID) + "/questions"
	}
	return questionPath(v.Workshop.ID, v.Edit.Question.ID) + "/edit"
}

func (v questionForm) locked() bool { return v.Edit != nil && v.Edit.Recorded.Lock() != "" }

// questionAliases maps elicit's field names in Question.Validate errors
// to this form's fields.
var questionAliases = map[string]string{
	"probs":      "custom_probs",
	"bin_edges":  "bin_edges",
	"edges":      "bin_edges",
	"chips":      "chips",
	"true_value": "true_value",
	"format":     "format",
}

func (s *Server) newQuestionForm(w http.ResponseWriter, r *http.Request) {
	ws, ok := s.loadWorkshop(w, r)
	if !ok {
		return
	}
	f := newForm(map[string][]string{
		"lower": {"0"}, "upper": {"1"}, "format": {string(workshop.FormatQuantiles)},
		"preset": {"p05_50_95"}, "chips": {strconv.Itoa(workshop.DefaultChips)},
	})
	s.renderPage(w, r, http.StatusOK, facilitatorMeta(ws, "Add a question", "overview"),
		questionFormPage(questionForm{Workshop: ws, Form: f}))
}

// addQuestion parses the question form, lets elicit judge the question
// (Question.Validate) and saves it. Bad input shows the form again with
// the typed values and the message beside the field; nothing is saved.
func (s *Server) addQuestion(w http.ResponseWriter, r *http.Request) {
	ws, ok := s.loadWorkshop(w, r)
	if !ok || !parseForm(w, r) {
		return
	}
	f := newForm(r.PostForm)
	q := parseQuestion(f)
	q.WorkshopID = ws.ID
	if f.OK() {
		f.Fail(q.Validate(), questionAliases)
	}
	if !f.OK() {
		s.renderPage(w, r, http.StatusUnprocessableEntity, facilitatorMeta(ws, "Add a question", "overview"),
			questionFormPage(questionForm{Workshop: ws, Form: f}))
		return
	}
	if err := s.store.AddQuestion(r.Context(), &q); err != nil {
		if s.notSaved(r, f, err) {
			s.renderPage(w, r, f.refusedStatus(), facilitatorMeta(ws, "Add a question", "overview"),
				questionFormPage(questionForm{Workshop: ws, Form: f}))
			return
		}
		s.fail(w, r, err)
		return
	}
	http.Redirect(w, r, workshopPath(ws.ID)+"#questions", http.StatusSeeOther)
}

// parseQuestion reads the form's fields; only the chosen format's fields
// are read.
func parseQuestion(f *Form) workshop.Question {
	q := workshop.Question{
		Wording:  f.Text("wording", input.MaxLongText, true),
		Quantity: f.Text("quantity", input.MaxShortText, true),
		Units:    f.Text("units", input.MaxShortText, false),
		Lower:    f.Float("lower"),
		Upper:    f.Float("upper"),
		Format: workshop.AnswerFormat(f.Choice("format", string(workshop.FormatQuantiles),
			string(workshop.FormatQuantiles), string(workshop.FormatInterval), string(workshop.FormatChips))),
	}
	switch q.Format {
	case workshop.FormatQuantiles:
		keys := make([]string, len(probPresets))
		for i, p := range probPresets {
			keys[i] = p.Key
		}
		preset := f.Choice("preset", "p05_50_95", keys...)
		for _, p := range probPresets {
			if p.Key == preset {
				q.Probs = append([]float64(nil), p.Probs...)
			}
		}
		if preset == "custom" {
			q.Probs = f.FloatList("custom_probs")
		}
	case workshop.FormatChips:
		if strings.TrimSpace(f.Value("bin_edges")) == "" {
			// Parley's default: equal bins across the question's bounds.
			if f.Error("lower") == "" && f.Error("upper") == "" && q.Lower < q.Upper {
				q.BinEdges = workshop.DefaultBinEdges(q.Lower, q.Upper)
			}
		} else {
			q.BinEdges = f.FloatList("bin_edges")
		}
		q.Chips = f.Int("chips", 1, workshop.MaxChips)
	}
	if f.Checked("calibration") {
		q.Calibration = true
		if strings.TrimSpace(f.Value("true_value")) == "" {
			f.set("true_value", string(elicit.RuleRequired)+" for a calibration question")
		} else {
			// A proportion's true value takes a % sign, as on the
			// calibration page and in the experts' answers (bounds
			// [0, 1] typed in this same form make it a proportion).
			v, _, err := workshop.ParseAnswerNumber("true_value", f.Value("true_value"), q, false)
			f.failField("true_value", err)
			if err == nil {
				q.TrueValue = &v
			}
		}
	} else if strings.TrimSpace(f.Value("true_value")) != "" {
		// Not dropped in silence: a true value belongs to a calibration
		// question only.
		f.set("true_value", "applies only to a calibration question: tick “calibration question” or clear it")
	}
	return q
}

// lockedFields are the question form's fields that answers fix
// (workshop.Question.CheckCorrection), in the form's order, with the
// labels the full form shows them by. The form takes its labels from
// here, and the form that no longer offers these fields names a refusal
// of one by the same words.
var lockedFields = []struct{ name, label string }{
	{"lower", "Lower bound"}, {"upper", "Upper bound"}, {"format", "How experts answer"},
	{"preset", "Probabilities"}, {"custom_probs", "Custom probabilities"}, {"bin_edges", "Bin edges"},
	{"chips", "Chips per expert"}, {"calibration", "Calibration"}, {"true_value", "True value"},
}

// lockedLabel is the full question form's label of a field that answers
// fix; "" for any other field.
func lockedLabel(name string) string {
	for _, l := range lockedFields {
		if l.name == name {
			return l.label
		}
	}
	return ""
}

// refusalSummary heads a refused question form. The correction form that
// no longer offers the fields answers fix says a refusal of one below the
// units, where their values are shown, and marks no field for it.
func (v questionForm) refusalSummary() string {
	if !v.locked() {
		return nothingSavedSummary
	}
	var fixed, marked bool
	for name := range v.Form.Errors {
		switch {
		case name == "":
		case lockedLabel(name) != "":
			fixed = true
		default:
			marked = true
		}
	}
	switch {
	case fixed && marked:
		return "Nothing was saved. Correct the marked fields and send again; what this form changed in the fixed part of the question is said below the units."
	case fixed:
		return "Nothing was saved: this form was opened before " + v.Edit.since() + ", which now fixes what this form changed, as said below the units. " +
			"The wording, quantity and units you typed are kept here: send the form again to correct them."
	}
	return nothingSavedSummary
}

// questionValues writes q as the question form's values, for correcting it.
func questionValues(q workshop.Question) map[string][]string {
	m := map[string][]string{
		"wording": {q.Wording}, "quantity": {q.Quantity}, "units": {q.Units},
		"lower": {exact(q.Lower)}, "upper": {exact(q.Upper)}, "format": {string(q.Format)},
		"preset": {"custom"}, "custom_probs": {joinFloats(q.Probs)},
		"bin_edges": {joinFloats(q.BinEdges)}, "chips": {strconv.Itoa(q.Chips)},
	}
	for _, p := range probPresets {
		if p.Probs != nil && slices.Equal(p.Probs, q.Probs) {
			m["preset"], m["custom_probs"] = []string{p.Key}, []string{""}
		}
	}
	if q.Format != workshop.FormatChips {
		m["bin_edges"], m["chips"] = []string{""}, []string{""}
	}
	if q.Calibration {
		m["calibration"] = []string{"on"}
	}
	if q.TrueValue != nil {
		m["true_value"] = []string{exact(*q.TrueValue)}
	}
	return m
}

func joinFloats(xs []float64) string {
	parts := make([]string, len(xs))
	for i, x := range xs {
		parts[i] = exact(x)
	}
	return strings.Join(parts, ", ")
}

// exact writes a stored number back into a form with every figure it
// has, so that sending the form unchanged changes nothing: at four
// figures a bound of 12345 came back as 12340.
func exact(x float64) string { return chart.FormatExact(x) }

// loadEdit reads the question to correct and what is recorded for it.
func (s *Server) loadEdit(w http.ResponseWriter, r *http.Request) (workshop.Workshop, *questionEdit, bool) {
	ws, ok := s.loadWorkshop(w, r)
	if !ok {
		return ws, nil, false
	}
	q, ok := s.loadQuestion(w, r, ws)
	if !ok {
		return ws, nil, false
	}
	rec, err := s.store.Recorded(r.Context(), q.ID)
	if err != nil {
		s.fail(w, r, err)
		return ws, nil, false
	}
	return ws, &questionEdit{Question: q, Recorded: rec}, true
}

func (s *Server) editQuestionForm(w http.ResponseWriter, r *http.Request) {
	ws, ed, ok := s.loadEdit(w, r)
	if !ok {
		return
	}
	s.renderPage(w, r, http.StatusOK, facilitatorMeta(ws, "Correct question "+strconv.Itoa(ed.Question.Position), "overview"),
		questionFormPage(questionForm{Workshop: ws, Form: newForm(questionValues(ed.Question)), Edit: ed}))
}

// editQuestion saves a correction with its required reason. With answers
// the form offers only the wording, quantity and units, and the rest is
// the stored question's; elicit's CheckCorrection (in the store's
// transaction) refuses any change to it. A form opened before the first
// answer still carries every field: it is read whole, so that a bound
// changed on it is refused by name, not dropped while the wording beside
// it is saved.
func (s *Server) editQuestion(w http.ResponseWriter, r *http.Request) {
	ws, ed, ok := s.loadEdit(w, r)
	if !ok || !parseForm(w, r) {
		return
	}
	f := newForm(r.PostForm)
	var next workshop.Question
	if _, whole := r.PostForm["lower"]; ed.Recorded.Lock() != "" && !whole {
		next = ed.Question
		next.Wording = f.Text("wording", input.MaxLongText, true)
		next.Quantity = f.Text("quantity", input.MaxShortText, true)
		next.Units = f.Text("units", input.MaxShortText, false)
	} else {
		next = parseQuestion(f)
	}
	next.ID, next.WorkshopID = ed.Question.ID, ws.ID
	reason := f.Text("reason", input.MaxLongText, true)
	if f.OK() {
		if err := s.store.EditQuestion(r.Context(), next, reason); err != nil {
			switch {
			case s.notSaved(r, f, err):
			case !isInputError(err):
				s.fail(w, r, err)
				return
			default:
				f.failWithBoxes(err, questionAliases, "calibration")
			}
		}
	}
	if !f.OK() {
		s.renderPage(w, r, f.refusedStatus(), facilitatorMeta(ws, "Correct question "+strconv.Itoa(ed.Question.Position), "overview"),
			questionFormPage(questionForm{Workshop: ws, Form: f, Edit: ed}))
		return
	}
	s.confirmOnce(w, r, questionPath(ws.ID, ed.Question.ID), doneCorrected)
	http.Redirect(w, r, questionPath(ws.ID, ed.Question.ID), http.StatusSeeOther)
}

// retireQuestion retires a question or brings it back (action=retire or
// restore), with a required reason.
func (s *Server) retireQuestion(w http.ResponseWriter, r *http.Request) {
	ws, q, ok := s.loadWorkshopQuestion(w, r)
	if !ok || !parseForm(w, r) {
		return
	}
	f := newForm(r.PostForm)
	action := f.Choice("action", "", "retire", "restore")
	reason := f.Text("retire_reason", input.MaxLongText, true)
	if f.OK() {
		if err := s.store.SetQuestionRetired(r.Context(), q.ID, action == "retire", reason); err != nil {
			switch {
			case s.notSaved(r, f, err):
			case !isInputError(err):
				s.fail(w, r, err)
				return
			default:
				f.Fail(err, nil)
			}
		}
	}
	if !f.OK() {
		s.showPanelWith(w, r, f.refusedStatus(), ws, q, panelForms{retire: f})
		return
	}
	if action == "restore" {
		s.confirmOnce(w, r, questionPath(ws.ID, q.ID), doneRestored)
	}
	http.Redirect(w, r, questionPath(ws.ID, q.ID), http.StatusSeeOther)
}

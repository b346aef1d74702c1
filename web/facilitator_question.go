package web

import (
	"net/http"
	"strings"

	"github.com/parley-elicit/parley/elicit"
)

// probPresets are the sets of cumulative probabilities a quantile
// question can ask for, besides a custom list.
var probPresets = []struct {
	Key, Label string
	Probs      []float64
}{
	{"p05_50_95", "5th, 50th and 95th percentiles", elicit.ProbsDefault},
	{"quartiles", "quartiles and median (25th, 50th, 75th)", elicit.ProbsQuartiles},
	{"tertiles", "tertiles and median (33⅓th, 50th, 66⅔th)", elicit.ProbsTertiles},
	{"custom", "custom probabilities", nil},
}

// questionForm is the add-question page.
type questionForm struct {
	Workshop elicit.Workshop
	Form     *Form
}

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
		"lower": {"0"}, "upper": {"1"}, "format": {string(elicit.FormatQuantiles)},
		"preset": {"p05_50_95"}, "chips": {"20"}, "bin_edges": {"0, 0.1, 0.2, 0.3, 0.4, 0.5, 0.6, 0.7, 0.8, 0.9, 1"},
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
func parseQuestion(f *Form) elicit.Question {
	q := elicit.Question{
		Wording:  f.Text("wording", MaxLongText, true),
		Quantity: f.Text("quantity", MaxShortText, true),
		Units:    f.Text("units", MaxShortText, false),
		Lower:    f.Float("lower"),
		Upper:    f.Float("upper"),
		Format: elicit.AnswerFormat(f.Choice("format", string(elicit.FormatQuantiles),
			string(elicit.FormatQuantiles), string(elicit.FormatInterval), string(elicit.FormatChips))),
	}
	switch q.Format {
	case elicit.FormatQuantiles:
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
	case elicit.FormatChips:
		q.BinEdges = f.FloatList("bin_edges")
		q.Chips = f.Int("chips", 1, 1000)
	}
	if f.Checked("calibration") {
		q.Calibration = true
		if v, ok := f.OptionalFloat("true_value"); ok {
			q.TrueValue = &v
		} else if strings.TrimSpace(f.Value("true_value")) == "" {
			f.set("true_value", string(elicit.RuleRequired)+" for a calibration question")
		}
	}
	return q
}

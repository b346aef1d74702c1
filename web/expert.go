package web

import (
	"fmt"
	"math"
	"strings"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/web/chart"
)

// An expert's pages: their home (the workshop and their questions) and one
// page per question, where they enter a judgement in the question's
// format, preview the fitted Beta, save revisions and, from round 2, see
// the other experts' curves without names.

// expertHomeView is what an expert's home page shows.
type expertHomeView struct {
	Base      string // "/e/{token}"
	Expert    string // the expert's own display name
	Title     string
	Purpose   string
	Decision  string
	Round     int
	Open      bool
	Questions []expertQuestionItem
}

type expertQuestionItem struct {
	Href        string
	Position    int
	Wording     string
	Quantity    string
	Units       string
	Calibration bool
	Answered    bool   // has a revision in the current round
	AnsweredAt  string // time of that revision
	Earlier     bool   // answered only in an earlier round
}

// expertQuestionView is one question's page.
type expertQuestionView struct {
	Base     string
	Action   string // the question's URL
	Title    string
	Round    int
	Open     bool
	Question expertQuestionInfo
	Form     answerForm
	Preview  *previewView
	Saved    bool
	Closed   string // a message when a save was refused because the round is closed
	History  []historyRow
	Panel    *chart.PanelView
}

type expertQuestionInfo struct {
	ID          int64
	Position    int
	Wording     string
	Quantity    string
	Units       string
	Lower       string
	Upper       string
	Format      elicit.AnswerFormat
	Calibration bool
	Revealed    string // the true value, only once revealed
}

// answerForm is the judgement form in the question's format, with the
// values as typed and any message beside its field.
type answerForm struct {
	Format      elicit.AnswerFormat
	Fields      []formField
	Reason      string
	ReasonError string
	Error       string // a message not tied to one field
	Invalid     bool   // some field has a message
	Chips       int    // chips to place, FormatChips
}

type formField struct {
	Name   string // the form key, also the elicit field name: "values[1]", "lowest"
	ID     string
	Label  string
	Hint   string
	Value  string
	Error  string
	Suffix string // "%" for confidence
}

// previewView is the fitted picture with its read-backs.
type previewView struct {
	Fit       chart.FitView
	Params    string
	ReadBacks []string
	Warnings  []string
	Problem   string // why no fit could be drawn
}

type historyRow struct {
	Round  int
	At     string
	Reason string
	Alpha  string
	Beta   string
	Values string
}

// chance says a probability the way people say odds: "1 in 20" when
// 1/p is close to a whole number, "about 1 in 39" for small
// probabilities, otherwise a percentage.
func chance(p float64) string {
	switch {
	case math.IsNaN(p) || math.IsInf(p, 0) || p < 0 || p > 1:
		return "an unknown chance"
	case p == 0:
		return "no chance"
	case p == 1:
		return "certainty"
	case p < 0.001:
		return "less than 1 in 1000"
	}
	n := 1 / p
	r := math.Round(n)
	switch {
	case r >= 2 && math.Abs(n-r) <= 0.02*n:
		return fmt.Sprintf("a 1 in %d chance", int(r))
	case p < 0.2:
		return fmt.Sprintf("about a 1 in %d chance", int(r))
	}
	return "a " + chart.FormatPercent(p) + " chance"
}

// readBack turns one stated pair P(X ≤ x) = p into a sentence, speaking of
// the smaller tail so that 95% reads "1 in 20 ... above".
func readBack(p, x float64, units string) string {
	v := chart.FormatValue(x)
	if u := strings.TrimSpace(units); u != "" {
		v += " " + u
	}
	switch {
	case p == 0.5:
		return "You are saying the value is as likely to be below " + v + " as above it."
	case p < 0.5:
		return "You are saying there is " + chance(p) + " the value is below " + v + "."
	}
	return "You are saying there is " + chance(1-p) + " the value is above " + v + "."
}

// fittedBack says what the fitted Beta gives for the same statement.
func fittedBack(p, fittedP float64) string {
	if p <= 0.5 {
		return "The fitted curve gives " + chance(fittedP) + " below it."
	}
	return "The fitted curve gives " + chance(1-fittedP) + " above it."
}

// newAnswerForm lays out the question's form with the typed values.
func newAnswerForm(q elicit.Question, typed map[string]string) answerForm {
	f := answerForm{Format: q.Format, Chips: q.Chips}
	add := func(name, label, hint, suffix string) {
		f.Fields = append(f.Fields, formField{
			Name: name, ID: "f-" + strings.NewReplacer("[", "-", "]", "").Replace(name),
			Label: label, Hint: hint, Value: typed[name], Suffix: suffix,
		})
	}
	units := ""
	if u := strings.TrimSpace(q.Units); u != "" {
		units = " (" + u + ")"
	}
	switch q.Format {
	case elicit.FormatInterval:
		add("lowest", "Lowest plausible value"+units, "", "")
		add("highest", "Highest plausible value"+units, "", "")
		add("best", "Best estimate"+units, "", "")
		add("confidence", "How sure are you that the true value lies between your lowest and highest?", "A percentage, for example 80.", "%")
	case elicit.FormatChips:
		for i := 0; i+1 < len(q.BinEdges); i++ {
			add(fmt.Sprintf("counts[%d]", i),
				fmt.Sprintf("Chips from %s to %s", chart.FormatValue(q.BinEdges[i]), chart.FormatValue(q.BinEdges[i+1])), "", "")
		}
	default:
		for i, p := range q.Probs {
			hint := ""
			if p == 0.5 {
				hint = "Your median: as likely below as above."
			}
			add(fmt.Sprintf("values[%d]", i),
				fmt.Sprintf("The value with a %s chance of being lower%s", chart.FormatPercent(p), units), hint, "")
		}
	}
	return f
}

// setError puts a message beside the field it names, or on the form when
// no field of the form has that name.
func (f *answerForm) setError(field, msg string) {
	for i := range f.Fields {
		if f.Fields[i].Name == field {
			f.Fields[i].Error = msg
			return
		}
	}
	// "values" or "counts" as a whole: show on the first of them.
	for i := range f.Fields {
		if strings.HasPrefix(f.Fields[i].Name, field+"[") {
			f.Fields[i].Error = msg
			return
		}
	}
	f.Error = msg
}

// answerValues writes a saved answer back as form values, for pre-filling.
func answerValues(q elicit.Question, a elicit.Answer) map[string]string {
	m := map[string]string{}
	switch q.Format {
	case elicit.FormatInterval:
		m["lowest"] = fmt.Sprint(a.Lowest)
		m["highest"] = fmt.Sprint(a.Highest)
		m["best"] = fmt.Sprint(a.Best)
		m["confidence"] = chart.FormatValue(a.Confidence * 100)
	case elicit.FormatChips:
		for i, c := range a.Counts {
			m[fmt.Sprintf("counts[%d]", i)] = fmt.Sprint(c)
		}
	default:
		for i, v := range a.Values {
			m[fmt.Sprintf("values[%d]", i)] = fmt.Sprint(v)
		}
	}
	return m
}

func fieldClass(f formField) string {
	if f.Error != "" {
		return "field field-invalid"
	}
	return "field"
}

func ariaInvalid(f formField) string {
	if f.Error != "" {
		return "true"
	}
	return "false"
}

func describedBy(f formField) string {
	var ids []string
	if f.Hint != "" {
		ids = append(ids, f.ID+"-hint")
	}
	if f.Error != "" {
		ids = append(ids, f.ID+"-error")
	}
	return strings.Join(ids, " ")
}

package web

import (
	"errors"
	"net/http"
	"net/url"
	"slices"
	"strings"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
)

// This file is the one path by which typed form input becomes values:
// every number and every text field of every form goes through it, and
// through package input's rules, so the rules in DEVELOPERS.md hold
// everywhere.

// RuleChoice is broken by a value that is not one of a field's choices.
const ruleChoice elicit.Rule = "must be one of the offered choices"

// nothingSavedSummary heads a form refused for what was typed in it.
const nothingSavedSummary = "Nothing was saved. Correct the marked fields and send again."

// nothingSavedAsSaid heads an answer refused as a whole (chips in too few
// bins), which marks no field.
const nothingSavedAsSaid = "Nothing was saved. Put right what is said above and send again."

// FormErrors maps a form field's name to the message shown beside it.
// The key "" holds a message about the form as a whole.
type formErrors map[string]string

// Form is a submitted form: the values as typed, so the page can show
// them again, and the error found for each field.
type Form struct {
	Values url.Values
	Errors formErrors
	// unsaved is set when the form was fine but the server could not
	// save it (notSaved): the message is the server's, not the fields'.
	unsaved bool
}

// newForm wraps already-parsed values (see parseForm).
func newForm(v url.Values) *Form {
	if v == nil {
		v = url.Values{}
	}
	return &Form{Values: v, Errors: formErrors{}}
}

// Value is the field's value as typed.
func (f *Form) Value(name string) string {
	if f == nil {
		return ""
	}
	return f.Values.Get(name)
}

// Error is the message beside the field, or "".
func (f *Form) Error(name string) string {
	if f == nil {
		return ""
	}
	return f.Errors[name]
}

// fieldsRefused reports whether the form was refused for what was typed
// in it (not for a fault of the server's).
func (f *Form) fieldsRefused() bool { return !f.OK() && !f.unsaved }

// refusedStatus is the status of a refused form: 422 for what was typed,
// 503 when the server could not save it.
func (f *Form) refusedStatus() int {
	if f != nil && f.unsaved {
		return http.StatusServiceUnavailable
	}
	return http.StatusUnprocessableEntity
}

// OK reports whether no field has an error.
func (f *Form) OK() bool { return f == nil || len(f.Errors) == 0 }

// Checked reports whether a checkbox field was ticked.
func (f *Form) Checked(name string) bool {
	v := f.Value(name)
	return v == "on" || v == "true" || v == "1" || v == "yes"
}

// Fail records err beside the field it names. An *elicit.InputError is
// matched to a form field by its name, then its name without an index
// ("values[2]" → "values"), then through aliases (elicit's field name →
// the form's); anything else lands on the form as a whole. Only the first
// error per field is kept.
func (f *Form) Fail(err error, aliases map[string]string) {
	if err == nil {
		return
	}
	var ie *elicit.InputError
	if !errors.As(err, &ie) {
		f.set("", err.Error())
		return
	}
	msg := string(ie.Rule) + detailSuffix(ie.Detail)
	for _, name := range fieldCandidates(ie.Field, aliases) {
		if _, typed := f.Values[name]; typed {
			f.set(name, msg)
			return
		}
	}
	f.set("", ie.Field+": "+msg)
}

// fieldsOK reports whether none of the named fields has an error: a
// check across them (a domain type's Validate) then runs whatever is
// wrong elsewhere on the form, so that every mistake is marked at once.
func (f *Form) fieldsOK(names ...string) bool {
	for _, n := range names {
		if f.Error(n) != "" {
			return false
		}
	}
	return true
}

// failWithBoxes is Fail for a form with checkboxes, which a browser does
// not send when they are unticked: a refusal naming one of boxes is said
// beside it, not above the form in elicit's words ("calibration: …").
func (f *Form) failWithBoxes(err error, aliases map[string]string, boxes ...string) {
	var ie *elicit.InputError
	if errors.As(err, &ie) && slices.Contains(boxes, ie.Field) {
		f.set(ie.Field, string(ie.Rule)+detailSuffix(ie.Detail))
		return
	}
	f.Fail(err, aliases)
}

func fieldCandidates(field string, aliases map[string]string) []string {
	c := []string{field}
	base := field
	if i := strings.IndexByte(field, '['); i > 0 {
		base = field[:i]
		c = append(c, base)
	}
	if a, ok := aliases[field]; ok {
		c = append(c, a)
	}
	if a, ok := aliases[base]; ok {
		c = append(c, a)
	}
	return c
}

// failField records a parse error beside the named field.
func (f *Form) failField(name string, err error) {
	var ie *elicit.InputError
	switch {
	case err == nil:
	case errors.As(err, &ie):
		f.set(name, string(ie.Rule)+detailSuffix(ie.Detail))
	default:
		f.set(name, err.Error())
	}
}

func (f *Form) set(name, msg string) {
	if _, dup := f.Errors[name]; !dup {
		f.Errors[name] = msg
	}
}

// Float parses a required number field, recording any error.
func (f *Form) Float(name string) float64 {
	v, err := input.Number(name, f.Value(name))
	f.failField(name, err)
	return v
}

// OptionalFloat parses a number field that may be left empty.
func (f *Form) OptionalFloat(name string) (float64, bool) {
	if strings.TrimSpace(f.Value(name)) == "" {
		return 0, false
	}
	v, err := input.Number(name, f.Value(name))
	f.failField(name, err)
	return v, err == nil
}

// Int parses a required whole-number field in [min, max].
func (f *Form) Int(name string, min, max int) int {
	v, err := input.Whole(name, f.Value(name), min, max)
	f.failField(name, err)
	return v
}

// FloatList parses a required list-of-numbers field.
func (f *Form) FloatList(name string) []float64 {
	v, err := input.Numbers(name, f.Value(name))
	f.failField(name, err)
	return v
}

// Text parses a text field with the given limit.
func (f *Form) Text(name string, max int, required bool) string {
	v, err := input.Text(name, f.Value(name), max, required)
	f.failField(name, err)
	return v
}

// Choice returns the field's value if it is one of choices; otherwise it
// records RuleChoice. An empty value gives def when def is not "".
func (f *Form) Choice(name, def string, choices ...string) string {
	v := strings.TrimSpace(f.Value(name))
	if v == "" && def != "" {
		return def
	}
	for _, c := range choices {
		if v == c {
			return v
		}
	}
	f.set(name, string(ruleChoice))
	return ""
}

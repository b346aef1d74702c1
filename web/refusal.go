package web

import (
	"net/http"
	"strconv"
	"strings"

	"github.com/go-chi/chi/v5"

	"github.com/parley-elicit/parley/elicit"
)

// refusal is the page fail shows for bad input that no form of the page
// could show beside its field: a rule the store checks again in its
// transaction, broken between the page's read and its write (two tabs
// closing the same round), or a hand-made request. It was "Not accepted"
// over "round: rounds run in sequence: …", the field's name and the rule
// and nothing around them. It says, for whoever reaches it, an expert or
// the facilitator, whether anything was saved (a POST saved nothing; a
// GET had nothing to save), which field and which rule, and how to go
// back.
type refusal struct {
	Title    string
	Lead     string
	Field    string
	Rule     string
	Hint     string // how to go back
	Back     string // the address to go back to
	BackText string // its link's words
}

func newRefusal(r *http.Request, ie *elicit.InputError) refusal {
	v := refusal{Field: ie.Field, Rule: string(ie.Rule) + detailSuffix(ie.Detail)}
	if v.Field == "" {
		v.Field = "the form as a whole"
	}
	if r.Method == http.MethodGet || r.Method == http.MethodHead {
		v.Title = "Not shown"
		v.Lead = "This page could not be shown: its address asks for something Parley does not accept."
		v.Hint = "Go back with your browser's Back button, or open"
	} else {
		v.Title = "Not saved"
		v.Lead = "Nothing was saved: what was sent breaks one of Parley's rules."
		v.Hint = "Go back with your browser's Back button: what you typed is still in the form there. Or open"
	}
	switch {
	case chi.URLParam(r, "token") != "" && strings.HasPrefix(r.URL.Path, "/e/"):
		v.Back, v.BackText = expertBase(r)+"/", "your questions"
	case chi.URLParam(r, "workshop") != "":
		if id, err := strconv.ParseInt(chi.URLParam(r, "workshop"), 10, 64); err == nil && id > 0 {
			v.Back, v.BackText = workshopPath(id), "the workshop's overview"
		}
	}
	if v.Back == "" {
		v.Back, v.BackText = "/", "the list of workshops"
	}
	return v
}

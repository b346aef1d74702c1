package web

import (
	"errors"
	"net/http"
	"strings"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// setWeights records the pool weights the facilitator chose, with the
// reason, for the whole workshop. Weights are unnormalised, finite and not
// negative; the store refuses all-zero custom weights. The form is posted
// from a question's panel and returns there.
func (s *Server) setWeights(w http.ResponseWriter, r *http.Request) {
	ws, q, ok := s.loadWorkshopQuestion(w, r)
	if !ok || !parseForm(w, r) {
		return
	}
	f := newForm(r.PostForm)
	scheme := workshop.WeightScheme(f.Choice("scheme", "", string(workshop.WeightsEqual), string(workshop.WeightsCustom)))
	reason := f.Text("reason", input.MaxLongText, true)
	wt := workshop.Weights{WorkshopID: ws.ID, Scheme: scheme, Reason: reason}
	if scheme == workshop.WeightsCustom {
		experts, err := s.store.Experts(r.Context(), ws.ID)
		if err != nil {
			s.fail(w, r, err)
			return
		}
		wt.ByExpert = map[int64]float64{}
		known := map[string]bool{}
		for _, e := range experts {
			known[weightField(e.ID)] = true
		}
		for k := range f.Values {
			if strings.HasPrefix(k, "weights[") && !known[k] {
				f.set("", k+": no expert of this workshop has this number; reload the page and set the weights again")
			}
		}
		for _, e := range experts {
			if e.Revoked {
				continue
			}
			v := f.Float(weightField(e.ID))
			if v < 0 {
				f.set(weightField(e.ID), string(elicit.RuleNonNegative))
			}
			wt.ByExpert[e.ID] = v
		}
	}
	if f.OK() {
		err := s.store.SetWeights(r.Context(), &wt)
		var ie *elicit.InputError
		if errors.As(err, &ie) {
			f.Fail(err, map[string]string{"weights": "scheme"})
		} else if err != nil && !s.notSaved(r, f, err) {
			s.fail(w, r, err)
			return
		}
	}
	if !f.OK() {
		s.showPanelWith(w, r, f.refusedStatus(), ws, q, panelForms{weights: f})
		return
	}
	http.Redirect(w, r, questionPath(ws.ID, q.ID)+"#pool", http.StatusSeeOther)
}

// unweighedWords says that the custom weights in force leave out the
// experts es (workshop.Weights.Unweighed: added, or given access back,
// after the weights were set), so each has weight 0 in every pool
// though nobody decided so; "" when there are none. The panel showed a
// late expert's "0%" with no word why, and the pool agreed from it
// counted them for nothing.
func unweighedWords(es []workshop.Expert) string {
	if len(es) == 0 {
		return ""
	}
	names := make([]string, len(es))
	for i, e := range es {
		names[i] = e.Name
	}
	if len(es) == 1 {
		return names[0] + " joined the panel, or had access back, after these weights were set, so has weight 0 under them: " +
			"their judgements count for nothing in the pools. Set the weights again to give " + names[0] + " a share."
	}
	return wordList(names) + " joined the panel, or had access back, after these weights were set, so each has weight 0 under them: " +
		"their judgements count for nothing in the pools. Set the weights again to give them a share."
}

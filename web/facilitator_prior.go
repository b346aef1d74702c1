package web

import (
	"net/http"

	"github.com/parley-elicit/parley/elicit"
)

// agreePrior records the prior the panel agreed for a question: either the
// pool's single-Beta representation, recomputed here from the stored
// judgements (never taken from the form), or a Beta fitted by elicit to a
// consensus judgement entered in the question's format. A rationale is
// required.
func (s *Server) agreePrior(w http.ResponseWriter, r *http.Request) {
	ws, ok := s.loadWorkshop(w, r)
	if !ok {
		return
	}
	q, ok := s.loadQuestion(w, r, ws)
	if !ok || !parseForm(w, r) {
		return
	}
	f := newForm(r.PostForm)
	source := elicit.PriorSource(f.Choice("source", "", string(elicit.PriorFromPool), string(elicit.PriorFromConsensus)))
	rationale := f.Text("rationale", MaxLongText, true)
	p := elicit.AgreedPrior{QuestionID: q.ID, Source: source, Rationale: rationale}
	switch source {
	case elicit.PriorFromPool:
		d, err := s.readWorkshopData(r.Context(), ws)
		if err != nil {
			s.fail(w, r, err)
			return
		}
		st := d.state(q)
		switch {
		case st.Rep != nil:
			p.Dist = st.Rep.Dist
		case st.PoolError != "":
			f.set("source", st.PoolError)
		default:
			f.set("source", st.RepError)
		}
	case elicit.PriorFromConsensus:
		a, fit, ok := readAnswer(q, f)
		if ok {
			p.Dist, p.Consensus = fit.Dist, &a
		}
	}
	if !f.OK() {
		s.showPanel(w, r, http.StatusUnprocessableEntity, ws, q, nil, f)
		return
	}
	if err := s.store.AgreePrior(r.Context(), &p); err != nil {
		if s.notSaved(r, f, err) {
			s.showPanel(w, r, f.refusedStatus(), ws, q, nil, f)
			return
		}
		s.fail(w, r, err)
		return
	}
	http.Redirect(w, r, questionPath(ws.ID, q.ID)+"#agreed", http.StatusSeeOther)
}

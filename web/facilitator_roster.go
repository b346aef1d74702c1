package web

import (
	"net/http"

	"github.com/parley-elicit/parley/elicit"
)

// addExpert puts a new expert on the panel and shows their private link
// once. Only the token's hash is stored, so the link cannot be shown
// again; re-issuing makes a new one.
func (s *Server) addExpert(w http.ResponseWriter, r *http.Request) {
	ws, ok := s.loadWorkshop(w, r)
	if !ok || !parseForm(w, r) {
		return
	}
	f := newForm(r.PostForm)
	e := elicit.Expert{
		WorkshopID:  ws.ID,
		Name:        f.Text("name", MaxShortText, true),
		Affiliation: f.Text("affiliation", MaxShortText, false),
		Expertise:   f.Text("expertise", MaxLongText, false),
	}
	if !f.OK() {
		s.showOverview(w, r, http.StatusUnprocessableEntity, ws, workshopView{ExpertForm: f})
		return
	}
	token, hash, err := newToken()
	if err != nil {
		s.fail(w, r, err)
		return
	}
	if err := s.store.AddExpert(r.Context(), &e, hash); err != nil {
		if s.notSaved(r, f, err) {
			s.showOverview(w, r, f.refusedStatus(), ws, workshopView{ExpertForm: f})
			return
		}
		s.fail(w, r, err)
		return
	}
	s.showOverview(w, r, http.StatusCreated, ws, workshopView{
		Issued: &issuedLink{Expert: e, URL: s.absLink(r, expertPath(token))},
	})
}

// loadExpert reads the {expert} of the workshop ws, answering 404 when the
// expert is not on that workshop's panel.
func (s *Server) loadExpert(w http.ResponseWriter, r *http.Request, ws elicit.Workshop) (elicit.Expert, bool) {
	id, ok := s.pathID(w, r, "expert")
	if !ok {
		return elicit.Expert{}, false
	}
	e, err := s.store.Expert(r.Context(), id)
	if err == nil && e.WorkshopID != ws.ID {
		err = elicit.ErrNotFound
	}
	if err != nil {
		s.fail(w, r, err)
		return elicit.Expert{}, false
	}
	return e, true
}

// revokeExpert ends an expert's access; their judgements stay in the record.
func (s *Server) revokeExpert(w http.ResponseWriter, r *http.Request) {
	ws, ok := s.loadWorkshop(w, r)
	if !ok {
		return
	}
	e, ok := s.loadExpert(w, r, ws)
	if !ok || !parseForm(w, r) {
		return
	}
	f := newForm(r.PostForm)
	reason := f.Text("reason", MaxLongText, false)
	if !f.OK() {
		s.showOverview(w, r, http.StatusUnprocessableEntity, ws, workshopView{RosterForm: f})
		return
	}
	if err := s.store.RevokeExpert(r.Context(), e.ID, reason); err != nil {
		if s.notSaved(r, f, err) {
			s.showOverview(w, r, f.refusedStatus(), ws, workshopView{RosterForm: f})
			return
		}
		s.fail(w, r, err)
		return
	}
	http.Redirect(w, r, workshopPath(ws.ID)+"#roster", http.StatusSeeOther)
}

// reissueLink replaces an expert's token; the old link stops working at
// once and the new one is shown this once.
func (s *Server) reissueLink(w http.ResponseWriter, r *http.Request) {
	ws, ok := s.loadWorkshop(w, r)
	if !ok {
		return
	}
	e, ok := s.loadExpert(w, r, ws)
	if !ok || !parseForm(w, r) {
		return
	}
	f := newForm(r.PostForm)
	reason := f.Text("reason", MaxLongText, false)
	if !f.OK() {
		s.showOverview(w, r, http.StatusUnprocessableEntity, ws, workshopView{RosterForm: f})
		return
	}
	token, hash, err := newToken()
	if err != nil {
		s.fail(w, r, err)
		return
	}
	if err := s.store.ReissueToken(r.Context(), e.ID, hash, reason); err != nil {
		if s.notSaved(r, f, err) {
			s.showOverview(w, r, f.refusedStatus(), ws, workshopView{RosterForm: f})
			return
		}
		s.fail(w, r, err)
		return
	}
	e.Revoked = false
	s.showOverview(w, r, http.StatusOK, ws, workshopView{
		Issued: &issuedLink{Expert: e, URL: s.absLink(r, expertPath(token))},
	})
}

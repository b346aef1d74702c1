package web

import (
	"net/http"
)

// changeRound closes the open round or opens the next one. The rule that
// rounds run in sequence is elicit's (Workshop.CheckRoundChange); a reason
// is required to open a new round so the record says why the panel went
// round again.
func (s *Server) changeRound(w http.ResponseWriter, r *http.Request) {
	ws, ok := s.loadWorkshop(w, r)
	if !ok || !parseForm(w, r) {
		return
	}
	f := newForm(r.PostForm)
	action := f.Choice("action", "", "close", "open")
	opening := action == "open"
	reason := f.Text("reason", MaxLongText, opening)
	round := ws.Round
	if opening {
		round = ws.Round + 1
	}
	if f.OK() {
		f.Fail(ws.CheckRoundChange(round, opening), map[string]string{"round": "action"})
	}
	if !f.OK() {
		s.showOverview(w, r, http.StatusUnprocessableEntity, ws, workshopView{RoundForm: f})
		return
	}
	if err := s.store.SetRound(r.Context(), ws.ID, round, opening, reason); err != nil {
		if s.notSaved(r, f, err) {
			s.showOverview(w, r, f.refusedStatus(), ws, workshopView{RoundForm: f})
			return
		}
		s.fail(w, r, err)
		return
	}
	http.Redirect(w, r, workshopPath(ws.ID)+"#rounds", http.StatusSeeOther)
}

package web

import (
	"net/http"
	"strings"

	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// changeRound closes the open round, opens the next one, or reopens the
// round just closed (action=reopen, for a round closed by mistake). The
// rules are elicit's (Workshop.CheckRoundChange, Workshop.CheckCloseAsked,
// Workshop.CheckReopen); a
// reason is required to open or reopen a round so the record says why.
func (s *Server) changeRound(w http.ResponseWriter, r *http.Request) {
	ws, ok := s.loadWorkshop(w, r)
	if !ok || !parseForm(w, r) {
		return
	}
	f := newForm(r.PostForm)
	action := f.Choice("action", "", "close", "open", "reopen")
	if action == "reopen" {
		s.reopenRound(w, r, ws, f)
		return
	}
	opening := action == "open"
	reason := f.Text("reason", input.MaxLongText, opening)
	round := ws.Round
	if opening {
		round = ws.Round + 1
	}
	if sent, ok := pageRound(f); ok {
		round = sent
	}
	if f.OK() {
		f.Fail(ws.CheckRoundChange(round, opening), map[string]string{"round": "action"})
	}
	if f.OK() && !opening {
		qs, err := s.store.Questions(r.Context(), ws.ID)
		if err != nil {
			s.fail(w, r, err)
			return
		}
		f.Fail(ws.CheckCloseAsked(len(questionsInUse(qs))), map[string]string{"round": "action"})
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
	s.roundGen.Add(1)
	http.Redirect(w, r, workshopPath(ws.ID)+"#rounds", http.StatusSeeOther)
}

func (s *Server) reopenRound(w http.ResponseWriter, r *http.Request, ws workshop.Workshop, f *Form) {
	// While a round is open (a stale tab) the page shows no reopening
	// field: the refusal goes beside the round's action, which is shown,
	// before any reason is asked for.
	round := ws.Round
	if sent, ok := pageRound(f); ok {
		round = sent
	}
	if err := ws.CheckReopenOf(round); err != nil {
		f.Fail(err, nil)
		s.showOverview(w, r, http.StatusUnprocessableEntity, ws, workshopView{RoundForm: f})
		return
	}
	reason := f.Text("reopen_reason", input.MaxLongText, true)
	if f.OK() {
		if err := s.store.ReopenRound(r.Context(), ws.ID, reason); err != nil {
			switch {
			case s.notSaved(r, f, err):
			case !isInputError(err):
				s.fail(w, r, err)
				return
			default:
				f.Fail(err, map[string]string{"action": "reopen_reason"})
			}
		}
	}
	if !f.OK() {
		s.showOverview(w, r, f.refusedStatus(), ws, workshopView{RoundForm: f})
		return
	}
	s.roundGen.Add(1)
	http.Redirect(w, r, workshopPath(ws.ID)+"#rounds", http.StatusSeeOther)
}

// pageRound is the round the page's button named ("Close round 1"), sent
// with its form; ok is false when the post carries none (a script), and
// the action then takes the workshop's round as it stands. Without it, a
// page left open in another tab, or brought back by the back button, said
// "Close round 1" and closed round 2 a minute after it opened, with the
// experts at their answers; its "Open round 2" opened round 3.
func pageRound(f *Form) (int, bool) {
	if strings.TrimSpace(f.Value("round")) == "" {
		return 0, false
	}
	return f.Int("round", 1, workshop.MaxRounds), true
}

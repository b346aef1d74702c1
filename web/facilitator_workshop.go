package web

import (
	"net/http"

	"github.com/parley-elicit/parley/elicit"
)

// workshopView is the facilitator's overview of one workshop: its
// questions, its panel, who has answered what in the current round, and
// the round controls.
type workshopView struct {
	Workshop  elicit.Workshop
	Questions []elicit.Question
	Experts   []elicit.Expert
	// Answered[expertID][questionID] is the number of revisions the expert
	// saved on the question in the current round.
	Answered   map[int64]map[int64]int
	ExpertForm *Form
	RoundForm  *Form
	RosterForm *Form // revoke and re-issue, whose errors show above the roster
	EditForm   *Form // title, purpose, decision and notes
	// Issued is set right after an expert is added or their link re-issued:
	// the private link, shown this once.
	Issued *issuedLink
}

// issuedLink is a freshly issued private link; only its hash is stored.
type issuedLink struct {
	Expert elicit.Expert
	URL    string
}

// meta is the page shell for a facilitator page of workshop ws.
func facilitatorMeta(ws elicit.Workshop, title, section string) PageMeta {
	return PageMeta{
		Title: title, Facilitator: true, WorkshopID: ws.ID, WorkshopTitle: ws.Title,
		Section: section, Invented: ws.Invented,
	}
}

// loadWorkshop reads the workshop named by the {workshop} path parameter,
// answering 404 itself when there is none.
func (s *Server) loadWorkshop(w http.ResponseWriter, r *http.Request) (elicit.Workshop, bool) {
	id, ok := s.pathID(w, r, "workshop")
	if !ok {
		return elicit.Workshop{}, false
	}
	ws, err := s.store.Workshop(r.Context(), id)
	if err != nil {
		s.fail(w, r, err)
		return elicit.Workshop{}, false
	}
	return ws, true
}

func (s *Server) workshopOverview(w http.ResponseWriter, r *http.Request) {
	ws, ok := s.loadWorkshop(w, r)
	if !ok {
		return
	}
	s.showOverview(w, r, http.StatusOK, ws, workshopView{})
}

// showOverview fills v from the store and renders the overview.
func (s *Server) showOverview(w http.ResponseWriter, r *http.Request, status int, ws elicit.Workshop, v workshopView) {
	ctx := r.Context()
	qs, err := s.store.Questions(ctx, ws.ID)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	es, err := s.store.Experts(ctx, ws.ID)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	revs, err := s.store.Revisions(ctx, ws.ID)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	v.Workshop, v.Questions, v.Experts = ws, qs, es
	v.Answered = map[int64]map[int64]int{}
	for _, rv := range revs {
		if rv.Round != ws.Round {
			continue
		}
		if v.Answered[rv.ExpertID] == nil {
			v.Answered[rv.ExpertID] = map[int64]int{}
		}
		v.Answered[rv.ExpertID][rv.QuestionID]++
	}
	if v.ExpertForm == nil {
		v.ExpertForm = newForm(nil)
	}
	if v.RoundForm == nil {
		v.RoundForm = newForm(nil)
	}
	if v.RosterForm == nil {
		v.RosterForm = newForm(nil)
	}
	if v.EditForm == nil {
		v.EditForm = newForm(map[string][]string{
			"title": {ws.Title}, "purpose": {ws.Purpose}, "decision": {ws.Decision}, "notes": {ws.Notes},
		})
	}
	s.renderPage(w, r, status, facilitatorMeta(ws, ws.Title, "overview"), workshopPage(v))
}

// absLink is path as an absolute address to hand to someone: from
// Options.BaseURL when set, else from the request's own host.
func (s *Server) absLink(r *http.Request, path string) string {
	if s.opt.BaseURL != "" {
		return s.link(path)
	}
	scheme := "http"
	if r.TLS != nil {
		scheme = "https"
	}
	return scheme + "://" + r.Host + path
}

// editWorkshop changes the workshop's title, purpose, decision and notes.
func (s *Server) editWorkshop(w http.ResponseWriter, r *http.Request) {
	ws, ok := s.loadWorkshop(w, r)
	if !ok || !parseForm(w, r) {
		return
	}
	f := newForm(r.PostForm)
	upd := ws
	upd.Title = f.Text("title", MaxShortText, true)
	upd.Purpose = f.Text("purpose", MaxLongText, false)
	upd.Decision = f.Text("decision", MaxLongText, false)
	upd.Notes = f.Text("notes", MaxLongText, false)
	if !f.OK() {
		s.showOverview(w, r, http.StatusUnprocessableEntity, ws, workshopView{EditForm: f})
		return
	}
	if err := s.store.UpdateWorkshop(r.Context(), upd); err != nil {
		s.fail(w, r, err)
		return
	}
	http.Redirect(w, r, workshopPath(ws.ID), http.StatusSeeOther)
}

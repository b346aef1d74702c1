package web

import (
	"net/http"

	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// workshopView is the facilitator's overview of one workshop: its
// questions, its panel, who has answered what in the current round, and
// the round controls.
type workshopView struct {
	Workshop  workshop.Workshop
	Questions []workshop.Question
	Experts   []workshop.Expert
	// Answers[expertID][questionID] is the state of the expert's current
	// judgement on the question; absent when they have never answered it.
	Answers     map[int64]map[int64]answerState
	ExpertForm  *Form
	RoundForm   *Form
	RosterForm  *Form // revoke and re-issue, whose errors show above the roster
	EditForm    *Form // title, purpose, decision and notes
	ArchiveForm *Form // archive or bring back
	// Now is when the page was drawn, for the live table's stamp.
	Now string
	// Removable is set when the workshop has no answers and no agreed
	// priors, so it can be deleted rather than archived.
	Removable bool
	// Issued is set right after an expert is added or their link re-issued:
	// the private link, shown this once.
	Issued *issuedLink
	// SheetSaved is set right after an answer sheet is saved: the decision
	// log's words for it, so the facilitator sees what was saved.
	SheetSaved string
	// SheetUnchanged counts the sheet's rows left out because they
	// repeated their expert's current answer.
	SheetUnchanged int
}

// reopenSent is whether the round form sent was the reopening's: its
// refusal is said there, not above the next round's reason.
func (v workshopView) reopenSent() bool { return v.RoundForm.Value("action") == "reopen" }

// issuedLink is a freshly issued private link; only its hash is stored.
// Gone is set when the link can no longer be shown (issuedFor passed, or
// the server restarted).
type issuedLink struct {
	Expert workshop.Expert
	URL    string
	Gone   bool
}

// meta is the page shell for a facilitator page of workshop ws.
func facilitatorMeta(ws workshop.Workshop, title, section string) pageMeta {
	return pageMeta{
		Title: title, Facilitator: true, WorkshopID: ws.ID, WorkshopTitle: ws.Title,
		Section: section, Invented: ws.Invented,
	}
}

// loadWorkshop reads the workshop named by the {workshop} path parameter,
// answering 404 itself when there is none.
func (s *Server) loadWorkshop(w http.ResponseWriter, r *http.Request) (workshop.Workshop, bool) {
	id, ok := s.pathID(w, r, "workshop")
	if !ok {
		return workshop.Workshop{}, false
	}
	ws, err := s.store.Workshop(r.Context(), id)
	if err != nil {
		s.fail(w, r, err)
		return workshop.Workshop{}, false
	}
	return ws, true
}

func (s *Server) workshopOverview(w http.ResponseWriter, r *http.Request) {
	ws, ok := s.loadWorkshop(w, r)
	if !ok {
		return
	}
	v := workshopView{}
	saved := false
	s.takeConfirmationIf(w, r, workshopPath(ws.ID), func(c string) bool {
		v.SheetUnchanged, saved = sheetSavedOf(c)
		return saved
	})
	if saved {
		evs, err := s.store.Events(r.Context(), ws.ID)
		if err != nil {
			s.fail(w, r, err)
			return
		}
		for i := len(evs) - 1; i >= 0; i-- {
			if evs[i].Kind == workshop.EventAnswersImported {
				v.SheetSaved = eventWriter{}.sentence(evs[i])
				break
			}
		}
	}
	s.showOverview(w, r, http.StatusOK, ws, v)
}

// showOverview fills v from the store and renders the overview.
func (s *Server) showOverview(w http.ResponseWriter, r *http.Request, status int, ws workshop.Workshop, v workshopView) {
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
	priors, err := s.store.AgreedPriors(ctx, ws.ID)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	v.Workshop, v.Questions, v.Experts = ws, qs, es
	v.Answers = answerStates(ws.Round, revs)
	v.Removable = len(revs) == 0 && len(priors) == 0
	v.Now = s.now().UTC().Format("15:04:05 UTC")
	if v.ExpertForm == nil {
		v.ExpertForm = newForm(nil)
	}
	if v.RoundForm == nil {
		v.RoundForm = newForm(nil)
	}
	if v.RosterForm == nil {
		v.RosterForm = newForm(nil)
	}
	if v.ArchiveForm == nil {
		v.ArchiveForm = newForm(nil)
	}
	if v.EditForm == nil {
		v.EditForm = newForm(map[string][]string{
			"title": {ws.Title}, "purpose": {ws.Purpose}, "decision": {ws.Decision}, "notes": {ws.Notes},
		})
	}
	m := facilitatorMeta(ws, ws.Title, "overview")
	m.Scripts = []string{"/static/live.js"}
	s.renderPage(w, r, status, m, workshopPage(v))
}

// answerState is where an expert's current judgement on a question comes
// from: their latest revision's round, and how many times they saved in
// the current round. An answer from an earlier round stays their current
// judgement until they revise it.
type answerState struct {
	Round int // round of the latest revision
	Saves int // revisions saved in the workshop's current round
	// Earlier marks an answer saved in an earlier round: saves in this
	// round then revise it; without one they are the expert's first
	// answer (an expert who joined late, or skipped the question).
	Earlier bool
}

// answerStates reads revisions (oldest first) into each expert's answer
// state per question, as of round.
func answerStates(round int, revs []workshop.Revision) map[int64]map[int64]answerState {
	m := map[int64]map[int64]answerState{}
	for _, rv := range revs {
		if rv.Withdrawn {
			// Nobody's answer: the overview counts the answers that stand.
			continue
		}
		if m[rv.ExpertID] == nil {
			m[rv.ExpertID] = map[int64]answerState{}
		}
		st := m[rv.ExpertID][rv.QuestionID]
		st.Round = max(st.Round, rv.Round)
		if rv.Round == round {
			st.Saves++
		} else if rv.Round < round {
			st.Earlier = true
		}
		m[rv.ExpertID][rv.QuestionID] = st
	}
	return m
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
	upd.Title = f.Text("title", input.MaxShortText, true)
	upd.Purpose = f.Text("purpose", input.MaxLongText, false)
	upd.Decision = f.Text("decision", input.MaxLongText, false)
	upd.Notes = f.Text("notes", input.MaxLongText, false)
	if !f.OK() {
		s.showOverview(w, r, http.StatusUnprocessableEntity, ws, workshopView{EditForm: f})
		return
	}
	if err := s.store.UpdateWorkshop(r.Context(), upd); err != nil {
		if s.notSaved(r, f, err) {
			s.showOverview(w, r, f.refusedStatus(), ws, workshopView{EditForm: f})
			return
		}
		s.fail(w, r, err)
		return
	}
	http.Redirect(w, r, workshopPath(ws.ID), http.StatusSeeOther)
}

// activeQuestions are the questions not retired, which experts see.
func (v workshopView) activeQuestions() []workshop.Question { return questionsInUse(v.Questions) }

// questionsInUse are the questions of qs not retired, which experts see.
func questionsInUse(qs []workshop.Question) []workshop.Question {
	var out []workshop.Question
	for _, q := range qs {
		if !q.Retired {
			out = append(out, q)
		}
	}
	return out
}

// maxAnswerColumns is how many columns of answers the who-answered-what
// table sets side by side before it turns: at 1366 px the invented demo's
// six questions read well, and eleven broke "carried from round 1" over
// three or four lines in columns a word wide.
const maxAnswerColumns = 7

// questionsAsRows reports whether the who-answered-what table gives each
// question a row and each expert a column: when the questions would be
// more columns than fit and the experts fewer than the questions. A
// panel of many experts keeps a row each.
func (v workshopView) questionsAsRows() bool {
	n := len(v.activeQuestions())
	return n > maxAnswerColumns && n > len(v.Experts)
}

// revoked reports whether the expert's access is revoked.
func (v workshopView) revoked(expertID int64) bool {
	for _, e := range v.Experts {
		if e.ID == expertID {
			return e.Revoked
		}
	}
	return false
}

func (v workshopView) hasRevoked() bool {
	for _, e := range v.Experts {
		if e.Revoked {
			return true
		}
	}
	return false
}

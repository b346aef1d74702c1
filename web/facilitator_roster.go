package web

import (
	"errors"
	"net/http"
	"strconv"
	"time"

	"github.com/a-h/templ"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/answersheet"
	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// issuedLink's entry in Server.issued: a private link just issued, kept
// (kept.go) so that adding an expert, or re-issuing a link, can redirect
// to a page that shows it, and reloading that page shows the link again
// instead of adding the expert twice. Only the token's hash is stored;
// the link itself lives in memory for issuedFor under a random key that
// only the facilitator's redirect carries, and is gone with the process.
type issuedEntry struct {
	workshop, expert int64
	url              string
}

// issuedFor is how long a just-issued link can be shown again.
const issuedFor = 15 * time.Minute

// addExpert puts a new expert on the panel and redirects to the page that
// shows their private link. A name already on the panel is refused with a
// warning until the facilitator confirms it (allow_duplicate): two
// experts of one name are usually one expert added twice.
func (s *Server) addExpert(w http.ResponseWriter, r *http.Request) {
	ws, ok := s.loadWorkshop(w, r)
	if !ok || !parseForm(w, r) {
		return
	}
	f := newForm(r.PostForm)
	e := workshop.Expert{
		WorkshopID:  ws.ID,
		Name:        f.Text("name", input.MaxShortText, true),
		Affiliation: f.Text("affiliation", input.MaxShortText, false),
		Expertise:   f.Text("expertise", input.MaxLongText, false),
	}
	if f.OK() && answersheet.NamedLikeAnID(e.Name) {
		// An answer sheet names an expert by name or by id:N; a name of
		// that form made a sheet's id:5 credit expert 5 or the expert so
		// named, whichever the reader met first.
		f.set("name", "“"+e.Name+"” reads as an answer sheet's id:N, which names an expert by number. Type the expert's name.")
	}
	if f.OK() && !f.Checked("allow_duplicate") {
		others, err := s.store.Experts(r.Context(), ws.ID)
		if err != nil {
			s.fail(w, r, err)
			return
		}
		for _, o := range others {
			if workshop.SameName(o.Name, e.Name) {
				state := "on the panel"
				if o.Revoked {
					state = "on the panel, with access revoked"
				}
				f.set("name", "An expert named “"+o.Name+"” is already "+state+". If this is a different person, tick the box below to add them anyway; if it is the same person, use “New link” in the panel instead.")
				f.Values.Set("duplicate_warned", "1")
				break
			}
		}
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
	s.redirectToLink(w, r, ws, e, token)
}

// redirectToLink keeps the new link and sends the facilitator to the page
// that shows it.
func (s *Server) redirectToLink(w http.ResponseWriter, r *http.Request, ws workshop.Workshop, e workshop.Expert, token string) {
	key, err := s.issued.keep(issuedEntry{ws.ID, e.ID, s.absLink(r, expertPath(token))}, s.now())
	if err != nil {
		s.fail(w, r, err)
		return
	}
	http.Redirect(w, r, expertActionPath(ws.ID, e.ID, "link")+"?k="+key, http.StatusSeeOther)
}

// issuedLinkPage shows the overview with a link just issued. After
// issuedFor, or after a restart, it says the link can no longer be shown.
func (s *Server) issuedLinkPage(w http.ResponseWriter, r *http.Request) {
	ws, ok := s.loadWorkshop(w, r)
	if !ok {
		return
	}
	e, ok := s.loadExpert(w, r, ws)
	if !ok {
		return
	}
	entry, found := s.issued.get(r.URL.Query().Get("k"), s.now())
	found = found && entry.workshop == ws.ID && entry.expert == e.ID
	v := workshopView{Issued: &issuedLink{Expert: e, URL: entry.url, Gone: !found}}
	if !found {
		v.Issued.URL = ""
	}
	s.showOverview(w, r, http.StatusOK, ws, v)
}

// loadExpert reads the {expert} of the workshop ws, answering 404 when the
// expert is not on that workshop's panel.
func (s *Server) loadExpert(w http.ResponseWriter, r *http.Request, ws workshop.Workshop) (workshop.Expert, bool) {
	id, ok := s.pathID(w, r, "expert")
	if !ok {
		return workshop.Expert{}, false
	}
	e, err := s.store.Expert(r.Context(), id)
	if err == nil && e.WorkshopID != ws.ID {
		err = workshop.ErrNotFound
	}
	if err != nil {
		s.fail(w, r, err)
		return workshop.Expert{}, false
	}
	return e, true
}

// revokeView is the page that asks the facilitator to confirm a revoke.
type revokeView struct {
	Workshop workshop.Workshop
	Expert   workshop.Expert
	// Answers counts the expert's saved answers, Withdrawn those of them
	// withdrawn, which count for nothing already.
	Answers, Withdrawn int
	Form               *Form
}

// revokeExpert ends an expert's access; their judgements stay in the
// record but leave the pool. Without confirm=yes (the roster's button) it
// shows a page that says what revoking does and asks to confirm.
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
	reason := f.Text("reason", input.MaxLongText, false)
	// Revoked already (in another tab, or another browser): said above
	// the roster, which shows them revoked, before any confirmation.
	alreadyRevoked := func() {
		f.set("", e.Name+"'s access is already revoked, so nothing changed. To give them access again, use “New link…” beside their name.")
		s.showOverview(w, r, f.refusedStatus(), ws, workshopView{RosterForm: f})
	}
	if e.Revoked {
		alreadyRevoked()
		return
	}
	if !s.confirmed(w, r, ws, e, f, "Revoke "+e.Name, revokePage) {
		return
	}
	if err := s.store.RevokeExpert(r.Context(), e.ID, reason); err != nil {
		if s.notSaved(r, f, err) {
			s.showOverview(w, r, f.refusedStatus(), ws, workshopView{RosterForm: f})
			return
		}
		if ie := (*elicit.InputError)(nil); errors.As(err, &ie) && ie.Rule == workshop.RuleNothingChanged {
			alreadyRevoked()
			return
		}
		s.fail(w, r, err)
		return
	}
	http.Redirect(w, r, workshopPath(ws.ID)+"#roster", http.StatusSeeOther)
}

// reissueLink replaces an expert's token, after a confirmation page
// (confirm=yes); the old link stops working at once and the new one is
// shown on the page the facilitator is sent to.
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
	reason := f.Text("reason", input.MaxLongText, false)
	// As for revoking, a new link is confirmed first: "New link" stands
	// beside "Revoke…" on the overview, and a click by mistake would end
	// an expert's working link in the middle of a round.
	if !s.confirmed(w, r, ws, e, f, "New link for "+e.Name, reissuePage) {
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
	s.redirectToLink(w, r, ws, e, token)
}

// confirmed reports whether a change to expert e's access was confirmed
// (confirm=yes) with a valid form; otherwise it answers with the page
// asking for the confirmation, the reason kept (422 when the form has an
// error), and returns false.
func (s *Server) confirmed(w http.ResponseWriter, r *http.Request, ws workshop.Workshop, e workshop.Expert, f *Form,
	title string, page func(revokeView) templ.Component) bool {
	if f.OK() && f.Value("confirm") == "yes" {
		return true
	}
	revs, err := s.store.ExpertHistory(r.Context(), e.ID)
	if err != nil {
		s.fail(w, r, err)
		return false
	}
	withdrawn := 0
	for _, rv := range revs {
		if rv.Withdrawn {
			withdrawn++
		}
	}
	status := http.StatusOK
	if !f.OK() {
		status = http.StatusUnprocessableEntity
	}
	s.renderPage(w, r, status, facilitatorMeta(ws, title, "overview"),
		page(revokeView{Workshop: ws, Expert: e, Answers: len(revs), Withdrawn: withdrawn, Form: f}))
	return false
}

func answersLabel(n int) string {
	return strconv.Itoa(n) + " " + plural(n, "saved answer", "saved answers")
}

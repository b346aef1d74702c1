package web

import (
	"net/http"
	"strconv"
	"strings"

	"github.com/go-chi/chi/v5"

	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// archiveWorkshop archives a workshop (its round closes; nothing can be
// changed until it is brought back) or brings it back, with a reason.
func (s *Server) archiveWorkshop(w http.ResponseWriter, r *http.Request) {
	ws, ok := s.loadWorkshop(w, r)
	if !ok || !parseForm(w, r) {
		return
	}
	f := newForm(r.PostForm)
	action := f.Choice("action", "", "archive", "restore")
	reason := f.Text("archive_reason", input.MaxLongText, true)
	if f.OK() {
		if err := s.store.SetArchived(r.Context(), ws.ID, action == "archive", reason); err != nil {
			switch {
			case s.notSaved(r, f, err):
			case !isInputError(err):
				s.fail(w, r, err)
				return
			default:
				f.Fail(err, map[string]string{"action": "archive_reason"})
			}
		}
	}
	if !f.OK() {
		s.showOverview(w, r, f.refusedStatus(), ws, workshopView{ArchiveForm: f})
		return
	}
	http.Redirect(w, r, workshopPath(ws.ID), http.StatusSeeOther)
}

// deleteView is the page that confirms deleting a workshop.
type deleteView struct {
	Workshop  workshop.Workshop
	Questions int
	Experts   int
	Answers   int
	Priors    int
	Form      *Form
}

func (s *Server) deleteWorkshopForm(w http.ResponseWriter, r *http.Request) {
	ws, ok := s.loadWorkshop(w, r)
	if !ok {
		return
	}
	s.showDelete(w, r, http.StatusOK, ws, newForm(nil))
}

func (s *Server) showDelete(w http.ResponseWriter, r *http.Request, status int, ws workshop.Workshop, f *Form) {
	d, err := s.readWorkshopData(r.Context(), ws)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	v := deleteView{Workshop: ws, Questions: len(d.Questions), Experts: len(d.Experts), Answers: len(d.Revisions), Priors: len(d.Priors), Form: f}
	s.renderPage(w, r, status, facilitatorMeta(ws, "Delete "+ws.Title, "overview"), deletePage(v))
}

// deleteWorkshop deletes a workshop that has no answers and no agreed
// priors, once the facilitator has ticked the confirmation and given a
// reason; the store refuses any other (workshop.RuleHasAnswers).
func (s *Server) deleteWorkshop(w http.ResponseWriter, r *http.Request) {
	ws, ok := s.loadWorkshop(w, r)
	if !ok || !parseForm(w, r) {
		return
	}
	f := newForm(r.PostForm)
	reason := f.Text("reason", input.MaxLongText, true)
	if !f.Checked("confirm") {
		f.set("confirm", "tick to confirm that the workshop, its questions and its panel are to be deleted")
	}
	if f.OK() {
		if err := s.store.DeleteWorkshop(r.Context(), ws.ID, reason); err != nil {
			switch {
			case s.notSaved(r, f, err):
			case !isInputError(err):
				s.fail(w, r, err)
				return
			default:
				f.Fail(err, map[string]string{"action": "confirm"})
			}
		}
	}
	if !f.OK() {
		s.showDelete(w, r, f.refusedStatus(), ws, f)
		return
	}
	s.live.publish(ws.ID, "deleted")
	s.confirmOnce(w, r, "/", deletedConfirmation(ws.ID))
	http.Redirect(w, r, "/", http.StatusSeeOther)
}

// archivedGuard refuses every change to an archived workshop except
// bringing it back (and deleting it, which the store refuses anyway when
// it has answers): an archived workshop's record is finished. The entry
// page's fit preview goes through: it draws the fit and saves nothing,
// as the expert's own page of an archived workshop still lets them try
// the fit.
func (s *Server) archivedGuard(next http.Handler) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		if r.Method != http.MethodPost {
			next.ServeHTTP(w, r)
			return
		}
		id, err := strconv.ParseInt(chi.URLParam(r, "workshop"), 10, 64)
		if err != nil {
			next.ServeHTTP(w, r)
			return
		}
		ws, err := s.store.Workshop(r.Context(), id)
		if err != nil || !ws.Archived || r.URL.Path == workshopPath(id)+"/archive" || entryPreviewPath(id, r.URL.Path) {
			next.ServeHTTP(w, r)
			return
		}
		s.renderPage(w, r, http.StatusConflict, facilitatorMeta(ws, "Archived", "overview"),
			messagePage("This workshop is archived", "Nothing in an archived workshop can be changed, so nothing was saved. To change it, bring it back from its overview page first; that is recorded in the decision log."))
	})
}

// entryPreviewPath reports whether path is an entry page's fit preview,
// /w/{workshop}/q/{question}/enter/{expert}/preview, which saves nothing.
func entryPreviewPath(ws int64, path string) bool {
	rest, ok := strings.CutPrefix(path, workshopPath(ws)+"/q/")
	if !ok {
		return false
	}
	parts := strings.Split(rest, "/")
	return len(parts) == 4 && parts[1] == "enter" && parts[3] == "preview"
}

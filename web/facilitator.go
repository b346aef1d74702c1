package web

import (
	"net/http"
	"strconv"

	"github.com/go-chi/chi/v5"

	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// facilitatorRoutes are the facilitator's pages; routes() mounts them
// behind requireFacilitator. Every change is a POST.
//
//	GET  /                                   workshops, and the form to create one
//	POST /workshops                          create a workshop
//	GET  /w/{workshop}                       overview: questions, panel, who answered, rounds, record links
//	POST /w/{workshop}/edit                  title, purpose, decision, notes
//	GET  /w/{workshop}/questions/new         the add-question form
//	POST /w/{workshop}/questions             add a question
//	GET  /w/{workshop}/delete                confirm deleting a workshop that has no answers
//	POST /w/{workshop}/delete                delete it (reason required)
//	POST /w/{workshop}/archive               action=archive|restore, reason required
//	GET  /w/{workshop}/answers/import        import judgements from a CSV answer sheet (facilitator_sheet.go)
//	POST /w/{workshop}/answers/import        check the sheet and preview every row; POST .../confirm saves it
//	POST /w/{workshop}/experts               add an expert (a duplicate name needs confirming)
//	GET  /w/{workshop}/experts/{expert}      one expert's answers, and entering them on their behalf
//	GET  /w/{workshop}/experts/{expert}/link?k=…   the private link just issued, after the redirect
//	POST /w/{workshop}/experts/{expert}/revoke   end an expert's access (confirm=yes, else a confirmation page)
//	POST /w/{workshop}/experts/{expert}/reissue  new private link (old one stops working)
//	POST /w/{workshop}/round                 action=close|open|reopen, reason (required to open or reopen)
//	GET  /w/{workshop}/events                the live stream of changes (text/event-stream)
//	GET  /w/{workshop}/log                   decision log
//	GET  /w/{workshop}/q/{question}          panel: fits, overlay chart, pool, weights, agreed prior, history
//	GET  /w/{workshop}/q/{question}/edit     correct the question (all of it before answers; its text after)
//	POST /w/{workshop}/q/{question}/edit     save the correction (reason required)
//	POST /w/{workshop}/q/{question}/retire   action=retire|restore, reason required
//	GET  /w/{workshop}/q/{question}/reasons  the reasons with their withhold forms (a large panel's page links here)
//	POST /w/{workshop}/q/{question}/reasons/{revision}  action=withhold|release a reason from the feedback
//	GET  /w/{workshop}/q/{question}/history  the question's whole revision history
//	GET  /w/{workshop}/q/{question}/revisions/{revision}/withdraw  confirm withdrawing a judgement (facilitator_withdraw.go)
//	POST /w/{workshop}/q/{question}/revisions/{revision}/withdraw  withdraw it, reason required
//	GET  /w/{workshop}/q/{question}/room     the anonymised panel for the projector
//	GET  /w/{workshop}/q/{question}/enter/{expert}      enter a judgement on the expert's behalf (facilitator_entry.go)
//	POST /w/{workshop}/q/{question}/enter/{expert}/preview|save  (the preview, which saves nothing, also in an archived workshop)
//	POST /w/{workshop}/q/{question}/weights  scheme=equal|custom, weights[ID], reason
//	POST /w/{workshop}/q/{question}/agree    source=pool|consensus, values in the question's format, rationale
//	GET  /w/{workshop}/report                printable record
//	GET  /w/{workshop}/export.json|.csv      downloads (record.Build), also per question under /q/{question}/
//	GET  /w/{workshop}/priors.csv            the agreed priors, one row per question
//	     /w/{workshop}/calibration...        calibration.go
func (s *Server) facilitatorRoutes(r chi.Router) {
	r.Get("/", s.workshopList)
	r.Post("/workshops", s.createWorkshop)
	r.Route("/w/{workshop}", func(r chi.Router) {
		r.Use(s.archivedGuard, s.publishChanges)
		r.Get("/", s.workshopOverview)
		r.Post("/edit", s.editWorkshop)
		r.Get("/questions/new", s.newQuestionForm)
		r.Post("/questions", s.addQuestion)
		r.Get("/delete", s.deleteWorkshopForm)
		r.Post("/delete", s.deleteWorkshop)
		r.Post("/archive", s.archiveWorkshop)
		r.Post("/experts", s.addExpert)
		r.Get("/answers/import", s.sheetForm)
		r.Post("/answers/import", s.sheetPreview)
		r.Post("/answers/import/confirm", s.sheetConfirm)
		r.Get("/experts/{expert}", s.expertPage)
		r.Get("/experts/{expert}/link", s.issuedLinkPage)
		r.Post("/experts/{expert}/revoke", s.revokeExpert)
		r.Post("/experts/{expert}/reissue", s.reissueLink)
		r.Post("/round", s.changeRound)
		r.Get("/log", s.eventLog)
		r.Get("/q/{question}", s.questionPanel)
		r.Get("/q/{question}/edit", s.editQuestionForm)
		r.Post("/q/{question}/edit", s.editQuestion)
		r.Post("/q/{question}/retire", s.retireQuestion)
		r.Get("/q/{question}/enter", s.chooseEntry)
		r.Get("/q/{question}/enter/{expert}", s.entryPage)
		r.Post("/q/{question}/enter/{expert}/preview", s.entryPreview)
		r.Post("/q/{question}/enter/{expert}/save", s.entrySave)
		r.Get("/q/{question}/reasons", s.questionReasons)
		r.Post("/q/{question}/reasons/{revision}", s.withholdReason)
		r.Get("/q/{question}/history", s.questionHistory)
		r.Get("/q/{question}/revisions/{revision}/withdraw", s.withdrawForm)
		r.Post("/q/{question}/revisions/{revision}/withdraw", s.withdrawRevision)
		r.Get("/q/{question}/room", s.roomView)
		r.Post("/q/{question}/weights", s.setWeights)
		r.Post("/q/{question}/agree", s.agreePrior)
		r.Get("/quick-priors", s.quickPriors) // quick_priors.go: a Beta from a few numbers
		r.Post("/quick-priors/agree", s.agreeQuickPrior)
		r.Get("/q/{question}/study", s.studyPage) // study.go: data, posterior, planning, comparison
		r.Post("/q/{question}/study/data", s.recordData)
		r.Get("/report", s.report)
		r.Get("/export.json", s.exportRecord("json", false))
		r.Get("/export.csv", s.exportRecord("csv", false))
		r.Get("/priors.csv", s.exportRecord("priors", false))
		r.Get("/q/{question}/export.json", s.exportRecord("json", true))
		r.Get("/q/{question}/export.csv", s.exportRecord("csv", true))
		s.calibrationRoutes(r) // calibration.go: true values, Cooke's classical model, performance weights
	})
}

// workshopListView is the start page: every workshop and the form to
// create one.
type workshopListView struct {
	Workshops []workshop.Workshop
	Deleted   []workshop.DeletedWorkshop
	// JustDeleted is the id of the workshop deleted by the form that led
	// here, said once (takeDeleted); 0 otherwise.
	JustDeleted int64
	Form        *Form
}

// justDeleted is the record of the workshop the list confirms deleted.
func (v workshopListView) justDeleted() (workshop.DeletedWorkshop, bool) {
	if v.JustDeleted <= 0 {
		return workshop.DeletedWorkshop{}, false
	}
	for _, d := range v.Deleted {
		if d.WorkshopID == v.JustDeleted {
			return d, true
		}
	}
	return workshop.DeletedWorkshop{}, false
}

func (v workshopListView) active() []workshop.Workshop   { return v.filter(false) }
func (v workshopListView) archived() []workshop.Workshop { return v.filter(true) }

func (v workshopListView) filter(archived bool) []workshop.Workshop {
	var out []workshop.Workshop
	for _, w := range v.Workshops {
		if w.Archived == archived {
			out = append(out, w)
		}
	}
	return out
}

func (s *Server) workshopList(w http.ResponseWriter, r *http.Request) {
	s.showWorkshopList(w, r, http.StatusOK, newForm(nil), s.takeDeleted(w, r))
}

// showWorkshopList renders the list; justDeleted is the workshop whose
// deletion it confirms, 0 for none.
func (s *Server) showWorkshopList(w http.ResponseWriter, r *http.Request, status int, f *Form, justDeleted int64) {
	ws, err := s.store.Workshops(r.Context())
	if err != nil {
		s.fail(w, r, err)
		return
	}
	deleted, err := s.store.DeletedWorkshops(r.Context())
	if err != nil {
		s.fail(w, r, err)
		return
	}
	s.renderPage(w, r, status, pageMeta{Title: "Workshops", Facilitator: true, Section: "workshops"},
		workshopListPage(workshopListView{Workshops: ws, Deleted: deleted, JustDeleted: justDeleted, Form: f}))
}

// createWorkshop validates the new workshop's fields and saves it; bad
// input shows the form again with the typed values and nothing saved.
func (s *Server) createWorkshop(w http.ResponseWriter, r *http.Request) {
	if !parseForm(w, r) {
		return
	}
	f := newForm(r.PostForm)
	ws := workshop.Workshop{
		Title:    f.Text("title", input.MaxShortText, true),
		Purpose:  f.Text("purpose", input.MaxLongText, false),
		Decision: f.Text("decision", input.MaxLongText, false),
		Notes:    f.Text("notes", input.MaxLongText, false),
	}
	if !f.OK() {
		s.showWorkshopList(w, r, http.StatusUnprocessableEntity, f, 0)
		return
	}
	if err := s.store.CreateWorkshop(r.Context(), &ws); err != nil {
		if s.notSaved(r, f, err) {
			s.showWorkshopList(w, r, f.refusedStatus(), f, 0)
			return
		}
		s.fail(w, r, err)
		return
	}
	http.Redirect(w, r, workshopPath(ws.ID), http.StatusSeeOther)
}

// pathID parses the named path parameter as a positive ID; ok is false
// (and a 404 has been sent) when it is not one.
func (s *Server) pathID(w http.ResponseWriter, r *http.Request, name string) (int64, bool) {
	id, err := strconv.ParseInt(chi.URLParam(r, name), 10, 64)
	if err != nil || id <= 0 {
		s.notFound(w, r)
		return 0, false
	}
	return id, true
}

// valueKeyboard is the keyboard (inputmode) a phone is asked for to type
// a value on bounds from lower: the decimal keypad, unless the value may
// be below 0, since a phone's decimal keypad (the iPhone's) has no minus
// key (signedNumberInput).
func valueKeyboard(lower float64) string {
	if lower < 0 {
		return "text"
	}
	return "decimal"
}

package web

import (
	"errors"
	"net/http"
	"strconv"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// The facilitator enters or revises an expert's judgement on their
// behalf: typed during the session, taken by phone, copied from a paper
// form or a message. The form, the live preview, the read-backs and the
// warnings are the expert's own (expertAnswerForm, readAnswer,
// newPreview); the revision records that the facilitator entered it and
// how it reached them. Round, calibration and input rules are the same
// as on the expert's page, because the save goes through the same
// store.SaveRevision.

// onBehalf is what the answer form adds on the facilitator's page.
type onBehalf struct {
	Expert       string
	Revoked      bool
	Channel      string
	ChannelError string
	// ReasonNote says what the reason's box holds when the expert's
	// current answer, of this round, has reasoning (carriedReason).
	ReasonNote string
}

// carriedReason is the reasoning the entry form starts with: the one
// saved with the expert's current answer when that answer is of the
// open round, so that an entry correcting a mistyped value keeps it. The
// box started empty, and a correction saved without retyping it left
// the expert's current answer, the one the feedback, the reasons page
// and the room show, without their reasoning. A reasoning the
// facilitator withheld from the feedback is not carried (saved again, it
// would be shown), nor one of an earlier round, which the expert has not
// restated, nor any while the round is closed, when no entry is saved
// (the hint said it was "saved again with this entry"). note says which,
// for the box's hint.
func carriedReason(ws workshop.Workshop, own []workshop.Revision) (reason, note string) {
	n := len(own)
	if n == 0 || !ws.Open || own[n-1].Round != ws.Round || own[n-1].Reason == "" {
		return "", ""
	}
	if own[n-1].ReasonWithheld {
		return "", "The reasoning saved with their current answer is withheld from the feedback, so it is not carried into this entry."
	}
	return own[n-1].Reason, "The box holds the reasoning saved with their current answer; it is saved again with this entry unless you change it."
}

// entryView is the facilitator's page for entering one question's
// judgement for one expert.
type entryView struct {
	Workshop workshop.Workshop
	Question workshop.Question
	Expert   workshop.Expert
	Form     expertQuestionView
	History  []workshop.Revision // the expert's revisions of the question, newest first, withdrawn ones too
	// Withdrawn are the withdrawal events of History's withdrawn ones.
	Withdrawn map[int64]workshop.Event
	Saved     bool
	Back      string // the question's panel
	Sheets    map[int64]workshop.SheetSource
}

func entryPath(ws, q, e int64) string {
	return questionPath(ws, q) + "/enter/" + strconv.FormatInt(e, 10)
}

// entryScope is what the entry handlers work on.
type entryScope struct {
	ws workshop.Workshop
	q  workshop.Question
	e  workshop.Expert
}

// speaker names the expert in the read-backs the facilitator reads to them.
func (sc entryScope) speaker() speaker { return speaker{Name: sc.e.Name} }

func (s *Server) loadEntry(w http.ResponseWriter, r *http.Request) (entryScope, bool) {
	var sc entryScope
	var ok bool
	if sc.ws, ok = s.loadWorkshop(w, r); !ok {
		return sc, false
	}
	if sc.q, ok = s.loadQuestion(w, r, sc.ws); !ok {
		return sc, false
	}
	if sc.e, ok = s.loadExpert(w, r, sc.ws); !ok {
		return sc, false
	}
	return sc, true
}

// chooseEntry sends the panel's "enter for" form (a GET with ?expert=ID)
// to that expert's entry page.
func (s *Server) chooseEntry(w http.ResponseWriter, r *http.Request) {
	ws, q, ok := s.loadWorkshopQuestion(w, r)
	if !ok {
		return
	}
	id, err := strconv.ParseInt(r.URL.Query().Get("expert"), 10, 64)
	if err != nil || id <= 0 {
		s.notFound(w, r)
		return
	}
	http.Redirect(w, r, entryPath(ws.ID, q.ID, id), http.StatusSeeOther)
}

// entryRevisions are the expert's revisions of the entry's question,
// oldest first: all, the withdrawn ones marked, for the page's history,
// and own, those that stand, whose last is the expert's current answer.
func (s *Server) entryRevisions(r *http.Request, sc entryScope) (all, own []workshop.Revision, err error) {
	hist, err := s.store.ExpertHistory(r.Context(), sc.e.ID)
	if err != nil {
		return nil, nil, err
	}
	for _, rv := range hist {
		if rv.QuestionID != sc.q.ID {
			continue
		}
		all = append(all, rv)
		if !rv.Withdrawn {
			own = append(own, rv)
		}
	}
	return all, own, nil
}

func (s *Server) entryPage(w http.ResponseWriter, r *http.Request) {
	sc, ok := s.loadEntry(w, r)
	if !ok {
		return
	}
	all, own, err := s.entryRevisions(r, sc)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	var typed map[string]string
	var preview *previewView
	if n := len(own); n > 0 {
		typed = answerValues(sc.q, own[n-1].Answer)
		if fit, err := s.fits.fit(sc.q, own[n-1]); err == nil {
			preview = newPreview(sc.q, fit, own[n-1].Answer.Percent, sc.speaker())
		}
	}
	channel, err := s.lastChannel(r, sc.ws.ID, sc.e.ID)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	reason, _ := carriedReason(sc.ws, own)
	v := s.entryView(sc, all, own, typed, reason, string(channel))
	v.Form.Preview = preview
	v.Saved = s.takeConfirmation(w, r, entryPath(sc.ws.ID, sc.q.ID, sc.e.ID), doneSaved) == doneSaved
	s.renderEntry(w, r, http.StatusOK, v)
}

// lastChannel is how the facilitator's last entry on this form for the
// expert reached them, the likeliest way for the next; "" when they have
// entered none, so the form asks. It used to offer "said in the session"
// to every expert, and an entry taken by phone and saved without changing
// it was recorded, untruly, as said in the room. A judgement imported
// from an answer sheet is no entry on this form: after one, the form
// offered "from a spreadsheet file" for the expert's next call.
func (s *Server) lastChannel(r *http.Request, wsID, expertID int64) (workshop.Channel, error) {
	revs, err := s.store.ExpertRevisions(r.Context(), expertID)
	if err != nil {
		return "", err
	}
	sheets, err := s.sheetSources(r.Context(), wsID, nil)
	if err != nil {
		return "", err
	}
	var last workshop.Revision
	for _, rv := range revs {
		if _, fromSheet := sheets[rv.ID]; fromSheet {
			continue
		}
		if rv.EnteredBy == workshop.ByFacilitator && (last.ID == 0 || rv.At.After(last.At) || (rv.At.Equal(last.At) && rv.ID > last.ID)) {
			last = rv
		}
	}
	return last.Channel, nil
}

// entryView lays out the page around the form with the typed values:
// own are the expert's standing revisions of the question, all those and
// the withdrawn ones, for the history.
func (s *Server) entryView(sc entryScope, all, own []workshop.Revision, typed map[string]string, reason, channel string) entryView {
	action := entryPath(sc.ws.ID, sc.q.ID, sc.e.ID)
	fv := expertQuestionView{
		Action: action, Title: sc.ws.Title, Round: sc.ws.Round, Open: sc.ws.Open && !sc.e.Revoked, Finished: sc.ws.Archived,
		Form:   newAnswerForm(sc.q, typed, sc.speaker()),
		Frozen: sc.q.Frozen(), Unanswered: len(own) == 0,
		OnBehalf: &onBehalf{Expert: sc.e.Name, Revoked: sc.e.Revoked, Channel: channel},
	}
	fv.Form.Reason = reason
	if carried, note := carriedReason(sc.ws, own); note != "" && (carried == "" || carried == reason) {
		fv.OnBehalf.ReasonNote = note
	}
	if fv.Frozen {
		if n := len(own); n > 0 {
			fv.Form = newAnswerForm(sc.q, answerValues(sc.q, own[n-1].Answer), sc.speaker())
		}
	}
	v := entryView{Workshop: sc.ws, Question: sc.q, Expert: sc.e, Form: fv, Back: questionPath(sc.ws.ID, sc.q.ID)}
	for i := len(all) - 1; i >= 0; i-- {
		v.History = append(v.History, all[i])
	}
	return v
}

func (s *Server) renderEntry(w http.ResponseWriter, r *http.Request, status int, v entryView) {
	var err error
	if v.Sheets, err = s.sheetSources(r.Context(), v.Workshop.ID, nil); err != nil {
		s.fail(w, r, err)
		return
	}
	if v.Withdrawn, err = s.withdrawals(r.Context(), v.Workshop.ID, v.History); err != nil {
		s.fail(w, r, err)
		return
	}
	m := facilitatorMeta(v.Workshop, "Q"+strconv.Itoa(v.Question.Position)+" for "+v.Expert.Name, "overview")
	m.Scripts = []string{"/static/preview.js", "/static/chips.js"}
	s.renderPage(w, r, status, m, entryPageView(v))
}

// readEntry parses the form as the expert's page does, and the channel.
func readEntry(q workshop.Question, f *Form, sp speaker) (workshop.Answer, elicit.Fit, workshop.Channel, bool) {
	names := make([]string, len(workshop.Channels))
	for i, c := range workshop.Channels {
		names[i] = string(c)
	}
	var channel workshop.Channel
	if f.Value("channel") == "" {
		f.set("channel", "choose how the judgement reached you; the record keeps it")
	} else {
		channel = workshop.Channel(f.Choice("channel", "", names...))
	}
	a, fit, ok := readAnswer(q, f, sp)
	return a, fit, channel, ok && f.OK()
}

func (s *Server) entryPreview(w http.ResponseWriter, r *http.Request) {
	sc, ok := s.loadEntry(w, r)
	if !ok || !parseForm(w, r) {
		return
	}
	f := newForm(r.PostForm)
	// The channel is asked for at the save; the preview draws the values.
	a, fit, ok := readAnswer(sc.q, f, sc.speaker())
	ok = ok && f.OK()
	status := http.StatusOK
	var p *previewView
	if ok {
		p = newPreview(sc.q, fit, a.Percent, sc.speaker())
		if w := unitSlip(sc.q, f, a, sc.speaker()); w != "" {
			p.Warnings = append([]string{w}, p.Warnings...)
		}
	} else {
		status = http.StatusUnprocessableEntity
		p = &previewView{Problem: problemSummary(newAnswerForm(sc.q, nil, sc.speaker()), f)}
	}
	if r.URL.Query().Get("fragment") == "1" {
		s.render(w, r, status, expertPreview(p))
		return
	}
	s.entryAgain(w, r, sc, f, status, "", p)
}

// entryAgain draws the page again with the typed values and messages.
func (s *Server) entryAgain(w http.ResponseWriter, r *http.Request, sc entryScope, f *Form, status int, notice string, p *previewView) {
	all, own, err := s.entryRevisions(r, sc)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	v := s.entryView(sc, all, own, formValues(f), f.Value("reason"), f.Value("channel"))
	if !v.Form.Frozen {
		applyErrors(&v.Form.Form, f)
		v.Form.OnBehalf.ChannelError = f.Error("channel")
		v.Form.Preview = p
	}
	if notice != "" {
		v.Form.Closed = notice
	}
	s.renderEntry(w, r, status, v)
}

// entrySave saves the judgement as a revision the facilitator entered.
func (s *Server) entrySave(w http.ResponseWriter, r *http.Request) {
	sc, ok := s.loadEntry(w, r)
	if !ok || !parseForm(w, r) {
		return
	}
	f := newForm(r.PostForm)
	reason := f.Text("reason", input.MaxLongText, false)
	a, fit, channel, ok := readEntry(sc.q, f, sc.speaker())
	if sc.q.Frozen() {
		s.entryAgain(w, r, sc, f, http.StatusConflict, "The true value of this question has been shown, so its answers are final and nothing was saved.", nil)
		return
	}
	if !ok {
		s.entryAgain(w, r, sc, f, http.StatusUnprocessableEntity, "", &previewView{Problem: problemSummary(newAnswerForm(sc.q, nil, sc.speaker()), f)})
		return
	}
	rev := workshop.Revision{QuestionID: sc.q.ID, ExpertID: sc.e.ID, Reason: reason, Answer: a,
		EnteredBy: workshop.ByFacilitator, Channel: channel, Kept: &fit}
	if err := s.store.SaveRevision(r.Context(), &rev); err != nil {
		var notice string
		switch {
		case errors.Is(err, workshop.ErrRoundClosed):
			notice = closedNotSaved(sc.ws.Round, sc.q.Format, sc.speaker())
		case errors.Is(err, workshop.ErrAnswersFrozen):
			notice = "The true value of this question has been shown, so its answers are final and nothing was saved."
		case errors.Is(err, workshop.ErrRetired):
			notice = "This question is retired, so it takes no answers; nothing was saved."
		case errors.Is(err, workshop.ErrRevoked):
			notice = sc.e.Name + "'s access is revoked, so nothing can be entered for them; nothing was saved."
		case errors.Is(err, workshop.ErrQuestionChanged):
			// Corrected (before its first answer) while the form was
			// open: the values are checked afresh against the question
			// as it now stands.
			q, qerr := s.store.Question(r.Context(), sc.q.ID)
			if qerr != nil {
				s.fail(w, r, qerr)
				return
			}
			sc.q = q
			f = newForm(r.PostForm)
			var p *previewView
			if a, fit, _, ok := readEntry(sc.q, f, sc.speaker()); ok {
				p = newPreviewPtr(sc.q, fit, a.Percent, sc.speaker())
			}
			s.entryAgain(w, r, sc, f, http.StatusConflict, questionChangedForFacilitator, p)
			return
		case s.notSaved(r, f, err):
			s.entryAgain(w, r, sc, f, http.StatusServiceUnavailable, "", newPreviewPtr(sc.q, fit, a.Percent, sc.speaker()))
			return
		default:
			s.fail(w, r, err)
			return
		}
		s.entryAgain(w, r, sc, f, http.StatusConflict, notice, newPreviewPtr(sc.q, fit, a.Percent, sc.speaker()))
		return
	}
	// The saved banner is shown once, on the page the save leads to
	// (confirm_once.go).
	page := entryPath(sc.ws.ID, sc.q.ID, sc.e.ID)
	s.confirmOnce(w, r, page, doneSaved)
	http.Redirect(w, r, page, http.StatusSeeOther)
}

func newPreviewPtr(q workshop.Question, fit elicit.Fit, percent bool, sp speaker) *previewView {
	if len(fit.Probs) == 0 {
		return nil
	}
	return newPreview(q, fit, percent, sp)
}

// expertView is one expert's page for the facilitator: each question
// with their current answer and who entered it, and the way to enter or
// revise it on their behalf.
type expertView struct {
	Workshop workshop.Workshop
	Expert   workshop.Expert
	Rows     []expertViewRow
	Sheets   map[int64]workshop.SheetSource
	// Withdrawn lists the expert's withdrawn judgements, question by
	// question, oldest first, apart from the answers that stand;
	// Withdrawals holds their withdrawal events.
	Withdrawn   []withdrawnRow
	Withdrawals map[int64]workshop.Event
}

type expertViewRow struct {
	Question workshop.Question
	Current  *workshop.Revision // the expert's current answer: their latest that stands
	Enter    string
	// Withdrawn counts the expert's withdrawn judgements on the question.
	Withdrawn int
}

// withdrawnRow is one withdrawn judgement on the expert's page.
type withdrawnRow struct {
	Question workshop.Question
	Revision workshop.Revision
}

// noAnswer is what a row without an answer says (noAnswerIn).
func (v expertView) noAnswer(q workshop.Question) string { return noAnswerIn(v.Workshop, q) }

// noAnswerIn is what a facilitator's row without an answer to q says:
// "yet" only where an answer may still come, as the expert's own page
// says it. In an archived workshop, and on a question whose true value
// was shown, no answer will come.
func noAnswerIn(ws workshop.Workshop, q workshop.Question) string {
	switch {
	case ws.Archived:
		return "no answer was saved"
	case q.Frozen():
		return "no answer was saved before the true value was shown"
	}
	return "no answer yet"
}

func (s *Server) expertPage(w http.ResponseWriter, r *http.Request) {
	ws, ok := s.loadWorkshop(w, r)
	if !ok {
		return
	}
	e, ok := s.loadExpert(w, r, ws)
	if !ok {
		return
	}
	qs, err := s.store.Questions(r.Context(), ws.ID)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	revs, err := s.store.ExpertHistory(r.Context(), e.ID)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	v := expertView{Workshop: ws, Expert: e}
	if v.Withdrawals, err = s.withdrawals(r.Context(), ws.ID, revs); err != nil {
		s.fail(w, r, err)
		return
	}
	if v.Sheets, err = s.sheetSources(r.Context(), ws.ID, nil); err != nil {
		s.fail(w, r, err)
		return
	}
	for _, q := range qs {
		if q.Retired {
			continue
		}
		row := expertViewRow{Question: q, Enter: entryPath(ws.ID, q.ID, e.ID)}
		for i, rv := range revs {
			switch {
			case rv.QuestionID != q.ID:
			case rv.Withdrawn:
				row.Withdrawn++
				v.Withdrawn = append(v.Withdrawn, withdrawnRow{Question: q, Revision: rv})
			default:
				row.Current = &revs[i]
			}
		}
		v.Rows = append(v.Rows, row)
	}
	m := facilitatorMeta(ws, e.Name, "overview")
	m.Scripts = []string{"/static/live.js"}
	s.renderPage(w, r, http.StatusOK, m, expertViewPage(v))
}

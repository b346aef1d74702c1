package web

import (
	"context"
	"errors"
	"fmt"
	"net/http"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// withdrawView is the page that confirms withdrawing a judgement: what it
// was, what the expert's answer becomes, and the agreed priors that
// pooled it.
type withdrawView struct {
	Workshop workshop.Workshop
	Question workshop.Question
	Experts  []workshop.Expert
	Revision workshop.Revision
	Sheets   map[int64]workshop.SheetSource
	// Current says whether Revision is the expert's current answer now;
	// After is what becomes their current answer once it is withdrawn
	// (nil: none).
	Current bool
	After   *workshop.Revision
	// Priors are the agreed priors whose pool included it.
	Priors []workshop.AgreedPrior
	// Refused says why it cannot be withdrawn ("" when it can).
	Refused string
	// Withdrawn holds Revision's withdrawal when it is withdrawn already.
	Withdrawn map[int64]workshop.Event
	Form      *Form
}

// withdrawPath is the page that withdraws revision rv of question q.
func withdrawPath(ws, q, rv int64) string {
	return questionPath(ws, q) + fmt.Sprintf("/revisions/%d/withdraw", rv)
}

// withdrawals are the withdrawal events of the withdrawn revisions in
// revs, by revision ID; nil without one (no events read).
func (s *Server) withdrawals(ctx context.Context, wsID int64, revs []workshop.Revision) (map[int64]workshop.Event, error) {
	for _, rv := range revs {
		if rv.Withdrawn {
			evs, err := s.store.Events(ctx, wsID)
			if err != nil {
				return nil, err
			}
			return workshop.Withdrawals(evs), nil
		}
	}
	return nil, nil
}

// withdrawForm asks the facilitator to confirm withdrawing a judgement,
// with a reason.
func (s *Server) withdrawForm(w http.ResponseWriter, r *http.Request) {
	s.showWithdraw(w, r, http.StatusOK, newForm(nil))
}

// showWithdraw renders the withdrawal page for the {revision} of the
// {question}, 404 when the revision is not an answer to it.
func (s *Server) showWithdraw(w http.ResponseWriter, r *http.Request, status int, f *Form) {
	ws, q, ok := s.loadWorkshopQuestion(w, r)
	if !ok {
		return
	}
	revID, ok := s.pathID(w, r, "revision")
	if !ok {
		return
	}
	d, err := s.readWorkshopData(r.Context(), ws)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	v := withdrawView{Workshop: ws, Question: q, Experts: d.Experts, Form: f}
	found := false
	var mine []workshop.Revision
	for _, rv := range d.Revisions {
		if rv.ID == revID && rv.QuestionID == q.ID {
			v.Revision, found = rv, true
		}
	}
	if !found {
		s.notFound(w, r)
		return
	}
	for _, rv := range d.Revisions {
		if rv.QuestionID == q.ID && rv.ExpertID == v.Revision.ExpertID {
			mine = append(mine, rv)
		}
	}
	key := workshop.Key{Question: q.ID, Expert: v.Revision.ExpertID}
	cur, ok := workshop.Current(mine, nil)[key]
	v.Current = ok && cur.ID == revID
	if after, ok := workshop.Current(mine, func(rv workshop.Revision) bool { return rv.ID != revID })[key]; ok {
		v.After = &after
	}
	for _, p := range d.Priors {
		for _, id := range p.Pooled {
			if id == revID {
				v.Priors = append(v.Priors, p)
			}
		}
	}
	if err := workshop.CheckWithdrawal(ws, q, v.Revision, "a reason"); err != nil {
		v.Refused = withdrawRefusal(err)
	}
	if v.Withdrawn, err = s.withdrawals(r.Context(), ws.ID, []workshop.Revision{v.Revision}); err != nil {
		s.fail(w, r, err)
		return
	}
	if v.Sheets, err = s.sheetSources(r.Context(), ws.ID, d.Revisions); err != nil {
		s.fail(w, r, err)
		return
	}
	m := facilitatorMeta(ws, fmt.Sprintf("Withdraw a judgement, Q%d %s", q.Position, q.Quantity), "overview")
	s.renderPage(w, r, status, m, withdrawPage(v))
}

// withdrawRefusal says why a judgement cannot be withdrawn.
func withdrawRefusal(err error) string {
	var ie *elicit.InputError
	if !errors.As(err, &ie) {
		return err.Error()
	}
	switch ie.Rule {
	case workshop.RuleArchived:
		return "This workshop is archived, so nothing in it can be changed. Bring it back from the overview before withdrawing a judgement."
	case workshop.RuleNothingChanged:
		return "This judgement is already withdrawn; the question's history says when and why."
	case workshop.RuleScoredAtReveal:
		return "This judgement cannot be withdrawn: the question's true value has been shown, and the calibration scores are fixed on the answers as they stood at the reveal."
	}
	return ie.Error()
}

// withdrawRevision withdraws the {revision} of the {question} with a
// required reason, then goes back to the question's history; a refusal
// shows the page again with the reason typed, saving nothing.
func (s *Server) withdrawRevision(w http.ResponseWriter, r *http.Request) {
	ws, q, ok := s.loadWorkshopQuestion(w, r)
	if !ok {
		return
	}
	revID, ok := s.pathID(w, r, "revision")
	if !ok || !parseForm(w, r) {
		return
	}
	f := newForm(r.PostForm)
	why := f.Text("reason", input.MaxLongText, true)
	if f.OK() {
		own, err := s.store.Revisions(r.Context(), ws.ID)
		if err != nil {
			s.fail(w, r, err)
			return
		}
		found := false
		for _, rv := range own {
			found = found || (rv.ID == revID && rv.QuestionID == q.ID)
		}
		if !found {
			s.notFound(w, r)
			return
		}
		if err := s.store.WithdrawRevision(r.Context(), ws.ID, revID, why); err != nil {
			switch {
			case s.notSaved(r, f, err):
			case !isInputError(err):
				s.fail(w, r, err)
				return
			default:
				if ie := (*elicit.InputError)(nil); errors.As(err, &ie) && ie.Field == "reason" {
					f.Fail(err, nil)
				} else {
					f.set("", withdrawRefusal(err))
				}
			}
		}
	}
	if !f.OK() {
		s.showWithdraw(w, r, f.refusedStatus(), f)
		return
	}
	s.withdrawnGen.Add(1)
	s.confirmOnce(w, r, questionPath(ws.ID, q.ID), doneWithdrawn)
	http.Redirect(w, r, questionPath(ws.ID, q.ID)+"#history", http.StatusSeeOther)
}

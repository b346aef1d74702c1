package web

import (
	"context"
	"errors"
	"net/http"
	"strconv"
	"strings"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// agreePrior records the prior the panel agreed for a question: the
// pool's single-Beta representation, recomputed here from the stored
// judgements (never taken from the form), a Beta fitted by elicit to a
// consensus judgement entered in the question's format, or a Beta from a
// quick construction, made again here from its typed inputs. A rationale is
// required. While the round is open the facilitator must confirm it
// (confirm_open), since answers may still change afterwards; the record
// notes such a prior.
func (s *Server) agreePrior(w http.ResponseWriter, r *http.Request) {
	ws, q, ok := s.loadWorkshopQuestion(w, r)
	if !ok || !parseForm(w, r) {
		return
	}
	f := newForm(r.PostForm)
	source := workshop.PriorSource(f.Choice("source", "", string(workshop.PriorFromPool), string(workshop.PriorFromConsensus),
		string(workshop.PriorFromConstruction)))
	rationale := f.Text("rationale", input.MaxLongText, true)
	p := workshop.AgreedPrior{QuestionID: q.ID, Source: source, Rationale: rationale, RoundOpen: f.Checked("confirm_open")}
	switch source {
	case workshop.PriorFromPool:
		d, err := s.readWorkshopData(r.Context(), ws)
		if err != nil {
			s.fail(w, r, err)
			return
		}
		st := d.state(q)
		switch {
		case st.Rep != nil && f.Values.Get(fieldPoolSeen) != "" && f.Values.Get(fieldPoolSeen) != st.poolSeen():
			f.set("source", "The pool changed after this page showed it (an answer was saved or revised, the weights changed, "+
				"or an expert's access was revoked), so nothing was recorded. The panel above now shows the pool as it stands, "+
				"with its best single Beta, Beta("+sv(st.Rep.Dist.Alpha)+", "+sv(st.Rep.Dist.Beta.Beta)+"): look at it, then record it again.")
		case st.Rep != nil:
			p.Dist = st.Rep.Dist
			// The revisions the pool was formed from, as agreed: the
			// record names them, so nobody has to infer them.
			for _, row := range st.Rows {
				if row.Pooled && row.Revision != nil {
					p.Pooled = append(p.Pooled, row.Revision.ID)
				}
			}
		case st.PoolError != "":
			f.set("source", st.PoolError)
		default:
			f.set("source", st.RepError)
		}
	case workshop.PriorFromConsensus:
		a, fit, ok := readAnswer(q, f, speaker{Name: "the panel"})
		if ok {
			p.Dist, p.Consensus = fit.Dist, &a
		}
	case workshop.PriorFromConstruction:
		// Made again here from the typed inputs (quick_priors.go).
		method := elicit.ConstructionMethod(f.Choice(fieldConstruction, "", constructionMethods...))
		if f.OK() {
			if c, ok := construct(f, constructionInput(f, q, method)); ok {
				in := c.Input
				p.Dist, p.Construction = c.Dist, &in
			}
		}
	}
	if ws.Open && !p.RoundOpen {
		f.set("confirm_open", openRoundWarning(ws))
	}
	if !f.OK() {
		s.showPanelWith(w, r, http.StatusUnprocessableEntity, ws, q, panelForms{agree: f})
		return
	}
	if err := s.store.AgreePrior(r.Context(), &p); err != nil {
		if errors.Is(err, workshop.ErrRoundStillOpen) {
			// The round was opened between the page and the post.
			f.set("confirm_open", openRoundWarning(ws))
			s.showPanelWith(w, r, http.StatusUnprocessableEntity, ws, q, panelForms{agree: f})
			return
		}
		if s.notSaved(r, f, err) {
			s.showPanelWith(w, r, f.refusedStatus(), ws, q, panelForms{agree: f})
			return
		}
		if isInputError(err) {
			// A prior the recorded data could not update (CheckPriorUpdate),
			// or a question retired since the page was drawn
			// (CheckTakesPrior), said beside the choice of source.
			f.Fail(err, map[string]string{"question": "source"})
			s.showPanelWith(w, r, http.StatusUnprocessableEntity, ws, q, panelForms{agree: f})
			return
		}
		s.fail(w, r, err)
		return
	}
	http.Redirect(w, r, questionPath(ws.ID, q.ID)+"#agreed", http.StatusSeeOther)
}

// openRoundWarning asks the facilitator to confirm a prior agreed while
// experts can still change their answers.
func openRoundWarning(ws workshop.Workshop) string {
	return "Round " + strconv.Itoa(ws.Round) + " is still open, so experts can still change their answers after this prior is recorded. " +
		"Close the round first, or tick the box to record the prior now; the record will say it was agreed while the round was open."
}

// poolChange is how the pool under the agreed prior in force, when it
// was taken from the pool, has changed since it was agreed
// (workshop.AgreedPrior.PoolChangeSince, with then the weight set in
// force at the agreement, agreedUnder): the experts pooled now are the
// active ones with a fitted current judgement, as the agree form pooled
// them. False when there is no such prior or nothing to compare.
func (st questionState) poolChange(then *workshop.Weights) (workshop.PoolChange, bool) {
	a := st.current()
	if a == nil {
		return workshop.PoolChange{}, false
	}
	now := map[int64]int64{}
	for _, row := range st.Rows {
		if row.Fit != nil && row.Revision != nil && !row.Expert.Revoked {
			now[row.Expert.ID] = row.Revision.ID
		}
	}
	expertOf := make(map[int64]int64, len(st.History))
	withdrawn := map[int64]bool{}
	for _, rv := range st.History {
		expertOf[rv.ID] = rv.ExpertID
		withdrawn[rv.ID] = rv.Withdrawn
	}
	return a.PoolChangeSince(now, st.Weights, then, expertOf, withdrawn)
}

// poolChangeText is poolChangeWords for question state st, its experts
// named from es; "" when the pool under its agreed prior has not
// changed.
func (s *Server) poolChangeText(ctx context.Context, ws workshop.Workshop, st questionState, es []workshop.Expert, at againAt) (string, error) {
	c, ok, err := s.poolChangeOf(ctx, ws, st)
	if err != nil || !ok {
		return "", err
	}
	at.Retired, at.Archived = st.Question.Retired, ws.Archived
	return poolChangeWords(c, func(id int64) string { return expertName(es, id) }, at), nil
}

// poolChangeOf is how the pool under st's agreed prior in force has
// changed since it was agreed (questionState.poolChange), the one rule
// the facilitator's panel, the study page and the room's prior display
// read; false when the prior is not from the pool or nothing can be
// compared. The weight set the prior was agreed under is read only when
// another is in force.
func (s *Server) poolChangeOf(ctx context.Context, ws workshop.Workshop, st questionState) (workshop.PoolChange, bool, error) {
	a := st.current()
	if a == nil || a.Source != workshop.PriorFromPool {
		return workshop.PoolChange{}, false, nil
	}
	var then *workshop.Weights
	switch {
	case a.WeightSetID == st.Weights.ID:
		then = &st.Weights
	case a.WeightSetID == 0:
		then = &workshop.Weights{WorkshopID: ws.ID, Scheme: workshop.WeightsEqual}
	default:
		sets, err := s.store.WeightHistory(ctx, ws.ID)
		if err != nil {
			return workshop.PoolChange{}, false, err
		}
		then = weightSetByID(sets, a.WeightSetID)
	}
	c, ok := st.poolChange(then)
	return c, ok, nil
}

// weightSetByID is the set of sets with the given ID, or nil.
func weightSetByID(sets []workshop.Weights, id int64) *workshop.Weights {
	for i := range sets {
		if sets[i].ID == id {
			return &sets[i]
		}
	}
	return nil
}

// poolChangeWords says, under an agreed prior taken from the pool, that
// the pool has moved since (c, from PoolChangeSince): who revised, who
// joined or left the pool, whether other weights are in force. The prior
// stays the single Beta of the pool as it was agreed, while the pool
// above it on the panel and in the report is the pool now, and nothing
// said so: a prior agreed in round 1 sat under a round-2 pool with
// another single Beta, both named "custom-weight pool". "" when nothing
// changed.
//
// A retired question takes no new prior (CheckTakesPrior), nor does an
// archived workshop, so for one the advice is to bring it back first: it
// said to record the prior again on the question's page, which refused
// it, and said so on that page itself (againAt).
func poolChangeWords(c workshop.PoolChange, name func(int64) string, at againAt) string {
	if !c.Any() {
		return ""
	}
	names := func(ids []int64) string {
		out := make([]string, len(ids))
		for i, id := range ids {
			out[i] = name(id)
		}
		return wordList(out)
	}
	var parts []string
	if len(c.Revised) > 0 {
		parts = append(parts, "revised since: "+names(c.Revised))
	}
	if len(c.Joined) > 0 {
		parts = append(parts, "now in the pool: "+names(c.Joined))
	}
	if len(c.Left) > 0 {
		parts = append(parts, "no longer in the pool: "+names(c.Left))
	}
	if len(c.Withdrawn) > 0 {
		parts = append(parts, "judgement withdrawn since: "+names(c.Withdrawn))
	}
	if c.Weights {
		parts = append(parts, "other weights are in force")
	}
	return "The pool has changed since this prior was agreed (" + strings.Join(parts, "; ") + "). " +
		"The prior is still the single Beta of the pool as it stood then, not of the pool as it stands now; " +
		at.words() + " if the panel agrees the pool as it now stands."
}

// againAt is where a pool-changed note is read, for its advice on
// recording the prior again: on the question's own page the form is
// below the note; elsewhere (the study page, the report) it is on the
// question's page; a retired question, or an archived workshop, takes no
// prior until it is brought back.
type againAt struct {
	OnQuestionPage, Retired, Archived bool
}

func (at againAt) words() string {
	switch {
	case at.Archived && at.Retired:
		return "bring the workshop back, then the question, and record it again"
	case at.Archived:
		return "bring the workshop back and record it again on the question's page"
	case at.Retired:
		return "bring the question back and record it again"
	case at.OnQuestionPage:
		return "record it again below"
	}
	return "record it again on the question's page"
}

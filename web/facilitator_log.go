package web

import (
	"net/http"

	"github.com/parley-elicit/parley/elicit"
)

// logView is the workshop's decision log: every facilitator decision with
// its time and reason, oldest first.
type logView struct {
	Workshop  elicit.Workshop
	Events    []elicit.Event
	Questions map[int64]elicit.Question
}

func (s *Server) eventLog(w http.ResponseWriter, r *http.Request) {
	ws, ok := s.loadWorkshop(w, r)
	if !ok {
		return
	}
	evs, err := s.store.Events(r.Context(), ws.ID)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	qs, err := s.store.Questions(r.Context(), ws.ID)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	v := logView{Workshop: ws, Events: evs, Questions: map[int64]elicit.Question{}}
	for _, q := range qs {
		v.Questions[q.ID] = q
	}
	s.renderPage(w, r, http.StatusOK, facilitatorMeta(ws, "Decision log", "log"), logPage(v))
}

// eventLabels are the log's plain words for each kind of decision.
var eventLabels = map[elicit.EventKind]string{
	elicit.EventWorkshopCreated: "Workshop created",
	elicit.EventRoundClosed:     "Round closed",
	elicit.EventRoundOpened:     "Round opened",
	elicit.EventWeightsSet:      "Pool weights set",
	elicit.EventPriorAgreed:     "Prior agreed",
	elicit.EventTruthRevealed:   "True value revealed",
	elicit.EventExpertAdded:     "Expert added",
	elicit.EventExpertRevoked:   "Expert's access revoked",
	elicit.EventTokenReissued:   "Expert's link re-issued",
	elicit.EventQuestionAdded:   "Question added",
}

func eventLabel(k elicit.EventKind) string {
	if l, ok := eventLabels[k]; ok {
		return l
	}
	return string(k)
}

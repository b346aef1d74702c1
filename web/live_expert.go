package web

import (
	"context"
	"errors"
	"net/http"
	"strconv"
	"strings"

	"github.com/go-chi/chi/v5"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// An expert's pages follow the workshop too: GET /e/{token}/events is the
// stream of the changes an expert's pages show, authorised by the private
// link alone. It must tell an expert nothing about the other experts that
// their pages do not show, so it is not the facilitator's stream: it
// carries no kind of change and no question, only a count, and the count
// is the expert's own: the changes every expert sees (a round closed or
// opened, the workshop archived or brought back, a question added,
// corrected, retired or its true value shown, and what changes the
// feedback an expert reads from round 2), and the changes to this
// expert's own answers and link (their saves, from any device; an answer
// the facilitator entered or withdrew; the link ended or replaced). An
// expert's save, or another's link revoked in round 1, moves no other
// expert's count: a count that moved with every save told each expert how
// busy the others were.

// maxLinkStreams bounds the open streams of one private link: one per
// browser (its tabs share one, live-worker.js), a few for an expert with
// a phone and a laptop, or a browser without shared workers. A link
// cannot hold more connections and goroutines than that. The bound is
// the link's, not the expert's: counted by expert, the streams of a link
// just replaced (ending, or held by a client that reads nothing) were
// counted against the new one, and refused the expert's new link.
const maxLinkStreams = 4

// maxExpertStreams bounds the experts' open streams on the whole server,
// apart from the facilitator's maxStreams: a room of a few hundred
// experts, each on a phone and a laptop.
const maxExpertStreams = 1024

// errTooManyLinkStreams is returned when a link has maxLinkStreams open.
var errTooManyLinkStreams = errors.New("too many open event streams for one link")

// expertAudience is what the hub keeps of the experts' streams.
type expertAudience struct {
	// subs are each workshop's expert streams, with their expert and link.
	subs     map[int64]map[chan liveEvent]linkStream
	n        int
	perLink  map[string]int   // open streams by link (its token's hash)
	shared   map[int64]uint64 // changes every expert of a workshop sees
	own      map[int64]uint64 // changes to one expert's own answers and link
	expertWS map[int64]int64  // an expert's workshop, for own changes
}

func newExpertAudience() expertAudience {
	return expertAudience{subs: map[int64]map[chan liveEvent]linkStream{}, perLink: map[string]int{},
		shared: map[int64]uint64{}, own: map[int64]uint64{}, expertWS: map[int64]int64{}}
}

// expertVersion is the live version of an expert's pages: the hub's
// start mark, the workshop's shared changes and the expert's own.
func (h *liveHub) expertVersion(ws, expert int64) string {
	h.mu.Lock()
	defer h.mu.Unlock()
	return h.expertVersionLocked(ws, expert)
}

func (h *liveHub) expertVersionLocked(ws, expert int64) string {
	return h.start + "-" + strconv.FormatUint(h.experts.shared[ws], 10) + "." + strconv.FormatUint(h.experts.own[expert], 10)
}

// linkStream is whose an expert's stream is: the expert, and the link
// (its token's hash) it was opened by.
type linkStream struct {
	expert int64
	link   string
}

// subscribeExpert opens a stream of the changes expert's pages show, by
// the link whose token hashes to link.
func (h *liveHub) subscribeExpert(ws, expert int64, link []byte) (ch chan liveEvent, version string, cancel func(), err error) {
	h.mu.Lock()
	defer h.mu.Unlock()
	a := &h.experts
	by := linkStream{expert: expert, link: string(link)}
	switch {
	case h.closed:
		return nil, "", nil, http.ErrServerClosed
	case a.perLink[by.link] >= maxLinkStreams:
		return nil, "", nil, errTooManyLinkStreams
	case a.n >= maxExpertStreams:
		return nil, "", nil, errTooManyStreams
	}
	ch = make(chan liveEvent, 1)
	if a.subs[ws] == nil {
		a.subs[ws] = map[chan liveEvent]linkStream{}
	}
	a.subs[ws][ch] = by
	a.n++
	a.perLink[by.link]++
	return ch, h.expertVersionLocked(ws, expert), func() {
		h.mu.Lock()
		defer h.mu.Unlock()
		if _, ok := a.subs[ws][ch]; ok {
			delete(a.subs[ws], ch)
			a.n--
			if a.perLink[by.link]--; a.perLink[by.link] <= 0 {
				delete(a.perLink, by.link)
			}
		}
	}, nil
}

// publishShared tells every expert of ws of a change their pages show.
func (h *liveHub) publishShared(ws int64) {
	h.mu.Lock()
	defer h.mu.Unlock()
	h.experts.shared[ws]++
	for ch, by := range h.experts.subs[ws] {
		offer(ch, liveEvent{Version: h.expertVersionLocked(ws, by.expert)})
	}
}

// publishOwn tells expert's streams of a change to their own answers or
// link.
func (h *liveHub) publishOwn(ws, expert int64) {
	h.mu.Lock()
	defer h.mu.Unlock()
	h.experts.own[expert]++
	for ch, by := range h.experts.subs[ws] {
		if by.expert == expert {
			offer(ch, liveEvent{Version: h.expertVersionLocked(ws, expert)})
		}
	}
}

// offer puts ev on ch without waiting. When one is pending already this
// newer change takes its place, so the stream tells the latest count (a
// pending one's older count, kept by live-worker.js, let a tab joining
// later miss this change). The caller holds the hub's lock, so the place
// just emptied is this one's.
func offer(ch chan liveEvent, ev liveEvent) {
	select {
	case ch <- ev:
	default:
		select {
		case <-ch:
		default:
		}
		ch <- ev
	}
}

// expertStreams is the number of the experts' open streams.
func (h *liveHub) expertStreams() int {
	h.mu.Lock()
	defer h.mu.Unlock()
	return h.experts.n
}

// expertChange is all a change event tells an expert's page: the count.
type expertChange struct {
	Version string `json:"version"`
}

// expertEvents streams the changes the expert's pages show. It is
// mounted under requireExpert: an unknown, ended or replaced link gets
// 404. An open stream ends, saying "gone", once its link no longer
// works (checked before each change and each beat), so a revoked link
// hears nothing more.
func (s *Server) expertEvents(w http.ResponseWriter, r *http.Request) {
	e := expertFrom(r.Context())
	// requireExpert found the link by this hash.
	hash, _ := tokenHash(chi.URLParam(r, "token"))
	ch, version, cancel, err := s.live.subscribeExpert(e.WorkshopID, e.ID, hash)
	if err != nil {
		streamRefused(w, err)
		return
	}
	defer cancel()
	s.serveStream(w, r, liveStream{
		label:   "changes of your pages",
		changes: ch, version: version,
		now: func() string { return s.live.expertVersion(e.WorkshopID, e.ID) },
		still: func() bool {
			now, err := s.store.ExpertByToken(r.Context(), hash)
			return err == nil && !now.Revoked && now.ID == e.ID
		},
		gone:   "gone",
		change: func(ev liveEvent) any { return expertChange{Version: ev.Version} },
	})
}

// noteExpertVersion notes, for an expert's page, the live version of its
// expert's pages before the page reads anything (liveVersionOf).
func (s *Server) noteExpertVersion(next http.Handler) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		if r.Method == http.MethodGet {
			e := expertFrom(r.Context())
			r = r.WithContext(context.WithValue(r.Context(), liveVersionKey{}, s.live.expertVersion(e.WorkshopID, e.ID)))
		}
		next.ServeHTTP(w, r)
	})
}

// tellExperts publishes a facilitator's change under /w/{workshop} to
// the experts whose pages show it, by the route it took (pattern). The
// workshop is read after the change, for the round whose judgements are
// fed back.
func (s *Server) tellExperts(r *http.Request, ws int64, pattern string) {
	ctx := context.WithoutCancel(r.Context())
	id := func(name string) int64 {
		v, _ := strconv.ParseInt(chi.URLParam(r, name), 10, 64)
		return v
	}
	switch pattern {
	case "/w/{workshop}/edit", "/w/{workshop}/questions", "/w/{workshop}/delete", "/w/{workshop}/archive",
		"/w/{workshop}/round", "/w/{workshop}/q/{question}/edit", "/w/{workshop}/q/{question}/retire":
		s.live.publishShared(ws)
	case "/w/{workshop}/calibration/q/{question}":
		// A true value entered is hidden until it is shown: a change then
		// would tell the experts which questions are calibration questions.
		if q, err := s.store.Question(ctx, id("question")); err == nil && q.Revealed {
			s.live.publishShared(ws)
		}
	case "/w/{workshop}/q/{question}/enter/{expert}/save":
		s.live.publishOwn(ws, id("expert"))
	case "/w/{workshop}/experts/{expert}/revoke", "/w/{workshop}/experts/{expert}/reissue":
		expert := id("expert")
		s.live.publishOwn(ws, expert)
		// The feedback leaves out a revoked expert's curve, and shows it
		// again once a new link lifts the revocation.
		if w, err := s.store.Workshop(ctx, ws); err == nil && w.FeedbackRound() > 0 {
			if revs, err := s.store.ExpertRevisions(ctx, expert); err == nil && fedBack(revs, w) {
				s.live.publishShared(ws)
			}
		}
	case "/w/{workshop}/q/{question}/reasons/{revision}", "/w/{workshop}/q/{question}/revisions/{revision}/withdraw":
		w, err := s.store.Workshop(ctx, ws)
		if err != nil {
			return
		}
		revs, err := s.store.Revisions(ctx, ws)
		if err != nil {
			return
		}
		for _, rv := range revs {
			if rv.ID != id("revision") {
				continue
			}
			if pattern != "/w/{workshop}/q/{question}/reasons/{revision}" {
				s.live.publishOwn(ws, rv.ExpertID) // the expert's own history marks it
			}
			if fedBack([]workshop.Revision{rv}, w) {
				s.live.publishShared(ws)
			}
		}
	}
}

// fedBack says whether any of revs is of a round the workshop's feedback
// shows.
func fedBack(revs []workshop.Revision, w workshop.Workshop) bool {
	for _, rv := range revs {
		if rv.Round <= w.FeedbackRound() {
			return true
		}
	}
	return false
}

// drawnForm is the state an expert's answer form was drawn in: the round
// and whether it saved. The expert's question page follows the workshop
// without touching the form, which may hold a draft, so its live script
// fetches the page with the form's state (?drawn=, data-live-page), and
// the page says what changed since (liveNotice) and what the save button
// now does.
type drawnForm struct {
	Round  int
	Saving saving
}

var savingNames = map[saving]string{savingOpen: "open", savingClosed: "closed", savingFinished: "finished", savingFinal: "final"}

func (d drawnForm) String() string { return strconv.Itoa(d.Round) + "-" + savingNames[d.Saving] }

// parseDrawn reads a drawnForm as String writes it. It is the live
// script's own word, not typed by anyone: anything else is no state, and
// the page says nothing of changes.
func parseDrawn(s string) *drawnForm {
	round, name, ok := strings.Cut(s, "-")
	n, err := strconv.Atoi(round)
	if !ok || err != nil || n < 1 || n > workshop.MaxRounds {
		return nil
	}
	for sv, nm := range savingNames {
		if nm == name {
			return &drawnForm{Round: n, Saving: sv}
		}
	}
	return nil
}

// drawn is the state the page's form was drawn in: as the live script
// says, else as it is now.
func (v expertQuestionView) drawn() drawnForm {
	if v.Drawn != nil {
		return *v.Drawn
	}
	return drawnForm{Round: v.Round, Saving: v.saving()}
}

// livePage is the address the live script fetches the page at.
func (v expertQuestionView) livePage() string {
	return v.Action + "?drawn=" + v.drawn().String()
}

// formFinal says the form was drawn final: its values read-only, and no
// button but the one saying so.
func (v expertQuestionView) formFinal() bool { return v.drawn().Saving == savingFinal }

// offersFeedback says the page can now show the other experts' answers
// from the round fed back, which it did not when its form was drawn.
func (v expertQuestionView) offersFeedback() bool {
	return v.Drawn != nil && v.Round > v.Drawn.Round && (v.Panel != nil || v.Spread != nil)
}

// feedbackKey names the feedback the page shows, for the live script: a
// part whose key changes is offered, not swapped in under the reader.
func (v expertQuestionView) feedbackKey() string {
	if v.Panel == nil && v.Spread == nil && !v.PanelHeld && !v.PanelMissing {
		return "none"
	}
	return "round-" + strconv.Itoa(v.FeedbackRound)
}

// answerStands says what stands of the expert's saved answers once
// nothing more can be saved in the round.
func (v expertQuestionView) answerStands() string {
	if len(v.History) == 0 {
		return "You had saved no answer to this question."
	}
	if h := v.History[0]; h.Round == v.Round {
		return "Your answer saved on " + h.At + " stands."
	} else {
		return "Your answer from round " + strconv.Itoa(h.Round) + " stands."
	}
}

// liveNotice says, on a page whose form was drawn in another state, what
// the facilitator changed since, what stands and what becomes of a
// draft in the form, which the page keeps as it was typed. "" when
// nothing changed for the form.
func (v expertQuestionView) liveNotice() string {
	if v.Drawn == nil {
		return ""
	}
	d, now := *v.Drawn, v.saving()
	if d.Round == v.Round && d.Saving == now {
		return ""
	}
	// The notice stands under the form, above the save button.
	const kept = " Anything you typed in the form and had not saved stays there, but it cannot be saved"
	round := strconv.Itoa(v.Round)
	switch now {
	case savingFinal:
		if d.Saving == savingFinal {
			return ""
		}
		return "The facilitator has shown this question's true value, so answers to it are final. " + v.answerStands() + kept + "."
	case savingFinished:
		return "The facilitator has closed this workshop, so nothing more can be saved. " + v.answerStands() + kept + "."
	case savingClosed:
		if d.Saving == savingFinished {
			return "The facilitator has brought this workshop back. Round " + round + " is closed: nothing can be saved until the next round opens."
		}
		return "The facilitator has closed round " + round + ". " + v.answerStands() + kept +
			" now; note it down if you want it when the next round opens."
	}
	if v.Round > d.Round {
		said := ""
		switch {
		case v.offersFeedback():
			said = " What the other experts said in round " + strconv.Itoa(v.FeedbackRound) + " can now be shown on this page, without their names."
		case v.PanelHeld:
			said = " The other experts' answers to this question stay hidden until the facilitator shows its true value."
		}
		stands := " You have not saved an answer to this question yet;"
		if len(v.History) > 0 {
			stands = " Your answer from round " + strconv.Itoa(v.History[0].Round) + " stands unless you save a new one;"
		}
		return "The facilitator has opened round " + round + "." + said + stands +
			" anything you typed in the form is still there, and you can save it in round " + round + "."
	}
	if d.Saving == savingFinished {
		return "The facilitator has brought this workshop back and round " + round + " is open: you can save your answer again."
	}
	return "The facilitator has reopened round " + round + ": you can save your answer again."
}

// expertStopped is what an expert's page says while it does not follow
// the workshop ({since} is the time it lost touch).
const expertStopped = "This page has lost touch with the workshop since {since}, so it may be out of date. It tries again by itself; anything you type stays here."

// expertLinkGone is what an expert's page says once its link no longer
// works.
const expertLinkGone = "This link no longer works: the facilitator has ended it or given you a new one. Nothing more can be saved from this page; anything you typed stays here. Please ask the facilitator for your current link."

// expertHomeStopped and expertHomeLinkGone are the same for the expert's
// home, where nothing is typed.
const (
	expertHomeStopped  = "This page has lost touch with the workshop since {since}, so it may be out of date. It tries again by itself."
	expertHomeLinkGone = "This link no longer works: the facilitator has ended it or given you a new one, so your questions cannot be opened from it. Please ask the facilitator for your current link."
)

package web

import (
	"fmt"
	"net/http"
	"strconv"
	"strings"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/web/chart"
)

// The room view: one question's anonymised panel for the projector while
// the panel discusses it between rounds. It shows what the experts see in
// their round feedback, under the same labels in the same order, and
// nothing they do not: no names, no weights, no true value before the
// reveal, no answers at all to a calibration question before its reveal,
// and no link that leaves the room view.

// roomView is what the room page shows.
type roomView struct {
	Title    string // the workshop's
	Question workshop.Question
	Index    int // the question's place among those shown, from 1
	Of       int
	Prev     string // the previous and next questions' room views, "" at the ends
	Next     string
	Events   string // the live stream
	// Through is the round whose close the panel shows; State says so in
	// words, and Progress how many answers the open round has so far.
	Through  int
	State    string
	Progress string
	Panel    *chart.PanelView
	Spread   *chart.SpreadView
	Medians  *chart.MedianStripView
	// Crowded: the strip's compact drawing stacks more than
	// roomTableRows rows, and the side column leaves out its table where
	// it draws that drawing (roomTableRows).
	Crowded bool
	Reasons []feedbackReason
	// ChartNotes are the picture's notes, shown under it in the room's
	// own type instead of the picture's small print.
	ChartNotes []string
	Truth      string // the revealed true value, "" before the reveal
	Note       string // why there is no panel, when there is none
	// Left counts the experts who had answered by the round's close and
	// no longer take part (revoked): their letters are missing from the
	// panel, and shownWords says why.
	Left int
	// Held is set for a calibration question whose true value is not yet
	// revealed: the room shows none of its answers, as the experts' pages
	// do not (workshop.Question.PanelHeld).
	Held bool
	// Fingerprint is the record's fingerprint after the round closed
	// (fingerprint.Value.Short), while it is closed, for the room to note.
	Fingerprint string
	// The reasons (room_reasons.go): listed beside the picture when they
	// fit there (Beside), or counted there with a link to the reasons
	// display (ReasonsLink). On the display (ShowReasons) the room shows
	// one page of them, Heading says which, and Back returns to the
	// picture; Prev and Next are then the pages' neighbours, or the
	// picture and the next question's room at the ends.
	// The server's choice (Beside) is laid out for the smallest
	// projector; where the reasons may fit a larger screen's side
	// (Listed), the page carries both the list and the link, and
	// room.js, which knows the screen, shows the one that fits.
	Beside      bool
	Listed      bool
	ReasonsLink string
	ShowReasons bool
	Page        reasonsScreen
	Heading     string
	Back        string
	PastEnd     string // a page past the last, said in words
	// The agreed prior (room_prior.go): PriorLink leads to its display
	// where one is agreed; on the display (ShowPrior) Prior is the prior,
	// or PriorMissing says why none is shown.
	PriorLink    string
	PriorLead    string // the words before PriorLink (priorLead, priorLeadChanged)
	ShowPrior    bool
	Prior        *roomPrior
	PriorMissing string
	// PrevWords and NextWords name Prev and Next.
	PrevWords, NextWords string

	// progressRoom is the longest Progress can read through the open
	// round, which the reasons display lays its pages out for
	// (layOutReasons), "" where it cannot change.
	progressRoom string
}

// roomRound is the round whose close the room shows: while a round is
// open, the one before it (what the experts see now); once it closes, the
// round just closed (what they will see in the next round).
func roomRound(w workshop.Workshop) int {
	if w.Open {
		return w.Round - 1
	}
	return w.Round
}

func roomPath(ws, q int64) string { return questionPath(ws, q) + "/room" }

func (s *Server) roomView(w http.ResponseWriter, r *http.Request) {
	ws, q, ok := s.loadWorkshopQuestion(w, r)
	if !ok {
		return
	}
	show, page, msg := roomQuery(r)
	if msg != "" {
		http.Error(w, msg, http.StatusBadRequest)
		return
	}
	qs, err := s.store.Questions(r.Context(), ws.ID)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	v := roomView{Title: ws.Title, Question: q, Events: workshopPath(ws.ID) + "/events", Through: roomRound(ws),
		PrevWords: "← previous question", NextWords: "next question →"}
	var shown []workshop.Question
	for _, x := range qs {
		if !x.Retired || x.ID == q.ID {
			shown = append(shown, x)
		}
	}
	for i, x := range shown {
		if x.ID != q.ID {
			continue
		}
		v.Index, v.Of = i+1, len(shown)
		if i > 0 {
			v.Prev = roomPath(ws.ID, shown[i-1].ID)
		}
		if i+1 < len(shown) {
			v.Next = roomPath(ws.ID, shown[i+1].ID)
		}
	}
	if q.Frozen() && q.TrueValue != nil {
		v.Truth = chart.FormatValue(*q.TrueValue)
		if u := strings.TrimSpace(q.Units); u != "" {
			// The room reads the number with its units, as the experts
			// gave theirs.
			v.Truth += " (" + u + ")"
		}
	}
	if err := s.fillRoom(r, ws, q, &v); err != nil {
		s.fail(w, r, err)
		return
	}
	room := roomPath(ws.ID, q.ID)
	if err := s.fillRoomPrior(r, ws, q, &v, room, show == "prior"); err != nil {
		s.fail(w, r, err)
		return
	}
	title := "Room view · Q"
	switch show {
	case "reasons":
		title = "Room view, reasons · Q"
	case "prior":
		title = "Room view, agreed prior · Q"
	}
	if show != "prior" {
		layOutReasons(&v, room, show == "reasons", page)
	}
	m := pageMeta{Title: title + strconv.Itoa(q.Position) + " " + q.Quantity, Bare: true, BodyClass: "room",
		Invented: ws.Invented, Scripts: []string{"/static/live.js", "/static/room.js"}, Styles: []string{"/static/room.css"}}
	s.renderPage(w, r, http.StatusOK, m, roomPage(v))
}

// fillRoom reads the panel as roomRound's close and the open round's
// progress into v.
func (s *Server) fillRoom(r *http.Request, ws workshop.Workshop, q workshop.Question, v *roomView) error {
	experts, err := s.store.Experts(r.Context(), ws.ID)
	if err != nil {
		return err
	}
	active := 0
	for _, e := range experts {
		if !e.Revoked {
			active++
		}
	}
	switch {
	case ws.Open:
		v.State = "Round " + strconv.Itoa(ws.Round) + " is open."
		latest, err := s.store.LatestRevisions(r.Context(), q.ID, ws.Round)
		if err != nil {
			return err
		}
		revoked := map[int64]bool{}
		for _, e := range experts {
			revoked[e.ID] = e.Revoked
		}
		// From round 2 a save revises an answer from an earlier round,
		// or is the expert's first (an expert who joined late or had
		// skipped the question): first answers were counted as
		// revisions.
		had := map[int64]bool{}
		if ws.Round > 1 {
			earlier, err := s.store.LatestRevisions(r.Context(), q.ID, ws.Round-1)
			if err != nil {
				return err
			}
			for _, rv := range earlier {
				had[rv.ExpertID] = true
			}
		}
		revised, first := 0, 0
		for _, rv := range latest {
			if rv.Round != ws.Round || revoked[rv.ExpertID] {
				continue
			}
			if had[rv.ExpertID] {
				revised++
			} else {
				first++
			}
		}
		// Revisions come from experts with an earlier answer, first
		// answers from the others. Before anyone saves, the count speaks
		// of revisions only where an active expert has one to revise: on
		// a question nobody had answered (added since the last close, or
		// skipped by all in round 1) "No expert has revised" stood under
		// "Nobody had answered this question when round 1 closed."
		waiting := false
		for id := range had {
			waiting = waiting || !revoked[id]
		}
		verb := "answered"
		switch {
		case revised > 0 && first > 0:
			verb = "answered or revised"
		case revised > 0, first == 0 && waiting:
			verb = "revised"
		}
		v.Progress = roomProgress(revised+first, active, verb, ws.Round)
		v.progressRoom = roomProgress(active, active, "answered or revised", ws.Round)
		if q.Frozen() {
			// The reveal froze the answers: "No expert has revised this
			// question in round 2 yet" waited on the wall for revisions
			// that no expert could save.
			v.Progress = frozenProgress(revised+first, active, verb, ws.Round)
			v.progressRoom = ""
		}
	default:
		v.State = "Round " + strconv.Itoa(ws.Round) + " is closed."
		if ws.Archived {
			// As the overview and the panels say it: no round opens again
			// until the workshop is brought back.
			v.State = "The workshop is archived; round " + strconv.Itoa(ws.Round) + " is closed."
		}
		src, err := s.snapshot(r.Context(), ws)
		if err != nil {
			return err
		}
		if l, ok := chainOf(src).LastClose(ws.Round); ok {
			v.Fingerprint = l.Value.Short()
		}
	}
	if q.Retired {
		// No expert can answer it, so the open round's count of answers
		// says nothing of it.
		v.Note, v.Progress, v.progressRoom = "This question has been retired: experts no longer see it.", "", ""
		return nil
	}
	if q.PanelHeld() {
		v.Held = true
		v.Note = "The panel's answers to this question are held back until its true value is shown, so that every expert's answer to it stays their own."
		return nil
	}
	if v.Through == 0 {
		v.Note = "The panel's answers appear here when round 1 closes, as every expert will see them in round 2."
		return nil
	}
	fb, err := s.panelThrough(r, ws, q, v.Through)
	if err != nil {
		return err
	}
	if fb == nil {
		v.Note = "Nobody had answered this question when round " + strconv.Itoa(v.Through) + " closed."
		evs, err := s.store.Events(r.Context(), ws.ID)
		if err != nil {
			return err
		}
		if addedAfterClose(evs, q.ID, v.Through) {
			v.Note = addedAfterNote(v.Through)
		}
		return nil
	}
	if len(fb.members) < roomLeastAnswers {
		// The room has just watched the count of answers tick up: a lone
		// curve, "Expert A's median, the only answer", was the answer of
		// whoever it saw saved.
		v.Note = fewAnswersNote(len(fb.members), fb.lettered > len(fb.members), v.Through)
		return nil
	}
	v.Left = fb.lettered - len(fb.members)
	id := "room-q" + strconv.FormatInt(q.ID, 10)
	var curves []chart.Curve
	var dists []elicit.ScaledBeta
	md := &chart.MedianStripView{ID: id + "-medians", Quantity: q.Quantity, Units: q.Units, Lower: q.Lower, Upper: q.Upper}
	for _, m := range fb.members {
		curves = append(curves, chart.Curve{Label: m.label, Role: chart.RoleExpert, Dist: m.dist, Slot: m.slot})
		dists = append(dists, m.dist)
		md.Labels = append(md.Labels, m.label)
		md.Medians = append(md.Medians, m.dist.Quantile(0.5))
	}
	if q.Frozen() && q.TrueValue != nil {
		t := *q.TrueValue
		md.Truth = &t
	}
	v.Crowded = md.Rows() > roomTableRows
	v.Medians = md
	if len(fb.members) > overlayLimit {
		var pc []chart.Curve
		if fb.poolErr == nil {
			pc = append(pc, poolCurve(fb.pool))
		}
		v.Spread = &chart.SpreadView{ID: id, Quantity: q.Quantity, Units: q.Units, Lower: q.Lower, Upper: q.Upper, Curves: pc, Others: dists, Truth: md.Truth, Room: true, Tall: true}
		v.ChartNotes = chart.SpreadNotes(*v.Spread)
	} else {
		if fb.poolErr == nil {
			curves = append(curves, poolCurve(fb.pool))
		}
		v.Panel = &chart.PanelView{ID: id, Quantity: q.Quantity, Units: q.Units, Lower: q.Lower, Upper: q.Upper, Curves: curves, Truth: md.Truth, Room: true, Tall: true}
		v.ChartNotes = chart.PanelNotes(*v.Panel)
	}
	v.Reasons = fb.reasons(0)
	return nil
}

// roomLeastAnswers is the fewest answers, from experts still on the
// panel, that the room view shows a question's panel with (its curves,
// medians and reasons). With fewer, the one answer shown is the answer of
// the expert the room may have watched save, so the page says how many
// answered and that the panel appears from this many (fewAnswersNote).
const roomLeastAnswers = 2

// fewAnswersNote says that the room shows no panel for a question that
// fewer than roomLeastAnswers experts still on the panel had answered
// when round `through` closed; left says some who answered have left it.
func fewAnswersNote(answered int, left bool, through int) string {
	who := "expert"
	if left {
		who = "expert still on the panel"
	}
	had := "No " + who + " had"
	if answered == 1 {
		had = "Only one " + who + " had"
	}
	return had + " answered this question when round " + strconv.Itoa(through) + " closed. " +
		"The room is shown a question's answers only once at least " + numberWord(roomLeastAnswers) +
		" experts have answered it by a round's close, so that no expert's answer is shown on its own."
}

// shownWords, fingerprintLead and fingerprintNote are sentences of the
// room's header (room.templ), which the reasons display also counts the
// lines of (layOutReasons). shownWords stands only over a panel shown: over
// "Nobody had answered this question" or a retired question it promised
// every expert's answer on a screen that showed none.
//
// After a revocation the room read "Expert A, C, D" with no word of B;
// the words say a letter is missing and why, naming nobody (the letters
// stay, newFeedback).
func (v roomView) shownWords() string {
	if v.Left == 0 {
		return "Shown: every expert's answer as round " + strconv.Itoa(v.Through) + " closed, without names."
	}
	return "Shown: the answers of the experts still on the panel as round " + strconv.Itoa(v.Through) + " closed, without names. " +
		upperFirst(numberWord(v.Left)) + " " + plural(v.Left, "expert who had answered no longer takes part, so one letter is missing", "experts who had answered no longer take part, so "+numberWord(v.Left)+" letters are missing") +
		"; the others keep theirs."
}

func (v roomView) fingerprintLead() string {
	return "Record fingerprint after round " + strconv.Itoa(v.Through) + " closed:"
}

func (v roomView) fingerprintNote() string {
	return "Note it: a later copy of the record must show this same value for round " + strconv.Itoa(v.Through) + "'s close."
}

// roomQuery reads the room view's address: ?show=reasons for the reasons
// display, and &page=N (from 1) for its pages, or ?show=prior for the
// agreed prior; anything else is refused in words naming the field.
func roomQuery(r *http.Request) (show string, page int, msg string) {
	q := r.URL.Query()
	if name, n := repeatedField(q); name != "" {
		return "", 0, fmt.Sprintf("The room view's address could not be read: %s: takes one value, got %d.", input.Clip(name, 40), n)
	}
	for name := range q {
		if name != "show" && name != "page" {
			return "", 0, "The room view's address could not be read: " + input.Clip(name, 40) + ": not a setting of the room view (it takes show=reasons, show=prior and page)."
		}
	}
	page = 1
	show = q.Get("show")
	if q.Has("show") && show != "reasons" && show != "prior" {
		return "", 0, "The room view's address could not be read: show: takes only \"reasons\" (the reasons display) or \"prior\" (the agreed prior)."
	}
	if q.Has("page") {
		if show != "reasons" {
			return "", 0, "The room view's address could not be read: page: pages only the reasons display (show=reasons)."
		}
		n, err := strconv.Atoi(q.Get("page"))
		if err != nil || n < 1 {
			return "", 0, "The room view's address could not be read: page: takes a whole number from 1."
		}
		page = n
	}
	return show, page, ""
}

// reasonsPath is the reasons display's page n of the room view at room.
func reasonsPath(room string, n int) string {
	p := room + "?show=reasons"
	if n > 1 {
		p += "&page=" + strconv.Itoa(n)
	}
	return p
}

// wording is the question's wording as the room's header writes it.
func (v roomView) wording() string {
	return "Q" + strconv.Itoa(v.Question.Position) + ": " + v.Question.Wording
}

// wordingClass is the header's class for the wording: smaller type for a
// long one (wordingType).
func (v roomView) wordingClass() string {
	size, _ := wordingType(v.wording())
	return wordingSizes[size].class
}

// layOutReasons places v's reasons: beside the picture when they fit
// there, else counted there with a link to the reasons display; on the
// display (show), page's share of them.
func layOutReasons(v *roomView, room string, show bool, page int) {
	members := 0
	if v.Medians != nil {
		members = len(v.Medians.Medians)
	}
	wording := v.wording()
	if !show {
		v.Beside = reasonsBeside(v.Reasons, members, wording)
		v.Listed = len(v.Reasons) > 0 && (v.Beside || reasonsMayBeside(v.Reasons))
		if len(v.Reasons) > 0 {
			v.ReasonsLink = reasonsPath(room, 1)
		}
		return
	}
	v.ShowReasons, v.Back = true, room
	if v.Note != "" || len(v.Reasons) == 0 {
		// Nothing to page: the note says why, or the heading says none.
		v.Heading = "No reasons were given with these answers."
		if v.Note != "" {
			v.Heading = "Reasons"
		}
		v.Prev, v.PrevWords = room, "← back to the picture"
		return
	}
	// The header's text as room.templ writes it, for its lines.
	state := func(progress string) string {
		s := v.State
		if v.Through > 0 && !v.Held {
			s += " " + v.shownWords()
		}
		s += " " + progress
		if v.Truth != "" {
			s += " The true value is " + v.Truth + "."
		}
		return s
	}
	fp := ""
	if v.Fingerprint != "" {
		fp = v.fingerprintLead() + " " + v.Fingerprint + " " + v.fingerprintNote()
	}
	screens := pageScreens([]string{wording, state(v.Progress), fp})
	if v.progressRoom != "" {
		// Laid out for the longest count the open round can show: the
		// count grew a line as experts saved, and the live page moved
		// its reasons between pages under the room's eyes ("Reasons
		// 1–11 of 11" became "Reasons 1–9 of 11 (page 1 of 2)").
		for k, s := range pageScreens([]string{wording, state(v.progressRoom), fp}) {
			screens[k].Lines = min(screens[k].Lines, s.Lines)
		}
	}
	pages := pagesOfReasons(v.Reasons, screens)
	if page > len(pages) {
		// A page that was there before reasons were withheld, or typed:
		// said, not swapped for another, and the live page follows it.
		v.Heading = "Reasons"
		v.PastEnd = "The " + strconv.Itoa(len(v.Reasons)) + " " + plural(len(v.Reasons), "reason takes", "reasons take") + " " +
			strconv.Itoa(len(pages)) + " " + plural(len(pages), "page", "pages") + "; there is no page " + strconv.Itoa(page) + "."
		v.Prev, v.PrevWords = reasonsPath(room, len(pages)), "← the last page of reasons"
		return
	}
	v.Page = pages[page-1]
	v.Heading = reasonsRange(v.Page, len(v.Reasons))
	if len(pages) > 1 {
		v.Heading += " (page " + strconv.Itoa(page) + " of " + strconv.Itoa(len(pages)) + ")"
	}
	v.Prev, v.PrevWords = room, "← back to the picture"
	if page > 1 {
		v.Prev, v.PrevWords = reasonsPath(room, page-1), "← earlier reasons"
	}
	if page < len(pages) {
		v.Next, v.NextWords = reasonsPath(room, page+1), "next reasons →"
	}
}

// roomProgress says how many of the active experts have answered (or,
// from round 2, revised, or "answered or revised" where some of the
// round's saves are first answers) the question in the open round: "2 of 4 experts
// have revised this question in round 2 so far", "1 of 4 experts has …",
// and "No expert has revised this question in round 2 yet." where "0 of 4
// experts have" read as an empty table.
func roomProgress(answered, active int, verb string, round int) string {
	in := " this question in round " + strconv.Itoa(round)
	if answered == 0 {
		return "No expert has " + verb + in + " yet."
	}
	return strconv.Itoa(answered) + " of " + strconv.Itoa(active) + " " + plural(active, "expert", "experts") + " " + plural(answered, "has", "have") + " " + verb + in + " so far."
}

// frozenProgress is roomProgress for a question whose true value was
// shown while the round was open: no answer can come after the reveal,
// so it says what came before it, in the past.
func frozenProgress(answered, active int, verb string, round int) string {
	closed := "Answers to this question closed when its true value was shown"
	in := " it in round " + strconv.Itoa(round)
	if answered == 0 {
		return closed + "; no expert had " + verb + in + "."
	}
	return closed + ", after " + strconv.Itoa(answered) + " of " + strconv.Itoa(active) + " " + plural(active, "expert", "experts") + " had " + verb + in + "."
}

// roomTableRows is the most rows of medians the room's strip stacks with
// its table of the five numbers under it. At 1280×720 the side column
// holds about 530 px: the count of reasons and its link, the heading,
// a compact strip of four rows (about 330 px) and the table (five rows,
// about 125 px). A taller strip (a large panel whose medians converged
// stacked 9 rows, 563 px, and ran the legend, the table and the link to
// the reasons off the projector) is shown there without the table, which
// the facilitator's page of the question keeps, and tableAway says so;
// the strip then shrinks to what the column leaves (style.css). Wider
// than 1600 px the side draws the wide strip, far fewer rows in a taller
// column, and keeps the table.
const roomTableRows = 4

// tableAway is the line that stands for the table the room leaves out.
const tableAway = "The quartiles are on the facilitator's page."

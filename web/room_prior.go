package web

import (
	"net/http"
	"strconv"
	"strings"
	"unicode"

	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/web/chart"
)

// The agreed prior on the projector: once the facilitator records an
// agreed prior for a question, the room view's header says so with a
// link to the prior display, GET …/room?show=prior: the same room view
// with the prior's curve, its median and 90% interval in words, and the
// caution about priors that feed decisions that can hurt people. Like
// the rest of the room view it follows changes live, so a prior recorded
// or replaced in another tab reaches the projector.

// roomPrior is the agreed prior as the prior display shows it.
type roomPrior struct {
	Panel chart.PanelView
	Notes []string // the picture's notes, in the room's type
	// Median, Low and High are the prior's 50%, 5% and 95% points, and
	// Units the question's units ("" for none).
	Median, Low, High string
	Units             string
	Quantity          string
	// Made says in one sentence how and when it was agreed, with its
	// Beta, for the statisticians in the room.
	Made string
	// Rationale is the rationale the facilitator recorded with the
	// prior, as written (the page escapes it and keeps its line breaks),
	// cut at a word after roomRationaleChars characters; Cut says so.
	Rationale string
	Cut       bool
	// Changed says, when the prior was taken from the pool and the pool
	// has moved since (poolChangeOf), what moved, naming nobody; "" when
	// it has not.
	Changed string
}

// roomRationaleChars is the most of a rationale the prior display shows.
// A rationale may have 4,000 characters (input.MaxLongText); across a
// projector under the picture and the words beside it (style.css) about
// 400 take three lines (seven under the picture alone at 1024×768), and
// nobody scrolls a projector. A longer one is cut at a word, and the
// display says where the whole is.
const roomRationaleChars = 400

// cutAtWord is text cut at a space at or before max characters (runes),
// and whether it was cut; a text with no space there is cut at max.
func cutAtWord(text string, max int) (string, bool) {
	rs := []rune(text)
	if len(rs) <= max {
		return text, false
	}
	cut := max
	for i := max; i > max/2; i-- {
		if unicode.IsSpace(rs[i]) {
			cut = i
			break
		}
	}
	return strings.TrimRightFunc(string(rs[:cut]), unicode.IsSpace), true
}

// priorLead stands in the header's first line of a question with an
// agreed prior, before the link to the prior display; priorLeadChanged
// where the pool the prior was agreed from has changed since
// (poolChangeOf, the rule the display's notice follows): the header had
// said only that a prior was agreed, and the room learned the rest only
// on the display. Both begin with the same words, so that the room reads
// the second as the first with one clause more: "a prior has been agreed:"
// beside "agreed prior; its pool has changed since:" read as two styles.
// priorLeadChanged is short: "a prior has been agreed; the pool has
// changed since:" cut the invented demo's own title short on a 1024×768
// projector ("…the HX-40 i…"), the first line being one line.
const (
	priorLead        = "agreed prior:"
	priorLeadChanged = "agreed prior; its pool has changed since:"
)

// fillRoomPrior reads question q's agreed prior in force into v: the
// link to the prior display, and on the display (show) the prior. A
// retired question's prior is left out, as the report leaves it out; a
// calibration question whose answers are held back shows none, since a
// prior from the pool would show the panel's answers; and a prior taken
// from one expert's answer alone is not shown (roomLeastAnswers).
func (s *Server) fillRoomPrior(r *http.Request, ws workshop.Workshop, q workshop.Question, v *roomView, room string, show bool) error {
	v.ShowPrior = show
	if show {
		v.Prev, v.PrevWords, v.Back = room, "← back to the picture", room
		v.PriorMissing = "No prior has been agreed for this question yet."
	}
	if q.Retired || q.PanelHeld() {
		if show {
			v.PriorMissing = v.Note
		}
		return nil
	}
	priors, err := s.store.AgreedPriors(r.Context(), q.WorkshopID)
	if err != nil {
		return err
	}
	var a *workshop.AgreedPrior
	for i := range priors {
		if priors[i].QuestionID == q.ID {
			a = &priors[i]
		}
	}
	if a == nil {
		return nil
	}
	// The rule the facilitator's panel and the priors CSV's pool_changed
	// follow: the room was shown the prior agreed from a pool that is no
	// longer the panel's, as if it were.
	var change workshop.PoolChange
	if a.Source == workshop.PriorFromPool {
		data, err := s.readWorkshopData(r.Context(), ws)
		if err != nil {
			return err
		}
		c, ok, err := s.poolChangeOf(r.Context(), ws, data.state(q))
		if err != nil {
			return err
		}
		if ok {
			change = c
		}
	}
	if !show {
		v.PriorLink, v.PriorLead = room+"?show=prior", priorLead
		if change.Any() {
			v.PriorLead = priorLeadChanged
		}
		return nil
	}
	if a.Source == workshop.PriorFromPool && len(a.Pooled) > 0 && len(a.Pooled) < roomLeastAnswers {
		v.PriorMissing = "The agreed prior was taken from one expert's answer alone, so the room is not shown it: " +
			"the room is shown no expert's answer on its own."
		return nil
	}
	d := a.Dist
	ps := pointsIn(d.Lower, d.Upper, d.Quantile(0.05), d.Quantile(0.5), d.Quantile(0.95))
	lower, upper := fvBounds(d.Lower, d.Upper)
	made := "Agreed in round " + strconv.Itoa(a.Round)
	if a.RoundOpen {
		made += ", while the round was still open,"
	}
	made += " as Beta(α = " + sv(d.Alpha) + ", β = " + sv(d.Beta.Beta) + ") on [" + lower + ", " + upper + "], " + roomPriorOrigin(a.Source) + "."
	p := &roomPrior{Median: ps[1], Low: ps[0], High: ps[2], Units: strings.TrimSpace(q.Units), Quantity: q.Quantity, Made: made}
	p.Rationale, p.Cut = cutAtWord(strings.TrimSpace(a.Rationale), roomRationaleChars)
	p.Panel = chart.PanelView{ID: "room-prior-q" + strconv.FormatInt(q.ID, 10), Quantity: q.Quantity, Units: q.Units, Lower: d.Lower, Upper: d.Upper,
		Curves: []chart.Curve{{Label: "Agreed prior", Role: chart.RoleAgreed, Dist: d}}, Room: true, Marked: true, Tall: true}
	if q.Frozen() && q.TrueValue != nil {
		t := *q.TrueValue
		p.Panel.Truth = &t
	}
	p.Notes = chart.PanelNotes(p.Panel)
	p.Changed = roomPoolChangeWords(change)
	v.Prior, v.PriorMissing = p, ""
	return nil
}

// roomPoolChangeWords says on the projector that the pool a prior was
// agreed from has changed since (c, poolChangeOf), counting what moved
// and naming nobody, as the room names no expert: the facilitator's
// panel names them (poolChangeWords). "" when nothing changed.
func roomPoolChangeWords(c workshop.PoolChange) string {
	if !c.Any() {
		return ""
	}
	var parts []string
	count := func(n int, one, many string) {
		if n > 0 {
			parts = append(parts, numberWord(n)+" "+plural(n, one, many))
		}
	}
	count(len(c.Revised), "expert has revised their answer", "experts have revised their answers")
	count(len(c.Joined), "expert's answer has joined the pool", "experts' answers have joined the pool")
	count(len(c.Left), "expert's answer has left the pool", "experts' answers have left the pool")
	count(len(c.Withdrawn), "pooled judgement has been withdrawn", "pooled judgements have been withdrawn")
	if c.Weights {
		parts = append(parts, "other weights are in force")
	}
	return "The pool has changed since this prior was agreed: " + wordList(parts) + ". " +
		"The prior shown is still the single Beta of the pool as it stood then, not of the experts' answers as they stand now."
}

// roomPriorOrigin says where an agreed prior came from, in the room's
// words.
func roomPriorOrigin(s workshop.PriorSource) string {
	switch s {
	case workshop.PriorFromConsensus:
		return "fitted to a judgement the panel agreed in discussion"
	case workshop.PriorFromConstruction:
		return "made by a quick construction"
	}
	return "the single Beta closest to the pool of the experts' answers"
}

// withUnits writes a value of the question with its units, as the room
// reads a true value.
func (p roomPrior) withUnits(v string) string {
	if p.Units == "" {
		return v
	}
	return v + " (" + p.Units + ")"
}

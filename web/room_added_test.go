package web

import (
	"html"
	"net/http"
	"net/url"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// A question added in round 2: the room does not say nobody had answered
// it when round 1 closed, as if it had been asked then, but that it was
// added after; and its first answers in round 2 are counted as answers,
// not revisions. A question asked from round 1 keeps the first sentence;
// its first answers in round 2 are answers too, and where some of the
// round's saves revise and some are first answers, both are said.
func TestRoomOfAQuestionAddedMidWorkshop(t *testing.T) {
	h, ws, qs, es, links := seeded(t)
	wp := workshopPath(ws.ID)
	// A question nobody answers in round 1, asked from its start.
	early := h.addQuantileQuestion(t, ws.ID, "Asked in round 1 (invented)?", "spares used")
	h.nextRound(t, ws.ID)
	late := h.addQuantileQuestion(t, ws.ID, "Added in round 2 (invented)?", "boards swapped")
	answer := url.Values{"values[0]": {"0.01"}, "values[1]": {"0.05"}, "values[2]": {"0.2"}}
	for _, q := range []int64{early.ID, late.ID, qs[0].ID} {
		if res, _ := h.post(links[0].Path+"q/"+strconv.FormatInt(q, 10)+"/save", answer); res.StatusCode != http.StatusSeeOther {
			t.Fatalf("Ines answers question %d: %d", q, res.StatusCode)
		}
	}
	for _, c := range []struct {
		q         int64
		want, not string
	}{
		{late.ID, "This question was added after round 1 closed, so nobody had answered it then. The panel&#39;s answers appear here when round 2 closes.", "Nobody had answered"},
		{late.ID, "1 of 4 experts has answered this question in round 2 so far.", "revised"},
		{early.ID, "Nobody had answered this question when round 1 closed.", "was added after"},
		{early.ID, "1 of 4 experts has answered this question in round 2 so far.", "revised"},
		{qs[0].ID, "1 of 4 experts has revised this question in round 2 so far.", "was added after"},
	} {
		_, body := h.get(roomPath(ws.ID, c.q))
		if !strings.Contains(body, c.want) || strings.Contains(body, c.not) {
			t.Errorf("room of question %d: want %q, not %q", c.q, c.want, c.not)
		}
	}
	// Priya (links[2]) had not answered Q1 in round 1: her first answer
	// joins Ines's revision.
	if res, _ := h.post(links[2].Path+"q/"+strconv.FormatInt(qs[0].ID, 10)+"/save", answer); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("Priya answers Q1: %d", res.StatusCode)
	}
	if _, body := h.get(roomPath(ws.ID, qs[0].ID)); !strings.Contains(body, "2 of 4 experts have answered or revised this question in round 2 so far.") {
		t.Error("room of Q1: a first answer and a revision in round 2 are not both said")
	}
	// Round 2 closed: the question's answers are shown as any other's,
	// a second expert having answered it (roomLeastAnswers).
	answerAlso(t, h, late, 2, es, links, "0.02", "0.06", "0.25")
	if res, _ := h.post(wp+"/round", url.Values{"action": {"close"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("close round 2: %d", res.StatusCode)
	}
	if _, body := h.get(roomPath(ws.ID, late.ID)); !strings.Contains(body, "Shown: every expert") || strings.Contains(body, "was added after") {
		t.Error("round 2 closed: the added question's room does not show its answers")
	}
}

// addedAfterClose reads the last close of the round: a question added
// while round 1 was closed, then answered in round 1 reopened and closed
// again, existed at that close.
func TestAddedAfterCloseReadsTheLastClose(t *testing.T) {
	closed := func(r int) workshop.Event {
		return workshop.Event{Kind: workshop.EventRoundClosed, Detail: `{"round":` + strconv.Itoa(r) + `}`}
	}
	added := workshop.Event{Kind: workshop.EventQuestionAdded, QuestionID: 7}
	for _, c := range []struct {
		evs  []workshop.Event
		want bool
	}{
		{[]workshop.Event{closed(1), added}, true},
		{[]workshop.Event{added, closed(1)}, false},
		{[]workshop.Event{closed(1), added, {Kind: workshop.EventRoundReopened, Detail: `{"round":1}`}, closed(1)}, false},
		{[]workshop.Event{added}, false},
		{[]workshop.Event{closed(2), added}, false}, // round 1 never closed: not this rule's to say
	} {
		if got := addedAfterClose(c.evs, 7, 1); got != c.want {
			t.Errorf("%v: %v, want %v", c.evs, got, c.want)
		}
	}
}

// A question asked from round 1 that nobody answered then: before anyone
// saves in round 2, the room under "Nobody had answered this question
// when round 1 closed." said "No expert has revised this question in
// round 2 yet.", though nobody had anything to revise. Where an active
// expert had answered, the same count still says "revised".
func TestRoomOfAQuestionNobodyAnsweredSaysAnsweredNotRevised(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	unanswered := h.addQuantileQuestion(t, ws.ID, "Asked in round 1, answered by nobody (invented)?", "spares used")
	h.nextRound(t, ws.ID)
	_, body := h.get(roomPath(ws.ID, unanswered.ID))
	if want := "No expert has answered this question in round 2 yet."; !strings.Contains(body, want) || strings.Contains(body, "revised") {
		t.Errorf("room of a question nobody answered in round 1: want %q, and no word of revising", want)
	}
	if _, body := h.get(roomPath(ws.ID, qs[0].ID)); !strings.Contains(body, "No expert has revised this question in round 2 yet.") {
		t.Error("room of Q1, answered in round 1: the count no longer says revised")
	}
}

// An expert's page of a question added after round 1 closed gives the
// room view's account, in an expert's words: "No other expert had
// answered this question when round 1 closed" read as if the others had
// passed it over. A question asked from round 1 that nobody answered
// keeps that sentence. Once the workshop is closed, no next round is
// promised.
func TestExpertPageOfAQuestionAddedMidWorkshop(t *testing.T) {
	h, ws, _, _, links := seeded(t)
	early := h.addQuantileQuestion(t, ws.ID, "Asked in round 1 (invented)?", "spares used")
	h.nextRound(t, ws.ID)
	late := h.addQuantileQuestion(t, ws.ID, "Added in round 2 (invented)?", "boards swapped")
	page := func(q workshop.Question) string {
		t.Helper()
		res, body := h.get(links[0].Path + "q/" + strconv.FormatInt(q.ID, 10))
		if res.StatusCode != http.StatusOK {
			t.Fatalf("the expert's page of question %d: %d", q.ID, res.StatusCode)
		}
		return html.UnescapeString(body)
	}
	const added = "This question was added after round 1 closed, so nobody had answered it then and there is nothing from the other experts to show"
	const next = " yet. Their round 2 answers can be shown here, without their names, if the facilitator opens round 3."
	const none = "No other expert had answered this question when round 1 closed."
	if body := page(late); !strings.Contains(body, added+next) || strings.Contains(body, none) {
		t.Errorf("round 2: the added question's page does not say it was added after round 1 closed:\n%s", clipAround(body, "What the other experts said"))
	}
	if body := page(early); !strings.Contains(body, none) || strings.Contains(body, "was added after") {
		t.Error("round 2: the page of a question asked from round 1 and not answered does not say no other expert had answered it")
	}
	// The room says the same of the question.
	if _, body := h.get(roomPath(ws.ID, late.ID)); !strings.Contains(html.UnescapeString(body), "This question was added after round 1 closed, so nobody had answered it then.") {
		t.Error("the room view of the added question does not say it was added after round 1 closed")
	}
	if res, body := h.post(workshopPath(ws.ID)+"/archive", url.Values{"action": {"archive"}, "archive_reason": {"Done (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("archive: %d %s", res.StatusCode, body)
	}
	if body := page(late); !strings.Contains(body, added+".") || strings.Contains(body, "if the facilitator opens round") {
		t.Error("archived: the added question's page still promises a next round, or no longer says it was added after round 1 closed")
	}
}

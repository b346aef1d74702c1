package web

import (
	"context"
	"html"
	"net/http"
	"net/url"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// The room shows a question's curves, medians and reasons only where at
// least two experts still on the panel had answered it by the round's
// close. The room has just watched the count of answers tick up as
// experts saved, so a lone curve ("Expert A's median, the only answer")
// was the answer of whoever it saw save. The rule is said on the page,
// and holds when revocations leave one answer of several.
func TestRoomShowsNoLoneAnswer(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	wp := workshopPath(ws.ID)
	if r, _ := h.post(wp+"/round", url.Values{"action": {"close"}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("close: %d", r.StatusCode)
	}
	// The demo's question 3 had one answer when round 1 closed; revealed,
	// so that the room would show it at all.
	if err := h.db.SetTrueValue(context.Background(), qs[2].ID, *qs[2].TrueValue, true, "Revealed after round 1 (invented)."); err != nil {
		t.Fatal(err)
	}
	const rule = "The room is shown a question's answers only once at least two experts have answered it by a round's close"
	lone := func(path, when string, left bool) {
		t.Helper()
		r, body := h.get(path)
		body = html.UnescapeString(body)
		if r.StatusCode != http.StatusOK {
			t.Fatalf("%s: %s: status %d", when, path, r.StatusCode)
		}
		said := "Only one expert had answered this question when round 1 closed."
		if left {
			said = "Only one expert still on the panel had answered this question when round 1 closed."
		}
		for _, want := range []string{said, rule} {
			if !strings.Contains(body, want) {
				t.Errorf("%s: %s does not say %q", when, path, want)
			}
		}
		for _, shown := range []string{"Expert A", "the only answer", "curve-density", "Where the medians lie", "Shown: every expert's answer"} {
			if strings.Contains(body, shown) {
				t.Errorf("%s: %s shows %q with one answer", when, path, shown)
			}
		}
	}
	lone(roomPath(ws.ID, qs[2].ID), "one answer", false)
	lone(reasonsPath(roomPath(ws.ID, qs[2].ID), 1), "one answer, the reasons display", false)

	// Question 1 had three answers: shown, until two of the three who
	// answered are revoked.
	q1 := roomPath(ws.ID, qs[0].ID)
	if _, body := h.get(q1); len(labelMedians(body)) != 3 {
		t.Fatalf("question 1's room shows %v, want three experts' medians", labelMedians(body))
	}
	gone := 0
	for _, e := range es {
		revs, err := h.db.LatestRevisions(context.Background(), qs[0].ID, 1)
		if err != nil {
			t.Fatal(err)
		}
		answered := false
		for _, rv := range revs {
			answered = answered || rv.ExpertID == e.ID
		}
		if !answered || gone == 2 {
			continue
		}
		revoke := wp + "/experts/" + strconv.FormatInt(e.ID, 10) + "/revoke"
		if r, _ := h.post(revoke, url.Values{"confirm": {"yes"}, "reason": {"Left the workshop (invented)."}}); r.StatusCode != http.StatusSeeOther {
			t.Fatalf("revoke: %d", r.StatusCode)
		}
		gone++
		if gone == 1 {
			if _, body := h.get(q1); len(labelMedians(body)) != 2 {
				t.Errorf("with one of three revoked the room shows %v, want two experts' medians", labelMedians(body))
			}
		}
	}
	lone(q1, "two of three revoked", true)
}

// answerAlso saves values as the answer of the first demo expert who has
// none to question q through the open round, so that the room shows its panel
// (roomLeastAnswers).
func answerAlso(t *testing.T, h *harness, q workshop.Question, round int, es []workshop.Expert, links []DemoLink, values ...string) {
	t.Helper()
	revs, err := h.db.LatestRevisions(context.Background(), q.ID, round)
	if err != nil {
		t.Fatal(err)
	}
	answered := map[string]bool{}
	for _, rv := range revs {
		for _, e := range es {
			if e.ID == rv.ExpertID {
				answered[e.Name] = true
			}
		}
	}
	form := url.Values{}
	for i, v := range values {
		form.Set("values["+strconv.Itoa(i)+"]", v)
	}
	for _, l := range links {
		if answered[l.Name] {
			continue
		}
		if r, body := h.post(l.Path+"q/"+strconv.FormatInt(q.ID, 10)+"/save", form); r.StatusCode != http.StatusSeeOther {
			t.Fatalf("%s answers question %d: %d %s", l.Name, q.ID, r.StatusCode, body)
		}
		return
	}
	t.Fatalf("every expert has answered question %d", q.ID)
}

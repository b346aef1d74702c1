package web

import (
	"context"
	"html"
	"net/url"
	"regexp"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/web/chart"
)

// The room view's picture of the curves, and the facilitator's picture on
// the question's panel, draw a calibration question's true value as a
// labelled upright line once it is revealed, and say it in the caption;
// before the reveal neither has any of it (the room then shows no answers
// at all, and the facilitator's picture no line though the value is
// stored).
func TestRoomAndPanelDrawTheTrueValueOnlyOnceRevealed(t *testing.T) {
	h, ws, qs, es, links := seeded(t)
	q := qs[2]
	if q.TrueValue == nil || !q.Calibration {
		t.Fatal("the seed's question 3 is not a calibration question with a true value")
	}
	// The demo's one answer to it, and a second, for the room to show.
	answerAlso(t, h, q, 1, es, links, "0.2", "0.3", "0.45")
	if r, _ := h.post(workshopPath(ws.ID)+"/round", url.Values{"action": {"close"}}); r.StatusCode != 303 {
		t.Fatalf("close: %d", r.StatusCode)
	}
	label := "true value " + chart.FormatWithin(*q.TrueValue, q.Lower, q.Upper, false)
	caption := "The true value, now revealed, is " + chart.FormatWithin(*q.TrueValue, q.Lower, q.Upper, false)
	pictureOf := func(body string) string {
		return regexp.MustCompile(`(?s)<div class="chart-with-table chart-panel".*?</figure>`).FindString(body)
	}
	_, room := h.get(roomPath(ws.ID, q.ID))
	_, panel := h.get(questionPath(ws.ID, q.ID))
	for name, body := range map[string]string{"room": room, "panel": panel} {
		if strings.Contains(body, `class="chart-truth"`) || strings.Contains(body, label) || strings.Contains(body, caption) {
			t.Errorf("the %s shows the true value on its picture before the reveal", name)
		}
	}
	if err := h.db.SetTrueValue(context.Background(), q.ID, *q.TrueValue, true, "Revealed after round 1 (invented)."); err != nil {
		t.Fatal(err)
	}
	_, room = h.get(roomPath(ws.ID, q.ID))
	_, panel = h.get(questionPath(ws.ID, q.ID))
	for name, body := range map[string]string{"room": room, "panel": panel} {
		pic := pictureOf(body)
		if pic == "" {
			t.Fatalf("the %s draws no picture of the curves after the reveal", name)
		}
		// The room's picture carries its tall drawings too, for a
		// projector taller for its width (chart.PanelView.Tall).
		layouts := map[string]int{"room": 7, "panel": 2}[name]
		if n := strings.Count(pic, `class="chart-truth"`); n != layouts {
			t.Errorf("the %s's picture draws the true value in %d layouts, want all %d", name, n, layouts)
		}
		if n := strings.Count(pic, ">"+label+"</text>"); n != layouts {
			t.Errorf("the %s's picture labels the true value %q %d times, want once per layout", name, label, n)
		}
		if !regexp.MustCompile(`(?s)<figcaption>[^<]*` + regexp.QuoteMeta(caption)).MatchString(pic) {
			t.Errorf("the %s's caption does not say %q", name, caption)
		}
	}
}

// The room's fingerprint line says plainly which close the value is
// for: "…show the same value for this close." read as the record's
// jargon.
func TestRoomFingerprintNoteNamesTheRound(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	if r, _ := h.post(workshopPath(ws.ID)+"/round", url.Values{"action": {"close"}}); r.StatusCode != 303 {
		t.Fatalf("close: %d", r.StatusCode)
	}
	_, body := h.get(roomPath(ws.ID, qs[0].ID))
	m := regexp.MustCompile(`(?s)<span class="room-fingerprint-note">(.*?)</span>`).FindStringSubmatch(body)
	want := "Note it: a later copy of the record must show this same value for round 1's close."
	if m == nil || strings.Join(strings.Fields(html.UnescapeString(m[1])), " ") != want {
		t.Errorf("the room's fingerprint note reads %q, want %q", m, want)
	}
}

// A large panel's picture (the curves over the strip of intervals, drawn
// beyond overlayLimit experts) draws a revealed true value too, in the
// room and on the question's panel: labelled over the curves, continued
// through the strip, and said in both captions; before the reveal,
// nothing of it.
func TestLargePanelDrawsTheTrueValueOnlyOnceRevealed(t *testing.T) {
	const truth = 0.37
	h, ws, q, _ := seedLargePanelWith(t, overlayLimit+3, func(q *workshop.Question) {
		q.Calibration = true
		tv := truth
		q.TrueValue = &tv
	})
	if r, _ := h.post(workshopPath(ws.ID)+"/round", url.Values{"action": {"close"}}); r.StatusCode != 303 {
		t.Fatalf("close: %d", r.StatusCode)
	}
	value := chart.FormatWithin(truth, q.Lower, q.Upper, false)
	label := ">true value " + value + "</text>"
	words := "The true value, now revealed, is " + value + ": the red dashed upright line."
	spread := regexp.MustCompile(`(?s)<div class="chart-spread".*?</table>\s*</div>\s*</div>`)
	_, panel := h.get(questionPath(ws.ID, q.ID))
	if pic := spread.FindString(panel); pic == "" {
		t.Fatal("the panel draws no picture of a large panel")
	} else if strings.Contains(pic, "truth-line") || strings.Contains(pic, "true value") {
		t.Error("the panel's picture draws the true value before the reveal")
	}
	if err := h.db.SetTrueValue(context.Background(), q.ID, truth, true, "Revealed after round 1 (invented)."); err != nil {
		t.Fatal(err)
	}
	_, room := h.get(roomPath(ws.ID, q.ID))
	_, panel = h.get(questionPath(ws.ID, q.ID))
	for name, body := range map[string]string{"room": room, "panel": panel} {
		pic := spread.FindString(body)
		if pic == "" {
			t.Fatalf("the %s draws no picture of a large panel after the reveal", name)
		}
		// Two pictures (the curves, the strip) in two layouts each, and
		// in the room in each of its tall drawings too
		// (chart.SpreadView.Tall).
		layouts := 2
		if name == "room" {
			layouts += strings.Count(pic, `chart-tall `)
		}
		if n := strings.Count(pic, `class="truth-line"`); n != 2*layouts {
			t.Errorf("the %s's picture draws %d lines of the true value, want %d (the curves and the strip, in all %d layouts)", name, n, 2*layouts, layouts)
		}
		if n := strings.Count(pic, label); n != layouts {
			t.Errorf("the %s's picture labels the true value %d times, want once per layout", name, n)
		}
		if n := strings.Count(pic, words); n < 2 {
			t.Errorf("the %s's captions say %q %d times, want in both pictures' captions", name, words, n)
		}
	}
}

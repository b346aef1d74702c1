package web

import (
	"context"
	"html"
	"net/http"
	"net/url"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

var legendLabel = regexp.MustCompile(`class="legend-label"[^>]*>(Expert [A-Z]+|You)</text>`)

// legendLabels are the curve labels in a page's panel legend.
func legendLabels(body string) []string {
	var out []string
	for _, m := range legendLabel.FindAllStringSubmatch(wideOnly(body), -1) {
		out = append(out, m[1])
	}
	return out
}

// The room view shows the panel as the experts see it in feedback, under
// the same labels, and nothing that names or weighs anyone, nor a true
// value before it is revealed.
func TestRoomViewShowsTheFeedbackAnonymously(t *testing.T) {
	h, ws, qs, es, links := seeded(t)
	wp := workshopPath(ws.ID)
	room := func(i int) string { return roomPath(ws.ID, qs[i].ID) }

	// Round 1 open: nothing to show yet but the progress.
	r, body := h.get(room(0))
	if r.StatusCode != http.StatusOK || !strings.Contains(body, "appear here when round 1 closes") || !strings.Contains(body, "3 of 4 experts have answered") {
		t.Fatalf("room in round 1: %d", r.StatusCode)
	}
	// Custom weights in force must not show either.
	wf := url.Values{"scheme": {"custom"}, "reason": {"Audits (invented)."}}
	for i, e := range es {
		wf.Set(weightField(e.ID), strconv.Itoa(i+1))
	}
	if r, _ := h.post(questionPath(ws.ID, qs[0].ID)+"/weights", wf); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("weights: %d", r.StatusCode)
	}
	if r, _ := h.post(wp+"/round", url.Values{"action": {"close"}}); r.StatusCode != http.StatusSeeOther {
		t.Fatal("close")
	}
	_, body = h.get(room(0))
	labels := legendLabels(body)
	// Three of the demo's four experts answered question 1 in round 1.
	if strings.Join(labels, ",") != "Expert A,Expert B,Expert C" {
		t.Fatalf("room labels %v, want the three who answered, A to C", labels)
	}
	for i := range qs {
		_, body := h.get(room(i))
		for _, e := range es {
			if strings.Contains(body, e.Name) || strings.Contains(body, e.Affiliation) {
				t.Errorf("room %d names %s", i, e.Name)
			}
		}
		if regexp.MustCompile(`(?i)(^|[^-])weights?\b|performance|66\.7%|\b40%`).MatchString(strings.ReplaceAll(body, "Equal-weight pool", "")) {
			t.Errorf("room %d speaks of weights", i)
		}
		for _, q := range qs {
			if q.TrueValue != nil && strings.Contains(body, strconv.FormatFloat(*q.TrueValue, 'f', -1, 64)) {
				t.Errorf("room %d shows question %d's hidden true value", i, q.Position)
			}
		}
		if strings.Contains(strings.ToLower(body), "calibration") {
			t.Errorf("room %d says which questions are calibration questions", i)
		}
		// Its only links are room views: the neighbours', and its own
		// reasons display (?show=reasons, a page of it) and prior display
		// (?show=prior).
		for _, m := range regexp.MustCompile(`href="([^"]+)"`).FindAllStringSubmatch(body, -1) {
			if !roomLink.MatchString(html.UnescapeString(m[1])) && !strings.HasPrefix(m[1], "/static/") && !strings.HasPrefix(m[1], "#") {
				t.Errorf("room %d links to %s", i, m[1])
			}
		}
		if strings.Contains(body, "<form") {
			t.Errorf("room %d has a form", i)
		}
	}
	// Previous and next follow the questions' order.
	_, body = h.get(room(1))
	if !strings.Contains(body, `id="room-prev" rel="prev" href="`+room(0)+`"`) || !strings.Contains(body, `id="room-next" rel="next" href="`+room(2)+`"`) {
		t.Error("room 2's neighbours are not rooms 1 and 3")
	}

	// Round 2: each expert sees the room's labels for the others, and the
	// same curves under them.
	if r, _ := h.post(wp+"/round", url.Values{"action": {"open"}, "reason": {"Discussed (invented)."}}); r.StatusCode != http.StatusSeeOther {
		t.Fatal("open round 2")
	}
	_, roomBody := h.get(room(0))
	roomMedians := labelMedians(roomBody)
	seen := map[string]bool{}
	for _, l := range links {
		_, page := h.get(l.Path + "q/" + strconv.FormatInt(qs[0].ID, 10))
		mine := labelMedians(page)
		// An answerer sees their own curve and the two others; Priya, who
		// did not answer, the three others.
		if len(mine) != len(roomMedians) {
			t.Fatalf("%s's round-2 legend %v, the room's %v", l.Name, mine, roomMedians)
		}
		for label, med := range mine {
			if label == "You" {
				continue
			}
			if roomMedians[label] != med {
				t.Errorf("%s sees %s with median %s; the room shows %s", l.Name, label, med, roomMedians[label])
			}
		}
		for label := range roomMedians {
			if _, ok := mine[label]; !ok {
				seen[label] = true // this expert's own letter
			}
		}
	}
	if len(seen) != 3 {
		t.Errorf("the experts' own letters are %v, want each of the three answerers' once", seen)
	}

	// After the reveal the room shows the true value of that question.
	if r, _ := h.post(calibrationPath(ws.ID)+"/q/"+strconv.FormatInt(qs[1].ID, 10),
		url.Values{"true_value": {"0.0413"}, "reveal": {"on"}, "reason": {"Shown (invented)."}}); r.StatusCode != http.StatusSeeOther {
		t.Fatal("reveal")
	}
	// With its units, as the experts gave their answers.
	if _, body := h.get(room(1)); !strings.Contains(body, "The true value is 0.0413 ("+qs[1].Units+").") || qs[1].Units == "" {
		t.Errorf("the room does not show the revealed true value 0.0413 with its units %q", qs[1].Units)
	}
}

// percentileRow is a row of a panel's table of curves; the room's names
// each curve's Beta under its label, the expert's page does not.
var percentileRow = regexp.MustCompile(`<tr[^>]*><th scope="row"[^>]*>(Expert [A-Z]+|You)\s*(?:<br><span class="chart-params">[^<]*</span>)?</th><td[^>]*>.*?</td><td[^>]*>[^<]*</td><td[^>]*>([^<]*)</td>`)

// labelMedians maps each labelled curve to its median in the picture's
// percentile table.
func labelMedians(body string) map[string]string {
	m := map[string]string{}
	for _, x := range percentileRow.FindAllStringSubmatch(body, -1) {
		m[x[1]] = x[2]
	}
	return m
}

// Reasons from the previous round reach the other experts under the
// curves' labels; a reason the facilitator withheld reaches no expert
// page and no room view, and comes back when released.
func TestReasonsInFeedbackAndWithheld(t *testing.T) {
	h, ws, qs, es, links := seeded(t)
	wp := workshopPath(ws.ID)
	q := qs[0]
	qpath := func(i int) string { return links[i].Path + "q/" + strconv.FormatInt(q.ID, 10) }
	const named = "As Dr Example from the plant told me in confidence, the boards are weak (invented)."
	const plain = "Supplier audits found two line faults (invented)."
	for i, reason := range map[int]string{0: named, 2: plain} {
		if r, _ := h.post(qpath(i)+"/save", url.Values{"values[0]": {"0.02"}, "values[1]": {"0.05"}, "values[2]": {"0.12"}, "reason": {reason}}); r.StatusCode != http.StatusSeeOther {
			t.Fatalf("save with a reason: %d", r.StatusCode)
		}
	}
	// The facilitator withholds the reason that names a person.
	revs, _ := h.db.Revisions(context.Background(), ws.ID)
	var namedRev int64
	for _, rv := range revs {
		if rv.Reason == named {
			namedRev = rv.ID
		}
	}
	withhold := questionPath(ws.ID, q.ID) + "/reasons/" + strconv.FormatInt(namedRev, 10)
	if r, _ := h.post(withhold, url.Values{"action": {"withhold"}}); r.StatusCode != http.StatusUnprocessableEntity {
		t.Fatalf("withholding without a reason: %d", r.StatusCode)
	}
	// An action the page's buttons do not send is refused saying so; it
	// said "correct the marked fields" with nothing marked.
	if r, body := h.post(withhold, url.Values{"action": {"hide"}, "withhold_reason": {"Names a person."}}); r.StatusCode != http.StatusUnprocessableEntity ||
		!strings.Contains(body, "asked for neither, and nothing changed") {
		t.Fatalf("an unknown action: %d", r.StatusCode)
	}
	if r, _ := h.post(withhold, url.Values{"action": {"withhold"}, "withhold_reason": {"Names a person."}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("withhold: %d", r.StatusCode)
	}
	if ev := lastEvent(t, h, ws.ID); ev.Kind != "reason_withheld" || ev.Reason != "Names a person." {
		t.Fatalf("withhold event %+v", ev)
	}
	if _, body := h.get(questionPath(ws.ID, q.ID)); !strings.Contains(body, "withheld from the feedback") {
		t.Error("the panel does not show the reason as withheld")
	}
	// The decision log and the report say whose reason it was, as the
	// panel's list did where it was withheld ("Ines Varga, round 1: …").
	withheldLine := htmlEscape(es[0].Name + "'s reason from round 1 is kept from the other experts' feedback")
	for _, page := range []string{wp + "/log", wp + "/report"} {
		if _, body := h.get(page); !strings.Contains(body, withheldLine) {
			t.Errorf("%s does not say whose reason was withheld (want %q)", page, withheldLine)
		}
	}
	for _, step := range []url.Values{{"action": {"close"}}, {"action": {"open"}, "reason": {"Round 2 (invented)."}}} {
		if r, _ := h.post(wp+"/round", step); r.StatusCode != http.StatusSeeOther {
			t.Fatal("rounds")
		}
	}
	pages := map[string]string{}
	for i, l := range links {
		_, pages[es[i].Name] = h.get(qpath(i))
		_ = l
	}
	_, pages["room"] = h.get(roomPath(ws.ID, q.ID))
	for who, body := range pages {
		if who == es[0].Name {
			continue // the author sees their own reason in their history
		}
		if strings.Contains(body, "Dr Example") {
			t.Errorf("%s's page shows the withheld reason", who)
		}
	}
	own := pages[es[0].Name]
	if i, j := strings.Index(own, "Their reasons"), strings.Index(own, "Your history"); i >= 0 && j > i && strings.Contains(own[i:j], "Dr Example") {
		t.Error("the author's feedback lists their own withheld reason")
	}
	// The plain reason reaches the others under its author's label.
	roomLabel := regexp.MustCompile(`<li><strong>(Expert [A-Z]+)</strong>: ` + regexp.QuoteMeta(plain)).FindStringSubmatch(pages["room"])
	if roomLabel == nil {
		t.Fatal("the room does not show the plain reason with a label")
	}
	for i, e := range es {
		body := pages[e.Name]
		has := strings.Contains(body, "<li><strong>"+roomLabel[1]+"</strong> <span class=\"muted\">(round 1)</span>: "+plain)
		switch {
		case i == 2 && has:
			t.Errorf("%s is shown their own reason as another expert's", e.Name)
		case i != 2 && !has:
			t.Errorf("%s does not see the plain reason under %s", e.Name, roomLabel[1])
		}
	}
	// Released, it reaches the experts again at once.
	if r, _ := h.post(withhold, url.Values{"action": {"release"}, "withhold_reason": {"The person agreed (invented)."}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("release: %d", r.StatusCode)
	}
	if _, body := h.get(qpath(1)); !strings.Contains(body, "Dr Example") {
		t.Error("a released reason does not reach the other experts")
	}
	if _, body := h.get(wp + "/log"); !strings.Contains(body, htmlEscape(es[0].Name+"'s reason from round 1 is shown in the feedback again.")) {
		t.Error("the decision log does not say whose reason was shown again")
	}
}

// roomLink is an address the room view may link to: a question's room
// view, a page of its reasons display, or its prior display.
var roomLink = regexp.MustCompile(`/q/\d+/room(\?show=reasons(&page=\d+)?|\?show=prior)?$`)

package web

import (
	"context"
	"encoding/json"
	"html"
	"net/http"
	"net/url"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
)

func lastEvent(t *testing.T, h *harness, ws int64) workshop.Event {
	t.Helper()
	evs, err := h.db.Events(context.Background(), ws)
	if err != nil || len(evs) == 0 {
		t.Fatalf("events: %v", err)
	}
	return evs[len(evs)-1]
}

// A question is corrected through its form: all of it before anyone
// answers, its text after; each correction is an event with its reason,
// and the record keeps the earlier text.
func TestCorrectQuestion(t *testing.T) {
	h := newHarness(t)
	h.signIn()
	ws := h.newWorkshop("Corrections (invented)")
	wp := workshopPath(ws.ID)
	if r, body := h.post(wp+"/questions", url.Values{"wording": {"What shre of pumps fail?"}, "quantity": {"pump failure share"},
		"lower": {"0"}, "upper": {"1"}, "format": {"quantiles"}, "preset": {"p05_50_95"}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("add question: %d %s", r.StatusCode, body)
	}
	qs, _ := h.db.Questions(context.Background(), ws.ID)
	q := qs[0]
	edit := questionPath(ws.ID, q.ID) + "/edit"
	if r, body := h.get(edit); r.StatusCode != http.StatusOK || !strings.Contains(body, "any part of it can be corrected") || !strings.Contains(body, `name="upper"`) {
		t.Fatalf("edit form before answers: %d", r.StatusCode)
	}
	full := url.Values{"wording": {"What share of pumps fail in year one?"}, "quantity": {"pump failure share"},
		"lower": {"0"}, "upper": {"0.5"}, "format": {"quantiles"}, "preset": {"quartiles"}}
	// The reason is required, and nothing is saved without it.
	if r, body := h.post(edit, full); r.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, "Reason for the correction") {
		t.Fatalf("correction without a reason: %d", r.StatusCode)
	}
	if got, _ := h.db.Question(context.Background(), q.ID); got.Upper != 1 {
		t.Fatal("a refused correction was saved")
	}
	full.Set("reason", "Typo in the wording; the range was too wide.")
	if r, body := h.post(edit, full); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("correction: %d %s", r.StatusCode, body)
	}
	got, _ := h.db.Question(context.Background(), q.ID)
	if got.Wording != "What share of pumps fail in year one?" || got.Upper != 0.5 || got.Probs[0] != 0.25 {
		t.Fatalf("corrected question: %+v", got)
	}
	ev := lastEvent(t, h, ws.ID)
	if ev.Kind != workshop.EventQuestionEdited || !strings.Contains(ev.Detail, "What shre of pumps fail?") || ev.Reason == "" {
		t.Fatalf("correction event %+v", ev)
	}
	if _, body := h.get(wp + "/log"); !strings.Contains(body, "Question corrected") || !strings.Contains(body, "wording was “What shre of pumps fail?”") {
		t.Error("the decision log does not show the earlier wording")
	}

	// After an answer: the form locks what answers depend on, and a
	// forged post changing the bounds is refused naming the field.
	e, token := h.addExpert(ws, "Early Answerer")
	_ = e
	if r, _ := h.post(expertPath(token)+"q/"+strconv.FormatInt(q.ID, 10)+"/save", url.Values{
		"values[0]": {"0.02"}, "values[1]": {"0.05"}, "values[2]": {"0.12"}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("answer: %d", r.StatusCode)
	}
	if _, body := h.get(edit); !strings.Contains(body, "so its bounds, format") || strings.Contains(body, `name="upper"`) {
		t.Error("the edit form after an answer still offers the bounds")
	}
	locked := url.Values{"wording": {"What share of pumps fail in their first year?"}, "quantity": {"first-year pump failure share"},
		"units": {"share of pumps"}, "reason": {"Clearer wording."}}
	if r, body := h.post(edit, locked); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("text correction after answers: %d %s", r.StatusCode, body)
	}
	got, _ = h.db.Question(context.Background(), q.ID)
	if got.Quantity != "first-year pump failure share" || got.Upper != 0.5 {
		t.Fatalf("after the text correction: %+v", got)
	}
	// A form opened before the first answer and sent after it carries
	// every field. A bound changed on it is refused by name, and nothing is
	// saved: the wording beside it had been saved and the bound dropped
	// without a word.
	stale := url.Values{}
	for k, v := range questionValues(got) {
		stale[k] = v
	}
	stale.Set("upper", "0.9")
	stale.Set("wording", "What share of pumps fail within a year?")
	stale.Set("reason", "Narrower range (invented).")
	if r, body := h.post(edit, stale); r.StatusCode != http.StatusUnprocessableEntity ||
		!strings.Contains(body, "Upper bound: "+string(workshop.RuleLockedAfterAnswers)) ||
		!strings.Contains(body, "What share of pumps fail within a year?") {
		t.Errorf("a stale full form changing the bound: %d, want 422 naming the upper bound and its rule, the typed wording kept", r.StatusCode)
	}
	if got, _ := h.db.Question(context.Background(), q.ID); got.Upper != 0.5 || got.Wording != "What share of pumps fail in their first year?" {
		t.Fatalf("a correction after answers changed the question: %+v", got)
	}
	// The same stale form with the bound as it was saves the wording.
	stale.Set("upper", "0.5")
	if r, body := h.post(edit, stale); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("second text correction from a stale form: %d %s", r.StatusCode, body)
	}
	if got, _ := h.db.Question(context.Background(), q.ID); got.Upper != 0.5 || got.Wording != "What share of pumps fail within a year?" {
		t.Fatalf("after the second text correction: %+v", got)
	}
	// The record keeps every earlier text in its events.
	_, body := h.get(wp + "/export.json")
	var rec record.Record
	if err := json.Unmarshal([]byte(body), &rec); err != nil {
		t.Fatal(err)
	}
	var edits int
	for _, e := range rec.Events {
		if e.Kind == workshop.EventQuestionEdited {
			edits++
		}
	}
	if edits != 3 || !strings.Contains(body, "What shre of pumps fail?") || !strings.Contains(body, "pump failure share") {
		t.Errorf("the record has %d corrections and lacks the earlier texts", edits)
	}
}

// A retired question leaves the experts' pages, is refused to them, and
// is marked in the report; it can be brought back.
func TestRetireQuestion(t *testing.T) {
	h, ws, qs, _, links := seeded(t)
	q := qs[0]
	retire := questionPath(ws.ID, q.ID) + "/retire"
	if r, _ := h.post(retire, url.Values{"action": {"retire"}}); r.StatusCode != http.StatusUnprocessableEntity {
		t.Fatalf("retire without a reason: %d", r.StatusCode)
	}
	if r, _ := h.post(retire, url.Values{"action": {"retire"}, "retire_reason": {"Asked twice (invented)."}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("retire: %d", r.StatusCode)
	}
	if ev := lastEvent(t, h, ws.ID); ev.Kind != workshop.EventQuestionRetired || ev.Reason != "Asked twice (invented)." {
		t.Fatalf("retire event %+v", ev)
	}
	_, home := h.get(links[0].Path)
	if strings.Contains(home, q.Wording) {
		t.Error("a retired question is still on the expert's page")
	}
	qp := links[0].Path + "q/" + strconv.FormatInt(q.ID, 10)
	if r, body := h.get(qp); r.StatusCode != http.StatusGone || !strings.Contains(body, "withdrawn") {
		t.Errorf("a retired question's page: %d", r.StatusCode)
	}
	before, _ := h.db.Revisions(context.Background(), ws.ID)
	if r, _ := h.post(qp+"/save", url.Values{"values[0]": {"0.02"}, "values[1]": {"0.05"}, "values[2]": {"0.12"}}); r.StatusCode != http.StatusGone {
		t.Errorf("a save to a retired question: %d", r.StatusCode)
	}
	if after, _ := h.db.Revisions(context.Background(), ws.ID); len(after) != len(before) {
		t.Fatal("a save to a retired question was written")
	}
	if _, body := h.get(workshopPath(ws.ID) + "/report"); !strings.Contains(body, "Retired by the facilitator") {
		t.Error("the report does not mark the retired question")
	}
	if r, _ := h.post(retire, url.Values{"action": {"restore"}, "retire_reason": {"Needed after all (invented)."}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("restore: %d", r.StatusCode)
	}
	if _, home := h.get(links[0].Path); !strings.Contains(home, q.Wording) {
		t.Error("a restored question is not back on the expert's page")
	}
}

// A round closed by mistake is reopened with a reason; saves go on.
func TestReopenRound(t *testing.T) {
	h, ws, qs, _, links := seeded(t)
	wp := workshopPath(ws.ID)
	if r, _ := h.post(wp+"/round", url.Values{"action": {"close"}}); r.StatusCode != http.StatusSeeOther {
		t.Fatal("close")
	}
	if _, body := h.get(wp); !strings.Contains(body, "Reopen round 1") {
		t.Fatal("the overview of a closed round does not offer to reopen it")
	}
	r, body := h.post(wp+"/round", url.Values{"action": {"reopen"}})
	if r.StatusCode != http.StatusUnprocessableEntity {
		t.Fatalf("reopen without a reason: %d", r.StatusCode)
	}
	// The refusal's "Nothing was saved" stands in the reopening form, not
	// above the next round's reason, which was not what was sent.
	reopen, summary := strings.Index(body, "by mistake?"), strings.Index(body, "Nothing was saved")
	if summary < 0 || reopen < 0 || summary < reopen || strings.Count(body, "Nothing was saved") != 1 {
		t.Errorf("reopening without a reason: the refusal's summary is at %d, the reopening form at %d; want it once, in that form", summary, reopen)
	}
	if r, _ := h.post(wp+"/round", url.Values{"action": {"reopen"}, "reopen_reason": {"Closed by mistake (invented)."}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("reopen: %d", r.StatusCode)
	}
	if w, _ := h.db.Workshop(context.Background(), ws.ID); !w.Open || w.Round != 1 {
		t.Fatalf("after reopening: %+v", w)
	}
	if ev := lastEvent(t, h, ws.ID); ev.Kind != workshop.EventRoundReopened || ev.Reason != "Closed by mistake (invented)." {
		t.Fatalf("reopen event %+v", ev)
	}
	if r, _ := h.post(links[2].Path+"q/"+strconv.FormatInt(qs[0].ID, 10)+"/save", url.Values{
		"values[0]": {"0.02"}, "values[1]": {"0.05"}, "values[2]": {"0.12"}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("save after reopening: %d", r.StatusCode)
	}
	// An open round cannot be reopened: said where the page shows it,
	// with or without a reason (a stale tab sends none, and the open
	// round's page has no reason field to put "is required" beside).
	for _, form := range []url.Values{{"action": {"reopen"}, "reopen_reason": {"again"}}, {"action": {"reopen"}}} {
		r, body := h.post(wp+"/round", form)
		if r.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, "so there is no closed round to reopen") {
			t.Errorf("reopening an open round (%v): %d, reason not shown", form, r.StatusCode)
		}
	}
}

// A workshop with answers is archived, not deleted; an archived workshop
// refuses changes until brought back; one without answers is deleted
// after a confirmation, leaving a line in the list.
func TestArchiveAndDeleteWorkshop(t *testing.T) {
	h, ws, _, _, links := seeded(t)
	wp := workshopPath(ws.ID)
	if _, body := h.get(wp + "/delete"); !strings.Contains(body, "cannot be deleted") || strings.Contains(body, `name="confirm"`) {
		t.Error("the delete page of a workshop with answers offers to delete it")
	}
	if r, _ := h.post(wp+"/delete", url.Values{"reason": {"x"}, "confirm": {"on"}}); r.StatusCode != http.StatusUnprocessableEntity {
		t.Fatalf("deleting a workshop with answers: %d", r.StatusCode)
	}
	if r, _ := h.post(wp+"/archive", url.Values{"action": {"archive"}, "archive_reason": {"Workshop finished (invented)."}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("archive: %d", r.StatusCode)
	}
	w, _ := h.db.Workshop(context.Background(), ws.ID)
	if !w.Archived || w.Open {
		t.Fatalf("archived workshop: %+v", w)
	}
	if _, body := h.get("/"); !strings.Contains(body, "<h2>Archived</h2>") {
		t.Error("the workshop list has no archived section")
	}
	// Changes are refused, expert saves too.
	if r, body := h.post(wp+"/edit", url.Values{"title": {"Renamed"}}); r.StatusCode != http.StatusConflict || !strings.Contains(body, "archived") {
		t.Errorf("editing an archived workshop: %d", r.StatusCode)
	}
	if r, _ := h.post(links[0].Path+"q/1/save", url.Values{"values[0]": {"0.02"}, "values[1]": {"0.05"}, "values[2]": {"0.12"}}); r.StatusCode != http.StatusConflict {
		t.Errorf("an expert's save to an archived workshop: %d", r.StatusCode)
	}
	if r, _ := h.post(wp+"/archive", url.Values{"action": {"restore"}, "archive_reason": {"One more question (invented)."}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("bring back: %d", r.StatusCode)
	}
	if r, _ := h.post(wp+"/edit", url.Values{"title": {"Renamed (invented)"}}); r.StatusCode != http.StatusSeeOther {
		t.Errorf("editing a workshop brought back: %d", r.StatusCode)
	}

	// A workshop nobody answered is deleted after confirmation.
	empty := h.newWorkshop("Made by mistake (invented)")
	ep := workshopPath(empty.ID)
	_, tok := h.addExpert(empty, "Not Needed")
	if _, body := h.get(ep); !strings.Contains(body, "Delete this workshop") {
		t.Error("an unanswered workshop's overview does not offer deletion")
	}
	if r, _ := h.post(ep+"/delete", url.Values{"reason": {"Created twice."}}); r.StatusCode != http.StatusUnprocessableEntity {
		t.Fatalf("delete without the confirmation: %d", r.StatusCode)
	}
	if r, _ := h.post(ep+"/delete", url.Values{"reason": {"Created twice."}, "confirm": {"on"}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("delete: %d", r.StatusCode)
	}
	if r, _ := h.get(ep); r.StatusCode != http.StatusNotFound {
		t.Errorf("a deleted workshop's page: %d", r.StatusCode)
	}
	if r, _ := h.get(expertPath(tok)); r.StatusCode != http.StatusNotFound {
		t.Errorf("a deleted workshop's expert link: %d", r.StatusCode)
	}
	if _, body := h.get("/"); !strings.Contains(body, "Made by mistake (invented)") || !strings.Contains(body, "Created twice.") {
		t.Error("the workshop list does not say what was deleted and why")
	}
}

// Adding an expert whose name is already on the panel is held back with
// a warning until confirmed; the new link is shown after a redirect, so
// reloading it adds nobody, and it is gone after issuedFor.
func TestAddExpertDuplicateAndLinkPage(t *testing.T) {
	h := newHarness(t)
	h.signIn()
	ws := h.newWorkshop("Roster (invented)")
	h.addExpert(ws, "Ada Quell")
	count := func() int {
		es, _ := h.db.Experts(context.Background(), ws.ID)
		return len(es)
	}
	r, body := h.post(workshopPath(ws.ID)+"/experts", url.Values{"name": {"  ada   QUELL "}})
	if r.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, "is already on the panel") || !strings.Contains(body, `name="allow_duplicate"`) {
		t.Fatalf("duplicate name: %d", r.StatusCode)
	}
	if count() != 1 {
		t.Fatal("a duplicate was added without confirmation")
	}
	r, _ = h.post(workshopPath(ws.ID)+"/experts", url.Values{"name": {"Ada Quell"}, "allow_duplicate": {"on"}})
	if r.StatusCode != http.StatusSeeOther || count() != 2 {
		t.Fatalf("a confirmed duplicate: %d, %d experts", r.StatusCode, count())
	}
	page := r.Header.Get("Location")
	_, first := h.get(page)
	_, again := h.get(page)
	m1, m2 := linkPattern.FindString(first), linkPattern.FindString(again)
	if m1 == "" || m1 != m2 || count() != 2 {
		t.Fatalf("reloading the link page: links %q and %q, %d experts", m1, m2, count())
	}
	h.srv.now = func() time.Time { return time.Now().Add(issuedFor + time.Minute) }
	if _, late := h.get(page); strings.Contains(late, m1) || !strings.Contains(late, "can no longer be shown") {
		t.Error("the link is still shown after it expired")
	}
	// Another workshop's link page does not show it.
	h.srv.now = time.Now
	other := h.newWorkshop("Other (invented)")
	forged := strings.Replace(page, workshopPath(ws.ID), workshopPath(other.ID), 1)
	if _, body := h.get(forged); strings.Contains(body, m1) {
		t.Error("the link page shows a link under another workshop's address")
	}
}

// A round reopened after its panel was drawn: what the room view and the
// next round's feedback show is the round as it closed the second time,
// with the answers given while it was reopened. Before, the panel as the
// round first closed was remembered and shown for the rest of the
// workshop.
func TestReopenedRoundFeedsBackItsNewAnswers(t *testing.T) {
	h, ws, qs, _, links := seeded(t)
	wp := workshopPath(ws.ID)
	room := roomPath(ws.ID, qs[0].ID)
	round := func(form url.Values) {
		t.Helper()
		if r, body := h.post(wp+"/round", form); r.StatusCode != http.StatusSeeOther {
			t.Fatalf("%v: %d %s", form, r.StatusCode, body)
		}
	}
	round(url.Values{"action": {"close"}})
	// Three of the demo's four experts answered question 1 in round 1.
	if _, body := h.get(room); strings.Join(legendLabels(body), ",") != "Expert A,Expert B,Expert C" {
		t.Fatalf("room after the first close: %v", legendLabels(body))
	}
	round(url.Values{"action": {"reopen"}, "reopen_reason": {"Ole was still answering (invented)."}})
	for _, l := range links {
		if r, body := h.post(l.Path+"q/"+strconv.FormatInt(qs[0].ID, 10)+"/save", url.Values{
			"values[0]": {"0.02"}, "values[1]": {"0.05"}, "values[2]": {"0.12"}}); r.StatusCode != http.StatusSeeOther {
			t.Fatalf("save in the reopened round: %d %s", r.StatusCode, body)
		}
	}
	round(url.Values{"action": {"close"}})
	if _, body := h.get(room); strings.Join(legendLabels(body), ",") != "Expert A,Expert B,Expert C,Expert D" {
		t.Errorf("room after the round closed again: %v, want the four who answered", legendLabels(body))
	}
	round(url.Values{"action": {"open"}, "reason": {"Discussion done (invented)."}})
	_, body := h.get(links[0].Path + "q/" + strconv.FormatInt(qs[0].ID, 10))
	others := 0
	for _, l := range legendLabels(body) {
		if strings.HasPrefix(l, "Expert ") {
			others++
		}
	}
	if others != 3 {
		t.Errorf("an expert's round-2 feedback: %v, want the three others", legendLabels(body))
	}
}

// A hidden true value corrected with its question (before any answer)
// stays out of the record: the decision log says that it changed, and
// neither value reaches the log, the report or the export until the
// reveal, as for a true value entered on its own. The correction's event
// carried both values, and with it the log, the report and the export.
func TestCorrectedHiddenTrueValueStaysHidden(t *testing.T) {
	h := newHarness(t)
	h.signIn()
	ws := h.newWorkshop("Hidden correction (invented)")
	wp := workshopPath(ws.ID)
	form := url.Values{"wording": {"What share of the (invented) 2024 batch failed?"}, "quantity": {"failure share"},
		"lower": {"0"}, "upper": {"1"}, "format": {"quantiles"}, "preset": {"p05_50_95"},
		"calibration": {"on"}, "true_value": {"0.4321"}}
	if r, body := h.post(wp+"/questions", form); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("add question: %d %s", r.StatusCode, body)
	}
	qs, _ := h.db.Questions(context.Background(), ws.ID)
	form.Set("true_value", "0.5678")
	form.Set("wording", "What share of the (invented) 2024 batch failed in year one?")
	form.Set("reason", "The audit's figure was mistyped (invented).")
	if r, body := h.post(questionPath(ws.ID, qs[0].ID)+"/edit", form); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("correction: %d %s", r.StatusCode, body)
	}
	if got, _ := h.db.Question(context.Background(), qs[0].ID); got.TrueValue == nil || *got.TrueValue != 0.5678 {
		t.Fatalf("the corrected true value was not stored: %v", got.TrueValue)
	}
	ev := lastEvent(t, h, ws.ID)
	if ev.Kind != workshop.EventQuestionEdited || !strings.Contains(ev.Detail, `"fields":["wording","true_value"]`) || ev.Reason == "" {
		t.Errorf("correction event %+v", ev)
	}
	for _, page := range []string{"/log", "/report", "/export.json", "/export.csv"} {
		_, body := h.get(wp + page)
		// As a proportion or a percentage; bare digits also match the
		// random digits of a timestamp, a key or a hash (one run in a
		// few failed on the export's).
		if hasAny(body, "0.4321", "43.21", "0.5678", "56.78") {
			t.Errorf("%s shows the hidden true value", page)
		}
	}
	if _, body := h.get(wp + "/log"); !strings.Contains(body, "true value changed, and kept hidden until it is revealed") ||
		!strings.Contains(body, "in year one") {
		t.Error("the decision log does not say the hidden true value changed, beside the wording's change")
	}
}

// hasAny reports whether s contains any of subs.
func hasAny(s string, subs ...string) bool {
	for _, sub := range subs {
		if strings.Contains(s, sub) {
			return true
		}
	}
	return false
}

// The correction form gives a question's bounds back with every figure
// they have: at four figures an upper bound of 12345 hours came back as
// 12340, and a correction of the wording alone, sent as the form showed
// it, moved the bound with it. They read as the pages write numbers, in
// plain decimals: %g wrote a lower bound of 0.0000001 as "1e-07" and an
// upper bound of 123456789 as "1.23456789e+08".
func TestCorrectionFormKeepsTheBoundsExact(t *testing.T) {
	h := newHarness(t)
	h.signIn()
	ws := h.newWorkshop("Exact bounds (invented)")
	wp := workshopPath(ws.ID)
	if r, body := h.post(wp+"/questions", url.Values{"wording": {"How many hours does a pump run before its first fault?"}, "quantity": {"hours to first fault"},
		"units": {"hours"}, "lower": {"0.0000001"}, "upper": {"123456789"}, "format": {"quantiles"}, "preset": {"p05_50_95"}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("add question: %d %s", r.StatusCode, body)
	}
	qs, _ := h.db.Questions(context.Background(), ws.ID)
	edit := questionPath(ws.ID, qs[0].ID) + "/edit"
	_, page := h.get(edit)
	shown := url.Values{}
	for _, name := range []string{"wording", "quantity", "units", "lower", "upper", "format", "preset", "custom_probs", "bin_edges", "chips", "true_value"} {
		m := regexp.MustCompile(`name="` + name + `" value="([^"]*)"`).FindStringSubmatch(page)
		if m == nil {
			continue
		}
		shown.Set(name, html.UnescapeString(m[1]))
	}
	if shown.Get("upper") != "123456789" || shown.Get("lower") != "0.0000001" {
		t.Errorf("the correction form shows the bounds as %q and %q, want 0.0000001 and 123456789", shown.Get("lower"), shown.Get("upper"))
	}
	shown.Set("format", "quantiles")
	shown.Set("preset", "p05_50_95")
	shown.Set("wording", "How many hours does a pump run before its first fault of any kind?")
	shown.Set("reason", "Wording only (invented).")
	if r, body := h.post(edit, shown); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("wording correction: %d %s", r.StatusCode, body)
	}
	got, _ := h.db.Question(context.Background(), qs[0].ID)
	if got.Upper != 123456789 || got.Lower != 0.0000001 || !strings.Contains(got.Wording, "of any kind") {
		t.Errorf("after correcting the wording alone the question is %+v; want its bounds 0.0000001 and 123456789 kept", got)
	}
}

// An archived workshop's overview offers no form that the archive would
// refuse: it offered to edit the details, open another round or reopen
// the last, add an expert, and revoke or reissue each expert's link, and
// each of them answered "This workshop is archived". Bringing it back is
// what it offers, and the rounds card says so.
func TestArchivedOverviewOffersOnlyBringingItBack(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	wp := workshopPath(ws.ID)
	if r, _ := h.post(wp+"/archive", url.Values{"action": {"archive"}, "archive_reason": {"Finished (invented)."}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("archive: %d", r.StatusCode)
	}
	_, body := h.get(wp)
	for _, refused := range []string{
		`action="` + wp + `/edit"`, `action="` + wp + `/round"`, `action="` + wp + `/experts"`,
		`action="` + expertActionPath(ws.ID, es[0].ID, "revoke") + `"`, `action="` + expertActionPath(ws.ID, es[0].ID, "reissue") + `"`,
	} {
		if strings.Contains(body, refused) {
			t.Errorf("the archived workshop's overview offers a form the archive refuses: %s", refused)
		}
	}
	if !strings.Contains(body, `action="`+wp+`/archive"`) || !strings.Contains(body, "bring the workshop back first") {
		t.Error("the archived workshop's overview does not offer to bring it back")
	}
	// Nor do its question panels (weights, the agreed prior) and its
	// calibration page (true values, scales, weights).
	for _, page := range []string{questionPath(ws.ID, qs[0].ID), calibrationPath(ws.ID)} {
		_, body := h.get(page)
		if m := regexp.MustCompile(`<form method="post" action="`+regexp.QuoteMeta(wp)+`/[^"]*"`).FindAllString(body, -1); len(m) > 0 {
			t.Errorf("the archived workshop's %s offers forms the archive refuses: %q", page, m)
		}
	}
	// What the hidden forms said is still read: the calibration page says
	// each calibration question's scale, which only the scale form's
	// heading had said.
	_, body = h.get(calibrationPath(ws.ID))
	seeds := 0
	for _, q := range qs {
		if q.Calibration {
			seeds++
		}
	}
	if n := strings.Count(body, "Information scored on the"); seeds == 0 || n != seeds {
		t.Errorf("the archived calibration page says the scale of %d of its %d calibration questions", n, seeds)
	}
	if r, _ := h.post(wp+"/archive", url.Values{"action": {"restore"}, "archive_reason": {"One more round (invented)."}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("restore: %d", r.StatusCode)
	}
	if _, body := h.get(wp); !strings.Contains(body, `action="`+wp+`/round"`) || !strings.Contains(body, `action="`+wp+`/experts"`) {
		t.Error("brought back, the overview does not offer its forms again")
	}
}

// A correction saved, and a question brought back, are said on the panel
// the form leads to: it showed the new wording without a word that it
// had been saved, and a question brought back only lost its banner.
func TestPanelSaysACorrectionWasSaved(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	q := qs[0]
	vals := url.Values{"wording": {q.Wording + " (Corrected, invented.)"}, "quantity": {q.Quantity}, "units": {q.Units}, "reason": {"Clearer wording (invented)."}}
	r, _ := h.post(questionPath(ws.ID, q.ID)+"/edit", vals)
	if r.StatusCode != http.StatusSeeOther {
		t.Fatalf("correction: %d", r.StatusCode)
	}
	if _, page := h.get(r.Header.Get("Location")); !strings.Contains(page, "Correction saved.") {
		t.Error("the panel after a correction does not say it was saved")
	}
	if _, page := h.get(questionPath(ws.ID, q.ID)); strings.Contains(page, "Correction saved.") {
		t.Error("the panel says a correction was saved when opened on its own")
	}
	retire := questionPath(ws.ID, q.ID) + "/retire"
	if r, _ := h.post(retire, url.Values{"action": {"retire"}, "retire_reason": {"Duplicate (invented)."}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("retire: %d", r.StatusCode)
	}
	r, _ = h.post(retire, url.Values{"action": {"restore"}, "retire_reason": {"Kept after all (invented)."}})
	if r.StatusCode != http.StatusSeeOther {
		t.Fatalf("restore: %d", r.StatusCode)
	}
	if _, page := h.get(r.Header.Get("Location")); !strings.Contains(page, "The question is back: experts see it again") {
		t.Error("the panel after bringing the question back does not say so")
	}
}

// TestPriorFixesTheQuestionsScale: a question nobody answered, but with a
// prior agreed for it (and study data, which need one), keeps its bounds,
// format and probabilities as answers would fix them. A bound
// corrected under a quick prior left the prior on [0, 1] beside a
// question on [0, 200], and probabilities corrected under a consensus
// prior reread the room's judgement at other probabilities; either way
// the workshop's exported record no longer read back (found in review).
// Now the correction is refused naming the field and the rule, nothing is
// saved, the form says why before it is sent, and the wording can still
// be corrected.
func TestPriorFixesTheQuestionsScale(t *testing.T) {
	h, ws, _, _, _ := seeded(t)
	ctx := context.Background()
	add := func(wording string) workshop.Question {
		q := workshop.Question{WorkshopID: ws.ID, Wording: wording, Quantity: "pump failure share (invented)",
			Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: workshop.ProbsDefault}
		if err := h.db.AddQuestion(ctx, &q); err != nil {
			t.Fatal(err)
		}
		return q
	}
	correct := func(q workshop.Question, change func(url.Values)) (*http.Response, string) {
		form := url.Values(questionValues(q))
		change(form)
		form.Set("reason", "Invented correction.")
		return h.post(questionPath(ws.ID, q.ID)+"/edit", form)
	}
	readsBack := func(when string) {
		t.Helper()
		_, js := h.get(workshopPath(ws.ID) + "/export.json")
		if _, err := record.Parse(strings.NewReader(js)); err != nil {
			t.Errorf("%s: the exported record does not read back: %v", when, err)
		}
	}

	// A quick prior, then study data.
	quick := add("(Invented.) What share of pumps fail in year one?")
	if r, body := h.post(workshopPath(ws.ID)+"/quick-priors/agree", url.Values{
		"question": {strconv.FormatInt(quick.ID, 10)}, "construction": {"mean_sd"}, "c_mean": {"0.2"}, "c_sd": {"0.1"},
		"confirm_open": {"on"}, "rationale": {"Invented rationale."}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("quick prior: %d %s", r.StatusCode, body)
	}
	_, page := h.get(questionPath(ws.ID, quick.ID) + "/edit")
	if !strings.Contains(page, "A prior has been agreed for this question, so its bounds, format, probabilities") || strings.Contains(page, `name="upper"`) {
		t.Error("the correction form under a prior offers the bounds, or does not say why it does not")
	}
	// The panel's link to the form says so too (it said only "Before
	// anyone answers, every part can be corrected").
	if _, panel := h.get(questionPath(ws.ID, quick.ID)); !strings.Contains(panel, "Until someone answers or a prior is agreed, every part can be corrected") {
		t.Error("the question's panel does not say that an agreed prior, as well as answers, limits what a correction may change")
	}
	before := h.counts(ws.ID)
	if r, body := correct(quick, func(f url.Values) { f.Set("upper", "200") }); r.StatusCode != http.StatusUnprocessableEntity ||
		!strings.Contains(body, "Upper bound: "+string(workshop.RuleLockedAfterPrior)) || h.counts(ws.ID) != before {
		t.Errorf("bound corrected under a prior: %d, want 422 naming the upper bound and %q, nothing saved", r.StatusCode, workshop.RuleLockedAfterPrior)
	}
	if r, body := h.post(questionPath(ws.ID, quick.ID)+"/study/data", url.Values{
		"successes": {"2"}, "trials": {"30"}, "source": {"Invented batch"}, "observed_on": {"2026-01-31"}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("study data: %d %s", r.StatusCode, body)
	}
	if r, _ := correct(quick, func(f url.Values) { f.Set("lower", "0.01") }); r.StatusCode != http.StatusUnprocessableEntity {
		t.Errorf("bound corrected under a prior and data: %d, want 422", r.StatusCode)
	}
	if r, body := correct(quick, func(f url.Values) { f.Set("wording", "(Invented.) What share of pumps fail in their first year?") }); r.StatusCode != http.StatusSeeOther {
		t.Errorf("wording corrected under a prior: %d %s", r.StatusCode, body)
	}
	if got, _ := h.db.Question(ctx, quick.ID); got.Upper != 1 || got.Lower != 0 {
		t.Errorf("the question's bounds moved under its prior: [%v, %v]", got.Lower, got.Upper)
	}
	readsBack("after corrections under a quick prior")

	// A consensus judgement agreed as a prior: its probabilities stay.
	cons := add("(Invented.) What share of seals leak in year one?")
	if r, body := h.post(questionPath(ws.ID, cons.ID)+"/agree", url.Values{"source": {"consensus"},
		"values[0]": {"0.05"}, "values[1]": {"0.15"}, "values[2]": {"0.4"},
		"confirm_open": {"on"}, "rationale": {"Agreed in the room (invented)."}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("consensus prior: %d %s", r.StatusCode, body)
	}
	if r, body := correct(cons, func(f url.Values) { f.Set("preset", "custom"); f.Set("custom_probs", "0.1, 0.5, 0.9") }); r.StatusCode != http.StatusUnprocessableEntity ||
		!strings.Contains(body, string(workshop.RuleLockedAfterPrior)) {
		t.Errorf("probabilities corrected under a consensus prior: %d, want 422 with %q", r.StatusCode, workshop.RuleLockedAfterPrior)
	}
	readsBack("after a correction refused under a consensus prior")
}

// A name that reads as an answer sheet's id:N is refused by the roster,
// naming the field, and nobody is added: a sheet's id:5 would name both
// expert 5 and the expert so named (answersheet.NamedLikeAnID). The
// roster took it, and a sheet's row for id:5 went to expert 5 unseen.
func TestRosterRefusesANameThatReadsAsAnID(t *testing.T) {
	h := newHarness(t)
	h.signIn()
	ws := h.newWorkshop("Roster (invented)")
	h.addExpert(ws, "Ada Quell")
	for _, name := range []string{"id:5", " ID:1 ", "id:12"} {
		r, body := h.post(workshopPath(ws.ID)+"/experts", url.Values{"name": {name}, "allow_duplicate": {"on"}})
		if r.StatusCode != http.StatusUnprocessableEntity || !hasFieldError(body, "name") || !strings.Contains(body, "reads as an answer sheet") {
			t.Errorf("name %q: %d, refused beside the name %v", name, r.StatusCode, hasFieldError(body, "name"))
		}
	}
	if es, _ := h.db.Experts(context.Background(), ws.ID); len(es) != 1 {
		t.Fatalf("%d experts on the panel, want 1", len(es))
	}
	if r, _ := h.post(workshopPath(ws.ID)+"/experts", url.Values{"name": {"Idris Okafor (invented)"}}); r.StatusCode != http.StatusSeeOther {
		t.Errorf("a name beginning Id: %d", r.StatusCode)
	}
}

package web

import (
	"context"
	"net/http"
	"net/url"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// A retired question takes no agreed prior, as the quick priors page
// already held: its page offers no agree form, and a form sent from a
// page drawn before it was retired is refused beside the choice of
// source, with nothing recorded. The panel's form recorded one.
func TestRetiredQuestionTakesNoPrior(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	qp := questionPath(ws.ID, qs[0].ID)
	if res, body := h.post(qp+"/retire", url.Values{"action": {"retire"}, "retire_reason": {"Asked twice (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("retire: %d %s", res.StatusCode, body)
	}
	_, body := h.get(qp)
	if strings.Contains(body, `id="agree-form"`) || !strings.Contains(body, "This question is retired, so no prior can be recorded for it.") {
		t.Error("a retired question's page offers the agree form, or does not say why it does not")
	}
	before, err := h.db.AgreedPriors(context.Background(), ws.ID)
	if err != nil {
		t.Fatal(err)
	}
	res, body := h.post(qp+"/agree", url.Values{"source": {"pool"}, "confirm_open": {"on"}, "rationale": {"From a stale tab (invented)."}})
	if res.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, "a retired question takes no agreed prior: bring it back first") {
		t.Errorf("agreeing a retired question's prior: %d, want 422 saying why", res.StatusCode)
	}
	after, err := h.db.AgreedPriors(context.Background(), ws.ID)
	if err != nil {
		t.Fatal(err)
	}
	if len(after) != len(before) {
		t.Errorf("%d agreed priors after the refusal, want %d", len(after), len(before))
	}
	// Brought back, it takes one again.
	if res, body := h.post(qp+"/retire", url.Values{"action": {"restore"}, "retire_reason": {"Needed after all (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("restore: %d %s", res.StatusCode, body)
	}
	if res, body := h.post(qp+"/agree", url.Values{"source": {"pool"}, "confirm_open": {"on"}, "rationale": {"Back (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Errorf("agreeing after bringing it back: %d %s", res.StatusCode, body)
	}
}

// A retired question's prior from the pool stays agreed: its page says
// no prior can be recorded (it said "no prior is agreed for it" under
// the prior shown), and where the pool has changed since, the advice is
// to bring the question back first, on the panel and in the report (it
// said to record the prior again on the question's page, which refuses
// it).
func TestRetiredQuestionsPriorStaysAndItsAdviceHolds(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	qp := agreePoolThenReweigh(t, h, ws.ID, qs[0].ID, es)
	if res, body := h.post(qp+"/retire", url.Values{"action": {"retire"}, "retire_reason": {"Out of scope (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("retire: %d %s", res.StatusCode, body)
	}
	_, panel := h.get(qp)
	_, report := h.get(workshopPath(ws.ID) + "/report")
	for name, body := range map[string]string{"panel": panel, "report": report} {
		body = strings.ReplaceAll(body, "&#39;", "'")
		if !strings.Contains(body, "The pool has changed since this prior was agreed (other weights are in force)") {
			t.Errorf("%s: no word that the pool changed", name)
		}
		if strings.Contains(body, "record it again on the question's page") || !strings.Contains(body, "bring the question back and record it again") {
			t.Errorf("%s: the advice for a retired question's prior is not to bring it back first", name)
		}
	}
	if strings.Contains(panel, "no prior is agreed for it") {
		t.Error("the panel says no prior is agreed for a retired question whose prior it shows")
	}
}

// The pool-changed note's advice fits where it is read: on the
// question's page the form to record the prior is just below it; the
// study page and the report send the facilitator to the question's page;
// an archived workshop takes no prior until it is brought back. The
// question's page had said "record it again on the question's page" of
// itself, and an archived workshop's pages offered a recording no page
// could take.
func TestPoolChangedAdviceFitsWhereItIsRead(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	qp := agreePoolThenReweigh(t, h, ws.ID, qs[0].ID, es)
	advice := func(page string) string {
		_, body := h.get(page)
		body = strings.ReplaceAll(body, "&#39;", "'")
		const lead = "not of the pool as it stands now; "
		i := strings.Index(body, lead)
		if i < 0 {
			t.Fatalf("%s: no pool-changed note", page)
		}
		rest := body[i+len(lead):]
		return rest[:strings.Index(rest, " if the panel agrees")]
	}
	for page, want := range map[string]string{
		qp:                              "record it again below",
		studyPath(ws.ID, qs[0].ID):      "record it again on the question's page",
		workshopPath(ws.ID) + "/report": "record it again on the question's page",
	} {
		if got := advice(page); got != want {
			t.Errorf("%s advises %q, want %q", page, got, want)
		}
	}
	if r, _ := h.post(workshopPath(ws.ID)+"/archive", url.Values{"action": {"archive"}, "archive_reason": {"Finished (invented)."}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("archive: %d", r.StatusCode)
	}
	for _, page := range []string{qp, studyPath(ws.ID, qs[0].ID), workshopPath(ws.ID) + "/report"} {
		if got, want := advice(page), "bring the workshop back and record it again on the question's page"; got != want {
			t.Errorf("archived, %s advises %q, want %q", page, got, want)
		}
	}
}

// A retired question of an archived workshop needs both brought back,
// the workshop first (it changes nothing while archived).
func TestPoolChangedAdviceOnARetiredQuestionOfAnArchivedWorkshop(t *testing.T) {
	if got, want := (againAt{OnQuestionPage: true, Retired: true, Archived: true}).words(), "bring the workshop back, then the question, and record it again"; got != want {
		t.Errorf("got %q, want %q", got, want)
	}
}

// agreePoolThenReweigh agrees the demo's question qID's pool as its
// prior, then sets custom weights (2, 1, 1, 1), so the pool has moved
// under the prior; it returns the question's path.
func agreePoolThenReweigh(t *testing.T, h *harness, wsID, qID int64, es []workshop.Expert) string {
	t.Helper()
	qp := questionPath(wsID, qID)
	if res, body := h.post(qp+"/agree", url.Values{"source": {"pool"}, "confirm_open": {"on"}, "rationale": {"The pool (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("agree the pool: %d %s", res.StatusCode, body)
	}
	wf := url.Values{"scheme": {"custom"}, "reason": {"Invented."}}
	for i, e := range es {
		wf.Set(weightField(e.ID), []string{"2", "1", "1", "1"}[i])
	}
	if res, body := h.post(qp+"/weights", wf); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("set weights: %d %s", res.StatusCode, body)
	}
	return qp
}

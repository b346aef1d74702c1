package web

import (
	"context"
	"crypto/sha256"
	"net/http"
	"net/http/httptest"
	"net/url"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit/workshop"
)

var (
	postForm = regexp.MustCompile(`(?s)<form[^>]*method="post"[^>]*>.*?</form>`)
	formKey  = regexp.MustCompile(`name="once" value="([0-9a-f]{32})"`)
)

// keyOf returns the key of the first posted form in body whose opening
// tag contains action.
func keyOf(t *testing.T, body, action string) string {
	t.Helper()
	for _, f := range postForm.FindAllString(body, -1) {
		if strings.Contains(f[:strings.Index(f, ">")], `action="`+action+`"`) {
			if m := formKey.FindStringSubmatch(f); m != nil {
				return m[1]
			}
			t.Fatalf("the form to %s carries no key:\n%s", action, f)
		}
	}
	t.Fatalf("no form to %s on the page", action)
	return ""
}

func studyBatches(t *testing.T, h *harness, ws int64) int {
	t.Helper()
	d, err := h.db.StudyData(context.Background(), ws)
	if err != nil {
		t.Fatal(err)
	}
	return len(d)
}

// A batch of study data sent twice (a double click on a slow page, a
// browser's retry) is recorded once: both copies are sent to the study
// page, and the posterior counts the data once. Eight copies at once are
// one batch too. The same form corrected and sent again, or a post
// without the form's key (a script), is recorded as before.
func TestStudyDataSentTwiceIsRecordedOnce(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	sp := studyPath(ws.ID, qs[0].ID)
	_, page := h.get(sp)
	key := keyOf(t, page, sp+"/data")
	form := url.Values{"successes": {"3"}, "trials": {"40"}, "source": {"Site log (invented)"},
		"observed_on": {"2026-03-31"}, onceName: {key}}
	before := studyBatches(t, h, ws.ID)
	var where []string
	for range 2 {
		res, body := h.post(sp+"/data", form)
		if res.StatusCode != http.StatusSeeOther {
			t.Fatalf("record data: %d %s", res.StatusCode, body)
		}
		where = append(where, res.Header.Get("Location"))
	}
	if n := studyBatches(t, h, ws.ID) - before; n != 1 || where[0] != where[1] || where[0] != sp+"#update" {
		t.Fatalf("one form sent twice: %d batches recorded, sent to %q", n, where)
	}
	if _, page := h.get(sp); !strings.Contains(page, "3 successes in 40 trials") || strings.Contains(page, "in 80 trials") {
		t.Error("the study page does not show the one batch of 3 in 40")
	}

	// Eight copies of a new rendering at once.
	_, page = h.get(sp)
	form.Set(onceName, keyOf(t, page, sp+"/data"))
	form.Set("successes", "4")
	var wg sync.WaitGroup
	codes := make([]int, 8)
	for i := range codes {
		wg.Go(func() {
			res, _ := h.post(sp+"/data", form)
			codes[i] = res.StatusCode
		})
	}
	wg.Wait()
	for i, c := range codes {
		if c != http.StatusSeeOther {
			t.Errorf("copy %d: %d", i, c)
		}
	}
	if n := studyBatches(t, h, ws.ID) - before; n != 2 {
		t.Fatalf("eight copies at once: %d batches in all, want 2", n)
	}

	// The same rendering, corrected (other values), is a new post.
	form.Set("successes", "5")
	if res, _ := h.post(sp+"/data", form); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("corrected form: %d", res.StatusCode)
	}
	// A post without the key runs each time.
	form.Del(onceName)
	for range 2 {
		if res, _ := h.post(sp+"/data", form); res.StatusCode != http.StatusSeeOther {
			t.Fatalf("post without a key: %d", res.StatusCode)
		}
	}
	if n := studyBatches(t, h, ws.ID) - before; n != 5 {
		t.Fatalf("%d batches in all, want 5", n)
	}
}

// Values sent again after others are saved again: a facilitator who
// records A, then B, then goes back to the page that held A and sends it
// is recording A anew, not retrying the first post. The first post used
// to be remembered for ten minutes, so the third was sent to the study
// page without running, and the page said nothing of it not being saved.
func TestAFormSentAgainAfterAnotherRuns(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	sp := studyPath(ws.ID, qs[0].ID)
	_, page := h.get(sp)
	key := keyOf(t, page, sp+"/data")
	a := url.Values{"successes": {"3"}, "trials": {"40"}, "source": {"Site log (invented)"},
		"observed_on": {"2026-03-31"}, onceName: {key}}
	b := url.Values{"successes": {"5"}, "trials": {"40"}, "source": {"Site log (invented)"},
		"observed_on": {"2026-03-31"}, onceName: {key}}
	before := studyBatches(t, h, ws.ID)
	for _, form := range []url.Values{a, a, b, b, a, a} {
		if res, body := h.post(sp+"/data", form); res.StatusCode != http.StatusSeeOther {
			t.Fatalf("record data: %d %s", res.StatusCode, body)
		}
	}
	if n := studyBatches(t, h, ws.ID) - before; n != 3 {
		t.Fatalf("A twice, B twice, A twice: %d batches recorded, want 3 (each pair once)", n)
	}
}

// A refused post is not remembered: the same form sent again is checked
// again, and once corrected it is saved.
func TestRefusedPostRunsAgain(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	qp := questionPath(ws.ID, qs[0].ID)
	_, page := h.get(qp)
	key := keyOf(t, page, qp+"/agree")
	priors := func() int {
		ps, err := h.db.AgreedPriors(context.Background(), ws.ID)
		if err != nil {
			t.Fatal(err)
		}
		return len(ps)
	}
	before := priors()
	form := url.Values{"source": {"pool"}, onceName: {key}}
	for range 2 {
		if res, _ := h.post(qp+"/agree", form); res.StatusCode != http.StatusUnprocessableEntity {
			t.Fatalf("a prior without its rationale: %d", res.StatusCode)
		}
	}
	form.Set("rationale", "The pool, as discussed (invented).")
	form.Set("confirm_open", "on")
	for range 3 {
		if res, body := h.post(qp+"/agree", form); res.StatusCode != http.StatusSeeOther {
			t.Fatalf("agree: %d %s", res.StatusCode, body)
		}
	}
	if n := priors() - before; n != 1 {
		t.Fatalf("one agreement sent three times: %d priors recorded", n)
	}
	evs, err := h.db.Events(context.Background(), ws.ID)
	if err != nil {
		t.Fatal(err)
	}
	agreed := 0
	for _, ev := range evs {
		if ev.Kind == workshop.EventPriorAgreed && ev.Reason == "The pool, as discussed (invented)." {
			agreed++
		}
	}
	if agreed != 1 {
		t.Errorf("the decision log has the agreement %d times", agreed)
	}
}

// An expert's save sent twice is one revision.
func TestExpertSaveSentTwiceIsOneRevision(t *testing.T) {
	h, ws, qs, _, links := seeded(t)
	ex := newHarnessOn(t, h)
	qp := strings.TrimSuffix(links[0].Path, "/") + "/q/" + strconv.FormatInt(qs[0].ID, 10)
	_, page := ex.get(qp)
	key := keyOf(t, page, qp+"/preview")
	revs := func() int {
		rs, err := h.db.Revisions(context.Background(), ws.ID)
		if err != nil {
			t.Fatal(err)
		}
		return len(rs)
	}
	before := revs()
	form := url.Values{"values[0]": {"0.02"}, "values[1]": {"0.05"}, "values[2]": {"0.12"},
		"reason": {"Field returns of a similar model (invented)."}, onceName: {key}}
	for range 2 {
		if res, body := ex.post(qp+"/save", form); res.StatusCode != http.StatusSeeOther {
			t.Fatalf("save: %d %s", res.StatusCode, body)
		}
	}
	if n := revs() - before; n != 1 {
		t.Fatalf("one save sent twice: %d revisions", n)
	}
}

// Every form that changes something carries its key, new at each
// rendering; the forms that do not (signing in and out, an answer sheet's
// upload, which saves nothing, and its confirmation, which has a key of
// its own) are the only ones without.
func TestEveryFormThatChangesSomethingHasAKey(t *testing.T) {
	h, ws, qs, es, links := seeded(t)
	ex := newHarnessOn(t, h)
	var calibration workshop.Question
	for _, q := range qs {
		if q.Calibration {
			calibration = q
		}
	}
	if calibration.ID == 0 {
		t.Fatal("the demo has no calibration question")
	}
	pages := []string{"/", workshopPath(ws.ID), workshopPath(ws.ID) + "/questions/new", workshopPath(ws.ID) + "/delete",
		questionPath(ws.ID, qs[0].ID), questionPath(ws.ID, qs[0].ID) + "/edit", questionPath(ws.ID, qs[0].ID) + "/reasons",
		studyPath(ws.ID, qs[0].ID), quickPriorsPath(ws.ID), calibrationPath(ws.ID), entryPath(ws.ID, qs[0].ID, es[0].ID),
		workshopPath(ws.ID) + "/answers/import"}
	answers, err := h.db.LatestRevisions(context.Background(), qs[0].ID, 1)
	if err != nil || len(answers) == 0 {
		t.Fatalf("the demo's answers to Q1: %v", err)
	}
	pages = append(pages, withdrawPath(ws.ID, qs[0].ID, answers[0].ID))
	exempt := regexp.MustCompile(`action="(/signin|/signout|/w/[0-9]+/answers/import(/confirm)?)"`)
	seen := map[string]bool{}
	forms := 0
	check := func(path, body string) {
		for _, f := range postForm.FindAllString(body, -1) {
			open := f[:strings.Index(f, ">")]
			m := formKey.FindStringSubmatch(f)
			switch {
			case exempt.MatchString(open):
			case m == nil:
				t.Errorf("%s: a form without its key: %s", path, open)
			case seen[m[1]]:
				t.Errorf("%s: a key used twice: %s", path, m[1])
			default:
				seen[m[1]] = true
				forms++
			}
		}
	}
	for _, p := range pages {
		res, body := h.get(p)
		if res.StatusCode != http.StatusOK {
			t.Fatalf("%s: %d", p, res.StatusCode)
		}
		check(p, body)
	}
	_, body := h.post(expertActionPath(ws.ID, es[0].ID, "revoke"), url.Values{})
	check("revoke confirmation", body)
	if _, body := h.get(workshopPath(ws.ID)); !strings.Contains(body, `action="`+workshopPath(ws.ID)+`/round"`) {
		t.Error("the overview has no round form")
	}
	eq := strings.TrimSuffix(links[0].Path, "/") + "/q/" + strconv.FormatInt(qs[0].ID, 10)
	_, body = ex.get(eq)
	check(eq, body)
	_, body = ex.get(strings.TrimSuffix(links[0].Path, "/") + "/q/" + strconv.FormatInt(calibration.ID, 10))
	check("calibration question", body)
	if forms < 15 {
		t.Errorf("only %d keyed forms seen", forms)
	}
}

// A prior from the pool is the pool the facilitator saw. The panel sends
// back, with the agree form, which pool it showed; when an answer arrives
// between the page and the click, the agreement is refused with the
// rationale kept and the panel shows the new pool, whose own form then
// records it. A post without the field (a script) records the pool as
// it stands.
func TestAgreedPoolIsThePoolShown(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	ctx := context.Background()
	qp := questionPath(ws.ID, qs[0].ID)
	seenField := regexp.MustCompile(`<input type="hidden" form="agree-form" name="pool_seen" value="([^"]+)"`)
	_, page := h.get(qp)
	m := seenField.FindStringSubmatch(page)
	if m == nil {
		t.Fatal("the panel does not say which pool it shows")
	}
	if !strings.Contains(page, `id="agree-form"`) {
		t.Fatal("the agree form has no id for the pool's field to name")
	}
	priors := func() []workshop.AgreedPrior {
		ps, err := h.db.AgreedPriors(ctx, ws.ID)
		if err != nil {
			t.Fatal(err)
		}
		return ps
	}
	before := len(priors())
	// An expert's answer arrives after the page was drawn.
	rv := workshop.Revision{QuestionID: qs[0].ID, ExpertID: es[0].ID, Answer: workshop.Answer{Values: []float64{0.01, 0.03, 0.09}}}
	if err := h.db.SaveRevision(ctx, &rv); err != nil {
		t.Fatal(err)
	}
	form := url.Values{"source": {"pool"}, "rationale": {"The pool as discussed (invented)."}, "confirm_open": {"on"}, "pool_seen": {m[1]}}
	res, body := h.post(qp+"/agree", form)
	if res.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, "The pool changed after this page showed it") ||
		!strings.Contains(body, "The pool as discussed (invented).") {
		t.Fatalf("agreeing a pool that changed since the page: %d", res.StatusCode)
	}
	if n := len(priors()); n != before {
		t.Fatalf("a refused agreement recorded %d priors", n-before)
	}
	now := seenField.FindStringSubmatch(body)
	if now == nil || now[1] == m[1] || !strings.Contains(now[1], strconv.FormatInt(rv.ID, 10)) {
		t.Fatalf("the panel shown again says it shows %v (was %q, the new revision is %d)", now, m[1], rv.ID)
	}
	form.Set("pool_seen", now[1])
	if res, body := h.post(qp+"/agree", form); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("agreeing the pool shown: %d %s", res.StatusCode, body)
	}
	ps := priors()
	if len(ps) != before+1 || !slices.Contains(ps[len(ps)-1].Pooled, rv.ID) {
		t.Fatalf("the prior recorded does not pool the new answer: %+v", ps[len(ps)-1])
	}
	form.Del("pool_seen")
	if res, _ := h.post(qp+"/agree", form); res.StatusCode != http.StatusSeeOther || len(priors()) != before+2 {
		t.Fatalf("a post without the pool shown: %d", res.StatusCode)
	}
}

// When onceMax posts are held, the post done longest ago makes room for
// a new one, so the newest posts keep their guard: before, a full memory
// took no new post for up to onceLife, and every form sent twice in
// that while was saved twice. A post still running is never dropped.
func TestSentOnceMakesRoomForANewPost(t *testing.T) {
	o := newSentOnce()
	now := time.Date(2026, 3, 3, 10, 0, 0, 0, time.UTC)
	id := func(i int) [sha256.Size]byte { return sha256.Sum256([]byte(strconv.Itoa(i))) }
	for i := range onceMax {
		p, first, remembered := o.begin(id(i), "/a/"+strconv.Itoa(i), now)
		if !first || !remembered {
			t.Fatalf("post %d: first %v, remembered %v", i, first, remembered)
		}
		if i > 0 { // the first post is still running
			o.end(id(i), p, "/done/"+strconv.Itoa(i), nil, now.Add(time.Duration(i)*time.Millisecond))
		}
	}
	later := now.Add(time.Minute)
	p, first, remembered := o.begin(id(onceMax), "/a/new", later)
	if !first || !remembered {
		t.Fatalf("a new post at full memory: first %v, remembered %v", first, remembered)
	}
	o.end(id(onceMax), p, "/done/new", nil, later)
	if _, ok := o.posts[id(1)]; ok {
		t.Error("the post done longest ago is still held")
	}
	if _, ok := o.posts[id(0)]; !ok {
		t.Error("the post still running was dropped")
	}
	if _, first, _ := o.begin(id(2), "/a/2", later); first {
		t.Error("the second oldest post was dropped too")
	}
	if _, first, _ := o.begin(id(onceMax), "/a/new", later); first {
		t.Error("the new post sent again runs again")
	}
}

// No field cuts what is typed or pasted into it: a browser stops a field
// with maxlength at its limit without a word (a pasted name or title of
// 250 characters was kept as its first 200). The server refuses a text
// that is too long, beside its field, and keeps it there to be
// shortened; text areas count down to their limit (data-max-chars).
func TestNoFieldCutsAPaste(t *testing.T) {
	h, ws, qs, es, links := seeded(t)
	ex := newHarnessOn(t, h)
	pages := []string{"/", workshopPath(ws.ID), workshopPath(ws.ID) + "/questions/new", workshopPath(ws.ID) + "/delete",
		questionPath(ws.ID, qs[0].ID), questionPath(ws.ID, qs[0].ID) + "/edit", questionPath(ws.ID, qs[0].ID) + "/reasons",
		studyPath(ws.ID, qs[0].ID), quickPriorsPath(ws.ID), calibrationPath(ws.ID), entryPath(ws.ID, qs[0].ID, es[0].ID),
		workshopPath(ws.ID) + "/answers/import"}
	for _, p := range pages {
		res, body := h.get(p)
		if res.StatusCode != http.StatusOK {
			t.Fatalf("%s: %d", p, res.StatusCode)
		}
		if i := strings.Index(body, "maxlength"); i >= 0 {
			t.Errorf("%s: a field cuts a paste: %s", p, body[max(0, i-120):i+30])
		}
	}
	res, body := ex.get(strings.TrimSuffix(links[0].Path, "/") + "/q/" + strconv.FormatInt(qs[0].ID, 10))
	if res.StatusCode != http.StatusOK || strings.Contains(body, "maxlength") {
		t.Errorf("the expert's question page (%d) has a field that cuts a paste", res.StatusCode)
	}
}

// A form sent twice is sent on with the first copy's confirmation
// (confirm_once.go), and with no other cookie its handler set: those were
// the first answer's alone.
func TestSentAgainCarriesOnlyTheConfirmation(t *testing.T) {
	rec := httptest.NewRecorder()
	w := &sentOnOrNot{ResponseWriter: rec}
	http.SetCookie(w, &http.Cookie{Name: "parley_other", Value: "first-answer-only", Path: "/"})
	http.SetCookie(w, &http.Cookie{Name: doneCookie, Value: "corrected", Path: "/w/1/q/2"})
	w.Header().Set("Location", "/w/1/q/2")
	w.WriteHeader(http.StatusSeeOther)
	if len(w.cookies) != 1 || !strings.HasPrefix(w.cookies[0], doneCookie+"=corrected") {
		t.Errorf("cookies kept for a second copy: %q; want the confirmation alone", w.cookies)
	}
	if w.location != "/w/1/q/2" {
		t.Errorf("location %q", w.location)
	}
}

package web

import (
	"context"
	"encoding/csv"
	"fmt"
	"html"
	"net/http"
	"net/url"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// The facilitator withdraws a judgement from the question's history, on
// a page that asks for a reason: the expert's earlier answer is current
// again on their own page and the facilitator's, the history marks the
// withdrawn one with its reason, and an expert whose one answer is
// withdrawn leaves the room view. Refused, saving nothing: no reason, a
// judgement withdrawn already, one of another question (404), and one of
// a calibration question whose true value has been shown.
func TestWithdrawFromTheHistory(t *testing.T) {
	h, ws, qs, es, links := seeded(t)
	ctx := context.Background()
	q := qs[0]
	qp := questionPath(ws.ID, q.ID)
	byName := map[string]workshop.Expert{}
	for _, e := range es {
		byName[e.Name] = e
	}
	first := byName[links[0].Name]
	before, err := h.db.QuestionExpertRevisions(ctx, q.ID, first.ID)
	if err != nil || len(before) == 0 {
		t.Fatalf("%s's answers to Q1 in the demo: %v, %v", first.Name, before, err)
	}
	earlier := before[len(before)-1]
	// The expert saves again: an answer that will be withdrawn.
	if r, body := h.post(links[0].Path+"q/"+strconv.FormatInt(q.ID, 10)+"/save", url.Values{
		"values[0]": {"0.0313"}, "values[1]": {"0.0717"}, "values[2]": {"0.1719"}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("save: %d %s", r.StatusCode, body)
	}
	now, _ := h.db.QuestionExpertRevisions(ctx, q.ID, first.ID)
	wrong := now[len(now)-1]

	_, panel := h.get(qp)
	page := withdrawPath(ws.ID, q.ID, wrong.ID)
	if !strings.Contains(panel, `href="`+page+`"`) {
		t.Fatalf("the history offers no withdrawal of revision %d", wrong.ID)
	}
	res, body := h.get(page)
	if res.StatusCode != http.StatusOK || !strings.Contains(body, "becomes their earlier one") || !strings.Contains(body, `name="reason"`) {
		t.Fatalf("the withdrawal page: %d\n%s", res.StatusCode, body)
	}

	c0 := h.counts(ws.ID)
	if res, body := h.post(page, url.Values{"reason": {"  "}}); res.StatusCode != http.StatusUnprocessableEntity ||
		!strings.Contains(body, "err-reason") {
		t.Fatalf("no reason: %d\n%s", res.StatusCode, body)
	}
	if c := h.counts(ws.ID); c != c0 {
		t.Fatalf("a refused withdrawal saved something: %+v, was %+v", c, c0)
	}
	why := "Typed into the form of the wrong expert (invented)."
	res, _ = h.post(page, url.Values{"reason": {why}})
	if res.StatusCode != http.StatusSeeOther || res.Header.Get("Location") != qp+"#history" {
		t.Fatalf("withdraw: %d to %q", res.StatusCode, res.Header.Get("Location"))
	}
	_, panel = h.get(qp)
	for _, want := range []string{"Judgement withdrawn.", ">withdrawn</span>", why} {
		if !strings.Contains(panel, want) {
			t.Errorf("the panel after the withdrawal lacks %q", want)
		}
	}
	if strings.Contains(panel, `href="`+page+`"`) {
		t.Error("the history still offers to withdraw the withdrawn judgement")
	}
	// Above the history, the panel (its table of judgements, the pool)
	// knows the withdrawn values no more.
	above := panel[:strings.Index(panel, `<section id="history"`)]
	if strings.Contains(above, "0.1719") {
		t.Error("the panel above the history still shows the withdrawn judgement's values")
	}
	if _, log := h.get(workshopPath(ws.ID) + "/log"); !strings.Contains(log, "Judgement withdrawn") || !strings.Contains(log, why) ||
		!strings.Contains(log, "judgement of round 1") {
		t.Error("the decision log does not record the withdrawal with its reason")
	}
	// The expert's own page shows the earlier answer, and not the
	// withdrawn one nor the facilitator's reason.
	_, own := h.get(links[0].Path + "q/" + strconv.FormatInt(q.ID, 10))
	if strings.Contains(own, "0.1719") || strings.Contains(own, "wrong expert") ||
		!strings.Contains(own, strconv.FormatFloat(earlier.Answer.Values[2], 'f', -1, 64)) {
		t.Errorf("the expert's page after the withdrawal: shows the withdrawn answer or the reason, or not the earlier one")
	}

	// Withdrawn again: refused, nothing saved.
	c1 := h.counts(ws.ID)
	if res, body := h.post(page, url.Values{"reason": {"again"}}); res.StatusCode != http.StatusUnprocessableEntity ||
		!strings.Contains(body, "already withdrawn") {
		t.Errorf("withdrawn twice: %d", res.StatusCode)
	}
	// Under another question's address: not found.
	if res, _ := h.post(withdrawPath(ws.ID, qs[1].ID, earlier.ID), url.Values{"reason": {"wrong question"}}); res.StatusCode != http.StatusNotFound {
		t.Errorf("a revision under another question: %d, want 404", res.StatusCode)
	}
	if c := h.counts(ws.ID); c != c1 {
		t.Fatalf("refused withdrawals saved something: %+v, was %+v", c, c1)
	}

	// An expert whose one answer is withdrawn leaves the room view.
	latest, _ := h.db.LatestRevisions(ctx, q.ID, 1)
	var only workshop.Revision
	for _, rv := range latest {
		if all, _ := h.db.QuestionExpertRevisions(ctx, q.ID, rv.ExpertID); len(all) == 1 {
			only = rv
		}
	}
	if only.ID == 0 {
		t.Fatal("no expert of the demo has a single answer to Q1")
	}
	if res, body := h.post(withdrawPath(ws.ID, q.ID, only.ID), url.Values{"reason": {"The expert asked to take it back (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("withdraw an only answer: %d %s", res.StatusCode, body)
	}
	if r, body := h.post(workshopPath(ws.ID)+"/round", url.Values{"action": {"close"}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("close: %d %s", r.StatusCode, body)
	}
	if _, body := h.get(roomPath(ws.ID, q.ID)); len(legendLabels(body)) != len(latest)-1 {
		t.Errorf("room view after an only answer was withdrawn: %v, want %d experts", legendLabels(body), len(latest)-1)
	}

	// Round 2's feedback, once read, follows a later withdrawal of a
	// round-1 answer: the panel it remembered is read afresh.
	if r, body := h.post(workshopPath(ws.ID)+"/round", url.Values{"action": {"open"}, "reason": {"Discussion done (invented)."}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("open round 2: %d %s", r.StatusCode, body)
	}
	// Read by the expert whose only answer was withdrawn: every answer
	// fed back is another's. Fewer than two others are not shown
	// (othersShown), and the page says how many answered.
	var reader string
	for _, l := range links {
		if byName[l.Name].ID == only.ExpertID {
			reader = l.Path
		}
	}
	fed := func() (int, string) {
		_, body := h.get(reader + "q/" + strconv.FormatInt(q.ID, 10))
		n := 0
		for _, l := range legendLabels(body) {
			if strings.HasPrefix(l, "Expert ") {
				n++
			}
		}
		return n, html.UnescapeString(body)
	}
	others, _ := fed()
	var another workshop.Revision
	for _, rv := range latest {
		if rv.ID != only.ID && rv.ExpertID != first.ID {
			another = rv
		}
	}
	if others != 2 || another.ID == 0 {
		t.Fatalf("round 2 feeds back %d other experts, want 2; another answer to withdraw: %d", others, another.ID)
	}
	if res, body := h.post(withdrawPath(ws.ID, q.ID, another.ID), url.Values{"reason": {"Entered against the wrong question (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("withdraw a round-1 answer in round 2: %d %s", res.StatusCode, body)
	}
	if n, body := fed(); n != 0 || !strings.Contains(body, "Only one other expert had answered this question when round 1 closed.") {
		t.Errorf("round 2 feeds back %d other experts after a withdrawal left one, want none and the words saying one had answered", n)
	}

	// A calibration question's answers, once its true value is shown,
	// are scored as they stood: refused naming the rule.
	revealed := false
	for _, cq := range qs {
		if !cq.Calibration {
			continue
		}
		revs, _ := h.db.LatestRevisions(ctx, cq.ID, 1)
		if len(revs) == 0 || cq.TrueValue == nil {
			continue
		}
		if err := h.db.SetTrueValue(ctx, cq.ID, *cq.TrueValue, true, "shown to the room (invented)"); err != nil {
			t.Fatal(err)
		}
		c2 := h.counts(ws.ID)
		res, body := h.post(withdrawPath(ws.ID, cq.ID, revs[0].ID), url.Values{"reason": {"wrong expert"}})
		if res.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, "calibration scores are fixed") {
			t.Errorf("withdrawal after the reveal: %d", res.StatusCode)
		}
		if c := h.counts(ws.ID); c != c2 {
			t.Errorf("a refused withdrawal after the reveal saved something")
		}
		if _, body := h.get(withdrawPath(ws.ID, cq.ID, revs[0].ID)); strings.Contains(body, `name="reason"`) {
			t.Errorf("the withdrawal page offers a form after the reveal")
		}
		revealed = true
		break
	}
	if !revealed {
		t.Error("the demo has no answered calibration question with a true value to reveal")
	}
}

// The overview's grid counts the answers that stand: an expert whose one
// answer was withdrawn has none, and one whose revision was withdrawn
// has their earlier round's answer carried.
func TestOverviewLeavesWithdrawnAnswersOut(t *testing.T) {
	revs := []workshop.Revision{
		{ID: 1, QuestionID: 5, ExpertID: 1, Round: 1, Withdrawn: true},
		{ID: 2, QuestionID: 5, ExpertID: 2, Round: 1},
		{ID: 3, QuestionID: 5, ExpertID: 2, Round: 2, Withdrawn: true},
	}
	m := answerStates(2, revs)
	if _, ok := m[1][5]; ok {
		t.Errorf("expert 1, whose one answer was withdrawn, has an answer: %+v", m[1])
	}
	if st := m[2][5]; st.Round != 1 || st.Saves != 0 || !st.Earlier {
		t.Errorf("expert 2's answer: %+v, want round 1's carried", st)
	}
}

// A prior agreed from a pool that included a judgement withdrawn since:
// the question's page and the report say the pool has changed, naming
// the judgement as withdrawn, and the priors CSV marks it.
func TestPriorFromAPoolWithAWithdrawnJudgement(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	ctx := context.Background()
	q := qs[0]
	qp := questionPath(ws.ID, q.ID)
	if res, body := h.post(qp+"/agree", url.Values{"source": {"pool"}, "confirm_open": {"on"}, "rationale": {"From the pool (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("agree: %d %s", res.StatusCode, body)
	}
	latest, _ := h.db.LatestRevisions(ctx, q.ID, 1)
	gone := latest[0]
	res, body := h.get(withdrawPath(ws.ID, q.ID, gone.ID))
	if res.StatusCode != http.StatusOK || !strings.Contains(body, "1 agreed prior was taken from a pool that included this judgement") {
		t.Errorf("the withdrawal page does not name the prior that pooled it")
	}
	if res, body := h.post(withdrawPath(ws.ID, q.ID, gone.ID), url.Values{"reason": {"Entered against the wrong question (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("withdraw: %d %s", res.StatusCode, body)
	}
	name := ""
	for _, e := range es {
		if e.ID == gone.ExpertID {
			name = e.Name
		}
	}
	want := "judgement withdrawn since: " + name
	for _, path := range []string{qp, workshopPath(ws.ID) + "/report"} {
		if _, body := h.get(path); !strings.Contains(body, want) {
			t.Errorf("%s does not say %q", path, want)
		}
	}
	// The record reads back, fits and pools checked, with the prior's
	// pooled judgement marked withdrawn; so does the question's own.
	for _, path := range []string{workshopPath(ws.ID) + "/export.json", qp + "/export.json"} {
		_, js := h.get(path)
		if _, err := record.ParseChecked(strings.NewReader(js)); err != nil {
			t.Errorf("%s does not read back: %v", path, err)
		}
	}
	_, csv := h.get(workshopPath(ws.ID) + "/priors.csv")
	lines := strings.Split(strings.TrimSpace(csv), "\n")
	if len(lines) < 2 || !strings.HasSuffix(strings.TrimSpace(lines[1]), ",true") {
		t.Errorf("priors.csv does not mark the prior's pool as changed:\n%s", csv)
	}
}

// The report's history strikes a withdrawn judgement through with the
// withdrawal's reason, and the revisions CSV marks it in its withdrawn
// column (false for every other).
func TestReportAndCSVMarkAWithdrawnJudgement(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	ctx := context.Background()
	latest, _ := h.db.LatestRevisions(ctx, qs[0].ID, 1)
	gone := latest[0]
	why := "Read from the paper form of another expert (invented)."
	if res, body := h.post(withdrawPath(ws.ID, qs[0].ID, gone.ID), url.Values{"reason": {why}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("withdraw: %d %s", res.StatusCode, body)
	}
	if _, report := h.get(workshopPath(ws.ID) + "/report"); !strings.Contains(report, `</s> <span class="tag tag-warn">withdrawn</span>`) || !strings.Contains(report, why) {
		t.Error("the report's history does not mark the withdrawn judgement with its reason")
	}
	_, body := h.get(workshopPath(ws.ID) + "/export.csv")
	rows, err := csv.NewReader(strings.NewReader(body)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	col := map[string]int{}
	for i, name := range rows[0] {
		col[name] = i
	}
	c, ok := col["withdrawn"]
	if !ok {
		t.Fatalf("no withdrawn column in %v", rows[0])
	}
	marked := 0
	for _, row := range rows[1:] {
		want := "false"
		if row[col["revision_id"]] == strconv.FormatInt(gone.ID, 10) {
			want = "true"
			marked++
		}
		if row[c] != want {
			t.Errorf("revision %s: withdrawn %q, want %q", row[col["revision_id"]], row[c], want)
		}
	}
	if marked != 1 {
		t.Errorf("%d rows for the withdrawn revision, want 1", marked)
	}
}

// The entry page, where a judgement typed against the wrong expert is
// seen first, offers to withdraw each of the expert's standing
// judgements on the question, and no longer offers it for one withdrawn
// (which it lists, marked).
func TestEntryPageOffersTheWithdrawal(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	ctx := context.Background()
	latest, _ := h.db.LatestRevisions(ctx, qs[0].ID, 1)
	rv := latest[0]
	entry := entryPath(ws.ID, qs[0].ID, rv.ExpertID)
	page := withdrawPath(ws.ID, qs[0].ID, rv.ID)
	if _, body := h.get(entry); !strings.Contains(body, `href="`+page+`"`) {
		t.Fatalf("the entry page does not offer to withdraw revision %d", rv.ID)
	}
	if res, body := h.post(page, url.Values{"reason": {"Entered against the wrong expert (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("withdraw: %d %s", res.StatusCode, body)
	}
	if _, body := h.get(entry); strings.Contains(body, `href="`+page+`"`) {
		t.Error("the entry page still offers to withdraw the withdrawn judgement")
	}
}

// A withdrawn judgement is listed, marked one way, on every page of the
// facilitator's that lists judgements: the question's history, the
// entry page, the expert's page, the withdrawal page and the report each
// hold the same marks (judgementAnswer, judgementReason), never as the
// expert's answer: the entry page's form and the expert's page show the
// earlier answer that stands, and offer no withdrawal of the withdrawn
// one. The revoke and new-link pages count it among the expert's
// answers as withdrawn.
func TestWithdrawnJudgementsAreListedWhereTheFacilitatorLooks(t *testing.T) {
	h, ws, qs, es, links := seeded(t)
	ctx := context.Background()
	q := qs[0]
	var e workshop.Expert
	for _, x := range es {
		if x.Name == links[0].Name {
			e = x
		}
	}
	if r, body := h.post(links[0].Path+"q/"+strconv.FormatInt(q.ID, 10)+"/save", url.Values{
		"values[0]": {"0.0313"}, "values[1]": {"0.0717"}, "values[2]": {"0.1719"}, "reason": {"Typed on the wrong form (invented)."}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("save: %d %s", r.StatusCode, body)
	}
	own, _ := h.db.QuestionExpertRevisions(ctx, q.ID, e.ID)
	wrong, earlier := own[len(own)-1], own[len(own)-2]
	why := "Read from another expert's paper form (invented)."
	if r, body := h.post(withdrawPath(ws.ID, q.ID, wrong.ID), url.Values{"reason": {why}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("withdraw: %d %s", r.StatusCode, body)
	}
	all, _ := h.db.Revisions(ctx, ws.ID)
	for _, rv := range all {
		if rv.ID == wrong.ID {
			wrong = rv
		}
	}
	evs, _ := h.db.Events(ctx, ws.ID)
	var answer, reason strings.Builder
	if err := judgementAnswer(q, wrong).Render(ctx, &answer); err != nil {
		t.Fatal(err)
	}
	if err := judgementReason(wrong, workshop.Withdrawals(evs)).Render(ctx, &reason); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(answer.String(), "</s> <span class=\"tag tag-warn\">withdrawn</span>") || !strings.Contains(reason.String(), "Withdrawn ") ||
		!strings.Contains(reason.String(), html.EscapeString(why)) {
		t.Fatalf("the marks: %q, %q", answer.String(), reason.String())
	}
	entry := entryPath(ws.ID, q.ID, e.ID)
	expert := workshopPath(ws.ID) + "/experts/" + strconv.FormatInt(e.ID, 10)
	for _, path := range []string{questionPath(ws.ID, q.ID), entry, expert, withdrawPath(ws.ID, q.ID, wrong.ID), workshopPath(ws.ID) + "/report"} {
		_, body := h.get(path)
		if !strings.Contains(body, answer.String()) || !strings.Contains(body, reason.String()) {
			t.Errorf("%s does not mark the withdrawn judgement as the history does", path)
		}
		if strings.Contains(body, `href="`+withdrawPath(ws.ID, q.ID, wrong.ID)+`"`) {
			t.Errorf("%s offers to withdraw the withdrawn judgement", path)
		}
	}
	// Never the expert's answer: the entry form holds the earlier one's
	// values, and the expert's page shows it as current.
	earlierMedian := strconv.FormatFloat(earlier.Answer.Values[1], 'f', -1, 64)
	_, body := h.get(entry)
	form, _, _ := strings.Cut(body, `<section class="history">`)
	if strings.Contains(form, "0.0717") || !strings.Contains(form, `value="`+earlierMedian+`"`) {
		t.Errorf("the entry form does not hold the answer that stands (median %s)", earlierMedian)
	}
	_, body = h.get(expert)
	current, _, found := strings.Cut(body, `<section id="withdrawn">`)
	if !found {
		t.Error("the expert's page has no list of withdrawn judgements")
	}
	if strings.Contains(current, "0.0717") || !strings.Contains(current, html.EscapeString(answerSummary(q, earlier.Answer))) ||
		!strings.Contains(current, `<a class="withdrawn-count" href="#withdrawn">1 judgement withdrawn</a>`) {
		t.Errorf("the expert's page does not show the answer that stands with the count of the withdrawn")
	}
	// The revoke and new-link pages count it.
	mine, _ := h.db.ExpertHistory(ctx, e.ID)
	n := len(mine)
	for path, want := range map[string]string{
		"revoke":  fmt.Sprintf("Their %d saved answers stay in the record. One of them is withdrawn and counts for nothing already; the other %d leave the pool", n, n-1),
		"reissue": fmt.Sprintf("Their %d saved answers (1 of them withdrawn) stay as they are.", n),
	} {
		if _, body := h.post(expertActionPath(ws.ID, e.ID, path), url.Values{}); !strings.Contains(html.UnescapeString(body), want) {
			t.Errorf("the %s page does not say %q", path, want)
		}
	}
}

// What revoking or a new link does to an expert's answers, some of them
// withdrawn, in words that agree in number.
func TestAnswersSentencesCountTheWithdrawn(t *testing.T) {
	for _, c := range []struct {
		answers, withdrawn   int
		revoke, rejoin, kept string
	}{
		{1, 0, "Their 1 saved answer stays in the record, but it leaves the pool, the round feedback and the calibration scores.",
			"Their 1 saved answer counts again, as it stands, in the pool, the round feedback and the calibration scores.",
			"Their 1 saved answer stays as it is."},
		{1, 1, "Their 1 saved answer stays in the record; it is withdrawn, so it counts for nothing already.",
			"Their 1 saved answer is withdrawn, so it does not count again.",
			"Their 1 saved answer, withdrawn, stays as it is."},
		{2, 2, "Their 2 saved answers stay in the record; both are withdrawn, so they count for nothing already.",
			"Their 2 saved answers are both withdrawn, so none counts again.",
			"Their 2 saved answers, both withdrawn, stay as they are."},
		{2, 1, "Their 2 saved answers stay in the record. One of them is withdrawn and counts for nothing already; the other one leaves the pool, the round feedback and the calibration scores.",
			"Of their 2 saved answers, the one not withdrawn counts again, as it stands, in the pool, the round feedback and the calibration scores; the withdrawn one does not.",
			"Their 2 saved answers (1 of them withdrawn) stay as they are."},
		{3, 3, "Their 3 saved answers stay in the record; all 3 are withdrawn, so they count for nothing already.",
			"Their 3 saved answers are all withdrawn, so none counts again.",
			"Their 3 saved answers, all withdrawn, stay as they are."},
		{5, 2, "Their 5 saved answers stay in the record. 2 of them are withdrawn and count for nothing already; the other 3 leave the pool, the round feedback and the calibration scores.",
			"Of their 5 saved answers, the 3 not withdrawn count again, as they stand, in the pool, the round feedback and the calibration scores; the 2 withdrawn do not.",
			"Their 5 saved answers (2 of them withdrawn) stay as they are."},
	} {
		if got := revokedAnswers(c.answers, c.withdrawn); got != c.revoke {
			t.Errorf("revoke %d/%d: %q", c.withdrawn, c.answers, got)
		}
		if got := rejoinSentence(c.answers, c.withdrawn); got != c.rejoin {
			t.Errorf("rejoin %d/%d: %q", c.withdrawn, c.answers, got)
		}
		if got := keptSentence(c.answers, c.withdrawn); got != c.kept {
			t.Errorf("kept %d/%d: %q", c.withdrawn, c.answers, got)
		}
	}
}

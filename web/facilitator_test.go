package web

import (
	"context"
	"fmt"
	"net/http"
	"net/url"
	"regexp"
	"slices"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// seeded is a harness signed in over a database holding the invented demo.
func seeded(t testing.TB) (*harness, workshop.Workshop, []workshop.Question, []workshop.Expert, []DemoLink) {
	t.Helper()
	h := newHarness(t)
	h.signIn()
	links, err := SeedDemo(context.Background(), h.db)
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	ws, err := h.db.Workshops(ctx)
	if err != nil || len(ws) != 1 {
		t.Fatalf("demo workshops: %v, %v", ws, err)
	}
	qs, _ := h.db.Questions(ctx, ws[0].ID)
	es, _ := h.db.Experts(ctx, ws[0].ID)
	return h, ws[0], qs, es, links
}

func TestSeedDemo(t *testing.T) {
	h, ws, qs, es, links := seeded(t)
	if !ws.Invented || len(qs) < 3 || len(es) != 4 || len(links) != 4 {
		t.Fatalf("demo: invented %v, %d questions, %d experts, %d links", ws.Invented, len(qs), len(es), len(links))
	}
	// The notes count the calibration questions the demo really has.
	calib := 0
	for _, q := range qs {
		if q.Calibration {
			calib++
		}
	}
	if want := "Its " + numberWord(calib) + " calibration questions"; calib != 5 || !strings.Contains(ws.Notes, want) {
		t.Errorf("demo has %d calibration questions; notes say %q, want %q", calib, ws.Notes, want)
	}
	// Every demo answer is a valid judgement that elicit can fit.
	revs, _ := h.db.Revisions(context.Background(), ws.ID)
	if len(revs) == 0 {
		t.Fatal("demo has no answers")
	}
	byID := map[int64]workshop.Question{}
	for _, q := range qs {
		byID[q.ID] = q
	}
	for _, rv := range revs {
		if _, err := byID[rv.QuestionID].Fit(rv.Answer); err != nil {
			t.Errorf("demo revision %d does not fit: %v", rv.ID, err)
		}
	}
	// A second seed does nothing.
	again, err := SeedDemo(context.Background(), h.db)
	if err != nil || again != nil || h.workshopCount() != 1 {
		t.Fatalf("second SeedDemo = %v, %v; %d workshops", again, err, h.workshopCount())
	}
	// Demo links work.
	if res, _ := h.get(links[0].Path); res.StatusCode != http.StatusOK {
		t.Fatalf("demo expert link: %d", res.StatusCode)
	}
}

func TestFacilitatorPagesRender(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	target := qs[0]
	for _, tc := range []struct {
		path string
		want []string
	}{
		{"/", []string{"Workshops", ws.Title, "invented demo", "New workshop"}},
		{workshopPath(ws.ID), []string{"Invented data.", "Questions", "Ines Varga", "Ole Brandt", "Who has answered what in round 1", "Close round 1", "Add an expert"}},
		{workshopPath(ws.ID) + "/questions/new", []string{"Add a question", "Lower bound", "Chips in bins", "calibration question"}},
		{workshopPath(ws.ID) + "/log", []string{"Decision log", "Workshop created", "Question added", "Expert added"}},
		{questionPath(ws.ID, target.ID), []string{"Caution.", "Invented data.", "Linear opinion pool", "(this page names the experts beside their answers; the room view does not)", `<th scope="row">Equal-weight pool</th>`, "Best single Beta", "Ines Varga", "Tomas Lindqvist", "no answer yet", "<svg", "Record agreed prior", "Revision history"}},
		{questionPath(ws.ID, qs[1].ID), []string{"True value (hidden from the experts): <strong>0.0413</strong>"}},
	} {
		res, body := h.get(tc.path)
		if res.StatusCode != http.StatusOK {
			t.Errorf("GET %s: %d", tc.path, res.StatusCode)
			continue
		}
		for _, w := range tc.want {
			if !strings.Contains(body, w) {
				t.Errorf("GET %s: page lacks %q", tc.path, w)
			}
		}
		if strings.Contains(body, "NaN") || strings.Contains(body, "Inf") {
			t.Errorf("GET %s: NaN or Inf on the page", tc.path)
		}
	}
	for _, path := range []string{workshopPath(999), questionPath(ws.ID, 999), workshopPath(ws.ID) + "/q/abc"} {
		if res, _ := h.get(path); res.StatusCode != http.StatusNotFound {
			t.Errorf("GET %s: %d, want 404", path, res.StatusCode)
		}
	}
}

// counts is what a rejected form must leave unchanged.
type counts struct{ workshops, questions, experts, events, priors, revisions int }

func (h *harness) counts(wsID int64) counts {
	h.t.Helper()
	ctx := context.Background()
	ws, _ := h.db.Workshops(ctx)
	qs, _ := h.db.Questions(ctx, wsID)
	es, _ := h.db.Experts(ctx, wsID)
	ev, _ := h.db.Events(ctx, wsID)
	ps, _ := h.db.AgreedPriors(ctx, wsID)
	rv, _ := h.db.Revisions(ctx, wsID)
	return counts{len(ws), len(qs), len(es), len(ev), len(ps), len(rv)}
}

func TestFacilitatorFormsRejectBadInput(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	wp := workshopPath(ws.ID)
	qp := questionPath(ws.ID, qs[0].ID)
	question := func(over map[string]string) url.Values {
		v := url.Values{"wording": {"What share will fail?"}, "quantity": {"share"}, "units": {""},
			"lower": {"0"}, "upper": {"1"}, "format": {"quantiles"}, "preset": {"p05_50_95"},
			"custom_probs": {""}, "bin_edges": {""}, "chips": {""}, "true_value": {""}}
		for k, val := range over {
			v.Set(k, val)
		}
		return v
	}
	long := strings.Repeat("x", input.MaxShortText+1)
	tests := []struct {
		name  string
		path  string
		form  url.Values
		field string // the field whose message must appear
		kept  string // a typed value that must be shown again
	}{
		{"workshop without title", "/workshops", url.Values{"title": {" "}, "purpose": {"kept purpose"}}, "title", "kept purpose"},
		{"workshop title too long", "/workshops", url.Values{"title": {long}}, "title", long},
		{"edit without title", wp + "/edit", url.Values{"title": {""}, "notes": {"kept notes"}}, "title", "kept notes"},
		{"question lower with comma", wp + "/questions", question(map[string]string{"lower": "0,5"}), "lower", "0,5"},
		{"question upper NaN", wp + "/questions", question(map[string]string{"upper": "NaN"}), "upper", "NaN"},
		{"question lower hex", wp + "/questions", question(map[string]string{"lower": "0x0p0"}), "lower", "0x0p0"},
		{"question upper underscore", wp + "/questions", question(map[string]string{"upper": "1_0"}), "upper", "1_0"},
		{"question bounds reversed", wp + "/questions", question(map[string]string{"lower": "1", "upper": "0"}), "lower", "What share will fail?"},
		{"question without wording", wp + "/questions", question(map[string]string{"wording": ""}), "wording", "share"},
		{"custom probabilities decreasing", wp + "/questions", question(map[string]string{"preset": "custom", "custom_probs": "0.5 0.2"}), "custom_probs", "0.5 0.2"},
		{"custom probability of 1", wp + "/questions", question(map[string]string{"preset": "custom", "custom_probs": "0.5 1"}), "custom_probs", "0.5 1"},
		{"custom probabilities a hair apart", wp + "/questions", question(map[string]string{"preset": "custom", "custom_probs": "0.05 0.5 0.5000001"}), "custom_probs", "0.05 0.5 0.5000001"},
		{"unknown format", wp + "/questions", question(map[string]string{"format": "guess"}), "format", "What share will fail?"},
		{"chips not a number", wp + "/questions", question(map[string]string{"format": "chips", "bin_edges": "0 0.5 1", "chips": "ten"}), "chips", "ten"},
		{"bin edges short of the bounds", wp + "/questions", question(map[string]string{"format": "chips", "bin_edges": "0.1 0.5 1", "chips": "10"}), "bin_edges", "0.1 0.5 1"},
		{"calibration without true value", wp + "/questions", question(map[string]string{"calibration": "on"}), "true_value", "What share will fail?"},
		{"true value outside bounds", wp + "/questions", question(map[string]string{"calibration": "on", "true_value": "1.5"}), "true_value", "1.5"},
		{"true value without the calibration box", wp + "/questions", question(map[string]string{"true_value": "0.5"}), "true_value", "0.5"},
		{"expert without name", wp + "/experts", url.Values{"name": {""}, "affiliation": {"kept affiliation"}}, "name", "kept affiliation"},
		{"expert name with control character", wp + "/experts", url.Values{"name": {"a\x07b"}}, "name", ""},
		{"expert name with a direction override", wp + "/experts", url.Values{"name": {"Ann\u202eegassem"}}, "name", ""},
		{"round action unknown", wp + "/round", url.Values{"action": {"skip"}}, "action", ""},
		{"open round while open", wp + "/round", url.Values{"action": {"open"}, "reason": {"kept reason"}}, "action", "kept reason"},
		{"weights without reason", qp + "/weights", url.Values{"scheme": {"custom"}, weightField(es[0].ID): {"2"}, weightField(es[1].ID): {"1"}, weightField(es[2].ID): {"1"}, weightField(es[3].ID): {"1"}}, "reason", ""},
		{"weight negative", qp + "/weights", url.Values{"scheme": {"custom"}, "reason": {"r"}, weightField(es[0].ID): {"-1"}, weightField(es[1].ID): {"1"}, weightField(es[2].ID): {"1"}, weightField(es[3].ID): {"1"}}, weightField(es[0].ID), "-1"},
		{"weight Inf", qp + "/weights", url.Values{"scheme": {"custom"}, "reason": {"r"}, weightField(es[0].ID): {"Inf"}, weightField(es[1].ID): {"1"}, weightField(es[2].ID): {"1"}, weightField(es[3].ID): {"1"}}, weightField(es[0].ID), "Inf"},
		{"weights all zero", qp + "/weights", url.Values{"scheme": {"custom"}, "reason": {"kept why"}, weightField(es[0].ID): {"0"}, weightField(es[1].ID): {"0"}, weightField(es[2].ID): {"0"}, weightField(es[3].ID): {"0"}}, "scheme", "kept why"},
		{"agree without rationale", qp + "/agree", url.Values{"source": {"pool"}, "confirm_open": {"on"}, "rationale": {""}}, "rationale", ""},
		{"agree unknown source", qp + "/agree", url.Values{"source": {"vote"}, "rationale": {"kept rationale"}}, "source", "kept rationale"},
		{"consensus values decreasing", qp + "/agree", url.Values{"source": {"consensus"}, "confirm_open": {"on"}, "rationale": {"r"}, "values[0]": {"0.2"}, "values[1]": {"0.1"}, "values[2]": {"0.3"}}, "values[1]", "0.2"},
		{"consensus value thousands separator", qp + "/agree", url.Values{"source": {"consensus"}, "confirm_open": {"on"}, "rationale": {"r"}, "values[0]": {"1,000"}, "values[1]": {"0.1"}, "values[2]": {"0.3"}}, "values[0]", "1,000"},
	}
	for _, tt := range tests {
		before := h.counts(ws.ID)
		res, body := h.post(tt.path, tt.form)
		if res.StatusCode < 400 || res.StatusCode >= 500 {
			t.Errorf("%s: status %d, want 4xx", tt.name, res.StatusCode)
			continue
		}
		if after := h.counts(ws.ID); after != before {
			t.Errorf("%s: something was saved: %+v → %+v", tt.name, before, after)
		}
		if !strings.Contains(body, "Nothing was saved") {
			t.Errorf("%s: page does not say nothing was saved", tt.name)
		}
		if !hasFieldError(body, tt.field) {
			t.Errorf("%s: no message beside field %q", tt.name, tt.field)
		}
		if tt.kept != "" && !strings.Contains(body, htmlEscape(tt.kept)) {
			t.Errorf("%s: typed value %q not shown again", tt.name, tt.kept)
		}
	}
}

// hasFieldError reports whether the page shows a message beside the
// named field: an element with the field's error id, or the consensus
// field marked invalid.
func hasFieldError(body, field string) bool {
	if strings.Contains(body, `id="err-`+field+`"`) {
		return true
	}
	// The consensus fields are laid out by the expert form's helpers.
	i := strings.Index(body, `name="`+field+`"`)
	return i >= 0 && strings.Contains(body[i:min(len(body), i+400)], `aria-invalid="true"`)
}

func htmlEscape(s string) string {
	return strings.NewReplacer("&", "&amp;", "<", "&lt;", ">", "&gt;", `"`, "&#34;", "'", "&#39;").Replace(s)
}

func TestWorkshopFlowThroughForms(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	ctx := context.Background()
	wp := workshopPath(ws.ID)
	qp := questionPath(ws.ID, qs[0].ID)

	// Add a question in each format.
	for _, form := range []url.Values{
		{"wording": {"Custom"}, "quantity": {"q custom"}, "lower": {"0"}, "upper": {"1"}, "format": {"quantiles"}, "preset": {"custom"}, "custom_probs": {"0.1, 0.5, 0.9"}},
		{"wording": {"Tertiles"}, "quantity": {"q tertiles"}, "lower": {"0"}, "upper": {"1"}, "format": {"quantiles"}, "preset": {"tertiles"}},
		{"wording": {"Interval"}, "quantity": {"q interval"}, "lower": {"0"}, "upper": {"1"}, "format": {"interval"}},
		{"wording": {"Chips"}, "quantity": {"q chips"}, "lower": {"0"}, "upper": {"0.5"}, "format": {"chips"}, "bin_edges": {"0 0.1 0.2 0.3 0.5"}, "chips": {"20"}, "calibration": {"on"}, "true_value": {"0.12"}},
	} {
		if res, body := h.post(wp+"/questions", form); res.StatusCode != http.StatusSeeOther {
			t.Fatalf("add question %s: %d %s", form.Get("quantity"), res.StatusCode, body)
		}
	}
	all, _ := h.db.Questions(ctx, ws.ID)
	got := map[string]workshop.Question{}
	for _, q := range all {
		got[q.Quantity] = q
	}
	if q := got["q custom"]; fmt.Sprint(q.Probs) != "[0.1 0.5 0.9]" {
		t.Errorf("custom probs stored as %v", q.Probs)
	}
	if q := got["q tertiles"]; fmt.Sprint(q.Probs) != fmt.Sprint(workshop.ProbsTertiles) {
		t.Errorf("tertiles stored as %v", q.Probs)
	}
	if q := got["q chips"]; q.Chips != 20 || len(q.BinEdges) != 5 || !q.Calibration || q.TrueValue == nil || *q.TrueValue != 0.12 {
		t.Errorf("chips question stored as %+v", q)
	}

	// Custom weights, recorded with their reason, change the pool share.
	wf := url.Values{"scheme": {"custom"}, "reason": {"Ole is overconfident (invented)"}}
	for i, e := range es {
		wf.Set(weightField(e.ID), []string{"2", "1", "1", "0"}[i])
	}
	if res, body := h.post(qp+"/weights", wf); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("set weights: %d %s", res.StatusCode, body)
	}
	w, _ := h.db.Weights(ctx, ws.ID)
	if w.Scheme != workshop.WeightsCustom || w.ByExpert[es[0].ID] != 2 || w.Reason == "" {
		t.Fatalf("weights stored as %+v", w)
	}
	_, body := h.get(qp)
	if !strings.Contains(body, "custom weights") || !strings.Contains(body, "66.7%") {
		t.Errorf("panel does not show the custom weights (Ines 2 of 3 pooled weight)")
	}

	// Agree the pool's best Beta: it must equal what elicit computes from
	// the stored judgements under the stored weights.
	if res, body := h.post(qp+"/agree", url.Values{"source": {"pool"}, "confirm_open": {"on"}, "rationale": {"Pool of the two careful experts (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("agree pool: %d %s", res.StatusCode, body)
	}
	d, err := h.srv.readWorkshopData(ctx, ws)
	if err != nil {
		t.Fatal(err)
	}
	var dists []elicit.ScaledBeta
	var weights []float64
	for _, e := range es {
		var latest *workshop.Revision
		for i := range d.Revisions {
			if d.Revisions[i].ExpertID == e.ID && d.Revisions[i].QuestionID == qs[0].ID {
				latest = &d.Revisions[i]
			}
		}
		if latest == nil {
			continue
		}
		fit, err := qs[0].Fit(latest.Answer)
		if err != nil {
			t.Fatal(err)
		}
		dists = append(dists, fit.Dist)
		weights = append(weights, w.ByExpert[e.ID])
	}
	pool, err := elicit.LinearPool(dists, weights)
	if err != nil {
		t.Fatal(err)
	}
	rep, err := pool.BestBeta()
	if err != nil {
		t.Fatal(err)
	}
	// The demo comes with its own agreed prior; this one follows it.
	ps, _ := h.db.AgreedPriors(ctx, ws.ID)
	if len(ps) != 2 || ps[1].Source != workshop.PriorFromPool || ps[1].Dist != rep.Dist {
		t.Fatalf("agreed %+v, want %+v", ps, rep.Dist)
	}
	_, body = h.get(qp)
	for _, want := range []string{"p ~ beta(", "dbeta(p, ", "pm.Beta(&#34;p&#34;, alpha=", "Pool of the two careful experts"} {
		if !strings.Contains(body, want) {
			t.Errorf("panel lacks %q after agreeing", want)
		}
	}

	// Agree a consensus judgement instead; elicit fits it.
	if res, body := h.post(qp+"/agree", url.Values{"source": {"consensus"}, "confirm_open": {"on"}, "rationale": {"Discussed (invented)."},
		"values[0]": {"0.015"}, "values[1]": {"0.045"}, "values[2]": {"0.11"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("agree consensus: %d %s", res.StatusCode, body)
	}
	want, err := qs[0].Fit(workshop.Answer{Values: []float64{0.015, 0.045, 0.11}})
	if err != nil {
		t.Fatal(err)
	}
	ps, _ = h.db.AgreedPriors(ctx, ws.ID)
	if len(ps) != 3 || ps[2].Source != workshop.PriorFromConsensus || ps[2].Dist != want.Dist || ps[2].Consensus == nil {
		t.Fatalf("consensus agreed %+v, want %+v", ps[len(ps)-1], want.Dist)
	}

	// Rounds: close, then open with a reason.
	if res, _ := h.post(wp+"/round", url.Values{"action": {"close"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("close round: %d", res.StatusCode)
	}
	if res, _ := h.post(wp+"/round", url.Values{"action": {"open"}, "reason": {"Discussed the spread (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("open round: %d", res.StatusCode)
	}
	got2, _ := h.db.Workshop(ctx, ws.ID)
	if got2.Round != 2 || !got2.Open {
		t.Fatalf("after rounds: round %d open %v", got2.Round, got2.Open)
	}
	_, body = h.get(wp + "/log")
	for _, want := range []string{"Round closed", "Round opened", "Discussed the spread (invented).", "Pool weights set", "Ole is overconfident (invented)", "Prior agreed"} {
		if !strings.Contains(body, want) {
			t.Errorf("log lacks %q", want)
		}
	}
}

func TestRosterLinksRevokeAndReissue(t *testing.T) {
	h := newHarness(t)
	h.signIn()
	ws := h.newWorkshop("Roster (invented)")
	e, token := h.addExpert(ws, "Expert One")
	if res, _ := h.get(expertPath(token)); res.StatusCode != http.StatusOK {
		t.Fatalf("fresh link: %d", res.StatusCode)
	}
	// The link is shown once: the overview afterwards does not carry it.
	_, body := h.get(workshopPath(ws.ID))
	if strings.Contains(body, token) {
		t.Fatal("overview shows the private link again")
	}
	// One reason box per row serves both actions.
	rosterRow := func(body string) string {
		i := strings.Index(body, `<section id="roster"`)
		j := strings.Index(body[max(i, 0):], "<tbody>")
		if i < 0 || j < 0 {
			t.Fatal("no roster table")
		}
		r := body[i+j:]
		return r[:strings.Index(r, "</tbody>")]
	}
	revoke, reissue := expertActionPath(ws.ID, e.ID, "revoke"), expertActionPath(ws.ID, e.ID, "reissue")
	if r := rosterRow(body); strings.Count(r, `name="reason"`) != 1 || !strings.Contains(r, `action="`+revoke+`"`) || !strings.Contains(r, `formaction="`+reissue+`"`) {
		t.Errorf("active expert's row: want one reason box, revoke and a new link:\n%s", r)
	}
	// Revoking asks for confirmation first and changes nothing until then.
	if res, body := h.post(expertActionPath(ws.ID, e.ID, "revoke"), url.Values{"reason": {"left the panel"}}); res.StatusCode != http.StatusOK ||
		!strings.Contains(body, "Revoke the access of Expert One?") || !strings.Contains(body, `name="confirm" value="yes"`) ||
		!strings.Contains(body, "left the panel") {
		t.Fatalf("revoke without confirming: %d, want the confirmation page keeping the reason", res.StatusCode)
	}
	if res, _ := h.get(expertPath(token)); res.StatusCode != http.StatusOK {
		t.Fatalf("an unconfirmed revoke ended the link: %d", res.StatusCode)
	}
	if evs, _ := h.db.Events(context.Background(), ws.ID); evs[len(evs)-1].Kind == workshop.EventExpertRevoked {
		t.Fatal("an unconfirmed revoke was recorded")
	}
	if res, _ := h.post(expertActionPath(ws.ID, e.ID, "revoke"), url.Values{"reason": {"left the panel"}, "confirm": {"yes"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("revoke: %d", res.StatusCode)
	}
	if res, body := h.get(expertPath(token)); res.StatusCode != http.StatusNotFound || strings.Contains(body, "Expert One") {
		t.Fatalf("revoked link: %d", res.StatusCode)
	}
	_, body = h.get(workshopPath(ws.ID))
	if r := rosterRow(body); strings.Count(r, `name="reason"`) != 1 || !strings.Contains(r, `action="`+reissue+`"`) || strings.Contains(r, revoke) {
		t.Errorf("revoked expert's row: want one reason box and a new link only:\n%s", r)
	}
	// A new link, too, asks for confirmation first and changes nothing
	// until then (a click by mistake beside "Revoke…" would end a
	// working link).
	if res, body := h.post(expertActionPath(ws.ID, e.ID, "reissue"), url.Values{"reason": {"back again"}}); res.StatusCode != http.StatusOK ||
		!strings.Contains(body, "Give Expert One a new link and their access back?") || !strings.Contains(body, `name="confirm" value="yes"`) ||
		!strings.Contains(body, "back again") {
		t.Fatalf("reissue without confirming: %d, want the confirmation page keeping the reason", res.StatusCode)
	}
	if evs, _ := h.db.Events(context.Background(), ws.ID); evs[len(evs)-1].Kind == workshop.EventTokenReissued {
		t.Fatal("an unconfirmed reissue was recorded")
	}
	res, _ := h.post(expertActionPath(ws.ID, e.ID, "reissue"), url.Values{"reason": {"back again"}, "confirm": {"yes"}})
	if res.StatusCode != http.StatusSeeOther {
		t.Fatalf("reissue: %d", res.StatusCode)
	}
	res, body = h.get(res.Header.Get("Location"))
	m := linkPattern.FindStringSubmatch(body)
	if res.StatusCode != http.StatusOK || m == nil || m[1] == token {
		t.Fatalf("reissue: %d, link %v", res.StatusCode, m)
	}
	if res, _ := h.get(expertPath(token)); res.StatusCode != http.StatusNotFound {
		t.Fatalf("old link after reissue: %d", res.StatusCode)
	}
	if res, _ := h.get(expertPath(m[1])); res.StatusCode != http.StatusOK {
		t.Fatalf("new link: %d", res.StatusCode)
	}
	// For an expert with a working link, the confirmation says it ends.
	if res, body := h.post(expertActionPath(ws.ID, e.ID, "reissue"), url.Values{}); res.StatusCode != http.StatusOK ||
		!strings.Contains(body, "Give Expert One a new private link?") || !strings.Contains(body, "Their current link stops working at once") {
		t.Fatalf("reissue of a working link without confirming: %d", res.StatusCode)
	}
	if res, _ := h.get(expertPath(m[1])); res.StatusCode != http.StatusOK {
		t.Fatalf("an unconfirmed reissue ended the link: %d", res.StatusCode)
	}
	// An expert of another workshop cannot be revoked through this one.
	other := h.newWorkshop("Other (invented)")
	if res, _ := h.post(expertActionPath(other.ID, e.ID, "revoke"), url.Values{}); res.StatusCode != http.StatusNotFound {
		t.Fatalf("cross-workshop revoke: %d", res.StatusCode)
	}
	if got, _ := h.db.Expert(context.Background(), e.ID); got.Revoked {
		t.Fatal("expert revoked through another workshop")
	}
}

func TestReportAndExports(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	qp := questionPath(ws.ID, qs[0].ID)
	if res, body := h.post(qp+"/agree", url.Values{"source": {"pool"}, "confirm_open": {"on"}, "rationale": {"Invented rationale for the report."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("agree: %d %s", res.StatusCode, body)
	}
	res, body := h.get(workshopPath(ws.ID) + "/report")
	if res.StatusCode != http.StatusOK {
		t.Fatalf("report: %d", res.StatusCode)
	}
	for _, want := range []string{"Caution.", "Invented data.", "Full revision history", "Decision log", "Invented rationale for the report.",
		"p ~ beta(", "Linear opinion pool", es[0].Name, `href="` + staticURL("/static/print.css") + `" media="print"`, "<svg"} {
		if !strings.Contains(body, want) {
			t.Errorf("report lacks %q", want)
		}
	}
	// Calibration true values stay out of the record until revealed.
	if strings.Contains(body, "0.0413") {
		t.Error("report shows an unrevealed true value")
	}

	res, body = h.get(workshopPath(ws.ID) + "/export.json")
	if res.StatusCode != http.StatusOK || res.Header.Get("Content-Type") != "application/json" ||
		!strings.Contains(res.Header.Get("Content-Disposition"), "attachment") {
		t.Fatalf("export.json: %d %v", res.StatusCode, res.Header)
	}
	rec, err := record.Parse(strings.NewReader(body))
	if err != nil {
		t.Fatalf("exported JSON does not parse as a record: %v", err)
	}
	ps, _ := h.db.AgreedPriors(context.Background(), ws.ID)
	if cur := ps[len(ps)-1]; rec.Questions[0].AgreedPrior == nil || rec.Questions[0].AgreedPrior.Dist != cur.Dist {
		t.Fatalf("exported agreed prior %+v, stored %+v", rec.Questions[0].AgreedPrior, cur.Dist)
	}
	if strings.Contains(body, `"true_value"`) {
		t.Error("export carries an unrevealed true value")
	}

	res, body = h.get(workshopPath(ws.ID) + "/export.csv")
	revs, _ := h.db.Revisions(context.Background(), ws.ID)
	if lines := strings.Count(strings.TrimSpace(body), "\n"); res.StatusCode != http.StatusOK || lines != len(revs) {
		t.Fatalf("export.csv: %d, %d rows for %d revisions", res.StatusCode, lines, len(revs))
	}
	res, body = h.get(qp + "/export.csv")
	if res.StatusCode != http.StatusOK || strings.Count(strings.TrimSpace(body), "\n") != 3 {
		t.Fatalf("question export.csv: %d\n%s", res.StatusCode, body)
	}
	if res, _ := h.get(questionPath(ws.ID, 999) + "/export.json"); res.StatusCode != http.StatusNotFound {
		t.Fatalf("export of a missing question: %d", res.StatusCode)
	}
}

func TestEditWorkshopAndEscaping(t *testing.T) {
	h := newHarness(t)
	h.signIn()
	ws := h.newWorkshop("Plain title")
	evil := `<script>alert("x")</script>`
	if res, _ := h.post(workshopPath(ws.ID)+"/edit", url.Values{"title": {evil}, "purpose": {"p & q"}, "notes": {"n"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("edit: %d", res.StatusCode)
	}
	got, _ := h.db.Workshop(context.Background(), ws.ID)
	if got.Title != evil || got.Purpose != "p & q" {
		t.Fatalf("edit stored %+v", got)
	}
	for _, path := range []string{"/", workshopPath(ws.ID), workshopPath(ws.ID) + "/report"} {
		_, body := h.get(path)
		if strings.Contains(body, evil) || !strings.Contains(body, "&lt;script&gt;") {
			t.Errorf("%s: typed text not escaped", path)
		}
	}
}

// TestDecisionLogInSentences: the log and the report write each decision
// in words, with names and rounded numbers; the raw JSON stays in the
// export.
func TestDecisionLogInSentences(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	ctx := context.Background()
	wp := workshopPath(ws.ID)
	qp := questionPath(ws.ID, qs[0].ID)
	wf := url.Values{"scheme": {"custom"}, "reason": {"Ole is overconfident (invented)"}}
	for i, e := range es {
		wf.Set(weightField(e.ID), []string{"2", "1", "1", "0"}[i])
	}
	steps := []struct {
		path string
		form url.Values
	}{
		{qp + "/weights", wf},
		{qp + "/agree", url.Values{"source": {"pool"}, "confirm_open": {"on"}, "rationale": {"Pool (invented)."}}},
		{wp + "/round", url.Values{"action": {"close"}}},
		{wp + "/round", url.Values{"action": {"open"}, "reason": {"Spread discussed (invented)."}}},
		{calibrationPath(ws.ID) + "/q/" + fmt.Sprint(qs[1].ID), url.Values{"true_value": {"0.0413"}, "reveal": {"on"}, "reason": {"Shown after round 2 (invented)."}}},
		{calibrationPath(ws.ID) + "/q/" + fmt.Sprint(qs[1].ID), url.Values{"true_value": {"0.0415"}, "reason": {"Typo (invented)."}}},
		{expertActionPath(ws.ID, es[3].ID, "revoke"), url.Values{"reason": {"Left (invented)."}, "confirm": {"yes"}}},
	}
	for _, st := range steps {
		if res, body := h.post(st.path, st.form); res.StatusCode != http.StatusSeeOther {
			t.Fatalf("POST %s: %d %s", st.path, res.StatusCode, body)
		}
	}
	ps, _ := h.db.AgreedPriors(ctx, ws.ID)
	if len(ps) != 2 { // the demo's own and the pool's
		t.Fatalf("%d agreed priors", len(ps))
	}
	beta := "Beta(" + fv(ps[1].Dist.Alpha) + ", " + fv(ps[1].Dist.Beta.Beta) + "): the single Beta representing the custom-weight pool." // the weights set above
	want := []string{
		"Ines Varga joined the panel", "Ole Brandt joined the panel",
		"Ines Varga 50%, Tomas Lindqvist 25%, Priya Raman 25%, Ole Brandt 0%",
		beta,
		"Round 1 closed", "Round 2 opened",
		"True value 0.0413 shown to the experts.", "True value changed to 0.0415",
		"Ole Brandt&#39;s private link stopped working.",
		"Calibration question, asked as quantiles at 25%, 50%, 75%.",
	}
	_, report := h.get(wp + "/report")
	if !strings.Contains(report, "Pool weights in force: weights set by the facilitator, since ") || !strings.Contains(report, "UTC: “Ole is overconfident (invented)”.") {
		t.Error("the report does not name the weights in force in words")
	}
	for _, path := range []string{wp + "/log", wp + "/report"} {
		_, body := h.get(path)
		// The revocation applies to him: labelled and with its role on
		// the log's own page, plain in the report.
		applies := `<td>Ole Brandt</td>`
		if path == wp+"/log" {
			applies = `<td data-label="Applies to" role="cell">Ole Brandt</td>`
		}
		for _, w := range append(want, applies) {
			if !strings.Contains(body, w) {
				t.Errorf("%s lacks %q", path, w)
			}
		}
		for _, raw := range []string{"expert_id", "by_expert", "&#34;round&#34;", "&#34;alpha&#34;", "&#34;true_value&#34;"} {
			if strings.Contains(body, raw) {
				t.Errorf("%s shows raw event data %q", path, raw)
			}
		}
	}
	_, body := h.get(wp + "/export.json")
	if !strings.Contains(body, `expert_id`) || !strings.Contains(body, `by_expert`) {
		t.Error("the export lost the events' raw data")
	}
}

// TestReportHistoryShowsWhatWasStated: the report's revision history
// carries each expert's stated values in the question's format, and the
// reason, beside the fitted Beta.
func TestReportHistoryShowsWhatWasStated(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	ctx := context.Background()
	wp := workshopPath(ws.ID)
	for _, form := range []url.Values{
		{"wording": {"Interval"}, "quantity": {"q interval"}, "lower": {"0"}, "upper": {"1"}, "format": {"interval"}},
		{"wording": {"Chips"}, "quantity": {"q chips"}, "lower": {"0"}, "upper": {"0.5"}, "format": {"chips"}, "bin_edges": {"0 0.1 0.2 0.3 0.5"}, "chips": {"20"}},
	} {
		if res, body := h.post(wp+"/questions", form); res.StatusCode != http.StatusSeeOther {
			t.Fatalf("add question %s: %d %s", form.Get("quantity"), res.StatusCode, body)
		}
	}
	all, _ := h.db.Questions(ctx, ws.ID)
	byName := map[string]workshop.Question{}
	for _, q := range all {
		byName[q.Quantity] = q
	}
	for _, rv := range []workshop.Revision{
		{QuestionID: byName["q interval"].ID, ExpertID: es[0].ID, Answer: workshop.Answer{Lowest: 0.02, Highest: 0.2, Best: 0.06, Confidence: 0.9}},
		{QuestionID: byName["q chips"].ID, ExpertID: es[1].ID, Answer: workshop.Answer{Counts: []int{5, 10, 5, 0}}},
		{QuestionID: qs[0].ID, ExpertID: es[0].ID, Reason: "Heard of a recall (invented).", Answer: workshop.Answer{Values: []float64{0.02, 0.05, 0.15}}},
	} {
		if err := h.db.SaveRevision(ctx, &rv); err != nil {
			t.Fatal(err)
		}
	}
	_, body := h.get(wp + "/report")
	i, j := strings.Index(body, "Full revision history"), strings.Index(body, "<h2>Decision log</h2>")
	if i < 0 || j < i {
		t.Fatal("report has no revision history before its decision log")
	}
	history := body[i:j]
	for _, want := range []string{
		"<th scope=\"col\">Stated</th>",
		// Each value joined to its name by a no-break space.
		"5%:\u00a00.01; 50%:\u00a00.04; 95%:\u00a00.12", // the demo's round-1 answer of Ines
		"5%:\u00a00.02; 50%:\u00a00.05; 95%:\u00a00.15", // her revision
		"Heard of a recall (invented).",                 // and its reason
		"lowest\u00a00.02; highest\u00a00.2; best\u00a00.06; sure\u00a090%",
		"chips 5, 10, 5, 0",
	} {
		if !strings.Contains(history, want) {
			t.Errorf("revision history lacks %q", want)
		}
	}
}

// TestOverviewCarriesEarlierAnswers: in round 2 an answer from round 1 is
// still the expert's current judgement; the overview says so, per cell
// and in the roster's count.
func TestOverviewCarriesEarlierAnswers(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	wp := workshopPath(ws.ID)
	// The demo: Ines answered Q1, Q2 and the three further calibration
	// questions in round 1, not Q3; Priya did not answer Q1.
	row := func(body, name string) string {
		t.Helper()
		i := strings.Index(body, `<section id="answered"`)
		j := strings.Index(body[max(i, 0):], `<th scope="row">`+name)
		if i < 0 || j < 0 {
			t.Fatalf("no answered row for %s", name)
		}
		r := body[i+j:]
		// A cell keeps its count on one line in a span of its own.
		return strings.NewReplacer(`<span class="nowrap">`, "", "</span>", "").Replace(r[:strings.Index(r, "</tr>")])
	}
	_, body := h.get(wp)
	if r := row(body, "Ines Varga"); !strings.Contains(r, "answered (1 save)") || !strings.Contains(r, "no answer yet") {
		t.Errorf("round 1, Ines: %s", r)
	}
	if !strings.Contains(body, "5 of 6 have a current answer") || strings.Contains(body, "revised this round") {
		t.Error("round 1 roster count wrong")
	}
	for _, f := range []url.Values{{"action": {"close"}}, {"action": {"open"}, "reason": {"Discussed (invented)."}}} {
		if res, _ := h.post(wp+"/round", f); res.StatusCode != http.StatusSeeOther {
			t.Fatalf("round %v: %d", f, res.StatusCode)
		}
	}
	rv := workshop.Revision{QuestionID: qs[0].ID, ExpertID: es[0].ID, Reason: "After discussion (invented).",
		Answer: workshop.Answer{Values: []float64{0.015, 0.045, 0.11}}}
	if err := h.db.SaveRevision(context.Background(), &rv); err != nil || rv.Round != 2 {
		t.Fatalf("revise in round 2: %v, round %d", err, rv.Round)
	}
	_, body = h.get(wp)
	cells := strings.Split(row(body, "Ines Varga"), "<td")[1:]
	want := []string{"revised in round 2 (1 save)", "carried from round 1", "no answer yet", "carried from round 1"}
	for i, w := range want {
		if i >= len(cells) || !strings.Contains(cells[i], w) {
			t.Errorf("round 2, Ines, Q%d: want %q, row %v", i+1, w, cells)
		}
	}
	if r := row(body, "Priya Raman"); !strings.Contains(r, "no answer yet") || !strings.Contains(r, "carried from round 1") || strings.Contains(r, "not yet<") {
		t.Errorf("round 2, Priya: %s", r)
	}
	for _, w := range []string{"5 of 6 have a current answer; 1 revised this round", "3 of 6 have a current answer; 0 revised this round"} {
		if !strings.Contains(body, w) {
			t.Errorf("round 2 roster lacks %q", w)
		}
	}
	// Priya's first answer to Q1, in round 2, revises nothing: it was
	// counted and named as a revision.
	priya := es[slices.IndexFunc(es, func(e workshop.Expert) bool { return strings.HasPrefix(e.Name, "Priya") })]
	first := workshop.Revision{QuestionID: qs[0].ID, ExpertID: priya.ID, Reason: "Joined the question late (invented).",
		Answer: workshop.Answer{Values: []float64{0.02, 0.05, 0.12}}}
	if err := h.db.SaveRevision(context.Background(), &first); err != nil {
		t.Fatalf("Priya's first answer in round 2: %v", err)
	}
	_, body = h.get(wp)
	if cells := strings.Split(row(body, "Priya Raman"), "<td")[1:]; len(cells) == 0 || !strings.Contains(cells[0], "first answered in round 2 (1 save)") {
		t.Errorf("round 2, Priya, Q1: want %q, row %v", "first answered in round 2 (1 save)", cells)
	}
	if w := "of 6 have a current answer; 0 revised this round, 1 first answered this round"; !strings.Contains(body, w) {
		t.Errorf("round 2 roster lacks %q", w)
	}
}

// TestPanelWeightsPointToCalibration: the question panel's weights form
// names the scheme in force and leads to the calibration page, where
// performance weights are chosen.
func TestPanelWeightsPointToCalibration(t *testing.T) {
	p := newSeedPanel(t)
	h := p.h
	qp := questionPath(p.ws.ID, p.targets[0].ID)
	weights := func() string {
		t.Helper()
		_, body := h.get(qp)
		i := strings.Index(body, "<h3>Weights</h3>")
		j := strings.Index(body[max(i, 0):], "</form>")
		if i < 0 || j < 0 {
			t.Fatal("panel has no weights form")
		}
		return body[i : i+j]
	}
	link := `href="` + calibrationPath(p.ws.ID) + `"`
	if w := weights(); !strings.Contains(w, "In force: equal weights.") || !strings.Contains(w, link) {
		t.Errorf("weights before any choice:\n%s", w)
	}
	p.enterTruths(t, false)
	if res, body := h.post(p.path()+"/weights", url.Values{"scheme": {"performance"}, "reason": {"Seeds scored (invented)"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("performance weights: %d %s", res.StatusCode, body)
	}
	if w := weights(); !strings.Contains(w, "In force: performance weights from the calibration questions, since ") ||
		!strings.Contains(w, link) || !strings.Contains(w, "replaces them") {
		t.Errorf("weights after choosing performance weights:\n%s", w)
	}
}

// The invented-data banner shows on every invented workshop, whatever its
// scenario, so it names none (it once named the demo's inverter on a
// water-mains panel).
func TestInventedBannerNamesNoScenario(t *testing.T) {
	var b strings.Builder
	if err := inventedBanner().Render(context.Background(), &b); err != nil {
		t.Fatal(err)
	}
	if s := b.String(); !strings.Contains(s, "made up") || strings.Contains(s, "inverter") || strings.Contains(s, "utility") {
		t.Errorf("banner: %s", s)
	}
}

// The pool is named by the weights in force on the facilitator's panel
// (its table and its picture) and in the report, as the study page and
// the experts' pages name it: "Equal-weight pool" until other weights are
// set, then "Custom-weight pool".
func TestPoolNamedByItsWeights(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	qp := questionPath(ws.ID, qs[0].ID)
	if _, body := h.get(qp); !strings.Contains(body, `<th scope="row">Equal-weight pool</th>`) || !strings.Contains(body, `data-label="Equal-weight pool"`) {
		t.Error("under equal weights the panel does not name the Equal-weight pool")
	}
	form := url.Values{"scheme": {"custom"}, "reason": {"Ines knows this model best (invented)"}}
	for i, e := range es {
		form.Set(weightField(e.ID), []string{"3", "1", "1", "1"}[i])
	}
	if res, body := h.post(qp+"/weights", form); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("weights: %d %s", res.StatusCode, body)
	}
	_, body := h.get(qp)
	if !strings.Contains(body, `<th scope="row">Custom-weight pool</th>`) || !strings.Contains(body, `data-label="Custom-weight pool"`) {
		t.Error("under custom weights the panel does not name the Custom-weight pool")
	}
	if strings.Contains(body, `<th scope="row">Equal-weight pool</th>`) {
		t.Error("under custom weights the panel's table still names the Equal-weight pool")
	}
	if _, report := h.get(workshopPath(ws.ID) + "/report"); !strings.Contains(report, `data-label="Custom-weight pool"`) {
		t.Error("the report's picture does not name the Custom-weight pool")
	}
}

// A chips question whose bounds lie far from 0 for their width (a
// pressure between 1000 and 1001 kPa, invented) takes Parley's default
// bins when its edges are left blank: they were all rounded onto 1000
// and 1001, and the form refused bin_edges, a field left empty.
func TestDefaultBinsOnBoundsFarFromZero(t *testing.T) {
	h, ws, _, _, _ := seeded(t)
	form := url.Values{"wording": {"Pressure at the outlet?"}, "quantity": {"outlet pressure"}, "units": {"kPa"},
		"lower": {"1000"}, "upper": {"1001"}, "format": {"chips"}, "bin_edges": {""}, "chips": {"24"}}
	if res, body := h.post(workshopPath(ws.ID)+"/questions", form); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("add question: %d, bin_edges: %q", res.StatusCode, shownError(body, inputID("bin_edges")))
	}
	all, _ := h.db.Questions(context.Background(), ws.ID)
	q := all[len(all)-1]
	if got := fmt.Sprint(q.BinEdges); got != "[1000 1000.125 1000.25 1000.375 1000.5 1000.625 1000.75 1000.875 1001]" {
		t.Errorf("bins stored as %s", got)
	}
}

// The agreed prior's summary on the question's panel reads "Beta(2.951,
// 55.56) on [0, 1] — …": a Go block between the bold Beta and the words
// after it had swallowed the space, "Beta(2.951, 55.56)on [0, 1]".
func TestAgreedSummaryKeepsItsSpaces(t *testing.T) {
	q := workshop.Question{ID: 1, Position: 1, Quantity: "invented share", Lower: 0, Upper: 1}
	html := renderText(t, agreedSummary(q, workshop.AgreedPrior{Dist: elicit.Unit(elicit.Beta{Alpha: 2.951, Beta: 55.56}), Round: 1}, ""))
	if !regexp.MustCompile(`Beta\(2\.951, 55\.56\)</strong>\s+on \[0, 1\]`).MatchString(html) {
		t.Errorf("the agreed prior's summary runs the Beta into its scale:\n%s", html)
	}
}

package web_test

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"io"
	"math"
	"net/http"
	"net/http/cookiejar"
	"net/http/httptest"
	"net/url"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/store"
	"github.com/parley-elicit/parley/web"
)

// The whole-workshop test drives one invented workshop (a panel judging a
// regional rail operator's share of late trains) through the facilitator's
// and the experts' HTTP forms on a real loopback listener over a real
// SQLite file, then checks the exported record against what package elicit
// computes from the very answers this test typed.

// flowClient posts forms the way a browser does: an Origin header naming
// the server, and redirects shown to the caller rather than followed.
type flowClient struct {
	t      *testing.T
	base   string
	client *http.Client
}

func newFlowClient(t *testing.T, base string, withJar bool) *flowClient {
	t.Helper()
	c := &http.Client{CheckRedirect: func(*http.Request, []*http.Request) error { return http.ErrUseLastResponse }}
	if withJar {
		jar, err := cookiejar.New(nil)
		if err != nil {
			t.Fatal(err)
		}
		c.Jar = jar
	}
	return &flowClient{t: t, base: base, client: c}
}

func (c *flowClient) post(path string, form url.Values) (*http.Response, string) {
	c.t.Helper()
	req, err := http.NewRequest(http.MethodPost, c.base+path, strings.NewReader(form.Encode()))
	if err != nil {
		c.t.Fatal(err)
	}
	req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
	req.Header.Set("Origin", c.base)
	return c.do(req)
}

func (c *flowClient) get(path string) (*http.Response, string) {
	c.t.Helper()
	req, err := http.NewRequest(http.MethodGet, c.base+path, nil)
	if err != nil {
		c.t.Fatal(err)
	}
	return c.do(req)
}

func (c *flowClient) do(req *http.Request) (*http.Response, string) {
	c.t.Helper()
	res, err := c.client.Do(req)
	if err != nil {
		c.t.Fatal(err)
	}
	defer res.Body.Close()
	b, err := io.ReadAll(res.Body)
	if err != nil {
		c.t.Fatal(err)
	}
	return res, string(b)
}

// mustPost posts and fails the test unless the answer has status want.
func (c *flowClient) mustPost(what, path string, form url.Values, want int) (*http.Response, string) {
	c.t.Helper()
	res, body := c.post(path, form)
	if res.StatusCode != want {
		c.t.Fatalf("%s: POST %s: status %d, want %d\n%s", what, path, res.StatusCode, want, body)
	}
	return res, body
}

// exportJSON downloads and decodes the workshop's record.
func (c *flowClient) exportJSON(wp string) record.Record {
	c.t.Helper()
	res, body := c.get(wp + "/export.json")
	if res.StatusCode != http.StatusOK {
		c.t.Fatalf("export.json: %d %s", res.StatusCode, body)
	}
	if strings.Contains(body, "NaN") {
		c.t.Errorf("export.json contains NaN")
	}
	var rec record.Record
	if err := json.Unmarshal([]byte(body), &rec); err != nil {
		c.t.Fatalf("export.json does not decode: %v", err)
	}
	return rec
}

// sentRevision is one answer the test typed into an expert's form, and
// the answer elicit is given for it.
type sentRevision struct {
	expert   string
	question string // quantity
	round    int
	reason   string
	answer   workshop.Answer
	id       int64 // filled in from the export
}

func TestWholeWorkshop(t *testing.T) {
	ctx := context.Background()
	db, err := store.Open(filepath.Join(t.TempDir(), "parley.db"))
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { db.Close() })
	srv, err := web.New(db, web.Options{})
	if err != nil {
		t.Fatal(err)
	}
	ts := httptest.NewServer(srv.Handler())
	t.Cleanup(ts.Close)
	secret, err := web.EnsureFacilitatorSecret(ctx, db)
	if err != nil || secret == "" {
		t.Fatalf("facilitator secret %q: %v", secret, err)
	}

	fac := newFlowClient(t, ts.URL, true)
	if res, _ := fac.get("/"); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("before sign-in GET / gave %d, want a redirect to /signin", res.StatusCode)
	}
	fac.mustPost("sign in", "/signin", url.Values{"secret": {secret}}, http.StatusSeeOther)

	// The workshop.
	res, _ := fac.mustPost("create workshop", "/workshops", url.Values{
		"title":    {"Late trains panel (invented)"},
		"purpose":  {"An invented scenario: a prior for the share of a regional operator's trains arriving late."},
		"decision": {"timetable slack (invented)"},
	}, http.StatusSeeOther)
	wp := res.Header.Get("Location")
	if !regexp.MustCompile(`^/w/\d+/?$`).MatchString(wp) {
		t.Fatalf("create workshop redirected to %q", wp)
	}
	wp = strings.TrimRight(wp, "/")

	// Two questions: 5/50/95 quantiles on [0, 1], and the four-value
	// interval format.
	const qLate, qCancel = "Late share", "Cancelled share"
	fac.mustPost("add quantile question", wp+"/questions", url.Values{
		"wording":  {"What share of next year's trains will arrive more than five minutes late?"},
		"quantity": {qLate}, "units": {"proportion"}, "lower": {"0"}, "upper": {"1"},
		"format": {"quantiles"}, "preset": {"p05_50_95"},
	}, http.StatusSeeOther)
	fac.mustPost("add interval question", wp+"/questions", url.Values{
		"wording":  {"What share of next year's trains will be cancelled outright?"},
		"quantity": {qCancel}, "units": {"proportion"}, "lower": {"0"}, "upper": {"1"},
		"format": {"interval"},
	}, http.StatusSeeOther)
	// The questions as this test defined them; elicit fits with these, not
	// with what the server stored.
	defs := map[string]workshop.Question{
		qLate:   {Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95}, Wording: "w", Quantity: qLate},
		qCancel: {Lower: 0, Upper: 1, Format: workshop.FormatInterval, Wording: "w", Quantity: qCancel},
	}

	// Three experts; each private link is shown once on the page.
	names := []string{"Ilse Varga (invented)", "Tomasz Brenn (invented)", "Ruth Okafor (invented)"}
	linkRE := regexp.MustCompile(regexp.QuoteMeta(ts.URL) + `(/e/[A-Za-z0-9_-]{43})/`)
	links := map[string]string{}
	for _, n := range names {
		res, _ := fac.mustPost("add expert", wp+"/experts", url.Values{"name": {n}, "expertise": {"rail operations (invented)"}}, http.StatusSeeOther)
		_, body := fac.get(res.Header.Get("Location"))
		m := linkRE.FindAllStringSubmatch(body, -1)
		if len(m) == 0 {
			t.Fatalf("no private link for %s on the page", n)
		}
		links[n] = m[0][1]
	}

	rec := fac.exportJSON(wp)
	qid := map[string]int64{}
	for _, q := range rec.Questions {
		qid[q.Quantity] = q.ID
	}
	eid := map[string]int64{}
	for _, e := range rec.Experts {
		eid[e.Name] = e.ID
	}
	if len(qid) != 2 || len(eid) != 3 {
		t.Fatalf("record after setup: questions %v, experts %v", qid, eid)
	}

	experts := newFlowClient(t, ts.URL, false)
	var sent []sentRevision
	answer := func(name, quantity string, round int, reason string, typed ...string) {
		t.Helper()
		form := url.Values{"reason": {reason}}
		var a workshop.Answer
		nums := make([]float64, len(typed))
		for i, s := range typed {
			x, err := strconv.ParseFloat(s, 64)
			if err != nil {
				t.Fatal(err)
			}
			nums[i] = x
		}
		switch defs[quantity].Format {
		case workshop.FormatInterval:
			for i, k := range []string{"lowest", "highest", "best", "confidence"} {
				form.Set(k, typed[i])
			}
			a = workshop.Answer{Lowest: nums[0], Highest: nums[1], Best: nums[2], Confidence: nums[3] / 100}
		default:
			for i, s := range typed {
				form.Set("values["+strconv.Itoa(i)+"]", s)
			}
			a = workshop.Answer{Values: nums}
		}
		path := links[name] + "/q/" + strconv.FormatInt(qid[quantity], 10) + "/save"
		experts.mustPost(name+" answers "+quantity, path, form, http.StatusSeeOther)
		sent = append(sent, sentRevision{expert: name, question: quantity, round: round, reason: reason, answer: a})
	}

	// Round 1: everyone answers both questions.
	answer(names[0], qLate, 1, "", "0.04", "0.09", "0.18")
	answer(names[1], qLate, 1, "", "0.02", "0.06", "0.15")
	answer(names[2], qLate, 1, "from last winter's figures (invented)", "0.07", "0.12", "0.25")
	answer(names[0], qCancel, 1, "", "0.002", "0.03", "0.01", "80")
	answer(names[1], qCancel, 1, "", "0.005", "0.04", "0.015", "90")
	answer(names[2], qCancel, 1, "", "0.001", "0.02", "0.006", "70")
	round1 := fac.exportJSON(wp).Revisions
	if len(round1) != 6 {
		t.Fatalf("after round 1 the record has %d revisions, want 6", len(round1))
	}

	// Close round 1: a save is then refused with 409 and nothing is kept.
	fac.mustPost("close round 1", wp+"/round", url.Values{"action": {"close"}}, http.StatusSeeOther)
	experts.mustPost("save while closed", links[names[0]]+"/q/"+strconv.FormatInt(qid[qLate], 10)+"/save",
		url.Values{"values[0]": {"0.05"}, "values[1]": {"0.1"}, "values[2]": {"0.2"}}, http.StatusConflict)
	const openReason = "The spread of the late-share medians needs discussion (invented)."
	fac.mustPost("open round 2", wp+"/round", url.Values{"action": {"open"}, "reason": {openReason}}, http.StatusSeeOther)

	// Round 2: two experts revise, with reasons.
	answer(names[1], qLate, 2, "heard the others on winter storms (invented)", "0.03", "0.08", "0.17")
	answer(names[2], qLate, 2, "last winter was unusual (invented)", "0.05", "0.1", "0.2")
	answer(names[2], qCancel, 2, "cancellations were over-counted (invented)", "0.002", "0.025", "0.008", "75")
	wantRevisions := 6 + 3

	// Custom weights with a reason, then the agreed priors.
	weights := map[string]float64{names[0]: 3, names[1]: 1, names[2]: 2}
	const weightsReason = "Ilse ran the operator's delay statistics for a decade (invented)."
	wf := url.Values{"scheme": {"custom"}, "reason": {weightsReason}}
	for n, w := range weights {
		wf.Set("weights["+strconv.FormatInt(eid[n], 10)+"]", strconv.FormatFloat(w, 'g', -1, 64))
	}
	qp := func(q string) string { return wp + "/q/" + strconv.FormatInt(qid[q], 10) }
	fac.mustPost("custom weights", qp(qLate)+"/weights", wf, http.StatusSeeOther)
	const poolRationale = "The weighted pool is close enough to a single Beta (invented)."
	fac.mustPost("agree pool", qp(qLate)+"/agree", url.Values{"source": {"pool"}, "confirm_open": {"on"}, "rationale": {poolRationale}}, http.StatusSeeOther)
	const consensusRationale = "The panel settled on one interval after discussion (invented)."
	consensus := workshop.Answer{Lowest: 0.002, Highest: 0.03, Best: 0.009, Confidence: 0.8}
	fac.mustPost("agree consensus", qp(qCancel)+"/agree", url.Values{"source": {"consensus"}, "confirm_open": {"on"}, "rationale": {consensusRationale},
		"lowest": {"0.002"}, "highest": {"0.03"}, "best": {"0.009"}, "confidence": {"80"}}, http.StatusSeeOther)

	rec = fac.exportJSON(wp)

	// Every revision the test sent is in the record once, oldest first,
	// with the fit elicit gives for the typed answer.
	if len(rec.Revisions) != wantRevisions || len(sent) != wantRevisions {
		t.Fatalf("record has %d revisions, test sent %d, want %d", len(rec.Revisions), len(sent), wantRevisions)
	}
	fits := map[int64]elicit.Fit{}
	for i, s := range sent {
		rv := rec.Revisions[i]
		if rv.ExpertID != eid[s.expert] || rv.QuestionID != qid[s.question] || rv.Round != s.round || rv.Reason != s.reason {
			t.Errorf("revision %d: expert %d question %d round %d reason %q; sent %s/%s round %d reason %q",
				i, rv.ExpertID, rv.QuestionID, rv.Round, rv.Reason, s.expert, s.question, s.round, s.reason)
		}
		if !sameAnswer(rv.Answer, s.answer) {
			t.Errorf("revision %d stored %+v, sent %+v", i, rv.Answer, s.answer)
		}
		want, err := defs[s.question].Fit(s.answer)
		if err != nil {
			t.Fatalf("revision %d: elicit cannot fit the sent answer: %v", i, err)
		}
		if rv.Fit == nil {
			t.Fatalf("revision %d has no fit: %s", i, rv.FitError)
		}
		if !close9(rv.Fit.Dist.Alpha, want.Dist.Alpha) || !close9(rv.Fit.Dist.Beta.Beta, want.Dist.Beta.Beta) {
			t.Errorf("revision %d fit Beta(%v, %v), elicit gives Beta(%v, %v)", i,
				rv.Fit.Dist.Alpha, rv.Fit.Dist.Beta.Beta, want.Dist.Alpha, want.Dist.Beta.Beta)
		}
		sent[i].id = rv.ID
		fits[rv.ID] = want
	}

	// Append-only: the round-1 revisions are still there, unchanged, after
	// the round-2 revisions.
	for i, r1 := range round1 {
		rv := rec.Revisions[i]
		if rv.ID != r1.ID || rv.Round != 1 || !sameAnswer(rv.Answer, r1.Answer) || !rv.At.Equal(r1.At) {
			t.Errorf("round-1 revision %d changed: was %+v, now %+v", r1.ID, r1.Revision, rv.Revision)
		}
	}

	// Current fits are the latest revisions.
	latest := map[[2]int64]sentRevision{}
	for _, s := range sent {
		latest[[2]int64{qid[s.question], eid[s.expert]}] = s
	}
	byQuantity := map[string]record.Question{}
	for _, q := range rec.Questions {
		byQuantity[q.Quantity] = q
	}
	for _, quantity := range []string{qLate, qCancel} {
		q := byQuantity[quantity]
		if len(q.CurrentFits) != len(names) {
			t.Fatalf("%s: %d current fits, want %d", quantity, len(q.CurrentFits), len(names))
		}
		for _, cf := range q.CurrentFits {
			want := latest[[2]int64{q.ID, cf.ExpertID}]
			if cf.RevisionID != want.id || cf.Round != want.round {
				t.Errorf("%s expert %d: current revision %d round %d, latest sent %d round %d",
					quantity, cf.ExpertID, cf.RevisionID, cf.Round, want.id, want.round)
			}
			if cf.Fit == nil || cf.Fit.Dist != rec.Revisions[indexOf(rec.Revisions, want.id)].Fit.Dist {
				t.Errorf("%s expert %d: current fit is not the latest revision's", quantity, cf.ExpertID)
			}
		}
	}

	// The late-share pool under the custom weights.
	var dists []elicit.ScaledBeta
	var ws []float64
	wsum, mix := 0.0, 0.0
	for _, n := range names {
		f := fits[latest[[2]int64{qid[qLate], eid[n]}].id]
		dists = append(dists, f.Dist)
		ws = append(ws, weights[n])
		// Beta mean α/(α+β) (Johnson, Kotz & Balakrishnan 1995, ch. 25).
		mix += weights[n] * f.Dist.Alpha / (f.Dist.Alpha + f.Dist.Beta.Beta)
		wsum += weights[n]
	}
	// The mean of a finite mixture is the weight-averaged mean of its
	// components (law of total expectation; e.g. Frühwirth-Schnatter 2006,
	// "Finite Mixture and Markov Switching Models", §1.2.4; from memory).
	// elicit's TestBestBetaAgainstSciPy checks Pool.Mean and Pool.SD
	// against SciPy's moments, which its script checks by quadrature.
	mix /= wsum
	late := byQuantity[qLate]
	if late.Pool == nil {
		t.Fatalf("late share has no pool: %s", late.PoolError)
	}
	if math.Abs(late.Pool.Mean-mix) > 1e-9 {
		t.Errorf("pool mean %v, weighted mean of the fitted means %v", late.Pool.Mean, mix)
	}
	for _, pw := range late.Pool.Weights {
		var n string
		for name, id := range eid {
			if id == pw.ExpertID {
				n = name
			}
		}
		if math.Abs(pw.Weight-weights[n]/wsum) > 1e-12 {
			t.Errorf("pool weight of %q is %v, want %v", n, pw.Weight, weights[n]/wsum)
		}
	}
	pool, err := elicit.LinearPool(dists, ws)
	if err != nil {
		t.Fatal(err)
	}
	best, err := pool.BestBeta()
	if err != nil {
		t.Fatal(err)
	}
	ap := late.AgreedPrior
	if ap == nil || ap.Source != workshop.PriorFromPool || ap.Rationale != poolRationale || ap.Round != 2 {
		t.Fatalf("late share agreed prior %+v", ap)
	}
	if !close9(ap.Dist.Alpha, best.Dist.Alpha) || !close9(ap.Dist.Beta.Beta, best.Dist.Beta.Beta) ||
		ap.Dist.Lower != 0 || ap.Dist.Upper != 1 {
		t.Errorf("agreed pool prior %+v, LinearPool(...).BestBeta() gives %+v", ap.Dist, best.Dist)
	}

	// The cancelled-share consensus prior is elicit's fit of the agreed
	// interval.
	wantC, err := defs[qCancel].Fit(consensus)
	if err != nil {
		t.Fatal(err)
	}
	cp := byQuantity[qCancel].AgreedPrior
	if cp == nil || cp.Source != workshop.PriorFromConsensus || cp.Rationale != consensusRationale || cp.Consensus == nil ||
		!sameAnswer(*cp.Consensus, consensus) {
		t.Fatalf("cancelled share agreed prior %+v", cp)
	}
	if !close9(cp.Dist.Alpha, wantC.Dist.Alpha) || !close9(cp.Dist.Beta.Beta, wantC.Dist.Beta.Beta) {
		t.Errorf("consensus prior %+v, elicit's fit %+v", cp.Dist, wantC.Dist)
	}

	// The weights in the record.
	if rec.Weights.Scheme != workshop.WeightsCustom || rec.Weights.Reason != weightsReason {
		t.Errorf("record weights %+v", rec.Weights)
	}
	for n, w := range weights {
		if rec.Weights.ByExpert[eid[n]] != w {
			t.Errorf("record weight of %s is %v, sent %v", n, rec.Weights.ByExpert[eid[n]], w)
		}
	}

	// The decisions are events with their reasons.
	type ev struct {
		kind     workshop.EventKind
		question int64
		reason   string
	}
	have := map[ev]int{}
	for _, e := range rec.Events {
		have[ev{e.Kind, e.QuestionID, e.Reason}]++
	}
	for _, want := range []ev{
		{workshop.EventRoundClosed, 0, ""},
		{workshop.EventRoundOpened, 0, openReason},
		{workshop.EventWeightsSet, 0, weightsReason},
		{workshop.EventPriorAgreed, qid[qLate], poolRationale},
		{workshop.EventPriorAgreed, qid[qCancel], consensusRationale},
	} {
		if have[want] != 1 {
			t.Errorf("events: %d of %+v, want 1 (events %+v)", have[want], want, rec.Events)
		}
	}
	if n := countKind(rec.Events, workshop.EventExpertAdded); n != len(names) {
		t.Errorf("events: %d experts added, want %d", n, len(names))
	}
	if n := countKind(rec.Events, workshop.EventQuestionAdded); n != 2 {
		t.Errorf("events: %d questions added, want 2", n)
	}

	// The CSV: one row per revision, each revision once, with the same fit.
	res, body := fac.get(wp + "/export.csv")
	if res.StatusCode != http.StatusOK || !strings.HasPrefix(res.Header.Get("Content-Type"), "text/csv") {
		t.Fatalf("export.csv: %d %s", res.StatusCode, res.Header.Get("Content-Type"))
	}
	rows, err := csv.NewReader(bytes.NewReader([]byte(body))).ReadAll()
	if err != nil {
		t.Fatalf("export.csv does not parse: %v", err)
	}
	col := map[string]int{}
	for i, h := range rows[0] {
		col[h] = i
	}
	for _, h := range []string{"revision_id", "expert_id", "question_id", "round", "alpha", "beta"} {
		if _, ok := col[h]; !ok {
			t.Fatalf("export.csv has no %q column: %v", h, rows[0])
		}
	}
	if len(rows)-1 != wantRevisions {
		t.Errorf("export.csv has %d rows, want %d", len(rows)-1, wantRevisions)
	}
	seen := map[int64]int{}
	for _, row := range rows[1:] {
		id, err := strconv.ParseInt(row[col["revision_id"]], 10, 64)
		if err != nil {
			t.Fatalf("export.csv revision_id %q", row[col["revision_id"]])
		}
		seen[id]++
		want, ok := fits[id]
		if !ok {
			t.Errorf("export.csv has revision %d, which the test did not send", id)
			continue
		}
		a, errA := strconv.ParseFloat(row[col["alpha"]], 64)
		b, errB := strconv.ParseFloat(row[col["beta"]], 64)
		if errA != nil || errB != nil || !close9(a, want.Dist.Alpha) || !close9(b, want.Dist.Beta.Beta) {
			t.Errorf("export.csv revision %d: Beta(%s, %s), elicit gives Beta(%v, %v)", id,
				row[col["alpha"]], row[col["beta"]], want.Dist.Alpha, want.Dist.Beta.Beta)
		}
	}
	for _, s := range sent {
		if seen[s.id] != 1 {
			t.Errorf("export.csv has revision %d %d times, want once", s.id, seen[s.id])
		}
	}
}

func sameAnswer(a, b workshop.Answer) bool {
	if len(a.Values) != len(b.Values) || len(a.Counts) != len(b.Counts) {
		return false
	}
	for i := range a.Values {
		if a.Values[i] != b.Values[i] {
			return false
		}
	}
	for i := range a.Counts {
		if a.Counts[i] != b.Counts[i] {
			return false
		}
	}
	return a.Lowest == b.Lowest && a.Highest == b.Highest && a.Best == b.Best && a.Confidence == b.Confidence
}

// close9 compares fitted parameters to 1e-9, relative for values above 1.
func close9(got, want float64) bool {
	return math.Abs(got-want) <= 1e-9*math.Max(1, math.Abs(want))
}

func indexOf(revs []record.Revision, id int64) int {
	for i, rv := range revs {
		if rv.ID == id {
			return i
		}
	}
	return 0
}

func countKind(evs []workshop.Event, k workshop.EventKind) int {
	n := 0
	for _, e := range evs {
		if e.Kind == k {
			n++
		}
	}
	return n
}

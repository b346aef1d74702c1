package web

import (
	"context"
	"errors"
	"fmt"
	"html"
	"io"
	"net/http"
	"net/http/httptest"
	"net/url"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"

	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/internal/browsertest"
	"github.com/parley-elicit/parley/store"
	"github.com/parley-elicit/parley/web/chart"
)

// expertRig is a real SQLite file, a real server on loopback and an
// invented workshop: a reliability panel on a pump seal's failure share.
type expertRig struct {
	t       *testing.T
	db      *store.DB
	srv     *httptest.Server
	s       *Server
	ws      workshop.Workshop
	q       workshop.Question // quantiles at 5/50/95
	qi      workshop.Question // four-value interval
	qcal    workshop.Question // calibration, true value hidden
	qc      workshop.Question // chips in five bins
	qs      workshop.Question // quantiles on a scale of days, not a proportion
	tokens  []string          // one per expert
	experts []workshop.Expert
}

const hiddenTruth = 0.4321 // the calibration question's true value; never on an expert's page until revealed

func newExpertRig(t *testing.T, names ...string) *expertRig {
	t.Helper()
	ctx := context.Background()
	db, err := store.Open(filepath.Join(t.TempDir(), "parley.db"))
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { db.Close() })
	s, err := New(db, Options{})
	if err != nil {
		t.Fatal(err)
	}
	srv := httptest.NewServer(s.Handler())
	// A browser's page still open holds the expert's event stream, which
	// Close would wait for; the connections are cut first.
	t.Cleanup(func() {
		srv.CloseClientConnections()
		srv.Close()
	})
	g := &expertRig{t: t, db: db, srv: srv, s: s}
	g.ws = workshop.Workshop{Title: "Seal wear panel (invented)", Purpose: "A prior for the share of pump seals that fail within a year.",
		Decision: "spare-part stock", Notes: "FACILITATOR-ONLY-NOTE", Invented: true}
	if err := db.CreateWorkshop(ctx, &g.ws); err != nil {
		t.Fatal(err)
	}
	g.q = workshop.Question{WorkshopID: g.ws.ID, Wording: "What share of seals fail within their first year?",
		Quantity: "Failure share", Units: "proportion", Lower: 0, Upper: 1,
		Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95}}
	g.qi = workshop.Question{WorkshopID: g.ws.ID, Wording: "What share of inspected seals show scoring?",
		Quantity: "Scoring share", Units: "proportion", Lower: 0, Upper: 1, Format: workshop.FormatInterval}
	truth := hiddenTruth
	g.qcal = workshop.Question{WorkshopID: g.ws.ID, Wording: "What share of last year's audited pumps leaked?",
		Quantity: "Leak share", Units: "proportion", Lower: 0, Upper: 1,
		Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95}, Calibration: true, TrueValue: &truth}
	g.qc = workshop.Question{WorkshopID: g.ws.ID, Wording: "Place 20 chips on the share of seals replaced early.",
		Quantity: "Early replacement share", Lower: 0, Upper: 1, Format: workshop.FormatChips,
		BinEdges: []float64{0, 0.1, 0.2, 0.3, 0.5, 1}, Chips: 20}
	g.qs = workshop.Question{WorkshopID: g.ws.ID, Wording: "How many days does a seal repair take?",
		Quantity: "Repair time", Units: "days", Lower: 10, Upper: 50, Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95}}
	for _, q := range []*workshop.Question{&g.q, &g.qi, &g.qcal, &g.qc, &g.qs} {
		if err := db.AddQuestion(ctx, q); err != nil {
			t.Fatal(err)
		}
	}
	if len(names) == 0 {
		names = []string{"Ottilie Marsh"}
	}
	for _, n := range names {
		tok, hash, err := newToken()
		if err != nil {
			t.Fatal(err)
		}
		e := workshop.Expert{WorkshopID: g.ws.ID, Name: n, Affiliation: "Affil of " + n}
		if err := db.AddExpert(ctx, &e, hash); err != nil {
			t.Fatal(err)
		}
		g.tokens = append(g.tokens, tok)
		g.experts = append(g.experts, e)
	}
	return g
}

func (g *expertRig) qpath(i int, q workshop.Question) string {
	return "/e/" + g.tokens[i] + "/q/" + strconv.FormatInt(q.ID, 10)
}

// get fetches path and returns status and body.
func (g *expertRig) get(path string) (int, string) {
	g.t.Helper()
	resp, err := http.Get(g.srv.URL + path)
	if err != nil {
		g.t.Fatal(err)
	}
	defer resp.Body.Close()
	b, _ := io.ReadAll(resp.Body)
	return resp.StatusCode, string(b)
}

// getWith fetches path with cookies, as a browser sends those a save set.
func (g *expertRig) getWith(path string, cookies []*http.Cookie) (int, string) {
	g.t.Helper()
	req, err := http.NewRequest(http.MethodGet, g.srv.URL+path, nil)
	if err != nil {
		g.t.Fatal(err)
	}
	for _, c := range cookies {
		req.AddCookie(c)
	}
	resp, err := http.DefaultClient.Do(req)
	if err != nil {
		g.t.Fatal(err)
	}
	defer resp.Body.Close()
	b, _ := io.ReadAll(resp.Body)
	return resp.StatusCode, string(b)
}

// post sends a form as a browser on this origin would, without following
// redirects.
func (g *expertRig) post(path string, form url.Values) (*http.Response, string) {
	g.t.Helper()
	req, err := http.NewRequest(http.MethodPost, g.srv.URL+path, strings.NewReader(form.Encode()))
	if err != nil {
		g.t.Fatal(err)
	}
	req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
	req.Header.Set("Origin", g.srv.URL)
	c := &http.Client{CheckRedirect: func(*http.Request, []*http.Request) error { return http.ErrUseLastResponse }}
	resp, err := c.Do(req)
	if err != nil {
		g.t.Fatal(err)
	}
	defer resp.Body.Close()
	b, _ := io.ReadAll(resp.Body)
	return resp, string(b)
}

// secondRound closes round 1 for discussion and opens round 2, whose
// pages show the panel as round 1 closed.
func (g *expertRig) secondRound() {
	g.t.Helper()
	ctx := context.Background()
	if err := g.db.SetRound(ctx, g.ws.ID, 1, false, "discussion"); err != nil {
		g.t.Fatal(err)
	}
	if err := g.db.SetRound(ctx, g.ws.ID, 2, true, "second round"); err != nil {
		g.t.Fatal(err)
	}
}

func (g *expertRig) revisions() []workshop.Revision {
	g.t.Helper()
	revs, err := g.db.Revisions(context.Background(), g.ws.ID)
	if err != nil {
		g.t.Fatal(err)
	}
	return revs
}

func quantiles(vals ...string) url.Values {
	f := url.Values{}
	for i, v := range vals {
		f.Set("values["+strconv.Itoa(i)+"]", v)
	}
	return f
}

// shownError returns the message shown beside the field with the given
// input id, or "".
func shownError(body, id string) string {
	m := regexp.MustCompile(`id="` + regexp.QuoteMeta(id) + `-error">([^<]*)<`).FindStringSubmatch(body)
	if m == nil {
		return ""
	}
	return m[1]
}

// shownValue returns the value attribute of the input with the given id.
func shownValue(body, id string) string {
	m := regexp.MustCompile(`<input[^>]*id="` + regexp.QuoteMeta(id) + `"[^>]*value="([^"]*)"`).FindStringSubmatch(body)
	if m == nil {
		return "<no input " + id + ">"
	}
	return m[1]
}

func TestExpertHomeListsTheirQuestions(t *testing.T) {
	g := newExpertRig(t)
	code, body := g.get("/e/" + g.tokens[0] + "/")
	if code != http.StatusOK {
		t.Fatalf("home: status %d", code)
	}
	for _, want := range []string{g.ws.Title, g.ws.Purpose, "Round 1 is open", g.q.Wording, g.qi.Wording, g.qcal.Wording, "Ottilie Marsh", "not answered yet", "Caution"} {
		if !strings.Contains(body, html.EscapeString(want)) {
			t.Errorf("home lacks %q", want)
		}
	}
	if strings.Contains(body, "FACILITATOR-ONLY-NOTE") {
		t.Error("home shows the facilitator's notes")
	}
}

func TestExpertUnknownTokenIsNotFound(t *testing.T) {
	g := newExpertRig(t)
	other, _, _ := newToken()
	for _, path := range []string{
		"/e/" + other + "/",
		"/e/not-a-token/",
		"/e/" + other + "/q/" + strconv.FormatInt(g.q.ID, 10),
	} {
		if code, body := g.get(path); code != http.StatusNotFound || strings.Contains(body, g.q.Wording) {
			t.Errorf("GET %s: status %d, want 404 and no question", path, code)
		}
	}
	resp, _ := g.post("/e/"+other+"/q/"+strconv.FormatInt(g.q.ID, 10)+"/save", quantiles("0.05", "0.2", "0.4"))
	if resp.StatusCode != http.StatusNotFound {
		t.Errorf("save with unknown token: status %d, want 404", resp.StatusCode)
	}
	if n := len(g.revisions()); n != 0 {
		t.Errorf("%d revisions saved with an unknown token", n)
	}
	// A question id that is not in the expert's workshop is absent too.
	if code, _ := g.get("/e/" + g.tokens[0] + "/q/999999"); code != http.StatusNotFound {
		t.Errorf("unknown question: status %d, want 404", code)
	}
}

func TestExpertPreviewShowsTheFitAndSavesNothing(t *testing.T) {
	g := newExpertRig(t)
	resp, body := g.post(g.qpath(0, g.q)+"/preview", quantiles("0.05", "0.2", "0.4"))
	if resp.StatusCode != http.StatusOK {
		t.Fatalf("preview: status %d\n%s", resp.StatusCode, body)
	}
	if n := strings.Count(wideOnly(body), `class="stated"`); n != 3 {
		t.Errorf("preview draws %d stated points, want 3", n)
	}
	for _, want := range []string{
		"1 in 20 chance the value is below 0.05 (proportion).",
		"as likely to be below 0.2 (proportion) as above it",
		"1 in 20 chance the value is above 0.4 (proportion).",
		"Beta(α =", "<svg", "median",
	} {
		if !strings.Contains(body, want) {
			t.Errorf("preview lacks %q", want)
		}
	}
	if got := shownValue(body, "f-values-1"); got != "0.2" {
		t.Errorf("typed value not kept: %q", got)
	}
	if n := len(g.revisions()); n != 0 {
		t.Errorf("preview saved %d revisions", n)
	}

	// The live-preview fragment is the picture alone, not a page.
	resp, frag := g.post(g.qpath(0, g.q)+"/preview?fragment=1", quantiles("0.05", "0.2", "0.4"))
	if resp.StatusCode != http.StatusOK || strings.Contains(frag, "<html") || !strings.Contains(frag, `class="stated"`) {
		t.Errorf("fragment: status %d, html page %v, picture %v", resp.StatusCode, strings.Contains(frag, "<html"), strings.Contains(frag, `class="stated"`))
	}
	resp, frag = g.post(g.qpath(0, g.q)+"/preview?fragment=1", quantiles("0.05", "0.01", "0.4"))
	if resp.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(frag, "No fit yet") || strings.Contains(frag, "<svg") {
		t.Errorf("bad fragment: status %d: %s", resp.StatusCode, frag)
	}
	if n := len(g.revisions()); n != 0 {
		t.Errorf("fragments saved %d revisions", n)
	}
}

func TestExpertSaveCreatesARevision(t *testing.T) {
	g := newExpertRig(t)
	form := quantiles("0.05", "0.2", "0.4")
	form.Set("reason", "first thoughts after the briefing")
	resp, _ := g.post(g.qpath(0, g.q)+"/save", form)
	if resp.StatusCode != http.StatusSeeOther {
		t.Fatalf("save: status %d, want 303", resp.StatusCode)
	}
	if loc := resp.Header.Get("Location"); loc != g.qpath(0, g.q)+"#saved" {
		t.Errorf("redirect to %q", loc)
	}
	revs := g.revisions()
	if len(revs) != 1 {
		t.Fatalf("%d revisions, want 1", len(revs))
	}
	r := revs[0]
	if r.ExpertID != g.experts[0].ID || r.QuestionID != g.q.ID || r.Round != 1 || r.Reason != "first thoughts after the briefing" {
		t.Errorf("revision = %+v", r)
	}
	if got := r.Answer.Values; len(got) != 3 || got[0] != 0.05 || got[1] != 0.2 || got[2] != 0.4 {
		t.Errorf("saved values %v", got)
	}

	// The page the save leads to says so, with the confirmation the save
	// left for it (confirm_once.go).
	code, page := g.getWith(resp.Header.Get("Location"), resp.Cookies())
	if code != http.StatusOK || !strings.Contains(page, "Saved.") {
		t.Errorf("after save: status %d, saved note %v", code, strings.Contains(page, "Saved."))
	}
	if got := shownValue(page, "f-values-2"); got != "0.4" {
		t.Errorf("form not pre-filled with the saved answer: %q", got)
	}
	fit, err := g.q.Fit(r.Answer)
	if err != nil {
		t.Fatal(err)
	}
	// The history says what the fit implies in the expert's terms, the
	// Beta's parameters beneath for whoever reads them.
	implied := "median " + chart.FormatWithin(fit.Percentiles[1], 0, 1, false) + "; 90% between " +
		chart.FormatWithin(fit.Percentiles[0], 0, 1, false) + " and " + chart.FormatWithin(fit.Percentiles[2], 0, 1, false)
	for _, want := range []string{"first thoughts after the briefing", implied, "Beta(" + chart.FormatShape(fit.Dist.Alpha) + ", "} {
		if !strings.Contains(page, want) {
			t.Errorf("history lacks %q", want)
		}
	}
	if strings.Contains(page, "fitted α") {
		t.Error("the history still names the fitted α, which an expert need not know")
	}

	// A second save is a second revision; the first is kept.
	resp, _ = g.post(g.qpath(0, g.q)+"/save", quantiles("0.06", "0.2", "0.35"))
	if resp.StatusCode != http.StatusSeeOther || len(g.revisions()) != 2 || g.revisions()[0].Answer.Values[0] != 0.05 {
		t.Errorf("second save: status %d, %d revisions", resp.StatusCode, len(g.revisions()))
	}
}

func TestExpertBadInputIsRefusedBesideTheField(t *testing.T) {
	g := newExpertRig(t)
	cases := []struct {
		name  string
		q     workshop.Question
		form  url.Values
		id    string // the input whose message we expect
		rule  string
		typed string // a typed value that must be shown again
	}{
		{"decreasing", g.q, quantiles("0.05", "0.01", "0.4"), "f-values-1", "Must be larger than your 5% value.", "0.01"},
		{"outside bounds", g.q, quantiles("0.05", "0.2", "1.5"), "f-values-2", "Must be between 0 and 1 (0% and 100%); you typed 1.5. Did you mean 1.5%?", "1.5"},
		{"not a number", g.q, quantiles("0.05", "abc", "0.4"), "f-values-1", "“abc” is not a number Parley can read.", "abc"},
		// On a proportion 1,500 cannot be 1500: it is read as 1.5 and the
		// bounds refuse it (decimalComma; TestDecimalComma for bounds
		// that could hold 1500).
		{"a comma before three digits on a proportion", g.q, quantiles("1,500", "0.2", "0.4"), "f-values-0", "Must be between 0 and 1 (0% and 100%); you typed 1,500.", "1,500"},
		{"two points", g.q, quantiles("0..05", "0.2", "0.4"), "f-values-0", "“0..05” is not a number Parley can read.", "0..05"},
		{"empty", g.q, quantiles("0.05", "", "0.4"), "f-values-1", "Please fill this in.", "0.05"},
		{"confidence over 100%", g.qi, url.Values{"lowest": {"0.1"}, "highest": {"0.5"}, "best": {"0.2"}, "confidence": {"120"}},
			"f-confidence", "Must be more than 0% and less than 100%; you typed 120.", "120"},
		{"confidence as a tiny fraction", g.qi, url.Values{"lowest": {"0.1"}, "highest": {"0.5"}, "best": {"0.2"}, "confidence": {"1e-320"}},
			"f-confidence", "Type the confidence as a percentage, such as 80 for 80%; you typed 1e-320.", "1e-320"},
		{"confidence as a fraction", g.qi, url.Values{"lowest": {"0.1"}, "highest": {"0.5"}, "best": {"0.2"}, "confidence": {"0.8"}},
			"f-confidence", "Type the confidence as a percentage: did you mean 80%?", "0.8"},
		{"a percentage on a question that is not a proportion", g.qs, url.Values{"values[0]": {"20%"}, "values[1]": {"30"}, "values[2]": {"40"}},
			"f-values-0", "not as percentages", "20%"},
		// Issue 11: degenerate values are refused beside the field, before
		// any fit, in an expert's words.
		{"subnormal values", g.q, quantiles("4.9e-324", "1e-323", "1.5e-323"), "f-values-0", "too close to 0 or 1", "4.9e-324"},
		// 1e-400 underflows to 0: it was refused as "Must be between 0
		// and 1; you typed 1e-400", which it is.
		{"a value that underflows", g.q, quantiles("1e-400", "0.2", "0.4"), "f-values-0", "“1e-400” is too close to 0 for Parley to hold", "1e-400"},
		{"a percentage that underflows", g.q, quantiles("1e-322%", "20%", "40%"), "f-values-0", "“1e-322%” is too close to 0 for Parley to hold", "1e-322%"},
		{"values too close", g.q, quantiles("0.05", "0.0500000001", "0.4"), "f-values-1", "cannot be told apart", "0.0500000001"},
		// The four-value form's rules that its judgement checks (tails of
		// at least 1e-12, values apart) are shown beside its own fields.
		{"confidence leaving no tail", g.qi, url.Values{"lowest": {"0.1"}, "highest": {"0.4"}, "best": {"0.2"}, "confidence": {"99.9999999999999"}},
			"f-confidence", "Must be at most 99.9999999998%", "99.9999999999999"},
		{"highest too close to best", g.qi, url.Values{"lowest": {"0.1"}, "highest": {"0.200000000002"}, "best": {"0.200000000001"}, "confidence": {"80"}},
			"f-highest", "so close to your best estimate that the two cannot be told apart", "0.200000000002"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			for _, action := range []string{"/preview", "/save"} {
				resp, body := g.post(g.qpath(0, c.q)+action, c.form)
				if resp.StatusCode != http.StatusUnprocessableEntity {
					t.Fatalf("%s: status %d, want 422", action, resp.StatusCode)
				}
				if msg := shownError(body, c.id); !strings.Contains(msg, c.rule) {
					t.Errorf("%s: message beside %s = %q, want %q", action, c.id, msg, c.rule)
				}
				if !strings.Contains(body, `value="`+c.typed+`"`) {
					t.Errorf("%s: typed value %q not shown again", action, c.typed)
				}
				if strings.Contains(body, "NaN") {
					t.Errorf("%s: page shows NaN", action)
				}
			}
			if n := len(g.revisions()); n != 0 {
				t.Errorf("%d revisions saved from bad input", n)
			}
		})
	}
}

// TestExpertNeverSeesTheFittersWords: values that pass every rule but
// that no Beta within the accuracy envelope matches (rare values a few
// percent apart) are refused with 422 and a sentence for the expert, not
// the fitter's internal text (issue 11).
func TestExpertNeverSeesTheFittersWords(t *testing.T) {
	g := newExpertRig(t)
	for _, action := range []string{"/preview", "/preview?fragment=1", "/save"} {
		resp, body := g.post(g.qpath(0, g.q)+action, quantiles("1e-9", "1.02e-9", "1.04e-9"))
		if resp.StatusCode != http.StatusUnprocessableEntity {
			t.Fatalf("%s: status %d, want 422", action, resp.StatusCode)
		}
		if !strings.Contains(body, "too close together, or too close to a bound") {
			t.Errorf("%s: no sentence for the expert:\n%s", action, body)
		}
		for _, internal := range []string{"elicit:", "least-squares", "did not converge", "alpha", "envelope"} {
			if strings.Contains(body, internal) {
				t.Errorf("%s: the page shows %q", action, internal)
			}
		}
	}
	if n := len(g.revisions()); n != 0 {
		t.Errorf("%d revisions saved", n)
	}
}

func TestExpertSeesOnlyTheirOwnAnswers(t *testing.T) {
	g := newExpertRig(t, "Ada Quell", "Bruno Ferrante")
	// B saves a distinctive judgement.
	form := quantiles("0.0123", "0.0456", "0.0789")
	form.Set("reason", "B-PRIVATE-REASON")
	if resp, _ := g.post(g.qpath(1, g.q)+"/save", form); resp.StatusCode != http.StatusSeeOther {
		t.Fatalf("B's save: status %d", resp.StatusCode)
	}
	for _, path := range []string{"/e/" + g.tokens[0] + "/", g.qpath(0, g.q)} {
		code, body := g.get(path)
		if code != http.StatusOK {
			t.Fatalf("GET %s: %d", path, code)
		}
		for _, leak := range []string{"0.0123", "0.0456", "0.0789", "B-PRIVATE-REASON", "Bruno Ferrante"} {
			if strings.Contains(body, leak) {
				t.Errorf("A's page %s shows B's %q", path, leak)
			}
		}
	}
	// B's own page shows them.
	if _, body := g.get(g.qpath(1, g.q)); !strings.Contains(body, "B-PRIVATE-REASON") || !strings.Contains(body, `value="0.0456"`) {
		t.Error("B's page does not show B's own answer")
	}
	// A's save is A's revision, whatever B did.
	if resp, _ := g.post(g.qpath(0, g.q)+"/save", quantiles("0.1", "0.2", "0.3")); resp.StatusCode != http.StatusSeeOther {
		t.Fatal("A's save failed")
	}
	revs := g.revisions()
	if len(revs) != 2 || revs[0].ExpertID != g.experts[1].ID || revs[1].ExpertID != g.experts[0].ID {
		t.Errorf("revisions belong to the wrong experts: %+v", revs)
	}
}

func TestCalibrationTruthNeverReachesExperts(t *testing.T) {
	g := newExpertRig(t)
	truth := strconv.FormatFloat(hiddenTruth, 'f', -1, 64)
	check := func(what, body string) {
		t.Helper()
		if strings.Contains(body, truth) {
			t.Errorf("%s shows the hidden true value %s", what, truth)
		}
	}
	_, home := g.get("/e/" + g.tokens[0] + "/")
	check("home", home)
	_, page := g.get(g.qpath(0, g.qcal))
	check("question page", page)
	_, body := g.post(g.qpath(0, g.qcal)+"/preview", quantiles("0.2", "0.35", "0.6"))
	check("preview", body)
	_, body = g.post(g.qpath(0, g.qcal)+"/preview?fragment=1", quantiles("0.2", "0.35", "0.6"))
	check("fragment", body)
	saved, body := g.post(g.qpath(0, g.qcal)+"/save", quantiles("0.2", "0.35", "0.6"))
	check("save", body)
	_, page = g.getWith(g.qpath(0, g.qcal), saved.Cookies())
	if !strings.Contains(page, "Saved.") {
		t.Error("the page after the save does not say it was saved")
	}
	check("page after save", page)
	// Nor is a calibration question marked as one before the reveal: an
	// expert who knew would take extra care exactly there.
	_, home = g.get("/e/" + g.tokens[0] + "/")
	for what, body := range map[string]string{"home": home, "question page": page} {
		if strings.Contains(strings.ToLower(body), "calibration") {
			t.Errorf("the expert's %s says which questions are calibration questions before the reveal", what)
		}
	}

	// Once revealed, the expert may see it, and is told the question was
	// a calibration question whose answers are now final.
	if err := g.db.SetTrueValue(context.Background(), g.qcal.ID, hiddenTruth, true, "workshop over"); err != nil {
		t.Fatal(err)
	}
	if _, page = g.get(g.qpath(0, g.qcal)); !strings.Contains(page, "<dd>"+truth+". This was a calibration question") {
		t.Error("the revealed true value is not shown")
	}
	if !strings.Contains(page, "your answer below is final") || !strings.Contains(page, `value="0.35" aria-invalid="false" aria-describedby="f-values-1-hint" readonly>`) {
		t.Error("after the reveal the page does not show the last answer read-only")
	}
	if strings.Contains(page, "Save this answer") {
		t.Error("after the reveal the page still offers to save")
	}
}

// A save to a calibration question after its true value is revealed is
// refused with 409 and writes nothing, even from a page opened before the
// reveal; the expert's last answer stands.
func TestSaveAfterRevealIsRefused(t *testing.T) {
	g := newExpertRig(t, "Ada Quell", "Bruno Ferrante")
	ctx := context.Background()
	if resp, _ := g.post(g.qpath(0, g.qcal)+"/save", quantiles("0.2", "0.35", "0.6")); resp.StatusCode != http.StatusSeeOther {
		t.Fatalf("save before the reveal: %d", resp.StatusCode)
	}
	if err := g.db.SetTrueValue(ctx, g.qcal.ID, hiddenTruth, true, "shown to the room"); err != nil {
		t.Fatal(err)
	}
	before := len(g.revisions())
	truth := strconv.FormatFloat(hiddenTruth, 'f', -1, 64)
	resp, body := g.post(g.qpath(0, g.qcal)+"/save", quantiles("0.3", truth, "0.4"))
	if resp.StatusCode != http.StatusConflict {
		t.Fatalf("save after the reveal: status %d, want 409", resp.StatusCode)
	}
	if !strings.Contains(body, "answers to it can no longer change and nothing was saved") {
		t.Error("the 409 page does not say why in a plain sentence")
	}
	if !strings.Contains(body, `value="0.35"`) || strings.Contains(body, `value="0.4"`) {
		t.Error("the 409 page does not show the last saved answer in place of the refused one")
	}
	if n := len(g.revisions()); n != before {
		t.Fatalf("a save after the reveal wrote a revision: %d revisions, had %d", n, before)
	}
	// The second expert, who never answered, cannot answer after the reveal.
	if resp, _ := g.post(g.qpath(1, g.qcal)+"/save", quantiles("0.3", truth, "0.4")); resp.StatusCode != http.StatusConflict {
		t.Fatalf("first answer after the reveal: status %d, want 409", resp.StatusCode)
	}
	if n := len(g.revisions()); n != before {
		t.Fatalf("a first answer after the reveal was written")
	}
	// The store refuses it too, whoever calls it.
	rv := workshop.Revision{QuestionID: g.qcal.ID, ExpertID: g.experts[0].ID, Answer: workshop.Answer{Values: []float64{0.3, hiddenTruth, 0.4}}}
	if err := g.db.SaveRevision(ctx, &rv); !errors.Is(err, workshop.ErrAnswersFrozen) {
		t.Fatalf("store save after the reveal: %v, want ErrAnswersFrozen", err)
	}
}

func TestExpertSaveInAClosedRoundIsRefused(t *testing.T) {
	g := newExpertRig(t)
	if err := g.db.SetRound(context.Background(), g.ws.ID, 1, false, "break for discussion"); err != nil {
		t.Fatal(err)
	}
	resp, body := g.post(g.qpath(0, g.q)+"/save", quantiles("0.05", "0.2", "0.4"))
	if resp.StatusCode != http.StatusConflict {
		t.Fatalf("save in a closed round: status %d, want 409", resp.StatusCode)
	}
	if !strings.Contains(body, "Round 1 is closed, so your answer was not saved") || !strings.Contains(body, `value="0.2"`) {
		t.Error("409 page lacks the message or the typed values")
	}
	if n := len(g.revisions()); n != 0 {
		t.Errorf("%d revisions saved in a closed round", n)
	}
	// The page itself says saving is closed.
	if _, page := g.get(g.qpath(0, g.q)); !strings.Contains(page, "Round 1 is closed") {
		t.Error("question page does not say the round is closed")
	}
}

func TestRoundTwoPanelIsAnonymous(t *testing.T) {
	names := []string{"Ada Quell", "Bruno Ferrante", "Chiara Osei"}
	g := newExpertRig(t, names...)
	answers := [][]string{{"0.05", "0.2", "0.4"}, {"0.02", "0.08", "0.2"}, {"0.1", "0.3", "0.5"}}
	for i, a := range answers {
		if resp, _ := g.post(g.qpath(i, g.q)+"/save", quantiles(a...)); resp.StatusCode != http.StatusSeeOther {
			t.Fatalf("expert %d save: %d", i, resp.StatusCode)
		}
	}
	// Round 1: no panel.
	if _, page := g.get(g.qpath(0, g.q)); strings.Contains(page, "What the other experts said") {
		t.Error("round 1 shows the panel")
	}
	g.secondRound()
	_, page := g.get(g.qpath(0, g.q))
	for _, want := range []string{"What the other experts said", `data-label="You"`, "Equal-weight pool", "Round 2 is open"} {
		if !strings.Contains(page, want) {
			t.Errorf("round 2 page lacks %q", want)
		}
	}
	// The others carry two of the panel's three letters; the asking
	// expert's own letter is not on their page.
	if n := regexp.MustCompile(`class="legend-label"[^>]*>Expert [ABC]</text>`).FindAllStringIndex(wideOnly(page), -1); len(n) != 2 {
		t.Errorf("%d labelled other experts in the legend, want 2", len(n))
	}
	for _, n := range names[1:] {
		for _, leak := range []string{n, "Affil of " + n} {
			if strings.Contains(page, leak) {
				t.Errorf("round 2 page names %q", leak)
			}
		}
	}
	// The panel's curves are the other experts' fits (two CDF curves
	// besides the expert's own and the pool).
	start, end := strings.Index(page, "What the other experts said"), strings.Index(page, "Your history")
	if start < 0 || end < start {
		t.Fatal("no panel section before the history")
	}
	panel := wideOnly(page[start:end])
	if n := strings.Count(panel, "curve-cdf curve-expert"); n != 3 {
		t.Errorf("%d expert CDF curves in the panel, want 3 (you and two others)", n)
	}
	if n := strings.Count(panel, "curve-cdf curve-pool"); n != 1 {
		t.Errorf("%d pool curves, want 1", n)
	}
	// A revision in round 2 is recorded as round 2.
	if resp, _ := g.post(g.qpath(0, g.q)+"/save", quantiles("0.04", "0.18", "0.38")); resp.StatusCode != http.StatusSeeOther {
		t.Fatal("round 2 save failed")
	}
	revs := g.revisions()
	if last := revs[len(revs)-1]; last.Round != 2 {
		t.Errorf("round 2 revision recorded as round %d", last.Round)
	}
}

func TestChanceReadsLikeOdds(t *testing.T) {
	cases := []struct {
		p    float64
		want string
	}{
		{0.05, "a 1 in 20 chance"},
		{0.1, "a 1 in 10 chance"},
		{0.25, "a 1 in 4 chance"},
		{1.0 / 3, "a 1 in 3 chance"},
		{0.0258, "about a 1 in 39 chance"},
		{0.4, "a 40% chance"},
		{0.508, "a 50.8% chance"},
		{0.0004, "less than a 1 in 1000 chance"},
		{0, "no chance"},
	}
	for _, c := range cases {
		if got := chance(c.p); got != c.want {
			t.Errorf("chance(%v) = %q, want %q", c.p, got, c.want)
		}
	}
	for _, c := range []struct {
		p, x float64
		want string
	}{
		{0.05, 0.012, "You are saying there is a 1 in 20 chance the value is below 0.012 (per demand)."},
		{0.95, 0.3, "You are saying there is a 1 in 20 chance the value is above 0.3 (per demand)."},
		{0.5, 0.1, "You are saying the value is as likely to be below 0.1 (per demand) as above it."},
		// A four-value interval held 99.95% sure leaves 1 in 4000 in each tail.
		{0.00025, 0.01, "You are saying there is less than a 1 in 1000 chance the value is below 0.01 (per demand)."},
	} {
		if got := readBack(c.p, c.x, workshop.Question{Units: "per demand", Lower: 0, Upper: 1}, false, speaker{}); got != c.want {
			t.Errorf("readBack(%v, %v) = %q, want %q", c.p, c.x, got, c.want)
		}
	}
	// A fit far out in a tail reads as a chance too.
	if got, want := fittedBack(0.95, 0.99995), "The best-matching curve gives less than a 1 in 1000 chance above it."; got != want {
		t.Errorf("fitted far in the tail: %q, want %q", got, want)
	}
	// A fitted chance of exactly 1 (to double precision) is not "certainty".
	if got, want := fittedBack(0.05, 1), "The best-matching curve puts all but a vanishing part of the chance below it."; got != want {
		t.Errorf("a fitted chance of 1: %q, want %q", got, want)
	}
	if got, want := fittedBack(0.95, 0), "The best-matching curve puts all but a vanishing part of the chance above it."; got != want {
		t.Errorf("a fitted chance of 1 above: %q, want %q", got, want)
	}
	// For an expert who typed percentages, the read-back speaks in them.
	if got, want := readBack(0.05, 0.03, workshop.Question{Units: "proportion of mains", Lower: 0, Upper: 1}, true, speaker{}), "You are saying there is a 1 in 20 chance the value is below 3%."; got != want {
		t.Errorf("in percentages: %q, want %q", got, want)
	}
}

// TestLivePreviewInChromium proves web/static/preview.js in a real
// browser: typing, without pressing any button, brings the fit picture,
// its points follow the typed values, the page does not navigate, and
// nothing is saved.
func TestLivePreviewInChromium(t *testing.T) {
	ctx := browsertest.Start(t, 60*time.Second, 1280, 900)
	g := newExpertRig(t)
	page := g.srv.URL + g.qpath(0, g.q)
	if err := chromedp.Do(ctx, chromedp.Navigate(page)); err != nil {
		t.Fatalf("open the question: %v", err)
	}
	count := func() int {
		n, err := chromedp.Run(ctx, chromedp.Evaluate[int](`document.querySelectorAll('#preview svg.chart-wide circle.stated').length`))
		if err != nil {
			t.Fatal(err)
		}
		return n
	}
	if n := count(); n != 0 {
		t.Fatalf("%d points before typing, want none", n)
	}
	step, cancelStep := context.WithTimeout(ctx, 15*time.Second)
	defer cancelStep()
	if err := chromedp.Do(step,
		chromedp.SendKeys(chromedp.CSS("#f-values-0"), "0.05"),
		chromedp.SendKeys(chromedp.CSS("#f-values-1"), "0.2"),
		chromedp.SendKeys(chromedp.CSS("#f-values-2"), "0.4"),
		chromedp.WaitVisible(chromedp.CSS("#preview svg.chart-wide circle.stated")),
	); err != nil {
		t.Fatalf("type and wait for the picture: %v", err)
	}
	firstX := func() string {
		x, err := chromedp.Run(ctx, chromedp.Evaluate[string](`document.querySelector('#preview svg.chart-wide circle.stated').getAttribute('data-x')`))
		if err != nil {
			t.Fatal(err)
		}
		return x
	}
	// The debounce may fire before the last keystroke; wait for the
	// picture of the whole input.
	deadline := time.Now().Add(10 * time.Second)
	for count() != 3 || firstX() != "0.05" {
		if time.Now().After(deadline) {
			t.Fatalf("picture shows %d points, first at %s; want 3, first at 0.05", count(), firstX())
		}
		time.Sleep(100 * time.Millisecond)
	}
	// Typing more moves the point.
	if err := chromedp.Do(ctx, chromedp.SendKeys(chromedp.CSS("#f-values-0"), "1")); err != nil {
		t.Fatal(err)
	}
	for firstX() != "0.051" {
		if time.Now().After(deadline) {
			t.Fatalf("first point at %s after typing 0.051", firstX())
		}
		time.Sleep(100 * time.Millisecond)
	}
	text, err := chromedp.Run(ctx, chromedp.Evaluate[string](`document.querySelector('#preview').innerText`))
	if err != nil || !strings.Contains(text, "1 in 20 chance the value is below 0.051") {
		t.Errorf("read-back after typing: %q, %v", text, err)
	}
	where, err := chromedp.Run(ctx, chromedp.Evaluate[string](`location.href`))
	if err != nil || where != page {
		t.Errorf("the page navigated to %q", where)
	}
	if n := len(g.revisions()); n != 0 {
		t.Errorf("live preview saved %d revisions", n)
	}
}

// TestLivePreviewAfterTheLinkEnds: when the expert's link is ended while
// their question is open, the next live preview says why in one
// paragraph, in place of the picture; the page the server answers is not
// drawn inside the expert's page (a second masthead, main and footer).
func TestLivePreviewAfterTheLinkEnds(t *testing.T) {
	ctx := browsertest.Start(t, 60*time.Second, 390, 844)
	g := newExpertRig(t)
	if err := chromedp.Do(ctx, chromedp.Navigate(g.srv.URL+g.qpath(0, g.q))); err != nil {
		t.Fatalf("open the question: %v", err)
	}
	if err := g.db.RevokeExpert(context.Background(), g.experts[0].ID, "Left the panel (invented)."); err != nil {
		t.Fatal(err)
	}
	step, cancelStep := context.WithTimeout(ctx, 15*time.Second)
	defer cancelStep()
	if err := chromedp.Do(step, chromedp.SendKeys(chromedp.CSS("#f-values-0"), "0.05")); err != nil {
		t.Fatalf("type: %v", err)
	}
	if _, err := chromedp.Run(step, chromedp.Poll[bool](`document.getElementById("preview").hasAttribute("data-updated")`)); err != nil {
		t.Fatalf("wait for the preview: %v", err)
	}
	got, err := chromedp.Run(ctx, chromedp.Evaluate[[]any](`[document.getElementById("preview").innerText.trim(),
		document.querySelectorAll("header.masthead").length, document.querySelectorAll("main").length,
		document.querySelectorAll("footer").length, document.querySelectorAll("#preview .preview-problem[role=status]").length]`))
	if err != nil {
		t.Fatal(err)
	}
	text, _ := got[0].(string)
	if !strings.Contains(text, "This link does not work.") || !strings.Contains(text, "Please ask the facilitator for your current link.") ||
		!strings.Contains(text, "Your values are still in the form.") {
		t.Errorf("the preview after the link ended says %q", text)
	}
	if fmt.Sprint(got[1:]) != "[1 1 1 1]" {
		t.Errorf("mastheads, mains, footers and preview messages on the page: %v, want one each", got[1:])
	}
}

func TestExpertChipsForm(t *testing.T) {
	g := newExpertRig(t)
	code, page := g.get(g.qpath(0, g.qc))
	if code != http.StatusOK || !strings.Contains(page, "Place your 20 chips") || !strings.Contains(page, "Chips from 0.3 to 0.5") {
		t.Fatalf("chips page: status %d", code)
	}
	// Before a fit, the page asks for chips to be placed, not values.
	if !strings.Contains(page, "Place your chips and choose <em>Show the fit</em>") || strings.Contains(page, "Enter your values") {
		t.Error("the chips page asks the expert to enter values")
	}
	if _, q := g.get(g.qpath(0, g.q)); !strings.Contains(q, "Enter your values and choose <em>Show the fit</em>") {
		t.Error("the quantiles page does not ask for values")
	}
	chips := func(cs ...string) url.Values {
		f := url.Values{}
		for i, c := range cs {
			f.Set("counts["+strconv.Itoa(i)+"]", c)
		}
		return f
	}
	resp, body := g.post(g.qpath(0, g.qc)+"/preview", chips("2", "6", "7", "4", "1"))
	if resp.StatusCode != http.StatusOK || strings.Count(wideOnly(body), `class="stated"`) != 4 {
		t.Errorf("chips preview: status %d, %d points (want 4 interior edges)", resp.StatusCode, strings.Count(wideOnly(body), `class="stated"`))
	}
	// 2 of 20 chips below 0.1: a 1 in 10 chance.
	if !strings.Contains(body, "1 in 10 chance the value is below 0.1.") {
		t.Error("chips read-back missing")
	}
	for _, c := range []struct {
		name string
		form url.Values
		id   string
		rule string
	}{
		{"too many chips", chips("5", "6", "7", "4", "1"), "", "You have placed 23 chips, and this question has 20. Take 3 away."},
		{"negative", chips("2", "-6", "7", "4", "1"), "f-counts-1", "Type a whole number of chips"},
	} {
		resp, body := g.post(g.qpath(0, g.qc)+"/save", c.form)
		msg := shownError(body, c.id)
		if c.id == "" { // a rule about all bins is shown on the form
			msg = regexpFind(body, `<p class="form-error" role="alert">([^<]*)<`)
		}
		if resp.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(msg, c.rule) {
			t.Errorf("%s: status %d, message %q, want 422 and %q", c.name, resp.StatusCode, msg, c.rule)
		}
		if !strings.Contains(body, `value="`+c.form.Get("counts[1]")+`"`) {
			t.Errorf("%s: typed counts not shown again", c.name)
		}
	}
	if n := len(g.revisions()); n != 0 {
		t.Errorf("%d revisions saved", n)
	}
}

func regexpFind(body, re string) string {
	m := regexp.MustCompile(re).FindStringSubmatch(body)
	if m == nil {
		return ""
	}
	return m[1]
}

// wideOnly drops a page's compact drawings (the ones a phone shows), so
// that counts of curves and points read each picture once.
func wideOnly(body string) string {
	body = regexp.MustCompile(`(?s)<svg class="chart-svg[^"]* chart-compact".*?</svg>`).ReplaceAllString(body, "")
	// The room's tall drawings (chart.PanelView.Tall) are drawn wide too.
	return regexp.MustCompile(`(?s)<svg class="chart-svg chart-wide chart-tall[^"]*".*?</svg>`).ReplaceAllString(body, "")
}

// An outer value the curve cannot reach is pointed out to the expert in
// their words, though its probability gap (0.04996 at the 95% value) is
// within the poor-fit limit; an ordinary judgement gets no such line.
func TestExpertToldWhenTheCurveMissesAnOuterValue(t *testing.T) {
	g := newExpertRig(t)
	const line = "The curve does not match how far out one of your outer values lies"
	resp, body := g.post(g.qpath(0, g.q)+"/preview?fragment=1", quantiles("0.02", "0.05", "0.2"))
	if resp.StatusCode != http.StatusOK || !strings.Contains(body, line) {
		t.Errorf("0.02/0.05/0.2: status %d, no line about the outer value", resp.StatusCode)
	}
	if strings.Contains(body, "tail_misfit") || strings.Contains(body, "the limit is 2 times") {
		t.Error("the expert sees the facilitator's wording")
	}
	if _, body := g.post(g.qpath(0, g.q)+"/preview?fragment=1", quantiles("0.01", "0.04", "0.12")); strings.Contains(body, line) {
		t.Error("an ordinary judgement is told its curve misses an outer value")
	}
}

// An expert who types percentages reads the fit's table in percentages,
// as its sentences speak, not the same numbers as proportions.
func TestExpertTypingPercentagesSeesThemInTheTable(t *testing.T) {
	g := newExpertRig(t)
	resp, body := g.post(g.qpath(0, g.q)+"/preview?fragment=1", quantiles("3%", "7%", "16%"))
	if resp.StatusCode != http.StatusOK {
		t.Fatalf("preview: %d", resp.StatusCode)
	}
	for _, want := range []string{"3%", "7%", "16%"} {
		if !hasCell(body, want) {
			t.Errorf("the table lacks a cell %q", want)
		}
	}
	if hasCell(body, "0.03") {
		t.Error("the table writes the typed 3% as 0.03")
	}
}

// An expert who never answered a calibration question reads, after its
// reveal, that no answer can be added now, not that their (absent) answer
// is final or an invitation to enter values.
func TestRevealedQuestionWithoutAnAnswer(t *testing.T) {
	g := newExpertRig(t)
	if err := g.db.SetTrueValue(context.Background(), g.qcal.ID, hiddenTruth, true, "workshop over (invented)"); err != nil {
		t.Fatal(err)
	}
	_, page := g.get(g.qpath(0, g.qcal))
	if !strings.Contains(page, "The true value has been shown, so answers to this question can no longer be added.") {
		t.Error("no sentence saying no answer can be added")
	}
	for _, wrong := range []string{"your answer below is final", "Enter your values and choose"} {
		if strings.Contains(page, wrong) {
			t.Errorf("the page says %q", wrong)
		}
	}
}

// The invitation before a fit takes the expert's name as text, never as
// markup.
func TestPreviewInviteEscapesTheName(t *testing.T) {
	if got, want := previewInviteText(workshop.FormatChips, "<b>O'Neil</b>"), "Place &lt;b&gt;O&#39;Neil&lt;/b&gt;'s chips"; got != want {
		t.Errorf("got %q, want %q", got, want)
	}
}

// hasCell says whether html has a table cell that reads text, whatever
// the cell's attributes.
func hasCell(html, text string) bool {
	return regexp.MustCompile(`<td[^>]*>` + regexp.QuoteMeta(text) + `</td>`).MatchString(html)
}

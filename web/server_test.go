package web

import (
	"context"
	"io"
	"net/http"
	"net/http/cookiejar"
	"net/http/httptest"
	"net/url"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"

	"golang.org/x/crypto/bcrypt"

	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/store"
)

func TestMain(m *testing.M) {
	bcryptCost = bcrypt.MinCost // the real cost only slows tests
	os.Exit(m.Run())
}

// harness is a real Server over a real SQLite file, on a real loopback
// listener, with a browser-like client (cookie jar, Origin on POSTs, no
// redirect following so tests see the 303s).
type harness struct {
	t      testing.TB
	db     *store.DB
	srv    *Server
	ts     *httptest.Server
	client *http.Client
}

func newHarness(t testing.TB) *harness {
	t.Helper()
	db, err := store.Open(filepath.Join(t.TempDir(), "parley.db"))
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { db.Close() })
	srv, err := New(db, Options{})
	if err != nil {
		t.Fatal(err)
	}
	ts := httptest.NewServer(srv.Handler())
	t.Cleanup(ts.Close)
	jar, _ := cookiejar.New(nil)
	c := &http.Client{Jar: jar, CheckRedirect: func(*http.Request, []*http.Request) error { return http.ErrUseLastResponse }}
	return &harness{t: t, db: db, srv: srv, ts: ts, client: c}
}

// signIn sets a facilitator secret and signs the harness's client in.
func (h *harness) signIn() {
	h.t.Helper()
	secret, err := ResetFacilitatorSecret(context.Background(), h.db)
	if err != nil {
		h.t.Fatal(err)
	}
	res, _ := h.post("/signin", url.Values{"secret": {secret}})
	if res.StatusCode != http.StatusSeeOther {
		h.t.Fatalf("sign-in: status %d", res.StatusCode)
	}
}

func (h *harness) do(req *http.Request) (*http.Response, string) {
	h.t.Helper()
	res, err := h.client.Do(req)
	if err != nil {
		h.t.Fatal(err)
	}
	defer res.Body.Close()
	b, err := io.ReadAll(res.Body)
	if err != nil {
		h.t.Fatal(err)
	}
	return res, string(b)
}

func (h *harness) get(path string) (*http.Response, string) {
	h.t.Helper()
	req, err := http.NewRequest(http.MethodGet, h.ts.URL+path, nil)
	if err != nil {
		h.t.Fatal(err)
	}
	return h.do(req)
}

// post sends a form the way a browser on a Parley page does: with an
// Origin naming this server.
func (h *harness) post(path string, v url.Values) (*http.Response, string) {
	h.t.Helper()
	return h.postWith(path, v, map[string]string{"Origin": h.ts.URL})
}

func (h *harness) postWith(path string, v url.Values, headers map[string]string) (*http.Response, string) {
	h.t.Helper()
	req, err := http.NewRequest(http.MethodPost, h.ts.URL+path, strings.NewReader(v.Encode()))
	if err != nil {
		h.t.Fatal(err)
	}
	req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
	for k, val := range headers {
		req.Header.Set(k, val)
	}
	return h.do(req)
}

func (h *harness) workshopCount() int {
	h.t.Helper()
	ws, err := h.db.Workshops(context.Background())
	if err != nil {
		h.t.Fatal(err)
	}
	return len(ws)
}

// newWorkshop creates a workshop through the form and returns its ID.
func (h *harness) newWorkshop(title string) workshop.Workshop {
	h.t.Helper()
	res, body := h.post("/workshops", url.Values{"title": {title}, "purpose": {"Invented test purpose"}})
	if res.StatusCode != http.StatusSeeOther {
		h.t.Fatalf("create workshop: %d %s", res.StatusCode, body)
	}
	ws, err := h.db.Workshops(context.Background())
	if err != nil {
		h.t.Fatal(err)
	}
	for _, w := range ws {
		if w.Title == title {
			return w
		}
	}
	h.t.Fatalf("workshop %q not saved", title)
	return workshop.Workshop{}
}

var linkPattern = regexp.MustCompile(`/e/([A-Za-z0-9_-]{43})/`)

// addExpert adds an expert through the form and returns the token shown
// once on the page.
func (h *harness) addExpert(ws workshop.Workshop, name string) (workshop.Expert, string) {
	h.t.Helper()
	res, _ := h.post(workshopPath(ws.ID)+"/experts", url.Values{"name": {name}, "affiliation": {"Invented Co."}})
	if res.StatusCode != http.StatusSeeOther {
		h.t.Fatalf("add expert: %d", res.StatusCode)
	}
	// The link is shown on the page the facilitator is sent to, so a
	// reload adds nobody.
	res, body := h.get(res.Header.Get("Location"))
	if res.StatusCode != http.StatusOK {
		h.t.Fatalf("add expert: the link page answers %d", res.StatusCode)
	}
	m := linkPattern.FindStringSubmatch(body)
	if m == nil {
		h.t.Fatalf("add expert: no private link on the page")
	}
	es, err := h.db.Experts(context.Background(), ws.ID)
	if err != nil {
		h.t.Fatal(err)
	}
	for _, e := range es {
		if e.Name == name {
			return e, m[1]
		}
	}
	h.t.Fatalf("expert %q not saved", name)
	return workshop.Expert{}, ""
}

func TestSecurityHeadersOnEveryResponse(t *testing.T) {
	h := newHarness(t)
	for _, path := range []string{"/signin", "/", "/static/style.css", "/no/such/page", "/e/not-a-token/"} {
		res, _ := h.get(path)
		hd := res.Header
		if got := hd.Get("Content-Security-Policy"); got != contentSecurityPolicy {
			t.Errorf("%s: CSP %q", path, got)
		}
		for k, want := range map[string]string{
			"X-Content-Type-Options": "nosniff",
			"Referrer-Policy":        "no-referrer",
			"X-Frame-Options":        "DENY",
		} {
			if got := hd.Get(k); got != want {
				t.Errorf("%s: %s = %q, want %q", path, k, got, want)
			}
		}
	}
	if !strings.Contains(contentSecurityPolicy, "frame-ancestors 'none'") || strings.Contains(contentSecurityPolicy, "unsafe-inline") {
		t.Errorf("CSP %q", contentSecurityPolicy)
	}
}

// TestNoInlineScriptOrStyle renders the facilitator's pages and checks
// they carry nothing the CSP would block.
func TestNoInlineScriptOrStyle(t *testing.T) {
	h, ws, qs, _, links := seeded(t)
	h.addExpert(ws, "A. Expert")
	inline := regexp.MustCompile(`(?i)<script>|<script\s+[^>]*>[^<]+</script>|\sstyle=|<style|\son[a-z]+=|javascript:`)
	for _, path := range []string{"/", "/signin", workshopPath(ws.ID), workshopPath(ws.ID) + "/questions/new", workshopPath(ws.ID) + "/log",
		questionPath(ws.ID, qs[0].ID), workshopPath(ws.ID) + "/report", links[0].Path, links[0].Path + "q/" + strconv.FormatInt(qs[0].ID, 10)} {
		res, body := h.get(path)
		if res.StatusCode != http.StatusOK {
			t.Errorf("%s: status %d", path, res.StatusCode)
		}
		if m := inline.FindString(body); m != "" {
			t.Errorf("%s: inline script or style %q", path, m)
		}
	}
}

func TestFacilitatorPagesNeedSession(t *testing.T) {
	h := newHarness(t)
	ws := workshop.Workshop{Title: "Private"}
	if err := h.db.CreateWorkshop(context.Background(), &ws); err != nil {
		t.Fatal(err)
	}
	for _, path := range []string{"/", workshopPath(ws.ID), workshopPath(ws.ID) + "/log", workshopPath(ws.ID) + "/questions/new"} {
		res, body := h.get(path)
		if res.StatusCode != http.StatusSeeOther || res.Header.Get("Location") != "/signin" {
			t.Errorf("GET %s without session: %d %s", path, res.StatusCode, res.Header.Get("Location"))
		}
		if strings.Contains(body, "Private") {
			t.Errorf("GET %s without session leaks the workshop", path)
		}
	}
	res, _ := h.post("/workshops", url.Values{"title": {"Sneaky"}})
	if res.StatusCode != http.StatusUnauthorized {
		t.Errorf("POST /workshops without session: %d", res.StatusCode)
	}
	if n := h.workshopCount(); n != 1 {
		t.Errorf("%d workshops after refused POST, want 1", n)
	}
	// A forged cookie is no session.
	u, _ := url.Parse(h.ts.URL)
	h.client.Jar.SetCookies(u, []*http.Cookie{{Name: sessionCookie, Value: strings.Repeat("A", 43)}})
	if res, _ := h.get("/"); res.StatusCode != http.StatusSeeOther {
		t.Errorf("forged session cookie: %d", res.StatusCode)
	}
}

// Signing out ends the session itself: a copy of the cookie kept from
// before (another tab, a stolen copy) no longer signs anyone in.
func TestSignOutEndsTheSession(t *testing.T) {
	h := newHarness(t)
	h.signIn()
	u, _ := url.Parse(h.ts.URL)
	var kept *http.Cookie
	for _, c := range h.client.Jar.Cookies(u) {
		if c.Name == sessionCookie {
			kept = c
		}
	}
	if kept == nil {
		t.Fatal("no session cookie after sign-in")
	}
	if res, _ := h.post("/signout", url.Values{}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("sign-out: status %d", res.StatusCode)
	}
	req, _ := http.NewRequest(http.MethodGet, h.ts.URL+"/", nil)
	req.AddCookie(&http.Cookie{Name: sessionCookie, Value: kept.Value})
	res, err := (&http.Client{CheckRedirect: h.client.CheckRedirect}).Do(req)
	if err != nil {
		t.Fatal(err)
	}
	res.Body.Close()
	if res.StatusCode != http.StatusSeeOther {
		t.Errorf("the signed-out session's cookie still opens / (status %d)", res.StatusCode)
	}
	hash, _ := tokenHash(kept.Value)
	if ok, err := h.db.SessionValid(context.Background(), hash, time.Now()); ok || err != nil {
		t.Errorf("session still valid in the store after sign-out: %v, %v", ok, err)
	}
}

func TestSignIn(t *testing.T) {
	h := newHarness(t)
	secret, err := EnsureFacilitatorSecret(context.Background(), h.db)
	if err != nil || len(secret) != 43 {
		t.Fatalf("EnsureFacilitatorSecret = %q, %v", secret, err)
	}
	if again, err := EnsureFacilitatorSecret(context.Background(), h.db); again != "" || err != nil {
		t.Fatalf("second EnsureFacilitatorSecret = %q, %v; want no new secret", again, err)
	}
	stored, _ := h.db.FacilitatorHash(context.Background())
	if strings.Contains(string(stored), secret) {
		t.Fatal("the secret itself is stored")
	}
	res, body := h.post("/signin", url.Values{"secret": {secret[:42] + "x"}})
	if res.StatusCode != http.StatusUnauthorized || !strings.Contains(body, "does not match") {
		t.Fatalf("wrong secret: %d", res.StatusCode)
	}
	res, _ = h.post("/signin", url.Values{"secret": {secret}})
	if res.StatusCode != http.StatusSeeOther {
		t.Fatalf("right secret: %d", res.StatusCode)
	}
	var c *http.Cookie
	for _, k := range res.Cookies() {
		if k.Name == sessionCookie {
			c = k
		}
	}
	if c == nil || !c.HttpOnly || c.SameSite != http.SameSiteStrictMode || c.MaxAge <= 0 || c.Expires.IsZero() {
		t.Fatalf("session cookie %+v", c)
	}
	if res, _ := h.get("/"); res.StatusCode != http.StatusOK {
		t.Fatalf("signed in GET /: %d", res.StatusCode)
	}
	// A reset ends the session.
	if _, err := ResetFacilitatorSecret(context.Background(), h.db); err != nil {
		t.Fatal(err)
	}
	if res, _ := h.get("/"); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("after reset GET /: %d", res.StatusCode)
	}
}

func TestCrossOriginPostsRefused(t *testing.T) {
	h := newHarness(t)
	h.signIn()
	form := url.Values{"title": {"Forged"}}
	for _, tc := range []struct {
		name    string
		headers map[string]string
	}{
		{"no origin at all", map[string]string{}},
		{"other site's origin", map[string]string{"Origin": "http://evil.example"}},
		{"cross-site fetch", map[string]string{"Sec-Fetch-Site": "cross-site"}},
		{"same-site other port", map[string]string{"Sec-Fetch-Site": "same-site", "Origin": "http://127.0.0.1:1"}},
	} {
		res, _ := h.postWith("/workshops", form, tc.headers)
		if res.StatusCode != http.StatusForbidden {
			t.Errorf("%s: status %d, want 403", tc.name, res.StatusCode)
		}
	}
	if n := h.workshopCount(); n != 0 {
		t.Fatalf("%d workshops saved by refused posts", n)
	}
	res, _ := h.postWith("/workshops", form, map[string]string{"Sec-Fetch-Site": "same-origin"})
	if res.StatusCode != http.StatusSeeOther || h.workshopCount() != 1 {
		t.Fatalf("same-origin post: %d", res.StatusCode)
	}
	// State changes need POST: GET on a POST route changes nothing.
	if res, _ := h.get("/workshops?title=ViaGet"); res.StatusCode != http.StatusMethodNotAllowed || h.workshopCount() != 1 {
		t.Fatalf("GET /workshops: %d", res.StatusCode)
	}
}

func TestOversizeBody(t *testing.T) {
	h := newHarness(t)
	h.signIn()
	big := url.Values{"title": {"Big"}, "notes": {strings.Repeat("x", MaxBodyBytes)}}
	res, _ := h.post("/workshops", big)
	if res.StatusCode != http.StatusRequestEntityTooLarge {
		t.Errorf("declared oversize body: %d", res.StatusCode)
	}
	// Without a Content-Length (chunked) the limit bites while reading.
	req, _ := http.NewRequest(http.MethodPost, h.ts.URL+"/workshops", io.MultiReader(strings.NewReader(big.Encode())))
	req.ContentLength = -1
	req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
	req.Header.Set("Origin", h.ts.URL)
	res, _ = h.do(req)
	if res.StatusCode != http.StatusRequestEntityTooLarge {
		t.Errorf("chunked oversize body: %d", res.StatusCode)
	}
	if n := h.workshopCount(); n != 0 {
		t.Fatalf("%d workshops saved from oversize bodies", n)
	}
}

func TestSessionExpires(t *testing.T) {
	h := newHarness(t)
	h.signIn()
	if res, _ := h.get("/"); res.StatusCode != http.StatusOK {
		t.Fatalf("fresh session: %d", res.StatusCode)
	}
	later := time.Now().Add(sessionLifetime + time.Minute)
	h.srv.now = func() time.Time { return later }
	if res, _ := h.get("/"); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("expired session: %d, want a redirect to sign in", res.StatusCode)
	}
}

// addQuantileQuestion adds a 5/50/95 question on a proportion to the
// workshop, as the facilitator's form does, and returns it.
func (h *harness) addQuantileQuestion(t *testing.T, wsID int64, wording, quantity string) workshop.Question {
	t.Helper()
	if res, body := h.post(workshopPath(wsID)+"/questions", url.Values{"wording": {wording}, "quantity": {quantity}, "lower": {"0"}, "upper": {"1"}, "format": {"quantiles"}, "preset": {"p05_50_95"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("add a question: %d %s", res.StatusCode, body)
	}
	all, err := h.db.Questions(context.Background(), wsID)
	if err != nil {
		t.Fatal(err)
	}
	return all[len(all)-1]
}

// nextRound closes the open round and opens the next, as the
// facilitator's rounds card does.
func (h *harness) nextRound(t *testing.T, wsID int64) {
	t.Helper()
	for _, f := range []url.Values{{"action": {"close"}}, {"action": {"open"}, "reason": {"The next round (invented)."}}} {
		if res, body := h.post(workshopPath(wsID)+"/round", f); res.StatusCode != http.StatusSeeOther {
			t.Fatalf("round %s: %d %s", f.Get("action"), res.StatusCode, body)
		}
	}
}

// expertAnswering adds an expert named name to workshop ws through the
// store (a link made and not kept) and saves their answer values[i] to
// question qs[i], in that order.
func (h *harness) expertAnswering(ws int64, name string, qs []int64, values ...[]float64) workshop.Expert {
	h.t.Helper()
	ctx := context.Background()
	_, hash, err := newToken()
	if err != nil {
		h.t.Fatal(err)
	}
	e := workshop.Expert{WorkshopID: ws, Name: name}
	if err := h.db.AddExpert(ctx, &e, hash); err != nil {
		h.t.Fatal(err)
	}
	for i, q := range qs {
		rv := workshop.Revision{QuestionID: q, ExpertID: e.ID, Answer: workshop.Answer{Values: values[i]}}
		if err := h.db.SaveRevision(ctx, &rv); err != nil {
			h.t.Fatal(err)
		}
	}
	return e
}

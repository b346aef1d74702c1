package e2e

import (
	"net/http"
	"regexp"
	"strings"
	"testing"

	"github.com/chromedp/chromedp"
)

// The whole workshop as the people in the room do it, in a real browser.
// The scenario is invented: a panel judging the proportion of pumps of an
// invented model that fail in their first year, and the proportion of
// invented field sites where a repair holds for six months.
func TestWorkshopInBrowser(t *testing.T) {
	site := startSite(t)
	b := startBrowser(t)
	shots := newScreenshots(t)

	fac := b.person("facilitator")
	signIn(t, site, fac)

	wsURL := createWorkshop(t, site, fac)
	addQuestion(t, fac, wsURL, question{
		wording:  "Of the pumps of model K-7 installed this year, what proportion will fail within their first year? (invented scenario)",
		quantity: "first-year failure proportion",
		units:    "proportion of pumps",
		preset:   "p05_50_95",
	})
	addQuestion(t, fac, wsURL, question{
		wording:  "At the invented field sites, what proportion of seal repairs will still hold after six months?",
		quantity: "six-month repair survival",
		units:    "proportion of repairs",
		preset:   "quartiles",
	})
	fac.sees("overview with questions", "first-year failure proportion", "quantiles at 5%, 50%, 95%",
		"six-month repair survival", "quantiles at 25%, 50%, 75%")

	linkA := addExpert(t, fac, wsURL, "Ada Invented", "Invented Pumps Ltd")
	linkB := addExpert(t, fac, wsURL, "Bo Example", "Example Field Services")
	if linkA == linkB {
		t.Fatalf("both experts got the same private link %s", linkA)
	}
	fac.open(wsURL)
	fac.sees("roster", "Ada Invented", "Bo Example", "0 of 2")
	shots.take(fac, "01-facilitator-workshop")
}

// signIn opens the one-time address and expects the workshop list, with
// the secret gone from the address bar.
func signIn(t *testing.T, site *site, fac *person) {
	t.Helper()
	fac.open(site.SignIn)
	// signin.js moves the secret into the form and posts it; the server
	// answers with the workshop list.
	fac.do("wait for the workshop list after sign-in", chromedp.WaitVisible(chromedp.CSS(`form[action="/workshops"]`)))
	if u := fac.url(); strings.Contains(u, "#") || strings.Contains(u, "signin") {
		t.Errorf("after sign-in the address bar shows %q; want the workshop list without the secret", u)
	}
	fac.sees("workshop list", "Workshops", "New workshop", "Create workshop")
}

// createWorkshop fills the new-workshop form and returns the workshop's
// address.
func createWorkshop(t *testing.T, site *site, fac *person) string {
	t.Helper()
	form := `form[action="/workshops"]`
	// A missing title is refused beside the field, typed values kept.
	fac.fill(form, "purpose", "Invented demo: a prior for the first-year failure proportion of a new pump.")
	if st := fac.load("submit a workshop without title", chromedp.Click(chromedp.CSS(form+` button[type=submit]`))); st != http.StatusUnprocessableEntity {
		t.Errorf("workshop without a title: status %d, want 422", st)
	}
	fac.sees("workshop form refused", "Title (required)", "is required", "Nothing was saved")
	if n := fac.count(`.field-invalid [name="title"], [name="title"][aria-invalid="true"]`); n != 1 {
		t.Errorf("the title field is not marked invalid (found %d)", n)
	}
	if v := eval[string](fac, "purpose kept", `document.querySelector('form[action="/workshops"] [name=purpose]').value`); !strings.Contains(v, "first-year failure") {
		t.Errorf("purpose not kept after refusal: %q", v)
	}
	ws, err := site.DB.Workshops(fac.ctx)
	if err != nil || len(ws) != 0 {
		t.Fatalf("a refused workshop was saved: %v, %v", ws, err)
	}

	fac.fill(form, "title", "Pump reliability panel (invented)")
	fac.fill(form, "decision", "The maintenance budget for next year's spare pumps (invented).")
	fac.fill(form, "notes", "Start with the failure question.")
	if st := fac.load("create the workshop", chromedp.Click(chromedp.CSS(form+` button[type=submit]`))); st != http.StatusOK {
		t.Fatalf("create workshop: status %d", st)
	}
	fac.sees("new workshop's page", "Pump reliability panel (invented)", "Round 1 (open)",
		"The maintenance budget for next year's spare pumps (invented).", "No questions yet.")
	u := fac.url()
	if !regexp.MustCompile(`/w/\d+/?$`).MatchString(u) {
		t.Fatalf("after creating a workshop the address is %q, want /w/ID/", u)
	}
	return strings.TrimSuffix(u, "/") + "/"
}

type question struct {
	wording, quantity, units, preset string
}

// addQuestion follows the overview's "Add a question" link and fills the
// form.
func addQuestion(t *testing.T, fac *person, wsURL string, q question) {
	t.Helper()
	fac.open(wsURL)
	fac.load("follow Add a question", chromedp.Click(chromedp.CSS(`a[href$="/questions/new"]`)))
	fac.sees("question form", "Add a question", "Wording the experts read", "Lower bound", "Upper bound")
	form := `form[action$="/questions"]`
	fac.fill(form, "wording", q.wording)
	fac.fill(form, "quantity", q.quantity)
	fac.fill(form, "units", q.units)
	fac.do("choose probabilities", chromedp.SetValue(chromedp.CSS(form+` select[name=preset]`), q.preset))
	if st := fac.load("add the question", chromedp.Click(chromedp.CSS(form+` button[type=submit]`))); st != http.StatusOK {
		t.Fatalf("add question %q: status %d", q.quantity, st)
	}
	fac.sees("overview after adding a question", q.quantity)
}

// addExpert adds an expert to the roster and reads their private link off
// the page, the way a facilitator copies it.
func addExpert(t *testing.T, fac *person, wsURL, name, affiliation string) string {
	t.Helper()
	fac.open(wsURL)
	form := `form[action$="/experts"]`
	fac.fill(form, "name", name)
	fac.fill(form, "affiliation", affiliation)
	if st := fac.load("add expert "+name, chromedp.Click(chromedp.CSS(form+` button[type=submit]`))); st != http.StatusCreated {
		t.Errorf("add expert %s: status %d, want 201", name, st)
	}
	body := fac.text()
	if !strings.Contains(body, "Private link for "+name) {
		t.Fatalf("no private link shown for %s:\n%s", name, clip(body, 2000))
	}
	link := expertLink.FindString(body)
	if link == "" {
		t.Fatalf("no readable private link for %s on the page:\n%s", name, clip(body, 2000))
	}
	return link
}

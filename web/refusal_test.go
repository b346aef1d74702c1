package web

import (
	"context"
	"net/http"
	"net/http/httptest"
	"net/url"
	"strconv"
	"strings"
	"testing"

	"github.com/go-chi/chi/v5"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/store"
)

// otherTabFirst is the store with another tab's round change landing
// first: each SetRound is made once for the other tab, then for this
// request, whose page was read before the other's write.
type otherTabFirst struct{ *store.DB }

func (o otherTabFirst) SetRound(ctx context.Context, id int64, round int, open bool, reason string) error {
	if err := o.DB.SetRound(ctx, id, round, open, reason+" (the other tab)"); err != nil {
		return err
	}
	return o.DB.SetRound(ctx, id, round, open, reason)
}

// TestRefusalPageSaysWhatHappened: a refusal no form can show beside its
// field goes to the generic refusal page (Server.fail). One real path
// there: the facilitator closes round 1 in two tabs, and the second
// close reaches the store after the first, which refuses it in its
// transaction (workshop.RuleRoundSequence). The page read "Not accepted"
// over "round: rounds run in sequence: …" and nothing else; it now says
// that nothing was saved, which field and which rule, and how to go back,
// with a link to the workshop's overview. Nothing more was saved.
func TestRefusalPageSaysWhatHappened(t *testing.T) {
	h, ws, _, _, _ := seeded(t)
	post := facilitatorOn(t, h.db, otherTabFirst{h.db})
	code, page := post(workshopPath(ws.ID)+"/round", url.Values{"action": {"close"}, "reason": {"Round 1 discussed (invented)"}})
	if code != http.StatusBadRequest {
		t.Fatalf("the second close of round 1: %d, want 400\n%s", code, page)
	}
	for _, want := range []string{
		"<title>Not saved",
		"Nothing was saved: what was sent breaks one of Parley's rules.",
		"<dt>Field</dt><dd>round</dd>",
		"<dt>Rule</dt><dd>" + string(workshop.RuleRoundSequence),
		"Go back with your browser's Back button: what you typed is still in the form there. Or open",
		`<a href="` + workshopPath(ws.ID) + `">the workshop's overview</a>`,
		// The facilitator's menu, as on every facilitator's page: the
		// refusal had no way on but its one link back.
		`<nav class="nav" aria-label="Facilitator">`,
		`action="/signout"`,
	} {
		if !strings.Contains(page, want) {
			t.Errorf("the refusal lacks %q:\n%s", want, excerpt(page, "<main"))
		}
	}
	evs, err := h.db.Events(context.Background(), ws.ID)
	if err != nil {
		t.Fatal(err)
	}
	closes := 0
	for _, e := range evs {
		if e.Kind == workshop.EventRoundClosed {
			closes++
		}
	}
	if closes != 1 {
		t.Errorf("%d round closes recorded, want the other tab's one", closes)
	}
}

// TestRefusalPageForAnAddress: a refusal of a page asked for (a GET)
// does not say that nothing was saved, since nothing was to be, nor that
// a form keeps what was typed; on an expert's link it leads back to the
// expert's own questions, never to the facilitator's pages.
func TestRefusalPageForAnAddress(t *testing.T) {
	for _, c := range []struct {
		method, route, path, back string
	}{
		{http.MethodGet, "/e/{token}/q/{qid}", "/e/abc/q/3", "/e/abc/"},
		{http.MethodPost, "/e/{token}/q/{qid}/save", "/e/abc/q/3/save", "/e/abc/"},
		{http.MethodGet, "/w/{workshop}/calibration", "/w/7/calibration", "/w/7"},
		{http.MethodGet, "/other", "/other", "/"},
	} {
		var got refusal
		r := chi.NewRouter()
		r.MethodFunc(c.method, c.route, func(w http.ResponseWriter, r *http.Request) {
			got = newRefusal(r, &elicit.InputError{Field: "alpha", Rule: elicit.RuleUnitInterval})
		})
		r.ServeHTTP(httptest.NewRecorder(), httptest.NewRequest(c.method, c.path, nil))
		if got.Back != c.back {
			t.Errorf("%s %s leads back to %q, want %q", c.method, c.path, got.Back, c.back)
		}
		saved := strings.Contains(got.Lead, "Nothing was saved") && strings.Contains(got.Hint, "still in the form")
		if saved != (c.method == http.MethodPost) {
			t.Errorf("%s %s says %q %q", c.method, c.path, got.Lead, got.Hint)
		}
		if got.Field != "alpha" || got.Rule != string(elicit.RuleUnitInterval) {
			t.Errorf("%s %s names %q and %q", c.method, c.path, got.Field, got.Rule)
		}
	}
}

// TestRefusalOnAnExpertsLinkHasNoFacilitatorMenu: the refusal an expert
// reaches through their private link, and a 404 past it, never carry the
// facilitator's menu, which only the facilitator's requests are given.
func TestRefusalOnAnExpertsLinkHasNoFacilitatorMenu(t *testing.T) {
	h, _, qs, _, links := seeded(t)
	for _, path := range []string{
		links[0].Path + "q/" + strconv.FormatInt(qs[0].ID, 10) + "/save",
		links[0].Path + "q/999999",
	} {
		res, page := h.get(path)
		if res.StatusCode < 400 {
			t.Errorf("%s: %d, want a refusal", path, res.StatusCode)
		}
		if strings.Contains(page, `aria-label="Facilitator"`) || strings.Contains(page, "/signout") {
			t.Errorf("%s: an expert's page carries the facilitator's menu:\n%s", path, excerpt(page, "<header"))
		}
	}
}

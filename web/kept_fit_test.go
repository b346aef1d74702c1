package web

import (
	"net/http"
	"net/http/cookiejar"
	"net/url"
	"reflect"
	"testing"
)

// Every way a judgement reaches Parley keeps its fit with the revision,
// the very fit the expert's preview showed (issue 16): the expert's own
// save and the facilitator's entry.
func TestSavesKeepTheirFit(t *testing.T) {
	g := newExpertRig(t)
	form := quantiles("0.02", "0.06", "0.15")
	if r, body := g.post(g.qpath(0, g.q)+"/save", form); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("save: %d %s", r.StatusCode, body)
	}
	jar, _ := cookiejar.New(nil)
	h := &harness{t: t, db: g.db, srv: g.s, ts: g.srv, client: &http.Client{Jar: jar,
		CheckRedirect: func(*http.Request, []*http.Request) error { return http.ErrUseLastResponse }}}
	h.signIn()
	entry := url.Values{"channel": {"phone"}, "values[0]": {"0.03"}, "values[1]": {"0.07"}, "values[2]": {"0.2"}}
	if r, body := h.post(entryPath(g.ws.ID, g.q.ID, g.experts[0].ID)+"/save", entry); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("entry: %d %s", r.StatusCode, body)
	}
	revs := g.revisions()
	if len(revs) != 2 {
		t.Fatalf("%d revisions", len(revs))
	}
	for _, rv := range revs {
		want, err := g.q.Fit(rv.Answer)
		if err != nil {
			t.Fatal(err)
		}
		if rv.Kept == nil || !reflect.DeepEqual(*rv.Kept, want) {
			t.Errorf("revision %d (%s) kept %+v, want %+v", rv.ID, rv.EnteredBy, rv.Kept, want)
		}
	}
}

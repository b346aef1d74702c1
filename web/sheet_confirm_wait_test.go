package web

import (
	"context"
	"html"
	"io"
	"log/slog"
	"net/http"
	"net/http/cookiejar"
	"net/http/httptest"
	"net/url"
	"regexp"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/store"
)

// heldSheetSave is the store with each answer sheet's save held until the
// test lets it go, then failing as on a full disk, or saving.
type heldSheetSave struct {
	*store.DB
	entered chan struct{} // a save has reached the store
	release chan struct{} // closed: the saves go on
	fail    error
}

func (st *heldSheetSave) SaveImportedRevisions(ctx context.Context, workshopID int64, rs []workshop.Revision, imp workshop.SheetImport) error {
	st.entered <- struct{}{}
	<-st.release
	if st.fail != nil {
		return st.fail
	}
	return st.DB.SaveImportedRevisions(ctx, workshopID, rs, imp)
}

// A sheet's confirmation sent twice without the form's key (a replay, a
// browser's retry), the second while the first is still saving: the
// second said "saved" at once, though the first then failed on a full
// disk and saved nothing. It now waits for the first and answers with
// what happened: "nothing was saved" (its own try failing the same way),
// or, when the first saved, the overview's "saved", the sheet saved once.
func TestSheetConfirmedAgainWhileSavingFollowsTheFirst(t *testing.T) {
	for _, c := range []struct {
		name  string
		fail  error
		code  int
		saved int
	}{
		{"the first fails", errDiskFull, http.StatusServiceUnavailable, 0},
		{"the first saves", nil, http.StatusSeeOther, 5},
	} {
		t.Run(c.name, func(t *testing.T) {
			g := newSheetRig(t)
			st := &heldSheetSave{DB: g.h.db, entered: make(chan struct{}, 2), release: make(chan struct{}), fail: c.fail}
			srv, err := New(st, Options{Logger: slog.New(slog.NewTextHandler(io.Discard, nil))})
			if err != nil {
				t.Fatal(err)
			}
			ts := httptest.NewServer(srv.Handler())
			t.Cleanup(ts.Close)
			// Let a held save go before the server closes, whatever failed.
			var letGo sync.Once
			release := func() { letGo.Do(func() { close(st.release) }) }
			t.Cleanup(release)
			jar, _ := cookiejar.New(nil)
			client := &http.Client{Jar: jar, CheckRedirect: func(*http.Request, []*http.Request) error { return http.ErrUseLastResponse }}
			type answer struct {
				code       int
				body, goes string
			}
			post := func(path string, form url.Values) answer {
				req, _ := http.NewRequest(http.MethodPost, ts.URL+path, strings.NewReader(form.Encode()))
				req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
				req.Header.Set("Origin", ts.URL)
				res, err := client.Do(req)
				if err != nil {
					return answer{body: err.Error()}
				}
				defer res.Body.Close()
				b, _ := io.ReadAll(res.Body)
				return answer{res.StatusCode, html.UnescapeString(string(b)), res.Header.Get("Location")}
			}
			secret, err := IssueFacilitatorSecret(context.Background(), g.h.db)
			if err != nil {
				t.Fatal(err)
			}
			if a := post("/signin", url.Values{"secret": {secret}}); a.code != http.StatusSeeOther {
				t.Fatalf("sign in: %d", a.code)
			}
			preview := post(sheetPath(g.ws.ID), url.Values{"sheet": {goodSheet}, "channel": {"paper_form"}})
			key := regexp.MustCompile(`name="key" value="([0-9a-f]+)"`).FindStringSubmatch(preview.body)
			if preview.code != http.StatusOK || key == nil {
				t.Fatalf("preview: %d, key %v", preview.code, key)
			}
			confirm := url.Values{"key": {key[1]}} // no form key: sendOnce lets each through
			first, second := make(chan answer, 1), make(chan answer, 1)
			go func() { first <- post(sheetPath(g.ws.ID)+"/confirm", confirm) }()
			<-st.entered // the first is saving
			go func() { second <- post(sheetPath(g.ws.ID)+"/confirm", confirm) }()
			// The second arrives while the first is held: it must wait.
			deadline := time.Now().Add(30 * time.Second)
			for srv.sheets.awaiting(key[1]) == 0 {
				select {
				case a := <-second:
					t.Fatalf("the second confirmation answered %d (to %q) while the first was still saving", a.code, a.goes)
				default:
				}
				if time.Now().After(deadline) {
					t.Fatal("the second confirmation neither answered nor waited")
				}
				time.Sleep(time.Millisecond)
			}
			release()
			a1, a2 := <-first, <-second
			for i, a := range []answer{a1, a2} {
				if a.code != c.code {
					t.Errorf("confirmation %d: %d (to %q), want %d", i+1, a.code, a.goes, c.code)
				}
				if c.fail != nil && !strings.Contains(a.body, notSavedForFacilitator) {
					t.Errorf("confirmation %d does not say nothing was saved", i+1)
				}
				if c.fail == nil && a.goes != sheetSavedPath(g.ws.ID) {
					t.Errorf("confirmation %d goes to %q, want the overview's saved line", i+1, a.goes)
				}
			}
			if n := len(g.revisions(t)); n != c.saved {
				t.Errorf("%d revisions saved, want %d", n, c.saved)
			}
		})
	}
}

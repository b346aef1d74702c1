package web

import (
	"bytes"
	"context"
	"fmt"
	"html"
	"io"
	"log/slog"
	"net/http"
	"net/http/httptest"
	"net/url"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/store"
)

// revokedMeanwhile is the store with an expert's link ended by the
// facilitator just before that expert's next save reaches it: the link
// was still good when the request came in.
type revokedMeanwhile struct {
	*store.DB
	expert int64
}

func (s *revokedMeanwhile) SaveRevision(ctx context.Context, r *workshop.Revision) error {
	if err := s.DB.RevokeExpert(ctx, s.expert, "invented: the link was sent to the wrong person"); err != nil {
		return err
	}
	return s.DB.SaveRevision(ctx, r)
}

// TestSaveMeetsARevokedLink: a save whose link the facilitator ends while
// it is on its way is told what any request on an ended link is told
// ("This link does not work", 404), nothing saved. The store's refusal
// (ErrRevoked) reached the generic server-error page, 500, with an ERROR
// line in the log for nothing wrong with the server.
func TestSaveMeetsARevokedLink(t *testing.T) {
	h, ws, qs, es, links := seeded(t)
	var log bytes.Buffer
	s, err := New(&revokedMeanwhile{DB: h.db, expert: es[2].ID}, Options{Logger: slog.New(slog.NewTextHandler(&log, nil))})
	if err != nil {
		t.Fatal(err)
	}
	ts := httptest.NewServer(s.Handler())
	t.Cleanup(ts.Close)
	revisions := func() int {
		rs, err := h.db.Revisions(context.Background(), ws.ID)
		if err != nil {
			t.Fatal(err)
		}
		return len(rs)
	}
	before := revisions()
	form := url.Values{"values[0]": {"0.02"}, "values[1]": {"0.05"}, "values[2]": {"0.12"}}
	req, _ := http.NewRequest(http.MethodPost, ts.URL+links[2].Path+"q/"+strconv.FormatInt(qs[0].ID, 10)+"/save", strings.NewReader(form.Encode()))
	req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
	req.Header.Set("Origin", ts.URL)
	res, err := http.DefaultClient.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	b, _ := io.ReadAll(res.Body)
	res.Body.Close()
	page := html.UnescapeString(string(b))
	if res.StatusCode != http.StatusNotFound || !strings.Contains(page, "This link does not work") {
		t.Errorf("a save on a link ended meanwhile: %d, want 404 saying the link does not work", res.StatusCode)
	}
	if strings.Contains(page, "Server error") {
		t.Error("the expert sees the server-error page")
	}
	if strings.Contains(log.String(), "level=ERROR") {
		t.Errorf("logged as a server error:\n%s", log.String())
	}
	if revisions() != before {
		t.Error("a revision was saved")
	}
}

// The facilitator's save that meets a link ended meanwhile (an answer
// sheet's row of that expert, confirmed as the link was ended) is told so
// with 409, not the server-error page.
func TestFacilitatorSaveMeetsARevokedLink(t *testing.T) {
	h := newHarness(t)
	w := httptest.NewRecorder()
	r := httptest.NewRequest(http.MethodPost, "/w/1/answers/import/confirm", nil)
	h.srv.fail(w, r, fmt.Errorf("store: expert 3: %w", workshop.ErrRevoked))
	if w.Code != http.StatusConflict || !strings.Contains(w.Body.String(), "Private link ended") {
		t.Errorf("%d %q, want 409 saying the link was ended", w.Code, w.Body.String())
	}
}

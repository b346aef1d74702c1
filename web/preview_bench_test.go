package web

import (
	"context"
	"net/http"
	"net/http/httptest"
	"net/url"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/store"
)

// BenchmarkExpertPreviewRequest is the server's whole work for one fit
// preview an expert's page asks for as they type (POST …/preview?fragment=1):
// middleware, the link's token looked up in a real SQLite file, the form
// read, the fit, the picture (both layouts and the table) and the
// fragment's template. Each request's 95% value moves by a hair, so the
// fit and every curve are new while the axes stay put, as for a draft
// being typed; the handler is called directly, so the client's side of a
// request is not counted. It puts chart's BenchmarkFitPreviewPicture in
// proportion: the picture's share of what a preview costs the server.
func BenchmarkExpertPreviewRequest(b *testing.B) {
	db, err := store.Open(filepath.Join(b.TempDir(), "parley.db"))
	if err != nil {
		b.Fatal(err)
	}
	b.Cleanup(func() { db.Close() })
	links, err := SeedDemo(context.Background(), db)
	if err != nil {
		b.Fatal(err)
	}
	qs, err := db.Questions(context.Background(), 1)
	if err != nil || len(qs) == 0 {
		b.Fatalf("demo questions: %v", err)
	}
	// One expert previewing without pause, far beyond the allowance.
	srv, err := New(db, Options{PreviewBurst: 1 << 30})
	if err != nil {
		b.Fatal(err)
	}
	h := srv.Handler()
	path := links[0].Path + "q/" + strconv.FormatInt(qs[0].ID, 10) + "/preview?fragment=1"
	if u, err := url.Parse(path); err == nil && u.Host != "" {
		path = u.RequestURI()
	}
	high := 0.12
	cpuPerOp(b, func() {
		high += 1e-9
		form := url.Values{"values[0]": {"0.01"}, "values[1]": {"0.04"}, "values[2]": {strconv.FormatFloat(high, 'f', -1, 64)}}
		req := httptest.NewRequest(http.MethodPost, path, strings.NewReader(form.Encode()))
		req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
		req.Header.Set("Origin", "http://example.com") // httptest.NewRequest's host
		rec := httptest.NewRecorder()
		h.ServeHTTP(rec, req)
		if rec.Code != http.StatusOK || !strings.Contains(rec.Body.String(), "<svg") {
			b.Fatalf("preview: %d %.300s", rec.Code, rec.Body.String())
		}
	})
}

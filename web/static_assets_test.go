package web

import (
	"bytes"
	"compress/gzip"
	"io"
	"net/http"
	"os"
	"regexp"
	"strings"
	"testing"
)

// An expert's phone on a slow link fetched every stylesheet and script
// again in full with each page, some 90 kB beside a page of 5 kB: they
// carried no Cache-Control and no validator. The pages now name each
// asset by its content's hash and that address is kept; the stylesheets
// and scripts come gzipped; an address without the hash is asked again
// each time and answered 304 while unchanged.
func TestAssetsAreKeptAndGzipped(t *testing.T) {
	h, _, qs, _, links := seeded(t)
	_, page := h.get(links[2].Path + "q/" + itoa(qs[0].ID))
	named := regexp.MustCompile(`(?:href|src)="(/static/[a-z-]+\.(?:css|js))\?v=([0-9a-f]{16})"`).FindAllStringSubmatch(page, -1)
	seen := map[string]bool{}
	for _, m := range named {
		seen[m[1]] = true
	}
	for _, want := range []string{"/static/style.css", "/static/chart.css", "/static/print.css", "/static/page.js", "/static/preview.js", "/static/chips.js", "/static/live.js"} {
		if !seen[want] {
			t.Errorf("the question page does not name %s with its content's hash", want)
		}
	}
	if bare := regexp.MustCompile(`(?:href|src)="/static/[a-z-]+\.(?:css|js)"`).FindString(page); bare != "" {
		t.Errorf("the question page names an asset without its hash: %s", bare)
	}
	get := func(path string, headers ...string) (*http.Response, []byte) {
		t.Helper()
		req, _ := http.NewRequest(http.MethodGet, h.ts.URL+path, nil)
		for i := 0; i+1 < len(headers); i += 2 {
			req.Header.Set(headers[i], headers[i+1])
		}
		res, err := http.DefaultTransport.RoundTrip(req)
		if err != nil {
			t.Fatal(err)
		}
		defer res.Body.Close()
		b, _ := io.ReadAll(res.Body)
		return res, b
	}
	total := 0
	for _, m := range named {
		want, err := os.ReadFile("static/" + strings.TrimPrefix(m[1], "/static/"))
		if err != nil {
			t.Fatal(err)
		}
		res, body := get(m[1]+"?v="+m[2], "Accept-Encoding", "gzip, deflate, br")
		if cc := res.Header.Get("Cache-Control"); res.StatusCode != http.StatusOK || !strings.Contains(cc, "max-age=31536000") {
			t.Errorf("%s with its hash: %d, Cache-Control %q; want it kept for a year", m[1], res.StatusCode, cc)
		}
		if res.Header.Get("Content-Encoding") != "gzip" {
			t.Errorf("%s: not gzipped (%q)", m[1], res.Header.Get("Content-Encoding"))
			continue
		}
		zr, err := gzip.NewReader(bytes.NewReader(body))
		if err != nil {
			t.Fatal(err)
		}
		if got, _ := io.ReadAll(zr); !bytes.Equal(got, want) {
			t.Errorf("%s gunzipped is not the file", m[1])
		}
		total += len(body)
		// Without gzip, the file as it is. (A request without the header
		// is sent by Go's transport asking for gzip, and unzipped.)
		if res, body := get(m[1]+"?v="+m[2], "Accept-Encoding", "identity"); res.Header.Get("Content-Encoding") != "" || !bytes.Equal(body, want) {
			t.Errorf("%s without gzip: encoding %q, %d bytes of %d", m[1], res.Header.Get("Content-Encoding"), len(body), len(want))
		}
	}
	// The page follows the workshop since live.js joined it (7 kB of the
	// 36 kB), kept for a year under its hash like the rest.
	if total > 36000 {
		t.Errorf("the question page's assets weigh %d bytes gzipped; want under 36000", total)
	}
	// An old hash, or none, is asked again, and answered 304 when unchanged.
	res, _ := get("/static/style.css?v=0000000000000000")
	if cc := res.Header.Get("Cache-Control"); cc != "no-cache" || res.Header.Get("ETag") == "" {
		t.Errorf("style.css under an old hash: Cache-Control %q, ETag %q; want it asked again", cc, res.Header.Get("ETag"))
	}
	if again, body := get("/static/style.css", "If-None-Match", res.Header.Get("ETag")); again.StatusCode != http.StatusNotModified || len(body) != 0 {
		t.Errorf("style.css asked again unchanged: %d, %d bytes; want 304", again.StatusCode, len(body))
	}
	if res, _ := get("/static/style.css"); res.Header.Get("Content-Type") != "text/css; charset=utf-8" {
		t.Errorf("style.css: Content-Type %q", res.Header.Get("Content-Type"))
	}
}

// An expert's pages and previews, mostly the pictures' SVG, are sent
// gzipped to a browser that takes it: a round-2 question page of 74 kB
// and a preview of 23 kB reached a phone on a slow link as they were.
func TestExpertPagesAreGzipped(t *testing.T) {
	h, _, qs, _, links := seeded(t)
	ines := links[0].Path + "q/" + itoa(qs[0].ID)
	send := func(method, path, body string, gz bool) (*http.Response, []byte) {
		t.Helper()
		req, _ := http.NewRequest(method, h.ts.URL+path, strings.NewReader(body))
		if body != "" {
			req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
			req.Header.Set("Origin", h.ts.URL)
		}
		// Without the header Go's transport asks for gzip itself and
		// unzips what comes: a browser that takes none says identity.
		req.Header.Set("Accept-Encoding", "identity")
		if gz {
			req.Header.Set("Accept-Encoding", "gzip")
		}
		res, err := http.DefaultTransport.RoundTrip(req)
		if err != nil {
			t.Fatal(err)
		}
		defer res.Body.Close()
		b, _ := io.ReadAll(res.Body)
		return res, b
	}
	for _, c := range []struct{ what, method, path, body, ends string }{
		{"the question page with her fit", http.MethodGet, ines, "", "</html>"},
		{"a preview", http.MethodPost, ines + "/preview?fragment=1", "values%5B0%5D=0.02&values%5B1%5D=0.05&values%5B2%5D=0.13", "</figure>"},
	} {
		res, zipped := send(c.method, c.path, c.body, true)
		if res.StatusCode != http.StatusOK || res.Header.Get("Content-Encoding") != "gzip" {
			t.Errorf("%s: %d, Content-Encoding %q; want it gzipped", c.what, res.StatusCode, res.Header.Get("Content-Encoding"))
			continue
		}
		zr, err := gzip.NewReader(bytes.NewReader(zipped))
		if err != nil {
			t.Fatalf("%s: %v", c.what, err)
		}
		page, err := io.ReadAll(zr)
		if err != nil || !strings.Contains(string(page), c.ends) {
			t.Errorf("%s gunzipped: %v, %d bytes without %q", c.what, err, len(page), c.ends)
		}
		if len(zipped)*3 > len(page) {
			t.Errorf("%s: %d bytes gzipped of %d", c.what, len(zipped), len(page))
		}
		if n := res.Header.Get("Content-Length"); n != itoa(int64(len(zipped))) {
			t.Errorf("%s: Content-Length %s for %d bytes", c.what, n, len(zipped))
		}
		plain, body := send(c.method, c.path, c.body, false)
		if plain.Header.Get("Content-Encoding") != "" || !strings.Contains(string(body), c.ends) {
			t.Errorf("%s without gzip: Content-Encoding %q", c.what, plain.Header.Get("Content-Encoding"))
		}
	}
}

// acceptsGzip reads the quality as RFC 9110 writes it: the parameter's
// name in any case, spaces around it, up to three decimals. "gzip;Q=0"
// and "gzip; q = 0" refuse gzip as "gzip;q=0" does.
func TestAcceptsGzip(t *testing.T) {
	for header, want := range map[string]bool{
		"gzip, deflate, br": true, "deflate, gzip;q=0.5": true, "GZIP": true, "gzip;q=1.0": true, "gzip;q=0.001": true,
		"gzip;q=0": false, "gzip; q=0.000": false, "gzip;Q=0": false, "gzip ; q = 0": false, "identity": false, "": false, "br": false,
	} {
		r, _ := http.NewRequest(http.MethodGet, "/", nil)
		r.Header.Set("Accept-Encoding", header)
		if got := acceptsGzip(r); got != want {
			t.Errorf("Accept-Encoding %q: %v, want %v", header, got, want)
		}
	}
}

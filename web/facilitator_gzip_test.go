package web

import (
	"bytes"
	"compress/gzip"
	"io"
	"net/http"
	"strconv"
	"strings"
	"testing"
)

// TestFacilitatorPagesAreSentGzipped: the facilitator's pages were sent
// as drawn while an expert's were gzipped; an invented workshop of 30
// experts and 25 questions sent its report as 2.6 MB (0.37 MB gzipped)
// and its calibration page as 1 MB (82 kB). A browser that takes gzip gets
// every facilitator's page gzipped, the same page once unpacked, with its
// length; one that does not gets it as it is.
func TestFacilitatorPagesAreSentGzipped(t *testing.T) {
	h := newHarness(t)
	h.signIn()
	ws := h.newWorkshop("Invented: culvert blockages")
	q := h.addQuantileQuestion(t, ws.ID, "Invented: what share of the culverts will be blocked after the next storm?", "blocked share")
	for _, path := range []string{"/", workshopPath(ws.ID), workshopPath(ws.ID) + "/report", calibrationPath(ws.ID), questionPath(ws.ID, q.ID), workshopPath(ws.ID) + "/log"} {
		get := func(enc string) (*http.Response, []byte) {
			t.Helper()
			req, _ := http.NewRequest(http.MethodGet, h.ts.URL+path, nil)
			if enc != "" {
				req.Header.Set("Accept-Encoding", enc)
			}
			res, err := h.client.Do(req)
			if err != nil {
				t.Fatal(err)
			}
			defer res.Body.Close()
			b, err := io.ReadAll(res.Body)
			if err != nil || res.StatusCode != http.StatusOK {
				t.Fatalf("GET %s: %d %v", path, res.StatusCode, err)
			}
			if n, err := strconv.Atoi(res.Header.Get("Content-Length")); err != nil || n != len(b) {
				t.Errorf("GET %s (%q): Content-Length %q for %d bytes", path, enc, res.Header.Get("Content-Length"), len(b))
			}
			return res, b
		}
		res, plain := get("identity")
		if res.Header.Get("Content-Encoding") != "" || !strings.Contains(string(plain), "</html>") {
			t.Fatalf("GET %s without gzip: Content-Encoding %q", path, res.Header.Get("Content-Encoding"))
		}
		res, packed := get("gzip, deflate, br")
		if res.Header.Get("Content-Encoding") != "gzip" {
			t.Errorf("GET %s: a browser that takes gzip gets the page as drawn (%d bytes)", path, len(packed))
			continue
		}
		if !strings.Contains(res.Header.Get("Vary"), "Accept-Encoding") {
			t.Errorf("GET %s: gzipped without Vary: Accept-Encoding", path)
		}
		zr, err := gzip.NewReader(bytes.NewReader(packed))
		if err != nil {
			t.Fatalf("GET %s: %v", path, err)
		}
		unpacked, err := io.ReadAll(zr)
		if err != nil {
			t.Fatalf("GET %s: %v", path, err)
		}
		// The page carries fresh form keys (onceField): compare all but them.
		if withoutOnceKeys(unpacked) != withoutOnceKeys(plain) {
			t.Errorf("GET %s: the gzipped page unpacks to another page", path)
		}
	}
}

// withoutOnceKeys leaves out a page's one-time form keys, which differ on each
// drawing.
func withoutOnceKeys(page []byte) string {
	var out strings.Builder
	for _, line := range strings.SplitAfter(string(page), `name="`+onceName+`" value="`) {
		if i := strings.IndexByte(line, '"'); i >= 0 && strings.HasSuffix(out.String(), `value="`) {
			line = line[i:]
		}
		out.WriteString(line)
	}
	return out.String()
}

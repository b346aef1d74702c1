package web

import (
	"bytes"
	"compress/gzip"
	"crypto/sha256"
	"encoding/hex"
	"io/fs"
	"net/http"
	"strings"
	"time"
)

// The embedded assets as a phone on a slow link fetches them. Every page
// fetched its stylesheets and scripts again in full, some 90 kB beside a
// page of 5 kB: the files carried no Cache-Control, no date and no
// validator, so a browser could neither keep them nor ask whether they
// had changed. The pages now name each asset with its content's hash
// (staticURL: "/static/style.css?v=…"); an address with the current hash
// is kept for a year, since new content gets a new address, and any other
// (the shared live worker's, an old page's) is asked again each time with
// its ETag, answered 304 where it is unchanged. Each is gzipped once, at
// start, for browsers that take it (the stylesheets to about a quarter).

// asset is one embedded file as served.
type asset struct {
	name    string
	plain   []byte
	gzipped []byte // nil where gzip saves nothing
	hash    string // the first 16 hex digits of the content's SHA-256
}

// assets are web/static's files by name ("style.css").
var assets = func() map[string]*asset {
	sub, err := fs.Sub(static, "static")
	if err != nil {
		panic(err) // the embed pattern guarantees the directory
	}
	out := map[string]*asset{}
	err = fs.WalkDir(sub, ".", func(path string, d fs.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return err
		}
		b, err := fs.ReadFile(sub, path)
		if err != nil {
			return err
		}
		sum := sha256.Sum256(b)
		a := &asset{name: path, plain: b, hash: hex.EncodeToString(sum[:8])}
		var z bytes.Buffer
		w, _ := gzip.NewWriterLevel(&z, gzip.BestCompression)
		_, _ = w.Write(b)
		_ = w.Close()
		if z.Len() < len(b) {
			a.gzipped = z.Bytes()
		}
		out[path] = a
		return nil
	})
	if err != nil {
		panic(err)
	}
	return out
}()

// staticURL is the address a page names an asset by: "/static/x" with the
// content's hash, so that it may be kept until the content changes. Any
// other path is returned as it is.
func staticURL(path string) string {
	if a, ok := assets[strings.TrimPrefix(path, "/static/")]; ok && strings.HasPrefix(path, "/static/") {
		return path + "?v=" + a.hash
	}
	return path
}

// serveAsset answers GET /static/{name}: 404 for a name not embedded (a
// folder included), else the file, gzipped where the browser takes it.
func (s *Server) serveAsset(w http.ResponseWriter, r *http.Request) {
	a, ok := assets[strings.TrimPrefix(r.URL.Path, "/")]
	if !ok {
		s.notFound(w, r)
		return
	}
	h := w.Header()
	if r.URL.Query().Get("v") == a.hash {
		h.Set("Cache-Control", "public, max-age=31536000, immutable")
	} else {
		h.Set("Cache-Control", "no-cache")
	}
	body, tag := a.plain, `"`+a.hash+`"`
	if a.gzipped != nil {
		h.Add("Vary", "Accept-Encoding")
		if acceptsGzip(r) {
			body, tag = a.gzipped, `"`+a.hash+`-gz"`
			h.Set("Content-Encoding", "gzip")
		}
	}
	h.Set("ETag", tag)
	http.ServeContent(w, r, a.name, time.Time{}, bytes.NewReader(body))
}

// acceptsGzip says the request's Accept-Encoding names gzip with a
// quality above 0.
func acceptsGzip(r *http.Request) bool {
	for _, part := range strings.Split(r.Header.Get("Accept-Encoding"), ",") {
		name, params, _ := strings.Cut(strings.TrimSpace(part), ";")
		if !strings.EqualFold(strings.TrimSpace(name), "gzip") {
			continue
		}
		// The quality's name is read in any case ("gzip;Q=0" refuses
		// gzip too), as RFC 9110 writes parameter names.
		q := strings.ToLower(strings.ReplaceAll(strings.TrimSpace(params), " ", ""))
		return q != "q=0" && q != "q=0.0" && q != "q=0.00" && q != "q=0.000"
	}
	return false
}

package web

import (
	"bytes"
	"compress/gzip"
	"io"
	"net/http"
	"strconv"
	"strings"
	"sync"

	"github.com/parley-elicit/parley/internal/turns"
)

// An expert's requests take turns at the CPUs (internal/turns): previews
// and saves go before pages. This file is the HTTP side: a handler runs
// in a turn, its body read before and its response sent after.

// inTurn runs h in a turn of s.turns at priority p. The response is held
// in memory and sent after the turn is given back, so a slow connection
// never keeps others from their turn. Nothing is sent when the request
// is cancelled while waiting.
func (s *Server) inTurn(p turns.Priority, h http.HandlerFunc) http.HandlerFunc {
	return func(w http.ResponseWriter, r *http.Request) {
		readBodyFirst(r)
		hold, ok := s.turns.Take(r.Context(), p)
		if !ok {
			return
		}
		held := &heldResponse{w: w, body: getBuffer(), gzip: acceptsGzip(r) && r.Method != http.MethodHead}
		defer putBuffer(held.body)
		func() {
			defer hold.Done()
			h(held, r.WithContext(turns.WithHold(r.Context(), hold)))
		}()
		held.send()
	}
}

// readBodyFirst reads a request's body (at most the limit limitBody set)
// before the request asks for a turn, so a client sending its body
// slowly waits on the network without holding a turn that others need.
// The handler reads the same bytes, and the same error if reading failed
// (a body over the limit is still refused with 413 by the handler).
func readBodyFirst(r *http.Request) {
	if r.Body == nil || r.Body == http.NoBody {
		return
	}
	b, err := io.ReadAll(r.Body)
	var rd io.Reader = bytes.NewReader(b)
	if err != nil {
		rd = io.MultiReader(rd, failingReader{err})
	}
	r.Body = io.NopCloser(rd)
}

// failingReader returns its error on every read.
type failingReader struct{ err error }

func (f failingReader) Read([]byte) (int, error) { return 0, f.err }

// heldResponse keeps a handler's status and body until send; headers go
// straight to the real response's header map.
type heldResponse struct {
	w      http.ResponseWriter
	status int
	body   *bytes.Buffer
	// gzip says the browser takes a gzipped body (static_assets.go's
	// acceptsGzip): a page is sent gzipped, a phone on a slow link
	// waiting for a fifth of it (a round-2 question page of 74 kB, its
	// pictures' SVG, arrived as 12 kB; a preview of 23 kB as 5 kB).
	gzip bool
}

func (h *heldResponse) Header() http.Header { return h.w.Header() }

func (h *heldResponse) WriteHeader(status int) {
	if h.status == 0 {
		h.status = status
	}
}

func (h *heldResponse) Write(b []byte) (int, error) {
	h.WriteHeader(http.StatusOK)
	return h.body.Write(b)
}

func (h *heldResponse) send() {
	if h.status == 0 {
		return
	}
	body := h.body
	if h.status >= 200 && h.status != http.StatusNoContent && h.status != http.StatusNotModified {
		hdr := h.w.Header()
		if strings.HasPrefix(hdr.Get("Content-Type"), "text/html") && hdr.Get("Content-Encoding") == "" {
			hdr.Add("Vary", "Accept-Encoding")
			if h.gzip && body.Len() >= gzipFrom {
				z := getBuffer()
				defer putBuffer(z)
				gzipInto(z, body.Bytes())
				hdr.Set("Content-Encoding", "gzip")
				body = z
			}
		}
		hdr.Set("Content-Length", strconv.Itoa(body.Len()))
	}
	h.w.WriteHeader(h.status)
	_, _ = body.WriteTo(h.w)
}

// gzipFrom is the smallest page worth gzipping: below it the gzip
// header and the work outweigh the bytes saved.
const gzipFrom = 1024

// gzipInto writes b gzipped into z.
func gzipInto(z *bytes.Buffer, b []byte) {
	gw := gzipWriters.Get().(*gzip.Writer)
	gw.Reset(z)
	_, _ = gw.Write(b)
	_ = gw.Close()
	gzipWriters.Put(gw)
}

// gzipWriters are kept for reuse: each holds some hundreds of kB of
// compressor state. The fastest level makes a fifth of a page as it is.
var gzipWriters = sync.Pool{New: func() any {
	w, _ := gzip.NewWriterLevel(io.Discard, gzip.BestSpeed)
	return w
}}

package web

import (
	"bytes"
	"io"
	"net/http"
	"strconv"

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
		held := &heldResponse{w: w, body: getBuffer()}
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
	if h.status >= 200 && h.status != http.StatusNoContent && h.status != http.StatusNotModified {
		h.w.Header().Set("Content-Length", strconv.Itoa(h.body.Len()))
	}
	h.w.WriteHeader(h.status)
	_, _ = h.body.WriteTo(h.w)
}

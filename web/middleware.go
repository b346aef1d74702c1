package web

import (
	"errors"
	"fmt"
	"net/http"
	"regexp"
	"sort"
	"strconv"
	"strings"

	"github.com/parley-elicit/parley/elicit/answersheet"
	"github.com/parley-elicit/parley/elicit/input"
)

// MaxBodyBytes is the largest request body Parley reads; anything larger
// is refused with 413. The largest form, a workshop's title, purpose,
// decision and notes (input.MaxShortText + 3 × input.MaxLongText = 12,200
// characters), takes about 146 kB at its limits in four-byte letters,
// each sent percent-encoded as 12 bytes; 256 KiB leaves room for every
// form's other fields.
const MaxBodyBytes = 256 << 10

// contentSecurityPolicy allows only Parley's own embedded assets: no
// inline script or style anywhere, no framing, forms post only to us.
const contentSecurityPolicy = "default-src 'none'; script-src 'self'; style-src 'self'; " +
	"img-src 'self' data:; connect-src 'self'; form-action 'self'; base-uri 'none'; frame-ancestors 'none'"

// securityHeaders sets the headers every response carries. Pages are not
// cached and send no referrer because experts' tokens live in URLs.
func securityHeaders(next http.Handler) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		h := w.Header()
		h.Set("Content-Security-Policy", contentSecurityPolicy)
		h.Set("X-Content-Type-Options", "nosniff")
		h.Set("Referrer-Policy", "no-referrer")
		h.Set("X-Frame-Options", "DENY")
		h.Set("Cross-Origin-Opener-Policy", "same-origin")
		h.Set("Cross-Origin-Resource-Policy", "same-origin")
		h.Set("Permissions-Policy", "camera=(), microphone=(), geolocation=()")
		if !strings.HasPrefix(r.URL.Path, "/static/") {
			h.Set("Cache-Control", "no-store")
		}
		next.ServeHTTP(w, r)
	})
}

// limitBody refuses a declared oversize body at once and caps every other
// body with http.MaxBytesReader, so reading past the limit fails and
// parseForm answers 413.
func limitBody(next http.Handler) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		limit := int64(MaxBodyBytes)
		if sheetUpload.MatchString(r.URL.Path) {
			limit = sheetBodyBytes
		}
		if r.ContentLength > limit {
			tooLarge(w, limit)
			return
		}
		r.Body = http.MaxBytesReader(w, r.Body, limit)
		next.ServeHTTP(w, r)
	})
}

// sheetBodyBytes is the body limit of an answer sheet's upload: the
// sheet and its form's parts.
const sheetBodyBytes = answersheet.MaxBytes + 64<<10

// sheetUpload is the one address that takes more than MaxBodyBytes: an
// answer sheet's upload.
var sheetUpload = regexp.MustCompile(`^/w/[0-9]+/answers/import$`)

// tooLarge answers a body over limit, naming the limit that applied.
func tooLarge(w http.ResponseWriter, limit int64) {
	msg := "The request is larger than Parley accepts (" + strconv.FormatInt(limit>>10, 10) + " KiB). Nothing was saved.\n"
	if limit == sheetBodyBytes {
		msg = "An answer sheet takes at most 1 MiB (1,048,576 bytes); this upload is larger. Nothing was saved.\n"
	}
	w.Header().Set("Content-Type", "text/plain; charset=utf-8")
	w.Header().Set("Connection", "close")
	w.WriteHeader(http.StatusRequestEntityTooLarge)
	_, _ = w.Write([]byte(msg))
}

// crossOrigin wraps next in net/http's CrossOriginProtection, and goes one
// step further: a state-changing request that carries neither
// Sec-Fetch-Site nor Origin is refused too. Every browser sends Origin on
// a POST, so only scripts are affected; they must send an Origin header
// naming this server (e.g. "Origin: http://127.0.0.1:8080").
func crossOrigin(next http.Handler) http.Handler {
	cop := http.NewCrossOriginProtection()
	cop.SetDenyHandler(http.HandlerFunc(forbiddenOrigin))
	protected := cop.Handler(next)
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		switch r.Method {
		case http.MethodGet, http.MethodHead, http.MethodOptions:
		default:
			if r.Header.Get("Sec-Fetch-Site") == "" && r.Header.Get("Origin") == "" {
				forbiddenOrigin(w, r)
				return
			}
		}
		protected.ServeHTTP(w, r)
	})
}

func forbiddenOrigin(w http.ResponseWriter, _ *http.Request) {
	w.Header().Set("Content-Type", "text/plain; charset=utf-8")
	w.WriteHeader(http.StatusForbidden)
	_, _ = w.Write([]byte("Refused: this request did not come from a Parley page on this server (Origin / Sec-Fetch-Site check).\n"))
}

// parseForm reads a posted form within the body limit. It answers 413 or
// 400 itself and returns false when the form cannot be read.
func parseForm(w http.ResponseWriter, r *http.Request) bool {
	if err := r.ParseForm(); err != nil {
		var mbe *http.MaxBytesError
		if errors.As(err, &mbe) {
			tooLarge(w, mbe.Limit)
			return false
		}
		http.Error(w, "The form could not be read: "+err.Error(), http.StatusBadRequest)
		return false
	}
	return oneValueEach(w, r.PostForm)
}

// oneValueEach refuses a form that sends a field twice. Every field of
// every Parley form takes one value. A second one is refused rather than
// silently dropped (net/url keeps both and Get returns the first), since
// it comes only from a hand-made request. It answers 400 itself and
// returns false.
func oneValueEach(w http.ResponseWriter, form map[string][]string) bool {
	names := make([]string, 0, len(form))
	for name, vs := range form {
		if len(vs) > 1 {
			names = append(names, name)
		}
	}
	if len(names) > 0 {
		sort.Strings(names)
		http.Error(w, fmt.Sprintf("The form could not be read: %s: takes one value, got %d. Nothing was saved.",
			input.Clip(names[0], 40), len(form[names[0]])), http.StatusBadRequest)
		return false
	}
	return true
}

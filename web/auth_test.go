package web

import (
	"encoding/base64"
	"net/http"
	"net/url"
	"strings"
	"testing"
)

// spellings returns other ways of writing token that a lenient base64
// decoder reads as the same 32 bytes (issue 13, item 6): the three other
// last characters whose unused low bits differ, CR or LF inserted (the
// decoder skips them), padding, and surrounding spaces. Each is given as
// it would appear in a URL path.
func spellings(t *testing.T, token string) []string {
	t.Helper()
	const alphabet = "ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789-_"
	last := strings.IndexByte(alphabet, token[len(token)-1])
	if last < 0 {
		t.Fatalf("token %q does not end in a base64url character", token)
	}
	var out []string
	for flip := 1; flip <= 3; flip++ {
		v := token[:len(token)-1] + string(alphabet[last^flip])
		// The variant really is the same bytes to a lenient decoder.
		a, _ := base64.RawURLEncoding.DecodeString(token)
		b, err := base64.RawURLEncoding.DecodeString(v)
		if err != nil || string(a) != string(b) {
			t.Fatalf("variant %q does not decode to the token's bytes", v)
		}
		out = append(out, v)
	}
	for _, at := range []int{0, 1, 21, len(token) - 1, len(token)} {
		out = append(out, token[:at]+"%0A"+token[at:], token[:at]+"%0D"+token[at:])
	}
	return append(out, token+"%3D", token+"%3D%3D", "%20"+token, token+"%20", token+"%09")
}

// TestTokenSpellingsRefused: an expert's link and the facilitator's
// session cookie work only as issued; every other spelling of the same
// bytes answers 404 (the link) or is not signed in (the cookie).
func TestTokenSpellingsRefused(t *testing.T) {
	h, _, _, _, links := seeded(t)
	token := strings.TrimSuffix(strings.TrimPrefix(links[0].Path, "/e/"), "/")
	if res, _ := h.get("/e/" + token + "/"); res.StatusCode != http.StatusOK {
		t.Fatalf("the link as issued: %d", res.StatusCode)
	}
	for _, v := range spellings(t, token) {
		if res, _ := h.get("/e/" + v + "/"); res.StatusCode != http.StatusNotFound {
			t.Errorf("expert link spelled %q: %d, want 404", v, res.StatusCode)
		}
	}

	var session string
	for _, c := range h.client.Jar.Cookies(mustURL(t, h.ts.URL)) {
		if c.Name == sessionCookie {
			session = c.Value
		}
	}
	if session == "" {
		t.Fatal("no session cookie after signing in")
	}
	withCookie := func(value string) int {
		req, err := http.NewRequest(http.MethodGet, h.ts.URL+"/", nil)
		if err != nil {
			t.Fatal(err)
		}
		// Set on the header as sent, so the jar cannot tidy the value.
		req.Header.Set("Cookie", sessionCookie+"="+value)
		res, err := http.DefaultTransport.RoundTrip(req)
		if err != nil {
			t.Fatal(err)
		}
		res.Body.Close()
		return res.StatusCode
	}
	if st := withCookie(session); st != http.StatusOK {
		t.Fatalf("the session cookie as issued: %d", st)
	}
	for _, v := range spellings(t, session) {
		// A cookie carries raw bytes, not %-escapes.
		raw := strings.NewReplacer("%0A", "\n", "%0D", "\r", "%3D", "=", "%20", " ", "%09", "\t").Replace(v)
		if strings.ContainsAny(raw, "\r\n \t") {
			// CR and LF cannot be sent in a header at all, and HTTP's
			// own cookie parsing drops spaces around a value before
			// Parley sees it.
			continue
		}
		if st := withCookie(raw); st != http.StatusSeeOther {
			t.Errorf("session cookie spelled %q: %d, want 303 to the sign-in page", raw, st)
		}
	}
	for _, bad := range []string{"", "x", strings.Repeat("A", 42), strings.Repeat("A", 44), session[:42] + "!"} {
		if _, ok := tokenHash(bad); ok {
			t.Errorf("tokenHash(%q) accepted", bad)
		}
	}
}

func mustURL(t *testing.T, s string) *url.URL {
	t.Helper()
	u, err := url.Parse(s)
	if err != nil {
		t.Fatal(err)
	}
	return u
}

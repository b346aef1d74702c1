package web

import (
	"context"
	"net/http"
	"net/url"
	"strings"
	"testing"
	"time"
)

// TestSignInAddressWorksOnce: the sign-in address signs one browser in
// once (issue 13, item 7). A second use is refused, in another browser
// and in the same one; a new address (as `parley serve` prints when the
// last one was used) leaves the signed-in browser signed in; a reset
// signs it out.
func TestSignInAddressWorksOnce(t *testing.T) {
	h := newHarness(t)
	ctx := context.Background()
	secret, err := EnsureFacilitatorSecret(ctx, h.db)
	if err != nil || secret == "" {
		t.Fatalf("EnsureFacilitatorSecret = %q, %v", secret, err)
	}
	if res, _ := h.post("/signin", url.Values{"secret": {secret}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("first use: %d", res.StatusCode)
	}
	other := newHarnessClient(h)
	for name, c := range map[string]*harness{"another browser": other, "the same browser": h} {
		res, body := c.post("/signin", url.Values{"secret": {secret}})
		if res.StatusCode != http.StatusUnauthorized || !strings.Contains(body, "does not match an unused sign-in address") {
			t.Errorf("second use from %s: %d", name, res.StatusCode)
		}
	}
	if res, _ := other.get("/"); res.StatusCode != http.StatusSeeOther {
		t.Errorf("the refused browser is signed in: %d", res.StatusCode)
	}
	if stored, _ := h.db.FacilitatorHash(ctx); stored != nil {
		t.Error("the used secret's hash is still stored")
	}

	// The server's next start issues a new address and keeps the session.
	next, err := EnsureFacilitatorSecret(ctx, h.db)
	if err != nil || next == "" || next == secret {
		t.Fatalf("after use, EnsureFacilitatorSecret = %q, %v; want a new secret", next, err)
	}
	if again, _ := EnsureFacilitatorSecret(ctx, h.db); again != "" {
		t.Error("an unused secret was replaced by the next start")
	}
	if res, _ := h.get("/"); res.StatusCode != http.StatusOK {
		t.Errorf("issuing a new address signed the browser out: %d", res.StatusCode)
	}
	if res, _ := other.post("/signin", url.Values{"secret": {next}}); res.StatusCode != http.StatusSeeOther {
		t.Errorf("the new address: %d", res.StatusCode)
	}
	// A reset ends both sessions.
	if _, err := ResetFacilitatorSecret(ctx, h.db); err != nil {
		t.Fatal(err)
	}
	for name, c := range map[string]*harness{"first": h, "second": other} {
		if res, _ := c.get("/"); res.StatusCode != http.StatusSeeOther {
			t.Errorf("%s browser still signed in after a reset: %d", name, res.StatusCode)
		}
	}
}

// TestExpiredSessionsPurged: a session past its expiry is deleted from
// the store when the next one starts, not kept for ever.
func TestExpiredSessionsPurged(t *testing.T) {
	h := newHarness(t)
	ctx := context.Background()
	t0 := time.Now()
	h.srv.now = func() time.Time { return t0 }
	h.signIn()
	if n, _ := h.db.Sessions(ctx); n != 1 {
		t.Fatalf("%d sessions after one sign-in", n)
	}
	later := t0.Add(sessionLifetime + time.Minute)
	h.srv.now = func() time.Time { return later }
	secret, err := IssueFacilitatorSecret(ctx, h.db)
	if err != nil {
		t.Fatal(err)
	}
	if res, _ := newHarnessClient(h).post("/signin", url.Values{"secret": {secret}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("second sign-in: %d", res.StatusCode)
	}
	if n, _ := h.db.Sessions(ctx); n != 1 {
		t.Errorf("%d sessions stored after the first expired and a second began, want 1", n)
	}
	// The store's own purge, as `parley serve` runs it at start.
	if n, err := h.db.PurgeSessions(ctx, later.Add(sessionLifetime)); n != 1 || err != nil {
		t.Errorf("PurgeSessions = %d, %v; want 1 expired session", n, err)
	}
}

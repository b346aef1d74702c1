package e2e

import (
	"context"
	"fmt"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/web"
)

// TestSignInAddressInBrowser: the sign-in address signs in when pasted
// into a tab that is already on the sign-in page (only the fragment
// changes, so no page loads), and on the refused page; the secret leaves
// the address bar; and the address works once (issues 10 and 13).
func TestSignInAddressInBrowser(t *testing.T) {
	site := startSite(t)
	b := startBrowser(t)
	shots := newScreenshots(t)
	secret := strings.TrimPrefix(site.SignIn, site.URL+"/signin#")

	fac := b.person("facilitator")
	fac.open(site.URL + "/signin")
	fac.sees("the sign-in page", "Facilitator sign-in", "works once")
	// Pasting the address into the address bar of this tab is a
	// navigation to the same page with another fragment; assigning
	// location.href makes the same navigation.
	eval[bool](fac, "paste the sign-in address", fmt.Sprintf(`(location.href = %q, true)`, site.SignIn))
	fac.waitFor("the workshop list", `!!document.querySelector('form[action="/workshops"]')`)
	if u := fac.url(); strings.Contains(u, "#") || strings.Contains(u, secret) {
		t.Errorf("after signing in by pasting, the address bar shows %q", u)
	}

	// The same address in another browser: spent.
	other := b.person("someone else")
	other.open(site.SignIn)
	other.waitFor("the refusal", `!!document.getElementById("err-secret")`)
	other.sees("a used address", "does not match an unused sign-in address", "facilitator-reset")
	if u := other.url(); strings.Contains(u, secret) {
		t.Errorf("the refused secret stays in the address bar: %s", u)
	}
	for _, size := range []struct {
		w, h   int64
		mobile bool
		name   string
	}{{phoneWidth, phoneHeight, true, "phone"}, {1366, 768, false, "projector"}} {
		other.viewport(size.w, size.h, size.mobile)
		shots.take(other, "signin-used-address-"+size.name)
	}

	// A new address pasted into the tab showing the refusal signs in.
	next, err := web.IssueFacilitatorSecret(context.Background(), site.DB)
	if err != nil {
		t.Fatal(err)
	}
	eval[bool](other, "paste the new address", fmt.Sprintf(`(location.href = %q, true)`, site.URL+web.SignInPath(next)))
	other.waitFor("the workshop list", `!!document.querySelector('form[action="/workshops"]')`)
	if u := other.url(); strings.Contains(u, next) {
		t.Errorf("the new secret stays in the address bar: %s", u)
	}
	// The first browser is still signed in: a new address signs nobody out.
	fac.open(site.URL + "/")
	fac.sees("the first browser after a new address", "Workshops")
}

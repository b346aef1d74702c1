package e2e

import (
	"net/http"
	"strconv"
	"strings"
	"testing"

	"github.com/chromedp/chromedp"
)

// Who can reach what, seen from the browsers of a stranger, an expert and
// the facilitator: a wrong secret, an unknown link, a revoked link, a
// re-issued link and signing out.
func TestAccessInBrowser(t *testing.T) {
	site := startSite(t)
	b := startBrowser(t)
	shots := newScreenshots(t)

	// A stranger with a made-up secret of the right shape.
	stranger := b.person("stranger")
	stranger.open(site.URL + "/signin#" + strings.Repeat("A", 43))
	stranger.waitFor("the refusal", `!!document.getElementById("err-secret")`)
	stranger.sees("wrong secret", "Facilitator sign-in", "does not match")
	if u := stranger.url(); strings.Contains(u, "#") {
		t.Errorf("the secret stays in the address bar after a refused sign-in: %s", u)
	}
	if st := stranger.open(site.URL + "/e/" + strings.Repeat("B", 43) + "/"); st != http.StatusNotFound {
		t.Errorf("unknown expert link: status %d, want 404", st)
	}
	stranger.sees("unknown expert link", "This link does not work", "ask the facilitator for your current link")

	fac := b.person("facilitator")
	signIn(t, site, fac)
	wsURL := createWorkshop(t, site, fac)
	link := addExpert(t, fac, wsURL, "Cy Placeholder", "")

	ex := b.person("Cy")
	if st := ex.open(link); st != http.StatusOK {
		t.Fatalf("expert link: status %d", st)
	}
	ex.sees("expert home", "Cy Placeholder", "The facilitator has not added any questions yet.")

	// Revoked: the same link now leads nowhere.
	fac.open(wsURL)
	row := `#roster tbody tr:nth-child(1)`
	fac.fill(row+` form[action$="/revoke"]`, "reason", "Left the panel (invented).")
	fac.load("revoke", chromedp.Click(chromedp.CSS(row+` form[action$="/revoke"] button`)))
	// Revoking asks first; nothing has changed until it is confirmed.
	fac.sees("revoke confirmation", "Revoke the access of Cy Placeholder?", "Keep their access")
	if st := ex.open(link); st != http.StatusOK {
		t.Errorf("an unconfirmed revoke ended the link: status %d", st)
	}
	if v := fac.value(`form[action$="/revoke"] [name=reason]`); v != "Left the panel (invented)." {
		t.Errorf("the confirmation lost the reason: %q", v)
	}
	fac.load("confirm the revoke", chromedp.Click(chromedp.CSS(`form[action$="/revoke"] button.button-danger`)))
	fac.sees("roster after revoking", "revoked")
	if st := ex.open(link); st != http.StatusNotFound {
		t.Errorf("revoked link: status %d, want 404", st)
	}
	ex.sees("revoked link", "This link does not work", "ask the facilitator for your current link")
	notShown(t, ex, "revoked link", "Cy Placeholder", "Pump reliability panel (invented)")

	// Re-issued: a new link works, the old one still does not.
	fac.open(wsURL)
	fac.load("re-issue the link", chromedp.Click(chromedp.CSS(row+` form[action$="/reissue"] button`)))
	// A new link is confirmed first, as revoking is.
	fac.sees("the new link's confirmation", "a new link and their access back?", "Issue the new link", "Leave their access revoked")
	for _, width := range []int64{390, 1366} {
		fac.viewport(width, 844, width < 1000)
		fits(t, fac, "the new link's confirmation", width)
		shots.take(fac, "access-reissue-confirm-"+strconv.FormatInt(width, 10))
	}
	fac.load("confirm the new link", chromedp.Click(chromedp.CSS(`form[action$="/reissue"] button[type=submit]`)))
	fresh := expertLink.FindString(fac.text())
	if fresh == "" || fresh == link {
		t.Fatalf("re-issuing showed no new link (got %q, old %q)", fresh, link)
	}
	if st := ex.open(link); st != http.StatusNotFound {
		t.Errorf("the old link works again after re-issuing: status %d", st)
	}
	if st := ex.open(fresh); st != http.StatusOK {
		t.Errorf("re-issued link: status %d", st)
	}
	ex.sees("re-issued link", "Cy Placeholder")

	// Signing out ends the facilitator's session in that browser only.
	fac.load("sign out", chromedp.Click(chromedp.CSS(`form[action="/signout"] button`)))
	fac.sees("after signing out", "Facilitator sign-in")
	fac.open(wsURL)
	fac.sees("a workshop page after signing out", "Facilitator sign-in")
	notShown(t, fac, "a workshop page after signing out", "Pump reliability panel (invented)")
}

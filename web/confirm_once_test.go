package web

import (
	"html"
	"net/http"
	"net/url"
	"strconv"
	"strings"
	"testing"
)

// A correction's confirmation, and that of a question brought back, are
// shown once: they rode in the panel's address (?done=corrected), and
// every reload of the panel said again that the correction was saved.
// The same form sent twice (a double click, a browser's retry) is saved
// once, and the copy that reaches the browser still confirms it.
func TestPanelConfirmsASaveOnce(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	q := qs[0]
	panel := questionPath(ws.ID, q.ID)
	// The panel as the browser is sent to it, and as a reload asks for it
	// again.
	at := panel
	shows := func(want string) bool {
		t.Helper()
		res, page := h.get(at)
		if res.StatusCode != http.StatusOK {
			t.Fatalf("panel: %d", res.StatusCode)
		}
		return strings.Contains(page, want)
	}
	const corrected, restored = "Correction saved.", "The question is back: experts see it again."

	_, page := h.get(panel + "/edit")
	form := url.Values{"wording": {q.Wording + " (Corrected, invented.)"}, "quantity": {q.Quantity}, "units": {q.Units},
		"reason": {"Clearer wording (invented)."}, onceName: {keyOf(t, page, panel+"/edit")}}
	r, _ := h.post(panel+"/edit", form)
	if at = r.Header.Get("Location"); r.StatusCode != http.StatusSeeOther || !strings.HasPrefix(at, panel) {
		t.Fatalf("correction: %d to %q, want 303 to the panel", r.StatusCode, at)
	}
	if !shows(corrected) {
		t.Error("the panel after a correction does not say it was saved")
	}
	if shows(corrected) {
		t.Error("the panel reloaded says again that the correction was saved")
	}

	r, _ = h.post(panel+"/edit", form)
	if at = r.Header.Get("Location"); r.StatusCode != http.StatusSeeOther || !strings.HasPrefix(at, panel) {
		t.Fatalf("the same correction sent again: %d to %q, want 303 to the panel", r.StatusCode, at)
	}
	if !shows(corrected) || shows(corrected) {
		t.Error("the correction sent again is not confirmed once")
	}

	retire := panel + "/retire"
	if r, _ := h.post(retire, url.Values{"action": {"retire"}, "retire_reason": {"Duplicate (invented)."}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("retire: %d", r.StatusCode)
	}
	at = panel
	if shows(restored) {
		t.Error("the panel of a retired question says it is back")
	}
	r, _ = h.post(retire, url.Values{"action": {"restore"}, "retire_reason": {"Kept after all (invented)."}})
	if at = r.Header.Get("Location"); r.StatusCode != http.StatusSeeOther || !strings.HasPrefix(at, panel) {
		t.Fatalf("restore: %d to %q", r.StatusCode, at)
	}
	if !shows(restored) {
		t.Error("the panel after bringing the question back does not say so")
	}
	if shows(restored) {
		t.Error("the panel reloaded says again that the question is back")
	}
}

// "Saved." on the expert's page, and the saved banner on the
// facilitator's entry page, rode in the address (?saved=1): a reload, or
// the address kept in a tab, said again that the answer was saved. They
// are now said once, on the page the save leads to, without a script;
// the same form sent twice (a double click, a browser's retry) is saved
// once and still says so once.
func TestSavedIsSaidOnce(t *testing.T) {
	h, ws, qs, es, links := seeded(t)
	ex := newHarnessOn(t, h) // the expert's own browser
	q := qs[0]
	priya := es[2] // the demo's Priya Raman has answered nothing
	for _, c := range []struct {
		who, page, saved string
		b                *harness
		form             url.Values
	}{
		{"the expert's page", strings.TrimSuffix(links[2].Path, "/") + "/q/" + strconv.FormatInt(q.ID, 10),
			"Saved. Your answer is recorded", ex,
			url.Values{"values[0]": {"0.02"}, "values[1]": {"0.05"}, "values[2]": {"0.12"}, "reason": {"Field returns (invented)."}}},
		{"the entry page", entryPath(ws.ID, q.ID, priya.ID), "Saved for Priya Raman as a new revision", h,
			url.Values{"channel": {"phone"}, "values[0]": {"0.01"}, "values[1]": {"0.04"}, "values[2]": {"0.10"}}},
	} {
		at := c.page // as the browser is sent to it, and reloads it
		shows := func(when string) bool {
			t.Helper()
			res, page := c.b.get(at)
			if res.StatusCode != http.StatusOK {
				t.Fatalf("%s, %s: %d", c.who, when, res.StatusCode)
			}
			return strings.Contains(page, c.saved)
		}
		if shows("before saving") {
			t.Errorf("%s says it saved before anything was", c.who)
		}
		for _, twice := range []bool{false, true} {
			_, page := c.b.get(c.page)
			c.form.Set(onceName, keyOf(t, page, c.page+"/preview"))
			if twice {
				// The first copy's answer never reaches the browser,
				// which follows the second's.
				if r := postLost(t, c.b, c.page+"/save", c.form); r.StatusCode != http.StatusSeeOther {
					t.Fatalf("%s, the first copy: %d", c.who, r.StatusCode)
				}
			}
			{
				r, body := c.b.post(c.page+"/save", c.form)
				if at = r.Header.Get("Location"); r.StatusCode != http.StatusSeeOther || !strings.HasPrefix(at, c.page) {
					t.Fatalf("%s, save: %d to %q, want 303 to the page\n%s", c.who, r.StatusCode, at, body)
				}
			}
			if !shows("after saving") {
				t.Errorf("%s (form sent twice: %v) does not say the answer was saved", c.who, twice)
			}
			if shows("reloaded") {
				t.Errorf("%s (form sent twice: %v), reloaded, says again that the answer was saved", c.who, twice)
			}
		}
	}
}

// postLost sends a form from b's browser, with its cookies, whose answer
// the browser never sees: the first copy of a form sent twice.
func postLost(t *testing.T, b *harness, path string, v url.Values) *http.Response {
	t.Helper()
	req, err := http.NewRequest(http.MethodPost, b.ts.URL+path, strings.NewReader(v.Encode()))
	if err != nil {
		t.Fatal(err)
	}
	req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
	req.Header.Set("Origin", b.ts.URL)
	for _, c := range b.client.Jar.Cookies(req.URL) {
		req.AddCookie(c)
	}
	res, err := (&http.Client{CheckRedirect: b.client.CheckRedirect}).Do(req)
	if err != nil {
		t.Fatal(err)
	}
	res.Body.Close()
	return res
}

// The workshop list says which workshop was just deleted, once. The
// deletion led to /?deleted=N, which the list never read: it said
// nothing of it, and an address that named the deletion would have said
// it again at every reload. The confirmation rides in a cookie whose
// value names the workshop by its id, read back only in that shape; the
// list takes the title from its own record of deletions, so a forged
// cookie shows nothing that was not deleted. The form sent twice still
// says it once.
func TestDeletionIsSaidOnce(t *testing.T) {
	h := newHarness(t)
	h.signIn()
	at := "/" // the list as the browser is sent to it, and reloads it
	list := func(when string) string {
		t.Helper()
		r, body := h.get(at)
		if r.StatusCode != http.StatusOK {
			t.Fatalf("the list, %s: %d", when, r.StatusCode)
		}
		return html.UnescapeString(body)
	}
	said := func(title string) string { return "“" + title + "” was deleted." }
	var gone int64
	for _, twice := range []bool{false, true} {
		title := "Made by mistake (invented, sent twice: " + strconv.FormatBool(twice) + ")"
		ws := h.newWorkshop(title)
		gone = ws.ID
		del := workshopPath(ws.ID) + "/delete"
		_, page := h.get(del)
		form := url.Values{"reason": {"Created twice (invented)."}, "confirm": {"on"}, onceName: {keyOf(t, page, del)}}
		if twice {
			if r := postLost(t, h, del, form); r.StatusCode != http.StatusSeeOther {
				t.Fatalf("the first copy: %d", r.StatusCode)
			}
		}
		r, _ := h.post(del, form)
		if at = r.Header.Get("Location"); r.StatusCode != http.StatusSeeOther || !strings.HasPrefix(at, "/") || strings.HasPrefix(at, "/w/") {
			t.Fatalf("delete (sent twice: %v): %d to %q, want 303 to the list", twice, r.StatusCode, at)
		}
		if !strings.Contains(list("after the deletion"), said(title)) {
			t.Errorf("the list after the deletion (sent twice: %v) does not say %q", twice, said(title))
		}
		if strings.Contains(list("reloaded"), "was deleted.") {
			t.Errorf("the list reloaded (sent twice: %v) says again that a workshop was deleted", twice)
		}
	}

	// A cookie of another shape, or naming a workshop that was not
	// deleted, says nothing.
	at = "/"
	alive := h.newWorkshop("Still running (invented)")
	base, err := url.Parse(h.ts.URL + "/")
	if err != nil {
		t.Fatal(err)
	}
	for _, forged := range []string{
		deletedConfirmation(alive.ID), deletedConfirmation(alive.ID + 1000),
		"deleted-0", "deleted--1", "deleted-+1", "deleted-", "deleted-1x", "deleted-99999999999999999999", doneSaved,
	} {
		h.client.Jar.SetCookies(base, []*http.Cookie{{Name: doneCookie, Value: forged, Path: "/"}})
		if text := list("with " + forged); strings.Contains(text, "was deleted.") {
			t.Errorf("a cookie %q makes the list say a workshop was deleted", forged)
		}
	}
	if _, body := h.get("/?deleted=" + strconv.FormatInt(gone, 10)); strings.Contains(body, "was deleted.") {
		t.Error("the list's old address says again that a workshop was deleted")
	}
}

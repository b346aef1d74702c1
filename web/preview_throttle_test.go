package web

import (
	"net/http"
	"net/url"
	"strconv"
	"strings"
	"testing"
	"time"
)

// Each expert's previews are limited: PreviewBurst at once, then one
// every previewEvery; the allowance of one expert is not another's.
func TestPreviewThrottleAdmit(t *testing.T) {
	th := newLinkThrottle(0, PreviewBurst, previewEvery)
	now := time.Date(2026, 3, 3, 10, 0, 0, 0, time.UTC)
	for i := range PreviewBurst {
		if d := th.admit(1, now); d != 0 {
			t.Fatalf("preview %d of the burst waits %v", i+1, d)
		}
	}
	if d := th.admit(1, now); d != previewEvery {
		t.Fatalf("a preview past the burst waits %v, want %v", d, previewEvery)
	}
	if d := th.admit(2, now); d != 0 {
		t.Fatalf("another expert's first preview waits %v", d)
	}
	if d := th.admit(1, now.Add(previewEvery)); d != 0 {
		t.Fatalf("after %v: waits %v", previewEvery, d)
	}
	if d := th.admit(1, now.Add(previewEvery)); d <= 0 {
		t.Fatal("a second preview in the same tenth of a second was admitted")
	}
}

// A link that sends previews without pause (a script, a stuck page) is
// answered 429 with Retry-After past its allowance, before it takes a
// turn; the other experts' previews go on, and the refused page says
// what to do, for an expert whose page posts without the script.
func TestOneExpertsPreviewsCannotCrowdOutTheOthers(t *testing.T) {
	h, _, qs, _, links := seeded(t)
	frozen := time.Date(2026, 3, 3, 10, 0, 0, 0, time.UTC)
	h.srv.now = func() time.Time { return frozen } // no allowance comes back during the test
	ex := newHarnessOn(t, h)
	preview := func(link string) (*http.Response, string) {
		return ex.post(strings.TrimSuffix(link, "/")+"/q/"+strconv.FormatInt(qs[0].ID, 10)+"/preview?fragment=1",
			url.Values{"values[0]": {"0.02"}, "values[1]": {"0.05"}, "values[2]": {"0.12"}})
	}
	for i := range PreviewBurst {
		if res, body := preview(links[0].Path); res.StatusCode != http.StatusOK {
			t.Fatalf("preview %d: %d %s", i+1, res.StatusCode, body)
		}
	}
	res, body := preview(links[0].Path)
	if res.StatusCode != http.StatusTooManyRequests || res.Header.Get("Retry-After") != "1" || !strings.Contains(body, "Nothing is lost") {
		t.Fatalf("a preview past the allowance: %d, Retry-After %q", res.StatusCode, res.Header.Get("Retry-After"))
	}
	if res, body := preview(links[1].Path); res.StatusCode != http.StatusOK || !strings.Contains(body, "Beta(") {
		t.Fatalf("another expert's preview meanwhile: %d %s", res.StatusCode, body)
	}
}

// A link that saves without pause is refused past SaveBurst saves with
// 429, Retry-After and words saying nothing was saved, and no revision is
// written beyond the allowance; the other experts' saves go on. Every
// save is a revision kept for good, so a script on one link wrote
// thousands a minute into the record.
func TestOneLinkCannotSaveWithoutPause(t *testing.T) {
	h, _, qs, _, links := seeded(t)
	frozen := time.Date(2026, 3, 3, 10, 0, 0, 0, time.UTC)
	h.srv.now = func() time.Time { return frozen }
	ex := newHarnessOn(t, h)
	save := func(link string, i int) (*http.Response, string) {
		return ex.post(strings.TrimSuffix(link, "/")+"/q/"+strconv.FormatInt(qs[0].ID, 10)+"/save",
			url.Values{"values[0]": {"0.02"}, "values[1]": {"0.05"}, "values[2]": {strconv.FormatFloat(0.12+float64(i)/1e4, 'f', -1, 64)}})
	}
	revisions := func() int {
		t.Helper()
		rs, err := h.db.Revisions(t.Context(), qs[0].WorkshopID)
		if err != nil {
			t.Fatal(err)
		}
		return len(rs)
	}
	before := revisions()
	for i := range SaveBurst {
		if res, body := save(links[0].Path, i); res.StatusCode != http.StatusSeeOther {
			t.Fatalf("save %d: %d %.300s", i+1, res.StatusCode, body)
		}
	}
	res, body := save(links[0].Path, SaveBurst)
	if res.StatusCode != http.StatusTooManyRequests || res.Header.Get("Retry-After") != "1" || !strings.Contains(body, "Nothing was saved") {
		t.Fatalf("a save past the allowance: %d, Retry-After %q", res.StatusCode, res.Header.Get("Retry-After"))
	}
	if n := revisions() - before; n != SaveBurst {
		t.Errorf("%d revisions written, want %d", n, SaveBurst)
	}
	if res, body := save(links[1].Path, 0); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("another expert's save meanwhile: %d %.300s", res.StatusCode, body)
	}
}

// A link that opens pages without pause (a script, a stuck tab reloading)
// is answered 429 with Retry-After past its allowance, before it takes a
// turn, on its home and its question pages alike; another expert's pages
// and the facilitator's go on.
func TestOneLinkCannotOpenPagesWithoutPause(t *testing.T) {
	h, ws, qs, _, links := seeded(t)
	frozen := time.Date(2026, 3, 3, 10, 0, 0, 0, time.UTC)
	h.srv.now = func() time.Time { return frozen } // no allowance comes back during the test
	ex := newHarnessOn(t, h)
	home := links[0].Path
	question := strings.TrimSuffix(home, "/") + "/q/" + strconv.FormatInt(qs[0].ID, 10)
	for i := range PageBurst {
		page := home
		if i%2 == 1 {
			page = question
		}
		if res, body := ex.get(page); res.StatusCode != http.StatusOK {
			t.Fatalf("page %d of the allowance: %d %.300s", i+1, res.StatusCode, body)
		}
	}
	for _, page := range []string{home, question} {
		res, body := ex.get(page)
		if res.StatusCode != http.StatusTooManyRequests || res.Header.Get("Retry-After") != "1" || !strings.Contains(body, "reload the page") {
			t.Fatalf("%s past the allowance: %d, Retry-After %q %.300s", page, res.StatusCode, res.Header.Get("Retry-After"), body)
		}
	}
	if res, body := ex.get(links[1].Path); res.StatusCode != http.StatusOK {
		t.Fatalf("another expert's home meanwhile: %d %.300s", res.StatusCode, body)
	}
	if res, body := h.get(workshopPath(ws.ID)); res.StatusCode != http.StatusOK {
		t.Fatalf("the facilitator's overview meanwhile: %d %.300s", res.StatusCode, body)
	}
	// The allowance comes back at one page every pageEvery.
	frozen = frozen.Add(pageEvery)
	if res, body := ex.get(home); res.StatusCode != http.StatusOK {
		t.Fatalf("after %v: %d %.300s", pageEvery, res.StatusCode, body)
	}
}

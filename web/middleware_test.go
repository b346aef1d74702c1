package web

import (
	"net/http"
	"net/url"
	"strconv"
	"strings"
	"testing"
)

// TestStaticHasNoListing: the embedded assets are served by name, and no
// folder is listed (issue 13, item 9).
func TestStaticHasNoListing(t *testing.T) {
	h := newHarness(t)
	for _, path := range []string{"/static/", "/static", "/static//", "/static/./", "/static/nothing.css"} {
		res, body := h.get(path)
		if res.StatusCode != http.StatusNotFound {
			t.Errorf("GET %s: %d, want 404", path, res.StatusCode)
		}
		if strings.Contains(body, `href="style.css"`) || strings.Contains(body, `href="signin.js"`) {
			t.Errorf("GET %s lists the assets", path)
		}
	}
	if res, body := h.get("/static/style.css"); res.StatusCode != http.StatusOK || len(body) == 0 {
		t.Errorf("GET /static/style.css: %d, %d bytes", res.StatusCode, len(body))
	}
}

// TestFieldSentTwiceRefused: a field that takes one value and arrives
// twice is refused with 400 naming it, and nothing is saved, on an
// expert's form and on the facilitator's.
func TestFieldSentTwiceRefused(t *testing.T) {
	h, ws, qs, _, links := seeded(t)
	before := h.counts(ws.ID)
	quantile := qs[0]
	for _, q := range qs {
		if q.Format == "quantiles" && len(q.Probs) == 3 && !q.Calibration {
			quantile = q
			break
		}
	}
	save := links[0].Path + "q/" + strconv.FormatInt(quantile.ID, 10) + "/save"
	form := url.Values{"values[0]": {"0.01", "0.5"}, "values[1]": {"0.03"}, "values[2]": {"0.09"}}
	res, body := h.post(save, form)
	if res.StatusCode != http.StatusBadRequest || !strings.Contains(body, "values[0]: takes one value, got 2") {
		t.Errorf("expert save with values[0] twice: %d %q", res.StatusCode, body)
	}
	res, body = h.post("/workshops", url.Values{"title": {"First (invented)", "Second (invented)"}})
	if res.StatusCode != http.StatusBadRequest || !strings.Contains(body, "title: takes one value, got 2") {
		t.Errorf("new workshop with two titles: %d %q", res.StatusCode, body)
	}
	if h.counts(ws.ID) != before || h.workshopCount() != 1 {
		t.Error("a form with a field sent twice saved something")
	}
}

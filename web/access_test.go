package web

import (
	"context"
	"net/http"
	"net/url"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// TestExpertTokensAreScoped checks that a private link reaches only its
// own expert's workshop: another workshop's questions answer 404 and
// nothing is saved; revoked and malformed tokens are refused alike.
func TestExpertTokensAreScoped(t *testing.T) {
	h, ws, qs, es, links := seeded(t)
	ctx := context.Background()
	tokenOf := func(i int) string { return strings.TrimSuffix(strings.TrimPrefix(links[i].Path, "/e/"), "/") }
	a := tokenOf(0)

	// A second workshop with its own question and expert B.
	other := h.newWorkshop("Other workshop (invented)")
	if res, body := h.post(workshopPath(other.ID)+"/questions", url.Values{"wording": {"Other?"}, "quantity": {"other share"},
		"lower": {"0"}, "upper": {"1"}, "format": {"quantiles"}, "preset": {"p05_50_95"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("other question: %d %s", res.StatusCode, body)
	}
	oq, _ := h.db.Questions(ctx, other.ID)
	_, b := h.addExpert(other, "Expert B (invented)")

	answer := url.Values{"values[0]": {"0.01"}, "values[1]": {"0.03"}, "values[2]": {"0.09"}}
	before := h.counts(ws.ID)
	beforeOther := h.counts(other.ID)
	for _, path := range []string{
		"/e/" + a + "/q/" + strconv.FormatInt(oq[0].ID, 10),
		"/e/" + a + "/q/" + strconv.FormatInt(oq[0].ID, 10) + "/save",
		"/e/" + b + "/q/" + strconv.FormatInt(qs[0].ID, 10) + "/save",
	} {
		var res *http.Response
		var body string
		if strings.HasSuffix(path, "/save") {
			res, body = h.post(path, answer)
		} else {
			res, body = h.get(path)
		}
		if res.StatusCode != http.StatusNotFound {
			t.Errorf("%s: %d, want 404", path, res.StatusCode)
		}
		if strings.Contains(body, "Other?") || strings.Contains(body, ws.Title) {
			t.Errorf("%s: leaks another workshop's content", path)
		}
	}
	if h.counts(ws.ID) != before || h.counts(other.ID) != beforeOther {
		t.Fatal("a cross-workshop request saved something")
	}

	// Revoked: the link stops working for reads and saves.
	if res, _ := h.post(expertActionPath(ws.ID, es[0].ID, "revoke"), url.Values{"confirm": {"yes"}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("revoke: %d", res.StatusCode)
	}
	before = h.counts(ws.ID)
	if res, _ := h.get("/e/" + a + "/"); res.StatusCode != http.StatusNotFound {
		t.Errorf("revoked token GET: %d", res.StatusCode)
	}
	if res, _ := h.post("/e/"+a+"/q/"+strconv.FormatInt(qs[0].ID, 10)+"/save", answer); res.StatusCode != http.StatusNotFound {
		t.Errorf("revoked token save: %d", res.StatusCode)
	}
	if h.counts(ws.ID) != before {
		t.Fatal("a revoked token saved something")
	}
	for _, bad := range []string{"x", strings.Repeat("A", 42), strings.Repeat("A", 44), a[:42] + "!"} {
		if res, _ := h.get("/e/" + url.PathEscape(bad) + "/"); res.StatusCode != http.StatusNotFound {
			t.Errorf("malformed token %q: %d", bad, res.StatusCode)
		}
	}

	// The other demo experts' links still work, and an expert link is no
	// key to the facilitator's pages.
	anon := newHarnessClient(h)
	if res, _ := anon.get("/e/" + tokenOf(1) + "/"); res.StatusCode != http.StatusOK {
		t.Fatalf("expert 2 link: %d", res.StatusCode)
	}
	if res, _ := anon.get(workshopPath(ws.ID)); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("facilitator page from an expert's browser: %d", res.StatusCode)
	}
}

// TestDemoTruthsAbsentFromExpertPages renders every page a demo expert
// can reach and checks the hidden true values are absent.
func TestDemoTruthsAbsentFromExpertPages(t *testing.T) {
	h, _, qs, _, links := seeded(t)
	var truths []string
	for _, q := range qs {
		if q.TrueValue != nil {
			truths = append(truths, strconv.FormatFloat(*q.TrueValue, 'g', -1, 64))
		}
	}
	if len(truths) == 0 {
		t.Fatal("demo has no calibration truths")
	}
	anon := newHarnessClient(h)
	for _, l := range links {
		paths := []string{l.Path}
		for _, q := range qs {
			paths = append(paths, l.Path+"q/"+strconv.FormatInt(q.ID, 10))
		}
		for _, p := range paths {
			res, body := anon.get(p)
			if res.StatusCode != http.StatusOK {
				t.Errorf("%s: %d", p, res.StatusCode)
			}
			for _, tv := range truths {
				if regexp.MustCompile(`(^|[^0-9.])` + regexp.QuoteMeta(tv) + `($|[^0-9])`).MatchString(body) {
					t.Errorf("%s shows hidden true value %s", p, tv)
				}
			}
		}
	}
}

// newHarnessClient is a second browser on the same server, without the
// facilitator's session.
func newHarnessClient(h *harness) *harness {
	c := *h
	c.client = &http.Client{CheckRedirect: h.client.CheckRedirect}
	return &c
}

package web

import (
	"context"
	"errors"
	"html"
	"io"
	"log/slog"
	"net/http"
	"net/http/cookiejar"
	"net/http/httptest"
	"net/url"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/store"
)

// errDiskFull is what the store returns when SQLite cannot grow its file.
var errDiskFull = errors.New("store: commit: database or disk is full")

// fullDisk is the store with every write failing as on a full disk;
// reads and signing in still work.
type fullDisk struct{ *store.DB }

func (fullDisk) CreateWorkshop(context.Context, *workshop.Workshop) error { return errDiskFull }
func (fullDisk) UpdateWorkshop(context.Context, workshop.Workshop) error  { return errDiskFull }
func (fullDisk) AddQuestion(context.Context, *workshop.Question) error    { return errDiskFull }
func (fullDisk) AddExpert(context.Context, *workshop.Expert, []byte) error {
	return errDiskFull
}
func (fullDisk) RevokeExpert(context.Context, int64, string) error { return errDiskFull }
func (fullDisk) ReissueToken(context.Context, int64, []byte, string) error {
	return errDiskFull
}
func (fullDisk) SetRound(context.Context, int64, int, bool, string) error { return errDiskFull }
func (fullDisk) SaveRevision(context.Context, *workshop.Revision) error   { return errDiskFull }
func (fullDisk) SetWeights(context.Context, *workshop.Weights) error      { return errDiskFull }
func (fullDisk) AgreePrior(context.Context, *workshop.AgreedPrior) error  { return errDiskFull }
func (fullDisk) SetTrueValue(context.Context, int64, float64, bool, string) error {
	return errDiskFull
}
func (fullDisk) EditQuestion(context.Context, workshop.Question, string) error { return errDiskFull }
func (fullDisk) SetQuestionRetired(context.Context, int64, bool, string) error { return errDiskFull }
func (fullDisk) ReopenRound(context.Context, int64, string) error              { return errDiskFull }
func (fullDisk) SetArchived(context.Context, int64, bool, string) error        { return errDiskFull }
func (fullDisk) DeleteWorkshop(context.Context, int64, string) error           { return errDiskFull }
func (fullDisk) SetReasonWithheld(context.Context, int64, bool, string) error  { return errDiskFull }
func (fullDisk) SaveRevisions(context.Context, []workshop.Revision) error      { return errDiskFull }

// serveOn serves Parley on st over loopback for the test and returns a
// poster of forms from one browser (cookies kept, redirects not
// followed, the page's own origin): each post gives the status and the
// page, its HTML entities read back as text.
func serveOn(t *testing.T, st Store) (post func(path string, form url.Values) (int, string)) {
	t.Helper()
	s, err := New(st, Options{Logger: slog.New(slog.NewTextHandler(io.Discard, nil))})
	if err != nil {
		t.Fatal(err)
	}
	ts := httptest.NewServer(s.Handler())
	t.Cleanup(ts.Close)
	jar, _ := cookiejar.New(nil)
	c := &http.Client{Jar: jar, CheckRedirect: func(*http.Request, []*http.Request) error { return http.ErrUseLastResponse }}
	return func(path string, form url.Values) (int, string) {
		t.Helper()
		req, _ := http.NewRequest(http.MethodPost, ts.URL+path, strings.NewReader(form.Encode()))
		req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
		req.Header.Set("Origin", ts.URL)
		res, err := c.Do(req)
		if err != nil {
			t.Fatal(err)
		}
		defer res.Body.Close()
		b, _ := io.ReadAll(res.Body)
		return res.StatusCode, html.UnescapeString(string(b))
	}
}

// facilitatorOn is serveOn signed in as the facilitator, with a secret
// issued in db (the store st wraps).
func facilitatorOn(t *testing.T, db Store, st Store) (post func(path string, form url.Values) (int, string)) {
	t.Helper()
	post = serveOn(t, st)
	secret, err := IssueFacilitatorSecret(context.Background(), db)
	if err != nil {
		t.Fatal(err)
	}
	if code, _ := post("/signin", url.Values{"secret": {secret}}); code != http.StatusSeeOther {
		t.Fatalf("sign in: %d", code)
	}
	return post
}

// TestSaveOnAFullDisk: when the server cannot write (disk full, I/O
// error), an expert's save and every facilitator form answer 503 with the
// form again, the typed values kept, and a sentence saying nothing was
// saved and what to do; not the generic error page (issue 13, item 5).
// The real full disk is in systemtest (TestSaveOnAFullDisk there).
func TestSaveOnAFullDisk(t *testing.T) {
	h, ws, qs, es, links := seeded(t)
	post := facilitatorOn(t, h.db, fullDisk{h.db})
	before := h.counts(ws.ID)

	// The expert.
	var q workshop.Question
	for _, cand := range qs {
		if cand.Format == workshop.FormatQuantiles && len(cand.Probs) == 3 {
			q = cand
			break
		}
	}
	save := links[0].Path + "q/" + strconv.FormatInt(q.ID, 10) + "/save"
	code, page := post(save, url.Values{"values[0]": {"0.0123"}, "values[1]": {"0.0456"}, "values[2]": {"0.0789"}, "reason": {"Typed before the disk filled (invented)"}})
	if code != http.StatusServiceUnavailable {
		t.Errorf("expert save on a full disk: %d, want 503", code)
	}
	for _, want := range []string{notSavedForExpert, `value="0.0123"`, `value="0.0456"`, `value="0.0789"`, "Typed before the disk filled (invented)"} {
		if !strings.Contains(page, want) {
			t.Errorf("the expert's page lacks %q", want)
		}
	}
	if strings.Contains(page, "Correct the marked fields") || strings.Contains(page, "Server error") {
		t.Error("the expert's page blames the fields or shows the generic error")
	}
	if h.counts(ws.ID) != before {
		t.Error("the expert's refused save wrote something")
	}

	// The facilitator's forms.
	wp := workshopPath(ws.ID)
	qp := questionPath(ws.ID, q.ID)
	var seed workshop.Question
	for _, cand := range qs {
		if cand.Calibration {
			seed = cand
			break
		}
	}
	// A revision with a reason, to withhold, and a workshop nobody
	// answered, to delete: written before the disk "filled".
	withReason := workshop.Revision{QuestionID: q.ID, ExpertID: es[2].ID, Answer: workshop.Answer{Values: []float64{0.01, 0.03, 0.08}},
		Reason: "Names someone (invented)"}
	if err := h.db.SaveRevision(context.Background(), &withReason); err != nil {
		t.Fatal(err)
	}
	reasoned := withReason.ID
	empty := workshop.Workshop{Title: "Nobody answered (invented)"}
	if err := h.db.CreateWorkshop(context.Background(), &empty); err != nil {
		t.Fatal(err)
	}
	before = h.counts(ws.ID)
	weights := url.Values{"scheme": {"custom"}, "reason": {"Typed reason W (invented)"}}
	for _, e := range es {
		weights.Set(weightField(e.ID), "2")
	}
	for _, c := range []struct {
		name, path string
		form       url.Values
		typed      string
	}{
		{"new workshop", "/workshops", url.Values{"title": {"Typed title (invented)"}}, `value="Typed title (invented)"`},
		{"edit workshop", wp + "/edit", url.Values{"title": {"Typed new title (invented)"}}, `value="Typed new title (invented)"`},
		{"add question", wp + "/questions", url.Values{"wording": {"Typed wording (invented)?"}, "quantity": {"typed share"},
			"lower": {"0"}, "upper": {"1"}, "format": {"quantiles"}, "preset": {"p05_50_95"}}, "Typed wording (invented)?"},
		{"add expert", wp + "/experts", url.Values{"name": {"Typed Name (invented)"}}, `value="Typed Name (invented)"`},
		{"revoke", expertActionPath(ws.ID, es[1].ID, "revoke"), url.Values{"reason": {"Typed revoke reason (invented)"}, "confirm": {"yes"}}, ""},
		{"re-issue", expertActionPath(ws.ID, es[1].ID, "reissue"), url.Values{"reason": {"Typed reissue reason (invented)"}, "confirm": {"yes"}}, ""},
		{"close round", wp + "/round", url.Values{"action": {"close"}, "reason": {"Typed close reason (invented)"}}, "Typed close reason (invented)"},
		{"weights", qp + "/weights", weights, "Typed reason W (invented)"},
		{"agree", qp + "/agree", url.Values{"source": {"pool"}, "confirm_open": {"on"}, "rationale": {"Typed rationale (invented)"}}, "Typed rationale (invented)"},
		{"correct a question", qp + "/edit", url.Values{"wording": {"Typed corrected wording (invented)?"}, "quantity": {q.Quantity},
			"reason": {"Typed correction reason"}}, "Typed corrected wording (invented)?"},
		{"retire a question", qp + "/retire", url.Values{"action": {"retire"}, "retire_reason": {"Typed retire reason"}}, "Typed retire reason"},
		{"archive", wp + "/archive", url.Values{"action": {"archive"}, "archive_reason": {"Typed archive reason"}}, "Typed archive reason"},
		{"delete", workshopPath(empty.ID) + "/delete", url.Values{"reason": {"Typed delete reason"}, "confirm": {"on"}}, "Typed delete reason"},
		{"withhold a reason", qp + "/reasons/" + strconv.FormatInt(reasoned, 10), url.Values{"action": {"withhold"}, "withhold_reason": {"Typed withhold reason"}}, ""},
		{"enter for an expert", entryPath(ws.ID, q.ID, es[2].ID) + "/save", url.Values{"channel": {"phone"}, "values[0]": {"0.0123"},
			"values[1]": {"0.0456"}, "values[2]": {"0.0789"}}, `value="0.0456"`},
		{"true value", calibrationPath(ws.ID) + "/q/" + strconv.FormatInt(seed.ID, 10), url.Values{"true_value": {"0.0333"}, "reason": {"Typed truth reason"}}, `value="0.0333"`},
		{"calibration weights", calibrationPath(ws.ID) + "/weights", url.Values{"scheme": {"equal"}, "reason": {"Typed calibration reason (invented)"}}, "Typed calibration reason (invented)"},
	} {
		code, page := post(c.path, c.form)
		if code != http.StatusServiceUnavailable {
			t.Errorf("%s on a full disk: %d, want 503", c.name, code)
			continue
		}
		if !strings.Contains(page, notSavedForFacilitator) {
			t.Errorf("%s: the page does not say nothing was saved and what to do", c.name)
		}
		if c.typed != "" && !strings.Contains(page, c.typed) {
			t.Errorf("%s: the typed value %q is not kept", c.name, c.typed)
		}
		if strings.Contains(page, "Correct the marked fields") {
			t.Errorf("%s: the page blames the fields", c.name)
		}
	}
	if h.counts(ws.ID) != before {
		t.Error("something was saved")
	}
}

// A reopening that fails to save says so in the reopening form, shown
// open with the typed reason: the refusal stood above the next round's
// reason, which was not what was sent, and the reason lay folded away.
func TestReopenOnAFullDiskIsSaidInItsForm(t *testing.T) {
	h, ws, _, _, _ := seeded(t)
	if err := h.db.SetRound(context.Background(), ws.ID, ws.Round, false, ""); err != nil {
		t.Fatal(err)
	}
	post := facilitatorOn(t, h.db, fullDisk{h.db})
	code, page := post(workshopPath(ws.ID)+"/round", url.Values{"action": {"reopen"}, "reopen_reason": {"Typed reopen reason (invented)"}})
	if code != http.StatusServiceUnavailable {
		t.Fatalf("reopen on a full disk: %d, want 503", code)
	}
	reopen, said := strings.Index(page, `<details class="no-print" open>`), strings.Index(page, notSavedForFacilitator)
	if reopen < 0 || said < reopen || strings.Count(page, notSavedForFacilitator) != 1 || !strings.Contains(page, "Typed reopen reason (invented)") {
		t.Errorf("the failed reopening is said at %d, the open reopening form at %d; want it once, in that form, with the typed reason", said, reopen)
	}
}

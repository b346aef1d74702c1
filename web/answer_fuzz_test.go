package web_test

import (
	"context"
	"crypto/rand"
	"crypto/sha256"
	"encoding/base64"
	"encoding/json"
	"net/http"
	"net/http/httptest"
	"net/url"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/store"
	"github.com/parley-elicit/parley/web"
)

// FuzzExpertAnswerForm types arbitrary strings into an expert's answer
// form, in each format, through the whole handler (middleware, form
// parser, elicit's fit, the page templates) over a real SQLite file. A
// save answers 303 (saved: exactly one new revision), 409 (round closed)
// or 422 (refused: nothing saved); a preview answers 200 or 422; never a
// 500 or a panic, and no page shows NaN unless the expert typed it.
func FuzzExpertAnswerForm(f *testing.F) {
	ctx := context.Background()
	db, err := store.Open(filepath.Join(f.TempDir(), "parley.db"))
	if err != nil {
		f.Fatal(err)
	}
	f.Cleanup(func() { db.Close() })
	// The fuzzer previews and saves as one expert without pause, far
	// beyond an expert's allowance of either.
	srv, err := web.New(db, web.Options{PreviewBurst: 1 << 30, SaveBurst: 1 << 30})
	if err != nil {
		f.Fatal(err)
	}
	h := srv.Handler()

	ws := workshop.Workshop{Title: "Ferry delay panel (invented)", Invented: true}
	if err := db.CreateWorkshop(ctx, &ws); err != nil {
		f.Fatal(err)
	}
	qs := []workshop.Question{
		{Wording: "Share of crossings delayed?", Quantity: "Delayed share", Lower: 0, Upper: 1,
			Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95}},
		{Wording: "Minutes of the typical delay?", Quantity: "Delay", Units: "min", Lower: 0, Upper: 120,
			Format: workshop.FormatInterval},
		{Wording: "Place 20 chips on the share of cancelled crossings.", Quantity: "Cancelled share", Lower: 0, Upper: 1,
			Format: workshop.FormatChips, BinEdges: []float64{0, 0.25, 0.5, 0.75, 1}, Chips: 20},
	}
	for i := range qs {
		qs[i].WorkshopID = ws.ID
		if err := db.AddQuestion(ctx, &qs[i]); err != nil {
			f.Fatal(err)
		}
	}
	// A private link made the way the server makes them: 32 random bytes
	// as unpadded base64url, with only the SHA-256 of the bytes stored.
	raw := make([]byte, web.TokenBytes)
	if _, err := rand.Read(raw); err != nil {
		f.Fatal(err)
	}
	sum := sha256.Sum256(raw)
	e := workshop.Expert{WorkshopID: ws.ID, Name: "Signe Halvorsen (invented)"}
	if err := db.AddExpert(ctx, &e, sum[:]); err != nil {
		f.Fatal(err)
	}
	base := "/e/" + base64.RawURLEncoding.EncodeToString(raw)

	revisions := func(t *testing.T) int {
		rs, err := db.Revisions(ctx, ws.ID)
		if err != nil {
			t.Fatal(err)
		}
		return len(rs)
	}
	// The cookies a response left, as a browser keeps them for the next
	// request: a save's confirmation for the page it leads to.
	var kept []*http.Cookie
	serve := func(method, path string, form url.Values) (int, string) {
		var body *strings.Reader
		if form != nil {
			body = strings.NewReader(form.Encode())
		} else {
			body = strings.NewReader("")
		}
		req := httptest.NewRequest(method, path, body)
		if form != nil {
			req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
			req.Header.Set("Origin", "http://example.com") // httptest.NewRequest's host
		}
		for _, c := range kept {
			req.AddCookie(c)
		}
		rec := httptest.NewRecorder()
		h.ServeHTTP(rec, req)
		kept = kept[:0]
		for _, c := range rec.Result().Cookies() {
			if c.MaxAge > 0 {
				kept = append(kept, c)
			}
		}
		return rec.Code, rec.Body.String()
	}

	// A valid answer saves, or the fuzzing below only meets refusals.
	valid := url.Values{"values[0]": {"0.1"}, "values[1]": {"0.3"}, "values[2]": {"0.6"}}
	if code, body := serve(http.MethodPost, base+"/q/"+strconv.FormatInt(qs[0].ID, 10)+"/save", valid); code != http.StatusSeeOther {
		f.Fatalf("a valid answer gave status %d\n%s", code, body)
	}

	for _, s := range [][5]string{
		{"0.1", "0.3", "0.6", "80", ""},
		{"0.02", "0.05", "0.11", "90", "a reason (invented)"},
		{"1", "2", "3", "4", ""},
		{"10", "5", "7", "50", ""},
		{"0.5", "0.5", "0.5", "100", ""},
		{"-0", "0", "1", "0", ""},
		{"1e-300", "1e-200", "1e-100", "99.9999", ""},
		{"0.3333333333333333", "0.5", "0.6666666666666666", "0.0001", ""},
		{"NaN", "Inf", "-Inf", "0x1p-2", ""},
		{"1_000", "1,5", " 0.2 ", "+5", ""},
		{"", "", "", "", strings.Repeat("r", input.MaxLongText+1)},
		{"0.1", "0.2", "0.3", "5", "\x00\xff"},
		{"20", "0", "0", "0", ""},
		{"5", "5", "5", "5", ""},
		{"21", "0", "0", "0", ""},
		{"999999999999", "1", "1", "1", ""},
		{"0", "0.5", "1", "50", ""},                                     // at the bounds
		{"0.1", "0.1000000000000001", "0.1000000000000002", "1e-9", ""}, // almost no spread
		{"1e-12", "2e-12", "0.999999999999", "99.999999999", ""},        // spread to the edges
		{"0.999", "0.9995", "0.9999", "0.5", ""},                        // crowded at the top
		{"119.99", "0.001", "60", "50", ""},
		{"0.0001", "120", "119.9999", "99", ""},
	} {
		f.Add(s[0], s[1], s[2], s[3], s[4])
	}

	f.Fuzz(func(t *testing.T, a, b, c, d, reason string) {
		typed := []string{a, b, c, d, reason}
		showsNaN := func(body string) bool {
			for _, s := range typed {
				if strings.Contains(strings.ToLower(s), "nan") {
					return false // the page may echo what was typed
				}
			}
			return strings.Contains(body, "NaN")
		}
		for _, q := range qs {
			form := url.Values{"reason": {reason}}
			switch q.Format {
			case workshop.FormatInterval:
				form.Set("lowest", a)
				form.Set("highest", b)
				form.Set("best", c)
				form.Set("confidence", d)
			case workshop.FormatChips:
				for i, v := range []string{a, b, c, d} {
					form.Set("counts["+strconv.Itoa(i)+"]", v)
				}
			default:
				for i, v := range []string{a, b, c} {
					form.Set("values["+strconv.Itoa(i)+"]", v)
				}
			}
			tooLarge := len(form.Encode()) > web.MaxBodyBytes
			qp := base + "/q/" + strconv.FormatInt(q.ID, 10)

			for _, preview := range []string{qp + "/preview", qp + "/preview?fragment=1"} {
				code, body := serve(http.MethodPost, preview, form)
				if !(code == http.StatusOK || code == http.StatusUnprocessableEntity || (tooLarge && code == http.StatusRequestEntityTooLarge)) {
					t.Fatalf("%s preview %q: status %d\n%s", q.Format, form.Encode(), code, body)
				}
				if showsNaN(body) {
					t.Fatalf("%s preview %q shows NaN\n%s", q.Format, form.Encode(), body)
				}
			}

			before := revisions(t)
			code, body := serve(http.MethodPost, qp+"/save", form)
			after := revisions(t)
			switch {
			case code == http.StatusSeeOther:
				if after != before+1 {
					t.Fatalf("%s save %q: 303 but %d revisions became %d", q.Format, form.Encode(), before, after)
				}
			case code == http.StatusConflict, code == http.StatusUnprocessableEntity,
				tooLarge && code == http.StatusRequestEntityTooLarge:
				if after != before {
					t.Fatalf("%s save %q: status %d but %d revisions became %d", q.Format, form.Encode(), code, before, after)
				}
			default:
				t.Fatalf("%s save %q: status %d\n%s", q.Format, form.Encode(), code, body)
			}
			if showsNaN(body) {
				t.Fatalf("%s save %q shows NaN\n%s", q.Format, form.Encode(), body)
			}
			if code == http.StatusSeeOther {
				// The saved answer is drawn again on the question's page.
				code, body := serve(http.MethodGet, qp, nil)
				if code != http.StatusOK || showsNaN(body) || !strings.Contains(body, "Saved.") {
					t.Fatalf("%s page after saving %q: status %d, NaN %v\n%s", q.Format, form.Encode(), code, showsNaN(body), body)
				}
				// And it goes into the export: json.Marshal refuses NaN and ±Inf.
				rs, err := db.Revisions(ctx, ws.ID)
				if err != nil {
					t.Fatal(err)
				}
				fit, err := q.Fit(rs[len(rs)-1].Answer)
				if err != nil {
					t.Fatalf("%s save %q: saved an answer elicit cannot fit: %v", q.Format, form.Encode(), err)
				}
				if _, err := json.Marshal(record.FitOf(fit)); err != nil {
					t.Fatalf("%s save %q: the fit does not export: %v", q.Format, form.Encode(), err)
				}
			}
		}
	})
}

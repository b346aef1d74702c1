package web_test

import (
	"bytes"
	"context"
	"net/http"
	"net/http/httptest"
	"net/url"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"unicode/utf8"

	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/store"
	"github.com/parley-elicit/parley/web"
)

// wideLetters are letters of one to four bytes in UTF-8, with characters
// JSON, HTML and CSV each escape or quote.
var wideLetters = []string{"é", "語", "𝔸", "ß", "Ж", "<", "&", `"`, `\`, "'", "=", "ŉ", "ﬁ", "😀"}

// filled is exactly n characters of wideLetters, starting at the letter
// numbered from; lines, carriage returns and tabs stand inside long text
// (never at an end, where a form trims them).
func filled(n, from int) string {
	var b strings.Builder
	for i := 0; i < n; i++ {
		switch inner := i < n-1; {
		case inner && n > 500 && i%400 == 199:
			b.WriteString("\n")
		case inner && n > 500 && i%400 == 299:
			b.WriteString("\r")
		case inner && n > 500 && i%400 == 399:
			b.WriteString("\t")
		default:
			b.WriteString(wideLetters[(from+i)%len(wideLetters)])
		}
	}
	return b.String()
}

// Every text field a form accepts, at its limit in letters of every width,
// exports and imports back with identical content. The workshop is built
// through the facilitator's and an expert's forms over HTTP on a real
// SQLite file: the workshop (created and edited), questions (added and
// corrected, one retired and restored, a calibration question revealed),
// experts (names, affiliations, expertise; one revoked and given a new
// link), answers with reasons from the expert and from the facilitator,
// rounds closed, opened and reopened, weights, an agreed prior, a reason
// withheld, the workshop archived and brought back and archived again,
// each reason at its limit. The record downloaded is read back by the
// strict import (record.Parse), imported into an empty database, and
// built again: the two records are the same document.
func TestEveryTextFieldRoundTripsAtItsLimit(t *testing.T) {
	ctx := context.Background()
	db, err := store.Open(filepath.Join(t.TempDir(), "parley.db"))
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { db.Close() })
	srv, err := web.New(db, web.Options{})
	if err != nil {
		t.Fatal(err)
	}
	ts := httptest.NewServer(srv.Handler())
	t.Cleanup(ts.Close)
	secret, err := web.EnsureFacilitatorSecret(ctx, db)
	if err != nil {
		t.Fatal(err)
	}
	fac := newFlowClient(t, ts.URL, true)
	fac.mustPost("sign in", "/signin", url.Values{"secret": {secret}}, http.StatusSeeOther)

	short := func(k int) string { return filled(input.MaxShortText, k) }
	long := func(k int) string { return filled(input.MaxLongText, k) }
	for _, s := range []string{short(0), long(0)} {
		if n := utf8.RuneCountInString(s); n != input.MaxShortText && n != input.MaxLongText {
			t.Fatalf("filled gives %d characters", n)
		}
	}
	if len(short(0)) <= 2*input.MaxShortText {
		t.Fatalf("the short text is %d bytes: not wide enough to catch a limit counted in bytes", len(short(0)))
	}
	ok := http.StatusSeeOther

	res, _ := fac.mustPost("create workshop", "/workshops", url.Values{
		"title": {short(1)}, "purpose": {long(2)}, "decision": {long(3)}, "notes": {long(4)},
	}, ok)
	wp := strings.TrimRight(res.Header.Get("Location"), "/")
	fac.mustPost("edit workshop", wp+"/edit", url.Values{
		"title": {short(5)}, "purpose": {long(6)}, "decision": {long(7)}, "notes": {long(8)},
	}, ok)
	fac.mustPost("add question", wp+"/questions", url.Values{
		"wording": {long(9)}, "quantity": {short(10)}, "units": {short(11)},
		"lower": {"0"}, "upper": {"1"}, "format": {"quantiles"}, "preset": {"p05_50_95"},
	}, ok)
	fac.mustPost("add calibration question", wp+"/questions", url.Values{
		"wording": {long(12)}, "quantity": {short(13)}, "units": {short(14)},
		"lower": {"0"}, "upper": {"1"}, "format": {"quantiles"}, "preset": {"p05_50_95"},
		"calibration": {"on"}, "true_value": {"0.3"},
	}, ok)

	linkRE := regexp.MustCompile(regexp.QuoteMeta(ts.URL) + `(/e/[A-Za-z0-9_-]{43})/`)
	var links []string
	for k := 0; k < 3; k++ {
		res, _ := fac.mustPost("add expert", wp+"/experts", url.Values{
			"name": {short(20 + k)}, "affiliation": {short(23 + k)}, "expertise": {long(26 + k)},
		}, ok)
		_, body := fac.get(res.Header.Get("Location"))
		m := linkRE.FindStringSubmatch(body)
		if m == nil {
			t.Fatal("no private link on the page")
		}
		links = append(links, m[1])
	}
	rec := fac.exportJSON(wp)
	q1, q2 := strconv.FormatInt(rec.Questions[0].ID, 10), strconv.FormatInt(rec.Questions[1].ID, 10)
	eid := func(k int) string { return strconv.FormatInt(rec.Experts[k].ID, 10) }
	qp := wp + "/q/" + q1

	expert := newFlowClient(t, ts.URL, false)
	for k, link := range links {
		for _, q := range []string{q1, q2} {
			expert.mustPost("expert answers", link+"/q/"+q+"/save", url.Values{
				"values[0]": {"0.05"}, "values[1]": {strconv.FormatFloat(0.2+0.05*float64(k), 'g', -1, 64)}, "values[2]": {"0.6"},
				"reason": {long(30 + k)},
			}, ok)
		}
	}
	fac.mustPost("correct a question after answers", qp+"/edit", url.Values{
		"wording": {long(40)}, "quantity": {short(41)}, "units": {short(42)}, "reason": {long(43)},
	}, ok)
	fac.mustPost("retire", qp+"/retire", url.Values{"action": {"retire"}, "retire_reason": {long(44)}}, ok)
	fac.mustPost("restore", qp+"/retire", url.Values{"action": {"restore"}, "retire_reason": {long(45)}}, ok)
	fac.mustPost("close round 1", wp+"/round", url.Values{"action": {"close"}, "reason": {long(46)}}, ok)
	fac.mustPost("reopen round 1", wp+"/round", url.Values{"action": {"reopen"}, "reopen_reason": {long(47)}}, ok)
	fac.mustPost("close round 1 again", wp+"/round", url.Values{"action": {"close"}, "reason": {long(48)}}, ok)
	fac.mustPost("open round 2", wp+"/round", url.Values{"action": {"open"}, "reason": {long(49)}}, ok)
	fac.mustPost("enter on an expert's behalf", qp+"/enter/"+eid(1)+"/save", url.Values{
		"values[0]": {"0.04"}, "values[1]": {"0.22"}, "values[2]": {"0.5"}, "channel": {"paper_form"}, "reason": {long(50)},
	}, ok)
	fac.mustPost("reveal the true value", wp+"/calibration/q/"+q2, url.Values{
		"true_value": {"0.3"}, "reveal": {"on"}, "reason": {long(51)},
	}, ok)
	fac.mustPost("revoke", wp+"/experts/"+eid(2)+"/revoke", url.Values{"reason": {long(52)}, "confirm": {"yes"}}, ok)
	fac.mustPost("revoke again", wp+"/experts/"+eid(1)+"/revoke", url.Values{"reason": {long(53)}, "confirm": {"yes"}}, ok)
	fac.mustPost("new link", wp+"/experts/"+eid(1)+"/reissue", url.Values{"reason": {long(54)}, "confirm": {"yes"}}, ok)
	fac.mustPost("weights", qp+"/weights", url.Values{
		"scheme": {"custom"}, "reason": {long(55)},
		"weights[" + eid(0) + "]": {"2"}, "weights[" + eid(1) + "]": {"1"}, "weights[" + eid(2) + "]": {"1"},
	}, ok)
	fac.mustPost("agree", qp+"/agree", url.Values{"source": {"pool"}, "confirm_open": {"on"}, "rationale": {long(56)}}, ok)
	fac.mustPost("record study data", qp+"/study/data", url.Values{
		"successes": {"2"}, "trials": {"30"}, "source": {short(61)}, "observed_on": {"2026-01-31"},
	}, ok)
	fac.mustPost("agree a quick prior", wp+"/quick-priors/agree", url.Values{
		"question": {strconv.FormatInt(rec.Questions[0].ID, 10)}, "construction": {"mean_sd"}, "c_mean": {"0.2"}, "c_sd": {"0.1"},
		"confirm_open": {"on"}, "rationale": {long(62)},
	}, ok)
	rec = fac.exportJSON(wp)
	var withhold int64
	for _, rv := range rec.Revisions {
		if rv.Reason != "" && rv.QuestionID == rec.Questions[0].ID {
			withhold = rv.ID
		}
	}
	fac.mustPost("withhold a reason", qp+"/reasons/"+strconv.FormatInt(withhold, 10), url.Values{
		"action": {"withhold"}, "withhold_reason": {long(57)},
	}, ok)
	fac.mustPost("archive", wp+"/archive", url.Values{"action": {"archive"}, "archive_reason": {long(58)}}, ok)
	fac.mustPost("bring back", wp+"/archive", url.Values{"action": {"restore"}, "archive_reason": {long(59)}}, ok)
	fac.mustPost("archive again", wp+"/archive", url.Values{"action": {"archive"}, "archive_reason": {long(60)}}, ok)

	res, body := fac.get(wp + "/export.json")
	if res.StatusCode != http.StatusOK {
		t.Fatalf("export.json: %d", res.StatusCode)
	}
	first, err := record.Parse(strings.NewReader(body))
	if err != nil {
		t.Fatalf("the strict import refuses the export of a workshop the forms accepted: %v", err)
	}
	// Every text the forms took is in the record at its full length.
	texts := 0
	for _, s := range recordTexts(first) {
		if n := utf8.RuneCountInString(s); n == input.MaxShortText || n == input.MaxLongText {
			texts++
		}
	}
	if texts < 47 {
		t.Errorf("only %d texts at a limit in the record; the forms sent 47", texts)
	}

	dst, err := store.Open(filepath.Join(t.TempDir(), "imported.db"))
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { dst.Close() })
	id, err := dst.Import(ctx, first)
	if err != nil {
		t.Fatal(err)
	}
	again, err := dst.Record(ctx, id, first.Generated)
	if err != nil {
		t.Fatal(err)
	}
	var a, b bytes.Buffer
	if err := first.WriteJSON(&a); err != nil {
		t.Fatal(err)
	}
	if err := again.WriteJSON(&b); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(a.Bytes(), b.Bytes()) {
		la, lb := strings.Split(a.String(), "\n"), strings.Split(b.String(), "\n")
		for i := range la {
			if i >= len(lb) || la[i] != lb[i] {
				t.Fatalf("the record after import differs at line %d:\n%.200s\n---\n%.200s", i+1, la[i], lb[min(i, len(lb)-1)])
			}
		}
		t.Fatal("the record after import is longer")
	}
}

// recordTexts are the free texts of a record: the workshop's, the
// questions', the experts', every reason, rationale and event reason.
func recordTexts(r record.Record) []string {
	w := r.Workshop
	out := []string{w.Title, w.Purpose, w.Decision, w.Notes, r.Weights.Reason}
	for _, q := range r.Questions {
		out = append(out, q.Wording, q.Quantity, q.Units)
		for _, p := range q.PriorHistory {
			out = append(out, p.Rationale)
		}
	}
	for _, e := range r.Experts {
		out = append(out, e.Name, e.Affiliation, e.Expertise)
	}
	for _, rv := range r.Revisions {
		out = append(out, rv.Reason)
	}
	for _, d := range r.StudyData {
		out = append(out, d.Source)
	}
	for _, e := range r.Events {
		out = append(out, e.Reason)
	}
	return out
}

package web

import (
	"net/http"
	"net/url"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/fingerprint"
	"github.com/parley-elicit/parley/elicit/record"
)

var (
	fingerprintNow   = regexp.MustCompile(`Record fingerprint now: <span class="fingerprint">([0-9a-f ]{19})</span>`)
	fingerprintClose = regexp.MustCompile(`Record fingerprint after round (\d+) closed: <span class="fingerprint">([0-9a-f ]{19})</span>`)
)

// closeValues are the fingerprints a page shows after each round's close,
// by round.
func closeValues(body string) map[string]string {
	out := map[string]string{}
	for _, m := range fingerprintClose.FindAllStringSubmatch(body, -1) {
		out[m[1]] = m[2]
	}
	return out
}

// The decision log and the room view show the room the record's
// fingerprint when a round closes; it is the value of the exported
// record's chain at that close, and it stays as answers, decisions and a
// withheld reason are added after it, while the fingerprint now moves on.
// The printed report carries both.
func TestFingerprintShownToTheRoom(t *testing.T) {
	h, ws, qs, es, links := seeded(t)
	wp := workshopPath(ws.ID)
	room := roomPath(ws.ID, qs[0].ID)
	logPath := wp + "/log"

	// While round 1 is open, the room shows none.
	if _, body := h.get(room); strings.Contains(body, "Record fingerprint") {
		t.Fatal("the room shows a fingerprint while round 1 is open")
	}
	_, body := h.get(logPath)
	before := fingerprintNow.FindStringSubmatch(body)
	if before == nil {
		t.Fatal("the log shows no fingerprint now")
	}
	// A weight set is a fact of the chain too.
	wf := url.Values{"scheme": {"custom"}, "reason": {"Audits (invented)."}}
	for i, e := range es {
		wf.Set(weightField(e.ID), strconv.Itoa(i+1))
	}
	if r, _ := h.post(questionPath(ws.ID, qs[0].ID)+"/weights", wf); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("weights: %d", r.StatusCode)
	}
	if r, _ := h.post(wp+"/round", url.Values{"action": {"close"}}); r.StatusCode != http.StatusSeeOther {
		t.Fatal("close")
	}
	_, body = h.get(logPath)
	closed := closeValues(body)["1"]
	if closed == "" {
		t.Fatalf("the log shows no fingerprint after round 1 closed")
	}
	if now := fingerprintNow.FindStringSubmatch(body); now == nil || now[1] != closed || now[1] == before[1] {
		t.Fatalf("the log's fingerprint now %v; after the close %s; before it %s", now, closed, before[1])
	}
	_, body = h.get(room)
	if got := closeValues(body)["1"]; got != closed {
		t.Fatalf("the room shows %q after round 1 closed, the log %q", got, closed)
	}
	// The exported record's chain has the same value at the close.
	res, doc := h.get(wp + "/export.json")
	if res.StatusCode != http.StatusOK {
		t.Fatalf("export: %d", res.StatusCode)
	}
	rec, err := record.Parse(strings.NewReader(doc))
	if err != nil {
		t.Fatal(err)
	}
	c := fingerprint.Of(rec.Facts())
	kinds := map[fingerprint.Kind]bool{}
	for _, l := range c.Links {
		kinds[l.Kind] = true
	}
	if !kinds[fingerprint.KindWeightSet] || !kinds[fingerprint.KindRevision] || !kinds[fingerprint.KindEvent] {
		t.Fatalf("the chain holds facts of kinds %v, want a weight set, revisions and events", kinds)
	}
	if cl := c.RoundCloses(); len(cl) != 1 || cl[0].Value.Short() != closed || rec.Fingerprint != c.Head().Hex() {
		t.Fatalf("the export's round closes %v, want one at %s", cl, closed)
	}

	// Round 2: an answer, a withheld reason, then the close.
	if r, _ := h.post(wp+"/round", url.Values{"action": {"open"}, "reason": {"Discussed (invented)."}}); r.StatusCode != http.StatusSeeOther {
		t.Fatal("open round 2")
	}
	if _, body := h.get(room); strings.Contains(body, "Record fingerprint") {
		t.Fatal("the room shows a fingerprint while round 2 is open")
	}
	q := links[0].Path + "q/" + strconv.FormatInt(qs[0].ID, 10)
	if r, _ := h.post(q+"/save", url.Values{"values[0]": {"0.02"}, "values[1]": {"0.06"}, "values[2]": {"0.12"}, "reason": {"Heard the others (invented)."}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("save in round 2: %d", r.StatusCode)
	}
	revs, err := h.db.Revisions(t.Context(), ws.ID)
	if err != nil {
		t.Fatal(err)
	}
	withhold := questionPath(ws.ID, qs[0].ID) + "/reasons/" + strconv.FormatInt(revs[len(revs)-1].ID, 10)
	if r, _ := h.post(withhold, url.Values{"action": {"withhold"}, "withhold_reason": {"Names a site (invented)."}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("withhold: %d", r.StatusCode)
	}
	if r, _ := h.post(wp+"/round", url.Values{"action": {"close"}}); r.StatusCode != http.StatusSeeOther {
		t.Fatal("close round 2")
	}
	_, body = h.get(logPath)
	values := closeValues(body)
	if values["1"] != closed || values["2"] == "" || values["2"] == closed {
		t.Fatalf("the log after round 2: closes %v; round 1 was %s", values, closed)
	}
	if now := fingerprintNow.FindStringSubmatch(body); now == nil || now[1] != values["2"] {
		t.Fatalf("the log's fingerprint now %v, round 2's close %s", now, values["2"])
	}
	_, body = h.get(room)
	if got := closeValues(body); got["2"] != values["2"] || got["1"] != "" {
		t.Fatalf("the room after round 2 closed shows %v, want round 2's %s alone", got, values["2"])
	}
	// The report prints the fingerprint now, in full too, and each close's.
	_, body = h.get(wp + "/report")
	_, doc = h.get(wp + "/export.json")
	rec, err = record.Parse(strings.NewReader(doc))
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(body, `Record fingerprint when this report was made: <span class="fingerprint">`+values["2"]+`</span>`) ||
		!strings.Contains(body, rec.Fingerprint) {
		t.Error("the report does not print the fingerprint now")
	}
	if got := closeValues(body); got["1"] != closed || got["2"] != values["2"] {
		t.Errorf("the report's log shows closes %v", got)
	}
}

package web

import (
	"context"
	"encoding/csv"
	"html"
	"net/http"
	"net/url"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// The room's prior display says plainly when the pool the prior was
// agreed from has changed since, by the rule the facilitator's panel and
// the priors CSV's pool_changed column follow (poolChangeOf), counting
// what moved and naming nobody: the room had been shown a prior agreed
// from a pool that was no longer the panel's, as if it were.
func TestRoomPriorSaysThePoolChanged(t *testing.T) {
	h, ws, qs, es, links := seeded(t)
	ctx := context.Background()
	q := qs[0]
	qp := questionPath(ws.ID, q.ID)
	const lead = "The pool has changed since this prior was agreed"
	display := func() string {
		t.Helper()
		r, body := h.get(roomPath(ws.ID, q.ID) + "?show=prior")
		if r.StatusCode != http.StatusOK {
			t.Fatalf("prior display: %d", r.StatusCode)
		}
		body = html.UnescapeString(body)
		for _, e := range es {
			if first := strings.Fields(e.Name)[0]; strings.Contains(body, first) {
				t.Errorf("the prior display names %q", first)
			}
		}
		i := strings.Index(body, lead)
		if i < 0 {
			return ""
		}
		return body[i : i+strings.Index(body[i:], "<")]
	}
	// pool_changed of q's row in the priors CSV.
	csvSays := func() string {
		t.Helper()
		_, body := h.get(workshopPath(ws.ID) + "/priors.csv")
		rows, err := csv.NewReader(strings.NewReader(body)).ReadAll()
		if err != nil {
			t.Fatal(err)
		}
		for _, row := range rows[1:] {
			if row[0] == strconv.FormatInt(q.ID, 10) {
				return row[len(row)-1]
			}
		}
		t.Fatal("no row of the question in the priors CSV")
		return ""
	}

	// The demo's prior is a consensus: no pool to change.
	if got := display(); got != "" {
		t.Errorf("a consensus prior's display says %q", got)
	}
	if res, body := h.post(qp+"/agree", url.Values{"source": {"pool"}, "confirm_open": {"on"}, "rationale": {"The pool (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("agree the pool: %d %s", res.StatusCode, body)
	}
	if got, c := display(), csvSays(); got != "" || c != "false" {
		t.Fatalf("just agreed, the display says %q and pool_changed is %q", got, c)
	}

	// An expert revises.
	if res, _ := h.post(links[1].Path+"q/"+strconv.FormatInt(q.ID, 10)+"/save",
		url.Values{"values[0]": {"0.01"}, "values[1]": {"0.06"}, "values[2]": {"0.2"}, "reason": {"Rethought the tail (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("revise: %d", res.StatusCode)
	}
	want := lead + ": one expert has revised their answer. The prior shown is still the single Beta of the pool as it stood then, not of the experts' answers as they stand now."
	if got, c := display(), csvSays(); got != want || c != "true" {
		t.Errorf("after a revision the display says %q (want %q) and pool_changed is %q", got, want, c)
	}

	// Another expert's pooled judgement is withdrawn.
	ps, err := h.db.AgreedPriors(ctx, ws.ID)
	if err != nil {
		t.Fatal(err)
	}
	revs, err := h.db.Revisions(ctx, ws.ID)
	if err != nil {
		t.Fatal(err)
	}
	var other int64
	for _, id := range ps[len(ps)-1].Pooled {
		for _, rv := range revs {
			if rv.ID == id && rv.ExpertID != es[1].ID {
				other = id
			}
		}
	}
	if other == 0 {
		t.Fatal("no other expert's judgement in the pool")
	}
	if res, body := h.post(withdrawPath(ws.ID, q.ID, other), url.Values{"reason": {"Entered against the wrong expert (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("withdraw: %d %s", res.StatusCode, body)
	}
	want = lead + ": one expert has revised their answer and one pooled judgement has been withdrawn."
	if got := display(); !strings.HasPrefix(got, want) {
		t.Errorf("after a withdrawal the display says %q, want it to begin %q", got, want)
	}

	// Agreed again, the prior is the pool's as it stands.
	if res, body := h.post(qp+"/agree", url.Values{"source": {"pool"}, "confirm_open": {"on"}, "rationale": {"Again (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("agree again: %d %s", res.StatusCode, body)
	}
	if got, c := display(), csvSays(); got != "" || c != "false" {
		t.Errorf("agreed again, the display says %q and pool_changed is %q", got, c)
	}
}

// The room view's header, which links the prior display, says as the
// display does when the pool a prior was agreed from has changed since,
// by the same rule (poolChangeOf): it had said only "a prior has been
// agreed", and the room learned the rest only once the display was up.
// A consensus prior has no pool to change; agreed again, the prior is
// the pool's as it stands. The two links read in one style, the second
// the first with a clause more: "a prior has been agreed: show it" stood
// beside "agreed prior; its pool has changed since: show it".
func TestRoomHeaderSaysThePoolChanged(t *testing.T) {
	h, ws, qs, _, links := seeded(t)
	q := qs[0]
	qp := questionPath(ws.ID, q.ID)
	// The header's first line in words, and whether the prior display
	// says the pool changed.
	header := func() (string, bool) {
		t.Helper()
		r, body := h.get(roomPath(ws.ID, q.ID))
		if r.StatusCode != http.StatusOK {
			t.Fatalf("room view: %d", r.StatusCode)
		}
		i := strings.Index(body, `<p class="room-where">`)
		if i < 0 {
			t.Fatal("no first line in the room's header")
		}
		line := body[i : i+strings.Index(body[i:], "</p>")]
		line = strings.Join(strings.Fields(html.UnescapeString(regexp.MustCompile(`<[^>]*>`).ReplaceAllString(line, ""))), " ")
		_, shown := h.get(roomPath(ws.ID, q.ID) + "?show=prior")
		return line, strings.Contains(shown, "The pool has changed since this prior was agreed")
	}
	const plain, changed = "· agreed prior: show it", "· agreed prior; its pool has changed since: show it"
	check := func(when string, wantChanged bool) {
		t.Helper()
		line, display := header()
		want := plain
		if wantChanged {
			want = changed
		}
		if !strings.HasSuffix(line, want) || display != wantChanged {
			t.Errorf("%s: the header reads %q, want it to end %q; the display says the pool changed: %v", when, line, want, display)
		}
	}
	check("a consensus prior", false)
	if res, body := h.post(qp+"/agree", url.Values{"source": {"pool"}, "confirm_open": {"on"}, "rationale": {"The pool (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("agree the pool: %d %s", res.StatusCode, body)
	}
	check("just agreed from the pool", false)
	if res, _ := h.post(links[1].Path+"q/"+strconv.FormatInt(q.ID, 10)+"/save",
		url.Values{"values[0]": {"0.01"}, "values[1]": {"0.06"}, "values[2]": {"0.2"}, "reason": {"Rethought the tail (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("revise: %d", res.StatusCode)
	}
	check("after an expert revised", true)
	if res, body := h.post(qp+"/agree", url.Values{"source": {"pool"}, "confirm_open": {"on"}, "rationale": {"Again (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("agree again: %d %s", res.StatusCode, body)
	}
	check("agreed again", false)
}

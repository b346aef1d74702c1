package web

import (
	"net/http"
	"net/url"
	"strings"
	"testing"
)

// A judgement the facilitator typed in the session is recorded as "from what was
// said in the session": the report, read by the project lead, and the
// question's history carry no "typed by me", which speaks as the
// facilitator choosing the channel on the entry form.
func TestInSessionEntryIsRecordedWithoutMe(t *testing.T) {
	h, ws, qs, es, _ := seeded(t)
	q, e := qs[0], es[0]
	form := url.Values{"channel": {"in_person"}, "values[0]": {"0.02"}, "values[1]": {"0.05"}, "values[2]": {"0.12"}}
	if r, body := h.post(entryPath(ws.ID, q.ID, e.ID)+"/save", form); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("entry: %d %s", r.StatusCode, body)
	}
	for _, p := range []string{workshopPath(ws.ID) + "/report", questionPath(ws.ID, q.ID)} {
		_, page := h.get(p)
		if strings.Contains(page, "typed by me") {
			t.Errorf("%s records the entry as 'typed by me'", p)
		}
		if !strings.Contains(page, "facilitator, from what was said in the session") {
			t.Errorf("%s does not record the entry as said in the session", p)
		}
	}
	// The entry form itself, where the facilitator chooses, keeps its words.
	if _, page := h.get(entryPath(ws.ID, q.ID, e.ID)); !strings.Contains(page, "said in the session (typed by me)") {
		t.Error("the entry form's channel choice lost its words")
	}
}

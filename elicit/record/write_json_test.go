package record

import (
	"bytes"
	"encoding/json"
	"reflect"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/elicit/workshop/workshoptest"
)

// TestWriteJSONMatchesEncodingJSON: WriteJSON (go-json-experiment under
// encoding/json's options) writes the very bytes encoding/json's
// indenting Encoder writes, the oracle, including the escapes encoding/json
// makes for HTML and for U+2028/U+2029 and a text with every kind of
// character the forms accept.
func TestWriteJSONMatchesEncodingJSON(t *testing.T) {
	odd := workshoptest.PumpSeals()
	odd.Workshop.Title = "Seals <b>&</b> “quotes” \u2028 line\u2029 ünïcödé 🦭 tab\tnew\nline"
	odd.Workshop.Purpose = `back\slash "quoted" </script>`
	empty := workshop.Snapshot{Workshop: workshoptest.PumpSeals().Workshop,
		Weights: workshop.Weights{WorkshopID: 7, Scheme: workshop.WeightsEqual}}
	for name, src := range map[string]workshop.Snapshot{"invented": workshoptest.PumpSeals(), "odd text": odd, "empty": empty} {
		rec, err := Build(src, t0.Add(time.Hour))
		if err != nil {
			t.Fatal(err)
		}
		var want, got bytes.Buffer
		enc := json.NewEncoder(&want)
		enc.SetIndent("", "  ")
		if err := enc.Encode(rec); err != nil {
			t.Fatal(err)
		}
		if err := rec.WriteJSON(&got); err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(got.Bytes(), want.Bytes()) {
			t.Errorf("%s: WriteJSON differs from encoding/json (%d vs %d bytes)", name, got.Len(), want.Len())
		}
	}
}

// TestBuildHistory: the record without panels carries the same
// revisions, fits, questions and agreed priors as the whole record, and
// no current fits, pools or scores.
func TestBuildHistory(t *testing.T) {
	whole := buildInvented(t)
	h, err := BuildHistory(workshoptest.PumpSeals(), t0.Add(time.Hour))
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(h.Revisions, whole.Revisions) {
		t.Error("revisions differ from the whole record's")
	}
	if len(h.Questions) != len(whole.Questions) {
		t.Fatalf("%d questions, want %d", len(h.Questions), len(whole.Questions))
	}
	pools := 0
	for i, q := range h.Questions {
		w := whole.Questions[i]
		if !reflect.DeepEqual(q.Question, w.Question) || !reflect.DeepEqual(q.AgreedPrior, w.AgreedPrior) {
			t.Errorf("question %d differs from the whole record's", q.ID)
		}
		if len(q.CurrentFits) != 0 || q.Pool != nil || q.PoolError != "" {
			t.Errorf("question %d carries a panel", q.ID)
		}
		if w.Pool != nil {
			pools++
		}
	}
	if pools == 0 {
		t.Error("the whole record has no pool to leave out; the test shows nothing")
	}
	if h.Performance != nil {
		t.Error("the history carries performance scores")
	}
	var a, b bytes.Buffer
	if err := h.WriteCSV(&a); err != nil {
		t.Fatal(err)
	}
	if err := whole.WriteCSV(&b); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(a.Bytes(), b.Bytes()) {
		t.Error("the revision CSV of the history differs from the whole record's")
	}
}

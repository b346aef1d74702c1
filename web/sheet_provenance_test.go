package web

import (
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"mime/multipart"
	"net/http"
	"net/url"
	"regexp"
	"slices"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// The record says which file an answer sheet's judgements came from, and
// which row each was: saving a sheet records EventAnswersImported with the
// SHA-256 of the sheet's bytes as received (crypto/sha256 here), the
// file's name and the rows, at the revisions' own time, in the same
// transaction. The decision log, the report and the export carry it; a
// pasted sheet has no name.
func TestSheetImportNamesItsFile(t *testing.T) {
	g := newSheetRig(t)
	upload := func(name, text string) {
		t.Helper()
		var buf bytes.Buffer
		mw := multipart.NewWriter(&buf)
		if name != "" {
			fw, _ := mw.CreateFormFile("file", name)
			fw.Write([]byte(text))
		} else {
			mw.WriteField("sheet", text)
		}
		mw.WriteField("channel", "message")
		mw.Close()
		req, _ := http.NewRequest(http.MethodPost, g.h.ts.URL+sheetPath(g.ws.ID), &buf)
		req.Header.Set("Content-Type", mw.FormDataContentType())
		req.Header.Set("Origin", g.h.ts.URL)
		r, body := g.h.do(req)
		key := regexp.MustCompile(`name="key" value="([0-9a-f]+)"`).FindStringSubmatch(body)
		if r.StatusCode != http.StatusOK || key == nil {
			t.Fatalf("preview: %d %s", r.StatusCode, body)
		}
		if r, _ := g.h.post(sheetPath(g.ws.ID)+"/confirm", url.Values{"key": {key[1]}}); r.StatusCode != http.StatusSeeOther {
			t.Fatalf("confirm: %d", r.StatusCode)
		}
	}
	upload("answers-2026-03.csv", goodSheet)
	sum := sha256.Sum256([]byte(goodSheet))
	want := hex.EncodeToString(sum[:])

	ctx := context.Background()
	evs, err := g.h.db.Events(ctx, g.ws.ID)
	if err != nil {
		t.Fatal(err)
	}
	ev := evs[len(evs)-1]
	var imp workshop.SheetImport
	if ev.Kind != workshop.EventAnswersImported || json.Unmarshal([]byte(ev.Detail), &imp) != nil {
		t.Fatalf("last event %+v", ev)
	}
	if imp.SHA256 != want || imp.Name != "answers-2026-03.csv" || !slices.Equal(imp.Rows, []int{2, 3, 4, 5, 6}) || imp.Channel != workshop.ChannelMessage {
		t.Fatalf("the import recorded %+v, want SHA-256 %s of answers-2026-03.csv, rows 2–6 by message", imp, want)
	}
	revs := g.revisions(t)
	if len(revs) != 5 {
		t.Fatalf("%d revisions", len(revs))
	}
	for _, rv := range revs {
		if !rv.At.Equal(ev.At) {
			t.Errorf("revision %d saved at %v, the import recorded at %v", rv.ID, rv.At, ev.At)
		}
	}
	sentence := "5 judgements, rows 2–6 of answers-2026-03.csv (SHA-256 " + want + "), entered by the facilitator " + channelRecorded(workshop.ChannelMessage) + "."
	for _, page := range []string{"/log", "/report"} {
		_, body := g.h.get(workshopPath(g.ws.ID) + page)
		if !strings.Contains(body, "Judgements imported from an answer sheet") || !strings.Contains(body, sentence) {
			t.Errorf("%s lacks the import: %q", page, sentence)
		}
	}
	res, js := g.h.get(workshopPath(g.ws.ID) + "/export.json")
	if res.StatusCode != http.StatusOK || !strings.Contains(js, `"kind": "answers_imported"`) {
		t.Fatalf("export: %d, without the import", res.StatusCode)
	}
	rec, err := record.Parse(strings.NewReader(js))
	if err != nil {
		t.Fatal(err)
	}
	if err := rec.Validate(); err != nil {
		t.Fatalf("the export with the import does not validate: %v", err)
	}

	// A sheet pasted into the form has no name.
	pasted := "expert,question,q05,q50,q95\nBruno Ferrante,Q1,0.03,0.08,0.2\n"
	upload("", pasted)
	_, body := g.h.get(workshopPath(g.ws.ID) + "/log")
	sum = sha256.Sum256([]byte(pasted))
	if !strings.Contains(body, "1 judgement, row 2 of a sheet (SHA-256 "+hex.EncodeToString(sum[:])+")") {
		t.Error("the log does not describe the pasted sheet")
	}
}

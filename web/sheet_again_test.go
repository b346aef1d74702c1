package web

import (
	"bytes"
	"html"
	"mime/multipart"
	"net/http"
	"net/url"
	"strings"
	"testing"
)

// The same sheet uploaded again in its round, or a second preview of it
// confirmed after the first, is refused naming the rows that repeat
// their experts' current answers, and saves nothing: it had saved every
// row a second time, a judgement given once recorded as given twice.
func TestSheetUploadedAgainIsRefused(t *testing.T) {
	g := newSheetRig(t)
	sheet := "expert,question,q05,q50,q95,reason\nAda Quell,Q1,0.02,0.06,0.15,Logs (invented).\nBruno Ferrante,Q1,1%,4%,10%,\n"
	first := g.previewSheet(t, "monday.csv", sheet, "paper_form")
	second := g.previewSheet(t, "monday.csv", sheet, "paper_form") // another tab
	if r, _ := g.h.post(sheetPath(g.ws.ID)+"/confirm", url.Values{"key": {first}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("confirm: %d", r.StatusCode)
	}
	before := len(g.revisions(t))
	refused := func(what string, r *http.Response, body string) {
		t.Helper()
		text := html.UnescapeString(body)
		if r.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(text, "row 2, column question") ||
			!strings.Contains(text, "repeats the expert's current answer of this round") ||
			!strings.Contains(text, "Ada Quell's answer to Q1 is already this one: you entered it at ") ||
			!strings.Contains(text, "row 3 repeats a current answer too") {
			t.Errorf("%s: %d, %s", what, r.StatusCode, text)
		}
		if n := len(g.revisions(t)); n != before {
			t.Fatalf("%s saved %d revisions", what, n-before)
		}
	}
	r, body := g.h.post(sheetPath(g.ws.ID)+"/confirm", url.Values{"key": {second}})
	refused("the second preview confirmed", r, body)

	var buf bytes.Buffer
	mw := multipart.NewWriter(&buf)
	fw, _ := mw.CreateFormFile("file", "monday.csv")
	fw.Write([]byte(sheet))
	mw.WriteField("channel", "paper_form")
	mw.Close()
	req, _ := http.NewRequest(http.MethodPost, g.h.ts.URL+sheetPath(g.ws.ID), &buf)
	req.Header.Set("Content-Type", mw.FormDataContentType())
	req.Header.Set("Origin", g.h.ts.URL)
	r, body = g.h.do(req)
	refused("the sheet uploaded again", r, body)
}

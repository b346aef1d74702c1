package web

import (
	"bytes"
	"context"
	"html"
	"mime/multipart"
	"net/http"
	"net/url"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// uploadSheet uploads a sheet under a file name and confirms it.
func (g *sheetRig) uploadSheet(t *testing.T, name, text, channel string) {
	t.Helper()
	var buf bytes.Buffer
	mw := multipart.NewWriter(&buf)
	fw, _ := mw.CreateFormFile("file", name)
	fw.Write([]byte(text))
	mw.WriteField("channel", channel)
	mw.Close()
	req, _ := http.NewRequest(http.MethodPost, g.h.ts.URL+sheetPath(g.ws.ID), &buf)
	req.Header.Set("Content-Type", mw.FormDataContentType())
	req.Header.Set("Origin", g.h.ts.URL)
	_, body := g.h.do(req)
	key := regexp.MustCompile(`name="key" value="([0-9a-f]+)"`).FindStringSubmatch(body)
	if key == nil {
		t.Fatalf("no preview of %s: %s", name, body)
	}
	if r, _ := g.h.post(sheetPath(g.ws.ID)+"/confirm", url.Values{"key": {key[1]}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("confirm %s: %d", name, r.StatusCode)
	}
}

// A judgement read from an answer sheet says which file and which row of
// it, wherever its provenance is shown: the question's history, the entry
// page, the expert's page for the facilitator and the report. They said
// only "facilitator, from a paper form", so with two sheets a reviewer
// could not tell which file a judgement came from, nor check its row.
func TestSheetJudgementsNameTheirFileAndRow(t *testing.T) {
	g := newSheetRig(t)
	g.uploadSheet(t, "monday.csv", "expert,question,q05,q50,q95\nAda Quell,Q1,0.02,0.06,0.15\nBruno Ferrante,Q1,0.01,0.04,0.1\n", "paper_form")
	g.uploadSheet(t, "tuesday.csv", "expert,question,q05,q50,q95\n# a comment line\nBruno Ferrante,Q1,0.02,0.05,0.12\n", "message")
	ada, bruno := g.experts[0].ID, g.experts[1].ID
	q1 := g.qs[0].ID
	pages := map[string][]string{
		questionPath(g.ws.ID, q1): {
			"facilitator, from a paper form (answer sheet monday.csv, row 2)",
			"facilitator, from a paper form (answer sheet monday.csv, row 3)",
			"facilitator, by e-mail or message (answer sheet tuesday.csv, row 3)",
		},
		entryPath(g.ws.ID, q1, bruno): {
			"facilitator, from a paper form (answer sheet monday.csv, row 3)",
			"facilitator, by e-mail or message (answer sheet tuesday.csv, row 3)",
		},
		workshopPath(g.ws.ID) + "/experts/" + strconv.FormatInt(ada, 10): {"facilitator, from a paper form (answer sheet monday.csv, row 2)"},
		workshopPath(g.ws.ID) + "/report": {
			"entered by the facilitator, by e-mail or message; answer sheet tuesday.csv, row 3",
		},
	}
	for path, wants := range pages {
		r, body := g.h.get(path)
		if r.StatusCode != http.StatusOK {
			t.Fatalf("GET %s: %d", path, r.StatusCode)
		}
		text := html.UnescapeString(body)
		for _, want := range wants {
			if !strings.Contains(text, want) {
				t.Errorf("%s does not say %q", path, want)
			}
		}
	}
	// The record names the revisions each sheet saved.
	evs, err := g.h.db.Events(context.Background(), g.ws.ID)
	if err != nil {
		t.Fatal(err)
	}
	src := workshop.SheetSources(evs, nil)
	if len(src) != 3 {
		t.Fatalf("the events name %d judgements, want 3: %v", len(src), src)
	}
}

package web

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"html"
	"mime/multipart"
	"net/http"
	"net/url"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/answersheet"
	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// uploadSheet uploads a sheet under a file name and confirms it.
func (g *sheetRig) uploadSheet(t *testing.T, name, text, channel string) {
	t.Helper()
	key := g.previewSheet(t, name, text, channel)
	r, _ := g.h.post(sheetPath(g.ws.ID)+"/confirm", url.Values{"key": {key}})
	if r.StatusCode != http.StatusSeeOther {
		t.Fatalf("confirm %s: %d", name, r.StatusCode)
	}
	g.savedAt = r.Header.Get("Location")
}

// previewSheet uploads a sheet under a file name and returns the key
// its confirmation sends.
func (g *sheetRig) previewSheet(t *testing.T, name, text, channel string) string {
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
	return key[1]
}

// A judgement read from an answer sheet says which file and which row of
// it, wherever its provenance is shown: the question's history, the entry
// page, the expert's page for the facilitator and the report. They said
// only "facilitator, from a paper form", so with two sheets a reviewer
// could not tell which file a judgement came from, nor check its row.
func TestSheetJudgementsNameTheirFileAndRow(t *testing.T) {
	g := newSheetRig(t)
	monday := "expert,question,q05,q50,q95\nAda Quell,Q1,0.02,0.06,0.15\nBruno Ferrante,Q1,0.01,0.04,0.1\n"
	tuesday := "expert,question,q05,q50,q95\n# a comment line\nBruno Ferrante,Q1,0.02,0.05,0.12\n"
	g.uploadSheet(t, "monday.csv", monday, "paper_form")
	g.uploadSheet(t, "tuesday.csv", tuesday, "message")
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
	// The CSV of revisions, whole and per question, names them too.
	for _, path := range []string{workshopPath(g.ws.ID) + "/export.csv", questionPath(g.ws.ID, q1) + "/export.csv"} {
		r, body := g.h.get(path)
		if r.StatusCode != http.StatusOK {
			t.Fatalf("GET %s: %d", path, r.StatusCode)
		}
		recs, err := csv.NewReader(strings.NewReader(body)).ReadAll()
		if err != nil {
			t.Fatal(err)
		}
		col := map[string]int{}
		for i, h := range recs[0] {
			col[h] = i
		}
		var got []string
		for _, rec := range recs[1:] {
			got = append(got, rec[col["expert"]]+" "+rec[col["channel"]]+" "+rec[col["sheet_file"]]+" "+rec[col["sheet_row"]]+" "+rec[col["sheet_sha256"]][:min(8, len(rec[col["sheet_sha256"]]))])
		}
		want := []string{
			"Ada Quell paper_form monday.csv 2 " + answersheet.File{Text: monday}.SHA256()[:8],
			"Bruno Ferrante paper_form monday.csv 3 " + answersheet.File{Text: monday}.SHA256()[:8],
			"Bruno Ferrante message tuesday.csv 3 " + answersheet.File{Text: tuesday}.SHA256()[:8],
		}
		if strings.Join(got, "\n") != strings.Join(want, "\n") {
			t.Errorf("%s:\n%s\nwant\n%s", path, strings.Join(got, "\n"), strings.Join(want, "\n"))
		}
	}
	// The JSON record names each one's sheet and row, and reads back; a
	// sheet or row changed in the record is refused by the events.
	r, body := g.h.get(workshopPath(g.ws.ID) + "/export.json")
	if r.StatusCode != http.StatusOK {
		t.Fatalf("GET export.json: %d", r.StatusCode)
	}
	rec, err := record.Parse(strings.NewReader(body))
	if err != nil {
		t.Fatalf("the exported record does not read back: %v", err)
	}
	var named []string
	for _, rv := range rec.Revisions {
		if s := rv.Sheet; s != nil {
			named = append(named, fmt.Sprintf("%d %s %d %s", rv.ExpertID, s.File, s.Row, s.SHA256[:8]))
		}
	}
	wantJSON := []string{
		fmt.Sprintf("%d monday.csv 2 %s", ada, answersheet.File{Text: monday}.SHA256()[:8]),
		fmt.Sprintf("%d monday.csv 3 %s", bruno, answersheet.File{Text: monday}.SHA256()[:8]),
		fmt.Sprintf("%d tuesday.csv 3 %s", bruno, answersheet.File{Text: tuesday}.SHA256()[:8]),
	}
	if strings.Join(named, "\n") != strings.Join(wantJSON, "\n") {
		t.Errorf("the JSON record's revisions name\n%s\nwant\n%s", strings.Join(named, "\n"), strings.Join(wantJSON, "\n"))
	}
	var compact bytes.Buffer
	if err := json.Compact(&compact, []byte(body)); err != nil {
		t.Fatal(err)
	}
	body = compact.String()
	if !strings.Contains(body, `"sheet":{"file":"monday.csv","row":2,"sha256":"`+answersheet.File{Text: monday}.SHA256()+`"}`) {
		t.Error(`the JSON record does not carry "sheet": {"file", "row", "sha256"} on a revision`)
	}
	tampered := strings.Replace(body, `"file":"monday.csv","row":3`, `"file":"monday.csv","row":4`, 1)
	if _, err := record.Parse(strings.NewReader(tampered)); err == nil || !strings.Contains(err.Error(), ".sheet: does not match the answer sheet import") {
		t.Errorf("a record whose revision names another row than its events: %v", err)
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

// The upload page names the columns of this workshop's questions, and a
// header with all of them. It said "(here 5%, 50% and 95%)" whatever the
// questions asked, so a facilitator with a tertile question or quartiles
// built a sheet whose every row was refused.
func TestSheetPageNamesThisWorkshopsColumns(t *testing.T) {
	g := newSheetRig(t)
	r, body := g.h.get(sheetPath(g.ws.ID))
	if r.StatusCode != http.StatusOK {
		t.Fatalf("upload page: %d", r.StatusCode)
	}
	// The header may break after each comma (<wbr>), which a reader and a
	// copy of it do not see.
	text := strings.ReplaceAll(html.UnescapeString(body), "<wbr>", "")
	if strings.Contains(text, "here 5%, 50% and 95%") {
		t.Error("the page still says every quantile question asks 5%, 50% and 95%")
	}
	for _, want := range []string{
		"<code>q33,q50,q67</code>",
		"<code>lowest,highest,best,confidence</code>",
		"<code>bin1,bin2,bin3,bin4</code>",
		"expert,question,q05,q50,q95,lowest,highest,best,confidence,bin1,bin2,bin3,bin4,q33,q67,reason",
	} {
		if !strings.Contains(text, want) {
			t.Errorf("the upload page does not show %s", want)
		}
	}
	// The header the page gives reads as a sheet of this workshop.
	if _, err := answersheet.Read(strings.NewReader(sheetHeader(g.qs)+"\nAda Quell,Q4,,0.15,,,,,,,,,,0.1,0.2,\n"), g.qs, g.experts); err != nil {
		t.Errorf("a sheet under the page's header: %v", err)
	}
}

// A sheet pasted into the upload page is not cut by the browser. Its
// text area had the 4,000-character maxlength of a reason, and a browser
// cuts a longer paste there without a word: a sheet of some sixty rows
// lost its last ones, and a row cut inside a value ("0.12" to "0.1")
// read as a good row with a wrong number. The server takes a pasted
// sheet of any length up to the sheet's 1 MiB and says when it is longer.
func TestPastedSheetIsNotCutByTheBrowser(t *testing.T) {
	g := newSheetRig(t)
	_, body := g.h.get(sheetPath(g.ws.ID))
	area := regexp.MustCompile(`<textarea[^>]*name="sheet"[^>]*>`).FindString(body)
	if area == "" {
		t.Fatal("no text area for a pasted sheet")
	}
	if strings.Contains(area, "maxlength") {
		t.Errorf("the pasted sheet's text area cuts a paste: %s", area)
	}
	// A pasted sheet longer than a reason is read whole.
	var sb strings.Builder
	sb.WriteString("expert,question,q05,q50,q95,reason\n")
	for range 40 {
		sb.WriteString("# " + strings.Repeat("a comment line of an invented sheet ", 3) + "\n")
	}
	sb.WriteString("Ada Quell,Q1,0.02,0.06,0.15,\n")
	if sb.Len() <= input.MaxLongText {
		t.Fatalf("the sheet is %d characters, not over a reason's %d", sb.Len(), input.MaxLongText)
	}
	r, page := g.h.post(sheetPath(g.ws.ID), url.Values{"sheet": {sb.String()}, "channel": {"file"}})
	if r.StatusCode != http.StatusOK || !strings.Contains(page, "Nothing is saved yet") {
		t.Fatalf("a long pasted sheet: %d", r.StatusCode)
	}
}

// The sheet's preview says which rows would follow an answer the expert
// saved themselves. A row becomes the expert's current answer, so a
// paper form written before the expert answered on their own link put
// the older judgement in its place, and the preview, which showed only
// the sheet's rows, gave no sign of it.
func TestSheetPreviewSaysWhatARowFollows(t *testing.T) {
	g := newSheetRig(t)
	ctx := context.Background()
	ada := g.experts[0]
	own := workshop.Revision{QuestionID: g.qs[0].ID, ExpertID: ada.ID, Answer: workshop.Answer{Values: []float64{0.03, 0.07, 0.2}}}
	if err := g.h.db.SaveRevision(ctx, &own); err != nil {
		t.Fatal(err)
	}
	sheet := "expert,question,q05,q50,q95\nAda Quell,Q1,0.02,0.06,0.15\nBruno Ferrante,Q1,0.01,0.04,0.1\n"
	// One row is "This judgement", not "These 1 judgement", and its
	// button says so too.
	if _, body := g.h.post(sheetPath(g.ws.ID), url.Values{"sheet": {"expert,question,q05,q50,q95\nAda Quell,Q1,0.02,0.06,0.15\n"}, "channel": {"file"}}); !strings.Contains(body, "This judgement will be saved") || !strings.Contains(body, ">Save this judgement<") {
		t.Error("a sheet of one row is not 'This judgement' with 'Save this judgement'")
	}
	r, body := g.h.post(sheetPath(g.ws.ID), url.Values{"sheet": {sheet}, "channel": {"paper_form"}})
	if r.StatusCode != http.StatusOK {
		t.Fatalf("preview: %d", r.StatusCode)
	}
	if !strings.Contains(body, ">Save these judgements<") {
		t.Error("a sheet of two rows is not 'Save these judgements'")
	}
	text := html.UnescapeString(stripTags(body))
	for _, want := range []string{
		"1 row follows an answer the expert saved themselves",
		"Ada Quell's own answer of " + own.At.UTC().Format(timeLayout) + " (round 1)",
		"no answer yet", // Bruno's row
		"These 2 judgements will be saved",
	} {
		if !strings.Contains(text, want) {
			t.Errorf("the preview does not say %q", want)
		}
	}
}

// Once a sheet is saved, the overview says what was saved: the
// confirmation landed on the overview without a word, so the facilitator
// could not tell it had worked but by reading the table of answers. It
// says so once: the confirmation rode in the address (?imported=1), and
// a reload said again that a sheet was saved. A confirmation sent twice
// (a double click, a browser's retry) saves the sheet once and still says
// so once.
func TestSheetSavedIsSaid(t *testing.T) {
	g := newSheetRig(t)
	overview := workshopPath(g.ws.ID)
	const saved = "Answer sheet saved."
	// The overview as the browser is sent to it, and as a reload asks for
	// it again.
	at := overview
	shows := func(when string) string {
		t.Helper()
		r, body := g.h.get(at)
		if r.StatusCode != http.StatusOK {
			t.Fatalf("overview, %s: %d", when, r.StatusCode)
		}
		return html.UnescapeString(body)
	}
	g.uploadSheet(t, "monday.csv", "expert,question,q05,q50,q95\nAda Quell,Q1,0.02,0.06,0.15\nBruno Ferrante,Q1,0.01,0.04,0.1\n", "paper_form")
	at, _, _ = strings.Cut(g.savedAt, "#")
	if g.savedAt != sheetSavedPath(g.ws.ID) || at != overview {
		t.Errorf("the confirmation goes to %q, want the overview at the words of the sheet saved", g.savedAt)
	}
	if text := shows("after the sheet"); !strings.Contains(text, saved+"</strong> 2 judgements, rows 2–3 of monday.csv") || !strings.Contains(text, `id="sheet-saved"`) {
		t.Error("the overview does not say what the sheet saved")
	}
	if strings.Contains(shows("reloaded"), saved) {
		t.Error("the overview reloaded says again that the sheet was saved")
	}
	if _, body := g.h.get(overview + "?imported=1"); strings.Contains(body, saved) {
		t.Error("the overview's former address still says a sheet was saved")
	}

	// The same confirmation sent twice: the first copy's answer never
	// reaches the browser, which follows the second's.
	confirm := url.Values{"key": {g.previewSheet(t, "tuesday.csv", "expert,question,q05,q50,q95\nAda Quell,Q1,0.03,0.07,0.16\n", "message")}}
	if r := postLost(t, g.h, sheetPath(g.ws.ID)+"/confirm", confirm); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("the first copy: %d", r.StatusCode)
	}
	r, _ := g.h.post(sheetPath(g.ws.ID)+"/confirm", confirm)
	if at, _, _ = strings.Cut(r.Header.Get("Location"), "#"); r.StatusCode != http.StatusSeeOther || !strings.HasPrefix(at, overview) {
		t.Fatalf("the second copy: %d to %q, want 303 to the overview", r.StatusCode, r.Header.Get("Location"))
	}
	if text := shows("after the sheet sent twice"); !strings.Contains(text, saved+"</strong> 1 judgement, row 2 of tuesday.csv") {
		t.Error("the overview after a sheet sent twice does not say what it saved")
	}
	if strings.Contains(shows("reloaded"), saved) {
		t.Error("the overview reloaded after a sheet sent twice says again that it was saved")
	}
}

// A sheet without a file name (pasted, or given to import-answers on
// standard input) is not said to be pasted.
func TestSheetRowLabel(t *testing.T) {
	for _, c := range []struct {
		src  workshop.SheetSource
		want string
	}{
		{workshop.SheetSource{Name: "monday.csv", Row: 3}, "answer sheet monday.csv, row 3"},
		{workshop.SheetSource{Row: 2}, "an answer sheet without a file name, row 2"},
	} {
		if got := sheetRowLabel(c.src); got != c.want {
			t.Errorf("sheetRowLabel(%+v) = %q, want %q", c.src, got, c.want)
		}
	}
}

// An answer sheet's line in the decision log says which questions its
// judgements answer: one by its number and quantity, several by their
// numbers. It said "whole workshop", as for a decision about no question
// in particular.
func TestSheetLineNamesItsQuestions(t *testing.T) {
	g := newSheetRig(t)
	g.uploadSheet(t, "one.csv", "expert,question,q05,q50,q95\nAda Quell,Q1,0.02,0.06,0.15\nBruno Ferrante,Q1,0.01,0.04,0.1\n", "paper_form")
	g.uploadSheet(t, "two.csv", "expert,question,q05,q50,q95,lowest,highest,best,confidence\nChiara Osei,Q2,,,,0.05,0.3,0.12,80\nChiara Osei,Q1,0.02,0.06,0.15,,,,\nAda Quell,Q2,,,,0.1,0.4,0.2,70\n", "message")
	for _, page := range []string{"/log", "/report"} {
		_, body := g.h.get(workshopPath(g.ws.ID) + page)
		for file, want := range map[string]string{"one.csv": "Q1 wall loss share", "two.csv": "2 questions: Q1 and Q2"} {
			at := strings.Index(body, " of "+file+" (")
			if at < 0 {
				t.Fatalf("%s: no line for %s", page, file)
			}
			row := body[strings.LastIndex(body[:at], "<tr"):at]
			cells := regexp.MustCompile(`<td[^>]*>([^<]*)</td>`).FindAllStringSubmatch(row, -1)
			if len(cells) < 3 || cells[1][1] != "Judgements imported from an answer sheet" || cells[2][1] != want {
				t.Errorf("%s: %s's line applies to %q, want %q: %s", page, file, cells[2][1], want, row)
			}
		}
	}
}

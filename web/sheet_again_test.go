package web

import (
	"bytes"
	"html"
	"mime/multipart"
	"net/http"
	"net/url"
	"regexp"
	"strings"
	"testing"
)

// postSheet uploads a sheet and returns the page as its text.
func (g *sheetRig) postSheet(t *testing.T, name, text string) (*http.Response, string) {
	t.Helper()
	var buf bytes.Buffer
	mw := multipart.NewWriter(&buf)
	fw, _ := mw.CreateFormFile("file", name)
	fw.Write([]byte(text))
	mw.WriteField("channel", "paper_form")
	mw.Close()
	req, _ := http.NewRequest(http.MethodPost, g.h.ts.URL+sheetPath(g.ws.ID), &buf)
	req.Header.Set("Content-Type", mw.FormDataContentType())
	req.Header.Set("Origin", g.h.ts.URL)
	r, body := g.h.do(req)
	return r, html.UnescapeString(body)
}

// tableRows are the row numbers in the first cell of each body row of
// the table with the given id.
func tableRows(t *testing.T, body, id string) []string {
	t.Helper()
	i := strings.Index(body, `id="`+id+`"`)
	if i < 0 {
		return nil
	}
	table := body[i:]
	table = table[:strings.Index(table, "</table>")]
	var out []string
	for _, m := range regexp.MustCompile(`<td class="num" data-label="Row">(\d+)</td>`).FindAllStringSubmatch(table, -1) {
		out = append(out, m[1])
	}
	return out
}

// A sheet imported again after one row was put right saves that row
// alone: the rows that repeat their expert's current answer of the
// round, values and reasoning alike, are listed as unchanged in the
// preview and left out, and the overview says how many. The sheet was
// refused as a whole, naming every such row, so the facilitator had to
// take them out first. A sheet whose every row is unchanged offers
// nothing to save, and a confirmation sent by hand saves nothing.
func TestSheetImportedAgainSavesWhatChanged(t *testing.T) {
	g := newSheetRig(t)
	sheet := "expert,question,q05,q50,q95,reason\nAda Quell,Q1,0.02,0.06,0.15,Logs (invented).\nBruno Ferrante,Q1,1%,4%,1%,\nChiara Osei,Q1,0.01,0.03,0.08,\n"
	if r, body := g.postSheet(t, "monday.csv", sheet); r.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, "row 3, column q95") {
		t.Fatalf("the typo: %d %s", r.StatusCode, body)
	}
	// The facilitator leaves the typo's row out, saves the others, then
	// puts the typo right and imports the whole sheet again.
	g.uploadSheet(t, "monday.csv", strings.Replace(sheet, "Bruno Ferrante,Q1,1%,4%,1%,\n", "", 1), "paper_form")
	before := len(g.revisions(t))
	fixed := strings.Replace(sheet, "1%,4%,1%", "1%,4%,10%", 1)
	r, body := g.postSheet(t, "monday.csv", fixed)
	if r.StatusCode != http.StatusOK {
		t.Fatalf("the sheet put right: %d %s", r.StatusCode, body)
	}
	if got := tableRows(t, body, "sheet-rows"); strings.Join(got, " ") != "3" {
		t.Errorf("rows to save %v, want row 3 alone", got)
	}
	if got := tableRows(t, body, "sheet-unchanged"); strings.Join(got, " ") != "2 4" {
		t.Errorf("unchanged rows %v, want 2 and 4", got)
	}
	if !strings.Contains(body, "This judgement will be saved in round 1") || !strings.Contains(body, "2 rows unchanged, not saved again") ||
		!regexp.MustCompile(`your entry of <span class="when">\d{4}-\d\d-\d\d \d\d:\d\d UTC</span>`).MatchString(body) ||
		!strings.Contains(body, "Save this judgement") {
		t.Errorf("the preview does not say what it saves and leaves out:\n%s", body)
	}
	// Listed below the save button, so that it does not read as saving
	// them, and said above the rows to save.
	if save, unchanged := strings.Index(body, "Save this judgement"), strings.Index(body, `id="sheet-unchanged-title"`); unchanged < save ||
		!strings.Contains(body, "; 2 rows repeat their experts' current answers and are listed below the button, not to be saved again.") {
		t.Errorf("the unchanged rows are not said first and listed below the save button:\n%s", body)
	}
	key := regexp.MustCompile(`name="key" value="([0-9a-f]+)"`).FindStringSubmatch(body)
	if key == nil {
		t.Fatal("no key")
	}
	if r, _ := g.h.post(sheetPath(g.ws.ID)+"/confirm", url.Values{"key": {key[1]}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("confirm: %d", r.StatusCode)
	}
	revs := g.revisions(t)
	if len(revs) != before+1 || revs[len(revs)-1].ExpertID != g.experts[1].ID || revs[len(revs)-1].Answer.Values[2] != 0.1 {
		t.Fatalf("saved %d revisions, the last %+v; want Bruno Ferrante's alone", len(revs)-before, revs[len(revs)-1])
	}
	_, overview := g.h.get(workshopPath(g.ws.ID))
	if !strings.Contains(html.UnescapeString(overview), "2 rows repeated their experts' current answers and were not saved again.") {
		t.Errorf("the overview does not say what was left out:\n%s", overview)
	}

	// Every row unchanged: nothing to save, said as such.
	r, body = g.postSheet(t, "monday.csv", fixed)
	if r.StatusCode != http.StatusOK || !strings.Contains(body, "Nothing to save:</strong> all 3 rows of the sheet repeat their experts' current answers of round 1") ||
		strings.Contains(body, "Save these judgements") || strings.Contains(body, `id="sheet-rows"`) {
		t.Fatalf("every row unchanged: %d %s", r.StatusCode, body)
	}
	if got := tableRows(t, body, "sheet-unchanged"); strings.Join(got, " ") != "2 3 4" {
		t.Errorf("unchanged rows %v, want 2, 3 and 4", got)
	}
	key = regexp.MustCompile(`name="key" value="([0-9a-f]+)"`).FindStringSubmatch(body)
	if key == nil {
		t.Fatal("no key")
	}
	if r, body := g.h.post(sheetPath(g.ws.ID)+"/confirm", url.Values{"key": {key[1]}}); r.StatusCode != http.StatusOK || !strings.Contains(body, "Nothing to save") {
		t.Errorf("a confirmation by hand of nothing: %d %s", r.StatusCode, body)
	}
	if n := len(g.revisions(t)); n != before+1 {
		t.Fatalf("a sheet of unchanged rows saved %d revisions", n-before-1)
	}

	// What is truly wrong is still refused, unchanged rows or not.
	r, body = g.postSheet(t, "monday.csv", fixed+"Ada Quell,Q2,,,,\n")
	if r.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, "row 5, column lowest") {
		t.Errorf("a bad row beside unchanged ones: %d %s", r.StatusCode, body)
	}
}

// A second preview of a sheet (another tab) confirmed after the first
// saves nothing: the answers it would follow were saved since, and it
// shows the preview again as it now reads, every row unchanged. It had
// saved every row a second time, a judgement given once recorded twice.
func TestSheetConfirmedFromASecondPreviewSavesNothing(t *testing.T) {
	g := newSheetRig(t)
	sheet := "expert,question,q05,q50,q95,reason\nAda Quell,Q1,0.02,0.06,0.15,Logs (invented).\nBruno Ferrante,Q1,1%,4%,10%,\n"
	first := g.previewSheet(t, "monday.csv", sheet, "paper_form")
	second := g.previewSheet(t, "monday.csv", sheet, "paper_form")
	if r, _ := g.h.post(sheetPath(g.ws.ID)+"/confirm", url.Values{"key": {first}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("confirm: %d", r.StatusCode)
	}
	before := len(g.revisions(t))
	r, body := g.h.post(sheetPath(g.ws.ID)+"/confirm", url.Values{"key": {second}})
	text := html.UnescapeString(body)
	if r.StatusCode != http.StatusConflict || !strings.Contains(text, "Nothing was saved") || !strings.Contains(text, "Nothing to save:</strong> both rows of the sheet") {
		t.Errorf("the second preview confirmed: %d %s", r.StatusCode, text)
	}
	if n := len(g.revisions(t)); n != before {
		t.Fatalf("the second preview saved %d revisions", n-before)
	}
}

// A confirmation sent twice (a double click past the form's key, a
// replay) saves once, and the overview after each post says the same:
// what was saved and how many rows were left out as unchanged. The
// second post, which finds the sheet used, said "saved" without the
// unchanged rows.
func TestSheetConfirmedTwiceSaysTheUnchangedRowsBothTimes(t *testing.T) {
	g := newSheetRig(t)
	sheet := "expert,question,q05,q50,q95,reason\nAda Quell,Q1,0.02,0.06,0.15,Logs (invented).\nBruno Ferrante,Q1,0.01,0.04,0.10,\nChiara Osei,Q1,0.01,0.03,0.08,\n"
	g.uploadSheet(t, "monday.csv", sheet, "paper_form")
	g.h.get(workshopPath(g.ws.ID)) // takes the first sheet's confirmation
	before := len(g.revisions(t))
	key := g.previewSheet(t, "monday.csv", strings.Replace(sheet, "0.01,0.04,0.10", "0.01,0.04,0.12", 1), "paper_form")
	const left = "2 rows repeated their experts' current answers and were not saved again."
	for i := range 2 {
		if r, _ := g.h.post(sheetPath(g.ws.ID)+"/confirm", url.Values{"key": {key}}); r.StatusCode != http.StatusSeeOther {
			t.Fatalf("confirmation %d: %d", i+1, r.StatusCode)
		}
		_, overview := g.h.get(workshopPath(g.ws.ID))
		overview = html.UnescapeString(overview)
		if !strings.Contains(overview, "Answer sheet saved.") || !strings.Contains(overview, left) {
			t.Errorf("the overview after confirmation %d does not say %q", i+1, left)
		}
	}
	if n := len(g.revisions(t)) - before; n != 1 {
		t.Errorf("two confirmations saved %d revisions, want 1", n)
	}
}

// A sheet none of whose rows repeats a current answer has no list of
// unchanged rows: its preview said "0 rows unchanged, not saved again"
// over an empty table below the save button.
func TestSheetWithoutUnchangedRowsListsNone(t *testing.T) {
	g := newSheetRig(t)
	r, body := g.postSheet(t, "monday.csv", "expert,question,q05,q50,q95\nAda Quell,Q1,0.02,0.06,0.15\n")
	if r.StatusCode != http.StatusOK || !strings.Contains(body, "Save this judgement") {
		t.Fatalf("preview: %d %s", r.StatusCode, body)
	}
	if strings.Contains(body, `id="sheet-unchanged`) || strings.Contains(body, "rows unchanged") {
		t.Errorf("the preview of a sheet without unchanged rows lists unchanged rows:\n%s", body)
	}
}

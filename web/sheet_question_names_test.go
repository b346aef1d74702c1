package web

import (
	"bytes"
	"context"
	"encoding/csv"
	"errors"
	"html"
	"net/http"
	"net/url"
	"slices"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/answersheet"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// shownText is an HTML fragment as a reader copies it: its tags dropped,
// its entities read and its spaces folded.
func shownText(fragment string) string {
	return strings.Join(strings.Fields(html.UnescapeString(stripTags(fragment))), " ")
}

// elementAfter is the text of the first element opened by open after
// marker in body, up to its closing tag.
func elementAfter(t *testing.T, body, marker, open, closing string) string {
	t.Helper()
	i := strings.Index(body, marker)
	if i < 0 {
		t.Fatalf("no %q on the page", marker)
	}
	j := strings.Index(body[i:], open)
	if j < 0 {
		t.Fatalf("no %q after %q", open, marker)
	}
	from := i + j
	k := strings.Index(body[from:], closing)
	if k < 0 {
		t.Fatalf("%q after %q is not closed", open, marker)
	}
	return shownText(body[from : from+k])
}

// readQuestionCell reads a one-row answer sheet whose question cell is
// cell, for an expert of the demo who has not answered, against the
// workshop as the store holds it.
func readQuestionCell(t *testing.T, h *harness, ws workshop.Workshop, cell string) (workshop.Question, error) {
	t.Helper()
	ctx := context.Background()
	qs, err := h.db.Questions(ctx, ws.ID)
	if err != nil {
		t.Fatal(err)
	}
	es, err := h.db.Experts(ctx, ws.ID)
	if err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	w.WriteAll([][]string{{"expert", "question", "q05", "q50", "q95"}, {"Priya Raman", cell, "0.01", "0.04", "0.12"}})
	rows, err := answersheet.Read(&b, qs, es)
	if err != nil {
		return workshop.Question{}, err
	}
	return rows[0].Question, nil
}

// Every form in which Parley writes a question's name beside its number,
// taken from the pages and the download as they are served, is read by
// the answer sheet's question cell as that question: the report's
// headings and its agreed priors with their units, the panel's title,
// the overview's grid and its answers table, the sheet page's own list
// and example, the expert's home, the room's title and the calibration
// download's comment lines. A facilitator who copied "Q1: … (proportion
// of units)" from the report had the row refused as a question cell of
// no form. A cell naming a question that takes no answers (its true
// value shown, or retired) is refused as such, never by its form.
func TestSheetReadsTheQuestionAsParleyWritesIt(t *testing.T) {
	h, ws, qs, _, links := seeded(t)
	q1, q2 := qs[0], qs[1]
	if q1.Units == "" || !strings.Contains(q1.Quantity, ",") {
		t.Fatalf("the demo's Q1 has no units or no comma: %+v", q1)
	}
	get := func(path string) string {
		t.Helper()
		res, body := h.get(path)
		if res.StatusCode != http.StatusOK {
			t.Fatalf("GET %s: %d", path, res.StatusCode)
		}
		return body
	}
	var priya string
	for _, l := range links {
		if l.Name == "Priya Raman" {
			priya = l.Path
		}
	}
	wp := workshopPath(ws.ID)
	report := get(wp + "/report")
	overview := get(wp)
	sheetPage := get(sheetPath(ws.ID))
	expertHome := get(priya)
	calibration := get(wp + "/calibration.csv")
	overviewRow := func(n int) string {
		t.Helper()
		marker := `<td data-label="Question">` + strconv.Itoa(n) + `</td>`
		return elementAfter(t, overview, marker, "<td", "</td>") + " " +
			elementAfter(t, overview, marker, `<td data-label="Quantity">`, "</td>")
	}
	var comment string
	for line := range strings.Lines(calibration) {
		if strings.HasPrefix(line, "# Q2:") {
			comment = strings.TrimSpace(strings.TrimPrefix(line, "#"))
		}
	}
	for _, c := range []struct {
		writer, cell string
		question     workshop.Question
	}{
		{"the report's heading", elementAfter(t, report, `id="report-q`+strconv.FormatInt(q1.ID, 10)+`"`, "<h2", "</h2>"), q1},
		{"the report's agreed priors", elementAfter(t, report, `id="agreed-priors"`, `<th scope="row"`, "</th>"), q1},
		{"the report's history", elementAfter(t, report, "Full revision history", "<h3", "</h3>"), q1},
		{"the panel's title", elementAfter(t, get(questionPath(ws.ID, q1.ID)), "<main", "<h1", "</h1>"), q1},
		{"the overview's grid", overviewRow(1), q1},
		{"the overview's answers", elementAfter(t, overview, `aria-label="Who has answered what"`, `<th scope="col">Q1 `, "</th>"), q1},
		{"the sheet page's list", elementAfter(t, sheetPage, `id="sheet-question-columns"`, "<td>", "</td>"), q1},
		{"the sheet page's example", elementAfter(t, sheetPage, "as the list below writes it", "<code>", "</code>"), q1},
		{"the sheet page's example with units", elementAfter(t, sheetPage, "as the report does", "<code>", "</code>"), q1},
		{"the expert's home", elementAfter(t, expertHome, "The next to answer:", "<a", "</a>"), q1},
		{"the room's title", elementAfter(t, get(roomPath(ws.ID, q1.ID)), "<main", "<h1", "</h1>"), q1},
		{"the calibration download's comment", comment, q2},
	} {
		if c.cell == "" || !strings.ContainsAny(c.cell, " ") {
			t.Errorf("%s: %q names no question with words", c.writer, c.cell)
			continue
		}
		q, err := readQuestionCell(t, h, ws, c.cell)
		if err != nil {
			// Q2's true value is shown: its answers are final, which the
			// refusal must say of Q2, not of the cell's form.
			var ie *elicit.InputError
			if c.question.TrueValue != nil && errors.As(err, &ie) && ie.Rule == answersheet.RuleQuestion &&
				strings.HasPrefix(ie.Detail, "Q"+strconv.Itoa(c.question.Position)+"'s true value") {
				continue
			}
			t.Errorf("%s writes %q, which the sheet refused: %v", c.writer, c.cell, err)
			continue
		}
		if q.ID != c.question.ID {
			t.Errorf("%s writes %q, read as Q%d", c.writer, c.cell, q.Position)
		}
	}
	if !strings.Contains(elementAfter(t, report, `id="agreed-priors"`, `<th scope="row"`, "</th>"), "("+q1.Units+")") {
		t.Error("the report's agreed priors no longer write the units: the case above tests nothing of them")
	}

	// Retired with its agreed prior, Q1 is named "Q1 (quantity)" under the
	// report's agreed priors; the sheet refuses it as retired.
	if res, body := h.post(questionPath(ws.ID, q1.ID)+"/retire", url.Values{"action": {"retire"}, "retire_reason": {"Asked twice (invented)."}}); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("retire: %d %s", res.StatusCode, body)
	}
	report = get(wp + "/report")
	retired := "Q1 (" + q1.Quantity + ")"
	if !strings.Contains(html.UnescapeString(report), retired) {
		t.Fatalf("the report does not name the retired Q1 as %q", retired)
	}
	_, err := readQuestionCell(t, h, ws, retired)
	var ie *elicit.InputError
	if !errors.As(err, &ie) || ie.Rule != answersheet.RuleQuestion || ie.Detail != "Q1 is retired" {
		t.Errorf("%q: %v; want Q1 is retired", retired, err)
	}
}

// The record's CSV writes a question in its column "question" as its
// quantity alone. A sheet made from that download keeps the column and
// its cells: each is refused by the cell's form, as a name with no
// number is, and the refusal says whose name it is and what to write.
func TestSheetSaysWhoseNameAQuestionWithoutNumberIs(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	res, body := h.get(exportPath(ws.ID, "csv"))
	if res.StatusCode != http.StatusOK {
		t.Fatalf("export.csv: %d", res.StatusCode)
	}
	rows, err := csv.NewReader(strings.NewReader(body)).ReadAll()
	if err != nil || len(rows) < 2 {
		t.Fatalf("export.csv: %d rows, %v", len(rows), err)
	}
	col := slices.Index(rows[0], "question")
	idCol := slices.Index(rows[0], "question_id")
	if col < 0 || idCol < 0 {
		t.Fatalf("export.csv has no question or question_id column: %v", rows[0])
	}
	for _, row := range rows[1:] {
		var q workshop.Question
		for _, c := range qs {
			if strconv.FormatInt(c.ID, 10) == row[idCol] {
				q = c
			}
		}
		_, err := readQuestionCell(t, h, ws, row[col])
		var ie *elicit.InputError
		want := "Q" + strconv.Itoa(q.Position) + "'s name without its number; write Q" + strconv.Itoa(q.Position) + " before it"
		if !errors.As(err, &ie) || ie.Rule != answersheet.RuleQuestionForm || !strings.Contains(ie.Detail, want) {
			t.Errorf("the record's question cell %q: %v; want the form's rule and %q", row[col], err, want)
		}
	}
}

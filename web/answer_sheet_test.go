package web

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"html"
	"mime/multipart"
	"net/http"
	"net/url"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/answersheet"
	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/web/chart"
)

// sheetRig is a workshop of every answer format for the sheet tests (an
// invented storage-tank survey): Q1 quantiles at 5/50/95, Q2 the
// four-value interval, Q3 chips in four bins, Q4 tertiles, Q5 a
// calibration question; three experts.
type sheetRig struct {
	h       *harness
	ws      workshop.Workshop
	qs      []workshop.Question
	experts []workshop.Expert
	savedAt string // where the last confirmation sent the browser
}

func newSheetRig(t *testing.T) *sheetRig {
	t.Helper()
	h := newHarness(t)
	h.signIn()
	ctx := context.Background()
	ws := workshop.Workshop{Title: "Tank survey (invented)", Invented: true}
	if err := h.db.CreateWorkshop(ctx, &ws); err != nil {
		t.Fatal(err)
	}
	truth := 0.2
	qs := []workshop.Question{
		{Wording: "Share of tanks with wall loss?", Quantity: "wall loss share", Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: workshop.ProbsDefault},
		{Wording: "Share with coating failure?", Quantity: "coating failure share", Lower: 0, Upper: 1, Format: workshop.FormatInterval},
		{Wording: "Share with sludge above the inlet?", Quantity: "sludge share", Lower: 0, Upper: 1, Format: workshop.FormatChips,
			BinEdges: []float64{0, 0.1, 0.2, 0.4, 1}, Chips: 20},
		{Wording: "Share with a leaking valve?", Quantity: "valve leak share", Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: workshop.ProbsTertiles},
		{Wording: "Share of last year's tanks repainted?", Quantity: "repainted share", Lower: 0, Upper: 1, Format: workshop.FormatQuantiles,
			Probs: workshop.ProbsDefault, Calibration: true, TrueValue: &truth},
	}
	for i := range qs {
		qs[i].WorkshopID = ws.ID
		if err := h.db.AddQuestion(ctx, &qs[i]); err != nil {
			t.Fatal(err)
		}
	}
	var es []workshop.Expert
	for i, n := range []string{"Ada Quell", "Bruno Ferrante", "Chiara Osei"} {
		e := workshop.Expert{WorkshopID: ws.ID, Name: n}
		if err := h.db.AddExpert(ctx, &e, []byte("sheet-"+strconv.Itoa(i))); err != nil {
			t.Fatal(err)
		}
		es = append(es, e)
	}
	return &sheetRig{h: h, ws: ws, qs: qs, experts: es}
}

const goodSheet = `expert,question,q05,q50,q95,lowest,highest,best,confidence,bin1,bin2,bin3,bin4,q33,q67,reason
Ada Quell,Q1,0.02,0.06,0.15,,,,,,,,,,,"Inspection logs, ""2019–2024"" (invented)"
ada quell,2,,,,0.05,0.3,0.12,80,,,,,,,
Bruno Ferrante,Q3,,,,,,,,4,10,6,,,,Most tanks are clean (invented).
id:3,Q4,,0.15,,,,,,,,,,0.1,0.2,,
Chiara Osei,q1,0.01,0.03,0.08,,,,,,,,,,,
`

func (g *sheetRig) revisions(t *testing.T) []workshop.Revision {
	t.Helper()
	revs, err := g.h.db.Revisions(context.Background(), g.ws.ID)
	if err != nil {
		t.Fatal(err)
	}
	return revs
}

// A good sheet with every format reads row by row, each fitted exactly
// as the expert's own form would fit it.
func TestReadAnswerSheet(t *testing.T) {
	g := newSheetRig(t)
	rows, err := answersheet.Read(strings.NewReader(goodSheet), g.qs, g.experts)
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 5 {
		t.Fatalf("%d rows", len(rows))
	}
	want := []struct {
		line     int
		expert   string
		question int
		answer   workshop.Answer
	}{
		{2, "Ada Quell", 1, workshop.Answer{Values: []float64{0.02, 0.06, 0.15}}},
		{3, "Ada Quell", 2, workshop.Answer{Lowest: 0.05, Highest: 0.3, Best: 0.12, Confidence: 0.8}},
		{4, "Bruno Ferrante", 3, workshop.Answer{Counts: []int{4, 10, 6, 0}}},
		{5, "Chiara Osei", 4, workshop.Answer{Values: []float64{0.1, 0.15, 0.2}}},
		{6, "Chiara Osei", 1, workshop.Answer{Values: []float64{0.01, 0.03, 0.08}}},
	}
	for i, w := range want {
		r := rows[i]
		if r.Line != w.line || r.Expert.Name != w.expert || r.Question.Position != w.question {
			t.Errorf("row %d: line %d, %s, Q%d", i, r.Line, r.Expert.Name, r.Question.Position)
		}
		if w.answer.Values != nil && (r.Answer.Values[0] != w.answer.Values[0] || r.Answer.Values[2] != w.answer.Values[2]) {
			t.Errorf("row %d values %v", i, r.Answer.Values)
		}
		fit, err := r.Question.Fit(r.Answer)
		if err != nil || fit.Dist != r.Fit.Dist {
			t.Errorf("row %d: fit %+v, the question's own fit %+v (%v)", i, r.Fit.Dist, fit.Dist, err)
		}
	}
	if rows[0].Reason != `Inspection logs, "2019–2024" (invented)` {
		t.Errorf("quoted reason read as %q", rows[0].Reason)
	}
	if a := rows[1].Answer; a.Confidence != 0.8 || a.Best != 0.12 {
		t.Errorf("interval read as %+v", a)
	}
	if c := rows[2].Answer.Counts; len(c) != 4 || c[3] != 0 {
		t.Errorf("chips read as %v (the empty bin holds none)", c)
	}
}

// A sheet as spreadsheets write it reads as the plain one: a byte order
// mark before a quoted header (which made the first cell a bare quote),
// CRLF line ends, quoted commas, and rows of empty cells after the last
// answer (which were refused as naming no expert).
func TestAnswerSheetAsSpreadsheetsWriteIt(t *testing.T) {
	g := newSheetRig(t)
	sheet := "\ufeff\"expert\",\"question\",\"q05\",\"q50\",\"q95\",\"reason\"\r\n" +
		"\"Ada Quell\",\"Q1\",\"2%\",\"6%\",\"15%\",\"Logs, 2019–2024 (invented)\"\r\n" +
		",,,,,\r\n" +
		"\"Bruno Ferrante\",\"Q1\",\"0.01\",\"0.03\",\"0.08\",\"\"\r\n" +
		",,,,,\r\n,,, ,,\r\n"
	rows, err := answersheet.Read(strings.NewReader(sheet), g.qs, g.experts)
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 2 || rows[0].Line != 2 || rows[1].Line != 4 || rows[1].Expert.Name != "Bruno Ferrante" {
		t.Fatalf("rows %+v", rows)
	}
	if a := rows[0].Answer; !a.Percent || a.Values[1] != 0.06 || rows[0].Reason != "Logs, 2019–2024 (invented)" {
		t.Errorf("first row read as %+v, reason %q", a, rows[0].Reason)
	}
	// Empty header cells, as a spreadsheet writes them to the right of
	// its last column when a cell there was ever touched (and an empty
	// column between two), name no column: the header was refused as
	// naming a column "".
	for _, sheet := range []string{
		"\ufeffexpert,question,q05,q50,q95,reason,,,\r\nAda Quell,Q1,0.02,0.06,0.15,,,,\r\n,,,,,,,,\r\n",
		"expert,question,,q05,q50,q95\nAda Quell,Q1,,0.02,0.06,0.15\n",
	} {
		if rows, err := answersheet.Read(strings.NewReader(sheet), g.qs, g.experts); err != nil || len(rows) != 1 || rows[0].Answer.Values[2] != 0.15 {
			t.Errorf("%q: %+v %v", sheet, rows, err)
		}
	}
	// Decimals written with a comma, unquoted, spill past the header: the
	// refusal says that is what they likely are.
	var ie *elicit.InputError
	_, err = answersheet.Read(strings.NewReader("expert,question,q05,q50,q95\nAda Quell,Q1,0,02,0,06,0,15\n"), g.qs, g.experts)
	if !errors.As(err, &ie) || ie.Field != "row 2, column 6" || ie.Rule != answersheet.RuleExtra || !strings.Contains(ie.Detail, "decimal comma: write 0.06, not 0,06") {
		t.Errorf("decimal commas: %v", err)
	}
	_, err = answersheet.Read(strings.NewReader("expert,question,q05,q50,q95\nAda Quell,Q1,0.02,0.06,0.15,from the logs\n"), g.qs, g.experts)
	if !errors.As(err, &ie) || ie.Rule != answersheet.RuleExtra || strings.Contains(ie.Detail, "decimal comma") {
		t.Errorf("a reason beyond the header: %v", err)
	}
	// Lines ended by a carriage return alone, as a spreadsheet's "CSV
	// (Macintosh)" writes them, were read as one row.
	if rows, err := answersheet.Read(strings.NewReader("expert,question,q05,q50,q95\r,,,,\rAda Quell,Q1,0.02,0.06,0.15\r\"Bruno Ferrante\",Q1,0.01,0.03,0.08\r"), g.qs, g.experts); err != nil || len(rows) != 2 || rows[1].Line != 4 || rows[1].Answer.Values[2] != 0.08 {
		t.Errorf("lines ended by a carriage return: %+v %v", rows, err)
	}
	// Such a file writes a line break typed in a cell as a line feed:
	// with a reason in two paragraphs the sheet was one header row,
	// refused as "row 1, column 11: a quote mark (") inside a cell must
	// be doubled".
	mac := "expert,question,q05,q50,q95,reason\rAda Quell,Q1,0.02,0.06,0.15,\"Logs, 2019\nand \"\"2024\"\" (invented)\"\r\"Bruno Ferrante\",Q1,0.01,0.03,0.08,\r"
	if rows, err := answersheet.Read(strings.NewReader(mac), g.qs, g.experts); err != nil || len(rows) != 2 || rows[1].Line != 3 ||
		rows[0].Reason != "Logs, 2019\nand \"2024\" (invented)" || rows[1].Answer.Values[2] != 0.08 {
		t.Errorf("lines ended by a carriage return, a line feed in a cell: %+v %v", rows, err)
	}
	// A comment above the header may hold a semicolon: the header is
	// what tells a sheet's separator.
	if rows, err := answersheet.Read(strings.NewReader("# From Ada; by phone (invented)\nexpert,question,q05,q50,q95\nAda Quell,Q1,0.02,0.06,0.15\n"), g.qs, g.experts); err != nil || len(rows) != 1 || rows[0].Line != 3 {
		t.Errorf("a comment with a semicolon above the header: %+v %v", rows, err)
	}
	// A spreadsheet's "smart quotes" write O’Neil for the panel's
	// O'Neil: the same name.
	oneil := workshop.Expert{WorkshopID: g.ws.ID, Name: "Dara O'Neil (invented)"}
	if err := g.h.db.AddExpert(context.Background(), &oneil, []byte("sheet-oneil")); err != nil {
		t.Fatal(err)
	}
	if rows, err := answersheet.Read(strings.NewReader("expert,question,q05,q50,q95\nDara O\u2019Neil (invented),Q1,0.02,0.06,0.15\n"), g.qs, append(append([]workshop.Expert(nil), g.experts...), oneil)); err != nil || rows[0].Expert.ID != oneil.ID {
		t.Errorf("a name with a curly apostrophe: %+v %v", rows, err)
	}
	// A first line "sep=," (written, and hidden, by some spreadsheets)
	// names the separator: the header follows. It was refused as a
	// header naming a column "sep=". One naming semicolons is refused as
	// a sheet not separated by commas.
	for _, sep := range []string{"sep=,\n", "SEP=,\r\n", "\ufeff\"sep=,\"\r\n"} {
		rows, err := answersheet.Read(strings.NewReader(sep+"expert,question,q05,q50,q95\nAda Quell,Q1,0.02,0.06,0.15\n"), g.qs, g.experts)
		if err != nil || len(rows) != 1 || rows[0].Answer.Values[2] != 0.15 {
			t.Errorf("%q before the header: %+v %v", sep, rows, err)
		}
	}
	if _, err := answersheet.Read(strings.NewReader("sep=;\nexpert;question;q05;q50;q95\nAda Quell;Q1;0.02;0.06;0.15\n"), g.qs, g.experts); !errors.As(err, &ie) || ie.Rule != answersheet.RuleCommas {
		t.Errorf("sep=; before a header of semicolons: %v", err)
	}
	// A quantile's column written without its zero, or with a % sign,
	// is refused naming the column the workshop has.
	for h, want := range map[string]string{"q5": `"q05"`, "q5%": `"q05"`, "Q95%": `"q95"`} {
		_, err := answersheet.Read(strings.NewReader("expert,question,"+h+",q50,q95\nAda Quell,Q1,0.02,0.06,0.15\n"), g.qs, g.experts)
		if !errors.As(err, &ie) || ie.Rule != answersheet.RuleHeader || !strings.HasSuffix(ie.Detail, "; the workshop has "+want) {
			t.Errorf("header %q: %v, want it to name %s", h, err, want)
		}
	}
	if _, err := answersheet.Read(strings.NewReader("expert,question,q050,q50,q95\nAda Quell,Q1,0.02,0.06,0.15\n"), g.qs, g.experts); !errors.As(err, &ie) || strings.Contains(ie.Detail, "the workshop has") {
		t.Errorf("header q050, 5%% or 50%%: %v, want no column named", err)
	}
	// Only empty rows: no rows.
	if _, err := answersheet.Read(strings.NewReader("expert,question,q05,q50,q95\n,,,,\n"), g.qs, g.experts); !errors.As(err, &ie) || ie.Rule != answersheet.RuleEmpty {
		t.Errorf("a sheet of empty rows: %v", err)
	}
}

// Rows are named as a spreadsheet numbers them: a reason written in
// paragraphs (line breaks in its quoted cell) does not push the rows
// below it down. The bad row was named by its line in the file, row 5
// for the spreadsheet's row 3.
func TestAnswerSheetNamesRowsAsASpreadsheetDoes(t *testing.T) {
	g := newSheetRig(t)
	sheet := "expert,question,q05,q50,q95,reason\n" +
		"Ada Quell,Q1,0.02,0.06,0.15,\"Logs of 2019.\r\n\r\nAudits of 2024 (invented).\"\n" +
		"Bruno Ferrante,Q1,0.02,0.01,0.15,\n"
	_, err := answersheet.Read(strings.NewReader(sheet), g.qs, g.experts)
	var ie *elicit.InputError
	if !errors.As(err, &ie) || ie.Field != "row 3, column q50" {
		t.Fatalf("got %v, want row 3, column q50", err)
	}
	rows, err := answersheet.Read(strings.NewReader(strings.Replace(sheet, "0.02,0.01", "0.01,0.02", 1)+"ada quell,1,0.02,0.06,0.15,\n"), g.qs, g.experts)
	if !errors.As(err, &ie) || ie.Field != "row 4, column question" || !strings.Contains(ie.Detail, "also on row 2") {
		t.Fatalf("a repeated row: %v %+v", err, rows)
	}
}

// Two active experts of one name must be named by id, and the message
// says so (it said the name was on nobody's panel).
func TestAnswerSheetNamesTwoExpertsOfOneName(t *testing.T) {
	g := newSheetRig(t)
	twin := workshop.Expert{WorkshopID: g.ws.ID, Name: "Ada  quell", Affiliation: "Harbour Tanks Ltd (invented)"}
	if err := g.h.db.AddExpert(context.Background(), &twin, []byte("sheet-twin")); err != nil {
		t.Fatal(err)
	}
	experts := append(append([]workshop.Expert(nil), g.experts...), twin)
	_, err := answersheet.Read(strings.NewReader("expert,question,q05,q50,q95\nAda Quell,Q1,0.02,0.06,0.15\n"), g.qs, experts)
	var ie *elicit.InputError
	if !errors.As(err, &ie) || ie.Field != "row 2, column expert" || ie.Rule != answersheet.RuleTwoExperts {
		t.Fatalf("got %v, want row 2, column expert: %s", err, answersheet.RuleTwoExperts)
	}
	// With the ids to name them by, which no page shows.
	if want := fmt.Sprintf(`"Ada Quell" is the name of id:%d (Ada Quell), id:%d (Ada  quell, Harbour Tanks Ltd (invented))`, g.experts[0].ID, twin.ID); ie.Detail != want {
		t.Errorf("detail %q, want %q", ie.Detail, want)
	}
	rows, err := answersheet.Read(strings.NewReader("expert,question,q05,q50,q95\nid:"+strconv.FormatInt(twin.ID, 10)+",Q1,0.02,0.06,0.15\n"), g.qs, experts)
	if err != nil || rows[0].Expert.ID != twin.ID {
		t.Errorf("by id: %+v %v", rows, err)
	}
}

// Each class of bad row refuses the whole sheet, naming the row, the
// column and the rule, and nothing is written.
func TestAnswerSheetRefusals(t *testing.T) {
	g := newSheetRig(t)
	head := "expert,question,q05,q50,q95,lowest,highest,best,confidence,reason\n"
	good := "Ada Quell,Q1,0.02,0.06,0.15,,,,,\n"
	for _, c := range []struct {
		name, sheet, field string
		rule               elicit.Rule
	}{
		{"unknown expert", head + good + "Dora Nobody,Q1,0.02,0.06,0.15,,,,,\n", "row 3, column expert", answersheet.RuleExpert},
		{"unknown question", head + good + "Bruno Ferrante,Q9,0.02,0.06,0.15,,,,,\n", "row 3, column question", answersheet.RuleQuestion},
		// Ids and numbers by the rule of every id Parley reads, digits
		// only (parley import-answers --workshop +1 is refused):
		// strconv took a sign.
		{"an expert's id with a sign", head + good + "id:+2,Q1,0.02,0.06,0.15,,,,,\n", "row 3, column expert", answersheet.RuleExpert},
		{"a question's number with a sign", head + good + "Bruno Ferrante,+1,0.02,0.06,0.15,,,,,\n", "row 3, column question", answersheet.RuleQuestionForm},
		{"a question's id with a sign", head + good + "Bruno Ferrante,id:+1,0.02,0.06,0.15,,,,,\n", "row 3, column question", answersheet.RuleQuestionForm},
		{"Q and a sign", head + good + "Bruno Ferrante,Q+1,0.02,0.06,0.15,,,,,\n", "row 3, column question", answersheet.RuleQuestionForm},
		// A question cell only a guess could read; a quantity not its
		// number's (a question list copied one line out of step).
		{"a question's number with a fraction", head + good + "Bruno Ferrante,1.5,0.02,0.06,0.15,,,,,\n", "row 3, column question", answersheet.RuleQuestionForm},
		{"a question's quantity out of step", head + good + "Bruno Ferrante,Q1 coating failure share,0.02,0.06,0.15,,,,,\n", "row 3, column question", answersheet.RuleQuantity},
		{"wrong columns for the format", head + good + "Bruno Ferrante,Q1,0.02,0.06,0.15,0.1,,,,\n", "row 3, column lowest", answersheet.RuleColumn},
		{"missing column", head + good + "Bruno Ferrante,Q2,,,,0.05,0.3,,80,\n", "row 3, column best", answersheet.RuleMissing},
		{"a broken rule", head + good + "Bruno Ferrante,Q1,0.02,0.01,0.15,,,,,\n", "row 3, column q50", elicit.RuleValueIncreasing},
		{"a bad number", head + good + "Bruno Ferrante,Q1,0.02,1;5,0.15,,,,,\n", "row 3, column q50", input.RuleNumberSyntax},
		// A four-value row's judgement rules are named by the sheet's own
		// columns: its tails belong to the confidence, its values to
		// lowest, best and highest (not to the columns in sheet order).
		{"a confidence leaving no tail", head + good + "Bruno Ferrante,Q2,,,,0.05,0.3,0.1,99.9999999999999,\n", "row 3, column confidence", elicit.RuleCentralTails},
		// The confidence is read as the form reads it: 0.8 almost surely
		// means 80%, and was taken as 0.8% (a U-shaped fit, saved).
		{"a confidence typed as a fraction", head + good + "Bruno Ferrante,Q2,,,,0.05,0.3,0.1,0.8,\n", "row 3, column confidence", workshop.RuleConfidencePercent},
		{"highest too close to best", head + good + "Bruno Ferrante,Q2,,,,0.05,0.100000000002,0.100000000001,80,\n", "row 3, column highest", elicit.RuleValuesTooClose},
		{"the same expert and question twice", head + good + "ada quell,1,0.02,0.06,0.15,,,,,\n", "row 3, column question", answersheet.RuleRepeat},
		// A cell beyond the header's columns was dropped in silence: a
		// reason without its column, or a value split by a decimal comma.
		{"a value beyond the header", head + good + "Bruno Ferrante,Q1,0.02,0.06,0.15,,,,,,Tanks are old\n", "row 3, column 11", answersheet.RuleExtra},
		// A value under an empty header cell is refused, never dropped.
		{"a value under an unnamed column", "expert,question,,q05,q50,q95\nAda Quell,Q1,from the logs,0.02,0.06,0.15\n", "row 2, column 3", answersheet.RuleUnnamed},
		{"a value beyond the named columns", "expert,question,q05,q50,q95,,\nAda Quell,Q1,0.02,0.06,0.15,,from the logs\n", "row 2, column 7", answersheet.RuleExtra},
		// A spreadsheet's plain CSV in Windows-1252 (é as the byte 0xE9):
		// the name matched no expert, quoted back as "Br\xe9no".
		{"a name in Windows-1252", head + good + "Br\xe9no Ferrante,Q1,0.02,0.06,0.15,,,,,\n", "row 3, column expert", answersheet.RuleUTF8},
		{"a reason in Windows-1252", head + good + "Bruno Ferrante,Q1,0.02,0.06,0.15,,,,,caf\xe9 logs\n", "row 3, column reason", answersheet.RuleUTF8},
		{"a sheet in UTF-16", "\xff\xfee\x00x\x00p\x00e\x00r\x00t\x00\n\x00", "sheet", answersheet.RuleUTF8},
		{"an unknown header", "expert,question,q05,q50,q95,colour\n" + good, `row 1, column "colour"`, answersheet.RuleHeader},
		// Named at its row as a spreadsheet numbers it, below comments.
		{"an unknown header below comments", "# Sent by Ada (invented)\n# by phone\nexpert,question,q05,q50,q95,colour\n" + good, `row 3, column "colour"`, answersheet.RuleHeader},
		// A quote mark inside a cell of a sheet typed by hand (12" for
		// inches) is not CSV: the read of such a row panicked (the
		// reader's FieldPos asked of a row it had not returned), a 500 on
		// the page and a crash of parley import-answers.
		{"a quote mark inside a cell", head + good + "Bruno Ferrante,Q1,0.02,0.06,0.15,,,,,Pipes of 12\" bore\n", "row 3, column reason", answersheet.RuleQuote},
		{"text after a quoted cell", head + good + "Bruno Ferrante,Q1,0.02,0.06,0.15,,,,,\"Logs\" of 2019\n", "row 3, column reason", answersheet.RuleQuote},
		{"a quote mark in a name, below a reason in paragraphs", head + "Ada Quell,Q1,0.02,0.06,0.15,,,,,\"Logs.\n\nAudits.\"\n" + "Bruno \"B\" Ferrante,Q1,0.02,0.06,0.15,,,,,\n", "row 3, column expert", answersheet.RuleQuote},
		// A spreadsheet set to a decimal comma writes semicolons between
		// columns; the whole header was quoted back as one unknown column.
		{"semicolons between columns", "expert;question;q05;q50;q95\nAda Quell;Q1;0,02;0,06;0,15\n", "sheet", answersheet.RuleCommas},
		// As a spreadsheet writes it with every text cell in quote marks,
		// which CSV's rule of quote marks refused first.
		{"semicolons between quoted columns", "\ufeff\"expert\";\"question\";\"q05\";\"q50\";\"q95\"\r\n\"Ada Quell\";\"Q1\";\"0,02\";\"0,06\";\"0,15\"\r\n", "sheet", answersheet.RuleCommas},
		{"semicolons below a comment", "# Sent by Ada; invented\n\nexpert;question;q05;q50;q95\nAda Quell;Q1;0,02;0,06;0,15\n", "sheet", answersheet.RuleCommas},
		{"tabs between columns", "expert\tquestion\tq05\tq50\tq95\nAda Quell\tQ1\t0.02\t0.06\t0.15\n", "sheet", answersheet.RuleCommas},
		{"a revealed calibration question", head + good + "Bruno Ferrante,Q5,0.1,0.2,0.3,,,,,\n", "row 3, column question", answersheet.RuleQuestion},
	} {
		t.Run(c.name, func(t *testing.T) {
			if c.name == "a revealed calibration question" {
				if err := g.h.db.SetTrueValue(context.Background(), g.qs[4].ID, 0.2, true, "shown"); err != nil {
					t.Fatal(err)
				}
				qs, _ := g.h.db.Questions(context.Background(), g.ws.ID)
				g.qs = qs
			}
			_, err := answersheet.Read(strings.NewReader(c.sheet), g.qs, g.experts)
			var ie *elicit.InputError
			if !errors.As(err, &ie) || ie.Field != c.field || (c.rule != input.RuleNumberSyntax && ie.Rule != c.rule) {
				t.Fatalf("got %v, want %s: %s", err, c.field, c.rule)
			}
			// Through the web upload too: 422, the message, nothing saved.
			r, body := g.h.post(sheetPath(g.ws.ID), url.Values{"sheet": {c.sheet}, "channel": {"file"}})
			if r.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, html.EscapeString(c.field)) {
				t.Errorf("upload: %d, want 422 naming %s", r.StatusCode, c.field)
			}
			if n := len(g.revisions(t)); n != 0 {
				t.Fatalf("%d revisions written by a refused sheet", n)
			}
		})
	}
	// A row for an expert whose link was revoked, or for a retired
	// question, says so: "names no active expert" sent the facilitator
	// looking for a misspelt name.
	ctx := context.Background()
	if err := g.h.db.RevokeExpert(ctx, g.experts[1].ID, "invented: left the panel"); err != nil {
		t.Fatal(err)
	}
	if err := g.h.db.SetQuestionRetired(ctx, g.qs[3].ID, true, "invented: asked twice"); err != nil {
		t.Fatal(err)
	}
	qs, _ := g.h.db.Questions(ctx, g.ws.ID)
	es, _ := g.h.db.Experts(ctx, g.ws.ID)
	for _, c := range []struct{ sheet, field, detail string }{
		{head + good + " bruno ferrante ,Q1,0.02,0.06,0.15,,,,,\n", "row 3, column expert", "Bruno Ferrante's link was revoked"},
		{head + good + "id:" + strconv.FormatInt(g.experts[1].ID, 10) + ",Q1,0.02,0.06,0.15,,,,,\n", "row 3, column expert", "Bruno Ferrante's link was revoked"},
		{head + good + "Chiara Osei,Q4,0.02,0.06,0.15,,,,,\n", "row 3, column question", "Q4 is retired"},
	} {
		_, err := answersheet.Read(strings.NewReader(c.sheet), qs, es)
		var ie *elicit.InputError
		if !errors.As(err, &ie) || ie.Field != c.field || !strings.Contains(ie.Detail, c.detail) {
			t.Errorf("%q: got %v, want %s: … %s", c.sheet, err, c.field, c.detail)
		}
		if r, body := g.h.post(sheetPath(g.ws.ID), url.Values{"sheet": {c.sheet}, "channel": {"file"}}); r.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, html.EscapeString(c.detail)) {
			t.Errorf("upload: %d, want 422 saying %s", r.StatusCode, c.detail)
		}
	}
	if n := len(g.revisions(t)); n != 0 {
		t.Fatalf("%d revisions written by a refused sheet", n)
	}
	// A closed round refuses the sheet at its first row.
	if err := g.h.db.SetRound(context.Background(), g.ws.ID, 1, false, ""); err != nil {
		t.Fatal(err)
	}
	r, body := g.h.post(sheetPath(g.ws.ID), url.Values{"sheet": {head + good}})
	if r.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, "row 2, column question") || !strings.Contains(body, html.EscapeString(string(answersheet.RuleRound))) {
		t.Errorf("closed round: %d", r.StatusCode)
	}
}

// The upload previews every row with its fit, saves nothing until
// confirmed, and then saves exactly what the preview showed, as the
// facilitator's entries from the chosen channel.
func TestSheetUploadPreviewThenSave(t *testing.T) {
	g := newSheetRig(t)
	var buf bytes.Buffer
	mw := multipart.NewWriter(&buf)
	fw, _ := mw.CreateFormFile("file", "answers.csv")
	fw.Write([]byte(goodSheet))
	mw.WriteField("channel", "message")
	mw.Close()
	req, _ := http.NewRequest(http.MethodPost, g.h.ts.URL+sheetPath(g.ws.ID), &buf)
	req.Header.Set("Content-Type", mw.FormDataContentType())
	req.Header.Set("Origin", g.h.ts.URL)
	r, body := g.h.do(req)
	if r.StatusCode != http.StatusOK || !strings.Contains(body, "Nothing is saved yet") {
		t.Fatalf("preview: %d %s", r.StatusCode, body)
	}
	if n := len(g.revisions(t)); n != 0 {
		t.Fatalf("the preview saved %d revisions", n)
	}
	previewed := regexp.MustCompile(`<td data-label="Fitted Beta"><span class="nowrap">Beta\(([^)]*)\)</span></td>`).FindAllStringSubmatch(body, -1)
	key := regexp.MustCompile(`name="key" value="([0-9a-f]+)"`).FindStringSubmatch(body)
	if len(previewed) != 5 || key == nil {
		t.Fatalf("preview rows %d, key %v", len(previewed), key)
	}
	if r, _ := g.h.post(sheetPath(g.ws.ID)+"/confirm", url.Values{"key": {key[1]}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("confirm: %d", r.StatusCode)
	}
	revs := g.revisions(t)
	if len(revs) != 5 {
		t.Fatalf("%d revisions saved, want 5", len(revs))
	}
	byID := map[int64]workshop.Question{}
	for _, q := range g.qs {
		byID[q.ID] = q
	}
	for i, rv := range revs {
		if rv.EnteredBy != workshop.ByFacilitator || rv.Channel != workshop.ChannelMessage {
			t.Errorf("revision %d provenance %q %q", i, rv.EnteredBy, rv.Channel)
		}
		fit, err := byID[rv.QuestionID].Fit(rv.Answer)
		if err != nil {
			t.Fatal(err)
		}
		if got := fv(fit.Dist.Alpha) + ", " + fv(fit.Dist.Beta.Beta); got != previewed[i][1] {
			t.Errorf("row %d: previewed Beta(%s), saved Beta(%s)", i, previewed[i][1], got)
		}
	}
	// The key is spent: confirming again saves nothing and goes where
	// the first confirmation went (not "upload it again", which would).
	if r, _ := g.h.post(sheetPath(g.ws.ID)+"/confirm", url.Values{"key": {key[1]}}); r.StatusCode != http.StatusSeeOther {
		t.Errorf("confirming twice: %d", r.StatusCode)
	}
	if len(g.revisions(t)) != 5 {
		t.Fatal("a second confirmation saved again")
	}
}

// A confirmation sent several times at once (a double click on a slow
// save, a replayed request) saves the sheet once. Each copy used to read
// the kept sheet before the first had saved it, and each saved every row.
func TestSheetConfirmedTwiceAtOnceSavesOnce(t *testing.T) {
	g := newSheetRig(t)
	r, body := g.h.post(sheetPath(g.ws.ID), url.Values{"sheet": {goodSheet}, "channel": {"paper_form"}})
	key := regexp.MustCompile(`name="key" value="([0-9a-f]+)"`).FindStringSubmatch(body)
	if r.StatusCode != http.StatusOK || key == nil {
		t.Fatalf("preview: %d, key %v", r.StatusCode, key)
	}
	const copies = 8
	start := make(chan struct{})
	codes := make(chan int, copies)
	for range copies {
		go func() {
			<-start
			req, _ := http.NewRequest(http.MethodPost, g.h.ts.URL+sheetPath(g.ws.ID)+"/confirm", strings.NewReader(url.Values{"key": {key[1]}}.Encode()))
			req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
			req.Header.Set("Origin", g.h.ts.URL)
			res, err := g.h.client.Do(req)
			if err != nil {
				codes <- 0
				return
			}
			res.Body.Close()
			codes <- res.StatusCode
		}()
	}
	close(start)
	for range copies {
		if c := <-codes; c != http.StatusSeeOther {
			t.Errorf("a confirmation answered %d", c)
		}
	}
	if n := len(g.revisions(t)); n != 5 {
		t.Fatalf("%d revisions saved by %d copies of one confirmation, want the sheet's 5", n, copies)
	}
}

// A rule's field lands beside the input of that name only when the
// question's form shows it; any other goes to the form as a whole, so no
// message is set where the expert cannot see it.
func TestAnswerFieldIsOneTheFormShows(t *testing.T) {
	quant := workshop.Question{Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95}}
	four := workshop.Question{Format: workshop.FormatInterval}
	chips := workshop.Question{Format: workshop.FormatChips, BinEdges: []float64{0, 0.2, 0.5, 1}}
	for _, c := range []struct {
		q           workshop.Question
		field, want string
	}{
		{quant, "values[2]", "values[2]"},
		{quant, "values[3]", ""},
		{quant, "probs[0]", ""},
		{quant, "lowest", ""},
		{four, "confidence", "confidence"},
		{four, "highest", "highest"},
		{four, "values[1]", ""},
		{four, "probs[0]", ""},
		{chips, "counts[2]", "counts[2]"},
		{chips, "counts[3]", ""},
		{chips, "counts", ""},
	} {
		if got := answerField(c.q, c.field); got != c.want {
			t.Errorf("%s form, field %q: %q, want %q", c.q.Format, c.field, got, c.want)
		}
	}
}

// A value in a sheet may carry a % sign on a proportion, as on the
// expert's form, and the answer is then kept as typed in percent; on a
// question that is not a proportion the sign is refused, naming the
// column.
func TestAnswerSheetTakesPercentagesAsTheFormDoes(t *testing.T) {
	g := newSheetRig(t)
	sheet := "expert,question,q05,q50,q95,lowest,highest,best,confidence\n" +
		"Ada Quell,Q1,1%,4%,12%,,,,\n" +
		"Ada Quell,Q2,,,,5%,30%,12%,80%\n"
	rows, err := answersheet.Read(strings.NewReader(sheet), g.qs, g.experts)
	if err != nil {
		t.Fatal(err)
	}
	if a := rows[0].Answer; !a.Percent || a.Values[0] != 0.01 || a.Values[2] != 0.12 {
		t.Errorf("quantiles in percent read as %+v", a)
	}
	if a := rows[1].Answer; !a.Percent || a.Lowest != 0.05 || a.Best != 0.12 || a.Confidence != 0.8 {
		t.Errorf("interval in percent read as %+v", a)
	}
	// Mixed: kept as decimals, each value read as typed.
	rows, err = answersheet.Read(strings.NewReader("expert,question,q05,q50,q95\nAda Quell,Q1,0.01,4%,0.12\n"), g.qs, g.experts)
	if err != nil || rows[0].Answer.Percent || rows[0].Answer.Values[1] != 0.04 {
		t.Errorf("mixed row: %+v %v", rows, err)
	}
	days := workshop.Question{ID: 9999, WorkshopID: g.ws.ID, Position: len(g.qs) + 1, Wording: "Days to repair a tank? (invented)",
		Quantity: "repair time", Units: "days", Lower: 0, Upper: 60, Format: workshop.FormatQuantiles, Probs: workshop.ProbsDefault}
	qs := append(append([]workshop.Question(nil), g.qs...), days)
	_, err = answersheet.Read(strings.NewReader("expert,question,q05,q50,q95\nAda Quell,Q"+strconv.Itoa(days.Position)+",10,20%,30\n"), qs, g.experts)
	var ie *elicit.InputError
	if !errors.As(err, &ie) || !strings.Contains(ie.Field, "row 2, column q50") || ie.Rule != workshop.RulePercentHere {
		t.Errorf("%% on a question off [0, 1]: %v", err)
	}
}

// A sheet over 1 MiB is refused beside the file field when its form
// arrives whole, and with the sheet's own limit when the body is larger
// still. It answered a bare 413 saying "256 KiB", the limit of other
// forms.
func TestSheetUploadOverItsLimit(t *testing.T) {
	g := newSheetRig(t)
	upload := func(size int) (*http.Response, string) {
		var buf bytes.Buffer
		mw := multipart.NewWriter(&buf)
		fw, _ := mw.CreateFormFile("file", "answers.csv")
		fw.Write([]byte(goodSheet))
		fw.Write([]byte(strings.Repeat("#", size-len(goodSheet)) + "\n"))
		mw.WriteField("channel", "message")
		mw.Close()
		req, _ := http.NewRequest(http.MethodPost, g.h.ts.URL+sheetPath(g.ws.ID), &buf)
		req.Header.Set("Content-Type", mw.FormDataContentType())
		req.Header.Set("Origin", g.h.ts.URL)
		return g.h.do(req)
	}
	r, body := upload(answersheet.MaxBytes + 1000)
	if r.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, "at most 1 MiB") || !strings.Contains(body, `name="file"`) {
		t.Errorf("a file of 1 MiB + 1000 bytes: %d, want 422 with the form and the limit beside the file:\n%.600s", r.StatusCode, body)
	}
	r, body = upload(2 << 20)
	if r.StatusCode != http.StatusRequestEntityTooLarge || !strings.Contains(body, "at most 1 MiB") || strings.Contains(body, "256 KiB") {
		t.Errorf("a file of 2 MiB: %d %q, want 413 naming the sheet's limit", r.StatusCode, body)
	}
	if n := len(g.revisions(t)); n != 0 {
		t.Fatalf("refused uploads saved %d revisions", n)
	}
}

// A malformed upload (a body cut short, which only a broken client sends)
// is refused with words for the facilitator, not Go's "multipart:
// NextPart: EOF", and nothing is saved.
func TestMalformedUploadIsRefusedInWords(t *testing.T) {
	g := newSheetRig(t)
	var buf bytes.Buffer
	mw := multipart.NewWriter(&buf)
	fw, _ := mw.CreateFormFile("file", "answers.csv")
	fw.Write([]byte(goodSheet))
	body := buf.String() // no closing boundary: cut short
	req, _ := http.NewRequest(http.MethodPost, g.h.ts.URL+sheetPath(g.ws.ID), strings.NewReader(body))
	req.Header.Set("Content-Type", mw.FormDataContentType())
	req.Header.Set("Origin", g.h.ts.URL)
	r, got := g.h.do(req)
	if r.StatusCode != http.StatusBadRequest || strings.Contains(got, "multipart:") || !strings.Contains(got, "Nothing was saved") {
		t.Errorf("a cut-short upload: %d %q", r.StatusCode, got)
	}
	if n := len(g.revisions(t)); n != 0 {
		t.Fatalf("a malformed upload saved %d revisions", n)
	}
}

// A sheet is saved whole or not at all: when the store refuses a later
// row (its expert revoked after the sheet was read), the rows before it
// are not kept either, and the refusal names the row. Saving the rows one
// transaction each kept the first.
func TestSheetSaveIsAllOrNothingInTheStore(t *testing.T) {
	g := newSheetRig(t)
	ctx := context.Background()
	rows, err := answersheet.Read(strings.NewReader("expert,question,q05,q50,q95\n"+
		"Ada Quell,Q1,0.02,0.06,0.15\nChiara Osei,Q1,0.01,0.03,0.08\nBruno Ferrante,Q1,0.03,0.07,0.2\n"), g.qs, g.experts)
	if err != nil {
		t.Fatal(err)
	}
	if err := g.h.db.RevokeExpert(ctx, g.experts[1].ID, "invented: left the panel"); err != nil {
		t.Fatal(err)
	}
	err = SaveSheet(ctx, g.h.db, g.ws, rows, workshop.ChannelFile, answersheet.File{Text: "invented"})
	var ie *elicit.InputError
	if !errors.As(err, &ie) || ie.Field != "row 4, column expert" || ie.Rule != answersheet.RuleExpert {
		t.Fatalf("got %v, want row 4, column expert: %s", err, answersheet.RuleExpert)
	}
	if revs := g.revisions(t); len(revs) != 0 {
		t.Fatalf("%d revisions kept from a refused sheet: %+v", len(revs), revs)
	}
	// Nor is the import recorded in the decision log.
	evs, err := g.h.db.Events(ctx, g.ws.ID)
	if err != nil {
		t.Fatal(err)
	}
	for _, ev := range evs {
		if ev.Kind == workshop.EventAnswersImported {
			t.Fatalf("a refused sheet's import was recorded: %+v", ev)
		}
	}
}

// TestPercentIsKeptAsTyped: a percentage typed in a sheet is stored as
// the typed decimal over 100, as on the form (workshop's
// TestPercentIsKeptAsTyped), so 28.81% is 0.2881 in the record.
func TestPercentIsKeptAsTyped(t *testing.T) {
	g := newSheetRig(t)
	sheet := "expert,question,q05,q50,q95\nAda Quell,Q1,2.5%,28.81%,60.07%\n"
	rows, err := answersheet.Read(strings.NewReader(sheet), g.qs, g.experts)
	if err != nil {
		t.Fatal(err)
	}
	if v := rows[0].Answer.Values; v[0] != 0.025 || v[1] != 0.2881 || v[2] != 0.6007 {
		t.Errorf("sheet read %v, want [0.025 0.2881 0.6007]", v)
	}
}

// An upload that sends the file, or a field, twice is refused as every
// form's repeated field is (400, nothing read or saved); a second file
// was ignored in silence.
func TestSheetUploadFieldSentTwice(t *testing.T) {
	g := newSheetRig(t)
	upload := func(files int, channels ...string) (*http.Response, string) {
		var buf bytes.Buffer
		mw := multipart.NewWriter(&buf)
		for i := 0; i < files; i++ {
			fw, _ := mw.CreateFormFile("file", "answers.csv")
			fw.Write([]byte(goodSheet))
		}
		for _, c := range channels {
			mw.WriteField("channel", c)
		}
		mw.Close()
		req, _ := http.NewRequest(http.MethodPost, g.h.ts.URL+sheetPath(g.ws.ID), &buf)
		req.Header.Set("Content-Type", mw.FormDataContentType())
		req.Header.Set("Origin", g.h.ts.URL)
		return g.h.do(req)
	}
	if r, body := upload(1, "message"); r.StatusCode != http.StatusOK {
		t.Fatalf("one file: %d %.300s", r.StatusCode, body)
	}
	for _, c := range []struct {
		name   string
		files  int
		fields []string
	}{{"two files", 2, []string{"message"}}, {"two channels", 1, []string{"message", "phone"}}} {
		r, body := upload(c.files, c.fields...)
		if r.StatusCode != http.StatusBadRequest || !strings.Contains(body, "takes one value, got 2") {
			t.Errorf("%s: %d %q, want 400 naming the field", c.name, r.StatusCode, body)
		}
	}
	if n := len(g.revisions(t)); n != 0 {
		t.Fatalf("%d revisions saved", n)
	}
}

// Probabilities a question may ask (workshop.MinProbGap apart) never share
// a label on the expert's form: the label of p differs from that of the
// nearest probability the rule allows above it, typed to a millionth,
// across (0, 1); labels rise with p, so any wider gap differs too.
func TestProbabilitiesAQuestionMayAskHaveTheirOwnLabels(t *testing.T) {
	for i := 1; i+1000 < 1_000_000; i++ {
		p, q := float64(i)/1e6, float64(i+1000)/1e6
		if err := (workshop.Question{Wording: "w", Quantity: "q", Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: []float64{p, q}}).Validate(); err != nil {
			t.Fatalf("%v and %v refused: %v", p, q, err)
		}
		if a, b := chart.FormatPercent(p), chart.FormatPercent(q); a == b {
			t.Fatalf("%v and %v are both labelled %q", p, q, a)
		}
	}
}

// A refused sheet is said at the top of the page, above the columns'
// help: below it the refusal lay under the fold on a projector and on a
// phone, and the page looked as it had before the sheet was sent.
func TestSheetRefusalIsSaidFirst(t *testing.T) {
	g := newSheetRig(t)
	r, body := g.h.post(sheetPath(g.ws.ID), url.Values{"sheet": {"expert,question,q05,q50,q95\nNobody Known (invented),Q1,0.01,0.04,0.1\n"}, "channel": {"message"}})
	if r.StatusCode != http.StatusUnprocessableEntity {
		t.Fatalf("a sheet naming no expert: %d", r.StatusCode)
	}
	refusal, help := strings.Index(body, "row 2, column expert"), strings.Index(body, "This workshop's columns")
	if refusal < 0 || help < 0 || refusal > help {
		t.Errorf("the refusal is at %d, the columns' help at %d: want the refusal first", refusal, help)
	}
	if n := strings.Count(body, "row 2, column expert"); n != 1 {
		t.Errorf("the refusal is said %d times", n)
	}
	// So is a refusal of the sheet as a whole, pasted or sent as a file:
	// it was set beside the paste box, empty when the sheet came as a
	// file, below the columns' help and under "Correct the marked
	// fields".
	for _, c := range []struct{ name, sheet, said string }{
		{"semicolons", "expert;question;q05;q50;q95\nAda Quell;Q1;0,01;0,04;0,1\n", "The sheet must separate its columns with commas"},
		{"UTF-16", "\xff\xfee\x00x\x00p\x00", "The sheet must be saved as UTF-8"},
		{"no rows", "expert,question,q05,q50,q95\n,,,,\n", "The sheet has no rows."},
	} {
		for _, asFile := range []bool{false, true} {
			var buf bytes.Buffer
			mw := multipart.NewWriter(&buf)
			fw, _ := mw.CreateFormFile("file", "answers.csv")
			sheet := c.sheet
			if asFile {
				fw.Write([]byte(c.sheet))
				sheet = ""
			}
			mw.WriteField("sheet", sheet)
			mw.WriteField("channel", "file")
			mw.Close()
			req, _ := http.NewRequest(http.MethodPost, g.h.ts.URL+sheetPath(g.ws.ID), &buf)
			req.Header.Set("Content-Type", mw.FormDataContentType())
			req.Header.Set("Origin", g.h.ts.URL)
			r, body := g.h.do(req)
			said, help := strings.Index(body, html.EscapeString(c.said)), strings.Index(body, "This workshop's columns")
			if r.StatusCode != http.StatusUnprocessableEntity || said < 0 || help < 0 || said > help || strings.Contains(body, "Correct the marked fields") {
				t.Errorf("%s (as a file: %v): %d, the refusal at %d, the columns' help at %d: want 422 and the refusal first, no marked field", c.name, asFile, r.StatusCode, said, help)
			}
		}
	}
}

// A row typed in percentages has its warnings' values in percentages, as
// its Stated column writes them: a tail miss beyond a 95% value typed as
// 9% says "above 9%", where the warning said "above 0.09" beside the
// row's "95%:\u00a09%". A row typed in decimals keeps its decimals.
func TestSheetPreviewWarningsWriteValuesAsTyped(t *testing.T) {
	g := newSheetRig(t)
	sheet := "expert,question,q05,q50,q95\nAda Quell,Q1,1%,3%,9%\nBruno Ferrante,Q1,0.01,0.03,0.09\n"
	r, body := g.h.post(sheetPath(g.ws.ID), url.Values{"sheet": {sheet}, "channel": {"paper_form"}})
	if r.StatusCode != http.StatusOK {
		t.Fatalf("preview: %d", r.StatusCode)
	}
	rows := strings.Split(body[strings.Index(body, `id="sheet-rows"`):], "<tr>")
	if len(rows) < 4 {
		t.Fatalf("the preview has %d rows", len(rows)-2)
	}
	ada, bruno := rows[2], rows[3]
	if !strings.Contains(ada, "95%:\u00a09%") || !strings.Contains(ada, "of the chance above 9%, where the expert put 5%") || strings.Contains(ada, "0.09") {
		t.Errorf("the row typed in percentages: %s", ada)
	}
	if !strings.Contains(bruno, "95%:\u00a00.09") || !strings.Contains(bruno, "of the chance above 0.09, where the expert put 5%") {
		t.Errorf("the row typed in decimals: %s", bruno)
	}
}

// The question's panel and the report write a tail miss's value as the
// answer was typed too: "above 9%" in the panel's warning and the
// report's table of outer values missed, beside the stated "95%: 9%";
// both said 0.09. The report's final judgements write the answer as its
// revision history does, "95%: 9%", where they said "95%: 0.09".
func TestPanelAndReportWriteATailMissAsTyped(t *testing.T) {
	g := newSheetRig(t)
	ctx := context.Background()
	q := g.qs[0]
	for i, percent := range []bool{true, false} {
		rv := workshop.Revision{QuestionID: q.ID, ExpertID: g.experts[i].ID, Answer: workshop.Answer{Values: []float64{0.01, 0.03, 0.09}, Percent: percent}}
		if err := g.h.db.SaveRevision(ctx, &rv); err != nil {
			t.Fatal(err)
		}
	}
	_, panel := g.h.get(questionPath(g.ws.ID, q.ID))
	_, report := g.h.get(workshopPath(g.ws.ID) + "/report")
	// The fit's 5%, 50% and 95% points beside each answer, in its terms:
	// the percentages' fit as percentages, as the expert's own history
	// writes it ("median 3.1%"), the decimals' as decimals.
	fit, err := q.Fit(workshop.Answer{Values: []float64{0.01, 0.03, 0.09}})
	if err != nil {
		t.Fatal(err)
	}
	inPct, inDec := make([]string, 3), make([]string, 3)
	for i, x := range fit.Percentiles {
		inPct[i], inDec[i] = chart.FormatWithin(x, 0, 1, true), chart.FormatWithin(x, 0, 1, false)
	}
	if !strings.HasSuffix(inPct[2], "%") || strings.HasSuffix(inDec[2], "%") {
		t.Fatalf("fitted 95%% point %q as a percentage, %q as a decimal", inPct[2], inDec[2])
	}
	panelCells := func(vs []string) string {
		return `<td class="num" data-label="5%">` + vs[0] + `</td><td class="num" data-label="50%">` + vs[1] + `</td><td class="num" data-label="95%">` + vs[2] + `</td>`
	}
	reportCells := func(vs []string) string { return "<td>" + strings.Join(vs, "</td><td>") + "</td>" }
	for _, c := range []struct{ page, body, typed, decimal string }{
		{"panel's fitted points", panel, panelCells(inPct), panelCells(inDec)},
		{"report's fitted points", report, reportCells(inPct), reportCells(inDec)},
		{"panel", panel, "of the chance above 9%, where the expert put 5%", "of the chance above 0.09, where the expert put 5%"},
		{"report", report, "<td>Ada Quell</td><td>above 9%</td>", "<td>Bruno Ferrante</td><td>above 0.09</td>"},
		// The report's table of final judgements, above its warnings.
		{"report's final judgements", report, "<td>5%:\u00a01%; 50%:\u00a03%; 95%:\u00a09%</td>", "<td>5%:\u00a00.01; 50%:\u00a00.03; 95%:\u00a00.09</td>"},
	} {
		if !strings.Contains(c.body, c.typed) {
			t.Errorf("%s: the answer typed in percentages lacks %q", c.page, c.typed)
		}
		if !strings.Contains(c.body, c.decimal) {
			t.Errorf("%s: the answer typed in decimals lacks %q", c.page, c.decimal)
		}
		if n := strings.Count(c.body, "above 0.09"); n != 1 {
			t.Errorf("%s: \"above 0.09\" %d times, want once (the decimal answer's)", c.page, n)
		}
		if n := strings.Count(c.body, "95%:\u00a00.09"); strings.HasPrefix(c.page, "report") && n != 2 {
			t.Errorf("%s: \"95%%: 0.09\" %d times, want twice (the decimal answer's, in the history and the final judgements)", c.page, n)
		}
	}
}

// A fit that meets its stated points exactly, as a Beta meets any two,
// misses them by rounding (1.8e-15): the panel's table of fits and the
// report's final judgements say its largest probability gap is less than
// 0.000001, not "1.832e-15", a difference to be weighed at a projector.
// A gap above the floor keeps its four figures in plain decimals.
func TestAnExactFitsGapReadsAsNone(t *testing.T) {
	for gap, want := range map[float64]string{1.832e-15: "less than 0.000001", 0: "less than 0.000001", 0.00001234: "0.00001234",
		0.004361: "0.004361", 0.05000004: "0.05000004", 0.3: "0.3"} {
		if got := probGap(gap); got != want {
			t.Errorf("probGap(%v) = %q, want %q", gap, got, want)
		}
	}
	if got := singleBetaReportGap(3e-9); got != "less than 0.000001 from the pool's CDF" {
		t.Errorf("singleBetaReportGap(3e-9) = %q", got)
	}
	g := newSheetRig(t)
	ctx := context.Background()
	q := workshop.Question{WorkshopID: g.ws.ID, Wording: "Share of tanks needing a new gasket?", Quantity: "gasket share", Lower: 0, Upper: 1,
		Format: workshop.FormatQuantiles, Probs: []float64{0.5, 0.9}}
	if err := g.h.db.AddQuestion(ctx, &q); err != nil {
		t.Fatal(err)
	}
	for i, vs := range [][]float64{{0.04, 0.12}, {0.1, 0.2}} {
		rv := workshop.Revision{QuestionID: q.ID, ExpertID: g.experts[i].ID, Answer: workshop.Answer{Values: vs}}
		if err := g.h.db.SaveRevision(ctx, &rv); err != nil {
			t.Fatal(err)
		}
		f, err := q.Fit(rv.Answer)
		if err != nil {
			t.Fatal(err)
		}
		if f.MaxProbError >= gapFloor {
			t.Fatalf("%v fits with a gap of %g, not exactly", vs, f.MaxProbError)
		}
	}
	_, panel := g.h.get(questionPath(g.ws.ID, q.ID))
	_, report := g.h.get(workshopPath(g.ws.ID) + "/report")
	for _, c := range []struct{ page, body, want string }{
		{"panel", panel, `<td class="num" data-label="Largest probability gap">less than 0.000001</td>`},
		{"report", reportSection(t, report, q.ID), "<td>less than 0.000001</td>"},
	} {
		if n := strings.Count(c.body, c.want); n != 2 {
			t.Errorf("%s: %q %d times, want twice (each expert's exact fit)", c.page, c.want, n)
		}
		if m := regexp.MustCompile(`>[0-9.]+e-[0-9]+<`).FindString(c.body); m != "" {
			t.Errorf("%s: a gap written with an exponent: %s", c.page, m)
		}
	}
}

// The upload page says what file to save before one is refused: a
// spreadsheet in a decimal-comma locale saves semicolons and decimal
// commas, and its plain CSV is often not UTF-8; each is refused, and the
// page said nothing of them until then.
func TestSheetPageSaysWhatFileToSave(t *testing.T) {
	g := newSheetRig(t)
	r, body := g.h.get(sheetPath(g.ws.ID))
	if r.StatusCode != http.StatusOK {
		t.Fatalf("upload page: %d", r.StatusCode)
	}
	for _, want := range []string{"<strong>CSV UTF-8</strong>", "commas between the columns and a point for decimals (0.05, not 0,05)", "as a percentage (5%)"} {
		if !strings.Contains(body, want) {
			t.Errorf("the upload page does not say %q", want)
		}
	}
}

// An answer the expert saves between the sheet's preview and its
// confirmation is not put behind the sheet's row in silence: the
// confirmation saves nothing and shows the preview again, the row now
// following the expert's own answer, under a new key. Confirmed, the
// row became the expert's current answer over the one they had just
// saved, which the preview had never shown.
func TestSheetConfirmMeetsAnAnswerSavedMeanwhile(t *testing.T) {
	g := newSheetRig(t)
	sheet := "expert,question,q05,q50,q95\nAda Quell,Q1,0.02,0.06,0.15\nBruno Ferrante,Q1,0.01,0.03,0.08\n"
	r, body := g.h.post(sheetPath(g.ws.ID), url.Values{"sheet": {sheet}, "channel": {"paper_form"}})
	key := regexp.MustCompile(`name="key" value="([0-9a-f]+)"`).FindStringSubmatch(body)
	if r.StatusCode != http.StatusOK || key == nil || strings.Contains(body, "own answer") {
		t.Fatalf("preview: %d, key %v", r.StatusCode, key)
	}
	own := workshop.Revision{QuestionID: g.qs[0].ID, ExpertID: g.experts[0].ID, Answer: workshop.Answer{Values: []float64{0.05, 0.1, 0.2}}}
	if err := g.h.db.SaveRevision(context.Background(), &own); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{key[1], key[1]} { // and sent again
		r, body = g.h.post(sheetPath(g.ws.ID)+"/confirm", url.Values{"key": {k}})
		if r.StatusCode != http.StatusConflict || !strings.Contains(body, "Nothing was saved: an answer was saved since you checked the sheet.") ||
			!strings.Contains(body, "Row 2: Ada Quell saved their own answer to Q1 at ") || strings.Contains(body, "Row 3") ||
			!strings.Contains(body, html.EscapeString("Ada Quell's own answer of ")) {
			t.Fatalf("confirmed after Ada's own answer: %d\n%s", r.StatusCode, body)
		}
		if revs := g.revisions(t); len(revs) != 1 {
			t.Fatalf("%d revisions, want Ada's own only", len(revs))
		}
	}
	again := regexp.MustCompile(`name="key" value="([0-9a-f]+)"`).FindStringSubmatch(body)
	if again == nil || again[1] == key[1] {
		t.Fatalf("the preview shown again has key %v, the first was %s", again, key[1])
	}
	if r, _ := g.h.post(sheetPath(g.ws.ID)+"/confirm", url.Values{"key": {again[1]}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("confirming the preview as it now reads: %d", r.StatusCode)
	}
	if revs := g.revisions(t); len(revs) != 3 {
		t.Fatalf("%d revisions, want Ada's own and the sheet's two", len(revs))
	}
}

// A file whose name the record cannot carry (an invisible text-direction
// override, U+202E) is refused beside the file field, through the upload
// and parley import-answers' --in alike, and nothing is saved: it was
// saved, and the workshop's exported record was then refused by its own
// import ("revisions[0].sheet.file: must be plain text").
func TestSheetFileNameTheRecordCanCarry(t *testing.T) {
	g := newSheetRig(t)
	upload := func(name string) (*http.Response, string) {
		var buf bytes.Buffer
		mw := multipart.NewWriter(&buf)
		fw, _ := mw.CreateFormFile("file", name)
		fw.Write([]byte("expert,question,q05,q50,q95\nAda Quell,Q1,0.02,0.06,0.15\n"))
		mw.WriteField("channel", "message")
		mw.Close()
		req, _ := http.NewRequest(http.MethodPost, g.h.ts.URL+sheetPath(g.ws.ID), &buf)
		req.Header.Set("Content-Type", mw.FormDataContentType())
		req.Header.Set("Origin", g.h.ts.URL)
		return g.h.do(req)
	}
	r, body := upload("answers\u202evsc.csv")
	if r.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, "the file&#39;s name must be plain text") || !strings.Contains(body, "U+202E") || strings.Contains(body, `name="key"`) {
		t.Errorf("a name with a text-direction override: %d\n%s", r.StatusCode, body)
	}
	if n := len(g.revisions(t)); n != 0 {
		t.Fatalf("%d revisions saved", n)
	}
	// A name in any letters is kept, and the record imports back.
	r, body = upload("réponses Ω 答案.csv")
	key := regexp.MustCompile(`name="key" value="([0-9a-f]+)"`).FindStringSubmatch(body)
	if r.StatusCode != http.StatusOK || key == nil {
		t.Fatalf("a name in other letters: %d", r.StatusCode)
	}
	if r, _ := g.h.post(sheetPath(g.ws.ID)+"/confirm", url.Values{"key": {key[1]}}); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("confirm: %d", r.StatusCode)
	}
	_, rec := g.h.get(workshopPath(g.ws.ID) + "/export.json")
	if _, err := record.ParseChecked(strings.NewReader(rec)); err != nil || !strings.Contains(rec, "réponses Ω 答案.csv") {
		t.Errorf("the record of a sheet named in other letters: %v", err)
	}
}

// The question cell as a practitioner's sheet carries it, uploaded: 1.0
// as a spreadsheet writes the number 1, Question 2 as the expert's page
// writes it, and the overview's "Q4 valve leak share"; each row saved
// against its question.
func TestAnswerSheetQuestionAsSheetsWriteIt(t *testing.T) {
	g := newSheetRig(t)
	sheet := "expert,question,q05,q50,q95,lowest,highest,best,confidence,q33,q67\n" +
		"Ada Quell,1.0,0.02,0.06,0.15,,,,,,\n" +
		"Ada Quell,\"Question 2, coating failure share\",,,,0.05,0.3,0.1,80,,\n" +
		"Bruno Ferrante,Question 1,0.01,0.05,0.2,,,,,,\n" +
		"Bruno Ferrante,Q4 valve leak share,,0.2,,,,,,0.1,0.3\n"
	g.uploadSheet(t, "monday.csv", sheet, "paper_form")
	got := map[[2]int64]bool{}
	for _, rv := range g.revisions(t) {
		got[[2]int64{rv.ExpertID, rv.QuestionID}] = true
	}
	for _, want := range [][2]int64{{g.experts[0].ID, g.qs[0].ID}, {g.experts[0].ID, g.qs[1].ID}, {g.experts[1].ID, g.qs[0].ID}, {g.experts[1].ID, g.qs[3].ID}} {
		if !got[want] {
			t.Errorf("no revision of expert %d on question %d; saved %v", want[0], want[1], got)
		}
	}
	if len(got) != 4 {
		t.Errorf("saved %d judgements, want 4", len(got))
	}
}

package answersheet

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// An answer sheet is a CSV (RFC 4180) of judgements sent to the
// facilitator, one row per expert and question, which the facilitator
// imports on the experts' behalf (`parley import-answers`, and the upload
// on the workshop's pages). Its columns:
//
//	expert     the expert's name as on the panel, or id:N
//	question   the question's number as the pages write it (3, Q3 or
//	           Question 3, 3.0 too), its quantity after it or not, or id:N
//	           (question.go)
//	qNN ...    for a quantile question, one column per probability it asks,
//	           named as `parley calibrate` reads them: q05, q50, q95; a
//	           probability without a short decimal form takes two digits
//	           (q33 for 1/3), where the calibration page's CSV
//	           (record.WriteCalibrationCSV) writes every digit
//	lowest, highest, best, confidence   for a four-value question; the
//	           confidence in percent, as on the expert's form (80 for 80%)
//	bin1 ...   for a chips question, the chips in each bin, in order
//	reason     optional: the expert's reasoning
//	clear_reason  optional: yes (also x or TRUE, a spreadsheet's tick box)
//	           saves the row without reasoning, where an empty reason cell
//	           keeps the reasoning of the expert's current answer of the
//	           round (Against); its reason cell must then be empty
//
// A row fills only the columns of its question's format. Every cell goes
// through the rules of the expert's own form, so the sheet is refused as
// a whole, naming the row (as a spreadsheet numbers it), the column and the rule,
// when any row breaks one.

// Rules of answer sheets.
const (
	RuleHeader     elicit.Rule = "the header must name expert, question and the answer columns (qNN, lowest, highest, best, confidence, binN, reason, clear_reason)"
	RuleColumn     elicit.Rule = "is not a column of this question's format"
	RuleMissing    elicit.Rule = "is required for this question's format"
	RuleRepeat     elicit.Rule = "one row per expert and question"
	RuleExpert     elicit.Rule = "names no active expert on this workshop's panel"
	RuleQuestion   elicit.Rule = "names no question of this workshop that takes answers"
	RuleEmpty      elicit.Rule = "the sheet has no rows"
	RuleChanged    elicit.Rule = "names a question corrected after the sheet was read: send the sheet again"
	RuleExtra      elicit.Rule = "is beyond the columns the header names"
	RuleUnnamed    elicit.Rule = "is under a column the header leaves without a name"
	RuleRows       elicit.Rule = "the sheet must have at most 10000 rows (a panel of 200 experts answering 50 questions): split it into sheets"
	RuleUTF8       elicit.Rule = "the sheet must be saved as UTF-8 (in a spreadsheet program: CSV UTF-8)"
	RuleCommas     elicit.Rule = "must separate its columns with commas: save it as CSV (comma-separated), with a point for decimals"
	RuleTwoExperts elicit.Rule = "names more than one active expert: name each by id:N"
	// RuleRound is the rule that a sheet is saved into an open round.
	RuleRound elicit.Rule = "the workshop's round is closed, so no answer can be saved"
	// RuleQuote is CSV's rule of quote marks, which a spreadsheet keeps
	// and a sheet typed or pasted by hand may break (12" pipes).
	RuleQuote elicit.Rule = `a quote mark (") inside a cell must be doubled (""), with the whole cell in quote marks`
	// RuleClearReason is the rule of the clear_reason cell.
	RuleClearReason elicit.Rule = "must be yes (or x, or TRUE) to save the row without reasoning, or left empty (no or FALSE)"
	// RuleReasonCleared refuses a reasoning in a row that clears it.
	RuleReasonCleared elicit.Rule = "must be empty in a row whose clear_reason cell says yes"
	// RuleHashName refuses a row read as a comment that names an expert.
	RuleHashName elicit.Rule = `starts with #, which makes the row a comment, and names an expert on the panel: put the name in quote marks ("#1")`
)

// maxRows bounds a sheet: a panel of 200 experts answering 50
// questions.
const maxRows = 10000

// Row is one row of a sheet, read and fitted.
type Row struct {
	Line     int // the row as a spreadsheet numbers it, the header row 1
	Expert   workshop.Expert
	Question workshop.Question
	Answer   workshop.Answer
	Reason   string
	Fit      elicit.Fit
	// ReasonCleared says the row's clear_reason cell asks for it to be
	// saved without reasoning: nothing is carried.
	ReasonCleared bool
	// ReasonCarried says the row's reason cell was empty and Reason is
	// the reasoning saved with the expert's current answer of the open
	// round, which the row keeps (Against); ReasonNotCarried that such
	// reasoning is withheld from the feedback and is not kept.
	ReasonCarried, ReasonNotCarried bool
}

// shownCell is a cell as a message quotes it, clipped to 40 characters.
func shownCell(s string) string { return strconv.Quote(input.Clip(s, 40)) }

// rowErr names a row and a column.
func rowErr(line int, column string, rule elicit.Rule, detail string, args ...any) error {
	return &elicit.InputError{Field: fmt.Sprintf("row %d, column %s", line, column), Rule: rule, Detail: fmt.Sprintf(detail, args...)}
}

// InUTF16 says a file is a spreadsheet's "Unicode text", UTF-16, each
// letter two bytes after its byte order mark: read as UTF-8 an answer
// sheet's header was quoted back as "\xff\xfee\x00x\x00…", and parley
// calibrate's said its first column was not "expert".
func InUTF16(b []byte) bool {
	return bytes.HasPrefix(b, []byte{0xff, 0xfe}) || bytes.HasPrefix(b, []byte{0xfe, 0xff})
}

// SpreadsheetLines makes a CSV file as a spreadsheet saves it readable
// by encoding/csv, for the answer sheet and parley calibrate alike. A
// spreadsheet's "CSV UTF-8" starts with a byte order mark, which would
// make a quoted first header cell a bare quote. Its "CSV (Macintosh)"
// ends its lines with a carriage return alone, which CSV reads as part
// of a cell: the whole sheet was one row, its header quoted back as
// "q95\rada quell". Such a file still writes a line break typed inside
// a cell (a reason in two paragraphs) as a line feed, in quote marks, so
// its lines are told by the line feeds outside quoted cells: with one
// such reason the whole sheet was one header row, refused as a quote
// mark not doubled.
//
// A first line "sep=," (which some spreadsheets write, and read, to name
// the separator) is read as an empty line, so the rows keep their
// numbers; one naming another separator stays, and is refused as the
// header of a sheet not separated by commas (OtherSeparator). It was
// refused as a header naming an unknown column "sep=".
func SpreadsheetLines(b []byte) []byte {
	body := bytes.TrimPrefix(b, []byte("\ufeff"))
	if bytes.IndexByte(body, '\r') >= 0 && !lineFeedOutsideQuotes(body) {
		out := make([]byte, len(body))
		for i, c := range body {
			if c == '\r' && (i+1 == len(body) || body[i+1] != '\n') {
				c = '\n'
			}
			out[i] = c
		}
		body = out
	}
	return dropCommaSeparatorLine(body)
}

// dropCommaSeparatorLine reads a first line "sep=," (in any letter case,
// in quote marks or not, with a line break of either kind) as an empty
// line.
func dropCommaSeparatorLine(body []byte) []byte {
	first, rest, found := bytes.Cut(body, []byte("\n"))
	line := bytes.Trim(bytes.TrimRight(first, "\r"), `"`)
	if !found || !bytes.EqualFold(bytes.TrimSpace(line), []byte("sep=,")) {
		return body
	}
	return append([]byte("\n"), rest...)
}

// lineFeedOutsideQuotes says a CSV file ends a line with a line feed
// somewhere outside a quoted cell (a quote mark opens and closes one; a
// doubled one inside it closes and opens again).
func lineFeedOutsideQuotes(body []byte) bool {
	quoted := false
	for _, c := range body {
		switch {
		case c == '"':
			quoted = !quoted
		case c == '\n' && !quoted:
			return true
		}
	}
	return false
}

// OtherSeparator names what separates a CSV file's columns where its
// header line has no comma: "semicolons" or "tabs", as a spreadsheet
// set to a decimal comma saves CSV, or "" (for the answer sheet and
// parley calibrate alike). Looked for before the CSV is read, as the
// cells of such a header in quote marks ("expert";"question") are no
// CSV at all and were refused by CSV's rule of quote marks. The header
// is the first line that is neither empty nor a comment.
func OtherSeparator(body []byte) string {
	var first []byte
	for rest := body; len(rest) > 0 && len(first) == 0; {
		first, rest, _ = bytes.Cut(rest, []byte("\n"))
		if first = bytes.TrimRight(first, "\r"); bytes.HasPrefix(first, []byte("#")) {
			first = nil
		}
	}
	if !bytes.ContainsRune(first, ',') {
		for _, sep := range []struct{ char, name string }{{";", "semicolons"}, {"\t", "tabs"}} {
			if bytes.Contains(first, []byte(sep.char)) {
				return sep.name
			}
		}
	}
	return ""
}

// Read reads a sheet against a workshop's questions and panel.
// Rows are returned in file order, each fitted by its question's Fit, or
// the first broken rule as an *elicit.InputError naming the row and the
// column. Retired questions, calibration questions whose true value is
// revealed, and revoked experts take no answers here either.
func Read(r io.Reader, questions []workshop.Question, experts []workshop.Expert) ([]Row, error) {
	// The upload's limit holds for a file given to parley import-answers
	// too, which read any file whole.
	b, err := io.ReadAll(io.LimitReader(r, MaxBytes+1))
	if err != nil {
		return nil, &elicit.InputError{Field: "sheet", Rule: RuleHeader, Detail: err.Error()}
	}
	if len(b) > MaxBytes {
		return nil, &elicit.InputError{Field: "sheet", Rule: input.RuleTooLong, Detail: fmt.Sprintf("more than %d bytes (1 MiB)", MaxBytes)}
	}
	if InUTF16(b) {
		return nil, &elicit.InputError{Field: "sheet", Rule: RuleUTF8, Detail: "it is saved as UTF-16 (Unicode text)"}
	}
	body := SpreadsheetLines(b)
	cr := csv.NewReader(bytes.NewReader(body))
	cr.Comment = '#'
	cr.FieldsPerRecord = -1
	// Looked for before the CSV is read (OtherSeparator).
	if sep := OtherSeparator(body); sep != "" {
		return nil, &elicit.InputError{Field: "sheet", Rule: RuleCommas, Detail: "the columns are separated by " + sep}
	}
	// Counted before any row is read and fitted: a sheet of 10,001 rows
	// was refused at its last, after two seconds fitting the others, as
	// "row 10002, column ?: count out of range".
	if n := countRows(body); n > maxRows {
		return nil, &elicit.InputError{Field: "sheet", Rule: RuleRows, Detail: fmt.Sprintf("it has %d rows", n)}
	}
	header, err := cr.Read()
	if errors.Is(err, io.EOF) {
		return nil, &elicit.InputError{Field: "sheet", Rule: RuleEmpty}
	}
	if err != nil {
		return nil, notCSV(body, err, 0, nil)
	}
	// The header's row as a spreadsheet numbers it: comment lines above
	// it are rows too.
	headerRow, _ := cr.FieldPos(0)
	if err := inUTF8(headerRow, header, nil); err != nil {
		return nil, err
	}
	known := map[string]bool{"expert": true, "question": true, "reason": true, "clear_reason": true}
	for _, q := range questions {
		for _, c := range Columns(q) {
			known[c] = true
		}
	}
	col := map[string]int{}
	// A column without a name is no column: a spreadsheet writes empty
	// header cells to the right of the last it holds (",,," after
	// "reason") when a cell there was ever touched. A value under one is
	// refused below, never dropped in silence.
	named := 0 // the columns up to the last the header names
	for i, h := range header {
		h = strings.ToLower(strings.TrimSpace(h))
		if h == "" {
			continue
		}
		named = i + 1
		if !known[h] {
			detail := "no question of this workshop has a column " + shownCell(h)
			if like := likeColumn(h, known); like != "" {
				detail += "; the workshop has " + shownCell(like)
			}
			return nil, rowErr(headerRow, shownCell(h), RuleHeader, "%s", detail)
		}
		if _, dup := col[h]; dup {
			return nil, rowErr(headerRow, shownCell(h), RuleHeader, "the column appears twice")
		}
		col[h] = i
	}
	for _, need := range []string{"expert", "question"} {
		if _, ok := col[need]; !ok {
			return nil, rowErr(headerRow, need, RuleHeader, "missing")
		}
	}
	if err := expertInComment(body, col["expert"], experts); err != nil {
		return nil, err
	}
	var rows []Row
	seen := map[[2]int64]int{}
	// A spreadsheet numbers rows, not the file's lines: a line break in a
	// quoted cell (a reason in paragraphs) starts no row, so the rows
	// below it are named by their line less the breaks above them.
	breaks := 0
	countBreaks := func(rec []string) {
		for _, c := range rec {
			breaks += strings.Count(c, "\n")
		}
	}
	countBreaks(header)
	for {
		rec, err := cr.Read()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			return nil, notCSV(body, err, breaks, header)
		}
		start, _ := cr.FieldPos(0)
		line := start - breaks
		countBreaks(rec)
		if err := inUTF8(line, rec, header); err != nil {
			return nil, err
		}
		// A row of empty cells (a spreadsheet writes one for every row
		// that was ever touched) is no row.
		blank := true
		for i, c := range rec {
			if strings.TrimSpace(c) == "" {
				continue
			}
			if i >= named {
				// Never dropped in silence: a reason without a
				// column, or a decimal comma that split a value.
				hint := ""
				if strings.Trim(strings.TrimSpace(c), "0123456789%") == "" {
					// Digits alone: most likely the decimals of a number
					// written with a decimal comma.
					hint = ", perhaps the decimals of a number written with a decimal comma: write 0.06, not 0,06"
				}
				return nil, rowErr(line, strconv.Itoa(i+1), RuleExtra, "the header names %d columns; this row has %s in column %d%s", named, shownCell(c), i+1, hint)
			}
			if strings.TrimSpace(header[i]) == "" {
				return nil, rowErr(line, strconv.Itoa(i+1), RuleUnnamed, "this row has %s in column %d", shownCell(c), i+1)
			}
			blank = false
		}
		if blank {
			continue
		}
		cell := func(name string) string {
			if i, ok := col[name]; ok && i < len(rec) {
				return strings.TrimSpace(rec[i])
			}
			return ""
		}
		row, err := readRow(line, cell, questions, experts, col)
		if err != nil {
			return nil, err
		}
		key := [2]int64{row.Expert.ID, row.Question.ID}
		if first, dup := seen[key]; dup {
			return nil, rowErr(line, "question", RuleRepeat, "%s's answer to Q%d is also on row %d", row.Expert.Name, row.Question.Position, first)
		}
		seen[key] = line
		rows = append(rows, row)
	}
	if len(rows) == 0 {
		return nil, &elicit.InputError{Field: "sheet", Rule: RuleEmpty}
	}
	return rows, nil
}

// readRow reads one row by the expert form's own number rules
// (workshop.ParseAnswerNumber, workshop.ParseConfidence) and elicit's.
func readRow(line int, cell func(string) string, questions []workshop.Question, experts []workshop.Expert, col map[string]int) (Row, error) {
	row := Row{Line: line}
	var n int
	if row.Expert, n = findExpert(cell("expert"), experts); n != 1 {
		rule := RuleExpert
		if n > 1 {
			rule = RuleTwoExperts
		}
		detail := shownCell(cell("expert"))
		if n > 1 {
			// The ids to name them by, which no page shows: "name each
			// by id:N" alone left the facilitator looking for N.
			if e, ok := idOwner(cell("expert"), experts); ok {
				// The cell is an id and a name: the one by id is named by
				// name, the one by name by its own id.
				who := input.Clip(e.Name, 40)
				if e.Revoked {
					who += ", whose link was revoked,"
				}
				detail += " is the id of " + who + " and the name of " + sameNamed(cell("expert"), experts) +
					": write the expert named " + shownCell(cell("expert")) + " by the id given here for the name"
				if !e.Revoked {
					detail += ", and " + input.Clip(e.Name, 40) + " by name"
				}
			} else {
				detail += " is the name of " + sameNamed(cell("expert"), experts)
			}
		}
		if e, revoked := revokedExpert(cell("expert"), experts); n == 0 && revoked {
			// Said as such: "names no active expert" left the
			// facilitator looking for a misspelt name.
			detail = e.Name + "'s link was revoked, so no answer of theirs can be saved"
		}
		return row, rowErr(line, "expert", rule, "%s", detail)
	}
	var err error
	if row.Question, err = findQuestion(line, cell("question"), questions); err != nil {
		return row, err
	}
	q := row.Question
	if q.Frozen() {
		return row, rowErr(line, "question", RuleQuestion, "Q%d's true value has been revealed, so its answers are final", q.Position)
	}
	mine := Columns(q)
	own := map[string]bool{"expert": true, "question": true, "reason": true, "clear_reason": true}
	for _, c := range mine {
		own[c] = true
		if cell(c) == "" {
			if _, present := col[c]; !present || q.Format != workshop.FormatChips {
				return row, rowErr(line, c, RuleMissing, "Q%d is asked as %s", q.Position, workshop.FormatLabel(q))
			}
		}
	}
	for name := range col {
		if !own[name] && cell(name) != "" {
			return row, rowErr(line, name, RuleColumn, "Q%d is asked as %s", q.Position, workshop.FormatLabel(q))
		}
	}
	// Each cell by the form's own number rules, the answer by elicit's.
	var a workshop.Answer
	// A value may carry a % sign on a proportion, as on the form; the
	// answer is kept as typed in percent when every value was.
	typed, count := 0, 0
	num := func(c string) (float64, error) {
		v, pct, err := workshop.ParseAnswerNumber(c, cell(c), q, false)
		count++
		if pct {
			typed++
		}
		return v, underColumn(line, c, err)
	}
	switch q.Format {
	case workshop.FormatInterval:
		for _, f := range []struct {
			c string
			v *float64
		}{{"lowest", &a.Lowest}, {"highest", &a.Highest}, {"best", &a.Best}} {
			if *f.v, err = num(f.c); err != nil {
				return row, err
			}
		}
		// In percent, by the expert's form's own reading: with or without
		// its sign, and 0.8 refused as almost surely meaning 80%.
		if a.Confidence, err = workshop.ParseConfidence(cell("confidence")); err != nil {
			var ie *elicit.InputError
			if errors.As(err, &ie) && ie.Rule == workshop.RuleConfidencePercent && ie.Detail != "" {
				return row, rowErr(line, "confidence", ie.Rule, "did you mean %s, for %s%%?", ie.Detail, ie.Detail)
			}
			return row, underColumn(line, "confidence", err)
		}
	case workshop.FormatChips:
		a.Counts = make([]int, len(mine))
		for i, c := range mine {
			v := cell(c)
			if v == "" {
				continue // an empty bin holds no chips
			}
			if a.Counts[i], err = input.Whole(c, v, 0, workshop.MaxChips); err != nil {
				return row, underColumn(line, c, err)
			}
		}
	default:
		a.Values = make([]float64, len(mine))
		for i, c := range mine {
			if a.Values[i], err = num(c); err != nil {
				return row, err
			}
		}
	}
	a.Percent = workshop.KeptInPercent(q, typed, count)
	if row.Reason, err = input.Text("reason", cell("reason"), input.MaxLongText, false); err != nil {
		return row, underColumn(line, "reason", err)
	}
	if row.ReasonCleared, err = clearReason(line, cell("clear_reason")); err != nil {
		return row, err
	}
	if row.ReasonCleared && strings.TrimSpace(row.Reason) != "" {
		return row, rowErr(line, "reason", RuleReasonCleared, "%s", shownCell(row.Reason))
	}
	fit, err := q.Fit(a)
	if err != nil {
		var ie *elicit.InputError
		if !errors.As(err, &ie) {
			return row, err
		}
		column := ie.Field
		if i, ok := workshop.FieldIndex(ie.Field); ok && i < len(mine) {
			column = mine[i]
		} else if ie.Field == "counts" {
			column = strings.Join(mine, ",")
		}
		if ie.Field == "confidence" && ie.Rule == elicit.RuleCentralTails {
			return row, rowErr(line, "confidence", ie.Rule, "in percent, at most "+workshop.ConfidenceMaxPercent)
		}
		if ie.Field == "confidence" && ie.Rule == elicit.RuleCentralNarrow {
			return row, rowErr(line, "confidence", ie.Rule, "in percent, at least "+workshop.ConfidenceMinPercent)
		}
		if ie.Field == "confidence" {
			return row, rowErr(line, "confidence", elicit.RuleProbOpen, "in percent, strictly between 0 and 100")
		}
		detail := ie.Detail
		if ie.Rule == elicit.RuleValueInBounds && typed == 0 && percentsWithoutSign(q, a) {
			detail += "; if the row's values are percentages, write each with its sign, such as 5%"
		}
		return row, &elicit.InputError{Field: fmt.Sprintf("row %d, column %s", line, column), Rule: ie.Rule, Detail: detail}
	}
	row.Answer, row.Fit = a, fit
	return row, nil
}

// percentsWithoutSign says an answer to a proportion, typed without any
// % sign, has values that read as percentages: every one above 0, none
// above 100, and most above 1 (0.02, 0.06, 15 is more likely a slip). A paper form's "5, 15, 35" typed so was
// refused only as 5 not inside (0, 1), where the expert's form, set to
// percentages, reads them so.
func percentsWithoutSign(q workshop.Question, a workshop.Answer) bool {
	if !q.ValuesInPercent() {
		return false
	}
	vs := a.Values
	if q.Format == workshop.FormatInterval {
		vs = []float64{a.Lowest, a.Best, a.Highest}
	}
	above := 0
	for _, v := range vs {
		if v <= 0 || v > 100 {
			return false
		}
		if v > 1 {
			above++
		}
	}
	return 2*above > len(vs)
}

// clearReason reads a clear_reason cell: yes, x or TRUE (a spreadsheet's
// tick box) to clear, empty, no or FALSE not to; any other word is
// refused, since a facilitator who wrote "maybe" or "reason" meant
// something the sheet cannot read.
func clearReason(line int, s string) (bool, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "yes", "x", "true":
		return true, nil
	case "", "no", "false":
		return false, nil
	}
	return false, rowErr(line, "clear_reason", RuleClearReason, "%s", shownCell(s))
}

// underColumn puts a cell's parse error under its row and column.
func underColumn(line int, column string, err error) error {
	var ie *elicit.InputError
	if err == nil || !errors.As(err, &ie) {
		return err
	}
	return &elicit.InputError{Field: fmt.Sprintf("row %d, column %s", line, column), Rule: ie.Rule, Detail: ie.Detail}
}

// findExpert finds an active expert by name (case and spaces folded, as
// workshop.SameName) or by id:N, and says how many it found: two experts of one
// name must be named by id.
//
// A cell of the form id:N that is also an active expert's name (a name
// typed on a panel before the roster refused such names, NamedLikeAnID)
// names both: the one by id and the other by name are counted apart, so
// that the row is refused as naming two experts rather than credited to
// one of them unseen.
func findExpert(s string, experts []workshop.Expert) (workshop.Expert, int) {
	var found workshop.Expert
	n := 0
	id, byID := sheetID(s)
	for _, e := range experts {
		if !e.Revoked && ((byID && e.ID == id) || sameName(e.Name, s)) {
			found, n = e, n+1
		}
	}
	if owner, ok := idOwner(s, experts); ok && owner.Revoked && n > 0 {
		// The id is a revoked expert's and the name an active one's: the
		// row is not credited to the one by name unseen.
		n++
	}
	return found, n
}

// idOwner is the expert, active or revoked, whose id the cell s gives as
// id:N, if any.
func idOwner(s string, experts []workshop.Expert) (workshop.Expert, bool) {
	id, ok := sheetID(s)
	for _, e := range experts {
		if ok && e.ID == id {
			return e, true
		}
	}
	return workshop.Expert{}, false
}

// NamedLikeAnID reports that a name reads as an answer sheet's id:N, so
// that a sheet's id:N would name two experts: the roster refuses such a
// name.
func NamedLikeAnID(name string) bool {
	_, ok := sheetID(name)
	return ok
}

// apostrophes are the marks a spreadsheet may put for a typed ' (a
// program's "smart quotes" write O’Neil).
var apostrophes = strings.NewReplacer("\u2019", "'", "\u2018", "'", "\u02bc", "'")

// sameName is workshop.SameName with apostrophes alike: a name typed
// into a spreadsheet that writes O’Neil for O'Neil was refused as naming
// no expert, quoted back as the name on the panel looks.
func sameName(a, b string) bool {
	return workshop.SameName(apostrophes.Replace(a), apostrophes.Replace(b))
}

// sameNamed lists the active experts of name s by id, each with its
// name and affiliation as on the panel, at most five.
func sameNamed(s string, experts []workshop.Expert) string {
	var out []string
	for _, e := range experts {
		if e.Revoked || !sameName(e.Name, s) {
			continue
		}
		if len(out) == 5 {
			out = append(out, "…")
			break
		}
		who := input.Clip(e.Name, 40)
		if e.Affiliation != "" {
			who += ", " + input.Clip(e.Affiliation, 40)
		}
		out = append(out, fmt.Sprintf("id:%d (%s)", e.ID, who))
	}
	return strings.Join(out, ", ")
}

// revokedExpert finds the expert a row names who is on the panel no
// more: by id:N, or the one revoked expert of the name when no active
// expert has it.
func revokedExpert(s string, experts []workshop.Expert) (workshop.Expert, bool) {
	var found workshop.Expert
	n := 0
	id, byID := sheetID(s)
	for _, e := range experts {
		if e.Revoked && ((byID && e.ID == id) || (!byID && sameName(e.Name, s))) {
			found, n = e, n+1
		}
	}
	return found, n == 1
}

// sheetID reads "id:N", N by the rule of every id Parley reads: digits
// only, 1 to input.MaxID (strconv.ParseInt took "id:+3").
func sheetID(s string) (int64, bool) {
	rest, ok := strings.CutPrefix(strings.ToLower(strings.TrimSpace(s)), "id:")
	if !ok {
		return 0, false
	}
	id, err := input.Whole("id", rest, 1, input.MaxID)
	return int64(id), err == nil
}

// notCSV names the row and column of a CSV parse error (a quote mark
// inside a cell not written as CSV writes it): its row as a spreadsheet
// numbers it (breaks, the line breaks inside quoted cells above it) and
// its column by the header's name, counting the commas between the
// row's start and the error outside quoted cells.
func notCSV(body []byte, err error, breaks int, header []string) error {
	var pe *csv.ParseError
	if !errors.As(err, &pe) {
		return &elicit.InputError{Field: "sheet", Rule: RuleHeader, Detail: err.Error()}
	}
	// The offsets of the row's first line and of the error's line; the
	// reader counts lines by \n (a \r\n is one).
	lineStart := func(n int) int {
		off := 0
		for i := 1; i < n && off <= len(body); i++ {
			j := bytes.IndexByte(body[off:], '\n')
			if j < 0 {
				return len(body)
			}
			off += j + 1
		}
		return min(off, len(body))
	}
	from, to := lineStart(pe.StartLine), lineStart(pe.Line)+max(0, pe.Column-1)
	to = max(from, min(to, len(body)))
	field, cellStart, quoted := 0, from, false
	for i := from; i < to; i++ {
		switch body[i] {
		case '"':
			quoted = !quoted
		case ',':
			if !quoted {
				field, cellStart = field+1, i+1
			}
		}
	}
	column := strconv.Itoa(field + 1)
	if field < len(header) && strings.TrimSpace(header[field]) != "" {
		column = strings.ToLower(strings.TrimSpace(header[field]))
	}
	// The cell as far as the next comma or line end, as the
	// facilitator typed it (strconv.Quote would write its quote marks
	// as \").
	cell := body[cellStart:]
	if i := bytes.IndexAny(cell, ",\r\n"); i >= 0 {
		cell = cell[:i]
	}
	shown := "“" + input.Clip(string(cell), 40) + "”"
	if strings.ContainsFunc(string(cell), func(r rune) bool { return r == utf8.RuneError || unicode.IsControl(r) }) {
		shown = shownCell(string(cell))
	}
	return rowErr(pe.StartLine-breaks, column, RuleQuote, "the cell %s", shown)
}

// inUTF8 refuses a row holding a cell that is not UTF-8, naming its
// column: a spreadsheet's plain "CSV" is often in the computer's own
// encoding (Windows-1252 writes é as the one byte 0xE9), and a name
// written so matched no expert ("Ad\xe0 Quell") and a reason was refused
// as holding control characters.
func inUTF8(line int, rec, header []string) error {
	for i, c := range rec {
		if utf8.ValidString(c) {
			continue
		}
		column := strconv.Itoa(i + 1)
		if i < len(header) && strings.TrimSpace(header[i]) != "" && utf8.ValidString(header[i]) {
			column = strings.ToLower(strings.TrimSpace(header[i]))
		}
		return rowErr(line, column, RuleUTF8, "%s is in another encoding, such as Windows-1252", shownCell(c))
	}
	return nil
}

// countRows counts the rows of answers in a sheet: its records after the
// header, less the rows of empty cells. A sheet that is not CSV counts
// the rows before the break, which the read then refuses.
func countRows(body []byte) int {
	cr := csv.NewReader(bytes.NewReader(body))
	cr.Comment = '#'
	cr.FieldsPerRecord = -1
	cr.ReuseRecord = true
	n := -1 // the header
	for {
		rec, err := cr.Read()
		if err != nil {
			return max(n, 0)
		}
		for _, c := range rec {
			if strings.TrimSpace(c) != "" {
				n++
				break
			}
		}
	}
}

// expertInComment refuses a line below the header that the sheet's
// reader skips as a comment (it starts with #) but whose expert cell
// names an active expert: a panel whose experts are named #1, #2, …
// had those rows dropped without a word (CommentRows finds the lines).
func expertInComment(body []byte, expertCol int, experts []workshop.Expert) error {
	for _, c := range CommentRows(body, false) {
		if expertCol >= len(c.Cells) {
			continue
		}
		if _, n := findExpert(strings.TrimSpace(c.Cells[expertCol]), experts); n > 0 {
			return rowErr(c.Line, "expert", RuleHashName, "the row of %s is read as a comment and would be left out", shownCell(c.Cells[expertCol]))
		}
	}
	return nil
}

// CommentRow is a line below a CSV file's header that CSV's comment rule
// skips, read as a record: its line in the file and its cells.
type CommentRow struct {
	Line  int
	Cells []string
}

// CommentRows are the lines below the header of a CSV file (body, its
// lines as SpreadsheetLines leaves them) that a reader with Comment '#'
// skips, for a reader that names rows left out that way (an expert named
// #1). The lines are read as CSV without comments, so that a # inside a
// quoted cell (a reason in paragraphs) is no line of its own, and a
// quoted "#1" is no comment; comment lines above the header are the
// file's notes. trimLeadingSpace is the file's own reader's setting. A
// note's quote mark (5" pipes) is taken as it stands: read strictly, the
// search stopped at it, and the rows below were dropped unsaid. A file
// that is no CSV further on is left to its reader's own refusal.
func CommentRows(body []byte, trimLeadingSpace bool) []CommentRow {
	cr := csv.NewReader(bytes.NewReader(body))
	cr.FieldsPerRecord = -1
	cr.TrimLeadingSpace = trimLeadingSpace
	cr.LazyQuotes = true
	var out []CommentRow
	header := true
	for {
		// The record's first character as the file has it.
		at := int(cr.InputOffset())
		for at < len(body) && (body[at] == '\n' || body[at] == '\r') {
			at++
		}
		rec, err := cr.Read()
		if err != nil {
			return out
		}
		raw := at < len(body) && body[at] == '#'
		if header {
			header = raw
			continue
		}
		if raw {
			line, _ := cr.FieldPos(0)
			out = append(out, CommentRow{Line: line, Cells: rec})
		}
	}
}

// likeColumn is the workshop's quantile column that a header cell h
// writes otherwise, "" if none: a one-digit percentage without its zero
// ("q5" for q05), or a percent sign after it ("q5%", "q50%"). A header
// of q5 was refused naming no column it might mean.
func likeColumn(h string, known map[string]bool) string {
	digits, ok := strings.CutPrefix(strings.TrimSuffix(h, "%"), "q")
	if !ok || digits == "" {
		return ""
	}
	for _, c := range digits {
		if c < '0' || c > '9' {
			return ""
		}
	}
	if len(digits) > 2 {
		return "" // q050 may be 5% or 50%
	}
	p, err := strconv.ParseFloat("0."+strings.Repeat("0", 2-len(digits))+digits, 64)
	if err != nil {
		return ""
	}
	for c := range known {
		if d, ok := strings.CutPrefix(c, "q"); ok && d != "" {
			if v, err := strconv.ParseFloat("0."+d, 64); err == nil && v == p && c != h {
				return c
			}
		}
	}
	return ""
}

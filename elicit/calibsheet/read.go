package calibsheet

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"strconv"
	"strings"
	"unicode/utf8"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/answersheet"
	"github.com/parley-elicit/parley/elicit/input"
)

// maxBytes bounds a sheet: 200 experts answering 100 calibration
// questions take about 1.2 MB.
const maxBytes = 4 << 20

// Sheet is a calibration sheet read and checked, keyed as
// elicit.ClassicalModel and elicit.LeaveOneOut take it.
type Sheet struct {
	Assessments  []elicit.SeedAssessment // in the order of their rows
	Realisations map[string]float64      // each question's true value
	Bounds       map[string][2]float64   // the questions with a lower and an upper bound
	LogScale     map[string]bool         // the questions scored against the log-uniform background
	// Rows[i] is the line of the file Assessments[i] was read from, the
	// header's line 1 when no comment stands above it.
	Rows []int
	// QuantileColumns are the header's names of the quantile columns,
	// in order (q05, q50, q95).
	QuantileColumns []string
	// CommentedRows are the rows that CSV reads as comments (they start
	// with #) but that hold an assessment: see CommentNote.
	CommentedRows []int
}

// Read reads a calibration sheet: a header expert,question,realization,
// optionally lower,upper and background, followed by quantile columns
// qNN in increasing order (usually q05, q50, q95); then one row per
// expert and question (format.go). Lines starting with # are comments; a
// byte order mark and lines ended by a carriage return alone are read as
// the answer sheet reads them.
//
// A sheet that breaks a rule is refused with an *elicit.InputError naming
// the row (the line in the file), the column and the rule; "input" for
// the file as a whole, "header" or "header column N" for its header. Any
// other error is r's own.
func Read(r io.Reader) (*Sheet, error) {
	// A file is read whole only up to maxBytes: it read any file whole
	// (a 200 MB line took gigabytes and crashed).
	b, err := io.ReadAll(io.LimitReader(r, maxBytes+1))
	if err != nil {
		return nil, err
	}
	if len(b) > maxBytes {
		return nil, &elicit.InputError{Field: "input", Rule: input.RuleTooLong, Detail: fmt.Sprintf("more than %d bytes (4 MiB)", maxBytes)}
	}
	// Read as the answer sheet reads a spreadsheet's CSV: its lines
	// ended by a carriage return alone were one row, and a header in
	// quote marks with semicolons between its cells ("expert";"question")
	// was refused by CSV's rule of quote marks, not as semicolon-separated.
	if answersheet.InUTF16(b) {
		return nil, &elicit.InputError{Field: "input", Rule: RuleUTF8, Detail: "it is saved as UTF-16 (Unicode text)"}
	}
	body := answersheet.SpreadsheetLines(b)
	if sep := answersheet.OtherSeparator(body); sep != "" {
		return nil, &elicit.InputError{Field: "header", Rule: answersheet.RuleCommas, Detail: "the columns are separated by " + sep}
	}
	cr := csv.NewReader(bytes.NewReader(body))
	cr.Comment = '#'
	cr.FieldsPerRecord = -1
	cr.TrimLeadingSpace = true
	header, err := cr.Read()
	if err == io.EOF {
		return nil, &elicit.InputError{Field: "header", Rule: elicit.RuleRequired, Detail: "the file is empty"}
	}
	if err != nil {
		return nil, csvError(err)
	}
	cols, probs, err := readHeader(header)
	if err != nil {
		return nil, err
	}
	rs := newRows(cols, probs)
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, csvError(err)
		}
		if strings.TrimSpace(strings.Join(rec, "")) == "" {
			// A row of empty cells, as a spreadsheet writes below its
			// data (",,,,,"): no assessment, as the answer sheet reads it.
			continue
		}
		line, _ := cr.FieldPos(0)
		ar, err := rs.read(line, rec)
		if err != nil {
			return nil, err
		}
		if err := rs.add(line, ar); err != nil {
			return nil, err
		}
	}
	s := rs.sheet
	s.CommentedRows = commentedAssessments(body, len(cols))
	if len(s.Assessments) == 0 {
		detail := "no assessments after the header"
		if len(s.CommentedRows) > 0 {
			detail += "; " + commentedWords(s.CommentedRows)
		}
		return nil, &elicit.InputError{Field: "rows", Rule: elicit.RuleCount, Detail: detail}
	}
	return s, nil
}

// rows reads a sheet's rows below its header and holds what the rows of
// one question must share.
type rows struct {
	cols          []string
	probs         []float64
	firstQ        int // the first quantile column
	hasBounds     bool
	hasBackground bool
	sheet         *Sheet
	// The first row of each question, and of each expert and question.
	realRow, boundsRow, backgroundRow map[string]int
	seen                              map[[2]string]int
}

func newRows(cols []string, probs []float64) *rows {
	firstQ := len(cols) - len(probs)
	return &rows{
		cols: cols, probs: probs, firstQ: firstQ,
		hasBackground: cols[firstQ-1] == ColumnBackground,
		hasBounds:     firstQ-len(leadingColumns) >= 2, // lower, upper
		sheet: &Sheet{Realisations: map[string]float64{}, Bounds: map[string][2]float64{}, LogScale: map[string]bool{},
			QuantileColumns: cols[firstQ:]},
		realRow: map[string]int{}, boundsRow: map[string]int{}, backgroundRow: map[string]int{},
		seen: map[[2]string]int{},
	}
}

// assessmentRow is one row read on its own: its assessment and what it
// says of its question.
type assessmentRow struct {
	a           elicit.SeedAssessment
	realisation float64
	bounds      [2]float64
	bounded     bool
	logScale    bool
}

// read checks one row by the rules that hold for a row alone.
func (rs *rows) read(line int, rec []string) (assessmentRow, error) {
	field := func(col string) string { return fmt.Sprintf("row %d: %s", line, col) }
	cell := func(i int) string {
		if i < len(rec) {
			return strings.TrimSpace(rec[i])
		}
		return ""
	}
	var ar assessmentRow
	// A spreadsheet's plain CSV in Windows-1252, as the answer sheet
	// says it: a name with an accent was "must be plain text (no
	// control characters …) (not UTF-8)".
	for i, c := range rec {
		if !utf8.ValidString(c) {
			col := strconv.Itoa(i + 1)
			if i < len(rs.cols) {
				col = rs.cols[i]
			}
			return ar, &elicit.InputError{Field: field(col), Rule: RuleUTF8,
				Detail: fmt.Sprintf("%s is in another encoding, such as Windows-1252", strconv.Quote(input.Clip(c, 40)))}
		}
	}
	if len(rec) > len(rs.cols) {
		return ar, &elicit.InputError{Field: field("columns"), Rule: elicit.RuleCount,
			Detail: fmt.Sprintf("%d fields, the header has %d", len(rec), len(rs.cols))}
	}
	// Names are printed back to the terminal: the text rule keeps
	// control characters (an ESC sequence, NUL) and broken UTF-8 out.
	a := elicit.SeedAssessment{Probs: rs.probs, Quantiles: make([]float64, len(rs.probs))}
	var err error
	if a.Expert, err = input.Text(field(ColumnExpert), cell(0), input.MaxShortText, true); err != nil {
		return ar, err
	}
	if a.Question, err = input.Text(field(ColumnQuestion), cell(1), input.MaxShortText, true); err != nil {
		return ar, err
	}
	realCol := rs.cols[2] // realization or realisation, as the header spells it
	x, err := input.Number(field(realCol), cell(2))
	if err != nil {
		return ar, err
	}
	if err := elicit.CheckMagnitude(field(realCol), x); err != nil {
		return ar, err
	}
	var b [2]float64
	bounded := false
	if rs.hasBounds {
		if b, bounded, err = readBounds(field, cell(3), cell(4)); err != nil {
			return ar, err
		}
		if bounded && (x < b[0] || x > b[1]) {
			return ar, &elicit.InputError{Field: field(realCol), Rule: elicit.RuleInRange,
				Detail: fmt.Sprintf("%v outside [%v, %v]", x, b[0], b[1])}
		}
	}
	qcols := rs.cols[rs.firstQ:]
	for j, col := range qcols {
		if a.Quantiles[j], err = input.Number(field(col), cell(rs.firstQ+j)); err != nil {
			return ar, err
		}
	}
	if err := a.Validate(); err != nil {
		return ar, renameQuantiles(err, fmt.Sprintf("row %d", line), qcols)
	}
	logScale := false
	if rs.hasBackground {
		if logScale, err = readBackground(field, cell(rs.firstQ-1), x, b, bounded, a.Quantiles, qcols); err != nil {
			return ar, err
		}
	}
	return assessmentRow{a: a, realisation: x, bounds: b, bounded: bounded, logScale: logScale}, nil
}

// add checks a row against the rows above it (one background, one
// realisation and one pair of bounds per question; one row per expert
// and question) and keeps it.
func (rs *rows) add(line int, ar assessmentRow) error {
	field := func(col string) string { return fmt.Sprintf("row %d: %s", line, col) }
	s, q := rs.sheet, ar.a.Question
	if rs.hasBackground {
		if first, ok := rs.backgroundRow[q]; ok && s.LogScale[q] != ar.logScale {
			return &elicit.InputError{Field: field(ColumnBackground), Rule: RuleSameBackground,
				Detail: fmt.Sprintf("%s here, %s on row %d", backgroundWord(ar.logScale), backgroundWord(s.LogScale[q]), first)}
		} else if !ok {
			rs.backgroundRow[q] = line
			if ar.logScale {
				s.LogScale[q] = true
			}
		}
	}
	key := [2]string{ar.a.Expert, q}
	if first, dup := rs.seen[key]; dup {
		return &elicit.InputError{Field: field(ColumnExpert + ", " + ColumnQuestion), Rule: elicit.RuleDuplicate,
			Detail: fmt.Sprintf("expert %q and question %q already on row %d", ar.a.Expert, q, first)}
	}
	rs.seen[key] = line
	if first, ok := rs.realRow[q]; ok && s.Realisations[q] != ar.realisation {
		return &elicit.InputError{Field: field(rs.cols[2]), Rule: RuleSameRealisation,
			Detail: fmt.Sprintf("%v here, %v on row %d", ar.realisation, s.Realisations[q], first)}
	} else if !ok {
		rs.realRow[q] = line
		s.Realisations[q] = ar.realisation
	}
	if rs.hasBounds {
		had, seenBefore := s.Bounds[q]
		if first, ok := rs.boundsRow[q]; ok && (seenBefore != ar.bounded || had != ar.bounds) {
			return &elicit.InputError{Field: field(ColumnLower + ", " + ColumnUpper), Rule: RuleSameBounds,
				Detail: fmt.Sprintf("%s here, %s on row %d", boundsText(ar.bounds, ar.bounded), boundsText(had, seenBefore), first)}
		} else if !ok {
			rs.boundsRow[q] = line
			if ar.bounded {
				s.Bounds[q] = ar.bounds
			}
		}
	}
	s.Assessments = append(s.Assessments, ar.a)
	s.Rows = append(s.Rows, line)
	return nil
}

// readBackground reads a row's background cell, and holds a row on the
// log scale to elicit.RuleLogScalePositive here, where the message can
// name the row and the column.
func readBackground(field func(string) string, cell string, x float64, b [2]float64, bounded bool, qs []float64, qcols []string) (bool, error) {
	switch strings.ToLower(cell) {
	case "", BackgroundUniform:
		return false, nil
	case BackgroundLogUniform:
	default:
		return false, &elicit.InputError{Field: field(ColumnBackground), Rule: RuleBackgroundWord, Detail: fmt.Sprintf("got %q", input.Clip(cell, 40))}
	}
	if !(x > 0) {
		return true, &elicit.InputError{Field: field(ColumnRealisation), Rule: elicit.RuleLogScalePositive, Detail: fmt.Sprintf("got %v", x)}
	}
	if bounded && !(b[0] >= 0) {
		return true, &elicit.InputError{Field: field(ColumnLower), Rule: elicit.RuleLogScalePositive, Detail: fmt.Sprintf("a lower bound below 0 (%v); 0 leaves the range uncut below", b[0])}
	}
	for j, v := range qs {
		if !(v > 0) {
			return true, &elicit.InputError{Field: field(qcols[j]), Rule: elicit.RuleLogScalePositive, Detail: fmt.Sprintf("got %v", v)}
		}
	}
	return true, nil
}

// backgroundWord names a background in a message.
func backgroundWord(log bool) string {
	if log {
		return BackgroundLogUniform
	}
	return BackgroundUniform
}

// readBounds reads a row's lower and upper cells: both empty is a
// question without bounds; both given must be finite, within the
// magnitude rule and in order (the classical model checks that the
// realisation and the quantiles lie inside).
func readBounds(field func(string) string, lo, hi string) ([2]float64, bool, error) {
	if lo == "" && hi == "" {
		return [2]float64{}, false, nil
	}
	if lo == "" || hi == "" {
		return [2]float64{}, false, &elicit.InputError{Field: field(ColumnLower + ", " + ColumnUpper), Rule: RuleBoundsPair,
			Detail: fmt.Sprintf("lower %q, upper %q", lo, hi)}
	}
	var b [2]float64
	for i, c := range [2]struct{ name, text string }{{ColumnLower, lo}, {ColumnUpper, hi}} {
		v, err := input.Number(field(c.name), c.text)
		if err != nil {
			return b, false, err
		}
		if err := elicit.CheckMagnitude(field(c.name), v); err != nil {
			return b, false, err
		}
		b[i] = v
	}
	if !(b[0] < b[1]) {
		return b, false, &elicit.InputError{Field: field(ColumnUpper), Rule: elicit.RuleBoundsOrder,
			Detail: fmt.Sprintf("lower %v, upper %v", b[0], b[1])}
	}
	return b, true, nil
}

// boundsText writes a question's bounds for a message.
func boundsText(b [2]float64, bounded bool) string {
	if !bounded {
		return "no bounds"
	}
	return fmt.Sprintf("[%v, %v]", b[0], b[1])
}

// csvError names the row where CSV's own rule was broken.
func csvError(err error) error {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		return &elicit.InputError{Field: fmt.Sprintf("row %d", pe.Line), Rule: RuleCSV, Detail: pe.Err.Error()}
	}
	return err
}

// commentedAssessments finds the rows below the header that CSV skips as
// comments (they start with #) but that hold an assessment: as many
// cells as the header, a number as the realisation. A panel named #1,
// #2, … had those rows dropped without a word. Unlike the answer sheet,
// the file names no panel that would tell such a name from a row put
// out of the count on purpose, so they are not refused: the caller says
// which rows were left out (CommentNote). The lines are found as the
// answer sheet finds them (answersheet.CommentRows).
func commentedAssessments(body []byte, ncols int) []int {
	var rows []int
	for _, c := range answersheet.CommentRows(body, true) {
		if len(c.Cells) != ncols {
			continue
		}
		if _, err := strconv.ParseFloat(strings.TrimSpace(c.Cells[2]), 64); err == nil {
			rows = append(rows, c.Line)
		}
	}
	return rows
}

// CommentNote says which rows were read as comments though they hold an
// assessment (CommentedRows), and how to count them; "" when none was.
func (s *Sheet) CommentNote() string {
	if len(s.CommentedRows) == 0 {
		return ""
	}
	return commentedWords(s.CommentedRows)
}

func commentedWords(rows []int) string {
	nums := make([]string, len(rows))
	for i, r := range rows {
		nums[i] = strconv.Itoa(r)
	}
	which := "row " + nums[0] + " starts with # and holds an assessment, so it was left out as a comment"
	if len(rows) > 1 {
		which = "rows " + strings.Join(nums, ", ") + " start with # and hold assessments, so they were left out as comments"
	}
	return which + `; to count an expert whose name starts with #, put the name in quote marks ("#1")`
}

// RowError names, in an error of the classical model over the sheet's
// assessments (elicit.ClassicalModel, elicit.LeaveOneOut), the row an
// assessments[i] field came from and the column of a quantiles[j]:
// assessments[0].quantiles[1] is "row 2: q50". Other errors are returned
// as they are.
func (s *Sheet) RowError(err error) error {
	var ie *elicit.InputError
	if !errors.As(err, &ie) {
		return err
	}
	for i, row := range s.Rows {
		p := fmt.Sprintf("assessments[%d]", i)
		if ie.Field == p {
			c := *ie
			c.Field = fmt.Sprintf("row %d", row)
			return &c
		}
		if rest, ok := strings.CutPrefix(ie.Field, p+"."); ok {
			c := *ie
			c.Field = rest
			return renameQuantiles(&c, fmt.Sprintf("row %d", row), s.QuantileColumns)
		}
	}
	return err
}

// renameQuantiles turns a quantiles[j] field into the CSV column name, and
// prefixes the row.
func renameQuantiles(err error, row string, qcols []string) error {
	var ie *elicit.InputError
	if !errors.As(err, &ie) {
		return err
	}
	c := *ie
	for j, name := range qcols {
		if c.Field == fmt.Sprintf("quantiles[%d]", j) {
			c.Field = name
		}
	}
	c.Field = row + ": " + c.Field
	return &c
}

package main

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"regexp"
	"strconv"
	"strings"
	"text/tabwriter"
	"unicode/utf8"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/answersheet"
	"github.com/parley-elicit/parley/elicit/input"
)

func init() {
	command("calibrate", "score experts on calibration questions and weight them (--input FILE.csv, --alpha, --overshoot, --leave-one-out, --format)", runCalibrate)
}

func runCalibrate(args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	fs := newFlags("calibrate", stderr)
	input := fs.String("input", "", "CSV `file` with header expert,question,realization,q05,q50,q95, optionally lower,upper after realization and background (uniform or log-uniform) before the quantiles (- for standard input)")
	alpha := fs.String("alpha", "", "fixed calibration cut-off in [0, 1] (default: the one that maximises the performance-weighted pool's score as if it were an expert)")
	overshoot := fs.String("overshoot", "", "widening k of each question's intrinsic range (default 0.1)")
	format := fs.String("format", "text", "text or json")
	loo := fs.Bool("leave-one-out", false, "also rerun without each calibration question and each expert and report the shift of the pooled 5/50/95 percentiles on the calibration questions")
	if code, ok := parseArgs(fs, args, stdout, stderr); !ok {
		return code
	}
	if err := checkFormat(*format); err != nil {
		return fail(stderr, "calibrate", err)
	}
	var opt elicit.ModelOptions
	if *alpha != "" {
		a, err := number("alpha", *alpha)
		if err != nil {
			return fail(stderr, "calibrate", err)
		}
		opt.Alpha = &a
	}
	if *overshoot != "" {
		k, err := number("overshoot", *overshoot)
		if err != nil {
			return fail(stderr, "calibrate", err)
		}
		if !(k > 0) {
			return fail(stderr, "calibrate", badInput("overshoot", "must be greater than 0, got %v", k))
		}
		opt.Overshoot = k
	}
	if *input == "" {
		return fail(stderr, "calibrate", badInput("input", "a CSV file is required"))
	}
	r := stdin
	if *input != "-" {
		f, err := os.Open(*input)
		if err != nil {
			return fail(stderr, "calibrate", badInput("input", "%v", err))
		}
		defer f.Close()
		r = f
	}
	seeds, err := readSeedCSV(r)
	if err != nil {
		return fail(stderr, "calibrate", err)
	}
	if len(seeds.hashRows) > 0 {
		fmt.Fprintf(stderr, "parley calibrate: note: %s\n", hashRowsWords(seeds.hashRows))
	}
	opt.LogScale = seeds.logScale
	s, err := elicit.ClassicalModel(seeds.assessments, seeds.realisations, seeds.bounds, opt)
	if err != nil {
		return fail(stderr, "calibrate", seeds.rowError(err))
	}
	var rob *elicit.LeaveOneOutReport
	if *loo {
		r, err := elicit.LeaveOneOut(seeds.assessments, seeds.realisations, seeds.bounds, opt, nil)
		if err != nil {
			return fail(stderr, "calibrate", seeds.rowError(err))
		}
		rob = &r
	}
	if err := writeCalibration(stdout, *format, s, rob, opt.Alpha == nil); err != nil {
		return fail(stderr, "calibrate", err)
	}
	return exitOK
}

// writeCalibration prints the scores (and the leave-one-out report when
// rob is not nil) as text or JSON. As a last defence it prints nothing
// when any number is NaN or ±Inf: the text would show it to the reader,
// and JSON has no literal for it.
func writeCalibration(w io.Writer, format string, s elicit.Scores, rob *elicit.LeaveOneOutReport, optimised bool) error {
	if !finite(calibrationNumbers(s, rob)...) {
		return errors.New("the calibration produced a non-finite number; nothing printed")
	}
	if format == "json" {
		out := calibrateOutput{Scores: s}
		if rob != nil {
			// The notes the text prints, and how many reruns were done:
			// over none, "max_shift": 0 is no shift measured, and the
			// note was the library's "wrong number of entries".
			r := leaveOneOutJSON{LeaveOneOutReport: *rob}
			r.Cases = append([]elicit.LeaveOneOutCase(nil), rob.Cases...)
			kinds := rerunKinds(rob.Cases)
			for i := range r.Cases {
				if r.Cases[i].Error == "" {
					r.RerunsDone++
				} else {
					r.Cases[i].Error = rerunNote(r.Cases[i], kinds)
				}
			}
			out.LeaveOneOut = &r
		}
		return writeJSON(w, out)
	}
	if err := writeScoresTable(w, s, optimised); err != nil {
		return err
	}
	if rob != nil {
		return writeLeaveOneOut(w, *rob, s)
	}
	return nil
}

// calibrationNumbers lists every number the scores and the report print.
func calibrationNumbers(s elicit.Scores, rob *elicit.LeaveOneOutReport) []float64 {
	nums := append([]float64{s.Alpha, s.Overshoot, s.Pooled.Calibration, s.Pooled.Information, s.Pooled.Combined}, s.Probs...)
	for _, e := range s.Experts {
		nums = append(nums, e.Calibration, e.Information, e.Combined, e.Weight)
	}
	for _, q := range s.Questions {
		nums = append(append(nums, q.Realisation, q.Lower, q.Upper), q.Pooled...)
	}
	if rob == nil {
		return nums
	}
	nums = append(nums, rob.MaxShift)
	for _, f := range rob.Full {
		nums = append(nums, f...)
	}
	for _, c := range rob.Cases {
		nums = append(append(nums, c.Alpha, c.Shift), c.Shifts...)
		for _, w := range c.Weights {
			nums = append(nums, w)
		}
		for _, p := range c.Percentiles {
			nums = append(nums, p...)
		}
	}
	return nums
}

// calibrateOutput is the JSON output: the scores' keys (alpha, probs,
// experts, pooled, questions, ...) and, with --leave-one-out, the
// robustness report under "leave_one_out".
type calibrateOutput struct {
	elicit.Scores
	LeaveOneOut *leaveOneOutJSON `json:"leave_one_out,omitempty"`
}

// leaveOneOutJSON is the report's keys and reruns_done, how many of its
// cases could be rerun: with none, max_shift is 0 and measures nothing.
type leaveOneOutJSON struct {
	elicit.LeaveOneOutReport
	RerunsDone int `json:"reruns_done"`
}

// rerunKinds counts the cases of each kind (a question or an expert
// left out).
func rerunKinds(cases []elicit.LeaveOneOutCase) map[string]int {
	kinds := map[string]int{}
	for _, c := range cases {
		kinds[c.LeftOut]++
	}
	return kinds
}

// rerunNote says why a case could not be rerun. Without the only
// question or the only expert nothing is left to score; the library's
// words for it ("wrong number of entries") say less (the calibration
// page's rerunError).
func rerunNote(c elicit.LeaveOneOutCase, kinds map[string]int) string {
	switch {
	case c.Error != "" && c.LeftOut == elicit.LeaveOutQuestion && kinds[c.LeftOut] == 1:
		return "leaving out the only calibration question leaves nothing to score"
	case c.Error != "" && c.LeftOut == elicit.LeaveOutExpert && kinds[c.LeftOut] == 1:
		return "leaving out the only expert leaves no one to score"
	}
	return c.Error
}

// seedCSV is a parsed calibration CSV; rows[i] is the file line of
// assessments[i].
type seedCSV struct {
	assessments  []elicit.SeedAssessment
	realisations map[string]float64
	bounds       map[string][2]float64 // questions with a lower and an upper bound
	logScale     map[string]bool       // questions scored against the log-uniform background
	rows         []int
	qcols        []string // the quantile columns' names
	// hashRows are the rows read as comments that hold an assessment
	// (hashAssessments).
	hashRows []int
}

// quantileColumn is a qNN header: the probability 0.NN, e.g. q05 → 0.05,
// q975 → 0.975.
var quantileColumn = regexp.MustCompile(`^q([0-9]{2,})$`)

// seedHeader are the leading columns of a calibration CSV. The British
// spelling "realisation" is accepted too.
var seedHeader = []string{"expert", "question", "realization"}

// boundColumns may follow the leading columns: a question's lower and
// upper bound, as the workshop's questions have (0 and 1 for a
// proportion). The intrinsic range is cut to them, as on the calibration
// page, so the same answers score the same here and there.
var boundColumns = []string{"lower", "upper"}

// scaleColumn may stand right before the quantile columns: "log-uniform" scores
// a question's information against the log-uniform background
// (elicit.ModelOptions.LogScale), for quantities spread over orders of
// magnitude; "uniform" or empty against the uniform, as the page does by
// default. Named for the classical model's background measure.
const scaleColumn = "background"

// maxSeedInput bounds a calibration CSV: 200 experts answering 100
// calibration questions take about 1.2 MB.
const maxSeedInput = 4 << 20

// readSeedCSV reads a calibration CSV: a header expert,question,
// realization, optionally lower,upper, followed by quantile columns qNN in
// increasing order (usually q05, q50, q95); then one row per expert and
// question.
// Lines starting with # are comments; a byte order mark and lines ended
// by a carriage return alone are read as the answer sheet reads them.
// Errors name the row (the line in the file), the column and the rule.
func readSeedCSV(r io.Reader) (*seedCSV, error) {
	// A file is read whole only up to maxSeedInput: it read any file
	// whole (a 200 MB line took gigabytes and crashed).
	b, err := io.ReadAll(io.LimitReader(r, maxSeedInput+1))
	if err != nil {
		return nil, badInput("input", "%v", err)
	}
	if len(b) > maxSeedInput {
		return nil, &elicit.InputError{Field: "input", Rule: input.RuleTooLong, Detail: fmt.Sprintf("more than %d bytes (4 MiB)", maxSeedInput)}
	}
	// Read as the answer sheet reads a spreadsheet's CSV: its lines
	// ended by a carriage return alone were one row, and a header in
	// quote marks with semicolons between its cells ("expert";"question")
	// was refused by CSV's rule of quote marks, not as semicolon-separated.
	if answersheet.InUTF16(b) {
		return nil, &elicit.InputError{Field: "input", Rule: ruleUTF8, Detail: "it is saved as UTF-16 (Unicode text)"}
	}
	b = answersheet.SpreadsheetLines(b)
	if sep := answersheet.OtherSeparator(b); sep != "" {
		return nil, &elicit.InputError{Field: "header", Rule: answersheet.RuleCommas, Detail: "the columns are separated by " + sep}
	}
	cr := csv.NewReader(bytes.NewReader(b))
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
	cols, probs, err := parseSeedHeader(header)
	if err != nil {
		return nil, err
	}
	firstQ := len(cols) - len(probs) // the first quantile column
	hasScale := cols[firstQ-1] == scaleColumn
	hasBounds := firstQ-len(seedHeader) >= len(boundColumns)
	out := &seedCSV{realisations: map[string]float64{}, bounds: map[string][2]float64{}, logScale: map[string]bool{}, qcols: cols[firstQ:]}
	realRow := map[string]int{}
	scaleRow := map[string]int{}
	boundsRow := map[string]int{}
	seen := map[[2]string]int{}
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
		row, _ := cr.FieldPos(0)
		field := func(col string) string { return fmt.Sprintf("row %d: %s", row, col) }
		cell := func(i int) string {
			if i < len(rec) {
				return strings.TrimSpace(rec[i])
			}
			return ""
		}
		// A spreadsheet's plain CSV in Windows-1252, as the answer sheet
		// says it: a name with an accent was "must be plain text (no
		// control characters …) (not UTF-8)".
		for i, c := range rec {
			if !utf8.ValidString(c) {
				col := strconv.Itoa(i + 1)
				if i < len(cols) {
					col = cols[i]
				}
				return nil, &elicit.InputError{Field: field(col), Rule: ruleUTF8,
					Detail: fmt.Sprintf("%s is in another encoding, such as Windows-1252", strconv.Quote(input.Clip(c, 40)))}
			}
		}
		if len(rec) > len(cols) {
			return nil, &elicit.InputError{Field: field("columns"), Rule: elicit.RuleCount,
				Detail: fmt.Sprintf("%d fields, the header has %d", len(rec), len(cols))}
		}
		// Names are printed back to the terminal: the text rule keeps
		// control characters (an ESC sequence, NUL) and broken UTF-8 out.
		a := elicit.SeedAssessment{Probs: probs, Quantiles: make([]float64, len(probs))}
		if a.Expert, err = input.Text(field("expert"), cell(0), input.MaxShortText, true); err != nil {
			return nil, err
		}
		if a.Question, err = input.Text(field("question"), cell(1), input.MaxShortText, true); err != nil {
			return nil, err
		}
		x, err := number(field(cols[2]), cell(2))
		if err != nil {
			return nil, err
		}
		if err := elicit.CheckMagnitude(field(cols[2]), x); err != nil {
			return nil, err
		}
		var b [2]float64
		bounded := false
		if hasBounds {
			if b, bounded, err = seedBounds(field, cell(3), cell(4)); err != nil {
				return nil, err
			}
			if bounded && (x < b[0] || x > b[1]) {
				return nil, &elicit.InputError{Field: field(cols[2]), Rule: elicit.RuleInRange,
					Detail: fmt.Sprintf("%v outside [%v, %v]", x, b[0], b[1])}
			}
		}
		for j := range probs {
			if a.Quantiles[j], err = number(field(cols[firstQ+j]), cell(firstQ+j)); err != nil {
				return nil, err
			}
		}
		if err := a.Validate(); err != nil {
			return nil, renameQuantiles(err, fmt.Sprintf("row %d", row), cols[firstQ:])
		}
		logScale := false
		if hasScale {
			if logScale, err = seedScale(field, cell(firstQ-1), x, b, bounded, a.Quantiles, cols[firstQ:]); err != nil {
				return nil, err
			}
			if first, ok := scaleRow[a.Question]; ok && out.logScale[a.Question] != logScale {
				return nil, &elicit.InputError{Field: field(scaleColumn), Rule: ruleSameScale,
					Detail: fmt.Sprintf("%s here, %s on row %d", scaleWord(logScale), scaleWord(out.logScale[a.Question]), first)}
			} else if !ok {
				scaleRow[a.Question] = row
				if logScale {
					out.logScale[a.Question] = true
				}
			}
		}
		key := [2]string{a.Expert, a.Question}
		if first, dup := seen[key]; dup {
			return nil, &elicit.InputError{Field: field("expert, question"), Rule: elicit.RuleDuplicate,
				Detail: fmt.Sprintf("expert %q and question %q already on row %d", a.Expert, a.Question, first)}
		}
		seen[key] = row
		if first, ok := realRow[a.Question]; ok && out.realisations[a.Question] != x {
			return nil, &elicit.InputError{Field: field(cols[2]), Rule: ruleSameRealisation,
				Detail: fmt.Sprintf("%v here, %v on row %d", x, out.realisations[a.Question], first)}
		} else if !ok {
			realRow[a.Question] = row
			out.realisations[a.Question] = x
		}
		if hasBounds {
			had, seenBefore := out.bounds[a.Question]
			if first, ok := boundsRow[a.Question]; ok && (seenBefore != bounded || had != b) {
				return nil, &elicit.InputError{Field: field("lower, upper"), Rule: ruleSameBounds,
					Detail: fmt.Sprintf("%s here, %s on row %d", boundsText(b, bounded), boundsText(had, seenBefore), first)}
			} else if !ok {
				boundsRow[a.Question] = row
				if bounded {
					out.bounds[a.Question] = b
				}
			}
		}
		out.assessments = append(out.assessments, a)
		out.rows = append(out.rows, row)
	}
	out.hashRows = hashAssessments(b, len(cols))
	if len(out.assessments) == 0 {
		detail := "no assessments after the header"
		if len(out.hashRows) > 0 {
			detail += "; " + hashRowsWords(out.hashRows)
		}
		return nil, &elicit.InputError{Field: "rows", Rule: elicit.RuleCount, Detail: detail}
	}
	return out, nil
}

// hashAssessments finds the rows below the header that CSV skips as
// comments (they start with #) but that hold an assessment: as many
// cells as the header, a number as the realisation. A panel named #1,
// #2, … had those rows dropped without a word. Unlike the answer sheet,
// the file names no panel that would tell such a name from a row put
// out of the count on purpose, so they are not refused: the run says
// which rows it left out (hashRowsWords). The lines are found as the
// answer sheet finds them (answersheet.CommentRows).
func hashAssessments(body []byte, ncols int) []int {
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

// hashRowsWords says which rows were read as comments though they hold
// an assessment, and how to count them.
func hashRowsWords(rows []int) string {
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

// ruleSameRealisation is broken when rows of one question give different
// realisations.
const ruleSameRealisation elicit.Rule = "must be the same on every row of the question"

// ruleSameBounds is broken when rows of one question give different bounds.
const ruleSameBounds elicit.Rule = "must be the same on every row of the question (both empty for a question without bounds)"

// ruleSameScale is broken when rows of one question give different scales.
const ruleSameScale elicit.Rule = "must be the same on every row of the question (empty is uniform)"

// ruleScaleWord is broken by a background cell other than uniform, log-uniform or empty.
const ruleScaleWord elicit.Rule = "must be uniform or log-uniform (empty is uniform)"

// seedScale reads a row's scale cell, and holds a row on the log scale
// to elicit.RuleLogScalePositive here, where the message can name the
// row and the column.
func seedScale(field func(string) string, cell string, x float64, b [2]float64, bounded bool, qs []float64, qcols []string) (bool, error) {
	switch strings.ToLower(cell) {
	case "", "uniform":
		return false, nil
	case "log-uniform":
	default:
		return false, &elicit.InputError{Field: field(scaleColumn), Rule: ruleScaleWord, Detail: fmt.Sprintf("got %q", input.Clip(cell, 40))}
	}
	if !(x > 0) {
		return true, &elicit.InputError{Field: field("realization"), Rule: elicit.RuleLogScalePositive, Detail: fmt.Sprintf("got %v", x)}
	}
	if bounded && !(b[0] >= 0) {
		return true, &elicit.InputError{Field: field("lower"), Rule: elicit.RuleLogScalePositive, Detail: fmt.Sprintf("a lower bound below 0 (%v); 0 leaves the range uncut below", b[0])}
	}
	for j, v := range qs {
		if !(v > 0) {
			return true, &elicit.InputError{Field: field(qcols[j]), Rule: elicit.RuleLogScalePositive, Detail: fmt.Sprintf("got %v", v)}
		}
	}
	return true, nil
}

// scaleWord names a scale in a message.
func scaleWord(log bool) string {
	if log {
		return "log-uniform"
	}
	return "uniform"
}

// ruleBoundsPair is broken when a row gives one bound and not the other.
const ruleBoundsPair elicit.Rule = "must both be given, or both be empty for a question without bounds"

// seedBounds reads a row's lower and upper cells: both empty is a
// question without bounds; both given must be finite, within the
// magnitude rule and in order (the classical model checks that the
// realisation and the quantiles lie inside).
func seedBounds(field func(string) string, lo, hi string) ([2]float64, bool, error) {
	if lo == "" && hi == "" {
		return [2]float64{}, false, nil
	}
	if lo == "" || hi == "" {
		return [2]float64{}, false, &elicit.InputError{Field: field("lower, upper"), Rule: ruleBoundsPair,
			Detail: fmt.Sprintf("lower %q, upper %q", lo, hi)}
	}
	var b [2]float64
	for i, c := range [2]struct{ name, text string }{{"lower", lo}, {"upper", hi}} {
		v, err := number(field(c.name), c.text)
		if err != nil {
			return b, false, err
		}
		if err := elicit.CheckMagnitude(field(c.name), v); err != nil {
			return b, false, err
		}
		b[i] = v
	}
	if !(b[0] < b[1]) {
		return b, false, &elicit.InputError{Field: field("upper"), Rule: elicit.RuleBoundsOrder,
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

func csvError(err error) error {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		return &elicit.InputError{Field: fmt.Sprintf("row %d", pe.Line), Rule: ruleCSVSyntax, Detail: pe.Err.Error()}
	}
	return err
}

const ruleCSVSyntax elicit.Rule = "must be well-formed CSV"

// ruleUTF8 is the answer sheet's rule of its encoding, said of the file.
const ruleUTF8 elicit.Rule = "must be saved as UTF-8 (in a spreadsheet program: CSV UTF-8)"

// parseSeedHeader checks the header and returns the column names and the
// probabilities of the quantile columns.
func parseSeedHeader(header []string) ([]string, []float64, error) {
	cols := make([]string, len(header))
	for i, h := range header {
		cols[i] = strings.ToLower(strings.TrimSpace(strings.TrimPrefix(h, "\ufeff")))
	}
	for i, want := range seedHeader {
		if i >= len(cols) || (cols[i] != want && !(want == "realization" && cols[i] == "realisation")) {
			return nil, nil, &elicit.InputError{Field: fmt.Sprintf("header column %d", i+1), Rule: ruleSeedHeader,
				Detail: fmt.Sprintf("want %q", want)}
		}
	}
	rest := cols[len(seedHeader):]
	switch {
	case len(rest) >= 2 && rest[0] == boundColumns[0] && rest[1] == boundColumns[1]:
		rest = rest[2:]
	case len(rest) >= 1 && (rest[0] == boundColumns[0] || rest[0] == boundColumns[1]):
		return nil, nil, &elicit.InputError{Field: "header column " + strconv.Quote(rest[0]), Rule: ruleSeedHeader,
			Detail: "the bound columns are lower,upper, both, in that order, right after realization"}
	}
	if len(rest) >= 1 && rest[0] == scaleColumn {
		rest = rest[1:]
	}
	var probs []float64
	for _, c := range rest {
		m := quantileColumn.FindStringSubmatch(c)
		if m == nil {
			return nil, nil, &elicit.InputError{Field: "header column " + strconv.Quote(input.Clip(c, 40)), Rule: ruleSeedHeader,
				Detail: "quantile columns are named qNN, e.g. q05, q50, q95"}
		}
		if len(m[1]) > 2 && strings.HasSuffix(m[1], "0") {
			// q100 or q250 would read as 0.1 or 0.25: refuse the ambiguity.
			return nil, nil, &elicit.InputError{Field: "header column " + strconv.Quote(input.Clip(c, 40)), Rule: ruleSeedHeader,
				Detail: "the digits after q are the probability's decimals; drop the trailing 0"}
		}
		p, _ := strconv.ParseFloat("0."+m[1], 64)
		if len(probs) > 0 && !(p > probs[len(probs)-1]) {
			return nil, nil, &elicit.InputError{Field: "header column " + strconv.Quote(input.Clip(c, 40)), Rule: elicit.RuleProbIncreasing,
				Detail: fmt.Sprintf("%v after %v", p, probs[len(probs)-1])}
		}
		if p == 0 {
			return nil, nil, &elicit.InputError{Field: "header column " + strconv.Quote(input.Clip(c, 40)), Rule: elicit.RuleProbOpen, Detail: "got 0"}
		}
		probs = append(probs, p)
	}
	// The classical model scores any increasing probabilities, as the
	// calibration page does for questions asked at 10/50/90; q05, q50 and
	// q95 are the usual ones, not a rule.
	if len(probs) == 0 {
		return nil, nil, &elicit.InputError{Field: "header", Rule: elicit.RuleRequired,
			Detail: "no quantile column; name them qNN, e.g. q05, q50, q95"}
	}
	return cols, probs, nil
}

const ruleSeedHeader elicit.Rule = "header must be expert,question,realization,q05,q50,q95 (lower,upper allowed after realization, then background; other qNN columns allowed, increasing)"

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

// rowError replaces an assessments[i] field in an error of the classical
// model by the CSV row it came from, and quantiles[j] by its column:
// assessments[0].quantiles[1] is "row 2: q50".
func (s *seedCSV) rowError(err error) error {
	var ie *elicit.InputError
	if !errors.As(err, &ie) {
		return err
	}
	for i, row := range s.rows {
		p := fmt.Sprintf("assessments[%d]", i)
		if ie.Field == p {
			c := *ie
			c.Field = fmt.Sprintf("row %d", row)
			return &c
		}
		if rest, ok := strings.CutPrefix(ie.Field, p+"."); ok {
			c := *ie
			c.Field = rest
			return renameQuantiles(&c, fmt.Sprintf("row %d", row), s.qcols)
		}
	}
	return err
}

// writeScoresTable prints the scores as a table.
func writeScoresTable(w io.Writer, s elicit.Scores, optimised bool) error {
	how := "fixed"
	if optimised {
		how = "chosen to maximise the performance-weighted pool's calibration × information, scored as if it were an expert"
	}
	probs := make([]string, len(s.Probs))
	for i, p := range s.Probs {
		probs[i] = strconv.FormatFloat(p, 'g', -1, 64)
	}
	fmt.Fprintf(w, "Calibration questions: %d; probabilities %s; intrinsic range widened by %g\n",
		len(s.Questions), strings.Join(probs, ", "), s.Overshoot)
	var logged []string
	for _, q := range s.Questions {
		if q.LogScale {
			logged = append(logged, q.Question)
		}
	}
	if len(logged) > 0 {
		fmt.Fprintf(w, "Information against the log-uniform background (range and overshoot on ln x): %s\n", strings.Join(logged, ", "))
	}
	// A fixed cut-off is printed as typed: to four figures, 0.53370129
	// would read 0.5337, below a score of 0.5337 it leaves out.
	alpha := strconv.FormatFloat(s.Alpha, 'g', 4, 64)
	if !optimised {
		alpha = strconv.FormatFloat(s.Alpha, 'g', -1, 64)
	}
	below := s.LogAlpha != nil
	if below {
		alpha = elicit.FormatExp(*s.LogAlpha, 4)
	}
	fmt.Fprintf(w, "Cut-off alpha = %s (%s)\n\n", alpha, how)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "expert\tanswered\tcalibration\tinformation\tcal × inf\tweight")
	for _, e := range s.Experts {
		// A score below the cut-off keeps its side of it: 0.080386, not
		// 0.08039 beside a cut-off of 0.08039 that left it out.
		digits := 4
		if e.Calibration < s.Alpha {
			digits = elicit.SideDigits(e.Calibration, s.Alpha, 4)
		}
		cal, comb := scoreTexts(e.Calibration, e.LogCalibration, e.Information, e.Combined, digits)
		below = below || elicit.BelowDouble(e.Calibration, e.LogCalibration)
		fmt.Fprintf(tw, "%s\t%d\t%s\t%.4f\t%s\t%.4g\n", e.Expert, e.N, cal, e.Information, comb, e.Weight)
	}
	p := s.Pooled
	cal, comb := scoreTexts(p.Calibration, p.LogCalibration, p.Information, p.Combined, 4)
	below = below || elicit.BelowDouble(p.Calibration, p.LogCalibration)
	fmt.Fprintf(tw, "%s\t%d\t%s\t%.4f\t%s\t\n", "pooled (performance weights)", p.N, cal, p.Information, comb)
	if err := tw.Flush(); err != nil {
		return err
	}
	if below {
		_, err := fmt.Fprintln(w, "\nScores below 2.2e-308, the smallest a double holds at full precision, are worked in logarithms and written from them.")
		return err
	}
	return nil
}

// scoreTexts writes a calibration score and calibration × information,
// from the score's logarithm where the score is below the smallest
// double (elicit.FormatExp): never a 0 that is not the score.
func scoreTexts(c, logC, info, combined float64, digits int) (string, string) {
	if !elicit.BelowDouble(c, logC) {
		return strconv.FormatFloat(c, 'g', digits, 64), strconv.FormatFloat(combined, 'g', 4, 64)
	}
	comb := "0"
	if info > 0 {
		comb = elicit.FormatExp(logC+math.Log(info), 4)
	}
	return elicit.FormatExp(logC, 4), comb
}

// writeLeaveOneOut prints the robustness report as a table.
func writeLeaveOneOut(w io.Writer, r elicit.LeaveOneOutReport, s elicit.Scores) error {
	logNote := ""
	for _, c := range s.Questions {
		if c.LogScale {
			logNote = "; against the log-uniform background, of ln x against its intrinsic range on ln x"
		}
	}
	// How many reruns of each kind there are, and how many were done: a
	// largest shift of 0 over no rerun would claim a steadiness nothing
	// tested.
	kinds, done := rerunKinds(r.Cases), 0
	for _, c := range r.Cases {
		if c.Error == "" {
			done++
		}
	}
	largest := fmt.Sprintf("%.4g", r.MaxShift)
	if done == 0 {
		largest = "none, as no rerun could be done"
	}
	fmt.Fprintf(w, "\nLeave one out: largest shift of the pooled 5/50/95 percentiles on any calibration question, as a fraction of its range (its bounds where given, else its intrinsic range%s): %s\n\n", logNote, largest)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "left out\tname\talpha\tlargest shift\tnote")
	for _, c := range r.Cases {
		note := rerunNote(c, kinds)
		if note == "" && len(c.Unpooled) > 0 {
			note = "no weighted expert on " + strings.Join(c.Unpooled, ", ")
		}
		if c.Error != "" {
			fmt.Fprintf(tw, "%s\t%s\t\t\t%s\n", c.LeftOut, c.Name, note)
			continue
		}
		alpha := strconv.FormatFloat(c.Alpha, 'g', 4, 64)
		if c.LogAlpha != nil {
			alpha = elicit.FormatExp(*c.LogAlpha, 4) // not 0, which is not the cut-off
		}
		fmt.Fprintf(tw, "%s\t%s\t%s\t%.4g\t%s\n", c.LeftOut, c.Name, alpha, c.Shift, note)
	}
	return tw.Flush()
}

package record

import (
	"encoding/csv"
	"fmt"
	"io"
	"strconv"
	"strings"

	"github.com/parley-elicit/parley/elicit/calibsheet"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// WriteCalibrationCSV writes the answers a calibration page scores as a
// calibration sheet, the form `parley calibrate --input` reads
// (calibsheet.Read, whose columns these are): a header
// expert,question,realization,lower,upper and one qNN column per
// probability, then one row per scored answer (set.Assessments, in its
// order), with each question's true value and bounds, so that the command
// recomputes the page's scores and weights outside the server. Experts
// are named by their display names (two experts of one name are told
// apart by their ids, since the command keys answers by name); questions
// by Q and their position, with their quantity and units in the comment
// lines above the header. alpha, when not nil, is the page's fixed
// cut-off, given in the comment's command. Names that a spreadsheet would
// run as a formula are prefixed with an apostrophe, as in WriteCSV, and so
// are names starting with #, which the command would read as comments.
// When a scored question is on the log scale (workshop.Question.LogScale)
// a column background follows upper, log-uniform or uniform on each row.
func WriteCalibrationCSV(w io.Writer, title string, set workshop.CalibrationSet, alpha *float64) error {
	header := []string{calibsheet.ColumnExpert, calibsheet.ColumnQuestion, calibsheet.ColumnRealisation,
		calibsheet.ColumnLower, calibsheet.ColumnUpper}
	scaled := len(set.LogScale) > 0
	if scaled {
		header = append(header, calibsheet.ColumnBackground)
	}
	for _, p := range set.Probs {
		c, err := calibsheet.QuantileColumn(p)
		if err != nil {
			return err
		}
		header = append(header, c)
	}
	experts := expertColumn(set.Experts)
	questions := map[string]workshop.Question{}
	var b strings.Builder
	fmt.Fprintf(&b, "# Calibration answers scored for the workshop %s, written by Parley.\n", oneLine(title))
	for _, q := range set.Questions {
		questions[workshop.SeedQuestionKey(q.ID)] = q
		units := ""
		if q.Units != "" {
			units = " (" + oneLine(q.Units) + ")"
		}
		fmt.Fprintf(&b, "# Q%d: %s%s\n", q.Position, oneLine(q.Quantity), units)
	}
	cmd := "parley calibrate --input FILE"
	if alpha != nil {
		cmd += " --alpha " + strconv.FormatFloat(*alpha, 'g', -1, 64)
	}
	fmt.Fprintf(&b, "# Score them again with: %s\n", cmd)
	if _, err := io.WriteString(w, b.String()); err != nil {
		return err
	}
	cw := csv.NewWriter(w)
	if err := cw.Write(header); err != nil {
		return err
	}
	for _, a := range set.Assessments {
		q, ok := questions[a.Question]
		if !ok {
			return fmt.Errorf("record: calibration answer to unknown question %q", a.Question)
		}
		name, ok := experts[a.Expert]
		if !ok {
			return fmt.Errorf("record: calibration answer by unknown expert %q", a.Expert)
		}
		bounds := set.Bounds[a.Question]
		name = cell(name)
		if strings.HasPrefix(name, "#") {
			// The command reads a line starting with # as a comment: the
			// row would be skipped and the scores would change.
			name = "'" + name
		}
		row := []string{name, "Q" + strconv.Itoa(q.Position)}
		row = append(row, floats(set.Realisations[a.Question], bounds[0], bounds[1])...)
		if scaled {
			scale := calibsheet.BackgroundUniform
			if set.LogScale[a.Question] {
				scale = calibsheet.BackgroundLogUniform
			}
			row = append(row, scale)
		}
		row = append(row, floats(a.Quantiles...)...)
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// expertColumn names each expert by key: the display name, or the name
// and id where two experts share a name.
func expertColumn(experts []workshop.Expert) map[string]string {
	count := map[string]int{}
	for _, e := range experts {
		count[strings.ToLower(strings.TrimSpace(e.Name))]++
	}
	out := map[string]string{}
	for _, e := range experts {
		name := e.Name
		if count[strings.ToLower(strings.TrimSpace(e.Name))] > 1 {
			name = fmt.Sprintf("%s (expert %d)", e.Name, e.ID)
		}
		out[workshop.SeedExpertKey(e.ID)] = name
	}
	return out
}

// oneLine keeps a comment on its line, and keeps each cell a spreadsheet
// splits the line into from running as a formula. The line starts with
// "#"; a spreadsheet splits it at each comma (at each semicolon where that
// is the list separator) whatever the command does with it, and a title
// "Seals,=HYPERLINK(…)" made a cell that ran. A cell whose first letter
// after spaces and quotes is one cell guards (=, +, -, @) gets the same
// apostrophe before it.
func oneLine(s string) string {
	s = strings.Join(strings.Fields(s), " ")
	var b strings.Builder
	cellStarts := false
	for _, r := range s {
		if cellStarts {
			switch {
			case r == ' ' || r == '"':
			case strings.ContainsRune("=+-@", r):
				b.WriteByte('\'')
				cellStarts = false
			default:
				cellStarts = false
			}
		}
		b.WriteRune(r)
		if r == ',' || r == ';' {
			cellStarts = true
		}
	}
	return b.String()
}

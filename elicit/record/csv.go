package record

import (
	"encoding/csv"
	"io"
	"strconv"
	"strings"
	"time"

	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// csvHeader names the columns of WriteCSV, one row per revision.
var csvHeader = []string{
	"workshop_id", "workshop", "question_id", "question", "expert_id", "expert",
	"revision_id", "round", "at", "entered_by", "channel", "reason", "format", "stated",
	"alpha", "beta", "lower", "upper", "sse", "max_prob_error", "p05", "p50", "p95", "warnings",
	"units", "stated_as_typed", "typed_unit",
	"sheet_file", "sheet_row", "sheet_sha256", "withdrawn",
}

// WriteCSV writes one row per revision, oldest first. Stated values are
// listed in the question's order, separated by spaces; for the interval
// format they are lowest, highest, best, confidence. "stated" holds them
// on the question's scale with the confidence as a probability (0.8);
// "stated_as_typed" holds them as the expert typed them, percentages as
// percentages and the confidence in percent (80), and "typed_unit" names
// their unit ("%" or the question's units; for the interval format also
// the confidence's). The question's units are in "units". A revision read
// from an answer sheet names the file, its row and the file's SHA-256
// ("sheet_file", "sheet_row", "sheet_sha256"; workshop.SheetSources),
// empty otherwise. "withdrawn" is true for a revision the facilitator
// withdrew (nobody's answer; the decision log says why), false
// otherwise. Text that a
// spreadsheet would run as a formula is prefixed with an apostrophe.
func (r Record) WriteCSV(w io.Writer) error {
	questions := map[int64]workshop.Question{}
	for _, q := range r.Questions {
		questions[q.ID] = q.Question
	}
	experts := map[int64]string{}
	for _, e := range r.Experts {
		experts[e.ID] = e.Name
	}
	cw := csv.NewWriter(w)
	if err := cw.Write(csvHeader); err != nil {
		return err
	}
	for _, rv := range r.Revisions {
		q := questions[rv.QuestionID]
		row := []string{
			strconv.FormatInt(r.Workshop.ID, 10), cell(r.Workshop.Title),
			strconv.FormatInt(q.ID, 10), cell(q.Quantity),
			strconv.FormatInt(rv.ExpertID, 10), cell(experts[rv.ExpertID]),
			strconv.FormatInt(rv.ID, 10), strconv.Itoa(rv.Round), rv.At.UTC().Format(time.RFC3339Nano),
			string(rv.EnteredBy), string(rv.Channel), cell(rv.Reason), string(q.Format), stated(q.Format, rv.Answer),
		}
		if f := rv.Fit; f != nil {
			codes := make([]string, len(f.Warnings))
			for i, w := range f.Warnings {
				codes[i] = w.Code
			}
			row = append(row, floats(f.Dist.Alpha, f.Dist.Beta.Beta, f.Dist.Lower, f.Dist.Upper,
				f.SSE, f.MaxProbError, f.Percentiles.P05, f.Percentiles.P50, f.Percentiles.P95)...)
			row = append(row, strings.Join(codes, " "))
		} else {
			row = append(row, make([]string, 9)...)
			row = append(row, cell(rv.FitError))
		}
		typed, unit := asTyped(q, rv.Answer)
		row = append(row, cell(q.Units), typed, cell(unit))
		if src := rv.Sheet; src != nil {
			row = append(row, cell(src.File), strconv.Itoa(src.Row), src.SHA256)
		} else {
			row = append(row, "", "", "")
		}
		row = append(row, strconv.FormatBool(rv.Withdrawn))
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

func stated(f workshop.AnswerFormat, a workshop.Answer) string {
	switch f {
	case workshop.FormatInterval:
		return strings.Join(floats(a.Lowest, a.Highest, a.Best, a.Confidence), " ")
	case workshop.FormatChips:
		parts := make([]string, len(a.Counts))
		for i, c := range a.Counts {
			parts[i] = strconv.Itoa(c)
		}
		return strings.Join(parts, " ")
	}
	return strings.Join(floats(a.Values...), " ")
}

// asTyped is an answer's values as the expert typed them, separated by
// spaces, and their unit.
func asTyped(q workshop.Question, a workshop.Answer) (values, unit string) {
	unit = q.Units
	if a.Percent {
		unit = "%"
	}
	typed := func(xs ...float64) []string {
		out := make([]string, len(xs))
		for i, x := range xs {
			out[i] = input.Typed(x, a.Percent)
		}
		return out
	}
	switch q.Format {
	case workshop.FormatInterval:
		vs := append(typed(a.Lowest, a.Highest, a.Best), input.Typed(a.Confidence, true))
		if unit == "" {
			return strings.Join(vs, " "), "confidence in %"
		}
		return strings.Join(vs, " "), unit + "; confidence in %"
	case workshop.FormatChips:
		return stated(q.Format, a), "chips per bin"
	}
	return strings.Join(typed(a.Values...), " "), unit
}

func floats(xs ...float64) []string {
	out := make([]string, len(xs))
	for i, x := range xs {
		out[i] = strconv.FormatFloat(x, 'g', -1, 64)
	}
	return out
}

// cell guards free text against spreadsheet formula injection (OWASP,
// "CSV Injection").
func cell(s string) string {
	if s != "" && strings.ContainsRune("=+-@\t\r", rune(s[0])) {
		return "'" + s
	}
	return s
}

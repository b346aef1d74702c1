package record

import (
	"encoding/csv"
	"io"
	"strconv"
	"strings"
	"time"
)

// PriorsCSVHeader is the header of the agreed-priors CSV, a public
// contract (`parley export --format priors` and the web download). Two
// columns travel with every row, since a row is often copied on alone:
// invented ("true" for a demonstration workshop's made-up data) and
// caution (Caution, the note the JSON record and the report carry). The
// last, warnings, is the prior's own warnings as the JSON record's
// agreed_prior carries them, one "code: message" per line, empty when
// there is none: a 5% point written as 0 says there how far from 0 it
// lies. After it, retired is "true" for a question the facilitator
// retired (hidden from the experts, kept in the record) after its prior
// was agreed: the row stays, since the record keeps the prior, but a
// project lead taking the file into a study must not read it as a prior
// in use (the report's table leaves such a question out). Last,
// pool_changed is "true" for a prior agreed from the pool when the pool
// has moved since (Record.PoolChange: an expert revised, joined or left,
// or other weights are in force): the prior still stands for the pool
// as it was agreed, as the report and the question's page say beside it.
var PriorsCSVHeader = []string{
	"question_id", "quantity", "units", "lower", "upper", "alpha", "beta",
	"mean", "sd", "q05", "q50", "q95", "source", "rationale", "agreed_at",
	"invented", "caution", "warnings", "retired", "pool_changed",
}

// WritePriorsCSV writes one row per question with an agreed prior, in
// the questions' order: the prior in force, with the very numbers of the
// JSON record (Prior's mean, SD and percentiles, shortest
// round-trip decimals), RFC 4180 quoting (encoding/csv), and text cells
// that a spreadsheet would read as a formula prefixed with ' as in
// WriteCSV.
func (r Record) WritePriorsCSV(w io.Writer) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(PriorsCSVHeader); err != nil {
		return err
	}
	for _, q := range r.Questions {
		a := q.AgreedPrior
		if a == nil {
			continue
		}
		row := []string{strconv.FormatInt(q.ID, 10), cell(q.Quantity), cell(q.Units)}
		row = append(row, floats(a.Dist.Lower, a.Dist.Upper, a.Dist.Alpha, a.Dist.Beta.Beta,
			a.Mean, a.SD, a.Percentiles.P05, a.Percentiles.P50, a.Percentiles.P95)...)
		source := string(a.Source)
		if words := a.ConstructionWords(); words != "" {
			source += ": " + words // which construction, and its inputs
		}
		row = append(row, cell(source), cell(a.Rationale), a.At.UTC().Format(time.RFC3339Nano),
			strconv.FormatBool(r.Workshop.Invented), Caution, cell(warningLines(a.Warnings)), strconv.FormatBool(q.Retired))
		c, ok := r.PoolChange(q)
		row = append(row, strconv.FormatBool(ok && c.Any()))
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// warningLines writes warnings one "code: message" per line.
func warningLines(ws []Warning) string {
	lines := make([]string, len(ws))
	for i, w := range ws {
		lines[i] = w.Code + ": " + w.Message
	}
	return strings.Join(lines, "\n")
}

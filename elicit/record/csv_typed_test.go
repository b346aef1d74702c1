package record

import (
	"bytes"
	"encoding/csv"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/elicit/workshop/workshoptest"
)

// TestWriteCSVAsTyped: besides "stated" on the question's scale, every
// revision's answer is written as the expert typed it, percentages as
// percentages and the confidence in percent, with its unit in
// "typed_unit" and the question's units in "units". Worked by hand:
// an interval typed as 15%, 45%, 25% and 80% sure is stored as 0.15,
// 0.45, 0.25 and 0.8.
func TestWriteCSVAsTyped(t *testing.T) {
	src := workshoptest.PumpSeals()
	var quant, interval workshop.Question
	for _, q := range src.Questions {
		switch {
		case q.Format == workshop.FormatInterval && interval.ID == 0:
			interval = q
		case q.Format == workshop.FormatQuantiles && len(q.Probs) == 3 && quant.ID == 0:
			quant = q
		}
	}
	if quant.ID == 0 || interval.ID == 0 {
		t.Fatal("the invented workshop lacks a quantile or an interval question")
	}
	e := src.Experts[0].ID
	at := workshoptest.T0.Add(30 * time.Minute)
	src.Revisions = append(src.Revisions,
		workshop.Revision{ID: 901, QuestionID: interval.ID, ExpertID: e, Round: 1, At: at,
			Answer: workshop.Answer{Lowest: 0.15, Highest: 0.45, Best: 0.25, Confidence: 0.8, Percent: true}},
		workshop.Revision{ID: 902, QuestionID: quant.ID, ExpertID: e, Round: 1, At: at,
			Answer: workshop.Answer{Values: []float64{0.07, 0.2, 0.51}, Percent: true}},
		workshop.Revision{ID: 903, QuestionID: quant.ID, ExpertID: e, Round: 1, At: at,
			Answer: workshop.Answer{Values: []float64{0.07, 0.2, 0.51}}},
	)
	r, err := BuildHistory(src, workshoptest.T0.Add(time.Hour))
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := r.WriteCSV(&buf); err != nil {
		t.Fatal(err)
	}
	rows, err := csv.NewReader(&buf).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	col := map[string]int{}
	for i, h := range rows[0] {
		col[h] = i
	}
	byID := map[string][]string{}
	for _, row := range rows[1:] {
		byID[row[col["revision_id"]]] = row
	}
	for _, c := range []struct {
		id, stated, typed, unit string
	}{
		{"901", "0.15 0.45 0.25 0.8", "15 45 25 80", "%; confidence in %"},
		{"902", "0.07 0.2 0.51", "7 20 51", "%"},
		{"903", "0.07 0.2 0.51", "0.07 0.2 0.51", quant.Units},
	} {
		row := byID[c.id]
		if row == nil {
			t.Fatalf("no row for revision %s", c.id)
		}
		if got := row[col["stated"]]; got != c.stated {
			t.Errorf("revision %s stated %q, want %q", c.id, got, c.stated)
		}
		if got := row[col["stated_as_typed"]]; got != c.typed {
			t.Errorf("revision %s stated_as_typed %q, want %q", c.id, got, c.typed)
		}
		if got := row[col["typed_unit"]]; got != c.unit {
			t.Errorf("revision %s typed_unit %q, want %q", c.id, got, c.unit)
		}
		if got := row[col["units"]]; got != cell(quant.Units) && c.id != "901" {
			t.Errorf("revision %s units %q, want %q", c.id, got, quant.Units)
		}
	}
}

package calibsheet_test

import (
	"reflect"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/calibsheet"
	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// TestReadsWhatTheCalibrationPageWrites: the calibration page's download
// (record.WriteCalibrationCSV, GET /w/{id}/calibration.csv) is read back
// as the set it was written from: every answer in its order, its
// probabilities and quantiles to the last bit, each question's true
// value, bounds and background, with the experts named as the download
// names them (two experts of one name told apart by id, an apostrophe
// before a name a spreadsheet would run or the reader would take for a
// comment) and the questions as Q and their position. Probabilities
// without a short decimal (1/3) and far into a tail (0.001) are among
// them. An invented panel and questions.
func TestReadsWhatTheCalibrationPageWrites(t *testing.T) {
	experts := []workshop.Expert{{ID: 1, Name: "Ines"}, {ID: 2, Name: "ines"}, {ID: 3, Name: "=Rafe"}, {ID: 4, Name: "#4 Oda"}}
	names := []string{"Ines (expert 1)", "ines (expert 2)", "'=Rafe", "'#4 Oda"}
	questions := []workshop.Question{
		{ID: 7, Position: 2, Quantity: "gasket failures in the first year (invented)", Lower: 0, Upper: 1},
		{ID: 9, Position: 5, Quantity: "hours to first arc fault (invented)", Lower: 0, Upper: 1e6, LogScale: true},
	}
	for _, c := range []struct {
		name  string
		probs []float64
		log   bool
	}{
		{"5/50/95", []float64{0.05, 0.5, 0.95}, false},
		{"a third and a tail, one question on the log scale", []float64{0.001, 1.0 / 3, 0.5, 0.975}, true},
	} {
		set := workshop.CalibrationSet{Probs: c.probs, Questions: questions, Experts: experts,
			Realisations: map[string]float64{}, Bounds: map[string][2]float64{}}
		if c.log {
			set.LogScale = map[string]bool{workshop.SeedQuestionKey(9): true}
		}
		want := calibsheet.Sheet{Realisations: map[string]float64{}, Bounds: map[string][2]float64{}, LogScale: map[string]bool{}}
		for qi, q := range questions {
			key, name := workshop.SeedQuestionKey(q.ID), "Q"+[]string{"2", "5"}[qi]
			set.Realisations[key] = 0.3 + float64(qi)*4000.1
			set.Bounds[key] = [2]float64{q.Lower, q.Upper}
			want.Realisations[name] = set.Realisations[key]
			want.Bounds[name] = set.Bounds[key]
			if set.LogScale[key] {
				want.LogScale[name] = true
			}
			for ei, e := range experts {
				qs := make([]float64, len(c.probs))
				for j := range qs {
					qs[j] = (0.1 + float64(j) + float64(ei)/7) * (1 + float64(qi)*999.9) / 8
				}
				set.Assessments = append(set.Assessments, elicit.SeedAssessment{Expert: workshop.SeedExpertKey(e.ID), Question: key, Probs: c.probs, Quantiles: qs})
				want.Assessments = append(want.Assessments, elicit.SeedAssessment{Expert: names[ei], Question: name, Probs: c.probs, Quantiles: qs})
			}
		}
		var file strings.Builder
		if err := record.WriteCalibrationCSV(&file, "Gaskets (invented)", set, nil); err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		got, err := calibsheet.Read(strings.NewReader(file.String()))
		if err != nil {
			t.Fatalf("%s: %v\n%s", c.name, err, file.String())
		}
		if !reflect.DeepEqual(got.Assessments, want.Assessments) {
			t.Errorf("%s: read\n%+v\nwant\n%+v\nfrom\n%s", c.name, got.Assessments, want.Assessments, file.String())
		}
		if !reflect.DeepEqual(got.Realisations, want.Realisations) || !reflect.DeepEqual(got.Bounds, want.Bounds) || !reflect.DeepEqual(got.LogScale, want.LogScale) {
			t.Errorf("%s: read true values %v, bounds %v, log scale %v; want %v, %v, %v", c.name,
				got.Realisations, got.Bounds, got.LogScale, want.Realisations, want.Bounds, want.LogScale)
		}
		if got.CommentNote() != "" {
			t.Errorf("%s: %s", c.name, got.CommentNote())
		}
	}
}

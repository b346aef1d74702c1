package record

import (
	"bytes"
	"encoding/json"
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/elicit/workshop/workshoptest"
)

// The record carries every batch of data and the update of the current
// agreed prior with their totals, by the same functions as `parley
// update` (elicit.Posterior, EqualTailed, HDI, ConflictCheck).
func TestRecordCarriesTheUpdate(t *testing.T) {
	r := buildInvented(t)
	if len(r.StudyData) != 2 {
		t.Fatalf("study_data %+v", r.StudyData)
	}
	var q *Question
	for i := range r.Questions {
		if r.Questions[i].ID == 11 {
			q = &r.Questions[i]
		}
	}
	u := q.Update
	if u == nil {
		t.Fatalf("no update: %q", q.UpdateError)
	}
	// The current prior Beta(4.2, 17.9) and 9 in 60: Beta(13.2, 68.9).
	prior := elicit.Beta{Alpha: 4.2, Beta: 17.9}
	if u.Successes != 9 || u.Trials != 60 || u.Batches != 2 || u.Prior != prior ||
		math.Abs(u.Posterior.Alpha-13.2) > 1e-12 || math.Abs(u.Posterior.Beta-68.9) > 1e-12 {
		t.Fatalf("update %+v", u)
	}
	lo, hi, _ := elicit.EqualTailed(u.Posterior, 0.95)
	hlo, hhi, _ := elicit.HDI(u.Posterior, 0.95)
	c, _ := elicit.ConflictCheck(prior, 9, 60)
	if u.Interval != [2]float64{lo, hi} || u.HDI != [2]float64{hlo, hhi} || u.Conflict != c || u.Reading == "" {
		t.Errorf("update %+v", u)
	}
	// Questions without data carry no update.
	for _, q := range r.Questions {
		if q.ID != 11 && (q.Update != nil || q.UpdateError != "") {
			t.Errorf("question %d: update %+v %q", q.ID, q.Update, q.UpdateError)
		}
	}
}

// A prior made by a quick construction keeps its inputs, which make its
// Beta again; the record says so, matches the schema and reads back.
func TestConstructedPriorInTheRecord(t *testing.T) {
	src := workshoptest.PumpSeals()
	in := elicit.ConstructionInput{Method: elicit.MethodEquivalentSample, Successes: 3, Trials: 25, Upper: 1}
	c, err := elicit.Construct(in)
	if err != nil {
		t.Fatal(err)
	}
	src.Priors = append(src.Priors, workshop.AgreedPrior{ID: 43, QuestionID: 11, Source: workshop.PriorFromConstruction,
		Dist: c.Dist, Construction: &in, Rationale: "about 3 in 25", Round: 2, At: t0.Add(20 * 60e9)})
	r, err := Build(src, t0)
	if err != nil {
		t.Fatal(err)
	}
	if err := compileSchema(t).Validate(asJSONValue(t, r)); err != nil {
		t.Fatalf("schema: %v", err)
	}
	var buf bytes.Buffer
	if err := r.WriteJSON(&buf); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(buf.String(), `"method": "equivalent_sample"`) {
		t.Errorf("the construction is not in the JSON")
	}
	back, err := Parse(&buf)
	if err != nil {
		t.Fatal(err)
	}
	a, _ := json.Marshal(r)
	b, _ := json.Marshal(back)
	if !bytes.Equal(a, b) {
		t.Errorf("read back differs")
	}
	if got := back.Questions[0].AgreedPrior; got.Construction == nil || *got.Construction != in || got.Dist.Alpha != 3 || got.Dist.Beta.Beta != 22 {
		t.Errorf("agreed prior %+v", got)
	}
	// Its Beta must be the construction's.
	r.Questions[0].PriorHistory[2].Dist.Beta.Beta = 23
	if err := r.Validate(); !hasField(err, "questions[0].prior_history[2].dist") {
		t.Errorf("a Beta its construction does not make: %v", err)
	}
}

func hasField(err error, field string) bool {
	var ie *elicit.InputError
	return errors.As(err, &ie) && ie.Field == field
}

// Bad study data in an import are refused with their path.
func TestValidateRefusesBadStudyData(t *testing.T) {
	for _, c := range []struct {
		name   string
		break_ func(*Record)
		field  string
	}{
		{"more successes than trials", func(r *Record) { r.StudyData[0].Successes = 26 }, "study_data[0].successes"},
		{"no trials", func(r *Record) { r.StudyData[1].Trials = 0 }, "study_data[1].trials"},
		{"unknown question", func(r *Record) { r.StudyData[0].QuestionID = 99 }, "study_data[0].question_id"},
		{"question without a prior", func(r *Record) { r.StudyData[0].QuestionID = 12 }, "study_data[0].question_id"},
		{"not a date", func(r *Record) { r.StudyData[0].ObservedOn = "31.05.2026" }, "study_data[0].observed_on"},
		{"not a day of the calendar", func(r *Record) { r.StudyData[0].ObservedOn = "2026-02-30" }, "study_data[0].observed_on"},
		{"observed after it was recorded", func(r *Record) { r.StudyData[0].ObservedOn = r.StudyData[0].At.AddDate(0, 0, 3).Format("2006-01-02") }, "study_data[0].observed_on"},
		{"no source", func(r *Record) { r.StudyData[0].Source = "" }, "study_data[0].source"},
		{"a prior on other bounds than its question's", func(r *Record) {
			for i := range r.Questions {
				if len(r.Questions[i].PriorHistory) > 0 {
					r.Questions[i].PriorHistory[0].Dist.Upper = 2
					return
				}
			}
		}, "questions[0].prior_history[0].dist.lower"},
		{"a question that is not a proportion", func(r *Record) {
			for i := range r.Questions {
				if r.Questions[i].ID == r.StudyData[0].QuestionID {
					r.Questions[i].Upper = 10
					r.Questions[i].CurrentFits, r.Questions[i].Pool = nil, nil
					var keep []Revision
					for _, rv := range r.Revisions {
						if rv.QuestionID != r.Questions[i].ID {
							keep = append(keep, rv)
						}
					}
					r.Revisions = keep
					for k := range r.Questions[i].PriorHistory {
						r.Questions[i].PriorHistory[k].Dist.Upper = 10
					}
				}
			}
		}, "study_data[0].question_id"},
		{"duplicate id", func(r *Record) { r.StudyData[1].ID = 61 }, "study_data[1].id"},
		{"too many trials together", func(r *Record) { r.StudyData[0].Trials, r.StudyData[1].Trials = 600_000, 600_000 }, "study_data[1].trials"},
	} {
		r := buildInvented(t)
		c.break_(&r)
		if err := r.Validate(); !hasField(err, c.field) {
			t.Errorf("%s: got %v, want field %s", c.name, err, c.field)
		}
	}
	// A record made before Parley kept data reads.
	r := buildInvented(t)
	r.StudyData = nil
	r.Fingerprint, r.Chain = "", nil // nor a chain
	var buf bytes.Buffer
	_ = r.WriteJSON(&buf)
	var doc map[string]json.RawMessage
	if err := json.Unmarshal(buf.Bytes(), &doc); err != nil {
		t.Fatal(err)
	}
	delete(doc, "study_data")
	b, _ := json.Marshal(doc)
	old := string(b)
	if strings.Contains(old, `"study_data":`) {
		t.Fatalf("could not remove study_data")
	}
	if _, err := Parse(strings.NewReader(old)); err != nil {
		t.Errorf("a record without study_data: %v", err)
	}
}

// A batch observed before 1900, recorded before the form refused such a
// day, is taken as the record holds it (workshop.StudyData.ValidateKept):
// refusing it left a workshop that exported but could not be imported.
func TestValidateTakesADayObservedBeforeTheRule(t *testing.T) {
	for _, day := range []string{"0026-05-31", "1899-12-31", "0001-01-01"} {
		r := buildInvented(t)
		r.StudyData[0].ObservedOn = day
		r.seal() // as the record of such a batch is written
		if err := r.Validate(); err != nil {
			t.Errorf("observed on %s: %v", day, err)
		}
	}
}

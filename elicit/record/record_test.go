package record

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"errors"
	"math"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/elicit/workshop/workshoptest"
	"github.com/santhosh-tekuri/jsonschema/v6"
)

var t0 = workshoptest.T0

func buildInvented(t *testing.T) Record {
	t.Helper()
	r, err := Build(workshoptest.PumpSeals(), t0.Add(time.Hour))
	if err != nil {
		t.Fatal(err)
	}
	return r
}

func TestBuildRecordContent(t *testing.T) {
	src := workshoptest.PumpSeals()
	r := buildInvented(t)
	if r.Format != Version || r.Caution != Caution || !r.Generated.Equal(t0.Add(time.Hour)) {
		t.Fatalf("header %d %q %v", r.Format, r.Caution, r.Generated)
	}
	if len(r.Revisions) != len(src.Revisions) {
		t.Fatalf("%d revisions, want %d", len(r.Revisions), len(src.Revisions))
	}
	// Each revision carries exactly what its question's Fit gives.
	for i, rv := range r.Revisions {
		q := src.Questions[0]
		if rv.QuestionID == 12 {
			q = src.Questions[1]
		}
		f, err := q.Fit(src.Revisions[i].Answer)
		if err != nil {
			t.Fatal(err)
		}
		if rv.Fit == nil || rv.Fit.Dist != f.Dist || rv.Fit.SSE != f.SSE || rv.Fit.Percentiles.P50 != f.Percentiles[1] {
			t.Fatalf("revision %d fit %+v, want %+v", rv.ID, rv.Fit, f)
		}
	}
	q1, q2 := r.Questions[0], r.Questions[1]
	// Current fits: Ada's round 2 revision replaces her round 1 one.
	var current []int64
	for _, c := range q1.CurrentFits {
		current = append(current, c.RevisionID)
	}
	if want := []int64{35, 32, 33}; !equalIDs(current, want) {
		t.Fatalf("current revisions %v, want %v", current, want)
	}
	// The pool leaves out the revoked expert and normalises 3:1.
	p := q1.Pool
	if p == nil || len(p.Weights) != 2 || p.Weights[0] != (workshop.ExpertWeight{ExpertID: 21, Weight: 0.75}) || p.Weights[1] != (workshop.ExpertWeight{ExpertID: 22, Weight: 0.25}) {
		t.Fatalf("pool weights %+v, want Ada 0.75, Bela 0.25", p)
	}
	// A mixture's mean is the weighted mean of its components' means, so
	// the pool must be Ada's round 2 fit and Bela's at 3:1 and nothing else.
	ada, bela := r.Revisions[4].Fit.Dist, r.Revisions[1].Fit.Dist
	if want := 0.75*ada.Mean() + 0.25*bela.Mean(); math.Abs(p.Mean-want) > 1e-12 {
		t.Fatalf("pool mean %v, want %v", p.Mean, want)
	}
	if !(p.Percentiles.P05 < p.Percentiles.P50 && p.Percentiles.P50 < p.Percentiles.P95) || p.BestBeta == nil || p.BestBeta.Dist.Validate() != nil {
		t.Fatalf("pool summary %+v", p)
	}
	if q1.AgreedPrior == nil || q1.AgreedPrior.ID != 42 || len(q1.PriorHistory) != 2 || len(q1.AgreedPrior.Snippets) == 0 {
		t.Fatalf("agreed prior %+v, history %d", q1.AgreedPrior, len(q1.PriorHistory))
	}
	// The current prior's summary, which the priors CSV and the report's
	// summary table print. Beta(4.2, 17.9): mean a/(a+b) and SD
	// sqrt(ab/((a+b)²(a+b+1))) by hand; percentiles from R 4.2.2's
	// qbeta(c(0.05, 0.5, 0.95), 4.2, 17.9).
	for _, c := range []struct {
		name      string
		got, want float64
	}{
		{"mean", q1.AgreedPrior.Mean, 0.190045248868778},
		{"sd", q1.AgreedPrior.SD, 0.0816305827830828},
		{"p05", q1.AgreedPrior.Percentiles.P05, 0.0734125890233792},
		{"p50", q1.AgreedPrior.Percentiles.P50, 0.180604212155905},
		{"p95", q1.AgreedPrior.Percentiles.P95, 0.339070562704284},
	} {
		if math.Abs(c.got-c.want) > 1e-9*c.want {
			t.Errorf("agreed prior %s = %.15g, want %.15g", c.name, c.got, c.want)
		}
	}
	if q2.TrueValue != nil {
		t.Fatalf("unrevealed true value exported: %v", *q2.TrueValue)
	}
	if src.Questions[1].TrueValue == nil {
		t.Fatal("Build changed its source's question")
	}
	src.Questions[1].Revealed = true
	revealed, err := Build(src, t0)
	if err != nil {
		t.Fatal(err)
	}
	if tv := revealed.Questions[1].TrueValue; tv == nil || *tv != 0.3 {
		t.Fatalf("revealed true value %v, want 0.3", tv)
	}
}

func equalIDs(a, b []int64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

func compileSchema(t *testing.T) *jsonschema.Schema {
	t.Helper()
	sch, err := jsonschema.NewCompiler().Compile("../../testdata/export.schema.json")
	if err != nil {
		t.Fatal(err)
	}
	return sch
}

func asJSONValue(t *testing.T, v any) any {
	t.Helper()
	b, err := json.Marshal(v)
	if err != nil {
		t.Fatal(err)
	}
	doc, err := jsonschema.UnmarshalJSON(bytes.NewReader(b))
	if err != nil {
		t.Fatal(err)
	}
	return doc
}

func TestRecordMatchesSchema(t *testing.T) {
	sch := compileSchema(t)
	if err := sch.Validate(asJSONValue(t, buildInvented(t))); err != nil {
		t.Fatalf("built record does not match testdata/export.schema.json: %v", err)
	}
	// The schema takes the records of earlier builds too, so it does not
	// require what only they lack; today's record writes it.
	cur := asJSONValue(t, buildInvented(t)).(map[string]any)["questions"].([]any)[0].(map[string]any)["agreed_prior"].(map[string]any)
	for _, k := range []string{"mean", "sd", "percentiles"} {
		if _, ok := cur[k]; !ok {
			t.Errorf("today's record writes an agreed_prior without %q", k)
		}
	}
	// A judgement read from an answer sheet names it.
	doc := asJSONValue(t, buildInvented(t)).(map[string]any)
	doc["revisions"].([]any)[0].(map[string]any)["sheet"] = map[string]any{"file": "", "row": json.Number("2"), "sha256": strings.Repeat("0f", 32)}
	if err := sch.Validate(doc); err != nil {
		t.Fatalf("a revision with its answer sheet does not match the schema: %v", err)
	}
	// A withdrawn judgement says so, with its event's kind.
	doc = asJSONValue(t, buildInvented(t)).(map[string]any)
	doc["revisions"].([]any)[0].(map[string]any)["withdrawn"] = true
	doc["events"] = append(doc["events"].([]any), map[string]any{"id": json.Number("9999"), "workshop_id": doc["workshop"].(map[string]any)["id"],
		"question_id": doc["revisions"].([]any)[0].(map[string]any)["question_id"], "kind": "revision_withdrawn",
		"at": "2026-01-01T00:00:00Z", "reason": "entered against the wrong expert (invented)", "detail": `{"revision_id":1,"expert_id":1,"round":1}`})
	if err := sch.Validate(doc); err != nil {
		t.Fatalf("a withdrawn revision and its event do not match the schema: %v", err)
	}
	// A workshop with nothing in it yet is a valid record too.
	empty, err := Build(workshop.Snapshot{Workshop: workshoptest.PumpSeals().Workshop,
		Weights: workshop.Weights{WorkshopID: 7, Scheme: workshop.WeightsEqual}}, t0)
	if err != nil {
		t.Fatal(err)
	}
	if err := sch.Validate(asJSONValue(t, empty)); err != nil {
		t.Fatalf("empty record does not match the schema: %v", err)
	}
	// A record narrowed to one question, with its one_question.
	one, err := buildInvented(t).ForQuestion(12)
	if err != nil {
		t.Fatal(err)
	}
	if err := sch.Validate(asJSONValue(t, one)); err != nil {
		t.Fatalf("a record narrowed to one question does not match the schema: %v", err)
	}
}

func TestSchemaRejects(t *testing.T) {
	sch := compileSchema(t)
	tests := []struct {
		name   string
		mutate func(doc map[string]any)
	}{
		{"missing caution", func(d map[string]any) { delete(d, "caution") }},
		{"missing format marker", func(d map[string]any) { delete(d, "parley_record") }},
		{"missing revisions", func(d map[string]any) { delete(d, "revisions") }},
		{"revision without fit", func(d map[string]any) {
			delete(d["revisions"].([]any)[0].(map[string]any), "fit")
		}},
		{"hidden true value present", func(d map[string]any) {
			d["questions"].([]any)[1].(map[string]any)["true_value"] = 0.3
		}},
		{"expert with a token", func(d map[string]any) {
			d["experts"].([]any)[0].(map[string]any)["token"] = "abc"
		}},
		{"a sheet without its row", func(d map[string]any) {
			d["revisions"].([]any)[0].(map[string]any)["sheet"] = map[string]any{"file": "answers.csv", "sha256": strings.Repeat("ab", 32)}
		}},
		{"a sheet's SHA-256 not in hex", func(d map[string]any) {
			d["revisions"].([]any)[0].(map[string]any)["sheet"] = map[string]any{"file": "answers.csv", "row": json.Number("2"), "sha256": "answers"}
		}},
		{"unknown answer format", func(d map[string]any) {
			d["questions"].([]any)[0].(map[string]any)["format"] = "guess"
		}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			doc := asJSONValue(t, buildInvented(t)).(map[string]any)
			tt.mutate(doc)
			if err := sch.Validate(doc); err == nil {
				t.Fatal("schema accepted the broken record")
			}
		})
	}
}

// The notation is each language's own: Stan Functions Reference, "Beta
// distribution" (y ~ beta(alpha, beta)); R's ?dbeta (dbeta(x, shape1,
// shape2)); PyMC's API docs for pymc.Beta (alpha=, beta=); JAGS User
// Manual, table of distributions (dbeta(a, b)).
func TestPriorSnippets(t *testing.T) {
	tests := []struct {
		d    elicit.ScaledBeta
		want map[string]string
	}{
		{elicit.Unit(elicit.Beta{Alpha: 4.2, Beta: 17.9}), map[string]string{
			"Stan": "p ~ beta(4.2, 17.9);",
			"R":    "dbeta(p, 4.2, 17.9)",
			"PyMC": `pm.Beta("p", alpha=4.2, beta=17.9)`,
			"JAGS": "p ~ dbeta(4.2, 17.9)",
		}},
		{elicit.ScaledBeta{Beta: elicit.Beta{Alpha: 2, Beta: 3.123456789}, Lower: 10, Upper: 30}, map[string]string{
			"Stan": "p_unit ~ beta(2, 3.12346);  // p = 10 + 20 * p_unit",
			"R":    "dbeta(p_unit, 2, 3.12346)  # p = 10 + 20 * p_unit",
			"PyMC": `pm.Beta("p_unit", alpha=2, beta=3.12346)  # p = 10 + 20 * p_unit`,
			"JAGS": "p_unit ~ dbeta(2, 3.12346)  # p = 10 + 20 * p_unit",
		}},
	}
	for _, tt := range tests {
		got := PriorSnippets(tt.d)
		if len(got) != len(tt.want) {
			t.Fatalf("%d snippets, want %d", len(got), len(tt.want))
		}
		for _, s := range got {
			if s.Code != tt.want[s.Language] {
				t.Errorf("%s: %q, want %q", s.Language, s.Code, tt.want[s.Language])
			}
		}
	}
}

func TestWriteCSV(t *testing.T) {
	r := buildInvented(t)
	var buf bytes.Buffer
	if err := r.WriteCSV(&buf); err != nil {
		t.Fatal(err)
	}
	rows, err := csv.NewReader(&buf).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 1+len(r.Revisions) {
		t.Fatalf("%d rows, want a header and %d", len(rows), len(r.Revisions))
	}
	col := map[string]int{}
	for i, h := range rows[0] {
		col[h] = i
	}
	for i, rv := range r.Revisions {
		row := rows[i+1]
		alpha, err := strconv.ParseFloat(row[col["alpha"]], 64)
		if err != nil || alpha != rv.Fit.Dist.Alpha {
			t.Errorf("row %d alpha %q, want %v", i, row[col["alpha"]], rv.Fit.Dist.Alpha)
		}
		if row[col["revision_id"]] != strconv.FormatInt(rv.ID, 10) {
			t.Errorf("row %d revision %q, want %d", i, row[col["revision_id"]], rv.ID)
		}
	}
	last := rows[len(rows)-1]
	if got := last[col["reason"]]; got != "'-after discussion" {
		t.Errorf("reason cell %q: a leading '-' must be defused", got)
	}
	if got := last[col["stated"]]; got != "0.08 0.18 0.36" {
		t.Errorf("stated %q", got)
	}
	if got := rows[4][col["stated"]]; got != "0.1 0.5 0.25 0.8" {
		t.Errorf("interval stated %q, want lowest highest best confidence", got)
	}
}

func TestForQuestion(t *testing.T) {
	r := buildInvented(t)
	one, err := r.ForQuestion(12)
	if err != nil {
		t.Fatal(err)
	}
	if len(one.Questions) != 1 || len(one.Revisions) != 1 || one.Revisions[0].ID != 34 || len(one.Events) != 1 {
		t.Fatalf("narrowed record: %d questions, %d revisions, %d events", len(one.Questions), len(one.Revisions), len(one.Events))
	}
	if _, err := r.ForQuestion(99); !errors.Is(err, workshop.ErrNotFound) {
		t.Fatalf("missing question: %v", err)
	}
	// The study data go with their question: question 11's two batches
	// stayed in question 12's record, where no question 11 is, and
	// `parley import` refused it (study_data[0].question_id: no question
	// 11 in the record).
	if one.OneQuestion != 12 || r.OneQuestion != 0 {
		t.Errorf("one_question: %d narrowed, %d whole", one.OneQuestion, r.OneQuestion)
	}
	if one.StudyData == nil || len(one.StudyData) != 0 {
		t.Errorf("question 12's record carries another question's data (or null): %+v", one.StudyData)
	}
	if err := one.Validate(); err != nil {
		t.Errorf("question 12's record does not read back: %v", err)
	}
	eleven, err := r.ForQuestion(11)
	if err != nil {
		t.Fatal(err)
	}
	if len(eleven.StudyData) != 2 || eleven.Validate() != nil {
		t.Errorf("question 11's record: %d batches of data, %v", len(eleven.StudyData), eleven.Validate())
	}
}

func TestValidateRecord(t *testing.T) {
	if err := buildInvented(t).Validate(); err != nil {
		t.Fatalf("a built record is invalid: %v", err)
	}
	tests := []struct {
		name   string
		mutate func(r *Record)
		field  string
		rule   elicit.Rule
	}{
		{"format", func(r *Record) { r.Format = 2 }, "parley_record", elicit.RuleUnknown},
		{"title", func(r *Record) { r.Workshop.Title = " " }, "workshop.title", elicit.RuleRequired},
		{"long notes", func(r *Record) { r.Workshop.Notes = strings.Repeat("x", input.MaxLongText+1) }, "workshop.notes", input.RuleTooLong},
		{"round", func(r *Record) { r.Workshop.Round = 0 }, "workshop.round", elicit.RuleCountRange},
		{"expert name", func(r *Record) { r.Experts[1].Name = "" }, "experts[1].name", elicit.RuleRequired},
		{"duplicate expert", func(r *Record) { r.Experts[1].ID = 21 }, "experts[1].id", elicit.RuleUnknown},
		{"question bounds", func(r *Record) { r.Questions[0].Upper = -1 }, "questions[0].lower", elicit.RuleBoundsOrder},
		{"question probs", func(r *Record) { r.Questions[0].Probs = []float64{0.5, 0.05, 0.95} }, "questions[0].probs[1]", elicit.RuleProbIncreasing},
		{"duplicate position", func(r *Record) { r.Questions[1].Position = 1 }, "questions[1].position", elicit.RuleUnknown},
		{"question format", func(r *Record) { r.Questions[1].Format = "guess" }, "questions[1].format", elicit.RuleUnknown},
		{"true value outside", func(r *Record) { v := 2.0; r.Questions[1].TrueValue = &v }, "questions[1].true_value", elicit.RuleInRange},
		{"answer values", func(r *Record) { r.Revisions[1].Answer.Values[1] = 0.01 }, "revisions[1].answer.values[1]", elicit.RuleValueIncreasing},
		{"answer out of bounds", func(r *Record) { r.Revisions[4].Answer.Values[2] = 1.5 }, "revisions[4].answer.values[2]", elicit.RuleValueInBounds},
		{"revision question", func(r *Record) { r.Revisions[2].QuestionID = 99 }, "revisions[2].question_id", elicit.RuleUnknown},
		{"revision expert", func(r *Record) { r.Revisions[2].ExpertID = 99 }, "revisions[2].expert_id", elicit.RuleUnknown},
		{"revision round", func(r *Record) { r.Revisions[0].Round = 3 }, "revisions[0].round", elicit.RuleCountRange},
		{"revision time", func(r *Record) { r.Revisions[0].At = time.Time{} }, "revisions[0].at", elicit.RuleRequired},
		{"weight expert", func(r *Record) { r.Weights.ByExpert[99] = 1 }, "weights.by_expert[99]", elicit.RuleUnknown},
		{"negative weight", func(r *Record) { r.Weights.ByExpert[22] = -1 }, "weights.by_expert[22]", elicit.RuleNonNegative},
		{"prior dist", func(r *Record) { r.Questions[0].PriorHistory[1].Dist.Alpha = 0 }, "questions[0].prior_history[1].dist.alpha", elicit.RulePositive},
		{"prior source", func(r *Record) { r.Questions[0].PriorHistory[0].Source = "vote" }, "questions[0].prior_history[0].source", elicit.RuleUnknown},
		{"consensus", func(r *Record) { r.Questions[0].PriorHistory[1].Consensus.Values[0] = 0.5 }, "questions[0].prior_history[1].consensus.values[1]", elicit.RuleValueIncreasing},
		{"event kind", func(r *Record) { r.Events[0].Kind = "coffee" }, "events[0].kind", elicit.RuleUnknown},
		{"event question", func(r *Record) { r.Events[1].QuestionID = 99 }, "events[1].question_id", elicit.RuleUnknown},
		// The current prior contradicting the history the import keeps:
		// it was accepted, and the imported workshop showed another prior
		// than the record's reader was given.
		{"current prior not the last agreed", func(r *Record) { r.Questions[0].AgreedPrior.Dist.Alpha = 20 }, "questions[0].agreed_prior", RulePriorMismatch},
		{"current prior an earlier one", func(r *Record) { r.Questions[0].AgreedPrior.AgreedPrior = r.Questions[0].PriorHistory[0] }, "questions[0].agreed_prior", RulePriorMismatch},
		{"current prior's rationale", func(r *Record) { r.Questions[0].AgreedPrior.Rationale = "something else" }, "questions[0].agreed_prior", RulePriorMismatch},
		{"current prior without a history", func(r *Record) { r.Questions[0].PriorHistory, r.StudyData = r.Questions[0].PriorHistory[:0], nil }, "questions[0].agreed_prior", RulePriorMismatch},
		{"current prior's mean", func(r *Record) { r.Questions[0].AgreedPrior.Mean = 0.9 }, "questions[0].agreed_prior.mean", RulePriorMismatch},
		// A consensus prior that is not its judgement's fit: accepted, the
		// imported prior said one thing and its consensus another.
		{"consensus prior not its judgement's fit", func(r *Record) {
			r.Questions[0].PriorHistory[1].Dist.Alpha = 20
			r.Questions[0].AgreedPrior.AgreedPrior = r.Questions[0].PriorHistory[1]
		}, "questions[0].prior_history[1].dist", RuleFitMismatch},
		{"current prior's median", func(r *Record) { r.Questions[0].AgreedPrior.Percentiles.P50 *= 1.001 }, "questions[0].agreed_prior.percentiles.p50", RulePriorMismatch},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			r := buildInvented(t)
			tt.mutate(&r)
			err := r.Validate()
			var ie *elicit.InputError
			if !errors.As(err, &ie) || ie.Field != tt.field || ie.Rule != tt.rule {
				t.Fatalf("Validate() = %v, want field %q rule %q", err, tt.field, tt.rule)
			}
		})
	}
}

func TestParseRecord(t *testing.T) {
	good, err := json.Marshal(buildInvented(t))
	if err != nil {
		t.Fatal(err)
	}
	if _, err := Parse(bytes.NewReader(good)); err != nil {
		t.Fatalf("Parse of a built record: %v", err)
	}
	tests := []struct {
		name, doc, field string
		rule             elicit.Rule
	}{
		{"not JSON", "{", "record", RuleJSON},
		{"unknown key", strings.Replace(string(good), `"caution"`, `"cautions"`, 1), "cautions", RuleJSON},
		{"wrong type", strings.Replace(string(good), `"parley_record":1`, `"parley_record":"1"`, 1), "parley_record", RuleJSON},
		{"trailing data", string(good) + "{}", "record", RuleJSON},
		{"bad answer", strings.Replace(string(good), `"values":[0.05,0.15,0.35]`, `"values":[0.05,0.15,0.15]`, 1),
			"revisions[0].answer.values[2]", elicit.RuleValueIncreasing},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := Parse(strings.NewReader(tt.doc))
			var ie *elicit.InputError
			if !errors.As(err, &ie) || ie.Field != tt.field || ie.Rule != tt.rule {
				t.Fatalf("Parse = %v, want field %q rule %q", err, tt.field, tt.rule)
			}
		})
	}
}

// FuzzParseRecord: whatever arrives, Parse returns a valid record
// or an *InputError, and never panics.
func FuzzParseRecord(f *testing.F) {
	r, err := Build(workshoptest.PumpSeals(), t0)
	if err != nil {
		f.Fatal(err)
	}
	good, _ := json.Marshal(r)
	f.Add(good)
	f.Add([]byte(`{"parley_record":1}`))
	f.Add([]byte(`[]`))
	f.Fuzz(func(t *testing.T, doc []byte) {
		rec, err := Parse(bytes.NewReader(doc))
		if err != nil {
			var ie *elicit.InputError
			if !errors.As(err, &ie) {
				t.Fatalf("error %v is not an *InputError", err)
			}
			return
		}
		if _, err := Build(workshop.Snapshot{Workshop: rec.Workshop, Experts: rec.Experts,
			Weights: rec.Weights, Events: rec.Events}, t0); err != nil {
			t.Fatalf("a valid record's workshop does not rebuild: %v", err)
		}
	})
}

// The weight rule the pool, the export and the weight forms share.
func TestWeightsOf(t *testing.T) {
	custom := workshop.Weights{Scheme: workshop.WeightsCustom, ByExpert: map[int64]float64{1: 3, 2: 0.5}}
	for _, tc := range []struct {
		w    workshop.Weights
		id   int64
		want float64
	}{
		{workshop.Weights{}, 7, 1},                              // never set: equal
		{workshop.Weights{Scheme: workshop.WeightsEqual}, 7, 1}, // equal ignores any stored map
		{workshop.Weights{Scheme: workshop.WeightsEqual, ByExpert: map[int64]float64{7: 9}}, 7, 1},
		{custom, 1, 3},
		{custom, 2, 0.5},
		{custom, 3, 0}, // an expert the weights do not name is out of the pool
		{workshop.Weights{Scheme: workshop.WeightsPerformance, ByExpert: map[int64]float64{4: 0.2}}, 4, 0.2},
	} {
		if got := tc.w.Of(tc.id); got != tc.want {
			t.Errorf("%+v.Of(%d) = %v, want %v", tc.w, tc.id, got, tc.want)
		}
	}
}

package record

import (
	"bytes"
	"encoding/json"
	"errors"
	"slices"
	"testing"

	"github.com/santhosh-tekuri/jsonschema/v6"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// withoutKeys is the record r written as JSON with the keys named left
// out of question 0's agreed_prior.
func withoutKeys(t *testing.T, r Record, keys ...string) []byte {
	t.Helper()
	b, err := json.Marshal(r)
	if err != nil {
		t.Fatal(err)
	}
	dec := json.NewDecoder(bytes.NewReader(b))
	dec.UseNumber()
	var doc map[string]any
	if err := dec.Decode(&doc); err != nil {
		t.Fatal(err)
	}
	cur := doc["questions"].([]any)[0].(map[string]any)["agreed_prior"].(map[string]any)
	for _, k := range keys {
		delete(cur, k)
	}
	out, err := json.Marshal(doc)
	if err != nil {
		t.Fatal(err)
	}
	return out
}

// A build before 9dcc36a wrote agreed_prior as its Beta, rationale and
// snippets, without the mean, sd and percentiles later builds add
// (testdata/records/demo_7c8c05c_pool.json, demo_d36935e_pool.json): such
// a record reads, as its reader was given no summary to disagree with its
// Beta. A record with only some of the three keys is refused at the
// first one missing, read as 0.
func TestAPriorWrittenWithoutItsSummaryReads(t *testing.T) {
	built := buildInvented(t)
	if built.Questions[0].AgreedPrior == nil {
		t.Fatal("the invented record has no agreed prior on its first question")
	}
	if _, err := Parse(bytes.NewReader(withoutKeys(t, built, "mean", "sd", "percentiles", "warnings"))); err != nil {
		t.Fatalf("a record whose agreed_prior has no summary: %v", err)
	}
	// The schema, which describes every record the import takes, says
	// the same: all three keys or none.
	sch := compileSchema(t)
	schemaDoc := func(b []byte) any {
		doc, err := jsonschema.UnmarshalJSON(bytes.NewReader(b))
		if err != nil {
			t.Fatal(err)
		}
		return doc
	}
	if err := sch.Validate(schemaDoc(withoutKeys(t, built, "mean", "sd", "percentiles", "warnings"))); err != nil {
		t.Errorf("an agreed_prior without its summary does not match the schema: %v", err)
	}
	// Told by its keys, not by its numbers: a summary written as 0s is
	// a summary, and wrong.
	zeros := built
	cur := *built.Questions[0].AgreedPrior
	cur.Mean, cur.SD, cur.Percentiles = 0, 0, workshop.Percentiles{}
	zeros.Questions = slices.Clone(built.Questions)
	zeros.Questions[0].AgreedPrior = &cur
	_, err := Parse(bytes.NewReader(withoutKeys(t, zeros)))
	var ie *elicit.InputError
	if !errors.As(err, &ie) || ie.Field != "questions[0].agreed_prior.mean" || ie.Rule != RulePriorMismatch {
		t.Errorf("a summary of 0s: Parse = %v, want questions[0].agreed_prior.mean: %s", err, RulePriorMismatch)
	}
	// Without its summary a prior's warnings, where it gives any, are
	// still its Beta's own: made-up ones are refused.
	madeUp := built
	cur = *built.Questions[0].AgreedPrior
	cur.Warnings = []Warning{{Code: "made-up-code", Message: "invented"}}
	madeUp.Questions = slices.Clone(built.Questions)
	madeUp.Questions[0].AgreedPrior = &cur
	_, err = Parse(bytes.NewReader(withoutKeys(t, madeUp, "mean", "sd", "percentiles")))
	if !errors.As(err, &ie) || ie.Field != "questions[0].agreed_prior.warnings" || ie.Rule != RulePriorMismatch {
		t.Errorf("made-up warnings without a summary: Parse = %v, want questions[0].agreed_prior.warnings: %s", err, RulePriorMismatch)
	}
	for _, c := range []struct {
		name  string
		keys  []string
		field string
	}{
		{"mean left out", []string{"mean"}, "questions[0].agreed_prior.mean"},
		{"sd and percentiles left out", []string{"sd", "percentiles"}, "questions[0].agreed_prior.sd"},
		{"percentiles left out", []string{"percentiles"}, "questions[0].agreed_prior.percentiles.p05"},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, err := Parse(bytes.NewReader(withoutKeys(t, built, c.keys...)))
			var ie *elicit.InputError
			if !errors.As(err, &ie) || ie.Field != c.field || ie.Rule != RulePriorMismatch {
				t.Fatalf("Parse = %v, want %s: %s", err, c.field, RulePriorMismatch)
			}
			if sch.Validate(schemaDoc(withoutKeys(t, built, c.keys...))) == nil {
				t.Errorf("an agreed_prior with %s matches the schema, which the import refuses", c.name)
			}
		})
	}
}

package record

import (
	"bytes"
	"encoding/json"
	"errors"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/workshop/workshoptest"
)

// goodDoc is the invented pump-seal workshop's record as JSON, compact.
func goodDoc(t *testing.T) string {
	t.Helper()
	b, err := json.Marshal(buildInvented(t))
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

// unchained is a compact record document without its fingerprint and
// chain, as a record made before Parley kept them: WriteJSON and
// json.Marshal write both last.
func unchained(t *testing.T, doc string) string {
	t.Helper()
	i := strings.LastIndex(doc, `,"fingerprint":"`)
	if i < 0 || !strings.Contains(doc[i:], `"chain":{`) {
		t.Fatal("no fingerprint and chain at the end of the record")
	}
	return doc[:i] + "}"
}

// refusal is one edit of a good record that Parse must refuse, with the
// path and rule it must name.
type refusal struct {
	name     string
	old, new string // the first old in the document becomes new
	field    string
	rule     elicit.Rule
	// lets says whether encoding/json alone, with unknown keys refused,
	// decodes the document without error: the refusals the scan and the
	// input rules exist for.
	lets bool
}

// parseRefusals are the documents an import must refuse: what
// encoding/json lets through silently (duplicate keys, keys in another
// letter case, control characters, broken UTF-8) and numbers outside sane
// ranges.
var parseRefusals = []refusal{
	{"duplicate key at the top", `"caution":`, `"caution":"x","caution":`, "caution", RuleDuplicateKey, true},
	{"duplicate key in an expert", `"name":"Bela"`, `"name":"Bela","name":"Eve"`, "experts[1].name", RuleDuplicateKey, true},
	{"duplicate weight", `"by_expert":{"21":3`, `"by_expert":{"21":3,"21":3`, "weights.by_expert[21]", RuleDuplicateKey, true},
	{"key in capitals", `"title":"Pump`, `"Title":"Pump`, "workshop.Title", RuleKeySpelling, true},
	{"keys differing in case", `"title":"Pump seals (invented)"`, `"title":"Pump seals (invented)","TITLE":"x"`, "workshop.TITLE", RuleKeySpelling, true},
	{"Kelvin sign for k", `"kind":"workshop_created"`, "\"\u212aind\":\"workshop_created\"", "events[0].\u212aind", RuleKeySpelling, true},
	{"weight key with a leading zero", `"by_expert":{"21":3`, `"by_expert":{"021":3`, "weights.by_expert[021]", RuleKeySpelling, true},
	{"NUL in a name", `"name":"Ada"`, `"name":"A\u0000da"`, "experts[0].name", input.RuleTextValid, true},
	{"ESC in the title", `"title":"Pump`, `"title":"\u001b[2JPump`, "workshop.title", input.RuleTextValid, true},
	{"BEL in a reason", `"reason":"-after discussion"`, `"reason":"-after\u0007 discussion"`, "revisions[4].reason", input.RuleTextValid, true},
	{"C1 control in the notes", `"notes":"=not`, `"notes":"\u009b=not`, "workshop.notes", input.RuleTextValid, true},
	{"DEL in a rationale", `"rationale":"the pool"`, `"rationale":"the\u007f pool"`, "questions[0].prior_history[0].rationale", input.RuleTextValid, true},
	{"a byte that is not UTF-8", `"name":"Ada"`, "\"name\":\"A\xffda\"", "experts[0].name", input.RuleTextValid, true},
	{"half a surrogate pair", `"name":"Ada"`, `"name":"A\ud800da"`, "experts[0].name", input.RuleTextValid, true},
	{"a lone low surrogate", `"name":"Ada"`, `"name":"A\udc00da"`, "experts[0].name", input.RuleTextValid, true},
	{"control character in a key", `"caution":`, `"cau\u0000tion":"x","caution":`, `"cau\x00tion"`, input.RuleTextValid, false},
	{"round beyond the limit", `"round":2,"round_open"`, `"round":101,"round_open"`, "workshop.round", elicit.RuleCountRange, true},
	{"round that overflows the next", `"round":2,"round_open"`, `"round":9223372036854775807,"round_open"`, "workshop.round", elicit.RuleCountRange, true},
	{"id beyond 2^53 - 1", `"id":21,`, `"id":9007199254740992,`, "experts[0].id", elicit.RuleCountRange, true},
	{"position beyond 2^53 - 1", `"position":1,`, `"position":9007199254740993,`, "questions[0].position", elicit.RuleCountRange, true},
	{"title over 200 characters", `"title":"Pump seals (invented)"`, `"title":"` + strings.Repeat("é", input.MaxShortText+1) + `"`, "workshop.title", input.RuleTooLong, true},
	{"unknown key", `"caution":`, `"cautions":"x","caution":`, "cautions", RuleJSON, false},
}

func TestParseRefusesWhatJSONLetsThrough(t *testing.T) {
	good := goodDoc(t)
	for _, tt := range parseRefusals {
		t.Run(tt.name, func(t *testing.T) {
			if !strings.Contains(good, tt.old) {
				t.Fatalf("the good record has no %q", tt.old)
			}
			doc := strings.Replace(good, tt.old, tt.new, 1)
			// What the import did before the scan: decode with unknown
			// keys refused.
			dec := json.NewDecoder(strings.NewReader(doc))
			dec.DisallowUnknownFields()
			var plain Record
			if err := dec.Decode(&plain); (err == nil) != tt.lets {
				t.Errorf("encoding/json alone: %v (the case expects it to let the document through: %v)", err, tt.lets)
			}
			_, err := Parse(strings.NewReader(doc))
			var ie *elicit.InputError
			if !errors.As(err, &ie) || ie.Field != tt.field || ie.Rule != tt.rule {
				t.Fatalf("Parse = %v, want field %q rule %q", err, tt.field, tt.rule)
			}
		})
	}
}

// Text is counted in characters on import as in the forms: a title of
// 200 two-byte letters (400 bytes) imports, and so does every letter of
// any width, a surrogate pair written as escapes, and newline, CR and tab.
func TestParseAcceptsTextAtItsLimit(t *testing.T) {
	good := goodDoc(t)
	for _, tt := range []struct{ old, new string }{
		{`"title":"Pump seals (invented)"`, `"title":"` + strings.Repeat("é", input.MaxShortText) + `"`},
		{`"title":"Pump seals (invented)"`, `"title":"` + strings.Repeat("𝔸", input.MaxShortText) + `"`},
		{`"name":"Ada"`, `"name":"\ud835\udd38da"`},
		{`"notes":"=not a formula"`, `"notes":"` + strings.Repeat("語", input.MaxLongText) + `"`},
		{`"reason":"-after discussion"`, `"reason":"line one\r\nline\ttwo"`},
	} {
		doc := strings.Replace(good, tt.old, tt.new, 1)
		if doc == good {
			t.Fatalf("no %q in the record", tt.old)
		}
		// A revision's reason is a fact of the chain: the record read is
		// one without (TestParseRefusesAChangedFact has the chain's say).
		if _, err := Parse(strings.NewReader(unchained(t, doc))); err != nil {
			t.Errorf("%.60s…: %v", tt.new, err)
		}
	}
}

// The scan follows the record's layout into embedded structs, pointers,
// lists and maps: a key that belongs to none of them is refused wherever
// it is.
func TestParseKnowsTheLayout(t *testing.T) {
	r := buildInvented(t)
	b, err := json.Marshal(r)
	if err != nil {
		t.Fatal(err)
	}
	if err := scanRecord(b); err != nil {
		t.Fatalf("a built record fails the scan: %v", err)
	}
	for _, tt := range []struct{ old, new, field string }{
		{`"wording":`, `"wordin":"x","wording":`, "questions[0].wordin"},
		{`"consensus":{`, `"consensus":{"valuez":[],`, "questions[0].agreed_prior.consensus.valuez"},
		{`"answer":{`, `"answer":{"Values":[],`, "revisions[0].answer.Values"},
	} {
		doc := strings.Replace(string(b), tt.old, tt.new, 1)
		err := scanRecord([]byte(doc))
		var ie *elicit.InputError
		if !errors.As(err, &ie) || ie.Field != tt.field {
			t.Errorf("%s: %v, want field %q", tt.new, err, tt.field)
		}
	}
}

// WriteJSON is the one JSON writer, read back by Parse to the same record.
func TestWriteJSONReadsBack(t *testing.T) {
	r, err := Build(workshoptest.PumpSeals(), t0)
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := r.WriteJSON(&buf); err != nil {
		t.Fatal(err)
	}
	if !strings.HasPrefix(buf.String(), "{\n  \"parley_record\": 1,") || !strings.HasSuffix(buf.String(), "}\n") {
		t.Errorf("not indented by two spaces with a final newline: %.40q … %q", buf.String(), buf.String()[buf.Len()-3:])
	}
	back, err := Parse(&buf)
	if err != nil {
		t.Fatal(err)
	}
	a, _ := json.Marshal(r)
	b, _ := json.Marshal(back)
	if !bytes.Equal(a, b) {
		t.Errorf("read back differs:\n%s\n---\n%s", a, b)
	}
}

// A record of empty objects is refused by what its values would become
// once decoded, before any is: 4,190,000 empty revisions (12.5 MB, within
// the value limit) took 3.2 GB and half a minute to refuse; now the scan
// stops at the revision that passes input.MaxJSONDecoded (a Revision is
// over 200 bytes of Go, so about 600,000 of them).
func TestParseRefusesEmptyObjectsByTheirDecodedSize(t *testing.T) {
	doc := `{"parley_record":1,"revisions":[` + strings.TrimSuffix(strings.Repeat("{},", 700_000), ",") + `]}`
	_, err := Parse(strings.NewReader(doc))
	var ie *elicit.InputError
	if !errors.As(err, &ie) || ie.Rule != input.RuleJSONDecoded || !strings.HasPrefix(ie.Field, "revisions[") {
		t.Fatalf("700,000 empty revisions: %v, want refused by %q in revisions", err, input.RuleJSONDecoded)
	}
}

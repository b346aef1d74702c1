package input

import (
	"errors"
	"reflect"
	"strings"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit"
)

// An invented layout with what ScanJSON follows: nested structs, a
// pointer, a list, a map with whole-number keys, a type that reads its
// own JSON and an embedded struct.
type scanPart struct {
	Size float64 `json:"size"`
	Note string  `json:"note"`
}

type scanEmbedded struct {
	Shared int `json:"shared"`
}

type scanDoc struct {
	scanEmbedded
	Parts  []scanPart      `json:"parts"`
	Main   *scanPart       `json:"main"`
	ByID   map[int]float64 `json:"by_id"`
	At     time.Time       `json:"at"`
	Flag   bool            `json:"flag"`
	Whole  int32           `json:"whole"`
	Anyway any             `json:"anyway"`
}

var scanLayout = JSONLayout{
	Type: reflect.TypeFor[scanDoc](), Whole: "doc",
	Syntax: "syntax", Unknown: "unknown", WrongType: "type",
}

func TestScanJSONAccepts(t *testing.T) {
	for _, doc := range []string{
		`{}`,
		`{"shared":1,"parts":[{"size":1.5,"note":"a\tb"},{"size":-2e300}],"main":{"size":0},"by_id":{"21":3},` +
			`"at":"2026-01-02T03:04:05Z","flag":true,"whole":-7,"anyway":{"x":[1,"y"]}}`,
		`{"main":null,"parts":null,"flag":null}`,              // null decodes into anything
		`{"parts":[{"note":"\ud835\udd38"}]}`,                 // a surrogate pair as escapes
		`{"main":{"size":0.` + strings.Repeat("1", 62) + `}}`, // 64 characters, as a form takes
		`{"main":{"size":-0.0e-999}}`,                         // 0, written so: no underflow
	} {
		if err := ScanJSON([]byte(doc), scanLayout); err != nil {
			t.Errorf("%s: %v", doc, err)
		}
	}
}

func TestScanJSONRefuses(t *testing.T) {
	for _, c := range []struct {
		doc, field string
		rule       elicit.Rule
	}{
		{`{"flag":true,"flag":false}`, "flag", RuleDuplicateKey},
		{`{"parts":[{"size":1},{"size":1,"note":"x","size":2}]}`, "parts[1].size", RuleDuplicateKey},
		{`{"by_id":{"21":1,"21":2}}`, "by_id[21]", RuleDuplicateKey},
		{`{"Flag":true}`, "Flag", RuleKeySpelling},
		{`{"main":{"note":"x","NOTE":"y"}}`, "main.NOTE", RuleKeySpelling},
		{"{\"main\":{\"\u017fize\":1}}", "main.\u017fize", RuleKeySpelling}, // long s for s
		{`{"by_id":{"021":1}}`, "by_id[021]", RuleKeySpelling},
		{`{"shared":1,"SHARED":2}`, "SHARED", RuleKeySpelling},
		{`{"parts":[{"colour":"red"}]}`, "parts[0].colour", "unknown"},
		{`{"parts":[{"size":"1"}]}`, "parts[0].size", "type"},
		{`{"parts":[{"size":1},{"note":7}]}`, "parts[1].note", "type"},
		{`{"parts":{"size":1}}`, "parts", "type"},
		{`{"whole":1.5}`, "whole", "type"},
		{`{"whole":3000000000}`, "whole", "type"},
		{`{"flag":"yes"}`, "flag", "type"},
		{`[]`, "doc", "type"},
		{`{"main":{"size":1e400}}`, "main.size", elicit.RuleFinite},
		{`{"main":{"size":1e-400}}`, "main.size", RuleUnderflow},                                     // read as 0 by strconv, without an error
		{`{"main":{"size":0.01` + strings.Repeat("0", 100000) + `}}`, "main.size", RuleNumberSyntax}, // a form takes 64 characters
		{`{"parts":[{"size":1` + strings.Repeat("0", 64) + `}]}`, "parts[0].size", RuleNumberSyntax},
		{`{"parts":[{"size":-2e-324}]}`, "parts[0].size", RuleUnderflow},
		{`{"parts":[{"note":"a\u0000b"}]}`, "parts[0].note", RuleTextValid},
		{"{\"parts\":[{\"note\":\"a\xffb\"}]}", "parts[0].note", RuleTextValid},
		{`{"parts":[{"note":"a\udc00b"}]}`, "parts[0].note", RuleTextValid},
		{`{"anyway":{"x":"\u001b[2J"}}`, "anyway.x", RuleTextValid},
		{`{"parts":[{"note":"Ann\u202eegassem"}]}`, "parts[0].note", RuleTextValid}, // a right-to-left override
		{`{"parts":[`, "doc", "syntax"},
		{`{"flag":true} {}`, "doc", "syntax"},
		{``, "doc", "syntax"},
	} {
		err := ScanJSON([]byte(c.doc), scanLayout)
		var ie *elicit.InputError
		if !errors.As(err, &ie) || ie.Field != c.field || ie.Rule != c.rule {
			t.Errorf("%q: %v, want field %q rule %q", c.doc, err, c.field, c.rule)
		}
	}
}

// Nesting is refused past MaxJSONDepth, inside values the layout does
// not describe too (a type that reads its own JSON, an interface), and
// reading a deep or wide document costs memory in proportion to its
// length: the path was written out for every value, so a record of
// 120 kB nested 60,000 deep took gigabytes and crashed `parley import`.
// A document of more values than its layout allows is refused at the
// first value too many, with its path, before any of them is decoded; a
// layout without a limit of its own has MaxJSONValues.
func TestScanJSONValueLimit(t *testing.T) {
	few := scanLayout
	few.MaxValues = 10
	// The document and the array under "anyway": 2 values, and 8 more are allowed.
	doc := func(n int) string { return `{"anyway":[` + strings.TrimSuffix(strings.Repeat("{},", n), ",") + `]}` }
	if err := ScanJSON([]byte(doc(8)), few); err != nil {
		t.Errorf("10 values with a limit of 10: %v", err)
	}
	err := ScanJSON([]byte(doc(9)), few)
	var ie *elicit.InputError
	if !errors.As(err, &ie) || ie.Rule != RuleJSONValues || ie.Field != "anyway[8]" || !strings.Contains(ie.Detail, "more than 10 values") {
		t.Errorf("11 values with a limit of 10: %v, want anyway[8] refused by %q", err, RuleJSONValues)
	}
	if testing.Short() {
		return
	}
	// The default, on a document of MaxJSONValues values and one more.
	err = ScanJSON([]byte(doc(MaxJSONValues-2)), scanLayout)
	if err != nil {
		t.Errorf("%d values: %v", MaxJSONValues, err)
	}
	err = ScanJSON([]byte(doc(MaxJSONValues-1)), scanLayout)
	if !errors.As(err, &ie) || ie.Rule != RuleJSONValues {
		t.Errorf("%d values: %v, want %q", MaxJSONValues+1, err, RuleJSONValues)
	}
}

func TestScanJSONNestingAndLongKeys(t *testing.T) {
	nest := func(key string, n int) string {
		return `{"` + key + `":` + strings.Repeat("[", n) + strings.Repeat("]", n) + `}`
	}
	for _, key := range []string{"anyway", "at"} {
		if err := ScanJSON([]byte(nest(key, MaxJSONDepth-1)), scanLayout); err != nil && key == "anyway" {
			t.Errorf("%s nested %d deep (with the document, %d): %v", key, MaxJSONDepth-1, MaxJSONDepth, err)
		}
		for _, n := range []int{MaxJSONDepth, 100_000} {
			err := ScanJSON([]byte(nest(key, n)), scanLayout)
			var ie *elicit.InputError
			want := key + strings.Repeat("[0]", MaxJSONDepth-1)
			if !errors.As(err, &ie) || ie.Rule != RuleJSONDepth || ie.Field != want {
				t.Errorf("%s nested %d deep: %v, want field %s rule %q", key, n, err, want, RuleJSONDepth)
			}
		}
	}

	long := strings.Repeat("k", 1<<20)
	for _, doc := range []string{
		`{"parts":[{"` + long + `":1}]}`,                      // unknown key
		`{"by_id":{"` + long + `":1}}`,                        // not a whole number
		`{"anyway":{"` + long + `":1,"` + long + `":2}}`,      // twice
		`{"anyway":{"` + long + `":{"x":"\u0007"}}}`,          // in the path of a refused value
		`{"main":{"size":1` + strings.Repeat("0", 400) + `}}`, // beyond float64
	} {
		err := ScanJSON([]byte(doc), scanLayout)
		var ie *elicit.InputError
		if !errors.As(err, &ie) {
			t.Fatalf("%.40s…: %v, want an InputError", doc, err)
		}
		if len(ie.Error()) > 400 {
			t.Errorf("%.40s…: the message is %d bytes long: %.200s…", doc, len(ie.Error()), ie.Error())
		}
	}
}

// The decoded budget counts what each value becomes in Go: an item of
// parts is a scanPart (24 bytes) and its note's text, main's object a
// scanPart behind a pointer, a by_id entry its key and value. A document
// over the budget is refused at the value that passes it, with its path,
// before anything is decoded; within it, it passes.
func TestScanJSONDecodedLimit(t *testing.T) {
	small := scanLayout
	base := int64(reflect.TypeFor[scanDoc]().Size())
	part := int64(reflect.TypeFor[scanPart]().Size())
	small.MaxDecoded = base + 3*part + int64(len("abcd"))
	if err := ScanJSON([]byte(`{"parts":[{},{"note":"abcd"},{}]}`), small); err != nil {
		t.Errorf("three parts within the budget: %v", err)
	}
	var ie *elicit.InputError
	err := ScanJSON([]byte(`{"parts":[{},{"note":"abcde"},{}]}`), small)
	if !errors.As(err, &ie) || ie.Rule != RuleJSONDecoded {
		t.Errorf("one byte of text over the budget: %v, want %q", err, RuleJSONDecoded)
	}
	err = ScanJSON([]byte(`{"parts":[{},{},{},{}]}`), small)
	if !errors.As(err, &ie) || ie.Rule != RuleJSONDecoded || ie.Field != "parts[3]" {
		t.Errorf("a fourth part: %v, want parts[3] refused by %q", err, RuleJSONDecoded)
	}
	small.MaxDecoded = base + part - 1
	err = ScanJSON([]byte(`{"main":{}}`), small)
	if !errors.As(err, &ie) || ie.Rule != RuleJSONDecoded || ie.Field != "main" {
		t.Errorf("a part behind a pointer over the budget: %v, want main refused", err)
	}
	if err := ScanJSON([]byte(`{"main":null}`), small); err != nil {
		t.Errorf("a null pointer costs nothing: %v", err)
	}
	small.MaxDecoded = base + 2*int64(reflect.TypeFor[int]().Size()+reflect.TypeFor[float64]().Size()) + 4
	if err := ScanJSON([]byte(`{"by_id":{"21":1,"22":2}}`), small); err != nil {
		t.Errorf("two entries within the budget: %v", err)
	}
	err = ScanJSON([]byte(`{"by_id":{"21":1,"22":2,"23":3}}`), small)
	if !errors.As(err, &ie) || ie.Rule != RuleJSONDecoded || ie.Field != "by_id[23]" {
		t.Errorf("a third entry: %v, want by_id[23] refused", err)
	}
}

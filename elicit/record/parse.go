package record

import (
	"bytes"
	"encoding/json"
	"errors"
	"io"
	"reflect"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// MaxBytes is the largest record Parse reads.
const MaxBytes = 64 << 20

// Rules of a record's JSON.
const (
	// RuleJSON is the rule that an imported record is one JSON object of
	// the record's layout, with no unknown keys.
	RuleJSON elicit.Rule = "must be one JSON object in the layout of a Parley record"
	// RuleDuplicateKey is broken by a key that appears twice in one
	// object (encoding/json would silently keep the last).
	RuleDuplicateKey = input.RuleDuplicateKey
	// RuleKeySpelling is broken by a key spelled other than the record
	// spells it: in another letter case ("Title" for "title", which
	// encoding/json would silently accept), or a number key written
	// other than plainly ("021" or "+21" for "21").
	RuleKeySpelling = input.RuleKeySpelling
)

// Parse reads one record as JSON, strictly, and checks it with Validate.
// Before decoding, the whole document is read token by token against the
// record's layout (scanRecord): a key that appears twice in an object, a
// key in another letter case than the layout's, an unknown key, a string
// that is not valid UTF-8 (or escapes half a surrogate pair) and a control
// character other than newline, carriage return and tab in any string are
// refused with the path of the key or value, e.g. "experts[2].name", and
// so is a wrong type. Trailing data or more than MaxBytes are refused too.
// Every error is an *elicit.InputError.
func Parse(rd io.Reader) (Record, error) {
	r, err := Decode(rd)
	if err != nil {
		return Record{}, err
	}
	return r, r.Validate()
}

// Checked is a record that passed Validate, with the fresh fit of each
// of its revisions, in the record's order (ValidateFits).
type Checked struct {
	Record
	Fits []elicit.Fit
}

// ParseChecked is Parse that also returns the fresh fits its validation
// made, for an import to keep without fitting every revision again.
func ParseChecked(rd io.Reader) (Checked, error) {
	r, err := Decode(rd)
	if err != nil {
		return Checked{}, err
	}
	fits, err := r.ValidateFits()
	if err != nil {
		return Checked{}, err
	}
	// A question's "lower": -0 is kept 0 by the store, but its revisions'
	// fits were made and kept on [-0, 1], exported back as "lower": -0.
	// The fits are derived, outside the chain; the facts stay as read,
	// since the chain tells -0 from 0 (testdata/fingerprint/edge_cases.json).
	positiveZeros(reflect.ValueOf(fits))
	return Checked{Record: r, Fits: fits}, nil
}

// Decode is Parse without Validate: the record read strictly as JSON in
// its layout, its contents not yet checked. parley fingerprint reads a
// record so, as it needs only the facts the chain runs over.
func Decode(rd io.Reader) (Record, error) {
	b, err := io.ReadAll(io.LimitReader(rd, MaxBytes+1))
	if err != nil {
		return Record{}, inputErr("record", RuleJSON, "%v", err)
	}
	if len(b) > MaxBytes {
		return Record{}, inputErr("record", input.RuleTooLong, "more than %d bytes", MaxBytes)
	}
	if err := scanRecord(b); err != nil {
		return Record{}, err
	}
	dec := json.NewDecoder(bytes.NewReader(b))
	dec.DisallowUnknownFields()
	var r Record
	if err := dec.Decode(&r); err != nil {
		var te *json.UnmarshalTypeError
		if errors.As(err, &te) && te.Field != "" {
			return Record{}, inputErr(te.Field, RuleJSON, "%s is not a %s", te.Value, te.Type)
		}
		return Record{}, inputErr("record", RuleJSON, "%v", err)
	}
	if _, err := dec.Token(); err != io.EOF {
		return Record{}, inputErr("record", RuleJSON, "data after the record")
	}
	if err := markUnsummarised(b, &r); err != nil {
		return Record{}, err
	}
	return r, nil
}

// markUnsummarised marks each agreed_prior of r that the document b
// wrote without its summary (Prior.Unsummarised): with none of the keys
// mean, sd and percentiles. One that has some of them keeps its missing
// numbers as 0, which CheckCurrentPriors refuses. Only a prior whose
// summary reads all 0 can be one, so a record that has every summary is
// not read a second time.
func markUnsummarised(b []byte, r *Record) error {
	blank := false
	for _, q := range r.Questions {
		if p := q.AgreedPrior; p != nil && p.Mean == 0 && p.SD == 0 && p.Percentiles == (workshop.Percentiles{}) {
			blank = true
		}
	}
	if !blank {
		return nil
	}
	var keys struct {
		Questions []struct {
			AgreedPrior map[string]json.RawMessage `json:"agreed_prior"`
		} `json:"questions"`
	}
	if err := json.Unmarshal(b, &keys); err != nil {
		return inputErr("record", RuleJSON, "%v", err)
	}
	for i, q := range keys.Questions {
		if i >= len(r.Questions) || r.Questions[i].AgreedPrior == nil || q.AgreedPrior == nil {
			continue
		}
		_, mean := q.AgreedPrior["mean"]
		_, sd := q.AgreedPrior["sd"]
		_, pc := q.AgreedPrior["percentiles"]
		r.Questions[i].AgreedPrior.Unsummarised = !mean && !sd && !pc
	}
	return nil
}

// positiveZeros makes every −0 among v's numbers 0, as input.Number
// reads a typed -0 and `parley pool` a JSON one.
func positiveZeros(v reflect.Value) {
	switch v.Kind() {
	case reflect.Float32, reflect.Float64:
		if v.CanSet() && v.Float() == 0 {
			v.SetFloat(0)
		}
	case reflect.Pointer:
		if !v.IsNil() {
			positiveZeros(v.Elem())
		}
	case reflect.Struct:
		for i := range v.NumField() {
			if v.Type().Field(i).IsExported() {
				positiveZeros(v.Field(i))
			}
		}
	case reflect.Slice, reflect.Array:
		for i := range v.Len() {
			positiveZeros(v.Index(i))
		}
	case reflect.Map:
		for _, k := range v.MapKeys() {
			e := reflect.New(v.Type().Elem()).Elem()
			e.Set(v.MapIndex(k))
			positiveZeros(e)
			v.SetMapIndex(k, e)
		}
	}
}

// scanRecord reads doc against the layout of Record (input.ScanJSON) and
// refuses what encoding/json would let through silently: duplicate keys,
// keys in another letter case, strings that are not valid UTF-8, and
// control characters.
func scanRecord(doc []byte) error {
	return input.ScanJSON(doc, input.JSONLayout{
		Type: reflect.TypeFor[Record](), Whole: "record",
		Syntax: RuleJSON, Unknown: RuleJSON, WrongType: RuleJSON,
	})
}

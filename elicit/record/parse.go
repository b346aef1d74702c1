package record

import (
	"bytes"
	"encoding/json"
	"errors"
	"io"
	"reflect"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
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
	return r, nil
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

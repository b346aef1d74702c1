package record

import (
	"bytes"
	"encoding/json"
	"errors"
	"io"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
)

// MaxBytes is the largest record Parse reads.
const MaxBytes = 64 << 20

// RuleJSON is the rule that an imported record is one JSON object of
// the record's layout, with no unknown keys.
const RuleJSON elicit.Rule = "must be one JSON object in the layout of a Parley record"

// Parse reads one record as JSON, strictly: unknown keys, a wrong
// type, trailing data or more than MaxBytes are refused. The record
// is then checked with Validate. Every error is an *InputError.
func Parse(rd io.Reader) (Record, error) {
	b, err := io.ReadAll(io.LimitReader(rd, MaxBytes+1))
	if err != nil {
		return Record{}, inputErr("record", RuleJSON, "%v", err)
	}
	if len(b) > MaxBytes {
		return Record{}, inputErr("record", input.RuleTooLong, "more than %d bytes", MaxBytes)
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
	return r, r.Validate()
}

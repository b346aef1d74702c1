package store

import (
	"encoding/json"
	"fmt"

	jsonv2 "github.com/go-json-experiment/json"
	jsonv1 "github.com/go-json-experiment/json/v1"
)

// decodeJSON reads a stored JSON value as encoding/json would
// (go-json-experiment under encoding/json's options, which reads the
// lists and kept fits of thousands of revisions in about half the CPU).
func decodeJSON(s string, v any) error {
	return jsonv2.Unmarshal([]byte(s), v, jsonv1.DefaultOptionsV1())
}

// Lists (probabilities, bin edges, answer values, chip counts) are stored
// as JSON arrays in TEXT columns; an empty or nil list is "[]".
func marshalList[T any](xs []T) (string, error) {
	if len(xs) == 0 {
		return "[]", nil
	}
	b, err := json.Marshal(xs)
	if err != nil {
		// NaN and ±Inf cannot be written as JSON; nothing upstream should
		// let them through.
		return "", fmt.Errorf("store: list %v: %w", xs, err)
	}
	return string(b), nil
}

// unmarshalList reads a stored list; "[]" becomes nil so values round-trip
// to what elicit's constructors produce.
func unmarshalList[T any](s string, dst *[]T) error {
	var xs []T
	if s == "[]" {
		*dst = nil
		return nil
	}
	if err := decodeJSON(s, &xs); err != nil {
		return fmt.Errorf("store: bad stored list %q: %w", s, err)
	}
	if len(xs) == 0 {
		xs = nil
	}
	*dst = xs
	return nil
}

package record

import (
	"bytes"
	"encoding"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"reflect"
	"strconv"
	"strings"
	"sync"
	"unicode/utf8"

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
	RuleDuplicateKey elicit.Rule = "must appear only once in its object"
	// RuleKeySpelling is broken by a key spelled other than the record
	// spells it: in another letter case ("Title" for "title", which
	// encoding/json would silently accept), or a number key written
	// other than plainly ("021" or "+21" for "21").
	RuleKeySpelling elicit.Rule = "must be spelled exactly as the record spells it (keys are case-sensitive)"
)

// Parse reads one record as JSON, strictly, and checks it with Validate.
// Before decoding, the whole document is read token by token against the
// record's layout (scanRecord): a key that appears twice in an object, a
// key in another letter case than the layout's, an unknown key, a string
// that is not valid UTF-8 (or escapes half a surrogate pair) and a control
// character other than newline, carriage return and tab in any string are
// refused with the path of the key or value, e.g. "experts[2].name". A
// wrong type, trailing data or more than MaxBytes are refused too. Every
// error is an *elicit.InputError.
func Parse(rd io.Reader) (Record, error) {
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
	return r, r.Validate()
}

// scanner reads a JSON document token by token, keeping each token's raw
// bytes.
type scanner struct {
	dec *json.Decoder
	doc []byte
	end int64 // where the last token ended
}

// next returns the next token and its raw text (with any separator and
// space before it).
func (s *scanner) next(path string) (json.Token, []byte, error) {
	start := s.end
	tok, err := s.dec.Token()
	if err != nil {
		if path == "" {
			path = "record"
		}
		return nil, nil, inputErr(path, RuleJSON, "%v", err)
	}
	s.end = s.dec.InputOffset()
	return tok, s.doc[start:s.end], nil
}

// scanRecord reads doc against the layout of Record and refuses what
// encoding/json would let through silently: duplicate keys, keys in
// another letter case, strings that are not valid UTF-8, and control
// characters.
func scanRecord(doc []byte) error {
	dec := json.NewDecoder(bytes.NewReader(doc))
	dec.UseNumber()
	s := &scanner{dec: dec, doc: doc}
	if err := s.value(reflect.TypeOf(Record{}), ""); err != nil {
		return err
	}
	if _, err := dec.Token(); err != io.EOF {
		return inputErr("record", RuleJSON, "data after the record")
	}
	return nil
}

// value reads one value whose Go type in the record is t (nil when the
// value has no place in the layout: it is still read, and its strings and
// keys checked).
func (s *scanner) value(t reflect.Type, path string) error {
	for t != nil && t.Kind() == reflect.Pointer {
		t = t.Elem()
	}
	if t != nil && decodesItself(t) {
		t = nil
	}
	tok, raw, err := s.next(path)
	if err != nil {
		return err
	}
	switch tok := tok.(type) {
	case json.Delim:
		switch tok {
		case '{':
			return s.object(t, path)
		case '[':
			var elem reflect.Type
			if t != nil && (t.Kind() == reflect.Slice || t.Kind() == reflect.Array) {
				elem = t.Elem()
			}
			for i := 0; s.dec.More(); i++ {
				if err := s.value(elem, fmt.Sprintf("%s[%d]", path, i)); err != nil {
					return err
				}
			}
			_, _, err := s.next(path)
			return err
		}
	case string:
		if err := checkLiteral(path, raw); err != nil {
			return err
		}
		return input.CheckChars(path, tok)
	}
	return nil
}

// object reads the members of an object whose Go type is t: a struct,
// whose keys must be its JSON names exactly, or a map, whose keys must
// be plain.
func (s *scanner) object(t reflect.Type, path string) error {
	var fields map[string]reflect.Type
	var elem reflect.Type
	numberKeys := false
	if t != nil {
		switch t.Kind() {
		case reflect.Struct:
			fields = jsonFields(t)
		case reflect.Map:
			elem = t.Elem()
			switch t.Key().Kind() {
			case reflect.Int, reflect.Int8, reflect.Int16, reflect.Int32, reflect.Int64,
				reflect.Uint, reflect.Uint8, reflect.Uint16, reflect.Uint32, reflect.Uint64:
				numberKeys = true
			}
		}
	}
	seen := map[string]bool{}
	folded := map[string]string{}
	for s.dec.More() {
		tok, raw, err := s.next(path)
		if err != nil {
			return err
		}
		key := tok.(string) // the decoder reads only strings as keys
		kp := key
		if input.CheckChars("", key) != nil {
			kp = strconv.QuoteToASCII(key) // a path is printed: no raw control bytes
		}
		switch {
		case t != nil && t.Kind() == reflect.Map:
			kp = path + "[" + kp + "]"
		case path != "":
			kp = path + "." + kp
		}
		if err := checkLiteral(kp, raw); err != nil {
			return err
		}
		if err := input.CheckChars(kp, key); err != nil {
			return err
		}
		if seen[key] {
			return inputErr(kp, RuleDuplicateKey, "%q", key)
		}
		if other, ok := folded[fold(key)]; ok {
			return inputErr(kp, RuleKeySpelling, "%q and %q differ only in letter case", other, key)
		}
		seen[key], folded[fold(key)] = true, key
		var vt reflect.Type
		switch {
		case fields != nil:
			ft, ok := fields[key]
			if !ok {
				for name := range fields {
					if strings.EqualFold(name, key) {
						return inputErr(kp, RuleKeySpelling, "%q, not %q", name, key)
					}
				}
				return inputErr(kp, RuleJSON, "%q is not a key of this object", key)
			}
			vt = ft
		case numberKeys:
			n, err := strconv.ParseInt(key, 10, 64)
			if err != nil || strconv.FormatInt(n, 10) != key {
				return inputErr(kp, RuleKeySpelling, "%q is not a plain whole number", key)
			}
			vt = elem
		default:
			vt = elem
		}
		if err := s.value(vt, kp); err != nil {
			return err
		}
	}
	_, _, err := s.next(path)
	return err
}

// fold is key with its letter case folded, so that keys encoding/json
// would take for one another fold alike (the Kelvin sign and k, the long
// s and s included).
func fold(key string) string { return strings.ToLower(strings.ToUpper(key)) }

// checkLiteral checks a string's raw JSON text (from its opening quote):
// valid UTF-8, and no \u escape of half a surrogate pair, which
// encoding/json would silently turn into U+FFFD.
func checkLiteral(path string, raw []byte) error {
	i := bytes.IndexByte(raw, '"')
	if i < 0 {
		return nil
	}
	lit := raw[i:]
	if !utf8.Valid(lit) {
		return &elicit.InputError{Field: path, Rule: input.RuleTextValid, Detail: "not UTF-8"}
	}
	for i := 0; i < len(lit); i++ {
		if lit[i] != '\\' {
			continue
		}
		i++
		if i >= len(lit) || lit[i] != 'u' || i+4 >= len(lit) {
			continue
		}
		r, err := strconv.ParseUint(string(lit[i+1:i+5]), 16, 32)
		if err != nil {
			continue
		}
		i += 4
		switch {
		case r >= 0xDC00 && r <= 0xDFFF:
			return &elicit.InputError{Field: path, Rule: input.RuleTextValid, Detail: fmt.Sprintf("a lone \\u%04x", r)}
		case r >= 0xD800 && r <= 0xDBFF:
			// A high surrogate must be followed by a low one.
			if i+6 >= len(lit) || lit[i+1] != '\\' || lit[i+2] != 'u' {
				return &elicit.InputError{Field: path, Rule: input.RuleTextValid, Detail: fmt.Sprintf("a lone \\u%04x", r)}
			}
			lo, err := strconv.ParseUint(string(lit[i+3:i+7]), 16, 32)
			if err != nil || lo < 0xDC00 || lo > 0xDFFF {
				return &elicit.InputError{Field: path, Rule: input.RuleTextValid, Detail: fmt.Sprintf("a lone \\u%04x", r)}
			}
			i += 6
		}
	}
	return nil
}

var (
	textUnmarshaler = reflect.TypeFor[encoding.TextUnmarshaler]()
	jsonUnmarshaler = reflect.TypeFor[json.Unmarshaler]()
)

// decodesItself reports whether t reads its own JSON (time.Time does), so
// the layout says nothing of what is inside.
func decodesItself(t reflect.Type) bool {
	p := reflect.PointerTo(t)
	return p.Implements(jsonUnmarshaler) || p.Implements(textUnmarshaler)
}

var fieldCache sync.Map // reflect.Type → map[string]reflect.Type

// jsonFields maps the JSON names of struct t's fields to their types, the
// fields of embedded structs included, as encoding/json names them.
func jsonFields(t reflect.Type) map[string]reflect.Type {
	if m, ok := fieldCache.Load(t); ok {
		return m.(map[string]reflect.Type)
	}
	m := map[string]reflect.Type{}
	for i := 0; i < t.NumField(); i++ {
		f := t.Field(i)
		tag := f.Tag.Get("json")
		if tag == "-" {
			continue
		}
		name, _, _ := strings.Cut(tag, ",")
		if f.Anonymous && name == "" {
			ft := f.Type
			if ft.Kind() == reflect.Pointer {
				ft = ft.Elem()
			}
			if ft.Kind() == reflect.Struct {
				for k, v := range jsonFields(ft) {
					if _, shadowed := m[k]; !shadowed {
						m[k] = v
					}
				}
				continue
			}
		}
		if !f.IsExported() {
			continue
		}
		if name == "" {
			name = f.Name
		}
		m[name] = f.Type
	}
	fieldCache.Store(t, m)
	return m
}

package input

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
)

// Rules of a JSON document's keys.
const (
	// RuleDuplicateKey is broken by a key that appears twice in one
	// object (encoding/json would silently keep the last).
	RuleDuplicateKey elicit.Rule = "must appear only once in its object"
	// RuleKeySpelling is broken by a key spelled other than the layout
	// spells it: in another letter case ("Title" for "title", which
	// encoding/json would silently accept), or a number key written
	// other than plainly ("021" or "+21" for "21").
	RuleKeySpelling elicit.Rule = "must be spelled exactly as the layout spells it (keys are case-sensitive)"
)

// JSONLayout says what ScanJSON expects of a document and how it names
// what it refuses.
type JSONLayout struct {
	// Type is the Go type the document is decoded into afterwards.
	Type reflect.Type
	// Whole is the field named for the document as a whole (malformed
	// JSON, a wrong type at the top, data after the value), e.g.
	// "record" or "stdin".
	Whole string
	// Syntax is the rule of malformed JSON and of data after the value,
	// Unknown of a key the layout does not have, WrongType of a value of
	// the wrong JSON type.
	Syntax, Unknown, WrongType elicit.Rule
}

// ScanJSON reads doc, one JSON value, token by token against the layout
// of l.Type and refuses what encoding/json would let through silently or
// report without the value's place: a key that appears twice in an object
// (RuleDuplicateKey), a key in another letter case than the layout's or a
// number key written other than plainly (RuleKeySpelling), a key the
// layout does not have, a string that is not valid UTF-8 or escapes half
// a surrogate pair and a control character other than newline, carriage
// return and tab in any string or key (RuleTextValid), a value of the
// wrong JSON type, and a number beyond float64 (elicit.RuleFinite). Each
// error is an *elicit.InputError naming the path of the key or value, as
// "experts[2].name".
func ScanJSON(doc []byte, l JSONLayout) error {
	dec := json.NewDecoder(bytes.NewReader(doc))
	dec.UseNumber()
	s := &jsonScanner{dec: dec, doc: doc, l: l}
	if err := s.value(l.Type, ""); err != nil {
		return err
	}
	if _, err := dec.Token(); err != io.EOF {
		return &elicit.InputError{Field: l.Whole, Rule: l.Syntax, Detail: "data after the value"}
	}
	return nil
}

// jsonScanner reads a JSON document token by token, keeping each token's
// raw bytes.
type jsonScanner struct {
	dec *json.Decoder
	doc []byte
	end int64 // where the last token ended
	l   JSONLayout
}

func (s *jsonScanner) err(path string, rule elicit.Rule, format string, args ...any) error {
	if path == "" {
		path = s.l.Whole
	}
	return &elicit.InputError{Field: path, Rule: rule, Detail: fmt.Sprintf(format, args...)}
}

// next returns the next token and its raw text (with any separator and
// space before it).
func (s *jsonScanner) next(path string) (json.Token, []byte, error) {
	start := s.end
	tok, err := s.dec.Token()
	if err != nil {
		// Malformed JSON is the document's fault as a whole; where it
		// broke is a detail.
		detail := err.Error()
		if errors.Is(err, io.EOF) || errors.Is(err, io.ErrUnexpectedEOF) {
			detail = "empty or cut short"
		}
		if path != "" {
			detail += ", in " + path
		}
		return nil, nil, &elicit.InputError{Field: s.l.Whole, Rule: s.l.Syntax, Detail: detail}
	}
	s.end = s.dec.InputOffset()
	return tok, s.doc[start:s.end], nil
}

// value reads one value whose Go type in the layout is t (nil when the
// value has no place in the layout: it is still read, and its strings and
// keys checked).
func (s *jsonScanner) value(t reflect.Type, path string) error {
	for t != nil && t.Kind() == reflect.Pointer {
		t = t.Elem()
	}
	if t != nil && (decodesItself(t) || t.Kind() == reflect.Interface) {
		t = nil
	}
	tok, raw, err := s.next(path)
	if err != nil {
		return err
	}
	if err := s.checkType(t, tok, path); err != nil {
		return err
	}
	switch tok := tok.(type) {
	case json.Delim:
		switch tok {
		case '{':
			return s.object(t, path)
		case '[':
			var elem reflect.Type
			if t != nil {
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
		if err := checkLiteral(s.pathOr(path), raw); err != nil {
			return err
		}
		return CheckChars(s.pathOr(path), tok)
	}
	return nil
}

func (s *jsonScanner) pathOr(path string) string {
	if path == "" {
		return s.l.Whole
	}
	return path
}

// checkType refuses a token that cannot decode into t, naming the JSON
// types rather than Go's, and a number beyond float64 as not finite.
func (s *jsonScanner) checkType(t reflect.Type, tok json.Token, path string) error {
	if t == nil || tok == nil { // null decodes into anything
		return nil
	}
	want := jsonKind(t)
	got := ""
	switch tok := tok.(type) {
	case json.Delim:
		switch {
		case tok == '{' && (t.Kind() == reflect.Struct || t.Kind() == reflect.Map):
			return nil
		case tok == '[' && (t.Kind() == reflect.Slice || t.Kind() == reflect.Array):
			return nil
		case tok == '{':
			got = "object"
		default:
			got = "array"
		}
	case bool:
		if t.Kind() == reflect.Bool {
			return nil
		}
		got = "true or false"
	case string:
		if t.Kind() == reflect.String {
			return nil
		}
		got = "string"
	case json.Number:
		switch t.Kind() {
		case reflect.Float32, reflect.Float64:
			if _, err := strconv.ParseFloat(string(tok), t.Bits()); err != nil {
				return s.err(path, elicit.RuleFinite, "got %s", tok)
			}
			return nil
		case reflect.Int, reflect.Int8, reflect.Int16, reflect.Int32, reflect.Int64:
			if _, err := strconv.ParseInt(string(tok), 10, t.Bits()); err == nil {
				return nil
			}
		case reflect.Uint, reflect.Uint8, reflect.Uint16, reflect.Uint32, reflect.Uint64:
			if _, err := strconv.ParseUint(string(tok), 10, t.Bits()); err == nil {
				return nil
			}
		}
		got = "number " + string(tok)
	}
	return s.err(path, s.l.WrongType, "got %s, want %s", got, want)
}

// jsonKind names the JSON type that decodes into t.
func jsonKind(t reflect.Type) string {
	switch t.Kind() {
	case reflect.Struct, reflect.Map:
		return "object"
	case reflect.Slice, reflect.Array:
		return "array"
	case reflect.String:
		return "string"
	case reflect.Bool:
		return "true or false"
	case reflect.Float32, reflect.Float64:
		return "number"
	case reflect.Int, reflect.Int8, reflect.Int16, reflect.Int32, reflect.Int64,
		reflect.Uint, reflect.Uint8, reflect.Uint16, reflect.Uint32, reflect.Uint64:
		return "whole number"
	}
	return "value"
}

// object reads the members of an object whose Go type is t: a struct,
// whose keys must be its JSON names exactly, or a map, whose keys must
// be plain.
func (s *jsonScanner) object(t reflect.Type, path string) error {
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
		if CheckChars("", key) != nil {
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
		if err := CheckChars(kp, key); err != nil {
			return err
		}
		if seen[key] {
			return s.err(kp, RuleDuplicateKey, "%q", key)
		}
		if other, ok := folded[foldKey(key)]; ok {
			return s.err(kp, RuleKeySpelling, "%q and %q differ only in letter case", other, key)
		}
		seen[key], folded[foldKey(key)] = true, key
		var vt reflect.Type
		switch {
		case fields != nil:
			ft, ok := fields[key]
			if !ok {
				for name := range fields {
					if strings.EqualFold(name, key) {
						return s.err(kp, RuleKeySpelling, "%q, not %q", name, key)
					}
				}
				return s.err(kp, s.l.Unknown, "%q is not a key of this object", key)
			}
			vt = ft
		case numberKeys:
			n, err := strconv.ParseInt(key, 10, 64)
			if err != nil || strconv.FormatInt(n, 10) != key {
				return s.err(kp, RuleKeySpelling, "%q is not a plain whole number", key)
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

// foldKey is key with its letter case folded, so that keys encoding/json
// would take for one another fold alike (the Kelvin sign and k, the long
// s and s included).
func foldKey(key string) string { return strings.ToLower(strings.ToUpper(key)) }

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
		return &elicit.InputError{Field: path, Rule: RuleTextValid, Detail: "not UTF-8"}
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
			return &elicit.InputError{Field: path, Rule: RuleTextValid, Detail: fmt.Sprintf("a lone \\u%04x", r)}
		case r >= 0xD800 && r <= 0xDBFF:
			// A high surrogate must be followed by a low one.
			if i+6 >= len(lit) || lit[i+1] != '\\' || lit[i+2] != 'u' {
				return &elicit.InputError{Field: path, Rule: RuleTextValid, Detail: fmt.Sprintf("a lone \\u%04x", r)}
			}
			lo, err := strconv.ParseUint(string(lit[i+3:i+7]), 16, 32)
			if err != nil || lo < 0xDC00 || lo > 0xDFFF {
				return &elicit.InputError{Field: path, Rule: RuleTextValid, Detail: fmt.Sprintf("a lone \\u%04x", r)}
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

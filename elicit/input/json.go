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
	// MaxValues is how many values (numbers, strings, true, false, null,
	// arrays and objects, the document itself included) the document
	// may hold; 0 means MaxJSONValues.
	MaxValues int
	// MaxDecoded is how many bytes of Go values the document may decode
	// into, as ScanJSON counts them (decodedCost); 0 means
	// MaxJSONDecoded.
	MaxDecoded int64
}

// MaxJSONDepth is how deeply ScanJSON lets arrays and objects nest. A
// Parley record nests 8 deep; a hostile document nested far deeper would
// otherwise cost stack and memory for every level (encoding/json's own
// limit is 10,000).
const MaxJSONDepth = 64

// RuleJSONDepth is broken by arrays and objects nested more than
// MaxJSONDepth deep.
const RuleJSONDepth elicit.Rule = "must not nest arrays and objects more than 64 deep"

// MaxJSONValues is how many values a document ScanJSON reads may hold,
// unless its layout says otherwise. Decoded, a value costs up to about
// 800 bytes (an empty object in a record's revisions: 1,000,000 of them
// took 810 MB), so a document of empty objects within a record's 64 MiB
// would take about 26 GB and end in an out-of-memory crash; at this many
// values it takes at most about 3.4 GB. A real record holds about one
// value per 32 bytes (the 200-expert record of systemtest: 233,541
// values in 7.5 MB), about 2.1 million at 64 MiB, so no record within
// the byte limit is refused for its values unless it is twice as dense.
const MaxJSONValues = 1 << 22

// MaxJSONDecoded is how many bytes of Go values a document ScanJSON reads
// may decode into, counted from the layout's types: each item of an
// array the size of its Go element, each entry of a map its key's and
// value's, each object behind a pointer its struct's, each string its
// length. Values are not all alike: an empty object in a record's
// revisions is 3 bytes of JSON and 232 of Go (a record.Revision), about
// 760 once slices grow and the collector's headroom is counted, so
// MaxJSONValues alone let a 12.5 MB record of 4,190,000 empty objects
// take 3.2 GB and half a minute before it was refused. A real record
// counts about half a byte per byte of JSON (the 200-expert record of
// systemtest: 3.9 MB counted for 7.5 MB), about 34 MB at the record's
// 64 MiB, so none is refused for this unless it is nearly four times as
// dense. The empty objects are now refused by the scan at the 578,523rd,
// in 0.25 s and 44 MB; the most of them that pass the scan (575,000)
// take 0.5 GB to decode.
const MaxJSONDecoded = 128 << 20

// RuleJSONDecoded is broken by a document that would decode into more
// bytes of Go values than its layout's MaxDecoded.
const RuleJSONDecoded elicit.Rule = "must not decode into more memory than its limit"

// RuleJSONValues is broken by a document holding more values than its
// layout's MaxValues.
const RuleJSONValues elicit.Rule = "must not hold more values (numbers, texts, arrays, objects) than its limit"

// maxKeyShown is how many characters of a key a path or a message shows.
const maxKeyShown = 80

// ScanJSON reads doc, one JSON value, token by token against the layout
// of l.Type and refuses what encoding/json would let through silently or
// report without the value's place: a key that appears twice in an object
// (RuleDuplicateKey), a key in another letter case than the layout's or a
// number key written other than plainly (RuleKeySpelling), a key the
// layout does not have, a string that is not valid UTF-8 or escapes half
// a surrogate pair and a control character other than newline, carriage
// return and tab in any string or key (RuleTextValid), a value of the
// wrong JSON type, a number longer than MaxNumberLen characters
// (RuleNumberSyntax), beyond float64 (elicit.RuleFinite) or other than 0
// but held by float64 only as 0 (RuleUnderflow, 1e-400), and
// arrays and objects nested more than MaxJSONDepth deep (RuleJSONDepth),
// and more values than the layout's MaxValues (RuleJSONValues). Each
// error is an *elicit.InputError naming the path of the key or value, as
// "experts[2].name". Its cost grows with the document's length
// only: the path is written out only for an error.
func ScanJSON(doc []byte, l JSONLayout) error {
	dec := json.NewDecoder(bytes.NewReader(doc))
	dec.UseNumber()
	s := &jsonScanner{dec: dec, doc: doc, l: l, left: l.MaxValues, budget: l.MaxDecoded}
	if s.left <= 0 {
		s.left = MaxJSONValues
	}
	if s.budget <= 0 {
		s.budget = MaxJSONDecoded
	}
	if l.Type != nil {
		if err := s.spend(int64(l.Type.Size())); err != nil {
			return err
		}
	}
	if err := s.value(l.Type); err != nil {
		return err
	}
	if _, err := dec.Token(); err != io.EOF {
		return &elicit.InputError{Field: l.Whole, Rule: l.Syntax, Detail: "data after the value"}
	}
	return nil
}

// jsonScanner reads a JSON document token by token, keeping each token's
// raw bytes and the path to the value being read.
type jsonScanner struct {
	dec   *json.Decoder
	doc   []byte
	end   int64 // where the last token ended
	l     JSONLayout
	steps []pathStep // from the document down to the value being read
	depth int        // arrays and objects open
	left  int        // values still allowed
	// spent and budget are the bytes of Go values counted so far and
	// allowed (MaxJSONDecoded).
	spent, budget int64
}

// spend counts n more bytes of Go values against the budget.
func (s *jsonScanner) spend(n int64) error {
	if s.spent += n; s.spent > s.budget {
		return s.err(RuleJSONDecoded, "more than %d MiB of values once read", s.budget>>20)
	}
	return nil
}

// pathStep is one step of a path: an array's item, an object's key or a
// map's key.
type pathStep struct {
	key     string
	index   int  // an array's item's
	item    bool // an array's item, not a key
	inMap   bool // a map's key, written [key]
	pending bool // the object's next key is still to be read
}

// path writes out the path of the value being read, as
// "experts[2].name" or "by_id[21]"; the document's Whole at the top.
func (s *jsonScanner) path() string {
	var b strings.Builder
	for i, st := range s.steps {
		switch {
		case st.pending:
		case st.item:
			b.WriteString("[" + strconv.Itoa(st.index) + "]")
		case st.inMap:
			b.WriteString("[" + shownKey(st.key) + "]")
		case i > 0:
			b.WriteString("." + shownKey(st.key))
		default:
			b.WriteString(shownKey(st.key))
		}
		if st.pending {
			break
		}
	}
	if b.Len() == 0 {
		return s.l.Whole
	}
	return b.String()
}

// shownKey is key as a path shows it: quoted in ASCII when it holds what
// a text may not, and clipped to maxKeyShown characters.
func shownKey(key string) string {
	if CheckChars("", key) != nil {
		key = strconv.QuoteToASCII(key) // a path is printed: no raw control bytes
	}
	return Clip(key, maxKeyShown)
}

func (s *jsonScanner) err(rule elicit.Rule, format string, args ...any) error {
	return &elicit.InputError{Field: s.path(), Rule: rule, Detail: fmt.Sprintf(format, args...)}
}

// here puts the path of the value being read on err, an *elicit.InputError
// made without one.
func (s *jsonScanner) here(err error) error {
	if ie, ok := err.(*elicit.InputError); ok && ie.Field == "" {
		ie.Field = s.path()
	}
	return err
}

// next returns the next token and its raw text (with any separator and
// space before it).
func (s *jsonScanner) next() (json.Token, []byte, error) {
	start := s.end
	tok, err := s.dec.Token()
	if err != nil {
		// Malformed JSON is the document's fault as a whole; where it
		// broke is a detail.
		detail := err.Error()
		if errors.Is(err, io.EOF) || errors.Is(err, io.ErrUnexpectedEOF) {
			detail = "empty or cut short"
		}
		if p := s.path(); p != s.l.Whole {
			detail += ", in " + p
		}
		return nil, nil, &elicit.InputError{Field: s.l.Whole, Rule: s.l.Syntax, Detail: detail}
	}
	s.end = s.dec.InputOffset()
	return tok, s.doc[start:s.end], nil
}

// value reads one value whose Go type in the layout is t (nil when the
// value has no place in the layout: it is still read, and its strings and
// keys checked).
func (s *jsonScanner) value(t reflect.Type) error {
	pointer := t != nil && t.Kind() == reflect.Pointer
	for t != nil && t.Kind() == reflect.Pointer {
		t = t.Elem()
	}
	if t != nil && (decodesItself(t) || t.Kind() == reflect.Interface) {
		t = nil
	}
	if s.left--; s.left < 0 {
		max := s.l.MaxValues
		if max <= 0 {
			max = MaxJSONValues
		}
		return s.err(RuleJSONValues, "more than %d values", max)
	}
	tok, raw, err := s.next()
	if err != nil {
		return err
	}
	if err := s.checkType(t, tok); err != nil {
		return err
	}
	if err := s.spend(decodedCost(t, pointer, tok, raw)); err != nil {
		return err
	}
	switch tok := tok.(type) {
	case json.Delim:
		if s.depth++; s.depth > MaxJSONDepth {
			return s.err(RuleJSONDepth, "%d arrays and objects open here", s.depth)
		}
		defer func() { s.depth-- }()
		switch tok {
		case '{':
			return s.object(t)
		case '[':
			var elem reflect.Type
			if t != nil {
				elem = t.Elem()
			}
			s.steps = append(s.steps, pathStep{item: true})
			for i := 0; s.dec.More(); i++ {
				s.steps[len(s.steps)-1].index = i
				if elem != nil {
					if err := s.spend(int64(elem.Size())); err != nil {
						return err
					}
				}
				if err := s.value(elem); err != nil {
					return err
				}
			}
			s.steps = s.steps[:len(s.steps)-1]
			_, _, err := s.next()
			return err
		}
	case string:
		if err := checkLiteral("", raw); err != nil {
			return s.here(err)
		}
		return s.here(CheckChars("", tok))
	}
	return nil
}

// decodedCost is the bytes of Go values one token adds beyond the place
// it decodes into (which its array, map or struct counted): the struct
// or value a non-null pointer points to, a string's text, and for a
// place the layout does not type (a json.RawMessage, a time, an
// interface) the token's raw text and a word for it.
func decodedCost(t reflect.Type, pointer bool, tok json.Token, raw []byte) int64 {
	var n int64
	if pointer && t != nil && tok != nil {
		n += int64(t.Size())
	}
	switch tok := tok.(type) {
	case string:
		n += int64(len(tok))
	default:
		if t == nil {
			n += 16 + int64(len(raw))
		}
	}
	return n
}

// checkType refuses a token that cannot decode into t, naming the JSON
// types rather than Go's, and a number beyond float64 as not finite.
func (s *jsonScanner) checkType(t reflect.Type, tok json.Token) error {
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
		if len(tok) > MaxNumberLen {
			// The length limit of a typed number, which a form, a flag
			// and a sheet hold: 0.01 followed by 100,000 zeros was taken.
			return s.err(RuleNumberSyntax, "%d characters, at most %d", len(tok), MaxNumberLen)
		}
		switch t.Kind() {
		case reflect.Float32, reflect.Float64:
			v, err := strconv.ParseFloat(string(tok), t.Bits())
			if err != nil {
				return s.err(elicit.RuleFinite, "got %s", Clip(string(tok), MaxNumberLen))
			}
			if roundsToZero(string(tok), v) {
				return s.err(RuleUnderflow, "got %s", Clip(string(tok), MaxNumberLen))
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
		got = "number " + Clip(string(tok), MaxNumberLen)
	}
	return s.err(s.l.WrongType, "got %s, want %s", got, want)
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
func (s *jsonScanner) object(t reflect.Type) error {
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
	s.steps = append(s.steps, pathStep{inMap: t != nil && t.Kind() == reflect.Map})
	for s.dec.More() {
		s.steps[len(s.steps)-1].pending = true
		tok, raw, err := s.next()
		if err != nil {
			return err
		}
		key := tok.(string) // the decoder reads only strings as keys
		s.steps[len(s.steps)-1].key, s.steps[len(s.steps)-1].pending = key, false
		if err := checkLiteral("", raw); err != nil {
			return s.here(err)
		}
		if err := CheckChars("", key); err != nil {
			return s.here(err)
		}
		if seen[key] {
			return s.err(RuleDuplicateKey, "%q", Clip(key, maxKeyShown))
		}
		if other, ok := folded[foldKey(key)]; ok {
			return s.err(RuleKeySpelling, "%q and %q differ only in letter case", Clip(other, maxKeyShown), Clip(key, maxKeyShown))
		}
		seen[key], folded[foldKey(key)] = true, key
		var vt reflect.Type
		switch {
		case fields != nil:
			ft, ok := fields[key]
			if !ok {
				for name := range fields {
					if strings.EqualFold(name, key) {
						return s.err(RuleKeySpelling, "%q, not %q", name, Clip(key, maxKeyShown))
					}
				}
				return s.err(s.l.Unknown, "%q is not a key of this object", Clip(key, maxKeyShown))
			}
			vt = ft
		case numberKeys:
			n, err := strconv.ParseInt(key, 10, 64)
			if err != nil || strconv.FormatInt(n, 10) != key {
				return s.err(RuleKeySpelling, "%q is not a plain whole number", Clip(key, maxKeyShown))
			}
			vt = elem
		default:
			vt = elem
		}
		if fields == nil && elem != nil {
			// A map's entry: its key and value, and the key's text.
			if err := s.spend(int64(t.Key().Size()+elem.Size()) + int64(len(key))); err != nil {
				return err
			}
		}
		if err := s.value(vt); err != nil {
			return err
		}
	}
	s.steps = s.steps[:len(s.steps)-1]
	_, _, err := s.next()
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

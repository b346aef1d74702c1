package input

import (
	"fmt"
	"math"
	"regexp"
	"strconv"
	"strings"
	"unicode"

	"github.com/parley-elicit/parley/elicit"
)

// RuleNumberSyntax is broken by anything typed as a number that is not a
// plain decimal number.
const RuleNumberSyntax elicit.Rule = "must be a plain decimal number such as 0.25 or 2.5e-3 (a point for decimals, no thousands separators)"

// RuleUnderflow is broken by a number other than 0 that is too small in
// size for a float64 (1e-400): it would be read as 0, a value nobody
// typed.
const RuleUnderflow elicit.Rule = "is too close to 0 to be held: it would be read as 0 (a number other than 0 must be at least 5e-324 in size)"

// Limits on typed numbers.
const (
	MaxNumberLen = 64 // characters of one number, after trimming spaces
	MaxWholeLen  = 12 // digits of one whole number
	MaxListItems = 40 // numbers in one list
)

// plainNumber is the only number syntax accepted: optional sign, decimal
// digits with at most one point, optional exponent. It excludes NaN, Inf,
// hex, underscores, thousands separators and a decimal comma, all of which
// strconv.ParseFloat would take or half-take.
var plainNumber = regexp.MustCompile(`^[+-]?(?:[0-9]+(?:\.[0-9]*)?|\.[0-9]+)(?:[eE][+-]?[0-9]+)?$`)

// Number parses raw as a finite number for the named field. Surrounding
// spaces are ignored; anything else that is not a plain decimal number is
// an *elicit.InputError naming the field: elicit.RuleRequired when empty,
// RuleNumberSyntax for bad syntax or more than MaxNumberLen characters,
// elicit.RuleFinite beyond the float64 range (1e400), RuleUnderflow for a
// number other than 0 that float64 holds only as 0 (1e-400).
func Number(field, raw string) (float64, error) {
	s := strings.TrimSpace(raw)
	if s == "" {
		return 0, &elicit.InputError{Field: field, Rule: elicit.RuleRequired}
	}
	if len(s) > MaxNumberLen || !plainNumber.MatchString(s) {
		return 0, &elicit.InputError{Field: field, Rule: RuleNumberSyntax, Detail: fmt.Sprintf("got %q", Clip(s, 24))}
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsInf(v, 0) || math.IsNaN(v) {
		return 0, &elicit.InputError{Field: field, Rule: elicit.RuleFinite, Detail: fmt.Sprintf("got %q", Clip(s, 24))}
	}
	if roundsToZero(s, v) {
		return 0, &elicit.InputError{Field: field, Rule: RuleUnderflow, Detail: fmt.Sprintf("got %q", Clip(s, 24))}
	}
	if v == 0 {
		// −0 is 0: kept as IEEE negative zero it was written back as
		// "-0", a bound shown as [-0, 1].
		v = 0
	}
	return v, nil
}

// roundsToZero reports whether the decimal s, which strconv read as v,
// is a number other than 0 that a float64 holds only as 0: strconv
// returns 0 without an error for 1e-400, where it returns ±Inf with one
// for 1e400. A subnormal (1e-320) is held, inexactly, and is left to the
// rules of the field it is typed in.
func roundsToZero(s string, v float64) bool {
	if v != 0 {
		return false
	}
	if i := strings.IndexAny(s, "eE"); i >= 0 {
		s = s[:i]
	}
	return strings.ContainsAny(s, "123456789")
}

// Percent parses raw as Number does, a percentage, and returns it as a
// proportion: the float64 nearest the typed decimal divided by 100, so
// 28.81 is 0.2881 exactly as typed, where 28.81 / 100 in floating point
// is 0.28809999999999997 (the typed number is rounded once, then the
// quotient again). The field and the rules are Number's; a percentage
// whose proportion is too small to hold (1e-323%) breaks RuleUnderflow.
func Percent(field, raw string) (float64, error) {
	v, err := Number(field, raw)
	if err != nil {
		return 0, err
	}
	s := strings.TrimSpace(raw)
	if v == 0 {
		return 0, nil
	}
	if p := percentOf(v, s); p != 0 {
		return p, nil
	}
	return 0, &elicit.InputError{Field: field, Rule: RuleUnderflow, Detail: fmt.Sprintf("got %q%%", Clip(s, 24))}
}

// percentOf is the float64 nearest the decimal s over 100; v is s as a
// float64.
func percentOf(v float64, s string) float64 {
	mant, exp := s, 0
	if i := strings.IndexAny(s, "eE"); i >= 0 {
		mant = s[:i]
		var err error
		if exp, err = strconv.Atoi(s[i+1:]); err != nil {
			return v / 100 // an exponent beyond int: 0 or out of range either way
		}
	}
	p, err := strconv.ParseFloat(mant+"e"+strconv.Itoa(exp-2), 64)
	if err != nil {
		return v / 100
	}
	return p
}

// Whole parses raw as a whole number in [min, max]: digits only (no sign,
// point or exponent). Leading zeros are allowed; a number with more than
// MaxWholeLen digits after them is above every max Parley uses (max must
// be below 10^MaxWholeLen) and is refused as out of range, the rule it
// breaks, without being converted.
func Whole(field, raw string, min, max int) (int, error) {
	s := strings.TrimSpace(raw)
	if s == "" {
		return 0, &elicit.InputError{Field: field, Rule: elicit.RuleRequired}
	}
	if digits, neg := strings.CutPrefix(s, "-"); neg && digits != "" && strings.TrimLeft(digits, "0123456789") == "" {
		if strings.TrimLeft(digits, "0") == "" {
			// −0 is 0: refusing it as "0 to 1000000, got -0" named a
			// value inside the range it gave.
			s = digits
		} else {
			// −1 is a whole number, so "must be a whole number" would
			// mislead: it is below the range.
			return 0, &elicit.InputError{Field: field, Rule: elicit.RuleCountRange, Detail: fmt.Sprintf("%d to %d, got %s", min, max, Clip(s, 24))}
		}
	}
	if strings.TrimLeft(s, "0123456789") != "" {
		return 0, &elicit.InputError{Field: field, Rule: elicit.RuleInteger, Detail: fmt.Sprintf("got %q", Clip(s, 24))}
	}
	n, err := 0, error(nil)
	if len(strings.TrimLeft(s, "0")) > MaxWholeLen {
		err = strconv.ErrRange
	} else {
		n, err = strconv.Atoi(s)
	}
	if err != nil || n < min || n > max {
		return 0, &elicit.InputError{Field: field, Rule: elicit.RuleCountRange, Detail: fmt.Sprintf("%d to %d, got %s", min, max, Clip(s, 24))}
	}
	return n, nil
}

// Numbers parses a list of numbers separated by spaces, commas or
// semicolons, each by Number's rule; at most MaxListItems. Item i is
// reported as field[i].
func Numbers(field, raw string) ([]float64, error) {
	items := strings.FieldsFunc(raw, func(r rune) bool { return r == ',' || r == ';' || unicode.IsSpace(r) })
	if len(items) == 0 {
		return nil, &elicit.InputError{Field: field, Rule: elicit.RuleRequired}
	}
	if len(items) > MaxListItems {
		return nil, &elicit.InputError{Field: field, Rule: elicit.RuleCount, Detail: fmt.Sprintf("at most %d numbers, got %d", MaxListItems, len(items))}
	}
	out := make([]float64, len(items))
	for i, it := range items {
		v, err := Number(fmt.Sprintf("%s[%d]", field, i), it)
		if err != nil {
			return nil, err
		}
		out[i] = v
	}
	return out, nil
}

// Typed writes a stored number back the way a person typed it: as a
// percentage (v·100) when percent, in plain decimal notation, rounded to
// 12 significant digits so the binary noise of the conversion does not
// show (0.07·100 is 7, not 7.000000000000001). Number reads it back to
// the same value within that rounding. A number whose plain decimals
// would run past typedPlainMax characters is written with an exponent,
// as it was most likely typed: 1e-300, not a 0 and a point followed by
// 299 zeros, a line that ran off the screen (`parley update --level
// 1e-300`), and 1.5e21, not 22 digits.
func Typed(v float64, percent bool) string {
	if percent {
		v *= 100
	}
	if p, err := strconv.ParseFloat(strconv.FormatFloat(v, 'g', 12, 64), 64); err == nil {
		v = p
	}
	if v == 0 {
		// −0, as a record's facts may keep it (the chain tells it from
		// 0), is written 0, as Number reads a typed -0: a form wrote
		// it back as "-0".
		v = 0
	}
	s := strconv.FormatFloat(v, 'f', -1, 64)
	if len(s) <= typedPlainMax {
		return s
	}
	s = strconv.FormatFloat(v, 'g', -1, 64)
	if mant, exp, ok := strings.Cut(s, "e"); ok {
		s = mant + "e" + strings.TrimPrefix(strings.Replace(exp, "-0", "-", 1), "+")
		s = strings.Replace(s, "e0", "e", 1)
	}
	return s
}

// typedPlainMax is the longest number Typed writes in plain decimals.
const typedPlainMax = 20

package input

import (
	"errors"
	"math"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

func TestNumber(t *testing.T) {
	tests := []struct {
		raw  string
		want float64
		rule elicit.Rule // "" when accepted
	}{
		{"0.25", 0.25, ""},
		{" 0.25 ", 0.25, ""},
		{".5", 0.5, ""},
		{"5.", 5, ""},
		{"-3", -3, ""},
		{"+3", 3, ""},
		{"2.5e-3", 0.0025, ""},
		{"1E2", 100, ""},
		{"", 0, elicit.RuleRequired},
		{"   ", 0, elicit.RuleRequired},
		{"NaN", 0, RuleNumberSyntax},
		{"nan", 0, RuleNumberSyntax},
		{"Inf", 0, RuleNumberSyntax},
		{"-Infinity", 0, RuleNumberSyntax},
		{"0x1p-2", 0, RuleNumberSyntax}, // hex float, which strconv.ParseFloat accepts
		{"0x10", 0, RuleNumberSyntax},
		{"1_000", 0, RuleNumberSyntax}, // underscores, which ParseFloat accepts with base prefixes
		{"1,000", 0, RuleNumberSyntax}, // thousands separator
		{"0,25", 0, RuleNumberSyntax},  // decimal comma
		{"1 000", 0, RuleNumberSyntax},
		{"25%", 0, RuleNumberSyntax},
		{"1e", 0, RuleNumberSyntax},
		{"e5", 0, RuleNumberSyntax},
		{".", 0, RuleNumberSyntax},
		{"--1", 0, RuleNumberSyntax},
		{"1e400", 0, elicit.RuleFinite}, // overflows float64
		// strconv reads these as 0 without an error: refused, not read
		// as a 0 nobody typed (issue 11: underflow refused up front).
		{"1e-400", 0, RuleUnderflow},
		{"-2e-324", 0, RuleUnderflow},
		{"0.000001e-318", 0, RuleUnderflow},
		{"0e-400", 0, ""},
		{"-0.000e-999", 0, ""},
		{"-0", 0, ""},
		{"1e-320", 1e-320, ""}, // a subnormal is held; its field's rules judge it
		{"4.9e-324", 5e-324, ""},
		{"½", 0, RuleNumberSyntax},
		{"٣", 0, RuleNumberSyntax}, // Arabic-Indic digit
	}
	for _, tt := range tests {
		got, err := Number("lower", tt.raw)
		if tt.rule == "" {
			if err != nil || got != tt.want {
				t.Errorf("Number(%q) = %v, %v; want %v", tt.raw, got, err, tt.want)
			}
			continue
		}
		var ie *elicit.InputError
		if !errors.As(err, &ie) || ie.Rule != tt.rule || ie.Field != "lower" {
			t.Errorf("Number(%q) error = %v; want field lower, rule %q", tt.raw, err, tt.rule)
		}
	}
}

// TestNegativeZeroIsZero: a zero typed with a minus sign is the number
// 0, not IEEE −0, which strconv and encoding/json write back as "-0":
// `parley fit --lower -0` printed "Beta(…) on [-0, 1]" and its JSON
// "lower": -0.
func TestNegativeZeroIsZero(t *testing.T) {
	for _, raw := range []string{"-0", "-0.0", "-.0", "-0e5", "-0.000e-999", " -0 "} {
		v, err := Number("lower", raw)
		if err != nil || v != 0 || math.Signbit(v) {
			t.Errorf("Number(%q) = %v (sign bit %v), %v; want 0", raw, v, math.Signbit(v), err)
		}
		p, err := Percent("lower", raw)
		if err != nil || p != 0 || math.Signbit(p) {
			t.Errorf("Percent(%q) = %v (sign bit %v), %v; want 0", raw, p, math.Signbit(p), err)
		}
	}
	vs, err := Numbers("values", "-0, -0.5")
	if err != nil || math.Signbit(vs[0]) || vs[1] != -0.5 {
		t.Errorf("Numbers = %v, %v; want [0 -0.5]", vs, err)
	}
}

// FuzzNumber checks that the parser never panics and accepts
// only finite numbers written in plain decimal notation that strconv reads
// to the same value.
func FuzzNumber(f *testing.F) {
	for _, s := range []string{"0.25", "NaN", "0x1p-2", "1_0", "1,5", "1e400", "-.5e-3", " 7 ", "Inf"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, raw string) {
		v, err := Number("x", raw)
		if err != nil {
			var ie *elicit.InputError
			if !errors.As(err, &ie) || ie.Field != "x" {
				t.Fatalf("error %v does not name the field", err)
			}
			return
		}
		if math.IsNaN(v) || math.IsInf(v, 0) {
			t.Fatalf("accepted non-finite %v from %q", v, raw)
		}
		s := strings.TrimSpace(raw)
		if strings.ContainsAny(s, "xX_,nNiIpP% ") {
			t.Fatalf("accepted %q", raw)
		}
		want, perr := strconv.ParseFloat(s, 64)
		if perr != nil || want != v {
			t.Fatalf("Number(%q) = %v; strconv says %v, %v", raw, v, want, perr)
		}
	})
}

func TestNumbers(t *testing.T) {
	got, err := Numbers("edges", "0, 0.1;0.2  0.5\t1")
	if err != nil || len(got) != 5 || got[4] != 1 {
		t.Fatalf("Numbers = %v, %v", got, err)
	}
	_, err = Numbers("edges", "0, 0.1, x")
	var ie *elicit.InputError
	if !errors.As(err, &ie) || ie.Field != "edges[2]" || ie.Rule != RuleNumberSyntax {
		t.Fatalf("bad item: %v", err)
	}
	if _, err := Numbers("edges", strings.Repeat("1 ", MaxListItems+1)); !errors.As(err, &ie) || ie.Rule != elicit.RuleCount {
		t.Fatalf("too many items: %v", err)
	}
}

func TestText(t *testing.T) {
	tests := []struct {
		raw      string
		max      int
		required bool
		rule     elicit.Rule
	}{
		{"Ines", 10, true, ""},
		{"  ", 10, true, elicit.RuleRequired},
		{"", 10, false, ""},
		{"ééééé", 5, true, ""}, // counted in characters, not bytes
		{"éééééé", 5, true, RuleTooLong},
		{"a\x00b", 10, true, RuleTextValid},
		{"a\xffb", 10, true, RuleTextValid},
		{"line one\nline two", 40, true, ""},
	}
	for _, tt := range tests {
		_, err := Text("name", tt.raw, tt.max, tt.required)
		var ie *elicit.InputError
		switch {
		case tt.rule == "" && err != nil:
			t.Errorf("Text(%q) = %v; want ok", tt.raw, err)
		case tt.rule != "" && (!errors.As(err, &ie) || ie.Rule != tt.rule || ie.Field != "name"):
			t.Errorf("Text(%q) = %v; want rule %q", tt.raw, err, tt.rule)
		}
	}
}

func TestWhole(t *testing.T) {
	tests := []struct {
		raw  string
		want int
		rule elicit.Rule
	}{
		{"24", 24, ""},
		{" 7 ", 7, ""},
		{"0", 0, ""},
		{"", 0, elicit.RuleRequired},
		{"-1", 0, elicit.RuleCountRange}, // a whole number, below the range: "must be a whole number" misled
		{"-0", 0, ""},                    // zero: it was refused as "0 to 1000, got -0"
		{"-000", 0, ""},
		{"-01", 0, elicit.RuleCountRange},
		{"-", 0, elicit.RuleInteger},
		{"-1.5", 0, elicit.RuleInteger},
		{"+3", 0, elicit.RuleInteger},
		{"2.0", 0, elicit.RuleInteger},
		{"1e3", 0, elicit.RuleInteger},
		{"٣", 0, elicit.RuleInteger},
		{"1001", 0, elicit.RuleCountRange},
		{"1234567890123", 0, elicit.RuleCountRange},                  // 13 digits: a whole number, out of range
		{"0000000000003", 3, ""},                                     // leading zeros, 13 characters
		{strings.Repeat("9", 400), 0, elicit.RuleCountRange},         // far out of range, not converted
		{strings.Repeat("0", 40) + "1001", 0, elicit.RuleCountRange}, // out of range behind its zeros
	}
	for _, tt := range tests {
		got, err := Whole("chips", tt.raw, 0, 1000)
		var ie *elicit.InputError
		switch {
		case tt.rule == "" && (err != nil || got != tt.want):
			t.Errorf("Whole(%q) = %v, %v; want %d", tt.raw, got, err, tt.want)
		case tt.rule != "" && (!errors.As(err, &ie) || ie.Rule != tt.rule || ie.Field != "chips"):
			t.Errorf("Whole(%q) = %v; want rule %q", tt.raw, err, tt.rule)
		}
	}
}

// Text is measured in characters whatever their size in bytes, and every
// control character but newline, carriage return and tab is refused, C1
// controls and DEL included (Unicode category Cc).
func TestCheckTextAtTheLimit(t *testing.T) {
	for _, letter := range []string{"a", "é", "語", "𝔸"} { // 1, 2, 3 and 4 bytes in UTF-8
		for _, max := range []int{MaxShortText, MaxLongText} {
			at := strings.Repeat(letter, max)
			if err := CheckText("title", at, max, true); err != nil {
				t.Errorf("%d × %q: %v", max, letter, err)
			}
			var ie *elicit.InputError
			if err := CheckText("title", at+letter, max, true); !errors.As(err, &ie) || ie.Rule != RuleTooLong {
				t.Errorf("%d × %q: %v, want %q", max+1, letter, err, RuleTooLong)
			}
		}
	}
	for _, c := range []string{"\x00", "\x07", "\x1b", "\x7f", "\u0085", "\u009b"} {
		var ie *elicit.InputError
		if err := CheckText("name", "a"+c+"b", 10, true); !errors.As(err, &ie) || ie.Rule != RuleTextValid || ie.Field != "name" {
			t.Errorf("%q: %v, want %q", c, err, RuleTextValid)
		}
	}
	if err := CheckText("reason", "one\r\ntwo\tthree", 20, false); err != nil {
		t.Errorf("newline, CR and tab refused: %v", err)
	}
	// The invisible text-direction embeddings, overrides and isolates
	// (Unicode's explicit bidirectional formatting characters, UAX #9
	// section 2) reorder what follows them on screen: "approve\u202Eton"
	// shows as "approvenot". Refused in every text (a JSON string too:
	// json_test.go).
	for _, c := range []string{"\u202a", "\u202b", "\u202c", "\u202d", "\u202e", "\u2066", "\u2067", "\u2068", "\u2069"} {
		var ie *elicit.InputError
		if err := CheckText("reason", "approve"+c+"ton", 20, false); !errors.As(err, &ie) || ie.Rule != RuleTextValid || !strings.Contains(ie.Detail, "text-direction") {
			t.Errorf("%U: %v, want %q", []rune(c)[0], err, RuleTextValid)
		}
	}
	// Right-to-left names need none of them, and the marks are kept.
	for _, name := range []string{"نور الهدى", "שרה לוי", "Dana \u200fשרה\u200e (QA)"} {
		if err := CheckText("name", name, 40, true); err != nil {
			t.Errorf("%q refused: %v", name, err)
		}
	}
	// CheckText does not trim: what is stored is checked as it is.
	var ie *elicit.InputError
	if err := CheckText("name", "  ", 10, true); !errors.As(err, &ie) || ie.Rule != elicit.RuleRequired {
		t.Errorf("blank required text: %v, want %q", err, elicit.RuleRequired)
	}
}

func TestCheckID(t *testing.T) {
	for _, tt := range []struct {
		id   int64
		rule elicit.Rule
	}{
		{1, ""}, {MaxID, ""}, {0, elicit.RulePositive}, {-5, elicit.RulePositive},
		{MaxID + 1, elicit.RuleCountRange}, {1<<63 - 1, elicit.RuleCountRange},
	} {
		err := CheckID("experts[0].id", tt.id)
		var ie *elicit.InputError
		switch {
		case tt.rule == "" && err != nil:
			t.Errorf("CheckID(%d) = %v", tt.id, err)
		case tt.rule != "" && (!errors.As(err, &ie) || ie.Rule != tt.rule || ie.Field != "experts[0].id"):
			t.Errorf("CheckID(%d) = %v, want %q", tt.id, err, tt.rule)
		}
	}
}

func TestDate(t *testing.T) {
	for _, c := range []struct {
		raw  string
		rule elicit.Rule
	}{
		{"2026-03-31", ""},
		{" 2026-12-02 ", ""},
		{"", elicit.RuleRequired},
		{"2026-02-30", RuleDate}, // no such day
		{"31/03/2026", RuleDate},
		{"2026-3-31", RuleDate},
		{"2026-03-31T00:00", RuleDate},
	} {
		_, err := Date("observed_on", c.raw)
		var ie *elicit.InputError
		switch {
		case c.rule == "" && err != nil:
			t.Errorf("%q: %v", c.raw, err)
		case c.rule != "" && (!errors.As(err, &ie) || ie.Rule != c.rule || ie.Field != "observed_on"):
			t.Errorf("%q: got %v, want field observed_on and rule %q", c.raw, err, c.rule)
		}
	}
}

// Typed writes a number whose plain decimals would run long with an
// exponent, and Number reads it back: `parley update --level 1e-300`
// printed the level as 0. and 299 zeros before its 1.
func TestTypedWritesALongNumberWithAnExponent(t *testing.T) {
	for _, c := range []struct {
		v       float64
		percent bool
		want    string
	}{
		{1e-300, false, "1e-300"}, {1e-300, true, "1e-298"}, {1.5e21, false, "1.5e21"}, {2.5e-7, false, "0.00000025"},
		{0.07, true, "7"}, {123456.789, false, "123456.789"}, {1e-22, false, "1e-22"}, {-3.25e-30, false, "-3.25e-30"},
		// −0 (a record's fact kept as read) is written 0, as Number reads -0.
		{math.Copysign(0, -1), false, "0"}, {math.Copysign(0, -1), true, "0"},
	} {
		got := Typed(c.v, c.percent)
		if got != c.want {
			t.Errorf("Typed(%g, %v) = %q, want %q", c.v, c.percent, got, c.want)
		}
		back := c.v
		if c.percent {
			back *= 100
		}
		if v, err := Number("x", got); err != nil || math.Abs(v-back) > 1e-12*math.Abs(back) {
			t.Errorf("Number(%q) = %v, %v; want %g back", got, v, err, back)
		}
	}
}

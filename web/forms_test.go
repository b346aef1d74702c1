package web

import (
	"errors"
	"math"
	"net/url"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

func TestParseFloatField(t *testing.T) {
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
		{"½", 0, RuleNumberSyntax},
		{"٣", 0, RuleNumberSyntax}, // Arabic-Indic digit
	}
	for _, tt := range tests {
		got, err := parseFloatField("lower", tt.raw)
		if tt.rule == "" {
			if err != nil || got != tt.want {
				t.Errorf("parseFloatField(%q) = %v, %v; want %v", tt.raw, got, err, tt.want)
			}
			continue
		}
		var ie *elicit.InputError
		if !errors.As(err, &ie) || ie.Rule != tt.rule || ie.Field != "lower" {
			t.Errorf("parseFloatField(%q) error = %v; want field lower, rule %q", tt.raw, err, tt.rule)
		}
	}
}

// FuzzParseFloatField checks that the parser never panics and accepts
// only finite numbers written in plain decimal notation that strconv reads
// to the same value.
func FuzzParseFloatField(f *testing.F) {
	for _, s := range []string{"0.25", "NaN", "0x1p-2", "1_0", "1,5", "1e400", "-.5e-3", " 7 ", "Inf"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, raw string) {
		v, err := parseFloatField("x", raw)
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
			t.Fatalf("parseFloatField(%q) = %v; strconv says %v, %v", raw, v, want, perr)
		}
	})
}

func TestParseFloatList(t *testing.T) {
	got, err := parseFloatList("edges", "0, 0.1;0.2  0.5\t1")
	if err != nil || len(got) != 5 || got[4] != 1 {
		t.Fatalf("parseFloatList = %v, %v", got, err)
	}
	_, err = parseFloatList("edges", "0, 0.1, x")
	var ie *elicit.InputError
	if !errors.As(err, &ie) || ie.Field != "edges[2]" || ie.Rule != RuleNumberSyntax {
		t.Fatalf("bad item: %v", err)
	}
	if _, err := parseFloatList("edges", strings.Repeat("1 ", MaxListItems+1)); !errors.As(err, &ie) || ie.Rule != elicit.RuleCount {
		t.Fatalf("too many items: %v", err)
	}
}

func TestParseTextField(t *testing.T) {
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
		{"éééééé", 5, true, elicit.RuleTooLong},
		{"a\x00b", 10, true, RuleTextValid},
		{"a\xffb", 10, true, RuleTextValid},
		{"line one\nline two", 40, true, ""},
	}
	for _, tt := range tests {
		_, err := parseTextField("name", tt.raw, tt.max, tt.required)
		var ie *elicit.InputError
		switch {
		case tt.rule == "" && err != nil:
			t.Errorf("parseTextField(%q) = %v; want ok", tt.raw, err)
		case tt.rule != "" && (!errors.As(err, &ie) || ie.Rule != tt.rule || ie.Field != "name"):
			t.Errorf("parseTextField(%q) = %v; want rule %q", tt.raw, err, tt.rule)
		}
	}
}

func TestFormFailPlacesErrors(t *testing.T) {
	f := newForm(url.Values{"values": {"1 2"}, "custom_probs": {"0.5 0.2"}})
	f.Fail(&elicit.InputError{Field: "values[1]", Rule: elicit.RuleValueIncreasing}, nil)
	f.Fail(&elicit.InputError{Field: "probs[1]", Rule: elicit.RuleProbIncreasing}, map[string]string{"probs": "custom_probs"})
	f.Fail(&elicit.InputError{Field: "alpha", Rule: elicit.RulePositive}, nil)
	f.Fail(errors.New("plain"), nil)
	if f.Error("values") != string(elicit.RuleValueIncreasing) {
		t.Errorf("values: %q", f.Error("values"))
	}
	if f.Error("custom_probs") != string(elicit.RuleProbIncreasing) {
		t.Errorf("custom_probs: %q", f.Error("custom_probs"))
	}
	if !strings.HasPrefix(f.Error(""), "alpha: ") {
		t.Errorf("whole-form error: %q", f.Error(""))
	}
	if f.OK() {
		t.Error("form with errors reports OK")
	}
}

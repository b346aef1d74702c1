package workshop

import (
	"errors"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

// TestPercentIsKeptAsTyped: a percentage typed on the form or in a sheet
// is stored as the typed decimal over 100, so 28.81% is 0.2881 in the
// record, not 0.28809999999999997 (28.81 rounded to a float64, then
// divided); the same for a four-value confidence of 80.5%.
func TestPercentIsKeptAsTyped(t *testing.T) {
	q := Question{Lower: 0, Upper: 1, Format: FormatQuantiles, Probs: ProbsDefault} // a proportion
	for _, c := range []struct {
		raw       string
		asPercent bool
	}{{"28.81%", false}, {"28.81 %", false}, {"28.81", true}} {
		v, pct, err := ParseAnswerNumber("values[1]", c.raw, q, c.asPercent)
		if err != nil || !pct || v != 0.2881 {
			t.Errorf("%q (percent unit %v): %v, %v, %v; want 0.2881 read as a percentage", c.raw, c.asPercent, v, pct, err)
		}
	}
	if v, err := ParseConfidence("80.5"); err != nil || v != 0.805 {
		t.Errorf("confidence 80.5: %v, %v; want 0.805", v, err)
	}
}

// A confidence typed as a fraction is refused with the percentage it
// likely meant, to four figures, and without one where none is sensible;
// a % sign on a question that is not a proportion is refused.
func TestAnswerValuesRefused(t *testing.T) {
	for _, c := range []struct{ raw, detail string }{
		{"0.8", "80"}, {"1", "100"}, {"0.12345", "12.35"}, {"0.01", "1"}, {"0.00999", ""},
	} {
		_, err := ParseConfidence(c.raw)
		var ie *elicit.InputError
		if !errors.As(err, &ie) || ie.Rule != RuleConfidencePercent || ie.Detail != c.detail {
			t.Errorf("confidence %s: %v, want %q suggested", c.raw, err, c.detail)
		}
	}
	days := Question{Lower: 0, Upper: 60, Format: FormatQuantiles, Probs: ProbsDefault}
	_, _, err := ParseAnswerNumber("values[0]", "20%", days, false)
	var ie *elicit.InputError
	if !errors.As(err, &ie) || ie.Field != "values[0]" || ie.Rule != RulePercentHere {
		t.Errorf("%% on a question off [0, 1]: %v", err)
	}
	if v, pct, err := ParseAnswerNumber("values[0]", "20", days, true); err != nil || pct || v != 20 {
		t.Errorf("a plain 20 in the percent unit off [0, 1]: %v %v %v, want 20 as typed", v, pct, err)
	}
}

package web

import (
	"errors"
	"net/url"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

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

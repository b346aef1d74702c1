package main

import (
	"strings"
	"testing"
)

// A level or coverage typed on the command line is written back as typed,
// in percent: 0.9999999999 is 99.99999999%, not 100% (rounded to four
// decimals) nor 99.99999998999999% (100·level in float64).
func TestTypedLevelsReadAsTyped(t *testing.T) {
	cases := []struct {
		args []string
		want string
	}{
		{[]string{"update", "--alpha", "2", "--beta", "3", "--successes", "1", "--trials", "4", "--level", "0.9999999999"},
			"99.99999999% equal-tailed interval"},
		{[]string{"plan", "--alpha", "2", "--beta", "2", "--trials", "5", "--length", "0.5", "--level", "0.9999999999"},
			"equal-tailed 99.99999999% intervals"},
		{[]string{"prior", "--interval", "0.001,0.002", "--coverage", "0.000001"}, "(asked 0.0001%)"},
		// The moment match's refusal, given as a warning beside the exact match.
		{[]string{"prior", "--interval", "0.001,0.002", "--coverage", "0.000001"}, "[0.001, 0.002] at 0.0001% coverage"},
	}
	for _, c := range cases {
		code, out, errOut := runCLI(t, "", c.args...)
		if code != 0 {
			t.Fatalf("%v: exit %d: %s", c.args, code, errOut)
		}
		if !strings.Contains(out, c.want) {
			t.Errorf("%v: output lacks %q:\n%s", c.args, c.want, out)
		}
	}
}

// One trial and one success are counted in the singular.
func TestOneTrialInTheSingular(t *testing.T) {
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"update", "--alpha", "2", "--beta", "3", "--successes", "1", "--trials", "1"}, "data 1 success in 1 trial"},
		{[]string{"plan", "--alpha", "2", "--beta", "3", "--trials", "1", "--threshold", "0.5", "--direction", "below", "--confidence", "0.5"},
			"a study of 1 trial gets"},
	} {
		code, out, errOut := runCLI(t, "", c.args...)
		if code != 0 {
			t.Fatalf("%v: exit %d: %s", c.args, code, errOut)
		}
		if !strings.Contains(out, c.want) || strings.Contains(out, "1 trials") || strings.Contains(out, " 1 successes") {
			t.Errorf("%v: output lacks %q or counts one in the plural:\n%s", c.args, c.want, out)
		}
	}
}

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

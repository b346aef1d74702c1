package main

import (
	"strings"
	"testing"
)

// The probabilities and proportions of plan and update take a % sign, as
// prior's --coverage and the web's quick priors and study plan do: "95%"
// was refused as not a plain decimal number beside a --coverage of 90%
// taken. The output is the fraction's; a plain 95 stays refused.
func TestPercentFlagsOfPlanAndUpdate(t *testing.T) {
	for _, c := range []struct{ percents, fractions []string }{
		{[]string{"plan", "--alpha", "2", "--beta", "38", "--trials", "100", "--threshold", "8%", "--direction", "below", "--confidence", "95%",
			"--length", "10%", "--level", "95 %", "--criterion", "woc", "--woc-trim", "5%", "--format", "json"},
			[]string{"plan", "--alpha", "2", "--beta", "38", "--trials", "100", "--threshold", "0.08", "--direction", "below", "--confidence", "0.95",
				"--length", "0.1", "--level", "0.95", "--criterion", "woc", "--woc-trim", "0.05", "--format", "json"}},
		{[]string{"update", "--alpha", "2", "--beta", "38", "--successes", "3", "--trials", "40", "--level", "90%", "--format", "json"},
			[]string{"update", "--alpha", "2", "--beta", "38", "--successes", "3", "--trials", "40", "--level", "0.9", "--format", "json"}},
	} {
		code, got, errOut := runCLI(t, "", c.percents...)
		if code != 0 {
			t.Errorf("%s with %% signs: exit %d: %s", c.percents[0], code, errOut)
			continue
		}
		if _, want, _ := runCLI(t, "", c.fractions...); got != want {
			t.Errorf("%s with %% signs printed\n%s\nas fractions\n%s", c.percents[0], got, want)
		}
	}
	code, _, errOut := runCLI(t, "", "update", "--alpha", "2", "--beta", "38", "--successes", "3", "--trials", "40", "--level", "90")
	if code != 2 || !strings.Contains(errOut, "level") {
		t.Errorf("--level 90: exit %d, %q; want 2 naming the level", code, errOut)
	}
}

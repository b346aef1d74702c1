package main

import (
	"strings"
	"testing"
)

// `parley calibrate --leave-one-out` on a panel of one expert answering
// one calibration question can rerun nothing: it printed "largest shift
// ...: 0", a steadiness nothing tested, and each rerun's note was the
// library's "elicit: assessments: wrong number of entries (need at least
// 1 assessment, got 0)". It says no rerun could be done, and why, in the
// calibration page's words.
func TestCalibrateLeaveOneOutOfALonePanel(t *testing.T) {
	csv := "expert,question,realization,q05,q50,q95\nA,Q1,0.3,0.1,0.3,0.5\n"
	code, out, errOut := runCLI(t, csv, "calibrate", "--input", "-", "--leave-one-out")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	for _, bad := range []string{"wrong number of entries", "elicit:", "range): 0\n"} {
		if strings.Contains(out, bad) {
			t.Errorf("the report says %q:\n%s", bad, out)
		}
	}
	for _, want := range []string{
		"no rerun could be done",
		"leaving out the only calibration question leaves nothing to score",
		"leaving out the only expert leaves no one to score",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("the report lacks %q:\n%s", want, out)
		}
	}
	// With two experts the rerun without each is done; the one without
	// the only question is not.
	csv += "B,Q1,0.3,0.2,0.25,0.28\n"
	_, out, _ = runCLI(t, csv, "calibrate", "--input", "-", "--leave-one-out")
	if strings.Contains(out, "no rerun could be done") || !strings.Contains(out, "leaving out the only calibration question leaves nothing to score") ||
		strings.Contains(out, "leaving out the only expert") {
		t.Errorf("two experts, one question:\n%s", out)
	}
}

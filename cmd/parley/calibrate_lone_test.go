package main

import (
	"encoding/json"
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

// Its JSON says the same: "reruns_done": 0 beside a "max_shift" of 0
// that measures nothing, and each case's note in the text's words, not
// the library's "wrong number of entries".
func TestCalibrateLeaveOneOutOfALonePanelAsJSON(t *testing.T) {
	csv := "expert,question,realization,q05,q50,q95\nA,Q1,0.3,0.1,0.3,0.5\n"
	code, out, errOut := runCLI(t, csv, "calibrate", "--input", "-", "--leave-one-out", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	var got struct {
		LeaveOneOut struct {
			RerunsDone *int `json:"reruns_done"`
			Cases      []struct {
				Error string `json:"error"`
			} `json:"cases"`
		} `json:"leave_one_out"`
	}
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatal(err)
	}
	if r := got.LeaveOneOut.RerunsDone; r == nil || *r != 0 {
		t.Errorf("reruns_done %v, want 0:\n%s", r, out)
	}
	if strings.Contains(out, "wrong number of entries") || len(got.LeaveOneOut.Cases) != 2 ||
		got.LeaveOneOut.Cases[0].Error != "leaving out the only calibration question leaves nothing to score" ||
		got.LeaveOneOut.Cases[1].Error != "leaving out the only expert leaves no one to score" {
		t.Errorf("the cases' notes:\n%s", out)
	}
	csv += "B,Q1,0.3,0.2,0.25,0.28\n"
	if _, out, _ = runCLI(t, csv, "calibrate", "--input", "-", "--leave-one-out", "--format", "json"); !strings.Contains(out, `"reruns_done": 2`) {
		t.Errorf("two experts, one question: want \"reruns_done\": 2\n%s", out)
	}
}

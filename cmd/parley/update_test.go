package main

import (
	"encoding/json"
	"slices"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// The study page, the report and the record show workshop.StudyUpdate;
// for the same prior and data totals it gives `parley update`'s numbers,
// every one of them, whether the data came in one batch or several.
func TestUpdateAgreesWithTheStudyPage(t *testing.T) {
	q := workshop.Question{ID: 1, Lower: 0, Upper: 1}
	for _, c := range []struct {
		alpha, beta string
		batches     [][2]int
	}{
		{"2.1", "48", [][2]int{{3, 120}}},
		{"2.9505311711722633", "55.560337312905354", [][2]int{{3, 120}, {5, 80}}},
		{"0.5", "0.5", [][2]int{{0, 10}, {0, 7}}},
		{"30", "3", [][2]int{{1, 40}}}, // data in conflict with the prior
	} {
		var data []workshop.StudyData
		s, n := 0, 0
		for _, b := range c.batches {
			data = append(data, workshop.StudyData{QuestionID: 1, Successes: b[0], Trials: b[1]})
			s, n = s+b[0], n+b[1]
		}
		cli, err := updateCommand(c.alpha, c.beta, itoa(s), itoa(n), "0.95", "json")
		if err != nil {
			t.Fatal(err)
		}
		u, err := workshop.StudyUpdate(q, workshop.AgreedPrior{Dist: elicit.Unit(cli.Prior)}, data)
		if err != nil {
			t.Fatal(err)
		}
		if u.Posterior.Alpha != cli.Alpha || u.Posterior.Beta != cli.Beta || u.Mean != cli.Mean || u.SD != cli.SD ||
			u.Interval != cli.Interval || u.HDI != cli.HDI || cli.Conflict == nil || u.Conflict != *cli.Conflict || u.Level != cli.Level {
			t.Errorf("Beta(%s, %s) with %v: study page %+v, parley update %+v", c.alpha, c.beta, c.batches, u, cli)
		}
	}
}

func itoa(n int) string { return strconv.Itoa(n) }

// `parley update` under Beta(1e-5, 0.99999) writes its 95% intervals as
// [0, 0]; it says, on both lines and in a warning with the code
// beyond_double, that their ends lie a hair above 0, and where (the
// values are elicit's TestIntervalsBeyondDouble's, from R). It wrote
// [0, 0] with no word, where `parley prior` and `parley fit` say so.
func TestUpdateSaysAnIntervalEndHeldAsABound(t *testing.T) {
	code, out, errOut := runCLI(t, "", "update", "--alpha", "1e-5", "--beta", "0.99999", "--successes", "0", "--trials", "0")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	for _, want := range []string{
		"95% equal-tailed interval [0, 0] (a point nearer its bound than a double holds",
		"95% highest-density interval [0, 0] (a point nearer its bound than a double holds",
		"the 97.5% point is about 2.9e-1100",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
	var got updateOutput
	code, out, _ = runCLI(t, "", "update", "--alpha", "1e-5", "--beta", "0.99999", "--successes", "0", "--trials", "10", "--format", "json")
	if code != 0 || json.Unmarshal([]byte(out), &got) != nil {
		t.Fatalf("exit %d: %s", code, out)
	}
	if len(got.WarningCode) != len(got.Warnings) || !slices.Contains(got.WarningCode, "beyond_double") || !slices.Contains(got.WarningCode, "hdi_shape") {
		t.Errorf("warning_codes %q for warnings %q", got.WarningCode, got.Warnings)
	}
	// An ordinary update says nothing of the kind, on neither line.
	if _, out, _ := runCLI(t, "", "update", "--alpha", "0.5", "--beta", "3", "--successes", "0", "--trials", "10"); strings.Contains(out, "nearer its bound") {
		t.Errorf("Beta(0.5, 13)'s intervals are said to be held as a bound:\n%s", out)
	}
}

package main

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/answersheet"
	"github.com/parley-elicit/parley/elicit/calibsheet"
	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/elicit/workshop/workshoptest"
)

const inverterSeeds = "../../testdata/calibration/inverter_seeds.csv"

// calibrateJSON is the public JSON contract of `parley calibrate`.
type calibrateJSON struct {
	Alpha   *float64 `json:"alpha"`
	Experts []struct {
		Expert      string   `json:"expert"`
		Calibration *float64 `json:"calibration"`
		Information *float64 `json:"information"`
		Weight      *float64 `json:"weight"`
	} `json:"experts"`
	Pooled struct {
		Calibration *float64 `json:"calibration"`
		Information *float64 `json:"information"`
	} `json:"pooled"`
}

func runCalibrateJSON(t *testing.T, args ...string) calibrateJSON {
	t.Helper()
	code, out, errOut := runCLI(t, "", append([]string{"calibrate", "--format", "json"}, args...)...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	var got calibrateJSON
	decodeJSON(t, out, &got)
	if got.Alpha == nil || got.Pooled.Calibration == nil || got.Pooled.Information == nil || len(got.Experts) == 0 {
		t.Fatalf("missing keys in %s", out)
	}
	for _, e := range got.Experts {
		if e.Expert == "" || e.Calibration == nil || e.Information == nil || e.Weight == nil {
			t.Fatalf("missing expert keys in %s", out)
		}
	}
	return got
}

func TestCalibrateJSON(t *testing.T) {
	got := runCalibrateJSON(t, "--input", inverterSeeds)
	sum := 0.0
	byName := map[string]float64{}
	for _, e := range got.Experts {
		sum += *e.Weight
		byName[e.Expert] = *e.Weight
		if *e.Weight > 0 && *e.Calibration < *got.Alpha {
			t.Errorf("%s has weight %v below the cut-off %v", e.Expert, *e.Weight, *got.Alpha)
		}
	}
	if math.Abs(sum-1) > 1e-12 {
		t.Errorf("weights sum to %v", sum)
	}
	// The invented overconfident expert misses 7 of 8 realisations and
	// must end with less weight than any other.
	for _, name := range []string{"Ama", "Bruno", "Dagny"} {
		if !(byName["Chidi"] < byName[name]) {
			t.Errorf("Chidi weight %v not below %s's %v", byName["Chidi"], name, byName[name])
		}
	}

	// With --alpha 0 every weight is ∝ calibration × information.
	zero := runCalibrateJSON(t, "--input", inverterSeeds, "--alpha", "0")
	total := 0.0
	for _, e := range zero.Experts {
		total += *e.Calibration * *e.Information
	}
	for _, e := range zero.Experts {
		want := *e.Calibration * *e.Information / total
		if math.Abs(*e.Weight-want) > 1e-12 || *e.Weight == 0 {
			t.Errorf("--alpha 0: %s weight %v, want %v", e.Expert, *e.Weight, want)
		}
	}
	if *zero.Alpha != 0 {
		t.Errorf("--alpha 0 reported alpha %v", *zero.Alpha)
	}

	// The CLI reports what elicit computes from the same rows.
	as, real := inverterAssessments(t)
	s, err := elicit.ClassicalModel(as, real, nil, elicit.ModelOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if *got.Alpha != s.Alpha || *got.Pooled.Calibration != s.Pooled.Calibration {
		t.Errorf("CLI alpha %v DM %v, elicit %v %v", *got.Alpha, *got.Pooled.Calibration, s.Alpha, s.Pooled.Calibration)
	}
}

func inverterAssessments(t *testing.T) ([]elicit.SeedAssessment, map[string]float64) {
	t.Helper()
	f, err := os.Open(inverterSeeds)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	s, err := calibsheet.Read(f)
	if err != nil {
		t.Fatal(err)
	}
	return s.Assessments, s.Realisations
}

func TestCalibrateLeaveOneOut(t *testing.T) {
	code, out, errOut := runCLI(t, "", "calibrate", "--input", inverterSeeds, "--leave-one-out", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	var got struct {
		LeaveOneOut *elicit.LeaveOneOutReport `json:"leave_one_out"`
	}
	decodeJSON(t, out, &got)
	if got.LeaveOneOut == nil || len(got.LeaveOneOut.Cases) != 8+4 || !(got.LeaveOneOut.MaxShift > 0) {
		t.Fatalf("leave_one_out: %+v", got.LeaveOneOut)
	}
	code, out, _ = runCLI(t, "", "calibrate", "--input", inverterSeeds, "--leave-one-out")
	if code != 0 || !strings.Contains(out, "Leave one out") || !strings.Contains(out, "Chidi") {
		t.Errorf("text output:\n%s", out)
	}
}

func TestCalibrateText(t *testing.T) {
	code, out, errOut := runCLI(t, "", "calibrate", "--input", inverterSeeds)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	for _, want := range []string{"Cut-off alpha", "Ama", "Chidi", "pooled (performance weights)", "weight",
		"chosen to maximise the performance-weighted pool's calibration × information"} {
		if !strings.Contains(out, want) {
			t.Errorf("text output lacks %q:\n%s", want, out)
		}
	}
	// The pool is named in our own words, as on the calibration page.
	if strings.Contains(out, "decision maker") {
		t.Errorf("text output says \"decision maker\":\n%s", out)
	}
}

func TestCalibrateExtraQuantiles(t *testing.T) {
	csv := "expert,question,realization,q05,q25,q50,q75,q95\n" +
		"A,s1,5,1,3,5,7,9\nB,s1,5,2,4,4.5,5.5,8\n" +
		"A,s2,2,1,3,5,7,9\nB,s2,2,0,1,1.5,2.5,3\n"
	code, out, errOut := runCLI(t, csv, "calibrate", "--input", "-", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	if !strings.Contains(out, `"probs": [
    0.05,
    0.25,
    0.5,
    0.75,
    0.95
  ]`) {
		t.Errorf("probabilities not read from the qNN columns:\n%s", out)
	}
}

func TestCalibrateBadInput(t *testing.T) {
	const head = "expert,question,realization,q05,q50,q95\n"
	const boundsHead = "expert,question,realization,lower,upper,q05,q50,q95\n"
	const scaleHead = "expert,question,realization,lower,upper,background,q05,q50,q95\n"
	const adjacent = "A,q1,5,5,5.000000000000001,5.000000000000002\nB,q1,5,5,5.000000000000001,5.000000000000002\n"
	for _, c := range []struct {
		name string
		csv  string
		args []string
		want []string // all must appear in the one stderr line
	}{
		{"no quantile column", "expert,question,realization\nA,s1,1\n", nil, []string{"header", string(elicit.RuleRequired), "no quantile column"}},
		{"bounds but no quantile column", "expert,question,realization,lower,upper\nA,s1,1,0,2\n", nil, []string{"header", "no quantile column"}},
		{"empty quantile", head + "A,s1,1,0,,2\n", nil, []string{"row 2", "q50", string(elicit.RuleRequired)}},
		{"short row", head + "A,s1,1,0,1\n", nil, []string{"row 2", "q95", string(elicit.RuleRequired)}},
		{"non-increasing", head + "A,s1,1,0,1,2\nA,s2,1,0,2,2\n", nil, []string{"row 3", "q95", string(elicit.RuleValueIncreasing)}},
		{"missing realization", head + "A,s1,1,0,1,2\nB,s1,,0,1,2\n", nil, []string{"row 3", "realization", string(elicit.RuleRequired)}},
		{"realization differs", head + "A,s1,1,0,1,2\nB,s1,1.5,0,1,2\n", nil, []string{"row 3", "realization", "row 2"}},
		{"duplicate", head + "A,s1,1,0,1,2\nB,s1,1,0,1,2\nA,s1,1,0,1,3\n", nil, []string{"row 4", string(elicit.RuleDuplicate), "row 2"}},
		{"NaN", head + "A,s1,1,0,NaN,2\n", nil, []string{"row 2", "q50"}},
		{"Inf", head + "A,s1,Inf,0,1,2\n", nil, []string{"row 2", "realization"}},
		{"text", head + "A,s1,1,zero,1,2\n", nil, []string{"row 2", "q05"}},
		{"comment lines count", "# invented\n" + head + "A,s1,1,0,1,2\nA,s2,1,3,1,2\n", nil, []string{"row 4", "q50", string(elicit.RuleValueIncreasing)}},
		{"no expert", head + ",s1,1,0,1,2\n", nil, []string{"row 2", "expert", string(elicit.RuleRequired)}},
		{"wrong header", "who,question,realization,q05,q50,q95\n", nil, []string{"header column 1"}},
		{"no rows", head, nil, []string{"rows"}},
		{"q100", "expert,question,realization,q05,q50,q95,q100\nA,s1,1,0,1,2,3\n", nil, []string{`"q100"`}},
		{"quantile columns out of order", "expert,question,realization,q50,q05,q95\nA,s1,1,0,1,2\n", nil, []string{`"q05"`, string(elicit.RuleProbIncreasing)}},
		{"unknown column", "expert,question,realization,q05,q50,q95,notes\nA,s1,1,0,1,2,x\n", nil, []string{`"notes"`}},
		{"alpha too high", head + "A,s1,1,0,1,2\n", []string{"--alpha", "1.5"}, []string{"alpha", string(elicit.RuleUnitInterval)}},
		{"alpha NaN", head + "A,s1,1,0,1,2\n", []string{"--alpha", "NaN"}, []string{"alpha"}},
		{"no input", "", []string{"--input", ""}, []string{"input"}},
		// Issue 11: quantiles of ±1.7e308 overflowed the question's range
		// and were reported as "every calibration score is 0".
		{"quantiles overflow the range", head + "A,s1,1,-1.7e308,0,1.7e308\nB,s1,1,0,1,2\n", nil, []string{"row 2", "q05", string(elicit.RuleBoundsRange)}},
		{"realization too large", head + "A,s1,1e301,0,1,2\n", nil, []string{"row 2", "realization", string(elicit.RuleBoundsRange)}},
		// Review 3, finding 2: adjacent floats printed +Inf and NaN with
		// exit 0 (text) and failed with exit 1 (JSON).
		{"adjacent floats", head + adjacent, nil, []string{"row 2: q50: " + string(elicit.RuleQuantilesTooClose)}},
		{"adjacent floats as JSON", head + adjacent, []string{"--format", "json"}, []string{"row 2: q50: " + string(elicit.RuleQuantilesTooClose)}},
		// The file was read whole whatever its size (200 MB took
		// gigabytes and crashed), and a header column quoted whole.
		{"larger than 4 MiB", head + strings.Repeat("A,s1,1,0,1,2\n", 350_000), nil, []string{"input: " + string(input.RuleTooLong)}},
		{"a header column of 1 MB", head[:len(head)-1] + "," + strings.Repeat("x", 1<<20) + "\n", nil, []string{`header column "xxxxxxxx`}},
		{"overshoot too small to widen", head + "A,s1,1,0,1,2\n", []string{"--overshoot", "1e-300"}, []string{`questions["s1"]: ` + string(elicit.RuleRangeCollapsed)}},
		// A question's bounds: both or neither, in order, the same on
		// every row, holding the realisation and the quantiles inside.
		{"bounds header without upper", "expert,question,realization,lower,q05,q50,q95\nA,s1,1,0,0.5,1,2\n", nil, []string{`header column "lower"`, "lower,upper"}},
		{"bounds header reversed", "expert,question,realization,upper,lower,q05,q50,q95\nA,s1,1,9,0,0.5,1,2\n", nil, []string{`header column "upper"`}},
		{"one bound", boundsHead + "A,s1,1,0,,0.5,1,2\n", nil, []string{"row 2: lower, upper", string(calibsheet.RuleBoundsPair)}},
		{"bounds out of order", boundsHead + "A,s1,1,9,0,0.5,1,2\n", nil, []string{"row 2: upper", string(elicit.RuleBoundsOrder)}},
		{"bound not a number", boundsHead + "A,s1,1,zero,9,0.5,1,2\n", nil, []string{"row 2: lower"}},
		{"bound too large", boundsHead + "A,s1,1,0,1e301,0.5,1,2\n", nil, []string{"row 2: upper", string(elicit.RuleBoundsRange)}},
		{"realization outside the bounds", boundsHead + "A,s1,12,0,9,0.5,1,2\n", nil, []string{"row 2: realization", string(elicit.RuleInRange), "outside [0, 9]"}},
		{"quantile on a bound", boundsHead + "A,s1,1,0,9,0,1,2\n", nil, []string{"row 2: q05", string(elicit.RuleValueInBounds)}},
		{"bounds differ", boundsHead + "A,s1,1,0,9,0.5,1,2\nB,s1,1,0,10,0.5,1,2\n", nil, []string{"row 3: lower, upper", string(calibsheet.RuleSameBounds), "[0, 10] here, [0, 9] on row 2"}},
		{"bounds dropped on one row", boundsHead + "A,s1,1,0,9,0.5,1,2\nB,s1,1,,,0.5,1,2\n", nil, []string{"row 3: lower, upper", "no bounds here, [0, 9] on row 2"}},
		// A question on the log scale: its values above 0, its lower bound
		// at least 0, one scale on every row; the word is uniform or log.
		{"scale word", scaleHead + "A,s1,1,0,9,logarithmic,0.5,1,2\n", nil, []string{"row 2: background", string(calibsheet.RuleBackgroundWord), `"logarithmic"`}},
		{"log realization at 0", scaleHead + "A,s1,0,0,9,log-uniform,0.5,1,2\n", nil, []string{"row 2: realization", string(elicit.RuleLogScalePositive)}},
		{"log lower bound below 0", scaleHead + "A,s1,1,-1,9,log-uniform,0.5,1,2\n", nil, []string{"row 2: lower", string(elicit.RuleLogScalePositive)}},
		{"log quantile below 0", "expert,question,realization,background,q05,q50,q95\nA,s1,1,log-uniform,-0.5,1,2\n", nil, []string{"row 2: q05", string(elicit.RuleLogScalePositive)}},
		{"scales differ", scaleHead + "A,s1,1,0,9,log-uniform,0.5,1,2\nB,s1,1,0,9,,0.5,1,2\n", nil, []string{"row 3: background", string(calibsheet.RuleSameBackground), "uniform here, log-uniform on row 2"}},
		// A spreadsheet set to a decimal comma saves semicolons or tabs
		// between the columns, said as the answer sheet says it; it read
		// "header column 1: … (want "expert")".
		{"semicolons", "expert;question;realization;q05;q50;q95\nA;s1;1;0;1;2\n", nil, []string{"header: " + string(answersheet.RuleCommas), "separated by semicolons"}},
		{"tabs", "expert\tquestion\trealization\tq05\tq50\tq95\nA\ts1\t1\t0\t1\t2\n", nil, []string{"header: " + string(answersheet.RuleCommas), "separated by tabs"}},
		// Its cells in quote marks, as such a spreadsheet writes them: it
		// read "row 1: must be well-formed CSV (extraneous or missing \"
		// in quoted-field)", as the answer sheet did before it was taught.
		// A spreadsheet's "Unicode text": it read "header column 1: …
		// (want "expert")" of a header whose first column is expert.
		{"UTF-16", "\xff\xfee\x00x\x00p\x00e\x00r\x00t\x00,\x00q\x00\n\x00", nil, []string{"input: " + string(calibsheet.RuleUTF8), "UTF-16"}},
		// A spreadsheet's plain CSV in Windows-1252: "José" was "must be
		// plain text (no control characters …) (not UTF-8)".
		{"Windows-1252", head + "Jos\xe9,s1,1,0,1,2\n", nil, []string{"row 2: expert: " + string(calibsheet.RuleUTF8), "Windows-1252"}},
		{"semicolons between quoted cells", `"expert";"question";"realization";"q05";"q50";"q95"` + "\n" + `"A";"s1";"1";"0";"1";"2"` + "\n", nil, []string{"header: " + string(answersheet.RuleCommas), "separated by semicolons"}},
	} {
		args := []string{"calibrate", "--input", "-"}
		args = append(args, c.args...)
		code, out, errOut := runCLI(t, c.csv, args...)
		if code != 2 {
			t.Errorf("%s: exit %d, want 2; stderr %q", c.name, code, errOut)
			continue
		}
		if out != "" || strings.Count(errOut, "\n") != 1 || len(errOut) > 300 {
			t.Errorf("%s: stdout %q, stderr %.300q (%d bytes)", c.name, out, errOut, len(errOut))
		}
		for _, w := range c.want {
			if !strings.Contains(errOut, w) {
				t.Errorf("%s: stderr %q lacks %q", c.name, errOut, w)
			}
		}
	}
}

// TestCalibrateWriterRefusesNonFinite: the last defence behind the input
// rules. A score that is NaN or ±Inf prints nothing, in either format, and
// is a failure (exit 1), not bad input.
func TestCalibrateWriterRefusesNonFinite(t *testing.T) {
	seeds, err := calibsheet.Read(strings.NewReader("expert,question,realization,q05,q50,q95\nA,q1,3,2,5,8\nB,q1,3,4,5,6\n"))
	if err != nil {
		t.Fatal(err)
	}
	good, err := elicit.ClassicalModel(seeds.Assessments, seeds.Realisations, nil, elicit.ModelOptions{})
	if err != nil {
		t.Fatal(err)
	}
	rob, err := elicit.LeaveOneOut(seeds.Assessments, seeds.Realisations, nil, elicit.ModelOptions{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	breaks := map[string]func(s *elicit.Scores, r *elicit.LeaveOneOutReport){
		"information +Inf": func(s *elicit.Scores, _ *elicit.LeaveOneOutReport) { s.Experts[0].Information = math.Inf(1) },
		"weight NaN":       func(s *elicit.Scores, _ *elicit.LeaveOneOutReport) { s.Experts[1].Weight = math.NaN() },
		"pooled −Inf":      func(s *elicit.Scores, _ *elicit.LeaveOneOutReport) { s.Pooled.Information = math.Inf(-1) },
		"range NaN":        func(s *elicit.Scores, _ *elicit.LeaveOneOutReport) { s.Questions[0].Upper = math.NaN() },
		"shift NaN":        func(_ *elicit.Scores, r *elicit.LeaveOneOutReport) { r.MaxShift = math.NaN() },
	}
	for name, brk := range breaks {
		for _, format := range []string{"text", "json"} {
			s := good
			s.Experts = append([]elicit.ExpertScore(nil), good.Experts...)
			s.Questions = append([]elicit.SeedResult(nil), good.Questions...)
			r := rob
			brk(&s, &r)
			var out, errOut bytes.Buffer
			err := writeCalibration(&out, format, s, &r, true)
			if err == nil || !strings.Contains(err.Error(), "non-finite number; nothing printed") || out.Len() != 0 {
				t.Errorf("%s (%s): error %v, stdout %q", name, format, err, out.String())
				continue
			}
			if code := fail(&errOut, "calibrate", err); code != exitFailure {
				t.Errorf("%s (%s): exit %d, want %d", name, format, code, exitFailure)
			}
		}
	}
	var out bytes.Buffer
	if err := writeCalibration(&out, "text", good, &rob, true); err != nil || out.Len() == 0 {
		t.Errorf("finite scores: error %v, %d bytes printed", err, out.Len())
	}
}

// TestCalibrateNamesFollowTheTextRule: expert and question names are
// printed back, so they meet the text rule of every other name (review 3,
// finding 7: an ESC sequence reached the terminal, a NUL stdout).
func TestCalibrateNamesFollowTheTextRule(t *testing.T) {
	const head = "expert,question,realization,q05,q50,q95\n"
	long := strings.Repeat("é", input.MaxShortText+1)
	for _, c := range []struct {
		name, value, rule, detail string
	}{
		{"NUL", "A\x00", string(input.RuleTextValid), "U+0000"},
		{"ESC sequence", "A\x1b[31mRED", string(input.RuleTextValid), "U+001B"},
		{"C1 control", "A\u0085B", string(input.RuleTextValid), "U+0085"},
		{"DEL", "A\x7f", string(input.RuleTextValid), "U+007F"},
		// In the answer sheet's words for a file in another encoding.
		{"invalid UTF-8", "\xff", string(calibsheet.RuleUTF8), "another encoding"},
		{"201 characters", long, string(input.RuleTooLong), "got 201"},
		{"blank", "  ", string(elicit.RuleRequired), ""},
	} {
		for col, row := range map[string]string{
			"expert":   c.value + ",q1,0.5,0.1,0.4,0.9\n",
			"question": "A," + c.value + ",0.5,0.1,0.4,0.9\n",
		} {
			for _, format := range []string{"text", "json"} {
				code, out, errOut := runCLI(t, head+"B,q0,0.5,0.1,0.4,0.9\n"+row, "calibrate", "--input", "-", "--format", format)
				if code != exitBadInput || out != "" {
					t.Errorf("%s in %s (%s): exit %d, stdout %q; want 2 and nothing", c.name, col, format, code, out)
				}
				for _, w := range []string{"row 3: " + col + ": " + c.rule, c.detail} {
					if !strings.Contains(errOut, w) {
						t.Errorf("%s in %s (%s): stderr %q lacks %q", c.name, col, format, errOut, w)
					}
				}
				if strings.Count(errOut, "\n") != 1 || strings.ContainsAny(errOut, "\x00\x1b\x7f") {
					t.Errorf("%s in %s (%s): stderr %q is not one plain line", c.name, col, format, errOut)
				}
			}
		}
	}
	// At the limit, 200 letters of two bytes each, the name is taken.
	at := strings.Repeat("é", input.MaxShortText)
	code, out, errOut := runCLI(t, head+at+",q1,0.5,0.1,0.4,0.9\nB,q1,0.5,0.2,0.45,0.8\n", "calibrate", "--input", "-", "--format", "json")
	if code != exitOK || !strings.Contains(out, at) {
		t.Errorf("a name of %d characters: exit %d, stderr %q", input.MaxShortText, code, errOut)
	}
}

func TestCalibrateBinary(t *testing.T) {
	if testing.Short() {
		t.Skip("builds the binary")
	}
	bin := parleyBinary(t)
	bad := filepath.Join(t.TempDir(), "bad.csv")
	if err := os.WriteFile(bad, []byte("expert,question,realization,q05,q50,q95\nA,s1,1,0,1,2\nA,s1,1,0,1,2\n"), 0o600); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		args []string
		code int
		want string
	}{
		{[]string{"calibrate", "--input", inverterSeeds, "--format", "json"}, 0, `"pooled"`},
		{[]string{"calibrate", "--input", bad}, 2, "row 3"},
	} {
		cmd := exec.Command(bin, c.args...)
		var out, errOut bytes.Buffer
		cmd.Stdout, cmd.Stderr = &out, &errOut
		err := cmd.Run()
		code := 0
		if ee, ok := err.(*exec.ExitError); ok {
			code = ee.ExitCode()
		} else if err != nil {
			t.Fatal(err)
		}
		text := out.String()
		if c.code != 0 {
			text = errOut.String()
			if strings.Count(text, "\n") != 1 || strings.Contains(text, "goroutine") {
				t.Errorf("%v: stderr %q", c.args, text)
			}
		}
		if code != c.code || !strings.Contains(text, c.want) {
			t.Errorf("%v: exit %d (want %d), output %q lacks %q", c.args, code, c.code, text, c.want)
		}
	}
}

// Dagny's calibration score is 0.0803858, printed to four figures as
// 0.08039. A cut-off fixed at that figure leaves her out, and her row must
// show a score below the cut-off printed above it, not 0.08039 beside
// "Cut-off alpha = 0.08039" with weight 0 (elicit.SideDigits).
func TestCalibrateTextScoreBelowTheCutOff(t *testing.T) {
	code, out, errOut := runCLI(t, "", "calibrate", "--input", inverterSeeds, "--alpha", "0.08039")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	var dagny []string
	for _, line := range strings.Split(out, "\n") {
		if f := strings.Fields(line); len(f) > 0 && f[0] == "Dagny" {
			dagny = f
		}
	}
	if !strings.Contains(out, "Cut-off alpha = 0.08039 (fixed)") || len(dagny) != 6 {
		t.Fatalf("output:\n%s", out)
	}
	if dagny[2] != "0.080386" || dagny[5] != "0" {
		t.Errorf("Dagny's row %v: want calibration 0.080386 and weight 0", dagny)
	}
}

// A fixed cut-off is printed as typed, not to four figures, which could
// put it below the score it leaves out.
func TestCalibrateTextFixedCutOffAsTyped(t *testing.T) {
	code, out, errOut := runCLI(t, "", "calibrate", "--input", inverterSeeds, "--alpha", "0.08039123")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	if !strings.Contains(out, "Cut-off alpha = 0.08039123 (fixed)") {
		t.Errorf("the fixed cut-off is not printed as typed:\n%s", out)
	}
}

// TestCalibrateAgainstSciPy checks parley calibrate against an
// implementation of Cooke's classical model written apart from Parley,
// with SciPy 1.10.1's chi-square tail (testdata/scipy/classical_reference.py;
// its rows in classical_reference.csv), for the invented inverter seeds
// with and without each question's bounds, and with four rare-event
// questions on the log scale (inverter_seeds_log.csv), and with an expert
// who skipped two questions (inverter_seeds_skipped.csv, where the cut-off
// that keeps only her would score the pool on four of the six questions and
// is passed over), and with two experts whose counts mirror each other
// (mirror_seeds.csv: equal calibration scores, kept together), with a
// single calibration question whose true value is one expert's median and
// another's 5% quantile (single_question_seeds.csv: a realisation equal to
// a quantile counts in the bin below it, as P(X ≤ q) = p, so Jun scores
// 1 − F_χ²(2 ln 20; 3) = 0.1120, worked by hand from Cooke 1991, §12.3),
// and with quantiles at 5/25/50/75/95 on percentages, millions and
// millionths, a true value on a bound and an expert who skipped a question
// (five_quantile_seeds.csv), and with true values equal to the medians of
// the experts the cut-off keeps (shared_median_seeds.csv: the pool's median
// there is that value, so its true value counts in the bin below it, as
// for the experts; interpolated to the knot from the one before, it came out
// a unit in the last place below it, and the pool scored 0.5841 for 0.2431),
// with the cut-off optimised and fixed at 0.1.
func TestCalibrateAgainstSciPy(t *testing.T) {
	f, err := os.Open("../../testdata/scipy/classical_reference.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	r := csv.NewReader(f)
	r.Comment = '#'
	rows, err := r.ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	type run struct{ file, mode string }
	want := map[run][][]string{}
	for _, row := range rows[1:] {
		k := run{row[0], row[1]}
		want[k] = append(want[k], row[2:])
	}
	if len(want) != 16 {
		t.Fatalf("%d runs in the reference, want 16", len(want))
	}
	num := func(s string) float64 {
		v, err := strconv.ParseFloat(s, 64)
		if err != nil {
			t.Fatal(err)
		}
		return v
	}
	close := func(what string, got, w float64) {
		t.Helper()
		if math.Abs(got-w) > 1e-9*math.Max(math.Abs(w), 1e-12) {
			t.Errorf("%s = %.17g, SciPy reference %.17g", what, got, w)
		}
	}
	for k, rows := range want {
		args := []string{"--input", "../../" + k.file}
		if k.mode != "optimised" {
			args = append(args, "--alpha", k.mode)
		}
		got := runCalibrateJSON(t, args...)
		byName := map[string]int{}
		for i, e := range got.Experts {
			byName[e.Expert] = i
		}
		for _, row := range rows {
			what := fmt.Sprintf("%s %s %s", k.file, k.mode, row[0])
			switch row[0] {
			case "alpha":
				close(what, *got.Alpha, num(row[1]))
			case "pooled":
				close(what+" calibration", *got.Pooled.Calibration, num(row[1]))
				close(what+" information", *got.Pooled.Information, num(row[2]))
			default:
				i, ok := byName[row[0]]
				if !ok {
					t.Errorf("%s: no such expert in the output", what)
					continue
				}
				e := got.Experts[i]
				close(what+" calibration", *e.Calibration, num(row[1]))
				close(what+" information", *e.Information, num(row[2]))
				close(what+" weight", *e.Weight, num(row[3]))
			}
		}
	}
}

// TestCalibrateLeaveOneOutAgainstSciPy: the robustness report of
// `parley calibrate --leave-one-out` (elicit.LeaveOneOut, the table on the
// calibration page) against SciPy 1.10.1's reruns of the classical model
// without each calibration question and each expert
// (testdata/scipy/leave_one_out_reference.py, on the invented
// calibration files but the one of a single question, with the cut-off optimised and fixed at 0.1): every
// rerun's cut-off and weights, the full panel's and every rerun's pooled
// 5th, 50th and 95th percentiles on every calibration question, the
// shifts and the largest shift. Tolerance as TestCalibrateAgainstSciPy's,
// 1e-9 relative; a shift, a difference of percentiles over a width,
// within 1e-9.
func TestCalibrateLeaveOneOutAgainstSciPy(t *testing.T) {
	data, err := os.ReadFile("../../testdata/scipy/leave_one_out_reference.csv")
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.HasPrefix(data, []byte("# scipy 1.10.1")) {
		t.Fatal("the reference's first line should name SciPy's version")
	}
	r := csv.NewReader(bytes.NewReader(data))
	r.Comment = '#'
	rows, err := r.ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	type run struct{ file, mode string }
	want := map[run][][]string{}
	var order []run
	for _, row := range rows[1:] {
		k := run{row[0], row[1]}
		if _, ok := want[k]; !ok {
			order = append(order, k)
		}
		want[k] = append(want[k], row[2:])
	}
	if len(want) != 14 {
		t.Fatalf("%d runs in the reference, want 14", len(want))
	}
	for _, k := range order {
		args := []string{"calibrate", "--format", "json", "--leave-one-out", "--input", "../../" + k.file}
		if k.mode != "optimised" {
			args = append(args, "--alpha", k.mode)
		}
		code, out, errOut := runCLI(t, "", args...)
		if code != 0 {
			t.Fatalf("%v: exit %d: %s", args, code, errOut)
		}
		var got struct {
			LeaveOneOut *elicit.LeaveOneOutReport `json:"leave_one_out"`
		}
		decodeJSON(t, out, &got)
		rep := got.LeaveOneOut
		if rep == nil {
			t.Fatalf("%v: no leave_one_out in %s", args, out)
		}
		target := map[string]int{}
		for i, q := range rep.Targets {
			target[q] = i
		}
		cases := map[[2]string]elicit.LeaveOneOutCase{}
		for _, c := range rep.Cases {
			if c.Error != "" {
				t.Errorf("%v: %s %s failed: %s", args, c.LeftOut, c.Name, c.Error)
			}
			cases[[2]string{c.LeftOut, c.Name}] = c
		}
		maxShift, checked := 0.0, 0
		for _, row := range want[k] {
			leftOut, name, what, key := row[0], row[1], row[2], row[3]
			w, err := strconv.ParseFloat(row[4], 64)
			if err != nil {
				t.Fatal(err)
			}
			where := fmt.Sprintf("%s %s: %s %s: %s %s", k.file, k.mode, leftOut, name, what, key)
			c, ok := cases[[2]string{leftOut, name}]
			if leftOut != "full" && !ok {
				t.Errorf("%s: no such case in the report", where)
				continue
			}
			ti, isTarget := target[key]
			if (what == "p05" || what == "p50" || what == "p95" || what == "shift") && !isTarget {
				t.Errorf("%s: no such target in the report", where)
				continue
			}
			var g float64
			tol := 1e-9 * math.Max(math.Abs(w), 1e-12)
			switch what {
			case "alpha":
				if g = c.Alpha; leftOut == "full" {
					continue // the full panel's cut-off is TestCalibrateAgainstSciPy's
				}
			case "weight":
				g = c.Weights[key]
			case "p05", "p50", "p95":
				i := map[string]int{"p05": 0, "p50": 1, "p95": 2}[what]
				if leftOut == "full" {
					g = rep.Full[ti][i]
				} else if c.Percentiles[ti] == nil {
					t.Errorf("%s: not pooled", where)
					continue
				} else {
					g = c.Percentiles[ti][i]
				}
			case "shift":
				g, tol = c.Shifts[ti], 1e-9
			case "case_shift":
				g, tol = c.Shift, 1e-9
				maxShift = math.Max(maxShift, w)
			default:
				t.Fatalf("%s: unknown row", where)
			}
			if math.Abs(g-w) > tol {
				t.Errorf("%s = %.17g, SciPy %.17g", where, g, w)
			}
			checked++
		}
		// The smallest run (five_quantile_seeds.csv) has 212 values.
		if checked < 200 || len(rep.Cases) == 0 {
			t.Errorf("%s %s: %d values checked, %d cases", k.file, k.mode, checked, len(rep.Cases))
		}
		if math.Abs(rep.MaxShift-maxShift) > 1e-9 {
			t.Errorf("%s %s: largest shift %v, SciPy %v", k.file, k.mode, rep.MaxShift, maxShift)
		}
	}
}

// TestCalibrateBoundsCutTheRange: a question's bounds cut its intrinsic
// range as on the calibration page; the same answers without them score
// otherwise (the percentages' ranges, widened by 10%, pass below 0).
func TestCalibrateBoundsCutTheRange(t *testing.T) {
	plain := runCalibrateJSON(t, "--input", inverterSeeds)
	bounded := runCalibrateJSON(t, "--input", "../../testdata/calibration/inverter_seeds_bounded.csv")
	for i, e := range bounded.Experts {
		if *e.Information == *plain.Experts[i].Information {
			t.Errorf("%s: information %v with bounds and without", e.Expert, *e.Information)
		}
	}
	// The JSON reports each question's intrinsic range: cut at 0 where the
	// question is bounded below by 0, left alone where it has no bounds.
	code, out, errOut := runCLI(t, "", "calibrate", "--format", "json", "--input", "../../testdata/calibration/inverter_seeds_bounded.csv")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	var q struct {
		Questions []struct {
			Question string  `json:"question"`
			Lower    float64 `json:"lower"`
			Upper    float64 `json:"upper"`
		} `json:"questions"`
	}
	decodeJSON(t, out, &q)
	ranges := map[string][2]float64{}
	for _, x := range q.Questions {
		ranges[x.Question] = [2]float64{x.Lower, x.Upper}
	}
	// Hand-worked: dc_capacitor_fail_pct spans [0.2, 2.5]; widened by 0.23
	// it starts at −0.03, cut to the bound 0. mean_days_to_repair spans
	// [2, 15]; widened by 1.3 it is [0.7, 16.3], with no bound to cut.
	if r := ranges["dc_capacitor_fail_pct"]; r[0] != 0 || math.Abs(r[1]-2.73) > 1e-12 {
		t.Errorf("dc_capacitor_fail_pct range %v, want [0, 2.73]", r)
	}
	if r := ranges["mean_days_to_repair"]; math.Abs(r[0]-0.7) > 1e-12 || math.Abs(r[1]-16.3) > 1e-12 {
		t.Errorf("mean_days_to_repair range %v, want [0.7, 16.3]", r)
	}
}

// TestCalibrationPageCSVScoresTheSame: the calibration page's download
// (record.WriteCalibrationCSV) fed to parley calibrate gives the page's
// own scores and weights (workshop.ScorePerformance), with each question's
// bounds; also for questions asked at 10/50/90, for two experts of one
// name, for a name a spreadsheet would run as a formula and for one the
// command would read as a comment. In the invented
// valve-wear workshop the third seed's answers span [0.05, 0.74]; widened
// by 10% its range starts at −0.019, which the bound 0 cuts, so the file
// scores as the page only with its bounds.
func TestCalibrationPageCSVScoresTheSame(t *testing.T) {
	tenFiftyNinety := func(s *workshop.Snapshot) {
		for i := range s.Questions {
			if slices.Equal(s.Questions[i].Probs, []float64{0.05, 0.5, 0.95}) {
				s.Questions[i].Probs = []float64{0.1, 0.5, 0.9}
			}
		}
	}
	sameNames := func(s *workshop.Snapshot) { s.Experts[2].Name = "a" } // A and a
	formula := func(s *workshop.Snapshot) { s.Experts[1].Name = "=B" }
	hash := func(s *workshop.Snapshot) { s.Experts[0].Name = "#1 A" }
	logScale := func(s *workshop.Snapshot) {
		for i := range s.Questions {
			if s.Questions[i].Calibration {
				s.Questions[i].LogScale = true
				return
			}
		}
	}
	fixed := 0.2
	for _, c := range []struct {
		name   string
		change func(*workshop.Snapshot)
		alpha  *float64
	}{
		{"5/50/95", nil, nil},
		{"fixed cut-off", nil, &fixed},
		{"10/50/90", tenFiftyNinety, nil},
		{"two experts of one name", sameNames, nil},
		{"a formula-like name", formula, nil},
		{"a name starting with #", hash, nil},
		{"a question on the log scale", logScale, nil},
	} {
		snap := workshoptest.ValveWear(true)
		if c.change != nil {
			c.change(&snap)
		}
		set := workshop.NewCalibrationSet(snap.Questions, snap.Experts, snap.Revisions, false)
		page, err := workshop.ScorePerformance(set, c.alpha)
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		var file bytes.Buffer
		if err := record.WriteCalibrationCSV(&file, snap.Workshop.Title, set, c.alpha); err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		if !strings.Contains(file.String(), ",lower,upper,") {
			t.Fatalf("%s: no bound columns in\n%s", c.name, file.String())
		}
		if scaled := strings.Contains(file.String(), ",upper,background,"); scaled != (c.name == "a question on the log scale") ||
			scaled && !strings.Contains(file.String(), ",log-uniform,") {
			t.Fatalf("%s: the scale column is wrong in\n%s", c.name, file.String())
		}
		args := []string{"calibrate", "--input", "-", "--format", "json"}
		if c.alpha != nil {
			args = append(args, "--alpha", strconv.FormatFloat(*c.alpha, 'g', -1, 64))
		}
		code, out, errOut := runCLI(t, file.String(), args...)
		if code != 0 {
			t.Fatalf("%s: exit %d: %s\n%s", c.name, code, errOut, file.String())
		}
		var got calibrateJSON
		decodeJSON(t, out, &got)
		if len(got.Experts) != len(page.Experts) {
			t.Fatalf("%s: %d experts from the file, %d on the page", c.name, len(got.Experts), len(page.Experts))
		}
		if *got.Alpha != page.Alpha {
			t.Errorf("%s: alpha %v from the file, %v on the page", c.name, *got.Alpha, page.Alpha)
		}
		// The command sorts experts by name; match them by the page's
		// order of weights, which is the same classical model's.
		byName := map[string]int{}
		for i, e := range got.Experts {
			byName[e.Expert] = i
		}
		for _, e := range page.Experts {
			name := e.Name
			if c.name == "two experts of one name" && strings.EqualFold(e.Name, "a") {
				name = fmt.Sprintf("%s (expert %d)", e.Name, e.ExpertID)
			}
			if c.name == "a formula-like name" && e.Name == "=B" {
				name = "'=B"
			}
			if c.name == "a name starting with #" && e.Name == "#1 A" {
				name = "'#1 A"
			}
			i, ok := byName[name]
			if !ok {
				t.Errorf("%s: %q not in the command's output %v", c.name, name, byName)
				continue
			}
			g := got.Experts[i]
			if *g.Calibration != e.Calibration || *g.Information != e.Information || *g.Weight != e.Weight {
				t.Errorf("%s: %s scores C=%v I=%v w=%v from the file, C=%v I=%v w=%v on the page",
					c.name, name, *g.Calibration, *g.Information, *g.Weight, e.Calibration, e.Information, e.Weight)
			}
		}
	}
}

// TestCalibrateScoresBelowTheDoubleRange: 300 calibration questions at
// 1/50/99 %, every realisation 0; A has 150 below its 1% value and 150
// above its 99% value, B 200 and 100, so both calibration scores are far
// below the smallest double: ln C = −1169.9517750719319 and
// −1186.9344983883962 from R 4.2.2's pchisq(…, log.p = TRUE)
// (testdata/r/pchisq_log_tail_reference.R), that is 7.878e-509 and
// 3.318e-516 (R: exp(lnC + 509·log(10)) = 7.87771, exp(lnC + 516·log(10))
// = 3.31816). The command refused the panel ("every calibration score is
// 0"); it now scores it, A above B, and writes the scores, not 0.
func TestCalibrateScoresBelowTheDoubleRange(t *testing.T) {
	path := manySeedsCSV(t)
	code, out, errOut := runCLI(t, "", "calibrate", "--input", path, "--alpha", "0")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	for _, want := range []string{"7.878e-509", "3.318e-516", "Scores below 2.2e-308, the smallest a double holds at full precision"} {
		if !strings.Contains(out, want) {
			t.Errorf("text output lacks %q:\n%s", want, out)
		}
	}
	got := runCalibrateJSON(t, "--input", path, "--alpha", "0")
	w := map[string]float64{}
	for _, e := range got.Experts {
		w[e.Expert] = *e.Weight
	}
	// The information scores are equal (each expert's quantiles mirror
	// the other's on a range symmetric about 0), so the weights stand in
	// the ratio of the calibration scores, e^16.98.
	ratio := math.Exp(-1169.9517750719319 + 1186.9344983883962)
	if !(w["A"] > w["B"]) || math.Abs(w["A"]/w["B"]/ratio-1) > 1e-9 {
		t.Errorf("weights %v, want A/B = %v", w, ratio)
	}
}

// TestCalibrateLeaveOneOutCutOffBelowTheDoubleRange: in
// TestCalibrateScoresBelowTheDoubleRange's panel the rerun without B
// leaves A alone, its cut-off A's score e^−1169.95 = 7.878e-509 (R 4.2.2's
// pchisq(…, log.p = TRUE)); the leave-one-out table wrote it as 0.
func TestCalibrateLeaveOneOutCutOffBelowTheDoubleRange(t *testing.T) {
	path := manySeedsCSV(t)
	code, out, errOut := runCLI(t, "", "calibrate", "--input", path, "--leave-one-out")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	re := regexp.MustCompile(`(?m)^expert +B +(\S+)`)
	m := re.FindStringSubmatch(out)
	if m == nil || m[1] != "7.878e-509" {
		t.Errorf("the rerun without B: cut-off %v, want 7.878e-509:\n%s", m, out)
	}
}

// manySeedsCSV writes TestCalibrateScoresBelowTheDoubleRange's panel of
// 300 invented calibration questions (every realisation 0, asked at
// 1/50/99%; A has 150 realisations below its 1% value and 150 above its
// 99% value, B 200 and 100) and returns its path.
func manySeedsCSV(t *testing.T) string {
	t.Helper()
	var b strings.Builder
	b.WriteString("expert,question,realization,q01,q50,q99\n")
	for i := 0; i < 300; i++ {
		a, bq := "1,2,3", "1,2,3"
		if i >= 150 {
			a = "-3,-2,-1"
		}
		if i >= 200 {
			bq = "-3,-2,-1"
		}
		fmt.Fprintf(&b, "A,s%03d,0,%s\nB,s%03d,0,%s\n", i, a, i, bq)
	}
	path := filepath.Join(t.TempDir(), "many.csv")
	if err := os.WriteFile(path, []byte(b.String()), 0o600); err != nil {
		t.Fatal(err)
	}
	return path
}

// TestCalibrateLogScale: a question whose background cell is "log-uniform" is scored
// against the log-uniform background. inverter_seeds_log.csv (invented)
// has four rare-event shares spread over orders of magnitude on the log
// scale: the calibration scores are those of the same answers on the
// uniform background (a monotone scale keeps each true value in its
// bin), the information scores are not (TestCalibrateAgainstSciPy checks
// both against an implementation written apart). The text names the
// questions on the log scale; the JSON marks them and gives their
// intrinsic ranges and pools back on the question's own scale, as does
// the leave-one-out report.
func TestCalibrateLogScale(t *testing.T) {
	const file = "../../testdata/calibration/inverter_seeds_log.csv"
	raw, err := os.ReadFile(file)
	if err != nil {
		t.Fatal(err)
	}
	uniform := filepath.Join(t.TempDir(), "uniform.csv")
	if err := os.WriteFile(uniform, bytes.ReplaceAll(raw, []byte(",log-uniform,"), []byte(",uniform,")), 0o644); err != nil {
		t.Fatal(err)
	}
	logged, plain := runCalibrateJSON(t, "--input", file), runCalibrateJSON(t, "--input", uniform)
	for i, e := range logged.Experts {
		if *e.Calibration != *plain.Experts[i].Calibration {
			t.Errorf("%s: calibration %v on the log scale, %v on the uniform", e.Expert, *e.Calibration, *plain.Experts[i].Calibration)
		}
		if *e.Information == *plain.Experts[i].Information {
			t.Errorf("%s: information %v on both scales", e.Expert, *e.Information)
		}
	}
	code, out, errOut := runCLI(t, "", "calibrate", "--input", file, "--leave-one-out", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	var got struct {
		Questions   []elicit.SeedResult       `json:"questions"`
		LeaveOneOut *elicit.LeaveOneOutReport `json:"leave_one_out"`
	}
	decodeJSON(t, out, &got)
	logs := 0
	for _, q := range got.Questions {
		rare := strings.HasSuffix(q.Question, "_share") || strings.HasSuffix(q.Question, "_per_hour")
		if q.LogScale != rare {
			t.Errorf("%s: log_uniform_background %v", q.Question, q.LogScale)
		}
		if !q.LogScale {
			continue
		}
		logs++
		// The range and the pool are on the question's own scale, inside
		// (0, 1): a share, not its logarithm.
		if !(q.Lower > 0 && q.Lower < q.Realisation && q.Realisation < q.Upper && q.Upper < 1) {
			t.Errorf("%s: range [%v, %v] around %v", q.Question, q.Lower, q.Upper, q.Realisation)
		}
		if len(q.Pooled) != 3 || !(q.Pooled[0] > q.Lower && q.Pooled[2] < q.Upper) {
			t.Errorf("%s: pooled %v in [%v, %v]", q.Question, q.Pooled, q.Lower, q.Upper)
		}
	}
	if logs != 4 {
		t.Errorf("%d questions on the log scale, want 4", logs)
	}
	rob := got.LeaveOneOut
	if rob == nil || len(rob.Cases) != 6+4 {
		t.Fatalf("leave_one_out: %+v", rob)
	}
	for i, name := range rob.Targets {
		if strings.HasSuffix(name, "_share") || strings.HasSuffix(name, "_per_hour") {
			if f := rob.Full[i]; len(f) != 3 || !(f[0] > 0 && f[2] < 1) {
				t.Errorf("%s: full panel's percentiles %v, not on the question's scale", name, f)
			}
		}
	}
	code, out, _ = runCLI(t, "", "calibrate", "--input", file, "--leave-one-out")
	if code != 0 || !strings.Contains(out, "Information against the log-uniform background (range and overshoot on ln x): arc_fault_rate_per_hour, connector_melt_share, firmware_bricked_share, surge_damage_share") ||
		!strings.Contains(out, "else its intrinsic range; against the log-uniform background, of ln x against its intrinsic range on ln x)") {
		t.Errorf("text output:\n%s", out)
	}
}

// TestCalibrateSkipsRowsOfEmptyCells: a row of empty cells, as a
// spreadsheet writes below its data (",,,,,"), is no assessment, as the
// answer sheet reads it; it was refused as "row 4: expert: is required".
func TestCalibrateSkipsRowsOfEmptyCells(t *testing.T) {
	const sheet = "expert,question,realization,q05,q50,q95\r\nA,s1,1,0,1,2\r\nB,s1,1,0.5,1.5,3\r\n"
	_, want, _ := runCLI(t, sheet, "calibrate", "--input", "-", "--format", "json")
	code, got, errOut := runCLI(t, sheet+",,,,,\r\n , , ,,,\r\n,,,,,\r\n", "calibrate", "--input", "-", "--format", "json")
	if code != exitOK || got != want || want == "" {
		t.Errorf("with rows of empty cells: exit %d, %q; want the scores without them\n%s", code, errOut, got)
	}
}

// TestCalibrateSaysWhichAssessmentsWereReadAsComments: a row whose
// expert is named #1 is a comment to CSV, and was dropped without a
// word. The file names no panel that would tell such a name from a row
// put out of the count on purpose, so the run goes on without it but
// says which rows it left out; a file whose every assessment is such a
// row is refused saying why. A note, a quoted "#2" and a # inside a
// quoted cell are not such rows.
func TestCalibrateSaysWhichAssessmentsWereReadAsComments(t *testing.T) {
	const head = "# invented seeds\nexpert,question,realization,q05,q50,q95\n"
	code, _, errOut := runCLI(t, head+"#1,q1,3,2,5,8\nB,q1,3,4,5,6\n# a note, here\n\"#2\",q1,3,1,3,9\n\"C, #3\",q1,3,1,4,9\n", "calibrate", "--input", "-")
	if code != exitOK || !strings.Contains(errOut, "row 3 starts with # and holds an assessment") || strings.Count(errOut, "row") != 1 {
		t.Errorf("exit %d, stderr %q: want a note naming row 3 alone", code, errOut)
	}
	code, _, errOut = runCLI(t, head+"#1,q1,3,2,5,8\n#2,q1,3,4,5,6\n", "calibrate", "--input", "-")
	if code != exitBadInput || !strings.Contains(errOut, "rows 3, 4 start with # and hold assessments") || !strings.Contains(errOut, `quote marks ("#1")`) {
		t.Errorf("exit %d, stderr %q: want refused naming rows 3 and 4", code, errOut)
	}
	code, _, errOut = runCLI(t, head+"A,q1,3,2,5,8\n# B,q1,3\n", "calibrate", "--input", "-")
	if code != exitOK || errOut != "" {
		t.Errorf("a short note: exit %d, stderr %q; want no note", code, errOut)
	}
}

// A note that holds a quote mark ("per 1000", 5" pipes) is no CSV a
// strict reader takes: the search for rows read as comments stopped at
// it, and a row of an expert named #1 below was dropped without a word
// again.
func TestCalibrateSaysWhichAssessmentsWereReadAsCommentsBelowAQuotedNote(t *testing.T) {
	for _, note := range []string{`# seeds in "per 1000" (invented)`, `# 5" pipes (invented)`} {
		in := note + "\nexpert,question,realization,q05,q50,q95\n#1,q1,3,2,5,8\nB,q1,3,4,5,6\n"
		code, _, errOut := runCLI(t, in, "calibrate", "--input", "-")
		if code != exitOK || !strings.Contains(errOut, "row 3 starts with # and holds an assessment") {
			t.Errorf("under %s: exit %d, stderr %q; want a note naming row 3", note, code, errOut)
		}
	}
}

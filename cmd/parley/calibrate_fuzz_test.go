package main

import (
	"bytes"
	"encoding/json"
	"os"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/input"
)

// fuzzSeedsPath is the invented inverter example shipped with Parley.
const fuzzSeedsPath = "../../testdata/calibration/inverter_seeds.csv"

// FuzzCalibrateCSV feeds arbitrary text as the calibration CSV to
// `parley calibrate --input -` in-process. Whatever the text, the command
// must not panic and must end with status 0 (scores written) or 2 (bad
// input, said in one line on stderr with nothing on stdout); with
// --format json the output is valid JSON, which also rules out NaN and
// ±Inf, since JSON has no literal for them (RFC 8259 §6).
func FuzzCalibrateCSV(f *testing.F) {
	valid, err := os.ReadFile(fuzzSeedsPath)
	if err != nil {
		f.Fatal(err)
	}
	v := string(valid)
	// The shipped example must score, or the fuzzing below only ever
	// exercises the refusals.
	var out, errOut bytes.Buffer
	if code := dispatch([]string{"calibrate", "--input", "-", "--format", "json"}, strings.NewReader(v), &out, &errOut); code != exitOK {
		f.Fatalf("the example scores with status %d: %s", code, errOut.String())
	}
	header := "expert,question,realization,q05,q50,q95\n"
	boundsHeader := "expert,question,realization,lower,upper,q05,q50,q95\n"
	b, err := os.ReadFile("../../testdata/calibration/inverter_seeds_bounded.csv")
	if err != nil {
		f.Fatal(err)
	}
	bounded := string(b)
	for _, seed := range []string{
		v,
		"",
		"\ufeff" + v,
		header,
		header + "A,x,0.5,0.1,0.5,0.9\n",
		header + "A,x,0.5,0.1,0.5,0.9\nB,x,0.5,0.2,0.4,0.8\n",
		header + "A,x,0.5,0.9,0.5,0.1\n",                      // quantiles decreasing
		header + "A,x,0.5,0.5,0.5,0.5\n",                      // all quantiles equal
		header + "A,x,NaN,0.1,0.5,0.9\n",                      // NaN realisation
		header + "A,x,0.5,-Inf,0.5,Inf\n",                     // infinite quantiles
		header + "A,x,1e308,-1e308,0,1e308\n",                 // overflowing range
		header + "A,x,0.5,0.1,0.5,0.9\nA,x,0.5,0.1,0.5,0.9\n", // duplicate row
		header + "A,x,0.5,0.1,0.5,0.9\nB,x,0.6,0.1,0.5,0.9\n", // two realisations
		header + "A,x,0.5,0.1,0.5\n",                          // short row
		header + "A,x,0.5,0.1,0.5,0.9,7\n",                    // long row
		header + "\"A\nB\",x,0.5,0.1,0.5,0.9\n",               // newline in a quoted name
		header + "\"A,x,0.5,0.1,0.5,0.9\n",                    // unterminated quote
		"expert,question,realisation,q05,q25,q50,q75,q95\nA,x,3,1,2,3,4,5\nB,x,3,2,2.5,3.5,4,4.5\n",
		"expert,question,realization,q05,q50,q100\nA,x,0.5,0.1,0.5,0.9\n", // ambiguous column
		"expert,question,realization,q95,q50,q05\nA,x,0.5,0.9,0.5,0.1\n",  // columns decreasing
		"expert,question,realization,q00,q05,q50,q95\nA,x,0.5,0,0.1,0.5,0.9\n",
		"question,expert,realization,q05,q50,q95\nx,A,0.5,0.1,0.5,0.9\n",
		strings.Replace(v, "3.1", "", 1),
		strings.Replace(v, "2.0,3.0,4.5", "2.0,2.0,2.0", 1),
		strings.Replace(v, ",", ";", -1),
		v[:len(v)/2],
		// Adjacent floats: the widened range rounded back onto the
		// quantiles and the scores were ±Inf and NaN (review 3, finding 2).
		header + "A,x,5,5,5.000000000000001,5.000000000000002\nB,x,5,5,5.000000000000001,5.000000000000002\n",
		// A question's bounds in the optional lower,upper columns.
		bounded,
		boundsHeader + "A,x,0.5,0,1,0.1,0.5,0.9\nB,x,0.5,0,1,0.2,0.4,0.8\nA,y,3,,,1,2,4\nB,y,3,,,2,3,5\n",
		boundsHeader + "A,x,0.5,0,1,0,0.5,0.9\n",            // a quantile on a bound
		boundsHeader + "A,x,0.5,0,,0.1,0.5,0.9\n",           // one bound
		boundsHeader + "A,x,0.5,1,0,0.1,0.5,0.9\n",          // bounds reversed
		boundsHeader + "A,x,0.5,-1e308,1e308,0.1,0.5,0.9\n", // bounds too wide
		boundsHeader + "A,x,0.5,0,1,0.1,0.5,0.9\nB,x,0.5,0,2,0.2,0.4,0.8\n",
	} {
		f.Add(seed, false, false)
	}
	// Names reach the text table: these are refused, not printed.
	for _, seed := range []string{
		header + "A\x1b[31mRED,x,0.5,0.1,0.4,0.9\nB,x,0.5,0.2,0.4,0.8\n", // ESC sequence in a name
		header + "A,x\x00,0.5,0.1,0.4,0.9\nB,x\x00,0.5,0.2,0.4,0.8\n",    // NUL in a name
		header + "\xff,x,0.5,0.1,0.4,0.9\nB,x,0.5,0.2,0.4,0.8\n",         // not UTF-8
	} {
		f.Add(seed, true, false)
	}
	f.Add(v, true, false)
	f.Add(v, false, true)

	f.Fuzz(func(t *testing.T, in string, text, leaveOneOut bool) {
		args := []string{"calibrate", "--input", "-", "--format", "json"}
		if text {
			args[4] = "text"
		}
		if leaveOneOut {
			args = append(args, "--leave-one-out")
		}
		var stdout, stderr bytes.Buffer
		code := dispatch(args, strings.NewReader(in), &stdout, &stderr)
		switch code {
		case exitOK:
			if stderr.Len() != 0 {
				t.Errorf("status 0 with stderr %q", stderr.String())
			}
			if stdout.Len() == 0 {
				t.Errorf("status 0 with nothing on stdout")
			}
			if !text && !json.Valid(stdout.Bytes()) {
				t.Errorf("status 0 but stdout is not valid JSON:\n%s", stdout.String())
			}
			if text && (strings.Contains(stdout.String(), "NaN") || strings.Contains(stdout.String(), "Inf")) {
				t.Errorf("status 0 but the table shows NaN or Inf:\n%s", stdout.String())
			}
			if err := input.CheckChars("stdout", stdout.String()); text && err != nil {
				t.Errorf("status 0 but the table is not plain text (%v):\n%q", err, stdout.String())
			}
		case exitBadInput:
			if stdout.Len() != 0 {
				t.Errorf("status 2 with stdout %q", stdout.String())
			}
			msg := stderr.String()
			if !strings.HasPrefix(msg, "parley calibrate: ") || !strings.HasSuffix(msg, "\n") || strings.Count(msg, "\n") != 1 {
				t.Errorf("status 2 wants one line on stderr starting %q, got %q", "parley calibrate: ", msg)
			}
		default:
			t.Errorf("status %d (want 0 or 2); stderr %q", code, stderr.String())
		}
	})
}

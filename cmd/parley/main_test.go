package main

import (
	"bytes"
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"reflect"
	"regexp"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

// Flags with no command go to serve: `parley --addr X` is `parley serve --addr X`.
func TestDispatchFlagsOnlyMeanServe(t *testing.T) {
	var out, errb bytes.Buffer
	// A bad serve flag value proves the flags reached serve's own parser.
	code := dispatch([]string{"--tls-cert", "only-one.pem"}, strings.NewReader(""), &out, &errb)
	if code != exitBadInput || !strings.Contains(errb.String(), "parley serve") {
		t.Fatalf("flags alone: exit %d, stderr %q; want serve's own refusal", code, errb.String())
	}
}

func TestDispatchHelpAndUnknown(t *testing.T) {
	for _, args := range [][]string{{"help"}, {"-h"}, {"--help"}} {
		var out, errb bytes.Buffer
		if code := dispatch(args, strings.NewReader(""), &out, &errb); code != 0 || !strings.Contains(out.String(), "calibrate") {
			t.Errorf("%v: exit %d, usage %q", args, code, out.String())
		}
	}
	var out, errb bytes.Buffer
	if code := dispatch([]string{"fitt"}, strings.NewReader(""), &out, &errb); code != exitBadInput || !strings.Contains(errb.String(), `unknown command "fitt"`) {
		t.Errorf("unknown command: exit %d, stderr %q", code, errb.String())
	}
}

// TestREADMENamesEveryCommandAndFlag: every command `parley help` lists,
// and every flag its -h lists, is in README.md, the public contract
// of the command line. calibrate's --overshoot and --leave-one-out and
// plan's --exhaustive were in the code and their -h alone.
func TestREADMENamesEveryCommandAndFlag(t *testing.T) {
	readme, err := os.ReadFile("../../README.md")
	if err != nil {
		t.Fatal(err)
	}
	text := string(readme)
	flagLine := regexp.MustCompile(`(?m)^  -([a-z][a-z-]*)`)
	for name := range commands {
		if !strings.Contains(text, "parley "+name+" ") && !strings.Contains(text, "`"+name+"`") {
			t.Errorf("README.md does not name the command %s", name)
		}
		var out, errb bytes.Buffer
		if code := dispatch([]string{name, "-h"}, strings.NewReader(""), &out, &errb); code != exitOK {
			t.Fatalf("%s -h: exit %d, %s", name, code, errb.String())
		}
		flags := flagLine.FindAllStringSubmatch(out.String(), -1)
		if len(flags) == 0 {
			t.Errorf("%s -h lists no flags:\n%s", name, out.String())
		}
		for _, f := range flags {
			if !regexp.MustCompile("--" + regexp.QuoteMeta(f[1]) + `\b`).MatchString(text) {
				t.Errorf("README.md does not name %s's flag --%s", name, f[1])
			}
		}
	}
}

// TestHelpGivesTheRanges: the -h of update and plan gives the shapes'
// range and update's trials as the code checks them; it said "(> 0)",
// which 1e-7 and 1e8 meet and are refused.
func TestHelpGivesTheRanges(t *testing.T) {
	if elicit.MinShape != 1e-6 || elicit.MaxShape != 1e7 || elicit.MaxUpdateTrials != 1_000_000 {
		t.Fatal("the envelope changed: change the -h texts of update and plan with it")
	}
	for _, name := range []string{"update", "plan"} {
		var out, errb bytes.Buffer
		dispatch([]string{name, "-h"}, strings.NewReader(""), &out, &errb)
		if strings.Count(out.String(), "from 1e-6 to 1e7") != 2 {
			t.Errorf("%s -h does not give alpha's and beta's range:\n%s", name, out.String())
		}
	}
	var out, errb bytes.Buffer
	dispatch([]string{"update", "-h"}, strings.NewReader(""), &out, &errb)
	if !strings.Contains(out.String(), "0 to 1000000") {
		t.Errorf("update -h does not give the trials' range:\n%s", out.String())
	}
}

// TestREADMEExamplesRun runs every example of README.md's scripting
// sections as written, through a shell, with the built binary as
// `parley` and the repository as the working folder: each exits 0 with
// nothing on stderr, each --format json prints one JSON object, and a
// Beta named in an example's comment is the one printed.
func TestREADMEExamplesRun(t *testing.T) {
	if testing.Short() {
		t.Skip("builds the binary")
	}
	readme, err := os.ReadFile("../../README.md")
	if err != nil {
		t.Fatal(err)
	}
	bin := t.TempDir()
	if err := os.Symlink(parleyBinary(t), filepath.Join(bin, "parley")); err != nil {
		t.Fatal(err)
	}
	blocks := regexp.MustCompile("(?s)```sh\n(.*?)```").FindAllStringSubmatch(string(readme), -1)
	var examples []string
	for _, b := range blocks {
		// Usage synopses carry [optional] parts and placeholders; the
		// examples are whole commands.
		if strings.Contains(b[1], "[--") || strings.Contains(b[1], "go run") {
			continue
		}
		for _, line := range strings.Split(b[1], "\n") {
			switch {
			case strings.TrimSpace(line) == "", strings.HasPrefix(line, "#"):
			case strings.HasPrefix(line, " ") && len(examples) > 0:
				examples[len(examples)-1] += "\n" + line
			default:
				examples = append(examples, line)
			}
		}
	}
	if len(examples) < 13 {
		t.Fatalf("found %d examples in README.md; the scripting sections have more", len(examples))
	}
	betaInComment := regexp.MustCompile(`# .*?(Beta\([0-9.]+, [0-9.]+\))`)
	for _, ex := range examples {
		cmd := exec.Command("/bin/sh", "-c", ex)
		cmd.Dir = "../.."
		cmd.Env = append(os.Environ(), "PATH="+bin+string(os.PathListSeparator)+os.Getenv("PATH"))
		var out, errOut bytes.Buffer
		cmd.Stdout, cmd.Stderr = &out, &errOut
		if err := cmd.Run(); err != nil || errOut.Len() != 0 {
			t.Errorf("%s\n%v: %s", ex, err, errOut.String())
			continue
		}
		if strings.Contains(ex, "--format json") {
			var v map[string]any
			dec := json.NewDecoder(&out)
			if err := dec.Decode(&v); err != nil || dec.More() {
				t.Errorf("%s\nprints no single JSON object: %v", ex, err)
			}
		} else if m := betaInComment.FindStringSubmatch(ex); m != nil && !strings.Contains(out.String(), m[1]) {
			t.Errorf("%s\nprints no %s:\n%s", ex, m[1], out.String())
		}
	}
}

// TestHelpSummaryNamesEveryFlag: each command's line in `parley help`
// names every flag its -h lists (but -h itself); import-answers' line
// left out --channel, calibrate's --overshoot and --leave-one-out.
func TestHelpSummaryNamesEveryFlag(t *testing.T) {
	flagLine := regexp.MustCompile(`(?m)^  -([a-z][a-z-]*)`)
	for name, c := range commands {
		var out, errb bytes.Buffer
		dispatch([]string{name, "-h"}, strings.NewReader(""), &out, &errb)
		for _, f := range flagLine.FindAllStringSubmatch(out.String(), -1) {
			if !regexp.MustCompile("--" + regexp.QuoteMeta(f[1]) + `\b`).MatchString(c.summary) {
				t.Errorf("parley help's line for %s does not name --%s: %q", name, f[1], c.summary)
			}
		}
	}
}

// TestHelpSaysWhatTheCommandDoes: `parley COMMAND -h` starts with the
// command's line of `parley help` before its flags. `parley pool -h`
// listed --format alone, without a word of the JSON it reads on standard
// input; and that line names every key the JSON takes (it left out lower
// and upper).
func TestHelpSaysWhatTheCommandDoes(t *testing.T) {
	for name, c := range commands {
		var out, errb bytes.Buffer
		dispatch([]string{name, "-h"}, strings.NewReader(""), &out, &errb)
		if first, _, _ := strings.Cut(out.String(), "\n"); first != "parley "+name+": "+c.summary {
			t.Errorf("%s -h starts %q, not with what the command does", name, first)
		}
	}
	for _, typ := range []reflect.Type{reflect.TypeFor[poolInput](), reflect.TypeFor[poolExpert]()} {
		for i := range typ.NumField() {
			key, _, _ := strings.Cut(typ.Field(i).Tag.Get("json"), ",")
			if !strings.Contains(commands["pool"].summary, `"`+key+`"`) {
				t.Errorf("parley pool's line does not name the key %q it reads: %s", key, commands["pool"].summary)
			}
		}
	}
}

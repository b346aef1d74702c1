package main

import (
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"regexp"
	"strconv"
	"strings"
	"unicode"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
)

// Command-line input for the scripting commands (fit, pool, update).
// Numbers go through package input, the one rule for every number Parley
// reads, in a form or on the command line: plain decimals only, no NaN,
// Inf, hex or underscores.

// cautionJSON is the caution the JSON of prior, plan, update, fit and pool carries
// (key "caution"): their numbers are often passed on without the text
// around them, as the priors CSV's rows are.
const cautionJSON = "An elicited prior is documented judgement, not data. Review it, test how sensitive decisions are to it, and defer to your field's own guidance and regulators where harm to people, safety or the environment is at stake."

// priorCaution is shown with every fitted, pooled or updated prior in
// text output: cautionJSON after "Caution: ".
var priorCaution = "Caution: a" + cautionJSON[1:]

// parseArgs parses the flags of a scripting command. Flag errors become
// one line on stderr and exit status 2; -h prints the command's line of
// `parley help` and its flags to stdout.
// It returns ok false with the exit status when the command must stop.
func parseArgs(fs *flag.FlagSet, args []string, stdout, stderr io.Writer) (code int, ok bool) {
	fs.SetOutput(io.Discard)
	err := fs.Parse(args)
	if errors.Is(err, flag.ErrHelp) {
		// What the command does first, as `parley help` says it: the
		// flags alone left `parley pool -h` a lone --format, without a
		// word of the JSON it reads on standard input.
		if c, ok := commands[strings.TrimPrefix(fs.Name(), "parley ")]; ok {
			fmt.Fprintf(stdout, "%s: %s\n", fs.Name(), c.summary)
		}
		fs.SetOutput(stdout)
		fs.PrintDefaults()
		return exitOK, false
	}
	if err != nil {
		return fail(stderr, strings.TrimPrefix(fs.Name(), "parley "), flagError(fs, err)), false
	}
	if fs.NArg() > 0 {
		return fail(stderr, strings.TrimPrefix(fs.Name(), "parley "), strayArgument(args, len(args)-fs.NArg())), false
	}
	// A flag given an empty value is most often a script's empty
	// variable (--check "$NOTED"); read as the flag left out, it changed
	// what was asked: fingerprint --check "" listed the values and exited
	// 0 as if a noted value had been found, export --question "" wrote
	// every question, calibrate --alpha "" optimised the cut-off.
	var empty string
	fs.Visit(func(f *flag.Flag) {
		if empty == "" && strings.TrimSpace(f.Value.String()) == "" {
			empty = f.Name
		}
	})
	if empty != "" {
		return fail(stderr, strings.TrimPrefix(fs.Name(), "parley "), badInput(empty, "is empty: give it a value, or leave the flag out for its default")), false
	}
	return exitOK, true
}

// Go's flag package words its errors with the flag after one dash
// ("flag provided but not defined: -bogus"); flagError puts the flag
// first, as every other refusal names its field, spelled as README
// spells it (--bogus), with the rule after it.
var (
	flagUndefined = regexp.MustCompile(`^flag provided but not defined: -+(.*)$`)
	flagNoValue   = regexp.MustCompile(`^flag needs an argument: -+(.*)$`)
	flagBadValue  = regexp.MustCompile(`^invalid (?:boolean )?value ("(?:[^"\\]|\\.)*") for (?:flag )?-+([^:]*): (.*)$`)
)

func flagError(fs *flag.FlagSet, err error) error {
	msg := err.Error()
	if m := flagUndefined.FindStringSubmatch(msg); m != nil {
		// The name is whatever was typed: shown quoted when it holds
		// what a terminal would act on (an escape sequence).
		name := input.Clip(m[1], 40)
		if strings.IndexFunc(name, func(r rune) bool { return !unicode.IsPrint(r) }) >= 0 {
			name = strconv.Quote(name)
		}
		return badInput(name, "is not a flag of %s (%s -h lists its flags)", fs.Name(), fs.Name())
	}
	if m := flagNoValue.FindStringSubmatch(msg); m != nil {
		return badInput(m[1], "needs a value")
	}
	if m := flagBadValue.FindStringSubmatch(msg); m != nil {
		rule := "is not a value it takes (" + m[3] + ")"
		if f := fs.Lookup(m[2]); f != nil {
			if g, ok := f.Value.(flag.Getter); ok {
				switch g.Get().(type) {
				case bool:
					rule = "takes no value, or =true or =false"
				case int, int64, uint, uint64:
					rule = "must be a whole number"
					if strings.Contains(m[3], "out of range") {
						rule = "is out of range"
					}
				}
			}
		}
		return badInput(m[2], "%s, got %s", rule, m[1])
	}
	if strings.IndexFunc(msg, func(r rune) bool { return !unicode.IsPrint(r) }) >= 0 {
		msg = strconv.Quote(msg) // "bad flag syntax: ---" and what was typed after it
	}
	return fmt.Errorf("%w: %s", errBadInput, msg)
}

// strayArgument describes args[i], a word that is no flag nor a flag's
// value, where flag parsing stopped. Most often it is the rest of a list
// typed with spaces (--probs 0.05, 0.5, 0.95), so the flag before it is
// named; it was reported as a flag of its own, "--0.5,: unexpected
// argument".
func strayArgument(args []string, i int) error {
	stray := input.Clip(args[i], 24)
	name, value, ok := "", "", false
	if i >= 1 && strings.HasPrefix(args[i-1], "-") && strings.Contains(args[i-1], "=") {
		name, value, ok = strings.Cut(strings.TrimLeft(args[i-1], "-"), "=") // --probs=0.05, 0.5
	} else if i >= 2 && strings.HasPrefix(args[i-2], "-") && !strings.Contains(args[i-2], "=") {
		name, value, ok = strings.TrimLeft(args[i-2], "-"), args[i-1], true
	}
	if ok && name != "" && strings.IndexFunc(name, func(r rune) bool { return !unicode.IsPrint(r) }) < 0 {
		return badInput(name, "unexpected argument %q after its value %q: every input is a --flag with one value; "+
			"put a list with spaces in quotes (\"0.05, 0.5, 0.95\") or leave the spaces out", stray, input.Clip(value, 24))
	}
	return fmt.Errorf("%w: unexpected argument %q (every input is a --flag with its value, such as --format json)", errBadInput, stray)
}

// checkFormat accepts the output formats text and json.
func checkFormat(format string) error {
	if format != "text" && format != "json" {
		return badInput("format", "must be text or json, got %q", format)
	}
	return nil
}

// number parses the value of flag --field.
func number(field, raw string) (float64, error) { return input.Number(field, raw) }

// fraction parses a probability or a proportion given to flag --field:
// a fraction (0.95), or a percentage with its sign (95%), as the web's
// coverage and study plan take it; a plain 95 is left to the flag's own
// rule, which refuses it.
func fraction(field, raw string) (float64, error) {
	if rest, ok := strings.CutSuffix(strings.TrimSpace(raw), "%"); ok {
		return input.Percent(field, rest)
	}
	return number(field, raw)
}

// numbers parses a comma-separated list given to flag --field.
func numbers(field, raw string) ([]float64, error) { return input.Numbers(field, raw) }

// count parses a whole number in [0, max] given to flag --field.
func count(field, raw string, max int) (int, error) {
	return input.Whole(field, raw, 0, max)
}

// id parses an id given to flag --field: a whole number from 1 to
// input.MaxID; "" is 0, for an optional flag left out.
func id(field, raw string) (int64, error) {
	s := strings.TrimSpace(raw)
	if s == "" {
		return 0, nil
	}
	n, err := strconv.ParseInt(s, 10, 64)
	if err != nil || n < 1 || n > input.MaxID || strings.TrimLeft(s, "0123456789") != "" {
		return 0, badInput(field, "must be an ID, a whole number from 1 to %d, got %q", int64(input.MaxID), input.Clip(s, 24))
	}
	return n, nil
}

// writeJSON prints v as one indented JSON object.
func writeJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(v)
}

// shape writes a Beta's α or β for people: six significant figures, or
// as many more as it takes to read on its own side of 1
// (elicit.ShapeDigits), so that 1.000001 is not printed "1" beside a note
// that it is just above 1.
func shape(x float64) string { return strconv.FormatFloat(x, 'g', elicit.ShapeDigits(x, 6), 64) }

// shapeCount writes α or β as a count of imagined successes or
// failures: the number shape writes, in plain digits (1234570 beside
// Beta(2, 1.23457e+06)), so that a prior's worth splits into the Beta
// printed beside it.
func shapeCount(x float64) string {
	v, err := strconv.ParseFloat(shape(x), 64)
	if err != nil {
		return shape(x)
	}
	return strconv.FormatFloat(v, 'f', -1, 64)
}

// plainSig4 writes a count's mean or sd to four significant figures in
// plain digits, as the counts beside it are: 25000, not %.4g's 2.5e+04.
func plainSig4(x float64) string { return plainSig(x, 4) }

func plainSig(x float64, sig int) string {
	v, err := strconv.ParseFloat(strconv.FormatFloat(x, 'e', sig-1, 64), 64)
	if err != nil {
		return strconv.FormatFloat(x, 'g', sig, 64)
	}
	return strconv.FormatFloat(v, 'f', -1, 64)
}

// plainWithin is plainSig4 for a value on [lower, upper], with as many
// more figures as keep it on its own side of each bound: the mean number
// of successes in 10 trials under Beta(1e7, 1), 9.999999, is not "10",
// which says that every trial succeeds.
func plainWithin(x, lower, upper float64) string {
	return plainSig(x, max(elicit.SideDigits(x, lower, 4), elicit.SideDigits(x, upper, 4)))
}

// within writes a value on the scale [lower, upper] to six significant
// figures, or as many more as it takes to stay on its own side of each
// bound: a stated 0.9999999999 is not "1", which is the bound itself.
func within(x, lower, upper float64) string { return withinSig(x, lower, upper, 6) }

// withinSig is within with sig significant figures at least.
func withinSig(x, lower, upper float64, sig int) string {
	return strconv.FormatFloat(x, 'g', max(elicit.SideDigits(x, lower, sig), elicit.SideDigits(x, upper, sig)), 64)
}

// finite reports whether every value is a finite number, the last check
// before printing so that no NaN reaches the output.
func finite(vs ...float64) bool {
	for _, v := range vs {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return false
		}
	}
	return true
}

// Command parley runs Parley's elicitation workshop server and its
// scripting commands (fit, pool, update, calibrate, export, backup, ...).
//
// Each subcommand lives in its own file and registers itself with
// command(); this file only dispatches. Exit status: 0 on success, 2 on bad
// input (one line on stderr naming the field and the rule), 1 on any other
// failure.
package main

import (
	"fmt"
	"io"
	"os"
	"sort"
	"strings"
	"unicode"
)

// subcommand is one `parley NAME` command. It returns the exit status.
type subcommand struct {
	summary string
	run     func(args []string, stdin io.Reader, stdout, stderr io.Writer) int
}

var commands = map[string]subcommand{}

// command registers a subcommand; called from each command file's init.
func command(name, summary string, run func(args []string, stdin io.Reader, stdout, stderr io.Writer) int) {
	commands[name] = subcommand{summary: summary, run: run}
}

func main() {
	os.Exit(dispatch(os.Args[1:], os.Stdin, os.Stdout, os.Stderr))
}

// dispatch runs the named subcommand; with no arguments it serves.
func dispatch(args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	if len(args) == 1 && (args[0] == "-h" || args[0] == "--help") {
		usage(stdout)
		return 0
	}
	// With no command, or only flags (`parley --addr ...`), Parley serves.
	name := "serve"
	if len(args) > 0 && !strings.HasPrefix(args[0], "-") {
		name, args = args[0], args[1:]
	}
	if name == "help" {
		usage(stdout)
		return 0
	}
	c, ok := commands[name]
	if !ok {
		fmt.Fprintf(stderr, "parley: unknown command %q (run `parley help`)\n", name)
		return 2
	}
	if f := repeatedFlag(args); f != "" {
		return fail(stderr, name, badInput(f, "given more than once (each flag takes one value; the web refuses a field sent twice the same way)"))
	}
	return c.run(args, stdin, stdout, stderr)
}

// repeatedFlag is the name of the first flag given twice in args, or "".
// Go's flag package keeps the last value silently; a script that sets
// --probs twice has a mistake in it. Flags are read up to "--"; a value
// that starts with a dash but not a letter (a negative number) is no
// flag.
func repeatedFlag(args []string) string {
	seen := map[string]bool{}
	for _, a := range args {
		if a == "--" {
			break
		}
		if !strings.HasPrefix(a, "-") {
			continue
		}
		n := strings.TrimLeft(a, "-")
		if i := strings.IndexByte(n, '='); i >= 0 {
			n = n[:i]
		}
		if n == "" || !unicode.IsLetter(rune(n[0])) {
			continue
		}
		if seen[n] {
			return n
		}
		seen[n] = true
	}
	return ""
}

func usage(w io.Writer) {
	fmt.Fprintln(w, "usage: parley [command] [flags]   (no command: serve)")
	names := make([]string, 0, len(commands))
	for n := range commands {
		names = append(names, n)
	}
	sort.Strings(names)
	for _, n := range names {
		fmt.Fprintf(w, "  %-18s %s\n", n, commands[n].summary)
	}
}

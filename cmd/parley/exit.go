package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"strings"

	"github.com/parley-elicit/parley/elicit"
)

// Exit statuses.
const (
	exitOK       = 0
	exitFailure  = 1
	exitBadInput = 2
)

// newFlags returns a FlagSet that reports errors itself and never exits.
func newFlags(name string, stderr io.Writer) *flag.FlagSet {
	fs := flag.NewFlagSet("parley "+name, flag.ContinueOnError)
	fs.SetOutput(stderr)
	return fs
}

// fail prints err as one line on stderr and returns the exit status: 2 for
// bad input (an *elicit.InputError or a flag error), 1 otherwise. Every
// bad input reads "parley CMD: bad input: FIELD: RULE": elicit's errors
// began "elicit: ", the name of a package inside Parley, beside the flag
// errors' "bad input: ".
func fail(stderr io.Writer, cmd string, err error) int {
	var ie *elicit.InputError
	bad := errors.As(err, &ie) || errors.Is(err, errBadInput)
	msg := errText(err)
	if bad && !errors.Is(err, errBadInput) {
		msg = errBadInput.Error() + ": " + msg
	}
	fmt.Fprintf(stderr, "parley %s: %s\n", cmd, msg)
	if bad {
		return exitBadInput
	}
	return exitFailure
}

// errText is err's message for a terminal, without the "elicit: " its
// domain errors begin with: a package's name means nothing to the
// person at the terminal.
func errText(err error) string {
	return strings.TrimPrefix(err.Error(), "elicit: ")
}

// errBadInput marks command-line input errors that are not elicit's own.
var errBadInput = errors.New("bad input")

// badInput wraps a message about a named flag as bad input.
func badInput(field, rule string, args ...any) error {
	return fmt.Errorf("%w: --%s: %s", errBadInput, field, fmt.Sprintf(rule, args...))
}

package main

import (
	"errors"
	"flag"
	"fmt"
	"io"

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
// bad input (an *elicit.InputError or a flag error), 1 otherwise.
func fail(stderr io.Writer, cmd string, err error) int {
	fmt.Fprintf(stderr, "parley %s: %v\n", cmd, err)
	var ie *elicit.InputError
	if errors.As(err, &ie) || errors.Is(err, errBadInput) {
		return exitBadInput
	}
	return exitFailure
}

// errBadInput marks command-line input errors that are not elicit's own.
var errBadInput = errors.New("bad input")

// badInput wraps a message about a named flag as bad input.
func badInput(field, rule string, args ...any) error {
	return fmt.Errorf("%w: --%s: %s", errBadInput, field, fmt.Sprintf(rule, args...))
}

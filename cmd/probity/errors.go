package main

import (
	"errors"
	"fmt"
	"io"

	"probity/plan/inputerr"
)

// outcomeError reports a completed run whose result is a rejection or a
// failed check: exit code 1. The result has already been printed.
type outcomeError struct{ msg string }

func (e *outcomeError) Error() string { return e.msg }

// rejected builds the outcome error for exit code 1.
func rejected(format string, args ...any) error {
	return &outcomeError{msg: fmt.Sprintf(format, args...)}
}

// internalError is a broken invariant inside probity: exit code 3. It
// keeps the message only, so no cause in it can pass for bad input.
type internalError struct{ msg string }

func (e *internalError) Error() string { return e.msg }

// reportError is the one place that maps an error to an exit code and
// prints it: an input error (*inputerr.Error anywhere in the chain) is bad
// input, exit 2, printed as one line and its hint; an outcome error
// (rejection, failed check) is exit 1; anything else is a bug in probity,
// exit 3, with a plea to report it. Nothing here looks at message text.
func reportError(stderr io.Writer, err error) int {
	if err == nil {
		return exitOK
	}
	var oe *outcomeError
	if errors.As(err, &oe) {
		if oe.msg != "" {
			fmt.Fprintf(stderr, "probity: %s\n", oe.msg)
		}
		return exitRejected
	}
	if inputerr.Is(err) {
		fmt.Fprintf(stderr, "probity: %s\n", err.Error())
		if h := inputerr.HintOf(err); h != "" {
			fmt.Fprintf(stderr, "hint: %s\n", h)
		}
		return exitBadInput
	}
	fmt.Fprintf(stderr, "probity: internal error: %s\n", err.Error())
	fmt.Fprintln(stderr, internalPlea)
	return exitInternal
}

// internalPlea is the hint line of every internal error.
const internalPlea = "hint: this is a bug in probity, not in your input; please report it with the command line you ran"

// flagNames returns err with the setting it names spelled as the flag that
// gave it: when err is an input error about a setting (a Field and no
// File), and flags maps that field to a flag ("double" → "--double"), the
// copy names the flag. The library packages name settings as the plan,
// manifest or query spells them; only the command line knows its flags.
func flagNames(err error, flags map[string]string) error {
	e, ok := err.(*inputerr.Error)
	if !ok || e.File != "" || e.Line != 0 || flags[e.Field] == "" {
		return err
	}
	c := *e
	c.Field = flags[e.Field]
	return &c
}

// messageOf is an input error's message without its file, line and field
// (what went wrong reading a file, say), or err's text.
func messageOf(err error) string {
	if e, ok := inputerr.As(err); ok {
		return e.Msg
	}
	return err.Error()
}

package main

import (
	"errors"
	"fmt"
)

// userError is an error the user can fix: bad flags, bad files. It maps to
// exit code 2 and is printed as one line, with an optional hint line.
type userError struct {
	msg  string
	hint string
	err  error
}

func (e *userError) Error() string { return e.msg }
func (e *userError) Unwrap() error { return e.err }

// usageErrorf builds a userError from a format string.
func usageErrorf(format string, args ...any) error {
	return &userError{msg: fmt.Sprintf(format, args...)}
}

// withHint attaches a hint line to a user error.
func withHint(err error, hint string) error {
	var ue *userError
	if errors.As(err, &ue) {
		c := *ue
		c.hint = hint
		return &c
	}
	return &userError{msg: err.Error(), hint: hint, err: err}
}

// badInput wraps an error from a package (a parse or validation error)
// as a user error, keeping its message.
func badInput(err error) error {
	if err == nil {
		return nil
	}
	var ue *userError
	if errors.As(err, &ue) {
		return err
	}
	return &userError{msg: err.Error(), err: err}
}

// outcomeError reports a completed run whose result is a rejection or a
// failed check: exit code 1. The result has already been printed.
type outcomeError struct{ msg string }

func (e *outcomeError) Error() string { return e.msg }

// rejected builds the outcome error for exit code 1.
func rejected(format string, args ...any) error {
	return &outcomeError{msg: fmt.Sprintf(format, args...)}
}

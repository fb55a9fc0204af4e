package sampling

import (
	"errors"
	"fmt"
	"strings"
)

// ErrInput is wrapped by every InputError, so callers can tell a problem
// with a file's content (exit code 2) from an I/O failure.
var ErrInput = errors.New("bad input")

// InputError is a problem with the content of a file a draw reads or
// writes: a prediction log, a ledger, a worksheet or a manifest. It names
// the file, the 1-based line (0 when the problem is not about one line) and
// the column (empty when not about one column).
type InputError struct {
	File   string
	Line   int
	Column string
	Msg    string
	// Hint suggests the obvious fix, when there is one.
	Hint string
	// Err is the underlying cause, if any.
	Err error
}

// Error formats the error as "FILE line L, column C: MSG".
func (e *InputError) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Line > 0 {
		fmt.Fprintf(&b, " line %d", e.Line)
	}
	if e.Column != "" {
		if e.Line > 0 {
			b.WriteString(",")
		}
		fmt.Fprintf(&b, " column %s", e.Column)
	}
	b.WriteString(": ")
	b.WriteString(e.Msg)
	return b.String()
}

// Unwrap returns the cause, so errors.Is(err, ErrInput) holds for every
// InputError and errors.Is/As also reach the cause.
func (e *InputError) Unwrap() []error {
	if e.Err != nil {
		return []error{ErrInput, e.Err}
	}
	return []error{ErrInput}
}

// inputErrorf builds an InputError.
func inputErrorf(file string, line int, column, format string, args ...any) *InputError {
	return &InputError{File: file, Line: line, Column: column, Msg: fmt.Sprintf(format, args...)}
}

// columnList formats column names for a "the columns are …" message.
func columnList(cols []string) string {
	if len(cols) == 0 {
		return "(none)"
	}
	return strings.Join(cols, ", ")
}

// OptionError is a draw option that cannot be used as given (for example
// a --show column that would reveal the model's answer). It wraps ErrInput.
type OptionError struct {
	Option string // e.g. "--show model_a"
	Msg    string
}

// Error formats the error as "OPTION: MSG".
func (e *OptionError) Error() string { return e.Option + ": " + e.Msg }

// Unwrap returns ErrInput.
func (e *OptionError) Unwrap() error { return ErrInput }

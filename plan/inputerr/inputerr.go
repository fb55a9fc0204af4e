// Package inputerr is probity's one error type for input the user can fix:
// a file, a line, a field, what is wrong, and — when there is an obvious
// fix — a hint. Every probity package returns it for bad input and the
// command line maps it, and only it, to exit code 2.
//
// It depends on the standard library alone, so every package may import it.
// Libraries name concepts (a file, its line and field, a setting); only the
// command line turns a setting into a flag name, by setting Field to the
// flag's spelling when the value came from a flag.
package inputerr

import (
	"errors"
	"fmt"
	"io/fs"
	"strings"
)

// Error is a problem with input the user can fix.
type Error struct {
	// File is the file as the user named it (or as found under a folder
	// they named); empty when the input is not a file (a setting).
	File string
	// Line is the 1-based line of the offending value, 0 when the problem
	// is not about one line.
	Line int
	// Field is the column, key or setting at fault ("label",
	// "candidates[2].errors", "double"); empty when not about one field.
	Field string
	// Msg says what is wrong, in lower case, without the location.
	Msg string
	// Hint suggests the obvious fix, when there is one.
	Hint string
	// Err is the cause (a sentinel callers match, a parse error, an
	// *fs.PathError); nil when there is none.
	Err error
}

// Error renders the one shape every probity input error has:
//
//	FILE line L, field F: MSG
//
// leaving out what is unknown ("FILE: MSG", "FILE line L: MSG",
// "FILE, field F: MSG"). Without a file or line the field leads the
// message as its subject ("F MSG", e.g. "double 600: must be …"), so a
// setting reads the same way whether the command line names it by a flag
// or a file names it by a key.
func (e *Error) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Line > 0 {
		if b.Len() > 0 {
			b.WriteByte(' ')
		}
		fmt.Fprintf(&b, "line %d", e.Line)
	}
	switch {
	case b.Len() == 0 && e.Field != "":
		return e.Field + " " + e.Msg
	case b.Len() == 0:
		return e.Msg
	case e.Field != "":
		b.WriteString(", field ")
		b.WriteString(e.Field)
	}
	b.WriteString(": ")
	b.WriteString(e.Msg)
	return b.String()
}

// Unwrap returns the cause, so errors.Is and errors.As reach it.
func (e *Error) Unwrap() error { return e.Err }

// Errorf builds an Error from a message alone (a usage error, or a message
// that names its input itself). A %w verb sets the cause, as with
// fmt.Errorf, so sentinel errors stay matchable.
func Errorf(format string, args ...any) *Error {
	w := fmt.Errorf(format, args...)
	return &Error{Msg: w.Error(), Err: cause(w)}
}

// At builds an Error located at a file, a line (0: none) and a field
// ("": none). A %w verb sets the cause.
func At(file string, line int, field, format string, args ...any) *Error {
	e := Errorf(format, args...)
	e.File, e.Line, e.Field = file, line, field
	return e
}

// cause is what a %w verb wrapped (the first, if several), else nil.
func cause(w error) error {
	switch u := w.(type) {
	case interface{ Unwrap() error }:
		return u.Unwrap()
	case interface{ Unwrap() []error }:
		if errs := u.Unwrap(); len(errs) == 1 {
			return errs[0]
		} else if len(errs) > 1 {
			return errors.Join(errs...)
		}
	}
	return nil
}

// WithHint sets the hint and returns e, for building in one expression:
// inputerr.Errorf("--plan is required").WithHint("give the plan file").
func (e *Error) WithHint(hint string) *Error {
	e.Hint = hint
	return e
}

// Wrap sets the cause and returns e.
func (e *Error) Wrap(cause error) *Error {
	e.Err = cause
	return e
}

// As returns the first *Error in err's chain.
func As(err error) (*Error, bool) {
	var e *Error
	ok := errors.As(err, &e)
	return e, ok
}

// Is reports whether err is, or wraps, an input error.
func Is(err error) bool {
	_, ok := As(err)
	return ok
}

// SetHint returns err with its hint set to hint. When err is an *Error
// the result is a copy with the new hint; when an *Error is deeper in its
// chain the result is a new Error with err's message, the hint and err as
// its cause. An error that holds no *Error is not the user's to fix and is
// returned unchanged.
func SetHint(err error, hint string) error {
	if e, ok := err.(*Error); ok {
		c := *e
		c.Hint = hint
		return &c
	}
	if !Is(err) {
		return err
	}
	return &Error{Msg: err.Error(), Hint: hint, Err: err}
}

// HintOf returns the hint of the first *Error in err's chain that has one.
func HintOf(err error) string {
	for err != nil {
		if e, ok := err.(*Error); ok && e.Hint != "" {
			return e.Hint
		}
		switch u := err.(type) {
		case interface{ Unwrap() error }:
			err = u.Unwrap()
		case interface{ Unwrap() []error }:
			for _, x := range u.Unwrap() {
				if h := HintOf(x); h != "" {
					return h
				}
			}
			return ""
		default:
			return ""
		}
	}
	return ""
}

// FromPath turns the *fs.PathError of opening or reading a file the user
// named into an Error naming the file ("data/log.csv: no such file or
// directory", hint "check the path"), keeping it as the cause. Any other
// error, nil included, is returned unchanged.
func FromPath(err error) error {
	var pe *fs.PathError
	if err == nil || !errors.As(err, &pe) || Is(err) {
		return err
	}
	return &Error{File: pe.Path, Msg: pe.Err.Error(), Hint: "check the path", Err: err}
}

// InFile returns err with File set to file when err is an Error about a
// setting (a Field and no File) that came from that file, such as an
// option recorded in a draw's manifest. Any other error is returned
// unchanged.
func InFile(err error, file string) error {
	e, ok := err.(*Error)
	if !ok || e.File != "" || e.Field == "" {
		return err
	}
	c := *e
	c.File = file
	return &c
}

package plan

import (
	"fmt"
	"strconv"
	"strings"
)

// A setting is a plan choice made from a short list of names (the
// multiplicity rule, the design, …). Each is a Go type with its own
// constants; this file holds what they share: the spelling table that
// turns a value into its name in plan.yaml and record.json and back.
//
// The zero value of every setting is "unset", spelled as the empty string:
// a hand-written plan file may leave a setting out, and the packages that
// read it decide what that means (as they did when settings were strings).
// Parsing a name the user typed (ParseMultiplicity, …) refuses the empty
// string; decoding a file (UnmarshalText) accepts it.

// spelling is the table of one setting type T: names[v] is the name of
// value v, names[0] = "" is the unset value.
type spelling[T ~int] struct {
	// field is the setting's key in the plan file, record.json and the
	// command line ("multiplicity").
	field string
	names []string
}

// name is v's name, or "field(v)" for a value outside the table.
func (s spelling[T]) name(v T) string {
	if s.known(v) || v == 0 {
		return s.names[v]
	}
	return fmt.Sprintf("%s(%d)", s.field, int(v))
}

// known reports whether v is one of the named values (not unset).
func (s spelling[T]) known(v T) bool { return v > 0 && int(v) < len(s.names) }

// allowed completes "must be …" / "is not …": "fixed or sequential" for
// two names, "one of a, b, c" for more.
func (s spelling[T]) allowed() string {
	n := s.names[1:]
	if len(n) == 2 {
		return n[0] + " or " + n[1]
	}
	return "one of " + strings.Join(n, ", ")
}

// parse returns the value named text (exactly, case included). An unknown
// or empty name is an input error (inputerr.Error) on the setting's field.
func (s spelling[T]) parse(text string) (T, error) {
	for i, n := range s.names {
		if i > 0 && n == text {
			return T(i), nil
		}
	}
	return 0, s.invalid(text)
}

// invalid is the input error for a value that is not one of the names.
func (s spelling[T]) invalid(text string) error {
	return outOfRange(s.field, strconv.Quote(text), s.allowed())
}

// marshal is v's name as text; unset is the empty string and a value
// outside the table is an error.
func (s spelling[T]) marshal(v T) ([]byte, error) {
	if v != 0 && !s.known(v) {
		return nil, fmt.Errorf("%s %d is not a defined value", s.field, int(v))
	}
	return []byte(s.names[v]), nil
}

// unmarshal decodes a name from a file: the empty string is unset.
func (s spelling[T]) unmarshal(text []byte, v *T) error {
	if len(text) == 0 {
		*v = 0
		return nil
	}
	x, err := s.parse(string(text))
	if err != nil {
		return err
	}
	*v = x
	return nil
}

// values lists the named values in table order.
func (s spelling[T]) values() []T {
	out := make([]T, 0, len(s.names)-1)
	for i := 1; i < len(s.names); i++ {
		out = append(out, T(i))
	}
	return out
}

package plan

// Require is which candidates must be accepted for the audit as a whole to
// pass. It is written in plan.yaml and record.json by its name ("all",
// "any"); the zero value is unset (written as ""), which every reader
// takes as all.
type Require int

// Requirements for Inputs.Require.
const (
	// RequireUnset: the plan file does not say; read as RequireAll.
	RequireUnset Require = iota
	// RequireAll: every candidate must be accepted.
	RequireAll
	// RequireAny: at least one candidate must be accepted (e.g. choosing
	// among thresholds).
	RequireAny
)

var requireSpelling = spelling[Require]{field: "require", names: []string{"", "all", "any"}}

// ParseRequire returns the requirement named s ("all" or "any"), or an
// input error (inputerr.Error) on the field "require".
func ParseRequire(s string) (Require, error) { return requireSpelling.parse(s) }

// String is the name as written in plan.yaml ("" when unset).
func (r Require) String() string { return requireSpelling.name(r) }

// MarshalText writes the name (plan.yaml, record.json).
func (r Require) MarshalText() ([]byte, error) { return requireSpelling.marshal(r) }

// UnmarshalText reads a name; the empty string is RequireUnset.
func (r *Require) UnmarshalText(b []byte) error { return requireSpelling.unmarshal(b, r) }

// Met reports whether the audit passes when accepted of its total
// candidates are accepted: any needs one, all (and unset) needs every one.
func (r Require) Met(accepted, total int) bool {
	if r == RequireAny {
		return accepted > 0
	}
	return accepted == total
}

// Title says the requirement in a report: "every candidate must be
// accepted" or "at least one candidate must be accepted".
func (r Require) Title() string {
	if r == RequireAny {
		return "at least one candidate must be accepted"
	}
	return "every candidate must be accepted"
}

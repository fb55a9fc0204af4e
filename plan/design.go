package plan

// Design is how a plan's sample is labeled and judged. It is written in
// plan.yaml and record.json by its name ("fixed", "sequential"); the zero
// value is unset (written as ""), which every reader takes as fixed.
type Design int

// Designs of a plan (Inputs.Design).
const (
	// DesignUnset: the plan file does not say; read as DesignFixed.
	DesignUnset Design = iota
	// DesignFixed labels n decisions and counts the errors.
	DesignFixed
	// DesignSequential judges after every label against boundaries
	// (File.Sequential); it is filled in by plan/sequential.
	DesignSequential
)

var designSpelling = spelling[Design]{field: "design", names: []string{"", "fixed", "sequential"}}

// ParseDesign returns the design named s ("fixed" or "sequential"), or an
// input error (inputerr.Error) on the field "design".
func ParseDesign(s string) (Design, error) { return designSpelling.parse(s) }

// String is the name as written in plan.yaml ("" when unset).
func (d Design) String() string { return designSpelling.name(d) }

// MarshalText writes the name (plan.yaml, record.json).
func (d Design) MarshalText() ([]byte, error) { return designSpelling.marshal(d) }

// UnmarshalText reads a name; the empty string is DesignUnset.
func (d *Design) UnmarshalText(b []byte) error { return designSpelling.unmarshal(b, d) }

// Title names the design in a report; unset reads as fixed.
func (d Design) Title() string {
	switch d {
	case DesignFixed, DesignUnset:
		return "fixed sample"
	case DesignSequential:
		return "sequential (stops when a boundary is reached)"
	}
	return d.String()
}

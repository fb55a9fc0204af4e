// Package chrono is the time line of an audit: when the plan was made,
// the sample drawn and the record issued, where each of those times came
// from — the system clock of the machine that ran the step, or the
// operator, who supplied it (for outputs that must be byte for byte the
// same on every run, such as the demo's) — and the check that they come in
// that order, so that "the plan was fixed before the sample was drawn, and
// the sample before the record was issued" is stated and checked, not
// assumed.
//
// It depends on the standard library and plan/inputerr alone, so the plan
// file, the draw folder's manifest and record.json can all hold its types.
// It reads no clock: callers pass the times in.
package chrono

import (
	"fmt"
	"strings"
	"time"

	"probity/plan/inputerr"
)

// Source says where a time came from. It is written by its name ("clock",
// "operator"); the zero value is unset (written as ""), what an artifact
// made before times had sources holds.
type Source int

// Sources of a time.
const (
	// SourceUnset: the artifact does not say.
	SourceUnset Source = iota
	// SourceClock: the system clock of the machine that ran the step.
	SourceClock
	// SourceOperator: supplied by the operator (an option of the
	// command), not read from a clock.
	SourceOperator
)

var sourceNames = []string{"", "clock", "operator"}

// String is the name ("" when unset).
func (s Source) String() string {
	if s >= 0 && int(s) < len(sourceNames) {
		return sourceNames[s]
	}
	return fmt.Sprintf("source(%d)", int(s))
}

// MarshalText writes the name.
func (s Source) MarshalText() ([]byte, error) {
	if s < 0 || int(s) >= len(sourceNames) {
		return nil, fmt.Errorf("time source %d is not a defined value", int(s))
	}
	return []byte(sourceNames[s]), nil
}

// UnmarshalText reads a name; the empty string is SourceUnset. Another
// name is an input error on the field "source".
func (s *Source) UnmarshalText(b []byte) error {
	for i, n := range sourceNames {
		if n == string(b) {
			*s = Source(i)
			return nil
		}
	}
	return &inputerr.Error{Field: "source", Msg: fmt.Sprintf("%q: must be clock or operator", string(b))}
}

// Describe says in words where a time came from, for a report: "system
// clock", "supplied by the operator", "source not stated".
func (s Source) Describe() string {
	switch s {
	case SourceClock:
		return "system clock"
	case SourceOperator:
		return "supplied by the operator"
	}
	return "source not stated"
}

// Stamp is one time of an audit, UTC to the second, and its source.
type Stamp struct {
	Time   time.Time `json:"time"`
	Source Source    `json:"source"`
}

// FromClock is the stamp of a time read from the system clock.
func FromClock(t time.Time) Stamp { return Stamp{Time: Second(t), Source: SourceClock} }

// Supplied is the stamp of a time the operator supplied.
func Supplied(t time.Time) Stamp { return Stamp{Time: Second(t), Source: SourceOperator} }

// Second is t in UTC, truncated to the second: how every time of an
// artifact is stored.
func Second(t time.Time) time.Time { return t.UTC().Truncate(time.Second) }

// IsZero reports whether the stamp holds no time.
func (s Stamp) IsZero() bool { return s.Time.IsZero() }

// String is the time as written in artifacts, "2026-12-01T09:30:00Z", and
// its source: "2026-12-01T09:30:00Z (system clock)".
func (s Stamp) String() string {
	if s.IsZero() {
		return "not stated"
	}
	return Format(s.Time) + " (" + s.Source.Describe() + ")"
}

// Format writes a time as artifacts hold it: RFC 3339 in UTC, to the
// second ("2026-12-01T09:30:00Z").
func Format(t time.Time) string { return Second(t).Format(time.RFC3339) }

// suppliedLayouts are the forms ParseSupplied accepts, beside RFC 3339.
var suppliedLayouts = []string{"2006-01-02 15:04:05", "2006-01-02T15:04:05", "2006-01-02"}

// ParseSupplied reads a time the operator supplies on the command line:
// RFC 3339 with its offset ("2026-12-01T09:30:00Z",
// "2026-12-01T10:30:00+01:00"), a date and time in UTC ("2026-12-01
// 09:30:00"), or a date alone, which is that day's 00:00:00 UTC. The
// result is in UTC, to the second. A value in none of these forms is an
// input error (Field empty: the caller names the option).
func ParseSupplied(s string) (time.Time, error) {
	s = strings.TrimSpace(s)
	if t, err := time.Parse(time.RFC3339, s); err == nil {
		return Second(t), nil
	}
	for _, l := range suppliedLayouts {
		if t, err := time.Parse(l, s); err == nil {
			return Second(t), nil
		}
	}
	return time.Time{}, inputerr.Errorf("%q is not a time: give YYYY-MM-DD, YYYY-MM-DD HH:MM:SS (UTC) or RFC 3339 (2026-12-01T09:30:00Z)", s)
}

// Chronology is the time line a record states: when the plan was made,
// when the sample was drawn, when it was labeled (when a label trail
// says), and when the record was issued.
type Chronology struct {
	PlanCreated Stamp `json:"plan_created"`
	Drawn       Stamp `json:"drawn"`
	// Labeled is the span of the label trail's label events (nil without
	// a trail, or with no event).
	Labeled *Span `json:"labeled,omitempty"`
	Issued  Stamp `json:"issued"`
}

// Span is when a step that takes time began and ended, UTC to the second
// (read from the clock of the machine that recorded it).
type Span struct {
	First time.Time `json:"first"`
	Last  time.Time `json:"last"`
}

// String is "2026-12-01T09:30:03Z to 2026-12-01T11:02:41Z".
func (s *Span) String() string {
	if s == nil {
		return "not stated"
	}
	return Format(s.First) + " to " + Format(s.Last)
}

// OrderError is a chronology out of order, or missing a time: it names all
// three times, the step at fault first.
type OrderError struct {
	// Step is the step whose time is missing or out of order: "plan
	// created", "drawn" or "issued".
	Step string
	C    Chronology
}

func (e *OrderError) Error() string {
	what := "is before the time of the step it follows"
	switch e.Step {
	case "drawn":
		what = "the sample was drawn before the plan was made"
		if e.C.Drawn.IsZero() {
			what = "the draw time is not stated"
		}
	case "issued":
		what = "the record is issued before the sample was drawn"
		if e.C.Issued.IsZero() {
			what = "the issue time is not stated"
		}
	case "plan created":
		what = "the plan's creation time is not stated"
	case "labeled":
		what = "labeling began before the sample was drawn"
	case "labeled last":
		what = "the record is issued before labeling ended"
	}
	labeled := ""
	if e.C.Labeled != nil {
		labeled = ", labeled " + e.C.Labeled.String()
	}
	return fmt.Sprintf("the chronology is broken: %s (plan created %s, sample drawn %s%s, record issued %s)",
		what, e.C.PlanCreated, e.C.Drawn, labeled, e.C.Issued)
}

// Check reports whether the plan was created no later than the sample was
// drawn, the sample drawn no later than the first label (with a labeling
// span), the last label no later than the record was issued and the
// sample drawn no later than that, every time stated: nil, or an
// *OrderError whose Step is "plan created", "drawn", "labeled", "labeled
// last" or "issued".
func (c Chronology) Check() error {
	switch {
	case c.PlanCreated.IsZero():
		return &OrderError{Step: "plan created", C: c}
	case c.Drawn.IsZero() || c.Drawn.Time.Before(c.PlanCreated.Time):
		return &OrderError{Step: "drawn", C: c}
	case c.Labeled != nil && c.Labeled.First.Before(c.Drawn.Time):
		return &OrderError{Step: "labeled", C: c}
	case c.Issued.IsZero() || c.Issued.Time.Before(c.Drawn.Time):
		return &OrderError{Step: "issued", C: c}
	case c.Labeled != nil && c.Issued.Time.Before(c.Labeled.Last):
		return &OrderError{Step: "labeled last", C: c}
	}
	return nil
}

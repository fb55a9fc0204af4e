package chrono

import (
	"encoding/json"
	"errors"
	"strings"
	"testing"
	"time"
)

// The forms an operator may type, each read as UTC to the second (RFC
// 3339 and Go's time layouts; common practice, no source).
func TestParseSupplied(t *testing.T) {
	want := time.Date(2026, 12, 1, 9, 30, 0, 0, time.UTC)
	for _, s := range []string{"2026-12-01T09:30:00Z", "2026-12-01T10:30:00+01:00", "2026-12-01 09:30:00", "2026-12-01T09:30:00", "2026-12-01T09:30:00.9Z", " 2026-12-01T09:30:00Z "} {
		got, err := ParseSupplied(s)
		if err != nil || !got.Equal(want) || got.Location() != time.UTC {
			t.Errorf("%q: %v %v", s, got, err)
		}
	}
	if got, err := ParseSupplied("2026-12-01"); err != nil || !got.Equal(time.Date(2026, 12, 1, 0, 0, 0, 0, time.UTC)) {
		t.Errorf("date: %v %v", got, err)
	}
	for _, s := range []string{"", "1.12.2026", "2026-13-01", "2026-12-01 25:00:00", "yesterday"} {
		if _, err := ParseSupplied(s); err == nil || !strings.Contains(err.Error(), "is not a time") {
			t.Errorf("%q: %v", s, err)
		}
	}
}

func TestCheckOrder(t *testing.T) {
	day := func(d int) Stamp { return FromClock(time.Date(2026, 11, d, 9, 0, 0, 0, time.UTC)) }
	span := func(a, b int) *Span { return &Span{First: day(a).Time, Last: day(b).Time} }
	ok := []Chronology{
		{PlanCreated: day(1), Drawn: day(2), Issued: day(3)},
		{PlanCreated: day(1), Drawn: day(1), Issued: day(1)},
		{PlanCreated: day(1), Drawn: day(2), Labeled: span(2, 3), Issued: day(3)},
	}
	for _, c := range ok {
		if err := c.Check(); err != nil {
			t.Errorf("%+v: %v", c, err)
		}
	}
	for _, tc := range []struct {
		c    Chronology
		step string
	}{
		{Chronology{Drawn: day(2), Issued: day(3)}, "plan created"},
		{Chronology{PlanCreated: day(2), Drawn: day(1), Issued: day(3)}, "drawn"},
		{Chronology{PlanCreated: day(1), Issued: day(3)}, "drawn"},
		{Chronology{PlanCreated: day(1), Drawn: day(3), Issued: day(2)}, "issued"},
		{Chronology{PlanCreated: day(1), Drawn: day(2)}, "issued"},
		{Chronology{PlanCreated: day(1), Drawn: day(3), Labeled: span(2, 4), Issued: day(5)}, "labeled"},
		{Chronology{PlanCreated: day(1), Drawn: day(2), Labeled: span(3, 5), Issued: day(4)}, "labeled last"},
	} {
		var oe *OrderError
		if err := tc.c.Check(); !errors.As(err, &oe) || oe.Step != tc.step || !strings.Contains(err.Error(), "plan created ") {
			t.Errorf("%+v: %v, want step %s", tc.c, err, tc.step)
		}
	}
}

// A stamp is written as RFC 3339 in UTC with its source, and read back.
func TestStampJSON(t *testing.T) {
	s := Supplied(time.Date(2026, 12, 1, 10, 30, 0, 5, time.FixedZone("x", 3600)))
	b, err := json.Marshal(s)
	if err != nil || string(b) != `{"time":"2026-12-01T09:30:00Z","source":"operator"}` {
		t.Fatalf("%s %v", b, err)
	}
	var back Stamp
	if err := json.Unmarshal(b, &back); err != nil || back != s {
		t.Errorf("%+v %v", back, err)
	}
	if err := json.Unmarshal([]byte(`{"time":"2026-12-01T09:30:00Z","source":"sundial"}`), &back); err == nil {
		t.Error("unknown source accepted")
	}
	if got := s.String(); got != "2026-12-01T09:30:00Z (supplied by the operator)" {
		t.Errorf("String %q", got)
	}
}

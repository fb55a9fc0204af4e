package chrono

import (
	"math/rand/v2"
	"reflect"
	"strconv"
	"testing"
	"time"
)

// ParseTimestamp agrees with the standard library's time.Parse (the
// reference here) on random instants written in every accepted form, and
// refuses what is not a time.
func TestParseTimestampAgreesWithTimeParse(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	zones := []*time.Location{time.UTC, time.FixedZone("", 3600), time.FixedZone("", -5*3600-1800), time.FixedZone("", 14*3600)}
	for i := 0; i < 20000; i++ {
		sec := r.Int64N(253402300799+62135596800) - 62135596800 // years 1 … 9999
		tm := time.Unix(sec, int64(r.IntN(1e9))).In(zones[i%len(zones)])
		want := tm.Unix()
		for _, s := range []string{tm.Format(time.RFC3339), tm.Format(time.RFC3339Nano), tm.Format("2006-01-02T15:04:05.000-0700")} {
			got, ok := ParseTimestamp([]byte(s))
			ref, err := time.Parse("2006-01-02T15:04:05.999999999Z07:00", s)
			if err != nil {
				ref, err = time.Parse("2006-01-02T15:04:05.999999999-0700", s)
			}
			if !ok || got != want || err != nil || ref.Unix() != got {
				t.Fatalf("%q: %d %v, want %d (time.Parse %v %v)", s, got, ok, want, ref.Unix(), err)
			}
		}
		u := tm.UTC()
		for _, s := range []string{u.Format("2006-01-02 15:04:05"), u.Format("2006-01-02T15:04:05.000000")} {
			if got, ok := ParseTimestamp([]byte(s)); !ok || got != want {
				t.Fatalf("%q: %d %v, want %d", s, got, ok, want)
			}
		}
		day := time.Date(u.Year(), u.Month(), u.Day(), 0, 0, 0, 0, time.UTC)
		if got, ok := ParseTimestamp([]byte(u.Format(time.DateOnly))); !ok || got != day.Unix() {
			t.Fatalf("%s: %d %v", u.Format(time.DateOnly), got, ok)
		}
		if sec >= 1e8 && sec < 1e11 {
			if got, ok := ParseTimestamp([]byte(strconv.FormatInt(sec, 10))); !ok || got != sec {
				t.Fatalf("unix %d: %d %v", sec, got, ok)
			}
		}
	}
	for _, s := range []string{"", " ", "2026-02-30", "2026-13-01", "2026-11-30T24:00:00Z", "2026-11-30T23:60:00Z", "2026-11-30T23:59",
		"2026-11-30X23:59:00", "2026-11-30T23:59:00+25:00", "2026-11-30T23:59:00Q", "30.11.2026", "1e9", "12.", "0x10",
		"2026-11-30T23:59:00.Z", "99999999999999999999", "2025-02-29", "0.7153", "17", "-86400", "99999999", "100000000000"} {
		if v, ok := ParseTimestamp([]byte(s)); ok {
			t.Errorf("%q read as %d", s, v)
		}
	}
	for s, want := range map[string]int64{" 2026-11-30 ": 1795996800, "1795996747.25": 1795996747, "2024-02-29": 1709164800,
		"2026-11-30T23:59:60Z": 1796083199, "100000000": 100000000, "99999999999": 99999999999} {
		if got, ok := ParseTimestamp([]byte(s)); !ok || got != want {
			t.Errorf("%q: %d %v, want %d", s, got, ok, want)
		}
	}
}

// Rows on 1, 2, 4, 5 and 9 November and one on 2 December, checked
// against the period 2026-11: empty days 3, 6–8 and 10–30, one row after.
func TestCompletenessOfAPeriod(t *testing.T) {
	var a, b DayCounter
	at := func(c *DayCounter, s string) {
		v, ok := ParseTimestamp([]byte(s))
		if !ok {
			t.Fatal(s)
		}
		c.Add(v)
	}
	for _, s := range []string{"2026-11-01T00:00:00Z", "2026-11-02T10:00:00Z", "2026-11-02T11:00:00Z", "2026-11-04 08:00:00"} {
		at(&a, s)
	}
	for _, s := range []string{"2026-11-05T23:59:59Z", "2026-11-09T12:00:00+02:00", "2026-12-02T00:00:00Z", "2026-11-01T00:00:00-01:00"} {
		at(&b, s)
	}
	a.Merge(&b)
	r, ok := PeriodDays("2026-11")
	if !ok {
		t.Fatal("period")
	}
	got := a.Completeness("at", r)
	want := &Completeness{TimeColumn: "at", Rows: 8, First: time.Date(2026, 11, 1, 0, 0, 0, 0, time.UTC), Last: time.Date(2026, 12, 2, 0, 0, 0, 0, time.UTC),
		From: "2026-11-01", To: "2026-11-30", RangeOf: RangePeriod, Days: 30, EmptyDayCount: 25,
		EmptyDays: []string{"2026-11-03", "2026-11-06/2026-11-08", "2026-11-10/2026-11-30"}, RowsAfter: 1}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("got  %+v\nwant %+v", got, want)
	}
	if got.Complete() {
		t.Error("complete")
	}
	// Without a range: the rows' own days, 1 November to 2 December.
	rows := a.Completeness("at", DayRange{})
	if rows.RangeOf != RangeRows || rows.Days != 32 || rows.EmptyDayCount != 26 || rows.RowsAfter != 0 || rows.RowsBefore != 0 {
		t.Errorf("%+v", rows)
	}
	if d, ok := ParseDayRange("2026-11-02/2026-11-05"); !ok || a.Completeness("at", d).EmptyDayCount != 1 || a.Completeness("at", d).RowsBefore != 2 {
		t.Errorf("declared range: %+v", a.Completeness("at", d))
	}
	for _, s := range []string{"2026-11-05/2026-11-02", "2026-11", "x/y"} {
		if _, ok := ParseDayRange(s); ok {
			t.Errorf("%q accepted", s)
		}
	}
	for _, s := range []string{"2026-Q4", "november", ""} {
		if _, ok := PeriodDays(s); ok {
			t.Errorf("period %q has days", s)
		}
	}
}

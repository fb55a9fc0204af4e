package chrono

import (
	"sort"
	"time"
)

// Completeness is what a log's time column says about its completeness: the
// first and last time among the rows in scope, and the days of the period
// (or of a declared range; without either, the days from the first row to
// the last) on which no row falls. Days are UTC calendar days; a time
// without an offset is read as UTC.
type Completeness struct {
	// TimeColumn is the log column the times were read from.
	TimeColumn string `json:"time_column"`
	// Rows is the number of rows whose time was read (the rows in scope).
	Rows int64 `json:"rows"`
	// First and Last are the earliest and the latest time, UTC.
	First time.Time `json:"first"`
	Last  time.Time `json:"last"`
	// From and To are the first and last day checked (YYYY-MM-DD), and
	// RangeOf says where they came from: RangePeriod, RangeDeclared or
	// RangeRows.
	From    string `json:"from"`
	To      string `json:"to"`
	RangeOf string `json:"range_of"`
	// Days is the number of days checked, EmptyDayCount how many of them
	// have no row, and EmptyDays lists those days, consecutive ones as one
	// interval "2026-11-20/2026-11-22" (ISO 8601).
	Days          int      `json:"days"`
	EmptyDayCount int      `json:"empty_day_count"`
	EmptyDays     []string `json:"empty_days"`
	// RowsBefore and RowsAfter count rows dated before From and after To:
	// rows that do not belong to the period (0 when the range is the
	// rows').
	RowsBefore int64 `json:"rows_before"`
	RowsAfter  int64 `json:"rows_after"`
}

// Where the days a Completeness checks came from (Completeness.RangeOf).
const (
	// RangePeriod: the draw's period (YYYY-MM, or a day YYYY-MM-DD).
	RangePeriod = "period"
	// RangeDeclared: a range given with the draw.
	RangeDeclared = "declared"
	// RangeRows: from the first row's day to the last row's.
	RangeRows = "rows"
)

// Complete reports whether every day checked has a row and no row lies
// outside them.
func (c *Completeness) Complete() bool {
	return c.EmptyDayCount == 0 && c.RowsBefore == 0 && c.RowsAfter == 0
}

// DayRange is a range of UTC days, both ends included.
type DayRange struct {
	From, To time.Time
	// Of says where the range came from (RangePeriod, RangeDeclared).
	Of string
}

// PeriodDays is the range of days of a period label written YYYY-MM (the
// month) or YYYY-MM-DD (that day); ok is false for any other label.
func PeriodDays(label string) (DayRange, bool) {
	if t, err := time.Parse("2006-01", label); err == nil {
		return DayRange{From: t, To: t.AddDate(0, 1, -1), Of: RangePeriod}, true
	}
	if t, err := time.Parse(time.DateOnly, label); err == nil {
		return DayRange{From: t, To: t, Of: RangePeriod}, true
	}
	return DayRange{}, false
}

// ParseDayRange reads a declared range "FROM/TO" or "FROM,TO" of days
// written YYYY-MM-DD (both included, FROM ≤ TO); ok is false otherwise.
func ParseDayRange(s string) (DayRange, bool) {
	for _, sep := range []string{"/", ","} {
		for i := 0; i+len(sep) <= len(s); i++ {
			if s[i:i+len(sep)] != sep {
				continue
			}
			from, err1 := time.Parse(time.DateOnly, s[:i])
			to, err2 := time.Parse(time.DateOnly, s[i+len(sep):])
			if err1 != nil || err2 != nil || to.Before(from) {
				return DayRange{}, false
			}
			return DayRange{From: from, To: to, Of: RangeDeclared}, true
		}
	}
	return DayRange{}, false
}

// DayCounter counts rows by UTC day and keeps the first and last time.
// The zero value is ready; one per goroutine, merged at the end.
type DayCounter struct {
	rows        int64
	first, last int64
	days        map[int64]int64
	// the run of rows on the current day, not yet in days
	runDay, run int64
}

// Add counts one row at sec (Unix seconds, UTC).
func (c *DayCounter) Add(sec int64) {
	if c.rows == 0 || sec < c.first {
		c.first = sec
	}
	if c.rows == 0 || sec > c.last {
		c.last = sec
	}
	c.rows++
	day := floorDiv(sec, 86400)
	if c.run > 0 && day == c.runDay {
		c.run++
		return
	}
	c.flush()
	c.runDay, c.run = day, 1
}

func (c *DayCounter) flush() {
	if c.run == 0 {
		return
	}
	if c.days == nil {
		c.days = map[int64]int64{}
	}
	c.days[c.runDay] += c.run
	c.run = 0
}

// Merge adds o's rows to c.
func (c *DayCounter) Merge(o *DayCounter) {
	o.flush()
	if o.rows == 0 {
		return
	}
	c.flush()
	if c.rows == 0 || o.first < c.first {
		c.first = o.first
	}
	if c.rows == 0 || o.last > c.last {
		c.last = o.last
	}
	c.rows += o.rows
	if c.days == nil {
		c.days = map[int64]int64{}
	}
	for d, n := range o.days {
		c.days[d] += n
	}
}

// Rows is the number of rows counted.
func (c *DayCounter) Rows() int64 { return c.rows }

// Completeness reports the counted rows against the days of r (with a zero
// range: from the first row's day to the last's). It needs at least one
// row.
func (c *DayCounter) Completeness(column string, r DayRange) *Completeness {
	c.flush()
	out := &Completeness{TimeColumn: column, Rows: c.rows, First: time.Unix(c.first, 0).UTC(), Last: time.Unix(c.last, 0).UTC(),
		EmptyDays: []string{}}
	from, to := floorDiv(c.first, 86400), floorDiv(c.last, 86400)
	out.RangeOf = RangeRows
	if !r.From.IsZero() {
		from, to = floorDiv(r.From.Unix(), 86400), floorDiv(r.To.Unix(), 86400)
		out.RangeOf = r.Of
	}
	out.From, out.To = dayString(from), dayString(to)
	out.Days = int(to - from + 1)
	days := make([]int64, 0, len(c.days))
	for d, n := range c.days {
		switch {
		case d < from:
			out.RowsBefore += n
		case d > to:
			out.RowsAfter += n
		default:
			days = append(days, d)
		}
	}
	sort.Slice(days, func(i, j int) bool { return days[i] < days[j] })
	gap := func(a, b int64) { // days a..b (inclusive) have no row
		if a > b {
			return
		}
		out.EmptyDayCount += int(b - a + 1)
		if a == b {
			out.EmptyDays = append(out.EmptyDays, dayString(a))
		} else {
			out.EmptyDays = append(out.EmptyDays, dayString(a)+"/"+dayString(b))
		}
	}
	next := from
	for _, d := range days {
		gap(next, d-1)
		next = d + 1
	}
	gap(next, to)
	return out
}

func dayString(d int64) string { return time.Unix(d*86400, 0).UTC().Format(time.DateOnly) }

func floorDiv(a, b int64) int64 {
	q := a / b
	if a%b != 0 && (a < 0) != (b < 0) {
		q--
	}
	return q
}

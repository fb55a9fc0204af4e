package assemble

import (
	"fmt"
	"strings"

	"probity/plan/chrono"
	"probity/plan/record"
)

// maxDaysNamed is how many runs of empty days a caveat names before it
// only counts the rest.
const maxDaysNamed = 8

// completenessCaveat is the page-1 caveat of a log that does not cover
// its period: days of the period without a row (the sample stands only
// for the days that have rows) or rows dated outside it; ok is false when
// the log is complete.
func completenessCaveat(c *chrono.Completeness) (record.Caveat, bool) {
	if c.Complete() {
		return record.Caveat{}, false
	}
	span := fmt.Sprintf("%s to %s", c.From, c.To)
	if c.From == c.To {
		span = c.From
	}
	what := map[string]string{chrono.RangePeriod: "the period", chrono.RangeDeclared: "the declared days", chrono.RangeRows: "the days from the first row to the last"}[c.RangeOf]
	var parts []string
	if c.EmptyDayCount > 0 {
		named := c.EmptyDays
		more := ""
		if len(named) > maxDaysNamed {
			more = fmt.Sprintf(" and %d more runs", len(named)-maxDaysNamed)
			named = named[:maxDaysNamed]
		}
		parts = append(parts, fmt.Sprintf("the log (time column %s) has no row on %d of the %d days of %s (%s): %s%s; "+
			"the sample stands only for the days that have rows, and a day without rows can be data that never reached the log",
			c.TimeColumn, c.EmptyDayCount, c.Days, what, span, strings.Join(named, ", "), more))
	}
	if out := c.RowsBefore + c.RowsAfter; out > 0 {
		parts = append(parts, fmt.Sprintf("%d rows in scope are dated outside %s (%s): %d before, %d after; they were drawn from as part of the lot",
			out, what, span, c.RowsBefore, c.RowsAfter))
	}
	text := strings.Join(parts, "; ")
	return record.Caveat{Kind: record.CaveatIncompletePeriod, Text: strings.ToUpper(text[:1]) + text[1:] + "."}, true
}

package main

import (
	"fmt"
	"io"
	"strings"

	"probity/plan/numfmt"
	"probity/plan/trend"
)

// printMeasureTrend writes a trend of records with measures: the measure,
// one table per charted candidate and the release of every period.
func printMeasureTrend(w io.Writer, t *trend.Trend, files *trendChartFiles) {
	m := t.Measure
	printTrendHead(w, t)
	fmt.Fprintf(w, "measure: %s (%s), ceiling %s; each period's claim as its record judged it (no comparison between periods)\n",
		m.Measure, m.Title, numfmt.Setting(m.Ceiling))
	pw := len("period")
	for _, p := range t.Periods {
		pw = max(pw, len(p.Label))
	}
	for _, s := range t.Candidates {
		fmt.Fprintln(w)
		fmt.Fprintln(w, s.Name)
		fmt.Fprintf(w, "  %-*s  %7s %6s %9s %9s %10s %7s  %s\n", pw, "period", "counted", "events", "estimate", "upper", "confidence", "ceiling", "verdict")
		for _, r := range s.Rows {
			fmt.Fprintf(w, "  %-*s  %7s %6s %9s %9s %10s %7s  %s\n", pw, r.Period, numfmt.Count(r.Labeled), numfmt.Count(r.Errors),
				numfmt.Rate(r.Estimate), numfmt.RateUp(r.UpperBound), numfmt.Confidence(r.BoundConfidence), numfmt.Setting(r.Ceiling), r.Verdict)
		}
	}
	fmt.Fprintln(w)
	var rel []string
	for i, p := range t.Periods {
		name := m.Released[i]
		if name == "" {
			name = "none"
		}
		rel = append(rel, p.Label+" "+name)
	}
	fmt.Fprintf(w, "released: %s\n", strings.Join(rel, "; "))
	fmt.Fprintf(w, "latest period %s (record %s): %s\n", t.Latest.Label, t.Latest.RecordID, t.Latest.OverallVerdict)
	if files != nil {
		fmt.Fprintf(w, "chart: %s, %s\n", files.PNG, files.PDF)
	}
}

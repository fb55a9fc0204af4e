// Package trend draws a trend of periodic acceptance records (a
// plan/trend.Trend): a chart with one panel per candidate — the estimate
// and the one-sided upper bound of every period against the ceiling line,
// flagged and rejected periods marked — written as PNG, and a one-page PDF
// with the chart above a table of every period. It computes nothing new:
// every number drawn is a field of the Trend.
//
// The output is deterministic: the same Trend and PageInfo give the same
// bytes (the PDF's dates come from PageInfo.Date, catalogs are sorted and
// the fonts are the Liberation faces compiled into the binary).
package trend

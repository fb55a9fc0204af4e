// Package trend puts the acceptance records of several periods (monthly
// re-checks of a live model) side by side: per candidate, the labeled
// count, errors, estimate, upper bound and verdict of every period, in
// period order.
//
// It refuses what cannot be compared — a period recorded twice, period
// labels written in different shapes, and records judged under plans of
// different classes (see Class) — and warns about what can be compared with
// care: records made from different plan files, candidate sets that change,
// bounds at different confidences and stratified estimates.
//
// A period whose error is significantly higher than the baseline period's
// is flagged by Fisher's exact test (one-sided, conditional on both
// margins; see FisherExact) at a stated level, whether or not it still
// passes the ceiling. Each comparison is at that level; they are not
// adjusted for the number of periods compared, so over many periods some
// flags are expected by chance (at most α of the comparisons where nothing
// changed).
package trend

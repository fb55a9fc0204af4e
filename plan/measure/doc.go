// Package measure judges and plans error measures with their own
// denominators for a declared positive (critical) class: the overall
// error, the false-negative (miss) rate fnr, the false-positive
// (false-alarm) rate fpr, the false omission rate for and the false
// discovery rate fdr. Multi-class candidates are judged one-vs-rest for the
// positive class.
//
// The prediction (and score) of every decision is in the log before any
// label, so the sample is stratified by it: each candidate's predicted
// positives and predicted negatives are unions of strata (predicted classes
// for label-column candidates, score bands for thresholds), possibly
// crossed with the user's own strata. Stratum sizes are known exactly.
//
// # The bounds
//
// for, fdr and error are proportions of a known set of decisions (the
// predicted negatives, the predicted positives, all): each is the exact
// test of "the set holds at least D* = ⌈ceiling·N⌉ events" — the
// hypergeometric test when the set is one stratum, the stratified count
// rule of plan/stratified (Hoeffding 1956 at the least favourable spread,
// valid for any allocation) when it is several.
//
// fnr = FN/(FN + TP) and fpr = FP/(FP + TN) are ratios of totals from
// disjoint strata. Each is judged by an intersection–union test (R. L.
// Berger, "Multiparameter hypothesis testing and acceptance sampling",
// Technometrics 24, 1982) with a floor b₀ fixed in the plan: a ratio at or
// above the ceiling θ has either its denominator's other part B (TP for
// fnr, TN for fpr) below b₀, or its numerator A at or above a* = the least
// A with A/(A + b₀) ≥ θ. The claim is accepted when the exact test of each
// side rejects at the full level α — no split of the risk — and the two
// sides, sampled independently, make its power the product of theirs. See
// ClaimDesign.Judge.
//
// # Entry points
//
// Search plans: the smallest labels and allocation meeting every claim's
// consumer's risk (by construction) and producer's risk (exact at the
// anticipated composition), and what a proportional (uniform) sample would
// need. ClaimDesign.Judge and Estimate judge a labeled sample;
// ClaimDesign.AcceptProbability is a claim's exact operating
// characteristic; Anticipate builds the composition a plan assumes from a
// prevalence and one anticipated measure; ParseMeasure and Measure name
// the measures.
//
// The package computes and never prints; it reads no clock and no global
// randomness.
package measure

// Package verdict judges the candidates of a plan from labeled items: the
// errors, the point estimate (stratified when inclusion weights are
// unequal), the one-sided upper confidence bound at the per-candidate
// confidence, the p-value of "error ≥ ceiling", the multiplicity decision
// (Bonferroni, Holm step-down, fixed-sequence), per-stratum rates with
// exact intervals, and confusion matrices.
//
// The bounds are the published ones (named by plan.Bound): Clopper–Pearson
// (exact binomial) and its hypergeometric analogue for a finite lot (both
// in package plan) for a self-weighting sample,
// Korn–Graubard (Clopper–Pearson with the effective sample size;
// approximate) or the weighted Hoeffding bound (rigorous) for unequal
// weights, and the Hoeffding and Chernoff relative-entropy bounds for plans
// sized by those rules.
//
// The package computes and never prints; it reads no clock and no
// randomness.
package verdict

// Package plan holds the statistics of a labeling audit plan: binomial and
// hypergeometric tails, the search for the smallest sample size n and its
// acceptance number c, the comparison with distribution-free rules
// (Hoeffding, Chernoff relative entropy, Chebyshev), multiplicity
// adjustments for many candidates, operating-characteristic (OC) curves,
// and the plan file that records all of it.
//
// The package computes and never prints; it reads no clock and no global
// randomness: callers pass times and seeds in.
package plan

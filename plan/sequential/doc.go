// Package sequential designs and evaluates truncated sequential acceptance
// plans: label items one at a time and, after t labels with e errors,
// accept when e ≤ a_t, reject when e ≥ r_t, otherwise label another item;
// at the truncation point T the two boundaries meet (r_T = a_T + 1), so
// every path ends in a decision.
//
// The operating characteristic (OC) and the average sample number (ASN)
// are computed exactly by dynamic programming over the states (items
// labeled, errors), for an unbounded stream (binomial) or a finite lot
// (hypergeometric). The boundaries are searched so that the exact
// consumer's risk P(accept | error = ceiling) and the exact producer's
// risk P(reject | error = anticipated) meet the plan's risks; Wald's
// sequential probability ratio test (Wald, Sequential Analysis, 1947)
// supplies the starting slope and intercepts and the classical
// approximations, which are reported for comparison only.
//
// The package computes and never prints; it reads no clock and no global
// randomness.
package sequential

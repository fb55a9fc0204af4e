// Package stratified judges a stratified sample against an error ceiling
// with a guarantee that holds for any allocation: proportional with
// rounding, equal, Neyman, a minimum per stratum, and strata left without
// any item. Its promise is the record's: a population whose error is at or
// above the ceiling is accepted with probability at most α = 1 − confidence,
// whichever way its errors are spread over the strata.
//
// The method (CountRule) counts the errors among the labeled items — or
// among a proportional sub-sample of them, chosen before labeling — and
// accepts when that count is at most c. The count is a sum of independent
// Bernoulli trials whatever the errors per stratum (each stratum's
// hypergeometric count is one: Vatutin & Mikhailov, 1982), so Hoeffding's
// comparison with the binomial (Ann. Math. Statist. 27, 1956, Theorem 4)
// bounds its lower tail by the binomial with the same mean; the mean is
// smallest when the errors sit where the fewest items per decision were
// drawn, and c is set at that least favourable spread (a union–intersection
// test over the spreads of errors, Roy 1953, as in Ottoboni, Lindeman,
// Stark & McBurnett, "Risk-limiting audits by stratified
// union–intersection tests of elections (SUITE)", 2018). A stratum that
// received no item can hold all of its N_h decisions as errors at no cost
// to that spread, so it counts as unknown. When the allocation is exactly
// proportional, the rule is the binomial rule of a simple random sample
// (SimpleRandomShortcut says when that shortcut is allowed and why not).
//
// The method was chosen by measured power against the alternatives the
// risk-limiting-audit literature offers for this problem (see power_test.go
// for the table): Fisher's combination of exact per-stratum hypergeometric
// p-values, maximised over the spreads of errors (SUITE), and the product
// of per-stratum prior–posterior-ratio martingales minimised over the
// spreads (the supermartingale union–intersection test of Spertus & Stark,
// "Sweeter than SUITE", 2022, with the sampling-without-replacement
// martingales of Waudby-Smith & Ramdas, 2020). Both pay for every stratum
// — Fisher's χ² gains degrees of freedom, each martingale pays for its
// prior — and needed roughly two to four times the labels of the count
// rule. The product of martingales remains here as Sequential, because it
// is valid at every look (anytime-valid) and the count rule is not.
//
// Entry points: NewCountRule and CountRule.Judge (p-value, upper bound,
// decision), CountRule.AcceptProbability (the exact operating
// characteristic at given errors per stratum, by convolution),
// CountedForPower and ProportionalCounts (the sub-sample to count),
// SimpleRandomShortcut, and the anytime-valid Sequential.
//
// The package computes and never prints; it reads no clock and no global
// randomness (Monte Carlo helpers take a rand.Source).
package stratified

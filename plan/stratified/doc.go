// Package stratified judges a stratified sample against an error ceiling
// with a guarantee that holds for any allocation: proportional with
// rounding, equal, Neyman, a minimum per stratum, and strata left without
// any item. Its promise is the record's: a population whose error is at or
// above the ceiling is accepted with probability at most α = 1 − confidence,
// whichever way its errors are spread over the strata.
//
// # The method
//
// CountRule counts the errors among the labeled items — or among a
// proportional sub-sample of them fixed before labeling — and accepts when
// that count is at most c. Whatever the errors per stratum, the count is a
// sum of independent Bernoulli trials (each stratum's hypergeometric count
// is one: Vatutin & Mikhailov, Theory Probab. Appl. 27, 1982), so
// Hoeffding's comparison with the binomial (W. Hoeffding, "On the
// distribution of the number of successes in independent trials", Ann.
// Math. Statist. 27, 1956, Theorem 4) bounds its lower tail by the binomial
// with the same mean. That mean is smallest when the errors sit where the
// fewest items per decision were drawn, and c is set at that least
// favourable spread: a union–intersection test over the spreads of errors
// (Roy 1953), as in Ottoboni, Stark, Lindeman & McBurnett, "Risk-limiting
// audits by stratified union–intersection tests of elections (SUITE)",
// 2018. A stratum that received no item can hold all of its N_h decisions
// as errors at no cost to that spread, so it counts as unknown. When the
// allocation is exactly proportional, the rule is the binomial rule of a
// simple random sample; SimpleRandomShortcut says when that shortcut is
// allowed and why not.
//
// # Why this method: measured power
//
// Labels needed for a 90 % chance of acceptance at p0 = ceiling/2,
// confidence 0.95, for an invented population of 100 000 decisions in four
// strata with shares 0.45/0.35/0.18/0.02 (power_test.go, TestPowerTable;
// exact except the martingale column, Monte Carlo):
//
//	ceiling  allocation              SRS  count  count*  Fisher  martingale  w-Hoeffding
//	0.02     proportional           1271   1272    1272    2400        3112        17949
//	0.02     equal                  1271   2285   13080    3717        4648        21320
//	0.02     Neyman (rates vary)    1271   1714   11219    2239        3040        19010
//	0.02     proportional, min 60   1271   1306    1365    2412        3112        17949
//	0.05     proportional            506    511     511     955        1136         3232
//	0.05     equal                   506    909    9852    1461        1707         4634
//	0.05     Neyman (rates vary)     506    679    4255     884        1138         3399
//	0.05     proportional, min 60    506    559     673     978        1181         3232
//
// SRS is the exact binomial plan of a simple random sample; count is
// CountRule with the sub-sample of CountedForPower, count* counts every
// labeled item. The alternatives are the ones the risk-limiting-audit
// literature offers for this problem, each with its least favourable
// spread computed exactly: Fisher's combination of exact per-stratum
// hypergeometric p-values (SUITE), and the product of per-stratum
// prior–posterior martingales (the supermartingale union–intersection test
// of Spertus & Stark, "Sweeter than SUITE", 2022, with the martingales of
// Waudby-Smith & Ramdas, "Confidence sequences for sampling without
// replacement", NeurIPS 2020). Both pay for every stratum — the least
// favourable spread leaves about one degree of freedom of evidence while
// Fisher's χ² counts 2H, and each martingale pays for its prior — and the
// weighted Hoeffding bound pays for treating a rate near 1 % as if it
// could be anywhere in [0, 1]. Counting every item when the allocation is
// far from proportional lets the errors sit where few items per decision
// were drawn; thinning the over-sampled strata removes that lever, at the
// price of labels that do not count (they still serve per-stratum rates).
//
// The product of martingales remains as Sequential because it is valid at
// every look (anytime-valid), which the count rule is not. Fisher's
// combination lives only in the tests, for this comparison.
//
// Hoeffding (1956) states the theorem without a numerical example; the
// tests check it exhaustively on a grid of success probabilities, check
// that hypergeometric generating functions have only real roots, and
// recompute a worked example with scipy.
//
// # Cost
//
// For 100 strata, 5 000 000 decisions (D* = 100 000 at a 2 % ceiling) and
// 20 000 labels (bench_test.go): NewCountRule and Judge together take about
// 0.3 ms, AcceptProbability about 3 ms, CountedForPower about 0.3 s (a
// rule and a convolution per candidate sub-sample, two per distinct
// sampling fraction), one look of Sequential about 20 ms.
//
// # Entry points
//
// NewCountRule and CountRule.Judge (p-value, upper bound, decision);
// CountRule.AcceptProbability (the exact operating characteristic at given
// errors per stratum, for sizing a plan); CountedForPower and
// ProportionalCounts (the sub-sample to count); SimpleRandomShortcut;
// Sequential with AnticipatedPrior; MonteCarloAccept for judgements
// without a convolution formula.
//
// The package computes and never prints; it reads no clock and no global
// randomness (MonteCarloAccept takes a rand.Source).
package stratified

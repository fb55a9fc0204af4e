// Package measure judges and plans error measures with their own
// denominators for a declared positive (critical) class: the overall
// error, the false-negative (miss) rate fnr = FN/(FN + TP), the
// false-positive (false-alarm) rate fpr = FP/(FP + TN), the false omission
// rate for = FN/(FN + TN) and the false discovery rate fdr = FP/(FP + TP).
// Multi-class candidates are judged one-vs-rest for the positive class
// (error stays the multi-class error: any wrong class).
//
// The prediction (and score) of every decision is in the log before any
// label, so the sample is stratified by it: each candidate's predicted
// positives and predicted negatives are unions of strata — its predicted
// classes (label-column candidates) or score bands (thresholds), possibly
// crossed with the user's own strata — whose sizes are known exactly.
//
// # The bounds
//
// error, for and fdr are proportions of a known set of decisions (all
// decisions, the predicted negatives, the predicted positives). Each is
// the exact test of "the set holds at least D* = ⌈ceiling·N⌉ events":
// the hypergeometric test when the set is one stratum, and the count rule
// of plan/stratified when it is several (Hoeffding 1956 at the least
// favourable spread, valid for any allocation).
//
// fnr and fpr are ratios R = A/(A + B) of totals from disjoint strata: A
// the numerator's events (false negatives, false positives), B the
// denominator's other part (true positives, true negatives), known only
// through its complement C = N_b − B (false positives, false negatives).
// A claim is accepted when the counted complement events are at most c_B
// and the counted numerator events at most c_A, a rectangle in the two
// sides' counts, and it keeps its risk for every (A, B) at or above the
// ceiling because the sides are sampled independently:
//
//	P(accept) ≤ p_a(c_A, A)·p_b(c_B, N_b − B) ≤ p_a(c_A, a*(B))·p_b(c_B, N_b − B),
//
// a*(B) the least A with A/(A + B) ≥ ceiling and p_a, p_b the sides' exact
// tails (exact for one stratum, the count rule's bound for several). The
// design fixes a floor b₀ and c_B; c_A is the largest count whose bound
// over every B is at most α: p_a(c_A, a*(b₀)) for B ≥ b₀, and on each
// interval of a fixed lattice below b₀ the product at the interval's ends
// (floorLattice). This is a union–intersection test (Roy 1953) over the
// nuisance B with exact tails, maximised over the nuisance as exact
// unconditional tests are (Suissa & Shuster, "Exact unconditional sample
// sizes for the 2×2 binomial trial", J. R. Statist. Soc. A 148, 1985);
// with c_B at level α it is the intersection–union test of Berger
// ("Multiparameter hypothesis testing and acceptance sampling",
// Technometrics 24, 1982) at the floor b₀, which it never does worse than.
// The one-sided upper bound is the test inverted over the ceiling. See
// ClaimDesign.Judge. Validity is shown, not assumed: exact enumeration of
// every composition and outcome on small populations (enumerate_test.go)
// and the whole judgement simulated at the ceiling with rare positives and
// adversarial spreads over score bands (montecarlo_test.go).
//
// # Why this rule: measured power
//
// Labels needed for a 90 % chance of acceptance at the anticipated
// composition, confidence 0.95, label-column populations of 100 000
// decisions (power_test.go, TestPowerTable; the split is an approximate
// minimum over a grid):
//
//	case                                       product   IU    split
//	prevalence 3 %, fnr 0.10 against 0.20         3449   4470   4359
//	prevalence 1 %, fnr 0.10 against 0.25         4661   5354   5608
//	prevalence 5 %, fnr 0.05 against 0.12         2621   3351   3342
//	prevalence 3 %, fpr 0.013 against 0.03          23     52     53
//	prevalence 3 %, fpr 0.013 against 0.016        552    909    819
//
// IU is the intersection–union test alone (each side at the full α,
// the floor fixed); split is the bounds A_U and B_L at a split of the risk,
// (1 − α_A)(1 − α_B) = 1 − α, accepted when A_U/(A_U + B_L) < ceiling. Both
// pay for the nuisance twice over — the split spends risk on a bound of B
// that only matters where A is also near its limit, the IU test demands B
// be shown above a fixed floor — while the product charges each B below
// the floor only the chance that both sides pass there.
//
// # What stratifying by prediction saves
//
// Labels needed by the design and by a uniform sample (proportional
// allocation, the same rules and risks) for an invented classifier of
// 100 000 decisions with 3 % true positives, each claim's ceiling about
// twice its anticipated value (savings_test.go, where the populations and
// ceilings are listed):
//
//	         label column          one threshold,        three thresholds,     three thresholds,
//	                               five score bands      five score bands      four cells
//	measure  design uniform         design uniform        design uniform        design uniform
//	error       749     749  1.0×      750     750  1.0×    1080    1080  1.0×    1080    1080  1.0×
//	fnr        3658    3663  1.0×     4099    4268  1.0×   41060   42747  1.0×   33345   34267  1.0×
//	fpr          20     351 17.6×       27     471 17.4×      38     615 16.2×      38     615 16.2×
//	for         593     611  1.0×      595     613  1.0×    1031    1049  1.0×    1030    1048  1.0×
//	fdr         244    8504 34.9×      247    8585 34.8×     640   27791 43.4×     640   27791 43.4×
//
// The rates that live among the flagged decisions (fdr, and fpr through
// its numerator) are where a uniform sample wastes almost every label.
// The miss rate and the omission rate live among the cleared decisions,
// which a uniform sample already covers; and score bands finer than the
// cells the thresholds cut buy nothing under a bound valid for every
// spread of errors: the least favourable spread puts the misses where the
// fewest labels per decision were drawn, so a claim can only count a
// sub-sample proportional within each side, and several strata move a side
// from the exact hypergeometric test to the slightly weaker count rule
// (Coarsen merges them; compare the last two columns).
//
// # The design search
//
// Search finds the fewest labels, and their allocation, meeting every
// claim's consumer's risk (by construction, at its share of δ under the
// multiplicity rule) and producer's risk (exactly, at the anticipated
// composition). The designs searched: each claim counts on each side a
// sub-sample proportional to the side's strata (ProportionalCounts), a
// ratio's numerator counts a record size of its power curve at one of the
// floors of a fixed list, and its denominator side any size with c_B the
// largest the product allows; a stratum's labels are the most any claim
// counts there. Over these designs the search is exact: power curves are
// scanned over every sub-sample size and kept as records (a saw-tooth in
// size is no obstacle: between records no size does better), ratios'
// frontiers are walked over the numerator's records, and the ratios'
// choices are combined by branch and bound. With one stratum per side — a
// label-column candidate's predicted classes — every allocation is such a
// design; search_test.go checks the search against a brute force over
// every allocation written with scipy.stats tails (testdata/bruteforce.py).
// The uniform comparison is the smallest proportional allocation meeting
// the same claims; a design is never larger.
//
// # What a plan anticipates, and what the draw keeps
//
// A plan sizes its design on the cells every candidate predicts alike,
// at the composition it anticipates: the prevalence and, per candidate,
// two anticipated measures (--anticipated NAME:V for every candidate, or
// NAME:V1,V2,… one per candidate) fix its confusion matrix, since every
// measure is linear in its true and false positives. For thresholds on
// one score the bands follow by difference, nested: FN_j = fnr_j·P and
// FP_j from the other value, and a band between two thresholds holds the
// difference of what they flag. Values that no nested composition
// satisfies — a higher threshold with a lower fnr or a higher fpr than a
// lower one — are refused, naming them. Equal values for every threshold
// leave the bands between them empty, which the plan says. Label-column
// candidates are taken to predict independently given the truth. The
// plan file states the assumption (measures.assumes) and the cells.
//
// A claim anticipated at or above its ceiling (a threshold expected to
// miss too much) is an expected failure: the design is sized for the
// others and it is judged on what they label, keeping its consumer's risk
// at its share of δ.
//
// The plan file keeps every claim's design on the cells (its counted
// items, floor and c_B) and on the uniform sample, with their exact
// producer's risks. Recheck verifies them when the plan is loaded without
// searching again: each risk is recomputed exactly, each count checked
// against the labels and the composition against the inputs, so an
// edited plan passes only if it is again a valid plan with the risks it
// states. NewPeriodDesign carries them to a period's strata — the
// user's strata crossed with the cells, of the log's actual sizes —
// counting as many items per side, adding labels only where a claim's
// exact power on those strata falls short (meetOnStrata). On a log whose
// bands hold what the plan anticipated, the draw labels what the plan
// said (the demo's weld scans, three thresholds, fnr and error: the plan
// 7 077, the November draw with four user strata 7 092, the October draw
// 7 086); when the bands differ by more than a quarter, Departure names
// the band.
//
// # Cost
//
// On one core of the development machine (bench_test.go): the label-column
// plan with all five measures, about 0.5 s; the same at 10 000 000
// decisions, about 1 s; three threshold candidates with all five measures
// each (fifteen claims, 35 000 labels), about 5 s; judging a ratio claim,
// about 0.3 ms. Carrying the demo's plan to its November log's sixteen
// strata (BenchmarkPeriodDesignDemoRealistic), about 3 s; rechecking a
// plan when it is loaded, about a millisecond (plan/planfile's
// BenchmarkParseMeasures).
//
// # Entry points
//
// BuildPlan and Recheck make and verify a plan file's measures;
// NewPeriodDesign carries them to a period's strata; Search plans
// (Problem → Plan: Design and Uniform); ClaimDesign.Judge
// judges one claim at any level (its PValue and the verdict at a level are
// what a multiplicity procedure needs: accepted at level α exactly when
// PValue ≤ α); ClaimDesign.AcceptProbability is a claim's exact operating
// characteristic; Estimate is each candidate's weighted confusion matrix;
// Anticipate builds the composition a plan assumes from a prevalence and
// one anticipated measure; Coarsen merges strata every candidate predicts
// alike; ParseMeasure and Measure name the measures.
//
// The package computes and never prints; it reads no clock and no global
// randomness.
package measure

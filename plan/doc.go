// Package plan holds the statistics of a labeling audit plan: binomial and
// hypergeometric tails, the search for the smallest sample size n and its
// acceptance number c, the comparison with distribution-free rules
// (Hoeffding, Chernoff relative entropy, Chebyshev), multiplicity
// adjustments for many candidates, operating-characteristic (OC) curves,
// and the plan file that records all of it.
//
// The entry points:
//
//   - BinomialCDF, BinomialSF, HypergeometricCDF, HypergeometricSF and the
//     PMFs: tails accurate deep into both ends (tails.go);
//   - ClopperPearsonUpper/Lower/Interval, BinomialPValueAtLeast,
//     HypergeometricPValueAtLeast, BadLotErrors (D1), GoodLotErrors (D0)
//     (clopper.go);
//   - Size: the rule and the comparison for a set of Inputs; Build: the
//     whole plan File (size.go, build.go, search.go, rules.go);
//   - File.OC, File.AcceptProbability, File.KeyPoints: the exact OC curve
//     (oc.go); Multiplicity with its PerCandidateRisk, Inputs.PerCandidateRisk,
//     File.PerCandidateConfidence (multiplicity.go); the other settings are
//     types too, written by name in the plan file (setting.go);
//   - Budget, AcceptanceNumberFor: the inverse question (budget.go);
//   - File.Marshal, Parse, Load, Fingerprint: the plan file (file.go).
//
// The package computes and never prints; it reads no clock and no global
// randomness: callers pass times and seeds in.
package plan

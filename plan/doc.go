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
//   - ClopperPearsonUpper/Lower/Interval, HypergeometricUpper (the exact
//     bound for a finite lot), BinomialPValueAtLeast,
//     HypergeometricPValueAtLeast, BadLotErrors (D1), GoodLotErrors (D0)
//     (clopper.go); BernoulliKL, the exponent of the Chernoff bound (kl.go);
//   - Size: the rule and the comparison for a set of Inputs; Build: the
//     whole plan File (size.go, build.go, search.go, rules.go);
//   - File.OC, File.AcceptProbability, File.KeyPoints: the exact OC curve
//     (oc.go); Inputs.PerCandidateRisk, File.PerCandidateConfidence;
//   - the settings, each a type written by its name in plan.yaml and
//     record.json, with what its callers need: Multiplicity (its
//     PerCandidateRisk δ/M'), Method, Model, Design, Require and Bound (the
//     bound a judgement used) (setting.go and one file each);
//   - Budget, AcceptanceNumberFor: the inverse question (budget.go);
//   - File.Marshal, Parse, Load, Fingerprint: the plan file (file.go).
//
// The package computes and never prints; it reads no clock and no global
// randomness: callers pass times and seeds in.
package plan

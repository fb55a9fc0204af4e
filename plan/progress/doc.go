// Package progress decides, from a worksheet labeled from the top, whether
// an audit can already stop: for each candidate `continue`, `reject` or
// `accept`, with how many more labels it can take at most.
//
// The worksheet lists the sample in ascending key order, so any prefix of
// it is itself a simple random sample of the same population; that is
// what lets a decision be taken on a prefix. A worksheet with a gap (an
// unlabeled item followed by labeled ones) breaks that rule and is
// refused.
//
// A fixed (n, c) plan stops by exact curtailment — reject as soon as the
// errors exceed c, accept as soon as even n − t further errors would keep
// them at or below c — which changes neither risk: every stop is the
// decision the full sample of n would reach. A sequential plan stops at
// its own boundaries (package plan/sequential).
//
// The package computes and never prints.
package progress

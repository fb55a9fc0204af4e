// Package intake checks a labeled worksheet against the draw it came from
// before anything is judged: the manifest's fingerprints against the plan
// and the ledger, the labeled rows against the ledger (added, missing,
// altered or reordered rows), the labels against the plan's classes, and
// the use of spare items. It turns the checked rows into the items the
// verdict package judges, and lists the deviations from the plan.
//
// Errors are *inputerr.Error values naming the file, the line and the
// field; the package never prints.
package intake

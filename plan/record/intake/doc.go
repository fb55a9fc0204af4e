// Package intake checks a labeled worksheet against the draw it came from
// before anything is judged: the labeled rows against the ledger (added,
// missing, altered or reordered rows), the labels against the plan's
// classes (drawfolder.ParseLabel's rule), and the use of spare items. The
// draw folder itself — the plan fingerprint, the files' SHA-256, the
// ledger against the manifest's strata — is checked by drawfolder.Open,
// which gives the folder this package reads. It turns the checked rows into the items the
// verdict package judges, and lists the deviations from the plan.
//
// Errors are *inputerr.Error values naming the file, the line and the
// field; the package never prints.
package intake

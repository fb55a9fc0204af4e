// Package sampling reads prediction logs, computes the selection keys,
// allocates a plan's sample across strata and writes the draw folder
// (worksheet.csv, ledger.csv, manifest.json).
//
// The package computes and never prints; progress is reported through a
// callback the caller passes in.
package sampling

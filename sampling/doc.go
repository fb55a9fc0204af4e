// Package sampling reads prediction logs, computes the selection keys,
// allocates a plan's sample across strata and builds the draw folder's
// content (worksheet.csv, worksheet-second.csv, ledger.csv, manifest.json,
// whose formats are package drawfolder's). DrawInputFromManifest repeats a
// draw from what its manifest records, to check a folder against its log.
//
// Selection. Each row's key is the lowercase hex SHA-256 of the UTF-8
// bytes "<seed>:<record id>" (the plan's seed, or for a period the seed
// sha256hex("<plan seed>:period:<label>")). In stratum h the n_h rows with
// the smallest keys are the sample and the next ones the spares. Keys are
// uniform and independent of the row order, so this is a simple random
// sample without replacement within each stratum (each row is drawn with
// probability n_h/N_h), and anyone with the plan and the log can recompute
// it with a sort.
//
// One pass, bounded memory. The log is read once in record-aligned chunks
// that worker goroutines split and hash in parallel; per stratum each
// worker keeps only the rows that could still be among the n + spare
// smallest keys (n + spare bounds n_h + spares under every allocation),
// so memory depends on the sample, not on the log. The allocation needs
// the stratum counts N_h, known only at the end of the pass, and is made
// then (see Allocate).
//
// The package computes and never prints; progress is reported through a
// callback the caller passes in, and nothing reads the clock.
package sampling

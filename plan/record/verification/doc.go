// Package verification answers "is this acceptance record what it says
// it is?": Verify takes a record folder and whatever inputs are given and
// returns the list of checks it ran, each ok, failed or skipped with a
// sentence saying what was found. In order:
//
//  1. record.json is a well-formed record in canonical form (not edited
//     by hand);
//  2. record.sig's Ed25519 signatures over record.json and record.pdf are
//     valid, made with the key record.json names, and — given a trusted
//     public key — with that key;
//  3. record.pdf is byte for byte the rendering of record.json (A4 or
//     Letter, with the given wording), when this probity version made it;
//  4. each given input's SHA-256 is the one the record holds (plan,
//     manifest, the log's as the manifest states it, ledger, labels, the
//     second worksheet and the adjudications of double labeling);
//  5. given the plan, the draw folder and the labels, the record is
//     computed again from them (assemble.Record, the function the record
//     command uses, with the stored record's options) and compared with
//     record.json field by field (Diff);
//  6. given the log as well, the sample is drawn again from it and
//     compared with the draw folder (drawfolder.Compare).
//
// A check that fails is an outcome, not an error: Verify returns an error
// only for input it cannot use at all (no record folder, a file it cannot
// read, a manifest it cannot parse), and then an *inputerr.Error.
//
// Dependencies point one way: the command calls this package, which calls
// pdfreport (to re-render), plan, plan/record and sampling (to redraw);
// nothing under plan/record imports it. The package never prints.
package verification

// Package verification answers "is this acceptance record what it says
// it is, and who vouches for it?": Verify takes a record folder, the trust
// to check its signatures against and whatever inputs are given, and
// returns the list of checks it ran, each ok, failed, limited or skipped
// with a sentence saying what was found. In order:
//
//  1. record.json is a well-formed record of this format in canonical form
//     (not edited by hand), and its record id is the digest of its content;
//  2. the operator's seal (record.sig) is valid over record.json and the
//     record.pdf as issued, made with the key record.json names, and that
//     key is trusted (Trust.Keys, or an operator in Trust.Signers); a
//     published demo key never is;
//  3. every person's signature (signatures.txt) is valid, chained and bound
//     to record.json and the seal (signature.CheckChain), made with the key
//     the signers file gives that person in that role, and dated neither
//     before the record's date nor after the verifier's clock;
//  4. the record carries at least one signature, and every one checked;
//  5. record.pdf is byte for byte the rendering of record.json and its
//     signatures (A4 or Letter, with the record's wording), and each
//     signature and the seal cover the rendering they were shown; for a
//     record of another probity version a PDF that is not the rendering is
//     accepted only as exactly the PDF the last trusted signature signed,
//     a limitation the check states;
//  6. each given input's SHA-256 is the one the record holds (plan,
//     manifest, the log's as the manifest states it, ledger, labels, the
//     second worksheet and the adjudications of double labeling);
//  7. given the plan, the draw folder and the labels, the record is
//     computed again from them (assemble.Record, the function the record
//     command uses, with the stored record's options) and compared with
//     record.json field by field (Diff);
//  8. given the log as well, the sample is drawn again from it and
//     compared with the draw folder (drawfolder.Compare).
//
// Authenticate runs checks 1 to 4 on a record.json alone, for a use that
// reads its numbers (a trend).
//
// A check that fails is an outcome, not an error: Verify returns an error
// only for input it cannot use at all (no record folder, a file it cannot
// read, a manifest it cannot parse), and then an *inputerr.Error.
//
// Dependencies point one way: the command calls this package, which calls
// pdfreport (to re-render), plan, plan/record and sampling (to redraw);
// nothing under plan/record imports it. The package never prints.
package verification

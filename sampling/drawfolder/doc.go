// Package drawfolder holds the formats of a draw folder — worksheet.csv,
// worksheet-second.csv, ledger.csv and manifest.json — the rule for what a
// worksheet's label cell may hold, and the one way to open a folder for
// judging: Open reads it and checks it against the plan it was drawn from.
//
// What a draw writes is a Content (Render, Write); what a later step reads
// is a Folder (Open) and the labeled worksheets (ReadLabels). Compare
// checks a folder against a draw recomputed from the log.
//
// # Label cells
//
// A label cell holds one of three things, and every step — progress,
// record, the agreement of double labels, verify and the demo — reads it
// with ParseLabel, so they all agree:
//
//   - blank: empty, or only spaces: the item is not labeled (yet);
//   - the word unsure, in any case ("unsure", "Unsure", "UNSURE"): the
//     labeler looked at the item and could not decide;
//   - one of the plan's classes, spelled exactly as the plan spells it.
//
// Spaces around the text are ignored. Classes are compared exactly, case
// included, because they are the plan's own vocabulary, matched against
// the candidates' predictions as they are written ("OK" is not the class
// "ok": a labeler's slip of case is refused, not silently read as a
// class). The word unsure is not a class but probity's own word, and a
// spreadsheet that capitalises the first letter of a cell must not turn it
// into an error; so it alone is matched without regard to case. Anything
// else is refused, naming the file, the line and the item (LabelError).
//
// The package depends on the standard library, plan/inputerr and
// sampling/safewrite only, so a package that reads worksheets never links
// the log reader. It never prints.
package drawfolder

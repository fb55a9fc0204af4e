// Package labeltrail is the audit trail of labeling: label-trail.jsonl in
// a draw folder, one JSON line per label event, each line carrying the
// SHA-256 of the line before it (a hash chain), and the labeled worksheets
// derived from it.
//
// # The file
//
// The first line begins the trail and ties it to one draw:
//
//	{"seq":1,"prev":"","time":"2026-12-01T09:40:00.000Z","begin":{"format":1,"manifest":"<SHA-256 of manifest.json>","plan":"<plan fingerprint>","selection_seed":"<seed>"}}
//
// Every later line is one label event:
//
//	{"seq":2,"prev":"<SHA-256 of line 1>","time":"2026-12-01T09:41:07.250Z","label":{"labeler":"Dana Example","sheet":"worksheet.csv","item":3,"record_id":"r-0017","previous_label":"","label":"defect","previous_note":"","note":"","reason":""}}
//
// seq is the line number; prev is the lowercase hex SHA-256 of the
// previous line's bytes without its line end ("" on the first line); time
// is UTC with milliseconds, from the clock of the process that appended
// the line. sheet names the worksheet the event labels (worksheet.csv, or
// worksheet-second.csv for the second, independent labeler of a draw with
// double labeling). label holds what a label cell may hold in its normal
// form (drawfolder.ParseLabel: a class, "unsure", or "" to clear); a
// change of a label already given (not a note alone) carries a reason.
// previous_label and previous_note are the item's values before the
// event, so the trail reads on its own. Each line is the canonical
// encoding of its entry (keys in this order, no spaces, no HTML escaping)
// and ends with "\n".
//
// # Reading and deriving
//
// Parse checks the format and the chain and finds a last line cut short
// (a crash while it was written: it was never confirmed). Replay checks
// the events against the draw (the trail's first line names its manifest;
// items, record ids, labels, previous values, reasons, times not before
// the draw) and gives the State: every item's current label, note and
// labeler, and a Summary (labelers, first and last label time, changed
// labels). State.Worksheet derives a labeled worksheet: the draw's
// worksheet with the label, note and labeler columns filled, written by
// drawfolder.WriteWorksheet, so the same trail gives the same bytes.
//
// Log appends to a trail (Create, Open): it checks each event against the
// state first and flushes the line to disk before it returns
// (safewrite.AppendLog), so an event its caller confirms is never lost.
//
// The package never prints and reads no clock: times are passed in.
package labeltrail

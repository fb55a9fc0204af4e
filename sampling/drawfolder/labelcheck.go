package drawfolder

import (
	"fmt"
	"slices"
	"strings"

	"probity/plan/inputerr"
)

// maxListedRows is how many differing rows a message about a labeled
// worksheet names.
const maxListedRows = 5

// CheckLabels checks that a labeled worksheet is a copy of the folder's
// worksheet.csv: of the same draw, with the same columns, the same items
// and record ids in the same order, and the same shown values. Labels,
// notes and labelers are what labeling adds. A difference is an
// *inputerr.Error naming the labeled file and, where it can, the draw the
// worksheet belongs to, the row that is missing, or the column and both
// values of a shown value that changed.
func (f *Folder) CheckLabels(l *Labels) error {
	here := ManifestDrawID(f.Manifest)
	if id, known, _ := parseItemCell(l.Header[0]); known && !id.Same(here) {
		return &inputerr.Error{File: l.Path, Line: 1,
			Msg:  fmt.Sprintf("this is the worksheet of another draw (%s), not of the draw in %s (%s)", id, f.Dir, here),
			Hint: fmt.Sprintf("pass the labeled copy of %s", f.Path(WorksheetFile))}
	}
	wshow, lshow := ShownColumns(f.WorksheetHeader), l.Shown()
	if !slices.Equal(wshow, lshow) {
		return &inputerr.Error{File: l.Path, Line: 1,
			Msg:  fmt.Sprintf("the shown columns are %s, but the draw's worksheet has %s", columnList(lshow), columnList(wshow)),
			Hint: "label a copy of the worksheet.csv written by probity draw without adding, removing or renaming columns"}
	}
	byID := make(map[string]int, len(f.Ledger))
	for i, r := range f.Ledger {
		byID[r.RecordID] = i
	}
	seen := map[string]bool{}
	var added, moved, renumbered, changed []string
	last := -1
	for _, r := range l.Rows {
		li, ok := byID[r.RecordID]
		if !ok {
			added = append(added, fmt.Sprintf("line %d: record_id %s (item %d) is not in this draw", r.Line, quoteValue(r.RecordID), r.Item))
			continue
		}
		seen[r.RecordID] = true
		lr := f.Ledger[li]
		switch {
		case lr.Item != r.Item:
			renumbered = append(renumbered, fmt.Sprintf("line %d: record_id %s has item %d, the draw item %d", r.Line, quoteValue(r.RecordID), r.Item, lr.Item))
		case li < last:
			moved = append(moved, fmt.Sprintf("line %d: item %d is out of order: the draw's worksheet has it before item %d (on line %d)", r.Line, r.Item, f.Ledger[last].Item, li+2))
		}
		last = max(last, li)
		if li < len(f.Worksheet) {
			if d := shownDiff(wshow, f.Worksheet[li].Show, r.Show); d != "" {
				changed = append(changed, fmt.Sprintf("line %d: item %d's %s", r.Line, r.Item, d))
			}
		}
	}
	var missing []string
	for i, r := range f.Ledger {
		if !seen[r.RecordID] {
			missing = append(missing, fmt.Sprintf("item %d (record_id %s, line %d of the draw's worksheet)", r.Item, quoteValue(r.RecordID), i+2))
		}
	}
	if len(added)+len(missing)+len(moved)+len(renumbered)+len(changed) == 0 {
		if len(f.Worksheet) != len(f.Ledger) {
			return &inputerr.Error{File: f.Path(WorksheetFile), Msg: fmt.Sprintf("%d rows where the ledger has %d", len(f.Worksheet), len(f.Ledger))}
		}
		return nil
	}
	hint := "label every row of the draw's worksheet.csv in place, without adding, removing, sorting or editing rows"
	if len(added) > 0 && len(added) == len(l.Rows) {
		return &inputerr.Error{File: l.Path,
			Msg:  fmt.Sprintf("none of its %d record ids is in this draw (%s): it is the worksheet of another draw", len(l.Rows), here),
			Hint: fmt.Sprintf("pass the labeled copy of %s", f.Path(WorksheetFile))}
	}
	var parts []string
	switch len(missing) {
	case 0:
	case 1:
		parts = append(parts, "a row is missing: "+missing[0])
	default:
		parts = append(parts, fmt.Sprintf("%d rows are missing: %s", len(missing), firstRows(missing)))
	}
	for _, p := range [][]string{added, renumbered, moved, changed} {
		if len(p) > 0 {
			parts = append(parts, firstRows(p))
		}
	}
	if len(parts) == 1 && len(changed) > 0 {
		hint = "a spreadsheet may have reformatted the value (a date, a number, a leading zero): keep the shown columns as text, or copy the labels into the draw's worksheet.csv"
	}
	return &inputerr.Error{File: l.Path, Msg: "rows differ from the draw's worksheet — " + strings.Join(parts, "; "), Hint: hint}
}

// shownDiff names the first shown column whose value differs, with both
// values: `date is "11/30/2026", the draw's worksheet has "2026-11-30"`.
func shownDiff(columns, want, got []string) string {
	for i := range max(len(want), len(got)) {
		var w, g string
		if i < len(want) {
			w = want[i]
		}
		if i < len(got) {
			g = got[i]
		}
		if w != g {
			col := fmt.Sprintf("shown value %d", i+1)
			if i < len(columns) {
				col = columns[i]
			}
			return fmt.Sprintf("%s is %s, the draw's worksheet has %s", col, quoteValue(g), quoteValue(w))
		}
	}
	return ""
}

// firstRows lists at most maxListedRows findings.
func firstRows(s []string) string {
	if len(s) <= maxListedRows {
		return strings.Join(s, ", ")
	}
	return strings.Join(s[:maxListedRows], ", ") + fmt.Sprintf(" and %d more", len(s)-maxListedRows)
}

// quoteValue is %q of a value, cut when it is too long for a message.
func quoteValue(v string) string {
	const most = 60
	if len(v) <= most+16 {
		return fmt.Sprintf("%q", v)
	}
	n := most
	for n > 0 && v[n]&0xc0 == 0x80 {
		n--
	}
	return fmt.Sprintf("%q… (%d bytes)", v[:n], len(v))
}

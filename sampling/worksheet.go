package sampling

import (
	"io"
	"strconv"
)

// WorksheetHeader returns a worksheet's header: item, record_id, the show
// columns, label, note, labeler.
func WorksheetHeader(show []string) []string {
	h := []string{"item", "record_id"}
	h = append(h, show...)
	return append(h, "label", "note", "labeler")
}

// WriteWorksheet writes a worksheet (worksheet.csv or worksheet-second.csv)
// with the header of WorksheetHeader(show) and one line per row. The
// labeler column is always written (empty unless set).
func WriteWorksheet(w io.Writer, show []string, rows []WorksheetRow) error {
	out := make([][]string, 0, len(rows)+1)
	out = append(out, WorksheetHeader(show))
	for _, r := range rows {
		rec := make([]string, 0, len(show)+5)
		rec = append(rec, strconv.Itoa(r.Item), r.RecordID)
		rec = append(rec, r.Show...)
		for len(rec) < 2+len(show) {
			rec = append(rec, "")
		}
		rec = append(rec, r.Label, r.Note, r.Labeler)
		out = append(out, rec)
	}
	return writeCSV(w, out)
}

// ReadWorksheet reads a labeled worksheet. Its columns must be item,
// record_id, any show columns, label, note and optionally labeler (in that
// order). It returns the header as found and the rows with their line
// numbers. Items must be positive whole numbers and record ids non-empty,
// each appearing once. Errors are *inputerr.Error naming file, line, column.
func ReadWorksheet(path string) (header []string, rows []WorksheetRow, err error) {
	t, err := readCSVTable(path)
	if err != nil {
		return nil, nil, err
	}
	return worksheetFromTable(t)
}

// worksheetLayout finds the show columns and whether a labeler column is
// present in a worksheet header.
func worksheetLayout(name string, h []string) (nShow int, hasLabeler bool, err error) {
	bad := func() error {
		e := inputErrorf(name, 1, "", "header is %s; a worksheet's columns are item, record_id, the shown columns, label, note and optionally labeler", columnList(h))
		e.Hint = "use the worksheet.csv written by probity draw; keep its header line as it is"
		return e
	}
	if len(h) < 4 || h[0] != "item" || h[1] != "record_id" {
		return 0, false, bad()
	}
	end := len(h)
	if h[end-1] == "labeler" {
		hasLabeler = true
		end--
	}
	if end < 4 || h[end-2] != "label" || h[end-1] != "note" {
		return 0, false, bad()
	}
	seen := map[string]bool{}
	for i, c := range h {
		if seen[c] {
			return 0, false, inputErrorf(name, 1, c, "header names column %q twice (column %d)", c, i+1)
		}
		seen[c] = true
	}
	return end - 4, hasLabeler, nil
}

func worksheetFromTable(t *csvTable) ([]string, []WorksheetRow, error) {
	name := t.name
	nShow, hasLabeler, err := worksheetLayout(name, t.header)
	if err != nil {
		return nil, nil, err
	}
	rows := make([]WorksheetRow, 0, len(t.rows))
	items := map[int]int{}
	ids := map[string]int{}
	for i, rec := range t.rows {
		line := t.lines[i]
		var r WorksheetRow
		r.Line = line
		if r.Item, err = parseItem(name, line, "item", rec[0]); err != nil {
			return nil, nil, err
		}
		if prev, ok := items[r.Item]; ok {
			return nil, nil, inputErrorf(name, line, "item", "item %d appears twice (lines %d and %d)", r.Item, prev, line)
		}
		items[r.Item] = line
		r.RecordID = rec[1]
		if r.RecordID == "" {
			return nil, nil, inputErrorf(name, line, "record_id", "record_id is empty")
		}
		if prev, ok := ids[r.RecordID]; ok {
			return nil, nil, inputErrorf(name, line, "record_id", "record_id %q appears twice (lines %d and %d)", r.RecordID, prev, line)
		}
		ids[r.RecordID] = line
		r.Show = append([]string{}, rec[2:2+nShow]...)
		r.Label = rec[2+nShow]
		r.Note = rec[3+nShow]
		if hasLabeler {
			r.Labeler = rec[4+nShow]
		}
		rows = append(rows, r)
	}
	return append([]string{}, t.header...), rows, nil
}

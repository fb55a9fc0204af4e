package drawfolder

import (
	"io"
	"slices"
	"strconv"
	"strings"

	"probity/plan/personname"
)

// WorksheetRow is one row of worksheet.csv, what labelers get: item,
// record_id, the shown columns, label, note (and, once label quality is
// tracked, labeler). It never carries a prediction, score or stratum.
type WorksheetRow struct {
	Item     int
	RecordID string
	Show     []string
	Label    string
	Note     string
	Labeler  string
	// Line is the 1-based line in the file it was read from (0 if written).
	Line int
}

// WorksheetHeader returns a worksheet's header: item, record_id, the show
// columns (as ShownHeader names them), label, note, labeler.
func WorksheetHeader(show []string) []string { return worksheetHeader(DrawID{}, show) }

// worksheetHeader is WorksheetHeader with the first cell naming the draw
// (DrawID.itemCell).
func worksheetHeader(id DrawID, show []string) []string {
	h := []string{id.itemCell(), "record_id"}
	h = append(h, ShownHeader(show)...)
	return append(h, "label", "note", "labeler")
}

// worksheetColumns are the names of a worksheet's own columns.
var worksheetColumns = []string{"item", "record_id", "label", "note", "labeler"}

// shownPrefix marks a shown column whose log name is one of the
// worksheet's own column names.
const shownPrefix = "log:"

// ShownHeader is how the worksheet names the log's shown columns: as the
// log does, except that a name of the worksheet's own (item, record_id,
// label, note, labeler) — or one already starting with "log:" — is written
// "log:NAME", so a log column called note can be shown without two note
// columns in the header. The mapping is one-to-one.
func ShownHeader(show []string) []string {
	out := make([]string, len(show))
	for i, c := range show {
		if slices.Contains(worksheetColumns, c) || strings.HasPrefix(c, shownPrefix) {
			c = shownPrefix + c
		}
		out[i] = c
	}
	return out
}

// WriteWorksheet writes a worksheet (worksheet.csv or worksheet-second.csv)
// with the header of WorksheetHeader(show) and one line per row. The
// labeler column is always written (empty unless set).
func WriteWorksheet(w io.Writer, show []string, rows []WorksheetRow) error {
	return writeWorksheet(w, WorksheetHeader(show), len(show), rows)
}

// WriteDrawWorksheet is WriteWorksheet for the worksheet of the draw id:
// its first header cell names the draw (as a draw writes it).
func WriteDrawWorksheet(w io.Writer, id DrawID, show []string, rows []WorksheetRow) error {
	return writeWorksheet(w, worksheetHeader(id, show), len(show), rows)
}

// writeWorksheet writes a worksheet with this header, which names nShow
// shown columns.
func writeWorksheet(w io.Writer, header []string, nShow int, rows []WorksheetRow) error {
	show := header[2 : 2+nShow]
	out := make([][]string, 0, len(rows)+1)
	out = append(out, header)
	for _, r := range rows {
		rec := make([]string, 0, len(show)+5)
		rec = append(rec, strconv.Itoa(r.Item), CellText(r.RecordID))
		rec = append(rec, cellTexts(r.Show)...)
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
	t, err := readCSVTable(path, "worksheet")
	if err != nil {
		return nil, nil, err
	}
	return worksheetFromTable(path, t)
}

// worksheetLayout finds the show columns and whether a labeler column is
// present in a worksheet header.
func worksheetLayout(name string, h []string) (nShow int, hasLabeler bool, err error) {
	bad := func() error {
		e := inputErrorf(name, 1, "", "header is %s; a worksheet's columns are item, record_id, the shown columns, label, note and optionally labeler", columnList(h))
		e.Hint = "use the worksheet.csv written by probity draw; keep its header line as it is"
		return e
	}
	if _, _, ok := parseItemCell(h[0]); len(h) < 4 || !ok || h[1] != "record_id" {
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

func worksheetFromTable(name string, t *CSVTable) ([]string, []WorksheetRow, error) {
	nShow, hasLabeler, err := worksheetLayout(name, t.Header)
	if err != nil {
		return nil, nil, err
	}
	rows := make([]WorksheetRow, 0, len(t.Rows))
	items := map[int]int{}
	ids := map[string]int{}
	for i, rec := range t.Rows {
		line := t.Lines[i]
		var r WorksheetRow
		r.Line = line
		if r.Item, err = parseItem(name, line, "item", rec[0]); err != nil {
			return nil, nil, err
		}
		if prev, ok := items[r.Item]; ok {
			return nil, nil, inputErrorf(name, line, "item", "item %d appears twice (lines %d and %d)", r.Item, prev, line)
		}
		items[r.Item] = line
		r.RecordID = CellValue(rec[1])
		if r.RecordID == "" {
			return nil, nil, inputErrorf(name, line, "record_id", "record_id is empty")
		}
		if prev, ok := ids[r.RecordID]; ok {
			return nil, nil, inputErrorf(name, line, "record_id", "record_id %q appears twice (lines %d and %d)", r.RecordID, prev, line)
		}
		ids[r.RecordID] = line
		r.Show = cellValues(rec[2 : 2+nShow])
		r.Label = rec[2+nShow]
		r.Note = rec[3+nShow]
		if hasLabeler {
			if r.Labeler, err = personname.Clean(rec[4+nShow]); err != nil {
				return nil, nil, inputErrorf(name, line, "labeler", "labeler of item %d: %v", r.Item, err).
					WithHint("retype the labeler's name: it holds a character that prints nothing or reorders the text around it")
			}
		}
		rows = append(rows, r)
	}
	return append([]string{}, t.Header...), rows, nil
}

// ShownColumns returns the shown columns of a worksheet header: the
// columns between record_id and label (item, record_id, shown…, label,
// note[, labeler]); none when the header is not a worksheet's.
func ShownColumns(h []string) []string {
	end := len(h)
	if end > 0 && h[end-1] == "labeler" {
		end--
	}
	if end < 4 {
		return nil
	}
	return h[2 : end-2]
}

package drawfolder

import (
	"fmt"
	"os"
	"slices"
	"strings"

	"probity/plan/inputerr"
	"probity/plan/inputfile"
)

// Labels is a labeled worksheet: a copy of worksheet.csv (or of
// worksheet-second.csv) with its label, note and labeler columns filled.
type Labels struct {
	Path   string
	Header []string
	Rows   []WorksheetRow
	Bytes  []byte
}

// ReadLabels reads a labeled worksheet (ReadWorksheet), keeping its bytes
// for its fingerprint.
func ReadLabels(path string) (*Labels, error) {
	data, err := inputfile.ReadFile(path, "worksheet", inputfile.TableLimit)
	if err != nil {
		return nil, err
	}
	return ParseLabels(data, path)
}

// ParseLabels reads a labeled worksheet from its bytes; path names it in
// messages.
func ParseLabels(data []byte, path string) (*Labels, error) {
	t, err := ParseCSVTable(data, path)
	if err != nil {
		return nil, err
	}
	h, rows, err := worksheetFromTable(path, t)
	if err != nil {
		return nil, err
	}
	return &Labels{Path: path, Header: h, Rows: rows, Bytes: data}, nil
}

// Shown is the labeled worksheet's shown columns.
func (l *Labels) Shown() []string { return ShownColumns(l.Header) }

// CheckSecond checks a labeled second worksheet against the draw's
// worksheet-second.csv, when the folder has one: the same shown columns
// and, for every item, the same record id and shown values. (Which items
// were doubled is the ledger's to say; see package agreement.)
func (f *Folder) CheckSecond(l *Labels) error {
	drawPath := f.Path(WorksheetSecondFile)
	if _, err := os.Stat(drawPath); err != nil {
		return nil
	}
	dh, drows, err := ReadWorksheet(drawPath)
	if err != nil {
		return err
	}
	if got, want := l.Shown(), ShownColumns(dh); !slices.Equal(got, want) {
		return &inputerr.Error{File: l.Path, Line: 1,
			Msg:  fmt.Sprintf("the shown columns are %s, but the draw's %s has %s", strings.Join(got, ","), WorksheetSecondFile, strings.Join(want, ",")),
			Hint: "label a copy of the worksheet-second.csv written by probity draw without adding, removing or renaming columns"}
	}
	want := map[int]WorksheetRow{}
	for _, r := range drows {
		want[r.Item] = r
	}
	for _, r := range l.Rows {
		w, ok := want[r.Item]
		if ok && (w.RecordID != r.RecordID || !slices.Equal(w.Show, r.Show)) {
			return &inputerr.Error{File: l.Path, Line: r.Line, Field: "item",
				Msg:  fmt.Sprintf("item %d differs from the draw's %s (record id or shown values)", r.Item, WorksheetSecondFile),
				Hint: "label a copy of the worksheet-second.csv written by probity draw without editing its rows"}
		}
	}
	return nil
}

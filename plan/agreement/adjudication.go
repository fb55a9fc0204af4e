package agreement

import (
	"errors"
	"fmt"
	"slices"
	"strconv"
	"strings"

	"probity/plan/inputerr"
	"probity/plan/inputfile"
	"probity/plan/personname"
	"probity/sampling/drawfolder"
)

// AdjudicationColumns is the header of an adjudication file, in order:
//
//	item         the worksheet item number (a positive whole number)
//	record_id    the item's record id, as in the worksheets (a guard
//	             against a shifted row)
//	final_label  the label the judgement uses: one of the plan's classes
//	             (not blank, not unsure), read as a worksheet's label cell
//	             is (spaces around it are ignored)
//	decided_by   who decided (not blank)
//	note         why, in a few words (may be blank)
//
// One row per doubled item the two labelers did not agree on; a row for an
// item that was not doubled, or on which the labelers agreed, is refused.
var AdjudicationColumns = []string{"item", "record_id", "final_label", "decided_by", "note"}

// Adjudication is one row of an adjudication file.
type Adjudication struct {
	Item       int
	RecordID   string
	FinalLabel string
	DecidedBy  string
	Note       string
	// Line is the 1-based line the row starts on.
	Line int
}

// ReadAdjudications reads an adjudication file (CSV with the header
// AdjudicationColumns; a UTF-8 byte-order mark and CRLF line ends are
// accepted). Every final_label must be one of classes. Errors are
// *inputerr.Error naming the file, line and column.
func ReadAdjudications(path string, classes []string) ([]Adjudication, error) {
	data, err := inputfile.ReadFile(path, "adjudication file", inputfile.TableLimit)
	if err != nil {
		return nil, err
	}
	return ParseAdjudications(data, path, classes)
}

// ParseAdjudications is ReadAdjudications on bytes already read; name is
// the file name used in messages.
func ParseAdjudications(data []byte, name string, classes []string) ([]Adjudication, error) {
	emptyHint := "start the file with the line: " + strings.Join(AdjudicationColumns, ",")
	t, err := drawfolder.ParseCSVTable(data, name)
	if err != nil {
		var ie *inputerr.Error
		if errors.As(err, &ie) && ie.Line == 0 && ie.Err == nil {
			c := *ie
			c.Hint = emptyHint
			return nil, &c
		}
		return nil, err
	}
	if !slices.Equal(t.Header, AdjudicationColumns) {
		return nil, &inputerr.Error{File: name, Line: 1,
			Msg:  fmt.Sprintf("header is %s; an adjudication file's columns are %s", strings.Join(t.Header, ","), strings.Join(AdjudicationColumns, ",")),
			Hint: emptyHint}
	}
	out := []Adjudication{}
	items := map[int]int{}
	ids := map[string]int{}
	for i, rec := range t.Rows {
		line := t.Lines[i]
		a, err := parseAdjudication(name, line, rec, classes)
		if err != nil {
			return nil, err
		}
		if prev, ok := items[a.Item]; ok {
			return nil, &inputerr.Error{File: name, Line: line, Field: "item",
				Msg: fmt.Sprintf("item %d is adjudicated twice (lines %d and %d)", a.Item, prev, line)}
		}
		items[a.Item] = line
		if prev, ok := ids[a.RecordID]; ok {
			return nil, &inputerr.Error{File: name, Line: line, Field: "record_id",
				Msg: fmt.Sprintf("record_id %q is adjudicated twice (lines %d and %d)", a.RecordID, prev, line)}
		}
		ids[a.RecordID] = line
		out = append(out, a)
	}
	return out, nil
}

// parseAdjudication checks one data row.
func parseAdjudication(name string, line int, rec, classes []string) (Adjudication, error) {
	bad := func(col, format string, args ...any) error {
		return &inputerr.Error{File: name, Line: line, Field: col, Msg: fmt.Sprintf(format, args...)}
	}
	a := Adjudication{Line: line, RecordID: drawfolder.CellValue(rec[1]), FinalLabel: rec[2], DecidedBy: strings.TrimSpace(rec[3]), Note: rec[4]}
	n, err := strconv.Atoi(rec[0])
	if err != nil || n < 1 {
		return a, bad("item", "%q is not a positive whole number", rec[0])
	}
	a.Item = n
	if a.RecordID == "" {
		return a, bad("record_id", "record_id is empty")
	}
	// The final label is read as a worksheet's label cell is
	// (drawfolder.ParseLabel), but it must be a class.
	final, kind := drawfolder.ParseLabel(rec[2], classes)
	switch kind {
	case drawfolder.LabelBlank:
		e := bad("final_label", "final_label is empty").(*inputerr.Error)
		e.Hint = "write the decided class (" + strings.Join(classes, ", ") + ") or remove the row"
		return a, e
	case drawfolder.LabelUnsure, drawfolder.LabelInvalid:
		e := bad("final_label", "final_label %q is not one of the classes (%s)", a.FinalLabel, strings.Join(classes, ", ")).(*inputerr.Error)
		if kind == drawfolder.LabelUnsure {
			e.Hint = "an adjudication must decide one of the classes; leave the item out to keep the disagreement open"
		}
		return a, e
	}
	a.FinalLabel = final
	if a.DecidedBy, err = personname.Clean(a.DecidedBy); err != nil {
		e := bad("decided_by", "decided_by of item %d: %v", a.Item, err).(*inputerr.Error)
		e.Hint = "retype the name: it holds a character that prints nothing or reorders the text around it"
		return a, e
	}
	if a.DecidedBy == "" {
		return a, bad("decided_by", "decided_by is empty; name who decided")
	}
	return a, nil
}

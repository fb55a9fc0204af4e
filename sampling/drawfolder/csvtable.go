package drawfolder

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"probity/plan/inputerr"
	"probity/plan/inputfile"
	"strconv"
)

// CSVTable is a small CSV file with a header line, read whole: the draw
// folder's own files (ledger, worksheets), which are as large as the
// sample, not the log, and other small tables read the same way (an
// adjudication file, a query result). Lines[i] is the 1-based line Rows[i]
// starts on.
type CSVTable struct {
	Header []string
	Rows   [][]string
	Lines  []int
}

// readCSVTable reads a CSV file with ParseCSVTable; what names the
// kind of file in messages.
func readCSVTable(path, what string) (*CSVTable, error) {
	data, err := inputfile.ReadFile(path, what, inputfile.TableLimit)
	if err != nil {
		return nil, err
	}
	return ParseCSVTable(data, path)
}

// ParseCSVTable parses a small CSV file with a header line: a UTF-8
// byte-order mark (added by some spreadsheet programs) and CRLF line ends
// are accepted, every row must have as many fields as the header, and an
// empty file is an error. Errors are *inputerr.Error values naming name
// and the line.
func ParseCSVTable(data []byte, name string) (*CSVTable, error) {
	data = bytes.TrimPrefix(data, []byte("\xef\xbb\xbf"))
	if err := checkLayout(data, name); err != nil {
		return nil, err
	}
	r := csv.NewReader(bytes.NewReader(data))
	r.FieldsPerRecord = -1
	t := &CSVTable{}
	for {
		rec, err := r.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			var pe *csv.ParseError
			if errors.As(err, &pe) {
				return nil, &inputerr.Error{File: name, Line: pe.Line, Msg: pe.Err.Error(), Err: err}
			}
			return nil, &inputerr.Error{File: name, Msg: err.Error(), Err: err}
		}
		line, _ := r.FieldPos(0)
		if t.Header == nil {
			t.Header = rec
			continue
		}
		if len(rec) != len(t.Header) {
			return nil, inputErrorf(name, line, "", "%d fields, but the header has %d", len(rec), len(t.Header))
		}
		t.Rows = append(t.Rows, rec)
		t.Lines = append(t.Lines, line)
	}
	if t.Header == nil {
		return nil, inputErrorf(name, 0, "", "the file is empty (no header line)")
	}
	return t, nil
}

// checkLayout refuses two layouts a spreadsheet program may save a CSV
// file in that would otherwise read as one odd header: line ends that are
// carriage returns alone (old Mac files), and fields separated by
// semicolons (the CSV of locales that write decimal commas).
func checkLayout(data []byte, name string) error {
	first := data
	if i := bytes.IndexByte(data, '\n'); i >= 0 {
		first = data[:i]
	}
	first = bytes.TrimSuffix(first, []byte("\r"))
	if bytes.IndexByte(first, '\r') >= 0 {
		e := inputErrorf(name, 0, "", "its line ends are carriage returns alone (\\r, as in old Mac files), so it reads as one line")
		e.Hint = "save it as CSV with Unix (LF) or Windows (CRLF) line ends"
		return e
	}
	if semis := bytes.Count(first, []byte{';'}); semis >= 2 && bytes.Count(first, []byte{','}) < semis {
		e := inputErrorf(name, 1, "", "its fields are separated by ';', not ','")
		e.Hint = "save it as CSV with ',' as the field separator (in the spreadsheet's CSV export options)"
		return e
	}
	return nil
}

// CheckHeader compares a header read from the file name with the expected
// column names; a difference is an *inputerr.Error naming line 1.
func CheckHeader(name string, got, want []string) error {
	if len(got) != len(want) {
		return inputErrorf(name, 1, "", "header has %d columns, expected %d: %s", len(got), len(want), columnList(want))
	}
	for i := range want {
		if got[i] != want[i] {
			return inputErrorf(name, 1, "", "header column %d is %q, expected %q (expected columns: %s)", i+1, got[i], want[i], columnList(want))
		}
	}
	return nil
}

// parseItem parses a 1-based item number.
func parseItem(name string, line int, column, v string) (int, error) {
	n, err := strconv.Atoi(v)
	if err != nil || n < 1 {
		return 0, inputErrorf(name, line, column, "%q is not a positive whole number", v)
	}
	return n, nil
}

// parseBool parses "true" or "false".
func parseBool(name string, line int, column, v string) (bool, error) {
	switch v {
	case "true":
		return true, nil
	case "false":
		return false, nil
	}
	return false, inputErrorf(name, line, column, "%q is neither true nor false", v)
}

// formatFloat is the one float format of the draw folder's CSV files: the
// shortest decimal that reads back to the same float64, never an exponent.
func formatFloat(v float64) string { return strconv.FormatFloat(v, 'f', -1, 64) }

// formatBool writes true or false.
func formatBool(b bool) string {
	if b {
		return "true"
	}
	return "false"
}

// isKey reports whether s is 64 lowercase hex digits.
func isKey(s string) bool {
	if len(s) != 64 {
		return false
	}
	for i := 0; i < len(s); i++ {
		c := s[i]
		if !(c >= '0' && c <= '9' || c >= 'a' && c <= 'f') {
			return false
		}
	}
	return true
}

// writeCSV writes rows with "\n" line ends and encoding/csv's quoting.
func writeCSV(w io.Writer, rows [][]string) error {
	cw := csv.NewWriter(w)
	if err := cw.WriteAll(rows); err != nil {
		return fmt.Errorf("writing CSV: %w", err)
	}
	return nil
}
